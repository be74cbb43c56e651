//! `solve --digits 1000` on the citation example against mpmath: the reference values in
//! `tests/reference/citation_sums.json` come from mpmath 1.3.0's hyp2f1 at z = 1, computed at
//! 1100 digits by `tests/reference/make_citation_sums.py` (the script names the hand
//! derivation of the three hypergeometric sums from the rule). Every printed digit must match,
//! and the numeric Euler–Maclaurin check must agree with the closed form to about 1000 digits.

mod common;

use serde_json::Value;

/// `"1.3000"` and `"1.3"` name the same decimal: drop trailing zeros after the point.
fn trimmed(s: &str) -> &str {
    if s.contains('.') && !s.contains(['e', 'E']) {
        s.trim_end_matches('0').trim_end_matches('.')
    } else {
        s
    }
}

/// Decimal exponent of a value such as `"2.44e-1003"` (`"0"` counts as exact).
fn exponent(s: &str) -> i64 {
    match s.split_once(['e', 'E']) {
        Some((_, e)) => e.parse().unwrap(),
        None if s.trim_start_matches(['0', '.']).is_empty() => i64::MIN,
        None => 0,
    }
}

fn solve_json(rho: &str) -> Value {
    let rho = format!("rho={rho}");
    let out = common::telescope(&[
        "solve",
        "examples/citation_growth.rule",
        "--param",
        &rho,
        "--digits",
        "1000",
        "--format",
        "json",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn citation_sums_match_mpmath_to_1000_digits() {
    let reference: Value =
        serde_json::from_str(include_str!("reference/citation_sums.json")).unwrap();
    assert_eq!(reference["digits"], 1000);
    for (rho, values) in reference["values"].as_object().unwrap() {
        let got = solve_json(rho);
        for (name, key) in [
            ("total", "normalization"),
            ("mean", "mean"),
            ("variance", "variance"),
        ] {
            let entry = &got[key];
            match values.get(name) {
                Some(expected) => {
                    let value = entry["value"].as_str().unwrap();
                    // mpmath rounds to 1000 significant digits, as telescope does.
                    assert_eq!(
                        trimmed(value),
                        trimmed(expected.as_str().unwrap()),
                        "{name} at rho={rho}"
                    );
                    let check = entry["check_rel_diff"].as_str().unwrap();
                    assert!(
                        exponent(check) <= -990,
                        "{name} at rho={rho}: numeric check {check}"
                    );
                }
                None => assert!(
                    entry["finite"] != true && entry["value"].is_null(),
                    "{name} at rho={rho} should be infinite: {entry}"
                ),
            }
        }
    }
}
