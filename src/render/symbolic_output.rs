//! Layout of a piecewise model with symbolic breakpoints (`piecewise::symbolic`): each
//! piece's closed form in k, the joins, and the total as finite sums with Σ where no closed
//! form exists. Nothing is computed here.

use serde_json::{json, Value};

use crate::model::Model;
use crate::piecewise::symbolic::{NumeratorTerm, SymbolicModel, TotalPart};
use crate::probability::Event;

use super::analysis_output::{expr_node, ratfunc_node, series_strings};
use super::model_output::{derivation_json, derivation_text};
use super::node::Node;
use super::probability_output::event_strings;
use super::{latex, text, to_node};

fn both(node: &Node) -> (String, String) {
    (text::write(node), latex::write(node))
}

fn term_at(m: &SymbolicModel, at: Node) -> Node {
    Node::Term(m.sequence.clone(), Box::new(at))
}

/// `a(s_i) = a(b)·Π P_{i'}(n_{i'})` for piece i (the base term itself for the first piece).
fn join_node(m: &SymbolicModel, i: usize) -> Node {
    let mut factors = vec![term_at(m, Node::Int(m.base_index.clone()))];
    for p in &m.pieces[..i] {
        if let Some(at_end) = &p.at_end {
            factors.push(to_node::product(at_end, &m.index, vec![]));
        }
    }
    Node::product(factors)
}

/// One piece as laid out: its range, `a(k) = a(s)·P(k − s)`, and s (text, LaTeX).
struct PieceLines {
    range: String,
    range_latex: String,
    form: (String, String),
    base: (String, String),
}

/// Each piece: its range, and `a(k) = a(s)·P(k − s)`.
fn piece_lines(m: &SymbolicModel) -> Vec<PieceLines> {
    m.pieces
        .iter()
        .map(|p| {
            let lhs = to_node::sequence_at(&m.sequence, &m.index);
            let base = term_at(m, ratfunc_node(&p.shift));
            let rhs = to_node::product(&p.in_k, &m.index, vec![base]);
            let first = text::write(&ratfunc_node(&p.first));
            let first_latex = latex::write(&ratfunc_node(&p.first));
            let (range, range_latex) = match &p.last {
                Some(l) => (
                    format!("{first} ≤ {} ≤ {}", m.index, text::write(&ratfunc_node(l))),
                    format!(
                        "{first_latex} \\le {} \\le {}",
                        m.index,
                        latex::write(&ratfunc_node(l))
                    ),
                ),
                None => (
                    format!("{} ≥ {first}", m.index),
                    format!("{} \\ge {first_latex}", m.index),
                ),
            };
            let (lt, ll) = both(&lhs);
            let (rt, rl) = both(&rhs);
            PieceLines {
                range,
                range_latex,
                form: (format!("{lt} = {rt}"), format!("{ll} = {rl}")),
                base: both(&ratfunc_node(&p.shift)),
            }
        })
        .collect()
}

/// One part of the total: `Σ_{j=from}^{n} P(j)`, its closed form, or the series.
fn part_strings(m: &SymbolicModel, part: &TotalPart) -> (String, String) {
    let piece = &m.pieces[part.piece];
    if let Some((e, _)) = &part.closed {
        let node = expr_node(e);
        let (t, l) = both(&node);
        return match node {
            Node::Sum(_) => (format!("({t})"), format!("\\left({l}\\right)")),
            _ => (t, l),
        };
    }
    let summand = to_node::product(&piece.solution.simplest.product, "j", vec![]);
    let (st, sl) = both(&summand);
    match (&part.to, &part.series) {
        (Some(n), _) => {
            let (nt, nl) = both(&ratfunc_node(n));
            (
                format!("Σ_{{j={}}}^{{{nt}}} {st}", part.from),
                format!("\\sum_{{j={}}}^{{{nl}}} {sl}", part.from),
            )
        }
        (None, Some(series)) => {
            let (ft, fl) = series_strings(series);
            if part.from == 1 {
                (format!("({ft} − 1)"), format!("\\left({fl} - 1\\right)"))
            } else {
                (ft, fl)
            }
        }
        (None, None) => (
            format!("Σ_{{j≥{}}} {st}", part.from),
            format!("\\sum_{{j \\ge {}}} {sl}", part.from),
        ),
    }
}

