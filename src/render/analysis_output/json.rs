//! The JSON fields `tail`, `normalization`, `mean`, `variance` and `divergent` (documented in
//! the README).

use serde_json::{json, Map, Value};

use crate::analysis::{Analysis, Finiteness, Moment, NumberReport, Requirement};

use super::super::node::Node;
use super::super::region::region_json;
use super::super::{latex, text};
use super::formula::{expr_node, inequality_strings, ratfunc_node, series_strings};
use super::{prefactor_node, verdict_strings};

fn formula(node: &Node) -> Map<String, Value> {
    let mut m = Map::new();
    m.insert("text".into(), Value::String(text::write(node)));
    m.insert("latex".into(), Value::String(latex::write(node)));
    m
}

fn with_value(node: &Node, value: Option<&str>) -> Value {
    let mut m = formula(node);
    if let Some(v) = value {
        m.insert("value".into(), Value::String(v.to_string()));
    }
    Value::Object(m)
}

fn requirement_json(r: &Requirement) -> Value {
    let (t, l) = inequality_strings(&r.inequality);
    let (word, why) = verdict_strings(&r.verdict);
    json!({
        "text": t, "latex": l, "purpose": r.purpose, "status": word, "settled_by": why,
        "holds_for": region_json(r.region.as_ref()),
    })
}

fn finite_json(f: &Finiteness) -> Value {
    match f {
        Finiteness::Finite => Value::Bool(true),
        Finiteness::Infinite(_) => Value::Bool(false),
        Finiteness::Undecided | Finiteness::Undefined(_) => Value::Null,
    }
}

fn number_fields(m: &mut Map<String, Value>, n: Option<&NumberReport>) {
    m.insert(
        "value".into(),
        n.map(|n| Value::String(n.value.clone()))
            .unwrap_or(Value::Null),
    );
    m.insert(
        "exact".into(),
        n.and_then(|n| n.exact.clone())
            .map(Value::String)
            .unwrap_or(Value::Null),
    );
    m.insert(
        "error_bound".into(),
        n.map(|n| Value::String(n.error_bound.clone()))
            .unwrap_or(Value::Null),
    );
    m.insert(
        "method".into(),
        n.map(|n| Value::String(n.method.clone()))
            .unwrap_or(Value::Null),
    );
    m.insert(
        "check_rel_diff".into(),
        n.and_then(|n| n.check.clone())
            .map(Value::String)
            .unwrap_or(Value::Null),
    );
}

fn moment_json(m: &Moment) -> Value {
    if matches!(m.finiteness, Finiteness::Infinite(_)) {
        return Value::Null;
    }
    let mut out = Map::new();
    out.insert(
        "closed_form".into(),
        m.closed_form
            .as_ref()
            .map(|(e, _)| Value::Object(formula(&expr_node(e))))
            .unwrap_or(Value::Null),
    );
    out.insert(
        "condition".into(),
        Value::Array(m.requirements.iter().map(requirement_json).collect()),
    );
    out.insert("finite".into(), finite_json(&m.finiteness));
    out.insert("finite_for".into(), region_json(m.finite_for.as_ref()));
    number_fields(&mut out, m.value.as_ref());
    Value::Object(out)
}

