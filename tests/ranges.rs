//! Conditions solved on the declared ranges and supports pruned by them (issue 14), through
//! the binary, with the inputs of the issue.

mod common;
use common::telescope;

use serde_json::Value;

fn solve(args: &[&str]) -> String {
    let mut all = vec!["solve"];
    all.extend_from_slice(args);
    let o = telescope(&all);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn solve_json(args: &[&str]) -> Value {
    let mut all = args.to_vec();
    all.extend_from_slice(&["--format", "json"]);
    serde_json::from_str(&solve(&all)).unwrap()
}

const CITATION: &str = "examples/citation_growth.rule";

const BIRTH_DEATH: &str = "param nu > 0
param beta > 0
param delta > 0
param gamma > 0
birth(k) = nu + beta k
death(k) = k (delta + gamma k)";

#[test]
fn the_citation_variance_is_finite_exactly_for_rho_above_one_half() {
    // n(k)/n(k−1) = (k − 1)/(k + α) with α = 1/(1 − ρ) is the Yule–Simon law, whose variance
    // is finite iff α > 2 (Simon, Biometrika 42 (1955) 425; Johnson, Kemp & Kotz, *Univariate
    // Discrete Distributions*, 3rd ed., §6.10.3): ρ > 1/2 on 0 < ρ < 1.
    let out = solve(&[CITATION]);
    assert!(
        out.contains("variance     finite for 1/2 < ρ < 1, infinite for 0 < ρ ≤ 1/2"),
        "{out}"
    );
    assert!(
        out.contains("(1 − 2ρ)/(ρ − 1) > 0   (Σ k²·n(k) converges (finite variance); holds for 1/2 < ρ < 1, fails for 0 < ρ ≤ 1/2)"),
        "{out}"
    );
    assert!(!out.contains("undecided"), "{out}");
    let latex = solve(&[CITATION, "--format", "latex"]);
    assert!(
        latex.contains("&& \\text{for } \\frac{1}{2} < \\rho < 1"),
        "{latex}"
    );
    let v = solve_json(&[CITATION]);
    let region = &v["variance"]["finite_for"];
    assert_eq!(region["kind"], "intervals");
    assert_eq!(region["variable"], "rho");
    let holds = &region["intervals"][0];
    assert_eq!(holds["low"]["exact"], "1/2");
    assert_eq!(holds["low_included"], false);
    assert_eq!(holds["high"]["exact"], "1");
    assert_eq!(holds["high_included"], false);
    let fails = &region["fails_for"][0];
    assert_eq!(
        (&fails["low"]["exact"], &fails["high"]["exact"]),
        (&Value::from("0"), &Value::from("1/2"))
    );
    assert_eq!(fails["high_included"], true);
    let condition = &v["variance"]["condition"][1];
    assert_eq!(condition["holds_for"], *region);
    // The total and the mean hold on the whole range: nothing left to solve.
    assert!(v["normalization"]["condition"][0]["holds_for"].is_null());
    assert_eq!(v["mean"]["finite"], true);
}

#[test]
fn a_birth_death_support_is_pruned_by_positive_rates() {
    // birth ν + βk > 0 for every k ≥ 0 when ν, β > 0 (by hand), so the chain never stops
    // and the support is k ≥ 0, not a case split at k = −ν/β.
    let out = solve(&[BIRTH_DEATH]);
    assert!(out.contains("support      k ≥ 0\n"), "{out}");
    assert!(!out.contains("when −ν/β is an integer"), "{out}");
    assert!(!out.contains("(when the support is infinite)"), "{out}");
    // The denominator root −δ/γ is negative: settled, not undecided.
    assert!(!out.contains("undecided"), "{out}");
    let v = solve_json(&[BIRTH_DEATH]);
    assert!(v["support"]["last"].is_null());
    assert_eq!(v["support"]["last_is_conditional"], false);
    assert_eq!(v["tail"]["conditional"], false);
    assert_eq!(v["normalization"]["finite_support"], false);
    // Without the ranges the case split stays.
    let open = BIRTH_DEATH.replace(" > 0", "");
    let out = solve(&[&open]);
    assert!(out.contains("when −ν/β is an integer ≥ 0"), "{out}");
}

#[test]
fn several_parameters_are_solved_for_one_in_which_the_condition_is_linear() {
    // x(k)/x(k−1) = (k − 1 + β)/(k + ν): a(k) ~ C·k^(β − 1 − ν), so Σ k^j a(k) converges iff
    // β − 1 − ν + j < −1 (comparison with Σ k^s, common practice): ν > β + j.
    let rule = "param nu > 0\nparam beta > 0\nx(k)/x(k-1) = (k - 1 + beta)/(k + nu)";
    let out = solve(&[rule]);
    assert!(
        out.contains(
            "total is   finite for ν > β, infinite for ν ≤ β (solved for ν; β remains free)"
        ),
        "{out}"
    );
    assert!(
        out.contains("mean         finite for ν > β + 1, infinite for ν ≤ β + 1"),
        "{out}"
    );
    assert!(out.contains("variance     finite for ν > β + 2"), "{out}");
    let v = solve_json(&[rule]);
    let region = &v["normalization"]["finite_for"];
    assert_eq!(region["kind"], "linear");
    assert_eq!(region["variable"], "nu");
    assert_eq!(region["relation"], ">");
    assert_eq!(region["bound"]["text"], "β");
    assert_eq!(region["remaining"], serde_json::json!(["beta"]));
    assert_eq!(v["mean"]["finite_for"]["bound"]["text"], "β + 1");
}

#[test]
fn irrational_ends_are_algebraic_numbers_with_decimals() {
    // θ = ρ² − 3: the total converges iff ρ² < 2, i.e. ρ < √2 = 1.41421356237309504880168872421
    // (mpmath 1.3.0, sqrt(2) at 40 digits).
    let rule = "param rho > 0\nx(k)/x(k-1) = (k + rho^2)/(k + 3)";
    let out = solve(&[rule]);
    assert!(
        out.contains("total is   finite for 0 < ρ < √2 ≈ 1.41421356237309504880168872421, infinite for ρ ≥ √2"),
        "{out}"
    );
    let v = solve_json(&[rule]);
    let end = &v["normalization"]["finite_for"]["intervals"][0]["high"];
    assert_eq!(end["exact"], "√2");
    assert_eq!(end["latex"], "\\sqrt{2}");
    assert_eq!(end["decimal"], "1.41421356237309504880168872421");
    assert_eq!(end["algebraic"]["polynomial"], "ρ² − 2");
    // θ + 1 = ρ³ − 2ρ − 1 < −1: ρ below the real root of ρ³ − 2ρ − 2,
    // 1.769292354238631415240409464335… (mpmath 1.3.0, findroot at 40 digits).
    let rule = "param rho > 0\nx(k)/x(k-1) = (k + rho^3 - 2 rho)/(k + 4)";
    let v = solve_json(&[rule, "--digits", "25"]);
    let end = &v["mean"]["finite_for"]["intervals"][0]["high"];
    assert_eq!(end["decimal"], "1.769292354238631415240409");
    assert_eq!(end["algebraic"]["polynomial"], "ρ³ − 2ρ − 2");
    assert!(
        end["exact"]
            .as_str()
            .unwrap()
            .starts_with("the root of ρ³ − 2ρ − 2 in ("),
        "{end}"
    );
}

#[test]
fn integer_parameters_get_integer_ends() {
    // (k + N)/(k + 5): θ = N − 5; the mean is finite iff N − 4 < −1, i.e. N ≤ 2.
    let rule = "param N integer >= 0\nx(k)/x(k-1) = (k + N)/(k + 5)";
    let out = solve(&[rule]);
    assert!(
        out.contains("mean         finite for 0 ≤ N ≤ 2, infinite for N ≥ 3"),
        "{out}"
    );
    assert!(
        out.contains("variance     finite for 0 ≤ N ≤ 1, infinite for N ≥ 2"),
        "{out}"
    );
}

#[test]
fn conditions_of_the_rule_say_where_they_hold() {
    // k − 1/ρ vanishes at k = 1/ρ; on 1/4 < ρ < 1 that is k = 2 (ρ = 1/2) or k = 3 (ρ = 1/3).
    let rule = "param rho in (1/4, 1)\na(k)/a(k-1) = (k + 1)/(k - 1/rho)";
    let out = solve(&[rule]);
    assert!(
        out.contains(
            "holds for 1/4 < ρ < 1/3 or 1/3 < ρ < 1/2 or 1/2 < ρ < 1, fails for ρ = 1/3 or ρ = 1/2"
        ),
        "{out}"
    );
    let latex = solve(&[rule, "--format", "latex"]);
    assert!(
        latex.contains("(that is, $\\frac{1}{4} < \\rho < \\frac{1}{3} \\text{ or }"),
        "{latex}"
    );
    let v = solve_json(&[rule]);
    let open: Vec<&Value> = v["conditions"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|c| c["status"] == "undecided")
        .collect();
    assert_eq!(open.len(), 2, "{v}");
    let fails = &open[0]["holds_for"]["fails_for"];
    assert_eq!(fails.as_array().unwrap().len(), 2);
    assert_eq!(fails[0]["low"]["exact"], "1/3");
    // A condition the ranges settle has no holds_for.
    let v = solve_json(&[CITATION]);
    assert!(v["conditions"]
        .as_array()
        .unwrap()
        .iter()
        .all(|c| c["holds_for"].is_null()));
}

#[test]
fn a_parametric_rate_leaves_the_unit_circle_open() {
    // a(k) ~ C·(x − 2)^k·k^(x − 4): the ratio test (common practice) gives convergence for
    // |x − 2| < 1 and divergence for |x − 2| > 1; at x = 1 (rate −1) it depends on the
    // power of k, so x = 1 is in neither list.
    let rule = "param x in (0, 3)\na(k)/a(k-1) = (k + x - 3)/(k + 1)*(x - 2)";
    let out = solve(&[rule]);
    assert!(
        out.contains("total is   finite for 1 < x < 3, infinite for 0 < x < 1\n"),
        "{out}"
    );
    let v = solve_json(&[rule]);
    let fails = &v["normalization"]["finite_for"]["fails_for"][0];
    assert_eq!(fails["high"]["exact"], "1");
    assert_eq!(fails["high_included"], false);
}