/// `join_i·part_i` for piece i (the join left out for the first piece), text and LaTeX.
fn joined_part(m: &SymbolicModel, part: &TotalPart) -> (String, String) {
    let (pt, pl) = part_strings(m, part);
    let factors: Vec<Node> = m.pieces[..part.piece]
        .iter()
        .filter_map(|p| p.at_end.as_ref())
        .map(|e| to_node::product(e, &m.index, vec![]))
        .collect();
    if factors.is_empty() {
        return (pt, pl);
    }
    let (jt, jl) = both(&Node::product(factors));
    (format!("{jt}·{pt}"), format!("{jl}\\,{pl}"))
}

/// part₁ + join₂·part₂ + …: Σ a(k)/a(b).
fn inner_total(m: &SymbolicModel) -> (String, String) {
    let (t, l): (Vec<String>, Vec<String>) = m.total.iter().map(|p| joined_part(m, p)).unzip();
    (t.join(" + "), l.join(" + "))
}

/// Σ a(k) = a(b)·(part₁ + join₂·part₂ + …), in text and LaTeX.
pub fn total_strings(m: &SymbolicModel) -> (String, String) {
    let (t, l) = inner_total(m);
    let base = term_at(m, Node::Int(m.base_index.clone()));
    let (bt, bl) = both(&base);
    (format!("{bt}·({t})"), format!("{bl}\\left({l}\\right)"))
}

/// a(s_i)/a(b) without the base term: the product of the earlier pieces' end factors.
fn join_ratio(m: &SymbolicModel, i: usize) -> (String, String) {
    let factors: Vec<Node> = m.pieces[..i]
        .iter()
        .filter_map(|p| p.at_end.as_ref())
        .map(|e| to_node::product(e, &m.index, vec![]))
        .collect();
    if factors.is_empty() {
        return ("1".into(), "1".into());
    }
    both(&Node::product(factors))
}

/// P(event) = numerator/total for an event on the pieces' edges, text and LaTeX.
pub fn probability_strings(m: &SymbolicModel, event: &Event) -> Option<(String, String)> {
    let terms = m.event_terms(event)?;
    let (mut t, mut l) = (Vec::new(), Vec::new());
    for term in &terms {
        let (a, b) = match term {
            NumeratorTerm::Join(i) => join_ratio(m, *i),
            NumeratorTerm::Part(i) => joined_part(m, &m.total[*i]),
            NumeratorTerm::End => join_ratio(m, m.pieces.len()),
        };
        t.push(a);
        l.push(b);
    }
    let (dt, dl) = inner_total(m);
    Some((
        format!("({})/({dt})", t.join(" + ")),
        format!("\\frac{{{}}}{{{dl}}}", l.join(" + ")),
    ))
}

fn missing_note(model: &Model) -> String {
    let names: Vec<&str> = model
        .params
        .iter()
        .filter(|p| p.integer)
        .map(|p| p.name.as_str())
        .collect();
    format!(
        "numbers (the total's value, mean, variance, tail constants, probabilities) come with the breakpoints' values: --param {}=…",
        names.first().copied().unwrap_or("c")
    )
}

