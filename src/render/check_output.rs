//! `telescope check` in text and JSON: the verdict, the claim's own ratio next to the rule's,
//! how the base value was compared, the numeric evidence, and the diagnosis.

use std::collections::BTreeMap;

use serde_json::{json, Value};

use crate::algebra::{RatFunc, Q};
use crate::check::exact::ExactValue;
use crate::check::{BaseCheck, CheckReport, Diagnosis, Kind, Quantity, Verdict};
use crate::closed_form::Factor;
use crate::model::{from_ratfunc, normal_form};
use crate::ratio::Orientation;
use num_traits::Signed;

use super::node::{Function, Node};
use super::{formula, text, to_node};
use crate::check::claim::{Claim, ClaimKind, Function as ClaimFunction};
use crate::syntax::BinOp;

pub fn verdict_word(v: Verdict) -> &'static str {
    match v {
        Verdict::Proved => "proved",
        Verdict::HoldsNumerically => "holds numerically",
        Verdict::Refuted => "refuted",
    }
}

fn verdict_key(v: Verdict) -> &'static str {
    match v {
        Verdict::Proved => "proved",
        Verdict::HoldsNumerically => "holds_numerically",
        Verdict::Refuted => "refuted",
    }
}

/// A ratio as the product of linear factors when it splits, else as one fraction. A factor
/// `k − (N + 1)` is shown as `N + 1 − k` (its sign moved into the constant), the way rules
/// with finite support are written.
fn ratio_node(r: &RatFunc, index: &str) -> Node {
    let form = from_ratfunc(r, index, 0..0);
    let Ok(mut ratio) = normal_form(&form, index) else {
        return to_node::ratfunc(r);
    };
    for f in &mut ratio.factors {
        let symbolic = f.shift.as_constant().is_none() && f.shift.denom().is_one();
        let numer = f.shift.numer();
        let flip = symbolic
            && match f.orientation {
                // k − (N + 1) → N + 1 − k
                Orientation::Rising => numer.terms().all(|(_, c)| c.is_negative()),
                // 1 − n − k → −(k + n − 1)
                Orientation::Falling => numer.leading_term().is_some_and(|(_, c)| c.is_negative()),
            };
        if flip {
            f.orientation = match f.orientation {
                Orientation::Rising => Orientation::Falling,
                Orientation::Falling => Orientation::Rising,
            };
            f.shift = -f.shift.clone();
            if f.exponent % 2 != 0 {
                ratio.constant = -ratio.constant.clone();
            }
        }
    }
    to_node::ratio(&ratio, index)
}

fn exact_node(v: &ExactValue, index: &str) -> Node {
    // A function of one parameter is shown split into its linear factors: 1/(p − 1)², not
    // 1/(p² − 2p + 1).
    let variables = v.rational.variables();
    let rational = match variables.iter().next() {
        Some(only)
            if variables.len() == 1
                && (v.rational.numer().degree_in(only) > 1
                    || v.rational.denom().degree_in(only) > 1) =>
        {
            ratio_node(&v.rational, only)
        }
        _ => to_node::ratfunc(&v.rational),
    };
    if v.half_pi == 0 {
        return rational;
    }
    let (pi, below) = to_node::factor(
        &Factor::SqrtPi {
            half_exponent: v.half_pi,
        },
        index,
    );
    if below {
        Node::frac(rational, pi)
    } else {
        Node::product(vec![rational, pi])
    }
}

