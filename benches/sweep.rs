//! `sweep` over 1000 points at 30 digits (the goals of the sweep's issue, on 2 cores):
//! - the citation example's default quantities (r, θ, total, mean, variance: closed forms,
//!   exact rationals): ≤ 0.5 s for the whole process;
//! - a rule whose total is ₃F₂(1/2, α + 1, 1; 3, 7/2; 1), which has no closed form, so every
//!   point sums numerically with its error bound (Euler–Maclaurin tail): ≤ 10 s.
//!
//! Each measurement is the library's whole job: parse, solve once, 1000 points in parallel
//! (rayon), boundaries.

use std::collections::BTreeMap;

use criterion::{criterion_group, criterion_main, Criterion};

use telescope::model::build_model;
use telescope::sweep::{run, spec, Plan, ProgressMode, SweepRequest};

fn sweep_of(text: &str, vary: &str) -> usize {
    let model = build_model(text).unwrap();
    let fixed = BTreeMap::new();
    let spacing = spec::Spacing {
        points: Some(1000),
        ..Default::default()
    };
    let axis = spec::parse_vary(vary, &model, &fixed, &spacing).unwrap();
    let plan = Plan::new(&model, &fixed).unwrap();
    let request = SweepRequest::new(vec![axis], spec::default_quantities(), 30);
    run(&plan, &request, ProgressMode::Hidden)
        .expect("no budget")
        .points
        .len()
}

fn sweeps(c: &mut Criterion) {
    let citation = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/citation_growth.rule"
    ))
    .unwrap();
    c.bench_function("sweep/citation_1000_points_30_digits", |b| {
        b.iter(|| sweep_of(&citation, "rho=0.01..0.99"))
    });
    let no_closed_form =
        "param alpha in [0, 2)\na(k)/a(k-1) = (k - 1/2)(k + alpha)/((k + 2)(k + 5/2)) for k >= 1";
    c.bench_function("sweep/3f2_no_closed_form_1000_points_30_digits", |b| {
        b.iter(|| sweep_of(no_closed_form, "alpha=0..1.9"))
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default()
        .sample_size(10)
        .warm_up_time(std::time::Duration::from_secs(1))
        .measurement_time(std::time::Duration::from_secs(5));
    targets = sweeps
}
criterion_main!(benches);
