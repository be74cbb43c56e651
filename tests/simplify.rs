//! The simplest form against the telescoped one, and the familiar forms of published laws.
//!
//! Every rewrite is an identity of the Gamma function, so raw and simplest forms must agree
//! wherever both are defined: checked at pseudo-random parameter values inside the declared
//! ranges and at pseudo-random k in the support, for every example and every reference case.

mod common;
use common::{breakpoint_values, examples, reference_cases};

use std::collections::BTreeMap;

use num_bigint::BigInt;
use rug::Rational;

use telescope::algebra::{parse_q, Q};
use telescope::closed_form::{Affine, ClosedForm, Factor};
use telescope::model::{build_model, build_problem, Param, Problem};
use telescope::numeric::evaluate_closed_form;
use telescope::piecewise::solve_model;
use telescope::render;
use telescope::solve::{solve, Solution, SupportEnd};

const DIGITS: u32 = 50;

/// A small deterministic generator (64-bit LCG, Knuth's MMIX constants): reproducible points.
struct Points(u64);

impl Points {
    fn next(&mut self, below: u64) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 33) % below
    }

    /// A rational strictly inside the parameter's declared range (an integer if it must be).
    fn value_for(&mut self, p: &Param) -> Q {
        let lo = p.lower.as_ref().map(|(q, _)| q.clone());
        let hi = p.upper.as_ref().map(|(q, _)| q.clone());
        loop {
            let candidate = if p.integer {
                let start = lo
                    .clone()
                    .map(|l| l.ceil())
                    .unwrap_or_else(|| Q::from_integer(0.into()));
                start + Q::from_integer(BigInt::from(self.next(12)))
            } else {
                let t = Q::new(BigInt::from(1 + self.next(97)), BigInt::from(98));
                match (&lo, &hi) {
                    (Some(l), Some(h)) => l + (h - l) * t,
                    (Some(l), None) => l + t * Q::from_integer(BigInt::from(1 + self.next(9))),
                    (None, Some(h)) => h - t * Q::from_integer(BigInt::from(1 + self.next(9))),
                    (None, None) => t * Q::from_integer(BigInt::from(1 + self.next(9))),
                }
            };
            if p.admits(&candidate) {
                return candidate;
            }
        }
    }
}

fn value(
    form: &ClosedForm,
    k: &BigInt,
    params: &BTreeMap<String, Q>,
) -> telescope::numeric::LogReal {
    evaluate_closed_form(form, k, params, &Rational::from(1), DIGITS)
        .unwrap_or_else(|e| panic!("{form:?} at k = {k}: {e:?}"))
}

/// Raw and simplest forms agree at `k` in the support (to 45 digits).
fn assert_agree(label: &str, solution: &Solution, k: &BigInt, params: &BTreeMap<String, Q>) {
    let raw = value(&solution.closed_form, k, params);
    let simplest = value(&solution.simplest, k, params);
    if raw.is_zero() || simplest.is_zero() {
        assert_eq!(raw.is_zero(), simplest.is_zero(), "{label} k = {k}");
        return;
    }
    assert_eq!(raw.sign, simplest.sign, "{label} k = {k} {params:?}");
    let rel = raw.rel_diff(&simplest, 256);
    assert!(
        rel < 1e-45f64,
        "{label} k = {k} {params:?}: relative difference {rel}"
    );
}

/// Indices to test: the base, the first few, and pseudo-random ones up to 10^6 (capped at
/// the end of a finite support).
fn indices(solution: &Solution, params: &BTreeMap<String, Q>, points: &mut Points) -> Vec<BigInt> {
    let b = solution.base_index.clone();
    let last = match &solution.support.last {
        SupportEnd::At(n) => Some(n.clone()),
        SupportEnd::Symbolic { last, .. } => last
            .eval(params)
            .ok()
            .filter(Q::is_integer)
            .map(|q| q.to_integer()),
        SupportEnd::Infinite => None,
    };
    let mut out: Vec<BigInt> = (0..4).map(|i| &b + i).collect();
    for scale in [30u64, 1000, 1_000_000] {
        out.push(&b + points.next(scale));
    }
    if let Some(last) = last {
        out.retain(|k| *k <= last);
        out.push(last);
    }
    out
}