/// The claim as it was read: shows how implicit multiplication and `/` grouped it.
pub fn claim_node(c: &Claim, r: &CheckReport) -> Node {
    let node = |c: &Claim| claim_node(c, r);
    match &c.kind {
        ClaimKind::Number(q) => to_node::rational(q),
        ClaimKind::Param(name) => Node::sym(name),
        ClaimKind::Index => Node::sym(&r.index),
        ClaimKind::Pi => Node::sym("pi"),
        ClaimKind::Base => Node::Term(
            r.sequence.clone(),
            Box::new(Node::Int(r.base_index.clone())),
        ),
        ClaimKind::Neg(inner) => node(inner).negate(),
        ClaimKind::Binary(op, a, b) => {
            let (a, b) = (node(a), node(b));
            match op {
                BinOp::Add | BinOp::Sub => {
                    let mut terms = match a {
                        Node::Sum(inner) => inner,
                        other => vec![other],
                    };
                    terms.push(if *op == BinOp::Sub { b.negate() } else { b });
                    Node::Sum(terms)
                }
                BinOp::Mul | BinOp::ImplicitMul => Node::product(vec![a, b]),
                BinOp::Div => Node::frac(a, b),
                BinOp::Pow => Node::pow(a, b),
            }
        }
        ClaimKind::Call(f, args) => {
            let mut args: Vec<Node> = args.iter().map(node).collect();
            match f {
                ClaimFunction::Gamma => Node::Call(Function::Gamma, args),
                ClaimFunction::Beta => Node::Call(Function::Beta, args),
                ClaimFunction::Exp => Node::Call(Function::Exp, args),
                ClaimFunction::Log => Node::Call(Function::Log, args),
                ClaimFunction::Sqrt => Node::Call(Function::Sqrt, args),
                ClaimFunction::Factorial => Node::Factorial(Box::new(args.remove(0))),
                ClaimFunction::Binomial => {
                    let top = args.remove(0);
                    Node::Binomial(Box::new(top), Box::new(args.remove(0)))
                }
                ClaimFunction::Rising => {
                    let base = args.remove(0);
                    Node::Rising(Box::new(base), Box::new(args.remove(0)))
                }
            }
        }
    }
}

fn params_text(values: &BTreeMap<String, Q>) -> String {
    values
        .iter()
        .map(|(k, v)| format!("{} = {v}", text::write(&Node::sym(k))))
        .collect::<Vec<_>>()
        .join(", ")
}

/// 1-based column (in characters) of a byte offset into the claim.
fn column(claim: &str, at: usize) -> usize {
    let mut at = at.min(claim.len());
    while !claim.is_char_boundary(at) {
        at -= 1;
    }
    claim[..at].chars().count() + 1
}

/// A diagnosed number in words: the exact form, else a nearby fraction, else the decimal.
fn quantity_text(q: &Quantity, index: &str) -> String {
    if let Some(e) = &q.exact {
        let t = text::write(&exact_node(e, index));
        return if e.rational.as_constant().is_some() && e.half_pi == 0 {
            t
        } else {
            format!("{t} (= {} here)", q.decimal)
        };
    }
    match &q.near {
        Some(f) => format!("{f} (≈ {})", q.decimal),
        None => format!("≈ {}", q.decimal),
    }
}

fn quantity_json(q: &Option<Quantity>, index: &str) -> Value {
    match q {
        None => Value::Null,
        Some(q) => json!({
            "value": q.decimal,
            "exact": q.exact.as_ref().map(|e| formula(&exact_node(e, index))),
            "near": q.near.as_ref().map(|f| f.to_string()),
        }),
    }
}

fn base_term(r: &CheckReport) -> String {
    format!("{}({})", r.sequence, r.base_index)
}

/// One sentence saying what is wrong.
pub fn diagnosis_sentence(r: &CheckReport, d: &Diagnosis) -> String {
    let index = r.index.as_str();
    let factor = |d: &Diagnosis| -> String {
        match (&d.factor, &d.missing) {
            (Some(f), Some(m)) => format!(
                "the claim is {} times the truth; it misses the factor {}",
                quantity_text(f, index),
                quantity_text(m, index)
            ),
            _ => "the claim is a constant multiple of the truth".into(),
        }
    };
    match d.kind {
        Kind::ConstantFactor => format!("constant factor: {}", factor(d)),
        Kind::WrongBaseValue => match d.base_power {
            Some(m) => format!(
                "wrong base value: the claim is proportional to {}^{m}, but every solution of the rule is proportional to {} itself",
                base_term(r),
                base_term(r)
            ),
            None => format!(
                "wrong base value: the claim solves the rule but starts from {} = {}, not {}; {}",
                base_term(r),
                d.claim_at_base.as_deref().unwrap_or("?"),
                d.base_value.as_ref().map(|b| b.to_string()).unwrap_or_else(|| "?".into()),
                factor(d)
            ),
        },
        Kind::IndexShift => {
            let s = d.shift.unwrap_or(0);
            let moved = if s > 0 {
                format!("{index} + {s}")
            } else {
                format!("{index} − {}", -s)
            };
            let by = if s < 0 { format!("−{}", -s) } else { s.to_string() };
            let mut out = format!(
                "index shift: the claim at {index} equals the truth at {moved} (it is shifted by {by} in {index})"
            );
            if d.factor.is_some() {
                out += &format!(", up to a constant: {}", factor(d));
            }
            out
        }
        Kind::WrongPowerOfK => format!(
            "wrong power of {index}: claim/truth grows like {index}^δ with δ = {}",
            d.exponent_error
                .as_ref()
                .map(|q| quantity_text(q, index))
                .unwrap_or_default()
        ),
        Kind::WrongGeometricRate => {
            let mut out = format!(
                "wrong geometric rate: claim/truth grows like r^{index} with r = {}",
                d.rate_error
                    .as_ref()
                    .map(|q| quantity_text(q, index))
                    .unwrap_or_default()
            );
            if let Some(e) = &d.exponent_error {
                out += &format!(", times {index}^δ with δ = {}", quantity_text(e, index));
            }
            out
        }
        Kind::PartsAt => {
            let mut out = match &d.parting {
                Some(p) => format!(
                    "no simple relation: claim and truth first part at {index} = {}",
                    p.k
                ),
                None => "no simple relation between claim and truth".into(),
            };
            if let Some(n) = d.factorial_power {
                out += &format!("; claim/truth grows like ({index}!)^{n}");
            }
            out
        }
    }
}

