//! Entry points shared by the cargo-fuzz targets (`fuzz/`) and the test that replays their
//! seed corpus (`tests/fuzz_corpus.rs`), so that CI exercises every target on stable Rust.
//!
//! Each function takes arbitrary bytes and runs a whole pipeline on them; the property is that
//! it returns (an answer or a `Diagnostic`) without panicking, within the time budget.

use std::collections::BTreeMap;

use crate::algebra::Q;
use crate::analysis::{analyse, AnalysisRequest};
use crate::budget::{Budget, Estimate};
use crate::check::{check_claim, CheckRequest};
use crate::model::{build_model, build_problem};
use crate::solve::solve;

/// Target `parse`: the parser and the model builder on arbitrary bytes.
pub fn parse_bytes(data: &[u8]) {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = crate::syntax::parse_model(text);
        let _ = crate::syntax::parse_expr(text);
        let _ = build_model(text);
    }
}

/// Target `model`: a model file (the bytes as text, or a rule generated from the bytes by a
/// small grammar when they are not UTF-8 or do not parse) built, solved and analysed, with
/// parameter values drawn from the bytes (2 correction terms, 12 digits).
pub fn model_pipeline(data: &[u8]) {
    let text = match std::str::from_utf8(data) {
        Ok(t) if build_model(t).is_ok() => t.to_string(),
        _ => generated_rule(data),
    };
    let Ok(model) = build_model(&text) else {
        return;
    };
    let values: BTreeMap<String, Q> = model
        .params
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let byte = data.get(i).copied().unwrap_or(3) as i64;
            (p.name.clone(), Q::new((byte % 19 + 1).into(), 7.into()))
        })
        .collect();
    for values in [BTreeMap::new(), values] {
        let Ok(resolved) = model.resolve(&values) else {
            continue;
        };
        for piece in resolved {
            let Ok(solution) = solve(&piece.problem, &values) else {
                continue;
            };
            // Two correction terms and 12 digits: every route of the analysis at a cost that
            // lets the fuzzer reach 10^6 inputs in well under an hour.
            let request = AnalysisRequest {
                terms: 2,
                digits: 12,
                normalize: data.first().is_some_and(|b| b % 2 == 1),
            };
            let numeric = piece.problem.params.len() <= values.len();
            let estimate = Estimate::solve(2, piece.problem.params.len(), numeric.then_some(12));
            if Budget::default().admit(&estimate).is_ok() {
                let _ = analyse(&piece.problem, &solution, &request);
            }
        }
    }
}

/// Target `claim`: the first line is a rule (or a generated one), the rest a claim; checked.
pub fn claim_check(data: &[u8]) {
    let text = String::from_utf8_lossy(data);
    let (rule, claim) = text.split_once('\n').unwrap_or((&text, "a(1) k"));
    let rule = if build_problem(rule).is_ok() {
        rule.to_string()
    } else {
        generated_rule(rule.as_bytes())
    };
    let Ok(problem) = build_problem(&rule) else {
        return;
    };
    let request = CheckRequest {
        claim: claim.to_string(),
        values: BTreeMap::new(),
        base: None,
        digits: crate::check::DEFAULT_DIGITS,
    };
    let _ = check_claim(&problem, &request);
}

/// A ratio rule from bytes by a small grammar: a constant, one to three numerator and
/// denominator factors `(p k + q)` or `(q - k)` with small rational or parameter shifts,
/// sometimes a power, and a first index.
pub fn generated_rule(data: &[u8]) -> String {
    let mut bytes = data.iter().copied().chain(std::iter::repeat(0));
    let mut next = move || bytes.next().unwrap_or(0) as i64;
    let shift = |b: i64, c: i64| -> String {
        match b % 6 {
            0 => "rho".into(),
            1 => "alpha".into(),
            _ => format!("{}/{}", c % 11 - 5, c % 4 + 1),
        }
    };
    let factor = |next: &mut dyn FnMut() -> i64| -> String {
        let (a, b, c, d) = (next(), next(), next(), next());
        let f = if a % 5 == 0 {
            format!("({} - k)", shift(b, c))
        } else {
            format!("({}k + {})", a % 3 + 1, shift(b, c))
        };
        if d % 7 == 0 {
            format!("{f}^{}", d % 3 + 2)
        } else {
            f
        }
    };
    let count = |x: i64| (x % 3 + 1) as usize;
    let (top_count, bottom_count) = (count(next()), count(next()));
    let top: Vec<String> = (0..top_count).map(|_| factor(&mut next)).collect();
    let bottom: Vec<String> = (0..bottom_count).map(|_| factor(&mut next)).collect();
    let constant = format!("{}/{}", next() % 9 - 4, next() % 5 + 1);
    format!(
        "a(k)/a(k-1) = ({constant}) * {} / ({})   for k >= {}",
        top.join(" "),
        bottom.join(" "),
        next() % 4
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn generated_rules_parse() {
        for seed in 0u8..40 {
            let data: Vec<u8> = (0..32)
                .map(|i| seed.wrapping_mul(31).wrapping_add(i))
                .collect();
            let rule = generated_rule(&data);
            assert!(crate::syntax::parse_model(&rule).is_ok(), "{rule}");
        }
    }
}