fn check_problem(label: &str, problem: &Problem, fixed: &BTreeMap<String, Q>, points: &mut Points) {
    // The symbolic solution, evaluated at values drawn from the ranges.
    let solution = solve(problem, fixed).unwrap_or_else(|e| panic!("{label}: {e}"));
    for round in 0..4 {
        let mut params = fixed.clone();
        for p in &problem.params {
            params
                .entry(p.name.clone())
                .or_insert_with(|| points.value_for(p));
        }
        for k in indices(&solution, &params, points) {
            assert_agree(&format!("{label} round {round}"), &solution, &k, &params);
        }
        // The solution with these values fixed simplifies differently (numbers, not symbols).
        let fixed_solution = solve(problem, &params).unwrap_or_else(|e| panic!("{label}: {e}"));
        for k in indices(&fixed_solution, &params, points) {
            assert_agree(
                &format!("{label} fixed {round}"),
                &fixed_solution,
                &k,
                &params,
            );
        }
    }
}

/// Every piece of every example, solved as `telescope solve` does (piecewise breakpoints,
/// the integer parameters, set to 3), with the values it was solved with.
fn example_pieces() -> Vec<(String, Problem, Solution, BTreeMap<String, Q>)> {
    let mut out = Vec::new();
    for (name, text) in examples() {
        let model = build_model(&text).unwrap();
        let values = breakpoint_values(&model);
        let solved = solve_model(&model, &values).unwrap();
        for (i, piece) in solved.pieces.into_iter().enumerate() {
            let label = format!("{name}, piece {}", i + 1);
            out.push((label, piece.problem, piece.solution, values.clone()));
        }
    }
    out
}

#[test]
fn raw_and_simplest_forms_agree_for_every_example() {
    let mut points = Points(2026);
    for (name, problem, _, values) in example_pieces() {
        check_problem(&name, &problem, &values, &mut points);
    }
}

#[test]
fn raw_and_simplest_forms_agree_for_every_reference_case() {
    // Cases and sources: tests/reference/distributions.json (SciPy pmfs, mpmath values).
    let mut points = Points(1729);
    for case in reference_cases() {
        let id = case["id"].as_str().unwrap();
        let numeric = build_problem(case["rule"].as_str().unwrap()).unwrap();
        check_problem(id, &numeric, &BTreeMap::new(), &mut points);
        let symbolic = build_problem(case["rule_symbolic"].as_str().unwrap()).unwrap();
        let values: BTreeMap<String, Q> = case["params"]
            .as_object()
            .map(|m| {
                m.iter()
                    .map(|(k, v)| (k.clone(), parse_q(v.as_str().unwrap()).unwrap()))
                    .collect()
            })
            .unwrap_or_default();
        check_problem(
            &format!("{id} symbolic"),
            &symbolic,
            &BTreeMap::new(),
            &mut points,
        );
        check_problem(
            &format!("{id} with values"),
            &symbolic,
            &values,
            &mut points,
        );
    }
}

#[test]
fn hand_made_rules_with_every_rewrite_agree() {
    // Shapes that exercise half-integers, negative geometric bases, reflected factors and
    // long integer shifts.
    let rules = [
        "a(k)/a(k-1) = -(k-1/2)/(2(k+2))  for k >= 2",
        "a(k)/a(k-1) = (k+1/2)^2/(k+3)^2  for k >= 1",
        "a(k)/a(k-1) = (k+7)/(k-1/3)  for k >= 1",
        "a(k)/a(k-1) = (k-1)/(k+9)  for k >= 2",
        "param N integer >= 2\na(k)/a(k-1) = (N-k+1)(N-k+2)/(k(k+1))  for k >= 1",
        "param c > 0\na(k)/a(k-1) = (k+c)/(k+c+5/2)  for k >= 1",
        "a(k)/a(k-1) = (k+1/3)(k+2/3)/(k(k+1))  for k >= 1",
        "a(k)/a(k-1) = (k-5)/(k+1/2)  for k >= 1",
        "a(k)/a(k-1) = (3-k)(k+1/2)/k^2  for k >= 1",
        "param b in (0, 1)\na(k)/a(k-1) = (k - 1 + b)/(k + 1 - b)  for k >= 1",
        "a(k)/a(k-1) = (k+1/3)(k+2/3)(k+1/5)(k+2/7)(k-1)/((k+1/2)(k+3/4)(k+5)(k+6)(k+7/3))",
    ];
    let mut points = Points(7);
    for rule in rules {
        let problem = build_problem(rule).unwrap();
        check_problem(rule, &problem, &BTreeMap::new(), &mut points);
    }
}

