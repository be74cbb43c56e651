//! `telescope fit` output: one model in text or JSON, and several models ranked by AIC.
//! Statistics are doubles (see `fit`); they are printed to the digits they hold.

use std::fmt::Write;

use serde_json::{json, Value};

use crate::fit::{End, Estimate, FitReport, Fitted, HESSIAN_STEP};

use super::sample_output::number;

/// Significant digits of estimates, intervals, log-likelihood, AIC and BIC.
pub const ESTIMATE_DIGITS: u32 = 7;
/// Significant digits of standard errors and test statistics.
const STAT_DIGITS: u32 = 4;

/// A model as the report names it.
pub struct FitHeading<'a> {
    pub rule: &'a str,
    pub data: &'a str,
}

fn end_text(end: &End, integer: bool) -> String {
    let show = |v: f64| {
        if integer {
            format!("{}", v.round() as i64)
        } else {
            number(v, 6)
        }
    };
    match end {
        End::At(v) => show(*v),
        End::RangeEnd(v) => format!("{} (range end)", show(*v)),
    }
}

fn estimate_value(e: &Estimate) -> String {
    if e.integer {
        format!("{}", e.value.round() as i64)
    } else {
        number(e.value, ESTIMATE_DIGITS)
    }
}

/// One model in text.
pub fn fit_text(report: &FitReport, heading: &FitHeading) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "fit of {}", heading.rule);
    let _ = writeln!(
        out,
        "data: {}: {} observations with k ≥ {} ({} distinct k){}",
        heading.data,
        report.observations,
        report.k_min,
        report.distinct,
        if report.left_out > 0 {
            format!(", {} below k = {} left out", report.left_out, report.k_min)
        } else {
            String::new()
        }
    );
    if !report.fixed.is_empty() {
        let _ = writeln!(
            out,
            "fixed: {}",
            super::sample_output::values_text(&report.fixed)
        );
    }
    match &report.outcome {
        Err(failure) => {
            let _ = writeln!(out, "\nno estimate: {}", failure.message());
        }
        Ok(fitted) => fitted_text(&mut out, fitted, report.observations),
    }
    out
}

fn fitted_text(out: &mut String, fitted: &Fitted, n: u64) {
    let _ = writeln!(out, "normalisation: {}", fitted.total_route.describe());
    if !fitted.estimates.is_empty() {
        let _ = writeln!(
            out,
            "\n{:<12} {:>14} {:>12}   95 % profile-likelihood interval",
            "parameter", "estimate", "std. error"
        );
        for e in &fitted.estimates {
            let se = e
                .standard_error
                .map_or("—".to_string(), |s| number(s, STAT_DIGITS));
            let interval = e.interval.as_ref().map_or("—".to_string(), |i| {
                format!(
                    "[{}, {}]",
                    end_text(&i.lower, e.integer),
                    end_text(&i.upper, e.integer)
                )
            });
            let _ = writeln!(
                out,
                "{:<12} {:>14} {:>12}   {interval}",
                e.name,
                estimate_value(e),
                se,
            );
        }
        for e in fitted.estimates.iter().filter(|e| e.exact.is_some()) {
            let _ = writeln!(
                out,
                "{} = {} exactly: the likelihood equation is mean = sample mean, and this is its rational root",
                e.name,
                e.exact.as_ref().map_or(String::new(), |q| q.to_string())
            );
        }
    }
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "log-likelihood  {}",
        number(fitted.log_likelihood, ESTIMATE_DIGITS + 3)
    );
    let _ = writeln!(
        out,
        "AIC             {}",
        number(fitted.aic, ESTIMATE_DIGITS + 3)
    );
    let _ = writeln!(
        out,
        "BIC             {}   (n = {n})",
        number(fitted.bic, ESTIMATE_DIGITS + 3)
    );
    if fitted.estimates.iter().any(|e| e.standard_error.is_some()) {
        let _ = writeln!(
            out,
            "standard errors: inverse observed information, central differences with step h = {}·max(|θ|, 1)",
            number(HESSIAN_STEP, 1)
        );
    }
    if let (Some(chi), Some(distance)) = (&fitted.chi_square, fitted.ks_distance) {
        goodness_text(out, fitted, chi, distance);
    }
}

