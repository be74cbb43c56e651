//! Helpers shared by the integration tests: the shipped examples, the published reference
//! cases, and running the binary. Each test crate uses a subset, hence the allow.
#![allow(dead_code)]

use std::collections::BTreeMap;
use std::process::{Command, Output};

use serde_json::Value;
use telescope::algebra::{parse_q, Q};
use telescope::model::Model;

/// Every `examples/*.rule` as (file stem, text), sorted by name.
pub fn examples() -> Vec<(String, String)> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/examples");
    let mut out: Vec<(String, String)> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "rule"))
        .map(|p| {
            let name = p.file_stem().unwrap().to_string_lossy().into_owned();
            (name, std::fs::read_to_string(&p).unwrap())
        })
        .collect();
    out.sort();
    out
}

/// Values for a piecewise model's breakpoints (its integer parameters), all set to 3, as the
/// snapshot and LaTeX tests solve it; no values for other models.
pub fn breakpoint_values(model: &Model) -> BTreeMap<String, Q> {
    if !model.is_piecewise() {
        return BTreeMap::new();
    }
    model
        .params
        .iter()
        .filter(|p| p.integer)
        .map(|p| (p.name.clone(), Q::from_integer(3.into())))
        .collect()
}

/// The published cases of `tests/reference/distributions.json` (each names its `source`).
pub fn reference_cases() -> Vec<Value> {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/distributions.json"
    ))
    .expect("reference file present");
    let v: Value = serde_json::from_str(&text).unwrap();
    v["cases"].as_array().unwrap().clone()
}

/// A reference case's parameter values, exact.
pub fn params_of(case: &Value) -> BTreeMap<String, Q> {
    case["params"]
        .as_object()
        .map(|m| {
            m.iter()
                .map(|(k, v)| (k.clone(), parse_q(v.as_str().unwrap()).unwrap()))
                .collect()
        })
        .unwrap_or_default()
}

/// Runs the `telescope` binary from the crate root.
pub fn telescope(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .expect("binary runs")
}

/// Demo values for an example's parameters, chosen inside each declared range (invented
/// numbers, only to exercise the page): the middle of a bounded range, 3/2 above a lower
/// bound, 4, 6, 8, … for integers (distinct, so that breakpoints like c < K differ).
pub fn demo_params(name: &str, text: &str) -> Vec<String> {
    let model =
        telescope::model::build_model(text).unwrap_or_else(|e| panic!("{name}: {}", e.message));
    let mut integers = 0;
    model
        .params
        .iter()
        .map(|p| {
            let step = Q::from_integer((2 * integers).into());
            if p.integer {
                integers += 1;
            }
            let value: Q = match (&p.lower, &p.upper, p.integer) {
                (Some((lo, _)), _, true) => lo + Q::from_integer(3.into()) + step,
                (None, _, true) => Q::from_integer(4.into()) + step,
                (Some((lo, _)), Some((hi, _)), false) => (lo + hi) / Q::from_integer(2.into()),
                (Some((lo, _)), None, false) => lo + Q::new(3.into(), 2.into()),
                (None, Some((hi, _)), false) => hi - Q::from_integer(1.into()),
                (None, None, false) => Q::new(3.into(), 2.into()),
            };
            format!("{}={value}", p.name)
        })
        .collect()
}