// ---- familiar forms ----

fn solved(rule: &str) -> (Problem, Solution) {
    let problem = build_problem(rule).unwrap();
    let solution = solve(&problem, &BTreeMap::new()).unwrap();
    (problem, solution)
}

fn no_special_functions(solution: &Solution) -> bool {
    solution
        .simplest
        .product
        .factors
        .iter()
        .all(|f| !f.is_special())
}

#[test]
fn linear_preferential_attachment_is_a_plain_rational_function() {
    // Bollobás, Riordan, Spencer, Tusnády, "The degree sequence of a scale-free random graph
    // process" (2001): p(k) = 2m(m+1)/(k(k+1)(k+2)); with m = 3 the ratio is (k−1)/(k+2) from
    // the base a(3), so a(k) = a(3)·60/(k(k+1)(k+2)) and a(3) = 2/5 gives 24/(k(k+1)(k+2)).
    let (problem, solution) = solved("a(k)/a(k-1) = (k-1)/(k+2)  for k >= 4");
    assert!(no_special_functions(&solution));
    assert_eq!(
        solution.simplest.product.coefficient.as_constant(),
        Some(Q::from_integer(60.into()))
    );
    let linear: Vec<&Affine> = solution
        .simplest
        .product
        .factors
        .iter()
        .map(|f| match f {
            Factor::Linear { arg, exponent: -1 } => arg,
            other => panic!("unexpected factor {other:?}"),
        })
        .collect();
    assert_eq!(linear.len(), 3);
    insta::assert_snapshot!(
        "preferential_attachment_text",
        render::solve_text(&problem, &solution)
    );
    insta::assert_snapshot!(
        "preferential_attachment_latex",
        render::solve_latex(&problem, &solution)
    );
}

#[test]
fn yule_simon_is_a_beta_function() {
    // SciPy scipy.stats.yulesimon: p(k) = α B(k, α+1); from a(1) the ratio (k−1)/(k+α) gives
    // a(k) = a(1)(α+1) B(k, α+1), with a(1) = α/(α+1).
    let (problem, solution) = solved("param alpha > 0\na(k)/a(k-1) = (k-1)/(k+alpha)  for k >= 2");
    let betas: Vec<&Factor> = solution
        .simplest
        .product
        .factors
        .iter()
        .filter(|f| matches!(f, Factor::Beta { exponent: 1, .. }))
        .collect();
    assert_eq!(betas.len(), 1);
    // The only other factor is the constant α + 1.
    assert_eq!(solution.simplest.product.factors.len(), 2);
    assert!(matches!(
        &solution.simplest.product.factors[0],
        Factor::Linear { arg, exponent: 1 } if !arg.depends_on_k()
    ));
    insta::assert_snapshot!("yule_simon_text", render::solve_text(&problem, &solution));
    insta::assert_snapshot!("yule_simon_latex", render::solve_latex(&problem, &solution));
}

#[test]
fn poisson_is_lambda_to_the_k_over_k_factorial() {
    // SciPy scipy.stats.poisson: p(k) = exp(−λ) λ^k / k!
    let (problem, solution) = solved("param lambda > 0\na(k)/a(k-1) = lambda/k  for k >= 1");
    let factors = &solution.simplest.product.factors;
    assert!(factors.contains(&Factor::Factorial {
        arg: Affine::k_plus(telescope::algebra::RatFunc::zero()),
        exponent: -1
    }));
    assert!(factors.iter().any(|f| matches!(f, Factor::Power { .. })));
    assert_eq!(factors.len(), 2);
    insta::assert_snapshot!("poisson_text", render::solve_text(&problem, &solution));
    insta::assert_snapshot!("poisson_latex", render::solve_latex(&problem, &solution));
}