fn goodness_text(out: &mut String, fitted: &Fitted, chi: &crate::fit::ChiSquare, distance: f64) {
    let _ = match (chi.degrees_of_freedom, chi.p_value) {
        (Some(df), Some(p)) => writeln!(
            out,
            "chi-square: X² = {} on {df} degrees of freedom ({} bins pooled to expected ≥ 5), p = {}",
            number(chi.statistic, STAT_DIGITS),
            chi.bins.len(),
            number(p, 3)
        ),
        _ => writeln!(
            out,
            "chi-square: only {} bins with expected ≥ 5, too few for a test after fitting {} parameter(s)",
            chi.bins.len(),
            fitted.estimates.len()
        ),
    };
    let _ = write!(
        out,
        "Kolmogorov–Smirnov distance: D = {}",
        number(distance, STAT_DIGITS)
    );
    match &fitted.bootstrap {
        None => {
            let _ = writeln!(out, " (--bootstrap N for its p-value)");
        }
        Some(Err(why)) => {
            let _ = writeln!(out, "; no bootstrap: {why}");
        }
        Some(Ok(b)) => {
            let p = b
                .p_value
                .map_or("none (every refit failed)".to_string(), |p| number(p, 3));
            let _ = writeln!(
                out,
                "; parametric bootstrap p = {p} ({} replicates refitted, {} failed, seed {})",
                b.replicates - b.failed,
                b.failed,
                b.seed
            );
        }
    }
}

fn end_json(end: &End) -> Value {
    match end {
        End::At(v) => json!({ "value": number(*v, 10), "kind": "profile" }),
        End::RangeEnd(v) => json!({ "value": number(*v, 10), "kind": "range_end" }),
    }
}

/// One model as JSON.
pub fn fit_json(report: &FitReport, heading: &FitHeading) -> Value {
    let fixed: serde_json::Map<String, Value> = report
        .fixed
        .iter()
        .map(|(n, v)| (n.clone(), Value::String(v.to_string())))
        .collect();
    let mut out = json!({
        "model": heading.rule,
        "data": heading.data,
        "k_min": report.k_min.to_string(),
        "observations": report.observations.to_string(),
        "left_out": report.left_out.to_string(),
        "distinct_k": report.distinct.to_string(),
        "fixed": fixed,
        "free": report.free,
    });
    let map = out.as_object_mut().expect("an object");
    match &report.outcome {
        Err(failure) => {
            map.insert("status".into(), json!("failed"));
            map.insert(
                "failure".into(),
                json!({ "kind": failure.kind(), "message": failure.message() }),
            );
        }
        Ok(f) => {
            map.insert("status".into(), json!("ok"));
            map.insert("failure".into(), Value::Null);
            let estimates: Vec<Value> = f
                .estimates
                .iter()
                .map(|e| {
                    json!({
                        "name": e.name,
                        "integer": e.integer,
                        "value": if e.integer { (e.value.round() as i64).to_string() } else { number(e.value, 12) },
                        "exact": e.exact.as_ref().map(|q| q.to_string()),
                        "standard_error": e.standard_error.map(|s| number(s, 6)),
                        "hessian_step": e.step.map(|h| number(h, 3)),
                        "interval": e.interval.as_ref().map(|i| json!({ "lower": end_json(&i.lower), "upper": end_json(&i.upper) })),
                    })
                })
                .collect();
            map.insert("estimates".into(), Value::Array(estimates));
            map.insert("log_likelihood".into(), json!(number(f.log_likelihood, 12)));
            map.insert("aic".into(), json!(number(f.aic, 12)));
            map.insert("bic".into(), json!(number(f.bic, 12)));
            map.insert("normalisation".into(), json!(f.total_route.describe()));
            let chi_square = f.chi_square.as_ref().map(|c| {
                let bins: Vec<Value> = c
                    .bins
                    .iter()
                    .map(|b| {
                        json!({
                            "first": b.first.to_string(),
                            "last": b.last.map(|l| l.to_string()),
                            "observed": b.observed.to_string(),
                            "expected": number(b.expected, 6),
                        })
                    })
                    .collect();
                json!({
                    "statistic": number(c.statistic, 8),
                    "degrees_of_freedom": c.degrees_of_freedom.map(|d| d.to_string()),
                    "p_value": c.p_value.map(|p| number(p, 6)),
                    "bins": bins,
                })
            });
            map.insert("chi_square".into(), chi_square.unwrap_or(Value::Null));
            let bootstrap = match &f.bootstrap {
                None => Value::Null,
                Some(Err(why)) => json!({ "error": why }),
                Some(Ok(b)) => json!({
                    "replicates": b.replicates.to_string(),
                    "failed": b.failed.to_string(),
                    "exceeding": b.exceeding.to_string(),
                    "p_value": b.p_value.map(|p| number(p, 6)),
                    "seed": b.seed.to_string(),
                }),
            };
            let ks = f
                .ks_distance
                .map(|d| json!({ "distance": number(d, 8), "bootstrap": bootstrap }));
            map.insert("ks".into(), ks.unwrap_or(Value::Null));
        }
    }
    out
}

