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

/// The whole symbolic `telescope solve FILE` (no --param values) through the library calls
/// `main` makes: read and parse the model file, solve, analyse (tail law with two
/// corrections, conditions, total, mean, variance), render the text. Issue 13's goals are
/// ≤ 5 ms for the citation example and ≤ 20 ms for the ten-factor bench rule per whole
/// process; this bench is the in-process part of those (process start-up is measured with
/// hyperfine, see README).
fn whole_symbolic_solve(c: &mut Criterion) {
    use telescope::analysis::{analyse, AnalysisRequest};
    use telescope::probability::probabilities;
    use telescope::render::{solve_report, SolveFormat, SolveLayout, SolveReport};
    use telescope::session;
    let files = [
        ("citation", "examples/citation_growth.rule"),
        ("ten_factor_file", "benches/data/ten_factors.rule"),
    ];
    let run = |path: &str| -> String {
        let input = session::read_input(path).unwrap();
        let model = session::load_model(&input).unwrap();
        let values = session::parse_values_for(&model.params, &[]).unwrap();
        let solved = session::run_solve_model(&input, &model, &values).unwrap();
        let events = session::parse_events(&model, &[]).unwrap();
        let request = AnalysisRequest::default();
        let probabilities = probabilities(&solved, &events, request.digits);
        let piece = &solved.pieces[0];
        let analysis = analyse(&piece.problem, &piece.solution, &request).unwrap();
        let report = SolveReport {
            analysis: Some(&analysis),
            digits: request.digits,
            probabilities: &probabilities,
        };
        solve_report(
            &model,
            &solved,
            &report,
            SolveFormat::Text,
            SolveLayout::default(),
        )
    };
    for (name, path) in files {
        assert!(run(path).contains("closed form"), "{path} solves");
        c.bench_function(&format!("whole_solve/{name}"), |b| b.iter(|| run(path)));
    }
}

/// Conditions solved on the declared ranges: one parameter with a rational end (the citation
/// variance), an irrational end (a cubic), and a linear solution in two parameters.
fn solve_conditions(c: &mut Criterion) {
    use telescope::analysis::{analyse, AnalysisRequest};
    let rules = [
        (
            "rational_end",
            "param rho in (0, 1)\nn(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k)",
        ),
        (
            "cubic_end",
            "param rho > 0\nx(k)/x(k-1) = (k + rho^3 - 2 rho)/(k + 4)",
        ),
        (
            "linear_two_params",
            "param nu > 0\nparam beta > 0\nx(k)/x(k-1) = (k - 1 + beta)/(k + nu)",
        ),
    ];
    let request = AnalysisRequest {
        terms: 0,
        ..AnalysisRequest::default()
    };
    for (name, rule) in rules {
        let problem = build_problem(rule).unwrap();
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        c.bench_function(&format!("conditions/{name}"), |b| {
            b.iter(|| analyse(&problem, &solution, &request).unwrap())
        });
    }
}

/// The interval solver alone: the three conditions of the cubic rule above, together.
fn split_cubic(c: &mut Criterion) {
    use telescope::algebra::q;
    use telescope::solve::inequality::split_univariate;
    use telescope::solve::ranges::{Extended, Interval};
    let range = Interval {
        low: Extended::Finite(q(0, 1)),
        low_included: false,
        high: Extended::PlusInfinity,
        high_included: false,
    };
    // 3 + 2ρ − ρ³ > 0, 2 + 2ρ − ρ³ > 0, 1 + 2ρ − ρ³ > 0
    let f: Vec<_> = (1..=3)
        .map(|c0| (vec![q(c0, 1), q(2, 1), q(0, 1), q(-1, 1)], vec![q(1, 1)]))
        .collect();
    c.bench_function("conditions/split_three_cubics", |b| {
        b.iter(|| split_univariate("rho", false, &f, &range, 30))
    });
}

criterion_group!(
    benches,
    solve_rules,
    whole_symbolic_solve,
    solve_conditions,
    split_cubic
);
criterion_main!(benches);
