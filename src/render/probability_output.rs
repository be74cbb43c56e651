//! Layout of `--prob` answers: the event as a formula, the probability with its exact value,
//! error bound and method (text, LaTeX, JSON). Nothing is computed here.

use serde_json::{json, Value};

use crate::probability::{Event, EventBound, Probability};

use super::analysis_output::{expr_node, ratfunc_node};
use super::{greek, latex, text};

/// `P(k ≥ c)`, `P(2 ≤ k ≤ N)`, `P(k = c)` in text and LaTeX.
pub fn event_strings(e: &Event) -> (String, String) {
    let bound = |b: &EventBound| {
        let node = ratfunc_node(&b.value);
        (text::write(&node), latex::write(&node))
    };
    let (it, il) = (greek::text_name(&e.index), greek::latex_name(&e.index));
    let op = |strict: bool, less: bool| match (strict, less) {
        (true, true) => ("<", "<"),
        (false, true) => ("≤", r"\le"),
        (true, false) => (">", ">"),
        (false, false) => ("≥", r"\ge"),
    };
    let (t, l) = match (&e.lower, &e.upper) {
        (Some(lo), Some(hi)) if lo == hi => {
            let (bt, bl) = bound(lo);
            (format!("{it} = {bt}"), format!("{il} = {bl}"))
        }
        (Some(lo), Some(hi)) => {
            let ((lt, ll), (ht, hl)) = (bound(lo), bound(hi));
            let (o1t, o1l) = op(lo.strict, true);
            let (o2t, o2l) = op(hi.strict, true);
            (
                format!("{lt} {o1t} {it} {o2t} {ht}"),
                format!("{ll} {o1l} {il} {o2l} {hl}"),
            )
        }
        (Some(lo), None) => {
            let (bt, bl) = bound(lo);
            let (ot, ol) = op(lo.strict, false);
            (format!("{it} {ot} {bt}"), format!("{il} {ol} {bl}"))
        }
        (None, Some(hi)) => {
            let (bt, bl) = bound(hi);
            let (ot, ol) = op(hi.strict, true);
            (format!("{it} {ot} {bt}"), format!("{il} {ol} {bl}"))
        }
        (None, None) => (it.clone(), il.clone()),
    };
    (format!("P({t})"), format!(r"P\left({l}\right)"))
}

/// The `probabilities` list of the JSON output.
pub fn probabilities_json(ps: &[Probability]) -> Value {
    Value::Array(
        ps.iter()
            .map(|p| {
                let (t, l) = event_strings(&p.event);
                let v = p.value.as_ref();
                json!({
                    "event": p.event.text,
                    "text": t,
                    "latex": l,
                    "first": p.range.as_ref().and_then(|r| r.first.as_ref()).map(|k| k.to_string()),
                    "last": p.range.as_ref().and_then(|r| r.last.as_ref()).map(|k| k.to_string()),
                    "value": v.map(|v| v.value.clone()),
                    "exact": v.and_then(|v| v.exact.clone()),
                    "error_bound": v.map(|v| v.error_bound.clone()),
                    "method": v.map(|v| v.method.clone()),
                    "check_rel_diff": v.and_then(|v| v.check_rel_diff.clone()),
                    "note": p.note,
                    "closed_form": p.closed_form.as_ref().map(|e| {
                        let node = expr_node(e);
                        json!({ "text": text::write(&node), "latex": latex::write(&node) })
                    }),
                })
            })
            .collect(),
    )
}

/// The text section (empty when no event was asked for).
pub fn probabilities_text(ps: &[Probability]) -> String {
    if ps.is_empty() {
        return String::new();
    }
    let mut out = String::from("\nProbabilities (under the normalised law)\n");
    for p in ps {
        let (t, _) = event_strings(&p.event);
        if let Some(e) = &p.closed_form {
            out += &format!("  {t} = {}\n", text::write(&expr_node(e)));
        }
        match (&p.value, &p.note) {
            (Some(v), _) => {
                out += &format!("  {t} = {}", v.value);
                match &v.exact {
                    Some(q) => out += &format!("  (exactly {})", super::shown_exact(q)),
                    None => out += &format!("  (± {})", v.error_bound),
                }
                out += &format!("\n      {}\n", v.method);
                if let Some(c) = &v.check_rel_diff {
                    out += &format!("      closed form against the numeric sum: {c}\n");
                }
            }
            (None, note) => {
                out += &format!(
                    "  {t}: not computed — {}\n",
                    note.as_deref().unwrap_or("no value")
                );
            }
        }
    }
    out
}

/// The LaTeX lines (empty when no event was asked for).
pub fn probabilities_latex(ps: &[Probability]) -> String {
    if ps.is_empty() {
        return String::new();
    }
    let mut out =
        String::from("\\noindent Probabilities under the normalised law:\n\\begin{align*}\n");
    let lines: Vec<String> = ps
        .iter()
        .map(|p| {
            let (_, event) = event_strings(&p.event);
            // With a closed form, the number follows on a second aligned line.
            let (first, lhs) = match &p.closed_form {
                Some(e) => (
                    format!("{event} &= {} \\\\\n  ", latex::write(&expr_node(e))),
                    String::new(),
                ),
                None => (String::new(), event),
            };
            let number = match &p.value {
                Some(v) => match &v.exact {
                    Some(q) if q.len() < 60 => {
                        let exact = match q.split_once('/') {
                            Some((n, d)) => format!(r"\frac{{{n}}}{{{d}}}"),
                            None => q.clone(),
                        };
                        format!("{lhs} &= {exact} \\approx {}", v.value)
                    }
                    _ => format!("{lhs} &\\approx {}", v.value),
                },
                None => format!("{lhs} &\\quad \\text{{not computed}}"),
            };
            first + &number
        })
        .collect();
    out += &lines.join(" \\\\\n");
    out += "\n\\end{align*}\n";
    out
}