#[test]
fn binomial_is_a_binomial_coefficient_times_a_power() {
    // SciPy scipy.stats.binom: p(k) = binom(n, k) p^k (1−p)^(n−k); relative to a(0) = (1−p)^n
    // this is binom(n, k) (p/(1−p))^k.
    let (problem, solution) = solved(
        "param n integer >= 1\nparam p in (0, 1)\na(k)/a(k-1) = (n-k+1)*p/(k*(1-p))  for k >= 1",
    );
    let factors = &solution.simplest.product.factors;
    assert!(matches!(factors[0], Factor::Binomial { exponent: 1, .. }));
    assert!(matches!(factors[1], Factor::Power { .. }));
    assert_eq!(factors.len(), 2);
    insta::assert_snapshot!("binomial_text", render::solve_text(&problem, &solution));
    insta::assert_snapshot!("binomial_latex", render::solve_latex(&problem, &solution));
}

#[test]
fn negative_binomial_is_a_binomial_coefficient() {
    // SciPy scipy.stats.nbinom: p(k) = Γ(k+n)/(k! Γ(n)) p^n (1−p)^k = binom(k+n−1, k) p^n (1−p)^k
    let (problem, solution) =
        solved("param n > 0\nparam p in (0, 1)\na(k)/a(k-1) = (k+n-1)*(1-p)/k  for k >= 1");
    let factors = &solution.simplest.product.factors;
    assert!(matches!(factors[0], Factor::Binomial { exponent: 1, .. }));
    assert_eq!(factors.len(), 2);
    insta::assert_snapshot!(
        "negative_binomial_text",
        render::solve_text(&problem, &solution)
    );
    insta::assert_snapshot!(
        "negative_binomial_latex",
        render::solve_latex(&problem, &solution)
    );
}

#[test]
fn citation_growth_gives_a_beta_form_and_the_range_settles_its_conditions() {
    // Same shape as Yule–Simon (SciPy yulesimon) with α = 1/(1 − ρ).
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/citation_growth.rule"
    ))
    .unwrap();
    let (problem, solution) = solved(&text);
    assert!(solution
        .simplest
        .product
        .factors
        .iter()
        .any(|f| matches!(f, Factor::Beta { .. })));
    assert!(!solution.conditions.is_empty());
    assert!(solution
        .conditions
        .iter()
        .all(|c| matches!(c.status, telescope::solve::Status::SettledByRange(_))));
    let out = render::solve_text(&problem, &solution);
    assert!(out.contains("settled by the declared ranges"), "{out}");
}

#[test]
fn steps_end_at_the_simplest_form() {
    for (name, _, solution, _) in example_pieces() {
        if let Some(last) = solution.steps.last() {
            assert_eq!(last.form, solution.simplest, "{name}");
        } else {
            assert_eq!(
                solution.simplest.product, solution.closed_form.product,
                "{name}"
            );
        }
    }
}

#[test]
fn the_ranges_simplify_the_support() {
    // k + r − 1 with r > 0 never vanishes for k ≥ 1: the support is plainly k ≥ 0.
    let (_, solution) = solved("param r > 0\ns(k)/s(k-1) = (k + r - 1)/k  for k >= 1");
    assert_eq!(solution.support.last, SupportEnd::Infinite);
    // Without a range r could be 1 − n for an integer n ≥ 1, ending the support.
    let (_, solution) = solved("s(k)/s(k-1) = (k + r - 1)/k  for k >= 1");
    assert!(matches!(solution.support.last, SupportEnd::Symbolic { .. }));
}

#[test]
fn the_simplest_form_states_what_it_needs_and_yields_where_it_breaks() {
    // B(k, b) needs b off the poles of Γ (DLMF 5.12.1 with DLMF 5.2.1); the Beta form of the
    // citation rule has b = (2 − ρ)/(1 − ρ), which is 0 at ρ = 2.
    let rule = "n(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k)";
    let (_, solution) = solved(rule);
    assert!(solution
        .conditions
        .iter()
        .any(|c| c.reason.contains("Beta function of the simplest form")));
    let problem = build_problem(rule).unwrap();
    let at_two = BTreeMap::from([("rho".to_string(), Q::from_integer(2.into()))]);
    let solution = solve(&problem, &at_two).unwrap();
    // ρ = 2 makes the rule 1 for every k: the telescoped form holds, the Beta form would not.
    assert_eq!(solution.simplest, solution.closed_form);
    assert!(solution.steps.is_empty());
    let v = value(&solution.simplest, &BigInt::from(7), &at_two);
    assert!(
        v.rel_diff(
            &value(&solution.closed_form, &BigInt::from(2), &at_two),
            256
        ) < 1e-45f64
    );
}
