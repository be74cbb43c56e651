//! End-to-end behaviour through the `telescope` binary.

mod common;
use common::telescope;

use std::process::{Command, Output};

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

const GROWTH: &str = "n(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k)";

#[test]
fn solve_prints_a_gamma_quotient_with_base_support_and_conditions() {
    let o = telescope(&["solve", GROWTH]);
    assert!(o.status.success(), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(out.contains("Γ("), "{out}");
    assert!(out.contains("base term    n(1)"), "{out}");
    assert!(out.contains("support      k ≥ 1"), "{out}");
    assert!(out.contains("ρ ≠ 1"), "{out}");
}

#[test]
fn solve_json_has_the_contract_fields() {
    let o = telescope(&["solve", GROWTH, "--format", "json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["sequence"], "n");
    assert_eq!(v["base_index"], "1");
    assert!(v["ratio"]["text"].is_string() && v["ratio"]["latex"].is_string());
    assert!(v["closed_form_raw"]["latex"]
        .as_str()
        .unwrap()
        .contains("\\Gamma"));
    assert!(v["closed_form"]["latex"]
        .as_str()
        .unwrap()
        .contains("\\mathrm{B}"));
    assert_eq!(v["support"]["first"], "1");
    assert!(v["support"]["last"].is_null());
    assert!(!v["conditions"].as_array().unwrap().is_empty());
}

#[test]
fn solve_latex_is_an_amsmath_block() {
    let o = telescope(&["solve", GROWTH, "--format", "latex"]);
    assert!(o.status.success());
    let out = stdout(&o);
    assert!(out.starts_with("\\begin{align*}"), "{out}");
    assert!(out.contains("\\end{align*}"));
    assert_eq!(out.matches('{').count(), out.matches('}').count(), "{out}");
}

#[test]
fn table_at_fifty_digits_agrees_to_1e_45() {
    let o = telescope(&[
        "table", GROWTH, "--param", "rho=3/10", "--k", "1..2000", "--digits", "50", "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let max: f64 = v["max_rel_diff"].as_str().unwrap().parse().unwrap();
    assert!(max < 1e-45, "max_rel_diff = {max}");
    assert_eq!(v["rows"].as_array().unwrap().len(), 2000);
    let checked = v["checked_rows"].as_array().unwrap();
    assert_eq!(checked.first().unwrap(), "1");
    assert_eq!(checked.last().unwrap(), "2000");
    assert!(v["rows"][1]["closed"].is_string() || v["rows"][1]["closed"].is_null());
}

#[test]
fn table_far_out_works() {
    let o = telescope(&[
        "table",
        GROWTH,
        "--param",
        "rho=0.3",
        "--k",
        "1000000..1000010",
        "--digits",
        "50",
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let max: f64 = v["max_rel_diff"].as_str().unwrap().parse().unwrap();
    assert!(max < 1e-45, "max_rel_diff = {max}");
    assert_eq!(v["rows"].as_array().unwrap().len(), 11);
}

#[test]
fn binomial_type_rule_stops_at_n() {
    let o = telescope(&[
        "solve",
        "a(k)/a(k-1) = (N-k+1)/k * p/(1-p)  for k >= 1",
        "--param",
        "N=12",
        "--param",
        "p=3/10",
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["support"]["first"], "0");
    assert_eq!(v["support"]["last"], "12");
    let o = telescope(&[
        "solve",
        "a(k)/a(k-1) = (12-k+1)/k * p/(1-p)  for k >= 1",
        "--format",
        "json",
    ]);
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["support"]["last"], "12");
}

#[test]
fn a_denominator_vanishing_at_three_is_refused() {
    let o = telescope(&["solve", "n(k)/n(k-1) = (k+1)/(k-3)"]);
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(err.contains("k = 3"), "{err}");
    assert!(err.contains("column"), "{err}");
}

/// Ten malformed inputs: each exits with code 2 and points at a column.
#[test]
fn malformed_inputs_exit_2_with_a_column() {
    let cases = [
        "n(k)/n(k-1) = (k-1))",
        "n(k)/n(k-1) = (k-1",
        "n(k)/n(k-1) = k +",
        "n(k)/n(k-1) = k $ 2",
        "n(k)/n(k-1) = 1.2.3 k",
        "n(k)/n(k-1) = (k^2+1)/(k+2)",
        "n(k)/n(k-1) = Gamma(k)/k",
        "n(k)/n(k-1) = (k-1)/(k-1-1)",
        "n(k)/n(k-2) = k",
        "n(k)/n(k-1) = k^(1/2)",
        "n(k)/n(k-1) = (k-1)/k  for k >= ",
        "n(k)/n(k-1) = n(k-1)/k",
    ];
    for input in cases {
        let o = telescope(&["solve", input]);
        assert_eq!(o.status.code(), Some(2), "{input}: {}", stdout(&o));
        let err = stderr(&o);
        assert!(err.contains("column"), "{input}: {err}");
        assert!(err.contains('^'), "{input}: {err}");
        assert!(!err.contains("panicked"), "{input}: {err}");
    }
}

#[test]
fn bad_arguments_exit_2() {
    for args in [
        vec!["table", GROWTH, "--k", "5..1", "--param", "rho=0.3"],
        vec!["table", GROWTH, "--k", "1..10"],
        vec!["table", GROWTH, "--k", "1..10", "--param", "sigma=1"],
        vec!["table", GROWTH, "--k", "1..10", "--param", "rho=abc"],
        vec!["solve", "examples/citation_growth.rule", "--param", "rho=2"],
        // Limits that keep every command within seconds (README, "Limits").
        vec!["solve", GROWTH, "--terms", "21"],
        vec!["solve", GROWTH, "--digits", "1001"],
        vec![
            "table", GROWTH, "--k", "1..10", "--param", "rho=0.3", "--digits", "10001",
        ],
    ] {
        let o = telescope(&args);
        assert_eq!(o.status.code(), Some(2), "{args:?}");
        assert!(stderr(&o).starts_with("error:"), "{args:?}: {}", stderr(&o));
    }
}

#[test]
fn standard_input_is_read_with_a_dash() {
    use std::io::Write;
    let mut child = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(["solve", "-"])
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    child
        .stdin
        .take()
        .unwrap()
        .write_all(b"# a comment\nparam alpha > 0\np(k)/p(k-1) = (k-1)/(k+alpha)\n")
        .unwrap();
    let o = child.wait_with_output().unwrap();
    assert!(o.status.success());
    assert!(stdout(&o).contains("α"));
}

#[test]
fn a_reader_that_stops_early_does_not_make_it_panic() {
    // `telescope table … | head` closes the pipe while rows are still being written.
    let mut child = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(["table", GROWTH, "--param", "rho=3/10", "--k", "1..5000"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let o = child.wait_with_output().unwrap();
    assert!(!stderr(&o).contains("panicked"), "{}", stderr(&o));
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn a_missing_model_file_is_reported_as_missing() {
    // It used to be read as a rule: "unexpected character `.`" at the file name's dot.
    for path in [
        "examples/no_such_model.rule",
        "/tmp/no_such_telescope_model.txt",
    ] {
        let o = telescope(&["solve", path]);
        assert_eq!(o.status.code(), Some(2));
        assert!(stderr(&o).contains("no such file"), "{}", stderr(&o));
    }
}

#[test]
fn normalize_on_a_piecewise_model_gives_the_base_term_and_the_normalised_prefactor() {
    // M/M/3 with offered load 2: total 9·p(0) (Erlang C's denominator, Kleinrock 1975,
    // eq. 3.39), so p(0) = 1/9 and C = p(0)·c^c/c! = (1/9)·27/6 = 1/2.
    let o = telescope(&[
        "solve",
        "examples/repair_counter.rule",
        "--param",
        "c=3",
        "--param",
        "lambda=2",
        "--param",
        "mu=1",
        "--normalize",
        "--format",
        "json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["normalization"]["base_value"]["exact"], "1/9");
    assert_eq!(v["tail"]["prefactor_normalized"], true);
    assert_eq!(
        v["tail"]["prefactor"]["value"],
        "0.500000000000000000000000000000"
    );
}

#[test]
fn a_table_too_far_out_points_to_something_that_exists() {
    // The help sent the user to `solve --param` "for single values", which solve does not give.
    let o = telescope(&[
        "table",
        GROWTH,
        "--param",
        "rho=3/10",
        "--k",
        "1000000000000..1000000000001",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(!stderr(&o).contains("single values"), "{}", stderr(&o));
    assert!(stderr(&o).contains("tail law"), "{}", stderr(&o));
}

#[test]
fn a_k_range_below_zero_reaches_the_tool_and_gets_its_message() {
    // Issue 14: `table RULE --k -1..99` was refused by the argument parser.
    let o = telescope(&["table", GROWTH, "--param", "rho=3/10", "--k", "-1..99"]);
    assert_eq!(o.status.code(), Some(2), "{}", stdout(&o));
    let err = stderr(&o);
    assert!(!err.contains("unexpected argument"), "{err}");
    assert!(
        err.contains("the table starts at k = -1 but the sequence starts at its base term k = 1"),
        "{err}"
    );
    assert!(err.contains("use --k 1..99"), "{err}");
    // A rule whose support starts below zero takes the negative range.
    let o = telescope(&["table", "(k + 5)/(k + 9) for k >= -3", "--k", "-4..2"]);
    assert!(o.status.success(), "{}", stderr(&o));
}

#[test]
fn negative_values_are_accepted_for_param_base_and_claim() {
    let o = telescope(&[
        "table",
        "p(k)/p(k-1) = (k + a)/k",
        "--param",
        "a=-1/2",
        "--base",
        "-2",
        "--k",
        "1..3",
        "--format",
        "csv",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    // p(2) = −2·(2 − 1/2)/2 = −3/2 (by hand from the rule).
    assert!(stdout(&o).contains("\n2,-1.5"), "{}", stdout(&o));
    let o = telescope(&[
        "check",
        "p(k)/p(k-1) = -1",
        "--claim",
        "-(-1)^(k - 1)",
        "--base",
        "-1",
    ]);
    assert!(o.status.success(), "{}{}", stdout(&o), stderr(&o));
}

#[test]
fn a_bare_ratio_may_name_a_parameter_like_the_default_sequence() {
    // Issue 14's input: `a` is a parameter here, so the sequence takes the first free name.
    let o = telescope(&[
        "solve",
        "z (k + a)(k + b)/((k + c)(k + 1)) for k >= 1",
        "--param",
        "a=2/3",
        "--param",
        "b=1/2",
        "--param",
        "c=5/2",
        "--param",
        "z=1/2",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(out.contains("u(k)/u(k − 1) = z·(k + a)·(k + b)"), "{out}");
    // Σ_{k≥0} u(k)/u(0) = ₃F₂(5/3, 3/2, 1; 7/2, 2; 1/2) = 1.2419686152926318781303598149…
    // (mpmath 1.3.0, hyp3f2 at 40 digits).
    assert!(out.contains("1.24196861529263187813035981494"), "{out}");
    // A bare ratio that does not use `a` keeps the usual name.
    let o = telescope(&["solve", "(k + b)/(k + 1)"]);
    assert!(stdout(&o).contains("a(k)/a(k − 1)"), "{}", stdout(&o));
}
