//! Where a condition holds, as the reader wants it: `1/2 < ρ < 1`, `ρ > β`, irrational ends
//! in radicals or as a root with its decimal; text, LaTeX and the JSON object `holds_for`.
//! Layout only: the intervals and their ends come from `solve::inequality`.

use serde_json::{json, Value};

use crate::algebra::{Poly, Q};
use crate::analysis::Region;
use crate::solve::algebraic::Algebraic;
use crate::solve::inequality::{Bound, LinearSolution, Piece, Split};

use super::node::{Function, Node};
use super::{latex, text, to_node};

/// Text or LaTeX.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Notation {
    Text,
    Latex,
}

fn write(node: &Node, notation: Notation) -> String {
    match notation {
        Notation::Text => text::write(node),
        Notation::Latex => latex::write(node),
    }
}

/// An irrational number in radicals, when it has that form (a root of a quadratic).
fn algebraic_node(a: &Algebraic) -> Option<Node> {
    let r = a.radical.as_ref()?;
    let root = Node::Call(Function::Sqrt, vec![Node::Int(r.radicand.clone())]);
    let (negative, magnitude) = (
        r.coefficient < Q::from_integer(0.into()),
        r.coefficient.clone(),
    );
    let magnitude = if negative { -magnitude } else { magnitude };
    let surd = if magnitude == Q::from_integer(1.into()) {
        root
    } else if magnitude.is_integer() {
        Node::product(vec![to_node::rational(&magnitude), root])
    } else {
        Node::frac(
            Node::product(vec![Node::Int(magnitude.numer().clone()), root]),
            Node::Int(magnitude.denom().clone()),
        )
    };
    let surd = if negative { surd.negate() } else { surd };
    Some(if r.rational == Q::from_integer(0.into()) {
        surd
    } else {
        Node::Sum(vec![to_node::rational(&r.rational), surd])
    })
}

fn root_polynomial(a: &Algebraic, variable: &str) -> Node {
    to_node::poly(&Poly::from_univariate(variable, &a.poly))
}

/// An end: a number, a radical with its decimal, or a root with its decimal.
fn bound_string(b: &Bound, variable: &str, notation: Notation) -> String {
    match b {
        Bound::Rational(q) => match notation {
            Notation::Text => q.to_string(),
            Notation::Latex => latex::write(&to_node::rational(q)),
        },
        Bound::Algebraic(a) => {
            let approx = match notation {
                Notation::Text => "≈",
                Notation::Latex => "\\approx",
            };
            match algebraic_node(a) {
                Some(node) => format!("{} {approx} {}", write(&node, notation), a.decimal),
                None => {
                    let p = write(&root_polynomial(a, variable), notation);
                    match notation {
                        Notation::Text => format!("(the root of {p} ≈ {})", a.decimal),
                        Notation::Latex => {
                            format!("{} \\ (\\text{{a root of }} {p})", a.decimal)
                        }
                    }
                }
            }
        }
        Bound::MinusInfinity => "−∞".into(),
        Bound::PlusInfinity => "∞".into(),
    }
}

fn piece_string(p: &Piece, variable: &str, notation: Notation) -> String {
    let name = write(&Node::sym(variable), notation);
    let sign = |included: bool| match (notation, included) {
        (Notation::Text, true) => "≤",
        (Notation::Latex, true) => "\\le",
        (_, false) => "<",
    };
    let finite = |b: &Bound| !matches!(b, Bound::MinusInfinity | Bound::PlusInfinity);
    if p.low == p.high && finite(&p.low) {
        return format!("{name} = {}", bound_string(&p.low, variable, notation));
    }
    let low = bound_string(&p.low, variable, notation);
    let high = bound_string(&p.high, variable, notation);
    match (finite(&p.low), finite(&p.high)) {
        (true, true) => format!(
            "{low} {} {name} {} {high}",
            sign(p.low_included),
            sign(p.high_included)
        ),
        (true, false) => {
            let greater = match (notation, p.low_included) {
                (Notation::Text, true) => "≥",
                (Notation::Latex, true) => "\\ge",
                (_, false) => ">",
            };
            format!("{name} {greater} {low}")
        }
        (false, true) => format!("{name} {} {high}", sign(p.high_included)),
        (false, false) => match notation {
            Notation::Text => format!("every {name}"),
            Notation::Latex => format!("\\text{{every }} {name}"),
        },
    }
}

fn pieces_string(pieces: &[Piece], variable: &str, notation: Notation) -> String {
    let joiner = match notation {
        Notation::Text => " or ",
        Notation::Latex => " \\text{ or } ",
    };
    pieces
        .iter()
        .map(|p| piece_string(p, variable, notation))
        .collect::<Vec<_>>()
        .join(joiner)
}

fn linear_string(l: &LinearSolution, holds: bool, notation: Notation) -> String {
    let name = write(&Node::sym(&l.param), notation);
    let bound = write(&to_node::ratfunc(&l.bound), notation);
    // Failing is the complement: `>` becomes `≤`, `<` becomes `≥`.
    let relation = match (l.greater, holds, notation) {
        (true, true, _) => ">",
        (false, true, _) => "<",
        (true, false, Notation::Text) => "≤",
        (true, false, Notation::Latex) => "\\le",
        (false, false, Notation::Text) => "≥",
        (false, false, Notation::Latex) => "\\ge",
    };
    format!("{name} {relation} {bound}")
}

