//! Normalisation at 50 digits: Yule–Simon (a power-law tail, Euler–Maclaurin with Hurwitz zeta
//! values) and a power law with no closed-form sum, 3F2(1, 1, 5/2; 7/3, 11/4; 1). The goal is
//! "well under a second"; both the numeric sum alone and the whole analysis are measured.

use std::collections::BTreeMap;

use criterion::{criterion_group, criterion_main, Criterion};

use telescope::analysis::{
    analyse, moment_sums, tail_law, AnalysisRequest, NumericRule, RisingForm,
};
use telescope::model::build_problem;
use telescope::solve::solve;

fn normalisation(c: &mut Criterion) {
    let rules = [
        ("yule_simon_5_2", "a(k)/a(k-1) = (k-1)/(k+5/2) for k >= 2"),
        (
            "power_law_3f2",
            "a(k)/a(k-1) = (k-1)/(k+1/3) * (k+1/2)/(k+3/4) for k >= 2",
        ),
    ];
    for (name, rule) in rules {
        let problem = build_problem(rule).unwrap();
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        let numeric = NumericRule {
            form: RisingForm::from_ratio(&problem.ratio),
            base_index: solution.base_index.clone(),
            last: None,
        };
        c.bench_function(&format!("normalisation/{name}/sum_50_digits"), |b| {
            b.iter(|| moment_sums(&numeric, 50).unwrap())
        });
        let request = AnalysisRequest {
            terms: 2,
            digits: 50,
            normalize: true,
        };
        c.bench_function(&format!("normalisation/{name}/analysis_50_digits"), |b| {
            b.iter(|| analyse(&problem, &solution, &request).unwrap())
        });
    }
}

/// Symbolic tail corrections c₁ … c₁₂ of the citation rule (one parameter): the law alone,
/// and the whole `solve --terms 12` report (analysis and text rendering). Goal: under 1 s.
fn tail_corrections(c: &mut Criterion) {
    let problem = build_problem(CITATION).unwrap();
    let form = RisingForm::from_ratio(&problem.ratio);
    c.bench_function("tail/citation/law_12_terms", |b| {
        b.iter(|| tail_law(&form, &problem.base_index(), 12))
    });
    let solution = solve(&problem, &BTreeMap::new()).unwrap();
    let request = AnalysisRequest {
        terms: 12,
        digits: 30,
        normalize: false,
    };
    c.bench_function("tail/citation/analysis_text_12_terms", |b| {
        b.iter(|| {
            let analysis = analyse(&problem, &solution, &request).unwrap();
            telescope::render::analysis_output::analysis_text(&analysis)
        })
    });
}

/// `solve --digits 1000` on examples/citation_growth.rule with a value of rho, whole process
/// (parse, solve, total, mean and variance by Euler–Maclaurin with their numeric checks, text
/// output). Goal (README): at most 2 s. rho = 7/10 has a finite variance (three sums),
/// rho = 3/10 an infinite one.
fn thousand_digits(c: &mut Criterion) {
    let model = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/citation_growth.rule");
    let run = |rho: &str| {
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_telescope"))
            .args(["solve", model, "--param", rho, "--digits", "1000"])
            .output()
            .expect("the binary runs");
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        out.stdout.len()
    };
    for rho in ["rho=3/10", "rho=7/10"] {
        c.bench_function(&format!("digits/citation {rho}/solve_1000_digits"), |b| {
            b.iter(|| run(rho))
        });
    }
}

const CITATION: &str = "n(k)/n(k-1) = (1-rho)(k-1) / (1 + (1-rho) k)   for k >= 2";

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = normalisation, tail_corrections, thousand_digits
}
criterion_main!(benches);