/// The JSON fields `tail`, `normalization`, `mean`, `variance` and `divergent`.
pub fn analysis_json(a: &Analysis) -> Map<String, Value> {
    let mut out = Map::new();
    let tail = a.tail.as_ref().map(|t| {
        let law = &t.law;
        let nums = t.numbers.as_ref();
        json!({
            "rate": with_value(&ratfunc_node(&law.rate), nums.map(|n| n.rate.as_str())),
            "power": with_value(&ratfunc_node(&law.power), nums.map(|n| n.power.as_str())),
            "factorial_power": law.factorial_power.to_string(),
            "prefactor": with_value(&prefactor_node(a, t), nums.map(|n| n.prefactor.as_str())),
            "prefactor_normalized": t.normalized_prefactor.is_some(),
            "corrections": law.corrections.iter().enumerate().map(|(i, c)| {
                with_value(&ratfunc_node(c), nums.and_then(|n| n.corrections.get(i)).map(|s| s.as_str()))
            }).collect::<Vec<_>>(),
            "corrections_omitted": law.omitted.as_ref().map(|o| json!({
                "first": o.first,
                "last": o.last,
                "terms": o.terms,
                "max_terms": crate::analysis::MAX_CORRECTION_TERMS,
                "max_work": crate::analysis::MAX_CORRECTION_WORK,
                "values": nums.map(|n| n.corrections.get(o.first - 1..o.last.min(n.corrections.len())).unwrap_or(&[]).to_vec()),
            })),
            "tail_exponent": law.tail_exponent().map(|g| {
                with_value(&ratfunc_node(&g), nums.and_then(|n| n.tail_exponent.as_deref()))
            }),
            "conditional": t.conditional,
            "check": nums.and_then(|n| n.check.as_ref()).map(|c| json!({
                "k": c.k.to_string(), "rel_diff": c.rel_diff, "next_term": c.next_term,
            })),
        })
    });
    out.insert("tail".into(), tail.unwrap_or(Value::Null));
    let norm = &a.normalization;
    let mut n = Map::new();
    n.insert(
        "series".into(),
        match &norm.series {
            Some(series) => {
                let (st, sl) = series_strings(series);
                json!({ "text": st, "latex": sl })
            }
            None => Value::Null,
        },
    );
    n.insert(
        "closed_form".into(),
        norm.closed_form
            .as_ref()
            .map(|(e, th)| {
                let mut m = formula(&expr_node(e));
                m.insert("theorem".into(), Value::String(th.name().into()));
                Value::Object(m)
            })
            .unwrap_or(Value::Null),
    );
    n.insert(
        "condition".into(),
        Value::Array(norm.requirements.iter().map(requirement_json).collect()),
    );
    n.insert("finite".into(), finite_json(&norm.finiteness));
    n.insert("finite_for".into(), region_json(norm.finite_for.as_ref()));
    n.insert("finite_support".into(), Value::Bool(norm.finite_support));
    number_fields(&mut n, norm.value.as_ref());
    n.insert(
        "numeric_note".into(),
        norm.numeric_note
            .clone()
            .map(Value::String)
            .unwrap_or(Value::Null),
    );
    n.insert(
        "base_value".into(),
        match &norm.base_value {
            Some((expr, number)) => {
                let mut m = expr
                    .as_ref()
                    .map(|e| formula(&expr_node(e)))
                    .unwrap_or_default();
                number_fields(&mut m, number.as_ref());
                Value::Object(m)
            }
            None => Value::Null,
        },
    );
    n.insert(
        "parts".into(),
        match &norm.parts {
            Some(p) => json!({
                "finite_part": p.finite_part,
                "tail_part": p.tail_part,
                "tail_exact": p.tail_exact,
                "tail_error_bound": p.tail_error_bound,
            }),
            None => Value::Null,
        },
    );
    out.insert("normalization".into(), Value::Object(n));
    out.insert("mean".into(), moment_json(&a.mean));
    out.insert("variance".into(), moment_json(&a.variance));
    let mut divergent = Vec::new();
    for (name, f, reqs) in [
        ("total", &norm.finiteness, &norm.requirements),
        ("mean", &a.mean.finiteness, &a.mean.requirements),
        ("variance", &a.variance.finiteness, &a.variance.requirements),
    ] {
        if let Finiteness::Infinite(why) = f {
            let failed: Vec<Value> = reqs
                .iter()
                .filter(|r| r.fails())
                .map(requirement_json)
                .collect();
            divergent.push(json!({ "quantity": name, "reason": crate::render::reason::text(why), "failed": failed }));
        }
    }
    out.insert("divergent".into(), Value::Array(divergent));
    out
}
