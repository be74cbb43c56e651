//! Symbolic work should take milliseconds: parse, normal form, telescoping, rendering.

use std::collections::BTreeMap;

use criterion::{criterion_group, criterion_main, Criterion};

use telescope::model::build_problem;
use telescope::render;
use telescope::solve::solve;

fn solve_rules(c: &mut Criterion) {
    let rules = [
        ("growth", "n(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k)"),
        ("binomial", "a(k)/a(k-1) = (N-k+1)/k * p/(1-p)  for k >= 1"),
        // Ten factors: the simplifier's search is the cost to watch.
        (
            "ten_factors",
            "a(k)/a(k-1) = (k+1/3)(k+2/3)(k+1/5)(k+2/7)(k-1)/((k+1/2)(k+3/4)(k+5)(k+6)(k+alpha))",
        ),
    ];
    for (name, rule) in rules {
        c.bench_function(&format!("solve/{name}"), |b| {
            b.iter(|| {
                let problem = build_problem(rule).unwrap();
                let solution = solve(&problem, &BTreeMap::new()).unwrap();
                render::solve_text(&problem, &solution)
            })
        });
    }
}

criterion_group!(benches, solve_rules);
criterion_main!(benches);