fn remaining_text(l: &LinearSolution) -> String {
    let names: Vec<String> = l
        .remaining
        .iter()
        .map(|n| text::write(&Node::sym(n)))
        .collect();
    format!(
        "solved for {}; {} remain{} free",
        text::write(&Node::sym(&l.param)),
        names.join(", "),
        if names.len() == 1 { "s" } else { "" }
    )
}

/// `(holds, fails)` in words, e.g. `("1/2 < ρ < 1", "0 < ρ ≤ 1/2")`, and a note for a
/// linear solution (which variable was solved for, which remain).
fn region_strings(region: &Region, notation: Notation) -> (String, String, Option<String>) {
    match region {
        Region::Intervals(split) => (
            pieces_string(&split.holds, &split.param, notation),
            pieces_string(&split.fails, &split.param, notation),
            None,
        ),
        Region::Linear(l) => (
            linear_string(l, true, notation),
            linear_string(l, false, notation),
            Some(remaining_text(l)),
        ),
    }
}

/// Where it holds and where it fails, in words, and the note of a linear solution.
pub fn region_words(region: &Region) -> (String, String, Option<String>) {
    region_strings(region, Notation::Text)
}

/// `holds for 1/2 < ρ < 1, fails for 0 < ρ ≤ 1/2` with the given words for both sides.
pub fn region_text(region: &Region, yes: &str, no: &str) -> String {
    let (holds, fails, note) = region_strings(region, Notation::Text);
    let mut out = format!("{yes} for {holds}");
    if !fails.is_empty() {
        out += &format!(", {no} for {fails}");
    }
    if let Some(n) = note {
        out += &format!(" ({n})");
    }
    out
}

/// Where it holds, in LaTeX (math mode).
pub fn region_latex(region: &Region) -> String {
    region_strings(region, Notation::Latex).0
}

fn bound_json(b: &Bound, variable: &str) -> Value {
    match b {
        Bound::MinusInfinity | Bound::PlusInfinity => Value::Null,
        Bound::Rational(q) => json!({
            "exact": q.to_string(),
            "latex": latex::write(&to_node::rational(q)),
            "decimal": null,
            "algebraic": null,
        }),
        Bound::Algebraic(a) => {
            // Without a radical form the exact value is the root in its isolating interval.
            let (exact, exact_latex) = match algebraic_node(a) {
                Some(node) => (text::write(&node), latex::write(&node)),
                None => {
                    let p = root_polynomial(a, variable);
                    let (low, high) = (to_node::rational(&a.low), to_node::rational(&a.high));
                    (
                        format!("the root of {} in ({}, {})", text::write(&p), a.low, a.high),
                        format!(
                            "\\text{{the root of }} {} \\text{{ in }} \\left({}, {}\\right)",
                            latex::write(&p),
                            latex::write(&low),
                            latex::write(&high)
                        ),
                    )
                }
            };
            json!({
                "exact": exact,
                "latex": exact_latex,
                "decimal": a.decimal,
                "algebraic": {
                    "polynomial": text::write(&root_polynomial(a, variable)),
                    "coefficients": a.poly.iter().map(|c| c.to_string()).collect::<Vec<_>>(),
                    "isolating_interval": [a.low.to_string(), a.high.to_string()],
                },
            })
        }
    }
}

fn pieces_json(pieces: &[Piece], variable: &str) -> Value {
    Value::Array(
        pieces
            .iter()
            .map(|p| {
                json!({
                    "low": bound_json(&p.low, variable),
                    "low_included": p.low_included,
                    "high": bound_json(&p.high, variable),
                    "high_included": p.high_included,
                    "text": piece_string(p, variable, Notation::Text),
                    "latex": piece_string(p, variable, Notation::Latex),
                })
            })
            .collect(),
    )
}

fn split_json(split: &Split) -> Value {
    json!({
        "kind": "intervals",
        "variable": split.param,
        "integer": split.integer,
        "intervals": pieces_json(&split.holds, &split.param),
        "fails_for": pieces_json(&split.fails, &split.param),
        "remaining": [],
    })
}

/// The JSON object `holds_for` (documented in the README).
pub fn region_json(region: Option<&Region>) -> Value {
    let Some(region) = region else {
        return Value::Null;
    };
    let mut v = match region {
        Region::Intervals(split) => split_json(split),
        Region::Linear(l) => json!({
            "kind": "linear",
            "variable": l.param,
            "relation": if l.greater { ">" } else { "<" },
            "bound": super::formula(&to_node::ratfunc(&l.bound)),
            "remaining": l.remaining,
        }),
    };
    let (holds, fails, _) = region_strings(region, Notation::Text);
    let (holds_latex, fails_latex, _) = region_strings(region, Notation::Latex);
    if let Value::Object(m) = &mut v {
        m.insert("text".into(), Value::String(holds));
        m.insert("latex".into(), Value::String(holds_latex));
        m.insert("fails_text".into(), Value::String(fails));
        m.insert("fails_latex".into(), Value::String(fails_latex));
    }
    v
}