fn route_line(r: &CheckReport) -> String {
    match (&r.exact, &r.numeric_only) {
        (Some(e), _) => {
            let base = match &e.base_check {
                BaseCheck::Exact(_) => "base value compared exactly",
                BaseCheck::Numeric => "base value compared numerically",
            };
            let ratio = if e.ratios_agree {
                "the ratios agree as rational functions"
            } else {
                "the ratios differ as rational functions"
            };
            format!("exact (hypergeometric term): {ratio}; {base}")
        }
        (None, Some(n)) => format!(
            "numeric only: {} (claim column {})",
            n.reason,
            column(&r.claim, n.span.start)
        ),
        (None, None) => "numeric only".into(),
    }
}

/// Human-readable report.
pub fn check_text(r: &CheckReport) -> String {
    let index = r.index.as_str();
    let rule_node = to_node::ratio(&r.rule, index);
    let mut out = String::new();
    out += &format!("claim        {} = {}\n", to_node_term(r), r.claim.trim());
    out += &format!(
        "read as      {} = {}\n",
        to_node_term(r),
        text::write(&claim_node(&r.read, r))
    );
    out += &format!(
        "rule         {}({index})/{}({index} − 1) = {}   for {index} ≥ {}\n",
        r.sequence,
        r.sequence,
        text::write(&rule_node),
        r.first_index
    );
    let label = match (r.verdict, &r.exact) {
        (Verdict::HoldsNumerically, _) => "HOLDS NUMERICALLY (not proved)".to_string(),
        (v, _) => verdict_word(v).to_uppercase(),
    };
    out += &format!("verdict      {label}\n");
    out += &format!("route        {}\n", route_line(r));
    match &r.exact {
        Some(e) => {
            out += &format!(
                "ratio        claim: {}\n             rule:  {}\n",
                text::write(&ratio_node(&e.claim_ratio, index)),
                text::write(&rule_node)
            );
            if let BaseCheck::Exact(v) = &e.base_check {
                let scale = if e.base_power == 1 {
                    format!(" · {}", base_term(r))
                } else {
                    String::new()
                };
                out += &format!(
                    "base value   claim at {index} = {}: {}{scale}\n",
                    r.base_index,
                    text::write(&exact_node(v, index))
                );
            }
        }
        None => {
            let samples: Vec<String> = r
                .ratio_samples
                .iter()
                .map(|s| {
                    format!(
                        "{index} = {}: claim {}, rule {}",
                        s.k,
                        s.claim.as_deref().unwrap_or("undefined"),
                        s.rule.as_deref().unwrap_or("undefined")
                    )
                })
                .collect();
            if !samples.is_empty() {
                out += &format!("ratio        {}\n", samples.join("\n             "));
            }
        }
    }
    out += &format!(
        "numeric      {} digits; {} parameter point{}; largest relative difference {} (tolerance {})\n",
        r.digits,
        r.points.len(),
        if r.points.len() == 1 { "" } else { "s" },
        r.max_rel_diff,
        r.tolerance
    );
    for p in &r.points {
        let params = params_text(&p.values);
        let at = if params.is_empty() {
            String::new()
        } else {
            format!("{params}, ")
        };
        out += &format!(
            "  {at}{} = {}: {} values of {index} from {} to {}, largest relative difference {}\n",
            base_term(r),
            p.base,
            p.indices.len(),
            p.indices.first().map(|k| k.to_string()).unwrap_or_default(),
            p.indices.last().map(|k| k.to_string()).unwrap_or_default(),
            p.max_rel_diff
        );
    }
    for (values, why) in &r.skipped {
        out += &format!("  skipped {}: {why}\n", params_text(values));
    }
    if let Some(d) = &r.diagnosis {
        out += &format!("diagnosis    {}\n", diagnosis_sentence(r, d));
        if let Some(p) = &d.parting {
            let params = params_text(&p.values);
            let at = if params.is_empty() {
                String::new()
            } else {
                format!(" ({params})")
            };
            out += &format!(
                "first difference at {index} = {}{at}: claim {}, truth {}\n",
                p.k, p.claim, p.truth
            );
        }
    }
    out
}