/// `telescope solve` text for symbolic breakpoints (with `--prob` events on the pieces' edges).
pub fn symbolic_text(model: &Model, m: &SymbolicModel, events: &[Event]) -> String {
    let mut out = derivation_text(model);
    out += "\n── with symbolic breakpoints ──\n";
    for (i, lines) in piece_lines(m).into_iter().enumerate() {
        out += &format!(
            "piece {}      {}\n  closed form  {}\n",
            i + 1,
            lines.range,
            lines.form.0
        );
    }
    for i in 1..m.pieces.len() {
        let (s, _) = both(&term_at(m, ratfunc_node(&m.pieces[i].shift)));
        let (j, _) = both(&join_node(m, i));
        out += &format!("joined       {s} = {j}\n");
    }
    let (total, _) = total_strings(m);
    out += &format!(
        "total        Σ_{{{}≥{}}} {}({}) = {total}\n",
        m.index, m.base_index, m.sequence, m.index
    );
    for part in &m.total {
        if let Some((_, how)) = &part.closed {
            out += &format!("  piece {} summed by {how}\n", part.piece + 1);
        } else if part.to.is_some() {
            out += &format!(
                "  piece {}: a finite sum with a symbolic limit and no closed form, kept as Σ\n",
                part.piece + 1
            );
        }
    }
    for e in events {
        let (name, _) = event_strings(e);
        match probability_strings(m, e) {
            Some((t, _)) => out += &format!("probability  {name} = {t}\n"),
            None => {
                out += &format!(
                    "probability  {name}: needs the breakpoints' values (its bounds are not at a piece's edge)\n"
                )
            }
        }
    }
    out += &format!("  note       {}\n", missing_note(model));
    out
}

/// LaTeX lines for symbolic breakpoints.
pub fn symbolic_latex(m: &SymbolicModel, events: &[Event]) -> String {
    let mut lines: Vec<String> = piece_lines(m)
        .into_iter()
        .map(|l| {
            format!(
                "  {} && {}",
                l.form.1.replacen(" = ", " &= ", 1),
                l.range_latex
            )
        })
        .collect();
    let (_, total) = total_strings(m);
    let seq = latex::write(&to_node::sequence_at(&m.sequence, &m.index));
    lines.push(format!(
        "  \\sum_{{{} \\ge {}}} {seq} &= {total}",
        m.index, m.base_index
    ));
    for e in events {
        if let Some((_, l)) = probability_strings(m, e) {
            lines.push(format!("  {} &= {l}", event_strings(e).1));
        }
    }
    format!(
        "\\begin{{align*}}\n{}\n\\end{{align*}}\n",
        lines.join(" \\\\\n")
    )
}

/// JSON for symbolic breakpoints (schema: the third shape of `solve.schema.json`).
pub fn symbolic_json(model: &Model, m: &SymbolicModel, events: &[Event]) -> Value {
    let pieces: Vec<Value> = piece_lines(m)
        .into_iter()
        .zip(&m.pieces)
        .map(|(l, p)| {
            json!({
                "range": l.range,
                "base": { "text": l.base.0, "latex": l.base.1 },
                "closed_form": { "text": l.form.0, "latex": l.form.1 },
                "at_end": p.at_end.as_ref().map(|e| {
                    let (t, l) = both(&to_node::product(e, &m.index, vec![]));
                    json!({ "text": t, "latex": l })
                }),
            })
        })
        .collect();
    let (tt, tl) = total_strings(m);
    json!({
        "sequence": m.sequence,
        "index": m.index,
        "base_index": m.base_index.to_string(),
        "derivation": derivation_json(model),
        "symbolic": {
            "pieces": pieces,
            "total": {
                "text": tt,
                "latex": tl,
                "closed": m.total.iter().all(|p| p.closed.is_some()),
                "methods": m.total.iter().filter_map(|p| p.closed.as_ref().map(|(_, how)| how.clone())).collect::<Vec<_>>(),
            },
            "note": missing_note(model),
            "probabilities": events.iter().map(|e| {
                let (t, l) = event_strings(e);
                let closed = probability_strings(m, e)
                    .map(|(ct, cl)| json!({ "text": ct, "latex": cl }));
                json!({ "event": e.text, "text": t, "latex": l, "closed_form": closed })
            }).collect::<Vec<_>>(),
        },
    })
}
