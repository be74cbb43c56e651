//! `fit` and `sample` on the citation example (ρ = 3/10). Goals (README): fitting ρ to 10^5
//! observations in at most 1 s, and 10^6 draws (table included) in at most 1 s.

use std::collections::BTreeMap;

use criterion::{criterion_group, criterion_main, Criterion};

use telescope::algebra::parse_q;
use telescope::data::Counts;
use telescope::fit::{fit, FitRequest};
use telescope::model::build_problem;
use telescope::sample::sample_law;

const CITATION: &str = include_str!("../examples/citation_growth.rule");

fn fits_and_draws(c: &mut Criterion) {
    let problem = build_problem(CITATION).unwrap();
    let values = BTreeMap::from([("rho".to_string(), parse_q("3/10").unwrap())]);
    let draws = sample_law(&problem, &values, 100_000, 2026).unwrap().draws;
    let counts = Counts::from_observations(draws);
    let mut group = c.benchmark_group("fit");
    group.sample_size(10);
    group.bench_function("citation, rho from 10^5 observations (full report)", |b| {
        b.iter(|| {
            fit(&problem, &counts, &FitRequest::default())
                .outcome
                .unwrap()
                .log_likelihood
        })
    });
    group.bench_function("citation, 10^6 draws (table included)", |b| {
        b.iter(|| {
            sample_law(&problem, &values, 1_000_000, 7)
                .unwrap()
                .draws
                .len()
        })
    });
    group.finish();
}

criterion_group!(benches, fits_and_draws);
criterion_main!(benches);
