//! Every JSON output of every example validates against the published JSON Schemas in
//! `schema/` (one per command), and the schemas are strict: an undocumented field fails.

mod common;

use common::{examples, telescope};
use serde_json::Value;
use telescope::model::{build_model, Param};

fn schema(name: &str) -> jsonschema::Validator {
    let path = format!("{}/schema/{name}.schema.json", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let schema: Value = serde_json::from_str(&text).unwrap();
    jsonschema::validator_for(&schema).unwrap_or_else(|e| panic!("{path}: {e}"))
}

fn assert_valid(validator: &jsonschema::Validator, json: &Value, what: &str) {
    let errors: Vec<String> = validator
        .iter_errors(json)
        .map(|e| format!("{} at {}", e, e.instance_path))
        .collect();
    assert!(errors.is_empty(), "{what}:\n{}", errors.join("\n"));
}

/// A value inside a parameter's declared range (integers 3, or 6 for a second one named `K`
/// so that a finite model keeps room beyond its breakpoint).
fn sample_value(p: &Param) -> String {
    if p.integer {
        return if p.name == "K" || p.name == "N" {
            "6"
        } else {
            "3"
        }
        .into();
    }
    match (&p.lower, &p.upper) {
        (Some((lo, _)), Some((hi, _))) => ((lo + hi) / telescope::algebra::q(2, 1)).to_string(),
        (Some((lo, _)), None) => (lo + telescope::algebra::q(1, 2)).to_string(),
        (None, Some((hi, _))) => (hi - telescope::algebra::q(1, 2)).to_string(),
        (None, None) => "1/3".into(),
    }
}

/// Runs the binary and parses its JSON; `None` when it exits with an error (reported input).
fn run_json(args: &[String]) -> Option<Value> {
    let refs: Vec<&str> = args.iter().map(|s| s.as_str()).collect();
    let out = telescope(&refs);
    if !out.status.success() && out.status.code() != Some(1) {
        return None;
    }
    Some(serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
        panic!(
            "{args:?} printed no JSON ({e}):\n{}",
            String::from_utf8_lossy(&out.stdout)
        )
    }))
}

fn strings(parts: &[&str]) -> Vec<String> {
    parts.iter().map(|s| s.to_string()).collect()
}

#[test]
fn every_example_validates_against_the_solve_table_and_check_schemas() {
    let (solve, table, check) = (schema("solve"), schema("table"), schema("check"));
    let mut validated = 0;
    for (name, text) in examples() {
        let path = format!("examples/{name}.rule");
        let model = build_model(&text).unwrap();
        let mut with_values = Vec::new();
        for p in &model.params {
            with_values.push("--param".to_string());
            with_values.push(format!("{}={}", p.name, sample_value(p)));
        }
        let breakpoints: Vec<String> = with_values
            .chunks(2)
            .filter(|pair| {
                let name = pair[1].split('=').next().unwrap();
                model.params.iter().any(|p| p.name == name && p.integer)
            })
            .flatten()
            .cloned()
            .collect();
        let prob = strings(&["--prob", "k >= 2", "--prob", "1 <= k <= 3"]);
        let runs: Vec<Vec<String>> = vec![
            // No values at all: piecewise models print their symbolic forms.
            strings(&["solve", &path, "--format", "json", "--prob", "k >= 1"]),
            [
                strings(&["solve", &path, "--format", "json"]),
                breakpoints.clone(),
            ]
            .concat(),
            [
                strings(&["solve", &path, "--format", "json"]),
                with_values.clone(),
                prob.clone(),
            ]
            .concat(),
            [
                strings(&["solve", &path, "--format", "json", "--normalize"]),
                with_values.clone(),
            ]
            .concat(),
        ];
        for args in &runs {
            if let Some(json) = run_json(args) {
                assert_valid(&solve, &json, &format!("{args:?}"));
                validated += 1;
            } else {
                assert!(args.contains(&"--normalize".to_string()), "{args:?} failed");
            }
        }
        for extra in [vec![], strings(&["--normalize"])] {
            let args = [
                strings(&["table", &path, "--k", "1..12", "--format", "json"]),
                with_values.clone(),
                extra.clone(),
            ]
            .concat();
            match run_json(&args) {
                Some(json) => {
                    assert_valid(&table, &json, &format!("{args:?}"));
                    validated += 1;
                }
                None => assert!(!extra.is_empty(), "{args:?} failed"),
            }
        }
        if !model.is_piecewise() {
            // A claim that is refuted (the rule's own value at the base term, as a constant)
            // exercises the diagnosis fields.
            let args = [
                strings(&["check", &path, "--claim", "2", "--format", "json"]),
                with_values.clone(),
            ]
            .concat();
            let json = run_json(&args).expect("check runs");
            assert_valid(&check, &json, &format!("{args:?}"));
            validated += 1;
        }
    }
    assert!(validated >= 40, "only {validated} outputs validated");
}

#[test]
fn a_proved_claim_validates_too() {
    let json = run_json(&strings(&[
        "check",
        "examples/gym_lockers.rule",
        "--claim",
        "a(0) binomial(N, k) (p/(1-p))^k",
        "--format",
        "json",
    ]))
    .unwrap();
    assert_eq!(json["verdict"], "proved");
    assert_valid(&schema("check"), &json, "proved claim");
}

#[test]
fn the_schemas_reject_an_undocumented_field() {
    let json = run_json(&strings(&[
        "solve",
        "examples/repair_counter.rule",
        "--param",
        "c=2",
        "--param",
        "lambda=1",
        "--param",
        "mu=1",
        "--prob",
        "k >= c",
        "--format",
        "json",
    ]))
    .unwrap();
    let solve = schema("solve");
    assert_valid(&solve, &json, "repair counter");
    for pointer in [
        "",
        "/normalization",
        "/probabilities/0",
        "/pieces/0",
        "/tail",
    ] {
        let mut broken = json.clone();
        broken
            .pointer_mut(pointer)
            .and_then(Value::as_object_mut)
            .unwrap_or_else(|| panic!("{pointer} is an object"))
            .insert("undocumented".into(), Value::Bool(true));
        assert!(!solve.is_valid(&broken), "{pointer}: an extra field passed");
    }
    // The old piecewise `sum` field is gone for good.
    let mut old = json.clone();
    old.as_object_mut()
        .unwrap()
        .insert("sum".into(), Value::Null);
    assert!(!solve.is_valid(&old));
}