fn to_node_term(r: &CheckReport) -> String {
    text::write(&to_node::sequence_at(&r.sequence, &r.index))
}

/// The stable JSON interface (documented in the README).
pub fn check_json(r: &CheckReport) -> Value {
    let index = r.index.as_str();
    let exact = r.exact.as_ref();
    let base_check = exact.map(|e| match &e.base_check {
        BaseCheck::Exact(v) => json!({
            "method": "exact",
            "claim_at_base": formula(&exact_node(v, index)),
            "times_base_term": e.base_power == 1,
            "agrees": e.base_agrees,
        }),
        BaseCheck::Numeric => json!({
            "method": "numeric",
            "claim_at_base": Value::Null,
            "times_base_term": e.base_power == 1,
            "agrees": e.base_agrees,
        }),
    });
    let diagnosis = r.diagnosis.as_ref().map(|d| {
        json!({
            "kind": d.kind.name(),
            "message": diagnosis_sentence(r, d),
            "factor": quantity_json(&d.factor, index),
            "missing_factor": quantity_json(&d.missing, index),
            "claim_at_base": d.claim_at_base,
            "base_value": d.base_value.as_ref().map(|b| b.to_string()),
            "base_power": d.base_power.map(|m| m.to_string()),
            "shift": d.shift.map(|s| s.to_string()),
            "exponent_error": quantity_json(&d.exponent_error, index),
            "rate_error": quantity_json(&d.rate_error, index),
            "factorial_power": d.factorial_power.map(|n| n.to_string()),
            "evidence_at": values_json(&d.evidence_at),
            "first_difference": d.parting.as_ref().map(|p| json!({
                "k": p.k.to_string(),
                "params": values_json(&p.values),
                "base_value": p.base.to_string(),
                "claim": p.claim,
                "truth": p.truth,
                "rel_diff": p.rel_diff,
            })),
        })
    });
    json!({
        "claim": r.claim.trim(),
        "claim_read_as": formula(&claim_node(&r.read, r)),
        "sequence": r.sequence,
        "index": index,
        "base_index": r.base_index.to_string(),
        "verdict": verdict_key(r.verdict),
        "route": if exact.is_some() { "exact" } else { "numeric" },
        "numeric_only_reason": r.numeric_only.as_ref().map(|n| json!({
            "reason": n.reason,
            "column": column(&r.claim, n.span.start).to_string(),
        })),
        "rule_ratio": formula(&to_node::ratio(&r.rule, index)),
        "claim_ratio": exact.map(|e| formula(&ratio_node(&e.claim_ratio, index))),
        "ratios_agree": exact.map(|e| e.ratios_agree),
        "base_check": base_check,
        "ratio_samples": r.ratio_samples.iter().map(|s| json!({
            "k": s.k.to_string(),
            "claim": s.claim,
            "rule": s.rule,
        })).collect::<Vec<_>>(),
        "numeric": {
            "digits": r.digits.to_string(),
            "tolerance": r.tolerance,
            "max_rel_diff": r.max_rel_diff,
            "points": r.points.iter().map(|p| json!({
                "params": values_json(&p.values),
                "base_value": p.base.to_string(),
                "k": p.indices.iter().map(|k| k.to_string()).collect::<Vec<_>>(),
                "max_rel_diff": p.max_rel_diff,
                "agrees": p.agrees,
            })).collect::<Vec<_>>(),
            "skipped": r.skipped.iter().map(|(v, why)| json!({
                "params": values_json(v),
                "reason": why,
            })).collect::<Vec<_>>(),
        },
        "diagnosis": diagnosis,
    })
}

fn values_json(values: &BTreeMap<String, Q>) -> Value {
    Value::Object(
        values
            .iter()
            .map(|(k, v)| (k.clone(), Value::String(v.to_string())))
            .collect(),
    )
}