/// ΔAIC and Akaike weights exp(−Δ/2)/Σ (Burnham & Anderson, *Model Selection and
/// Multimodel Inference*, 2002, §2.9) of reports already ranked by AIC.
pub fn akaike_weights(reports: &[(String, FitReport)]) -> Vec<Option<(f64, f64)>> {
    let aics: Vec<Option<f64>> = reports
        .iter()
        .map(|(_, r)| r.outcome.as_ref().ok().map(|f| f.aic))
        .collect();
    let best = aics.iter().flatten().copied().fold(f64::INFINITY, f64::min);
    let total: f64 = aics
        .iter()
        .flatten()
        .map(|a| (-(a - best) / 2.0).exp())
        .sum();
    aics.iter()
        .map(|a| a.map(|a| (a - best, (-(a - best) / 2.0).exp() / total)))
        .collect()
}

/// Several models, ranked by AIC, then each model's report.
pub fn comparison_text(reports: &[(String, FitReport)], data: &str) -> String {
    let weights = akaike_weights(reports);
    let mut out = String::new();
    let _ = writeln!(out, "models ranked by AIC on {data}\n");
    let _ = writeln!(
        out,
        "{:<4} {:<32} {:>6} {:>16} {:>10} {:>8}",
        "rank", "model", "params", "AIC", "ΔAIC", "weight"
    );
    for (i, ((name, report), w)) in reports.iter().zip(&weights).enumerate() {
        let (aic, delta, weight) = match (&report.outcome, w) {
            (Ok(f), Some((d, w))) => (
                number(f.aic, ESTIMATE_DIGITS + 3),
                number(*d, 4),
                number(*w, 3),
            ),
            _ => ("no fit".into(), "—".into(), "—".into()),
        };
        let _ = writeln!(
            out,
            "{:<4} {:<32} {:>6} {:>16} {:>10} {:>8}",
            i + 1,
            shorten(name, 32),
            report.free.len(),
            aic,
            delta,
            weight
        );
    }
    for (name, report) in reports {
        out.push('\n');
        out.push_str(&fit_text(report, &FitHeading { rule: name, data }));
    }
    out
}

/// Several models as JSON: `{ "models": [ … with rank, delta_aic, akaike_weight ] }`.
pub fn comparison_json(reports: &[(String, FitReport)], data: &str) -> Value {
    let weights = akaike_weights(reports);
    let models: Vec<Value> = reports
        .iter()
        .zip(&weights)
        .enumerate()
        .map(|(i, ((name, report), w))| {
            let mut v = fit_json(report, &FitHeading { rule: name, data });
            let map = v.as_object_mut().expect("an object");
            map.insert("rank".into(), json!((i + 1).to_string()));
            map.insert("delta_aic".into(), json!(w.map(|(d, _)| number(d, 6))));
            map.insert("akaike_weight".into(), json!(w.map(|(_, w)| number(w, 6))));
            v
        })
        .collect();
    json!({ "data": data, "models": models })
}

fn shorten(s: &str, width: usize) -> String {
    if s.chars().count() <= width {
        s.to_string()
    } else {
        let mut t: String = s.chars().take(width - 1).collect();
        t.push('…');
        t
    }
}
