//! `telescope sweep` end to end: its numbers equal single `solve` (and `table`) runs, its
//! boundaries are exact where the mathematics says they are, and bad input is refused with a
//! caret and a hint.

mod common;

use common::telescope;
use serde_json::Value;

fn json(args: &[&str]) -> Value {
    let out = telescope(args);
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

/// What `solve --format json` reports for each sweep quantity: (value, exact).
fn solve_values(solve: &Value, key: &str) -> Option<(String, Option<String>)> {
    let (block, exact) = match key {
        "rate" => (&solve["tail"]["rate"], false),
        "theta" => (&solve["tail"]["power"], false),
        "prefactor" => (&solve["tail"]["prefactor"], false),
        "total" => (&solve["normalization"], true),
        "mean" => (&solve["mean"], true),
        "variance" => (&solve["variance"], true),
        _ => unreachable!(),
    };
    let value = block["value"].as_str()?.to_string();
    let exact = exact
        .then(|| block["exact"].as_str().map(String::from))
        .flatten();
    Some((value, exact))
}

/// Compares one sweep point with `solve --param …` at the same values.
fn compare_with_solve(file: &str, point: &Value, fixed: &[&str], keys: &[&str]) {
    let mut args = vec!["solve", file, "--format", "json"];
    let pairs: Vec<String> = point["at"]
        .as_object()
        .unwrap()
        .iter()
        .map(|(name, v)| format!("{name}={}", v["exact"].as_str().unwrap()))
        .collect();
    for p in pairs
        .iter()
        .map(String::as_str)
        .chain(fixed.iter().copied())
    {
        args.push("--param");
        args.push(p);
    }
    let solve = json(&args);
    for key in keys {
        let swept = &point["values"][*key];
        let single = solve_values(&solve, key);
        match (swept.is_null(), single) {
            (true, None) => {
                // both empty: the sweep must say why
                assert!(point["reasons"][*key].is_string(), "{file} {pairs:?} {key}");
            }
            (false, Some((value, exact))) => {
                let rate_or_power = matches!(*key, "rate" | "theta");
                if rate_or_power {
                    // solve prints r and θ as exact rationals
                    assert_eq!(
                        swept["exact"].as_str(),
                        Some(value.as_str()),
                        "{file} {pairs:?} {key}"
                    );
                } else {
                    assert_eq!(
                        swept["value"].as_str(),
                        Some(value.as_str()),
                        "{file} {pairs:?} {key}"
                    );
                    assert_eq!(
                        swept["exact"].as_str().map(String::from),
                        exact,
                        "{file} {pairs:?} {key}"
                    );
                }
            }
            (swept_null, single) => {
                panic!("{file} {pairs:?} {key}: sweep null = {swept_null}, solve gives {single:?}")
            }
        }
    }
}

/// (model file, --vary, --param values): five points each, across every single-rule example.
const CASES: &[(&str, &str, &[&str])] = &[
    ("examples/citation_growth.rule", "rho=0.1..0.9", &[]),
    ("examples/gym_lockers.rule", "p=0.1..0.9", &["N=12"]),
    ("examples/gym_lockers.rule", "N=1..9", &["p=1/3"]),
    (
        "examples/help_desk_queue.rule",
        "lambda=0.5..4.5",
        &["mu=3/2"],
    ),
    (
        "examples/island_colony.rule",
        "gamma=0.1..2.1",
        &["nu=2", "delta=1/2"],
    ),
    ("examples/recipe_tags.rule", "rho=0.05..0.85", &[]),
    ("examples/seed_clusters.rule", "q=0.1..0.9", &["r=5/2"]),
    // piecewise (M/M/c): stable for λ < c·μ = 3, so the sweep crosses into divergence
    (
        "examples/repair_counter.rule",
        "lambda=0.5..4.5",
        &["mu=3/2", "c=2"],
    ),
    (
        "examples/repair_counter.rule",
        "c=1..5",
        &["mu=1", "lambda=5/2"],
    ),
];

const KEYS: [&str; 6] = ["rate", "theta", "prefactor", "total", "mean", "variance"];

#[test]
fn sweep_values_equal_single_solve_runs_at_five_points_of_each_example() {
    for (file, vary, fixed) in CASES {
        let mut args = vec![
            "sweep",
            file,
            "--vary",
            vary,
            "--points",
            "5",
            "--quantities",
            "rate,theta,prefactor,total,mean,variance",
            "--format",
            "json",
        ];
        for p in *fixed {
            args.push("--param");
            args.push(p);
        }
        let sweep = json(&args);
        let points = sweep["points"].as_array().unwrap();
        assert_eq!(points.len(), 5, "{file}");
        for point in points {
            compare_with_solve(file, point, fixed, &KEYS);
        }
    }
}

#[test]
fn probabilities_equal_solve_prob() {
    for (file, vary, fixed) in [
        ("examples/citation_growth.rule", "rho=0.1..0.9", vec![]),
        (
            "examples/repair_counter.rule",
            "lambda=0.5..2.5",
            vec!["mu=1", "c=2"],
        ),
    ] {
        let mut args = vec![
            "sweep",
            file,
            "--vary",
            vary,
            "--points",
            "5",
            "--format",
            "json",
            "--quantities",
            "P(k >= 3),P(1 <= k <= 2)",
        ];
        for p in &fixed {
            args.extend(["--param", p]);
        }
        let sweep = json(&args);
        for point in sweep["points"].as_array().unwrap() {
            let (name, v) = point["at"].as_object().unwrap().iter().next().unwrap();
            let value = format!("{name}={}", v["exact"].as_str().unwrap());
            let mut args = vec![
                "solve",
                file,
                "--format",
                "json",
                "--param",
                &value,
                "--prob",
                "k >= 3",
                "--prob",
                "1 <= k <= 2",
            ];
            for p in &fixed {
                args.extend(["--param", p]);
            }
            let solve = json(&args);
            for (i, key) in ["P(k>=3)", "P(1<=k<=2)"].iter().enumerate() {
                let single = &solve["probabilities"][i];
                let swept = &point["values"][*key];
                assert_eq!(swept["value"], single["value"], "{file} {value} {key}");
                assert_eq!(swept["exact"], single["exact"], "{file} {value} {key}");
            }
        }
    }
}

#[test]
fn a_of_k_equals_the_table_value() {
    let sweep = json(&[
        "sweep",
        "examples/citation_growth.rule",
        "--vary",
        "rho=0.2..0.8",
        "--points",
        "4",
        "--quantities",
        "n(7),n(4000)",
        "--format",
        "json",
    ]);
    for point in sweep["points"].as_array().unwrap() {
        let rho = point["at"]["rho"]["exact"].as_str().unwrap();
        for (key, k) in [("n(7)", "7..7"), ("n(4000)", "4000..4000")] {
            let table = json(&[
                "table",
                "examples/citation_growth.rule",
                "--param",
                &format!("rho={rho}"),
                "--k",
                k,
                "--format",
                "json",
            ]);
            assert_eq!(
                point["values"][key]["value"], table["rows"][0]["direct"],
                "rho = {rho}, {key}"
            );
        }
        // seven factors from n(1) = 1 are an exact rational; 3999 go to MPFR with a bound
        assert!(point["values"]["n(7)"]["exact"].is_string());
        assert!(point["values"]["n(4000)"]["exact"].is_null());
    }
}

#[test]
fn the_citation_variance_boundary_is_exactly_one_half() {
    // Var finite iff (1 − 2ρ)/(ρ − 1) > 0, i.e. ρ > 1/2 (the tail exponent γ = (2 − ρ)/(1 − ρ)
    // exceeds 3; Yule–Simon moments, e.g. scipy.stats.yulesimon: variance finite for α > 2).
    let sweep = json(&[
        "sweep",
        "examples/citation_growth.rule",
        "--vary",
        "rho=0.05..0.95",
        "--points",
        "10",
        "--format",
        "json",
    ]);
    let boundaries = sweep["boundaries"].as_array().unwrap();
    assert_eq!(boundaries.len(), 1, "{boundaries:?}");
    let b = &boundaries[0];
    assert_eq!(b["quantity"], "variance");
    assert_eq!(b["kind"], "exact");
    assert_eq!(b["exact"]["exact"], "1/2");
    assert_eq!(b["below"], "infinite");
    assert_eq!(b["at"], "infinite");
    assert_eq!(b["above"], "finite");
    // the points agree: null with a reason below 1/2, a number above
    for point in sweep["points"].as_array().unwrap() {
        let rho: f64 = point["at"]["rho"]["value"]
            .as_str()
            .unwrap()
            .parse()
            .unwrap();
        assert_eq!(
            point["values"]["variance"].is_null(),
            rho <= 0.5,
            "rho = {rho}"
        );
    }
}

#[test]
fn an_irrational_boundary_is_bracketed_and_said_so() {
    // (k−1)/(k + x²): a(k) ~ C k^(−1−x²), so the variance is finite iff x² > 2, x > √2.
    let sweep = json(&[
        "sweep",
        "a(k)/a(k-1) = (k-1)/(k + x^2)",
        "--vary",
        "x=1..2",
        "--points",
        "5",
        "--format",
        "json",
    ]);
    let b: Vec<&Value> = sweep["boundaries"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|b| b["quantity"] == "variance")
        .collect();
    assert_eq!(b.len(), 1);
    assert_eq!(b[0]["kind"], "bracketed_bisection");
    let exact =
        |end: &str| telescope::algebra::parse_q(b[0][end]["exact"].as_str().unwrap()).unwrap();
    let (low, high) = (exact("low"), exact("high"));
    let two = telescope::algebra::q(2, 1);
    assert!(&low * &low < two && two < &high * &high, "{low} {high}");
    assert!(high - low < telescope::algebra::q(1, 1_000_000_000_000_000));
}

#[test]
fn a_grid_is_long_format_csv() {
    let out = telescope(&[
        "sweep",
        "examples/seed_clusters.rule",
        "--vary",
        "q=0.1..0.9",
        "--vary",
        "r=1..3",
        "--points",
        "3",
        "--quantities",
        "mean",
        "--format",
        "csv",
    ]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines[0], "q,r,mean,mean_exact,note");
    assert_eq!(lines.len(), 1 + 9);
    // negative binomial mean r·q/(1 − q) (a textbook fact; e.g. scipy.stats.nbinom):
    // q = 1/2, r = 3 gives 3
    assert!(lines.contains(&"0.5,3,3.00000000000000000000000000000,3,"));
}

#[test]
fn infinite_and_invalid_points_are_empty_with_a_reason() {
    let out = telescope(&[
        "sweep",
        "a(k)/a(k-1) = (k-1)/(k + 1/(c - 1))",
        "--vary",
        "c=0..2",
        "--points",
        "3",
        "--format",
        "csv",
        "--quantities",
        "total",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let rows: Vec<&str> = text.lines().skip(1).collect();
    // c = 1 divides by zero: outside the model, empty cells and the reason
    assert!(rows[1].starts_with("1,,,"), "{text}");
    assert!(rows[1].contains("outside the model"), "{text}");
}

#[test]
fn svg_has_a_panel_per_quantity_a_shade_and_a_labelled_boundary() {
    let out = telescope(&[
        "sweep",
        "examples/citation_growth.rule",
        "--vary",
        "rho=0.05..0.95",
        "--points",
        "19",
        "--format",
        "svg",
    ]);
    assert!(out.status.success());
    let svg = String::from_utf8(out.stdout).unwrap();
    assert!(svg.starts_with("<svg"));
    for label in [
        "tail rate r",
        "tail power θ",
        "mean",
        "variance",
        "ρ = 1/2",
        "variance: infinite",
    ] {
        assert!(svg.contains(label), "missing {label}");
    }
}

/// Runs a sweep that must be refused: exit 2, a caret, a hint, and the given words.
fn refused(args: &[&str], words: &str) {
    let out = telescope(args);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    assert!(err.contains(words), "{args:?}: {err}");
    assert!(err.contains('^'), "{args:?}: no caret in {err}");
    assert!(err.contains("help:"), "{args:?}: no hint in {err}");
}

#[test]
fn bad_input_is_refused_with_a_caret_and_a_hint() {
    let file = "examples/citation_growth.rule";
    refused(
        &["sweep", file, "--vary", "sigma=0.1..0.9"],
        "unknown parameter `sigma`",
    );
    refused(&["sweep", file, "--vary", "k=1..9"], "the index");
    refused(&["sweep", file, "--vary", "rho=0.9..0.1"], "reversed");
    refused(&["sweep", file, "--vary", "rho=0.5..0.5"], "empty");
    refused(
        &["sweep", file, "--vary", "rho=0.1..0.9", "--points", "1"],
        "a sweep of 1 point:",
    );
    refused(
        &[
            "sweep",
            file,
            "--vary",
            "rho=0.1..0.9",
            "--points",
            "1000001",
        ],
        "a sweep of 1000001 points",
    );
    refused(
        &["sweep", file, "--vary", "rho=0..0.9"],
        "outside the declared range",
    );
    refused(
        &["sweep", file, "--vary", "rho=0.1..1.5"],
        "outside the declared range",
    );
    refused(&["sweep", file, "--vary", "rho=0.1..x"], "not a number");
    refused(
        &[
            "sweep",
            file,
            "--vary",
            "rho=0.1..0.9",
            "--quantities",
            "mean,kurtosis",
        ],
        "unknown quantity `kurtosis`",
    );
    refused(
        &["sweep", "examples/gym_lockers.rule", "--vary", "p=0.1..0.9"],
        "N has none",
    );
    refused(
        &[
            "sweep",
            "examples/gym_lockers.rule",
            "--vary",
            "N=1.5..4",
            "--param",
            "p=1/2",
        ],
        "not a whole number",
    );
    refused(
        &[
            "sweep",
            file,
            "--vary",
            "rho=0.1..0.9",
            "--vary",
            "rho=0.2..0.3",
        ],
        "varied twice",
    );
}

#[test]
fn citation_sweep_as_text() {
    let out = telescope(&[
        "sweep",
        "examples/citation_growth.rule",
        "--vary",
        "rho=0.05..0.95",
        "--points",
        "7",
        "--digits",
        "12",
        "--quantities",
        "rate,theta,prefactor,total,mean,variance,n(5)",
    ]);
    assert!(out.status.success());
    insta::assert_snapshot!(String::from_utf8(out.stdout).unwrap());
}

#[test]
fn help_desk_sweep_as_json() {
    let out = telescope(&[
        "sweep",
        "examples/help_desk_queue.rule",
        "--vary",
        "lambda=1..4",
        "--points",
        "2",
        "--param",
        "mu=2",
        "--digits",
        "15",
        "--format",
        "json",
    ]);
    assert!(out.status.success());
    insta::assert_snapshot!(String::from_utf8(out.stdout).unwrap());
}
