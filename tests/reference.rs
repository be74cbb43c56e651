//! Reference checks against published distributions: `tests/reference/distributions.json`
//! (copied from the project's shared reference set; each case names its source, e.g.
//! "scipy.stats.yulesimon (SciPy 1.17.1)", and its values were computed with mpmath at 60
//! digits). The closed form's a(k)/a(base) must equal pmf(k)/pmf(base) to 30 digits.

mod common;
use common::{params_of, reference_cases as cases};

use std::collections::BTreeMap;

use num_bigint::BigInt;
use rug::{Float, Rational};
use serde_json::Value;

use telescope::algebra::{parse_q, Q};
use telescope::model::build_problem;
use telescope::numeric::{evaluate_closed_form, to_rug_rational, LogReal};
use telescope::solve::{solve, SupportEnd};

const PREC: u32 = 256;

/// ln of a decimal string such as "4.046996887973688531799518708926594961374e-5021643", without
/// ever forming 10^5021643.
fn ln_decimal(s: &str) -> Float {
    let (mantissa, exponent) = match s.split_once(['e', 'E']) {
        Some((m, e)) => (m, e.parse::<i64>().unwrap()),
        None => (s, 0),
    };
    let m = to_rug_rational(&parse_q(mantissa).unwrap());
    let ln10 = Float::with_val(PREC, 10).ln();
    LogReal::from_rational(&m, PREC).ln_abs + ln10 * Float::with_val(PREC, exponent)
}

/// Checks one rule text (numeric or symbolic with values) against the case's pmf values.
fn check_rule(case: &Value, rule: &str, values: &BTreeMap<String, Q>) {
    let id = case["id"].as_str().unwrap();
    let source = case["source"].as_str().unwrap();
    let problem = build_problem(rule).unwrap_or_else(|e| panic!("{id}: {rule}: {e}"));
    let solution = solve(&problem, values).unwrap_or_else(|e| panic!("{id}: {e}"));
    let base: BigInt = case["base_index"].as_i64().unwrap().into();
    assert_eq!(solution.base_index, base, "{id} ({source}): base index");
    match case["support_last"].as_i64() {
        Some(last) => assert_eq!(
            solution.support.last,
            SupportEnd::At(last.into()),
            "{id} ({source})"
        ),
        None => assert_eq!(
            solution.support.last,
            SupportEnd::Infinite,
            "{id} ({source})"
        ),
    }
    let pmf = case["pmf"].as_array().unwrap();
    let base_entry = pmf
        .iter()
        .find(|p| p["k"].as_i64() == Some(case["base_index"].as_i64().unwrap()))
        .unwrap();
    let ln_base = ln_decimal(base_entry["value"].as_str().unwrap());
    for entry in pmf {
        let k: BigInt = entry["k"].as_i64().unwrap().into();
        let expected = ln_decimal(entry["value"].as_str().unwrap()) - &ln_base;
        let got = evaluate_closed_form(&solution.closed_form, &k, values, &Rational::from(1), 40)
            .unwrap_or_else(|e| panic!("{id} at k = {k}: {e:?}"));
        assert_eq!(got.sign, 1, "{id} at k = {k}");
        let expected = LogReal {
            sign: 1,
            ln_abs: expected,
        };
        let rel = got.rel_diff(&expected, PREC);
        // Source: the case's `source` field (SciPy pmf, values by mpmath at 60 digits).
        assert!(
            rel < 1e-30f64,
            "{id} ({source}) k = {k}: relative difference {rel}"
        );
    }
}

#[test]
fn every_reference_case_matches_its_published_pmf_to_30_digits() {
    let cases = cases();
    assert!(cases.len() >= 6);
    for case in &cases {
        check_rule(case, case["rule"].as_str().unwrap(), &BTreeMap::new());
    }
}

#[test]
fn symbolic_rules_with_values_match_too() {
    for case in &cases() {
        let values = params_of(case);
        check_rule(case, case["rule_symbolic"].as_str().unwrap(), &values);
    }
}

#[test]
fn direct_products_agree_with_the_closed_form_over_the_checked_range() {
    use telescope::table::{build_table, TableRequest};
    for case in &cases() {
        let id = case["id"].as_str().unwrap();
        let problem = build_problem(case["rule"].as_str().unwrap()).unwrap();
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        let range = case["checks"]["rule_product_k_range"].as_array().unwrap();
        let request = TableRequest {
            from: solution.base_index.clone(),
            to: range[1].as_i64().unwrap().into(),
            digits: 50,
            base_value: Q::from_integer(1.into()),
            check_all: true,
        };
        let table = build_table(&problem, &solution, &request).unwrap();
        let max: f64 = table.max_rel_diff.parse().unwrap();
        // The exact running product against MPFR log-Gamma: agreement to the requested digits
        // (reference: the case's rule_product_max_rel_diff, computed with mpmath).
        assert!(max < 1e-45, "{id}: {max}");
    }
}
