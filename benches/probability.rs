//! Probabilities at 30 digits: Erlang C for c = 50 servers (an exact walk of 50 terms and a
//! geometric tail in closed form), the blocking of a loss system with c = 1000 (an exact finite
//! sum of 1001 terms), and a power-law tail with no closed form (numeric, Euler–Maclaurin).
//! The goal is "well under a second" per answer, the whole law included.

use std::collections::BTreeMap;

use criterion::{criterion_group, criterion_main, Criterion};

use telescope::algebra::{q, Q};
use telescope::model::build_model;
use telescope::piecewise::solve_model;
use telescope::probability::{parse_event, Law};

/// (name, model, parameter values, event)
type Case = (
    &'static str,
    &'static str,
    Vec<(&'static str, Q)>,
    &'static str,
);

fn probabilities(c: &mut Criterion) {
    let cases: [Case; 3] = [
        (
            "erlang_c_50_servers",
            "param A > 0\nparam c integer >= 1\nbirth(k) = A\ndeath(k) = k for 1 <= k <= c\ndeath(k) = c for k > c",
            vec![("A", q(45, 1)), ("c", q(50, 1))],
            "k >= c",
        ),
        (
            "erlang_b_1000_servers",
            "param A > 0\nparam c integer >= 1\nbirth(k) = A for 0 <= k <= c - 1\ndeath(k) = k",
            vec![("A", q(950, 1)), ("c", q(1000, 1))],
            "k = c",
        ),
        (
            "power_law_tail",
            "a(k)/a(k-1) = (k-1)(k+1/3)/((k+3)(k+1/2)) for k >= 2",
            vec![],
            "k >= 100",
        ),
    ];
    for (name, text, values, event) in cases {
        let model = build_model(text).unwrap();
        let values: BTreeMap<String, Q> = values
            .into_iter()
            .map(|(n, v)| (n.to_string(), v))
            .collect();
        let solved = solve_model(&model, &values).unwrap();
        let event = parse_event(event, &model.index, &model.params).unwrap();
        c.bench_function(
            &format!("probability/{name}/law_and_answer_30_digits"),
            |b| {
                b.iter(|| {
                    let law = Law::new(&solved, 30);
                    law.probability(&event).value.unwrap()
                })
            },
        );
    }
}

criterion_group!(benches, probabilities);
criterion_main!(benches);
