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
