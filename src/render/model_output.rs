//! What comes before the solution when the rule was derived from a model: the equation or
//! rates as written, the coefficients collected, the rates recognised, the derived ratio,
//! the boundary term and the assumptions (text, LaTeX, JSON); and the piece-by-piece output
//! of a piecewise model.

use serde_json::{json, Value};

use crate::model::{Assumption, Model, Piece, ProductForm, RuleSource};
use crate::piecewise::ModelSolution;

use super::node::Node;
use super::{latex, solve_json, solve_latex, solve_text, text, to_node};

/// A product the user wrote (constant times powers of index polynomials), factors kept.
fn product_form(form: &ProductForm) -> Node {
    let mut top = Vec::new();
    let mut bottom = Vec::new();
    match to_node::ratfunc(&form.constant) {
        Node::Frac(n, d) => {
            top.push(*n);
            bottom.push(*d);
        }
        other => top.push(other),
    }
    for f in &form.factors {
        let node = Node::pow(to_node::poly(&f.poly), Node::int(f.exponent.abs() as i64));
        if f.exponent > 0 {
            top.push(node);
        } else {
            bottom.push(node);
        }
    }
    Node::frac(Node::product(top), Node::product(bottom))
}

fn term(model: &Model, shift: i64) -> Node {
    let index = Node::sym(&model.index);
    let at = match shift {
        0 => index,
        s if s > 0 => Node::Sum(vec![index, Node::int(s)]),
        s => Node::Sum(vec![index, Node::int(-s).negate()]),
    };
    Node::Term(model.sequence.clone(), Box::new(at))
}

fn rate_call(name: &str, model: &Model, shift: i64) -> Node {
    let Node::Term(_, at) = term(model, shift) else {
        unreachable!("term builds a Term")
    };
    Node::Term(name.to_string(), at)
}

/// The lines of one piece's derivation as (label, formula node pair or words).
enum Line {
    Formula(&'static str, Node, Node),
    Words(&'static str, String),
}

fn assumption_words(a: &Assumption, model: &Model) -> String {
    let (n, k) = (&model.sequence, &model.index);
    match a {
        Assumption::ZeroFluxAtBoundary => format!(
            "the net flux λ({k}−1)·{n}({k}−1) − μ({k})·{n}({k}) is the same for every {k} (the balance says so); it is taken to vanish at the boundary"
        ),
        Assumption::DetailedBalance => format!(
            "detailed balance: the chain is in equilibrium, so birth({k}−1)·{n}({k}−1) = death({k})·{n}({k})"
        ),
        Assumption::StateSpaceEnds { at } => format!(
            "the state space ends at {k} = {}, where the birth rate vanishes",
            text::write(&to_node::ratfunc(at))
        ),
        Assumption::Capacity { at } => format!(
            "a finite state space: the chain stops at {k} = {} (no birth out of it), so {n}({k}) = 0 beyond",
            text::write(&to_node::ratfunc(at))
        ),
    }
}

fn piece_lines(model: &Model, piece: &Piece) -> Vec<Line> {
    let mut lines = Vec::new();
    let ratio_lhs = Node::frac(term(model, 0), term(model, -1));
    match &piece.derivation.source {
        RuleSource::Ratio => {}
        RuleSource::Balance { current, previous } => {
            lines.push(Line::Formula(
                "collected",
                Node::product(vec![product_form(current), term(model, 0)]),
                Node::product(vec![product_form(previous), term(model, -1)]),
            ));
            lines.push(Line::Formula(
                "ratio",
                ratio_lhs.clone(),
                Node::frac(product_form(previous), product_form(current)),
            ));
        }
        RuleSource::BirthDeathBalance {
            birth,
            death,
            previous,
            current,
            next,
        } => {
            lines.push(Line::Formula(
                "collected",
                Node::int(0),
                Node::Sum(vec![
                    Node::product(vec![product_form(previous), term(model, -1)]),
                    Node::product(vec![product_form(current), term(model, 0)]),
                    Node::product(vec![product_form(next), term(model, 1)]),
                ]),
            ));
            lines.push(Line::Formula(
                "birth rate",
                rate_call("λ", model, 0),
                to_node::ratfunc(birth),
            ));
            lines.push(Line::Formula(
                "death rate",
                rate_call("μ", model, 0),
                to_node::ratfunc(death),
            ));
            lines.push(Line::Formula(
                "ratio",
                ratio_lhs.clone(),
                Node::frac(rate_call("λ", model, -1), rate_call("μ", model, 0)),
            ));
        }
        RuleSource::Rates { birth, death } => {
            lines.push(Line::Formula(
                "birth rate",
                rate_call("birth", model, 0),
                product_form(birth),
            ));
            lines.push(Line::Formula(
                "death rate",
                rate_call("death", model, 0),
                product_form(death),
            ));
            lines.push(Line::Formula(
                "ratio",
                ratio_lhs.clone(),
                Node::frac(rate_call("birth", model, -1), rate_call("death", model, 0)),
            ));
        }
    }
    if !piece.derivation.is_plain_ratio() {
        lines.push(Line::Formula(
            "derived",
            ratio_lhs,
            to_node::ratio(&piece.ratio, &model.index),
        ));
    }
    for a in &piece.derivation.assumptions {
        lines.push(Line::Words("assumes", assumption_words(a, model)));
    }
    lines
}

fn range_words(model: &Model, piece: &Piece) -> String {
    let k = &model.index;
    let first = text::write(&to_node::ratfunc(&piece.first));
    match &piece.last {
        Some(last) => format!("{first} ≤ {k} ≤ {}", text::write(&to_node::ratfunc(last))),
        None => format!("{k} ≥ {first}"),
    }
}

fn range_latex(model: &Model, piece: &Piece) -> String {
    let k = &model.index;
    let first = latex::write(&to_node::ratfunc(&piece.first));
    match &piece.last {
        Some(last) => format!(
            "{first} \\le {k} \\le {}",
            latex::write(&to_node::ratfunc(last))
        ),
        None => format!("{k} \\ge {first}"),
    }
}

fn boundary_nodes(model: &Model) -> Option<(Node, Node)> {
    model.boundary.as_ref().map(|b| {
        (
            Node::Term(model.sequence.clone(), Box::new(Node::Int(b.index.clone()))),
            to_node::ratfunc(&b.value),
        )
    })
}

/// Whether there is anything to show before the solution.
pub fn has_derivation(model: &Model) -> bool {
    model.is_piecewise()
        || model.boundary.is_some()
        || model.pieces.iter().any(|p| !p.derivation.is_plain_ratio())
}

/// The derivation in Unicode text, one labelled line each.
pub fn derivation_text(model: &Model) -> String {
    let mut out = String::new();
    for (i, piece) in model.pieces.iter().enumerate() {
        if model.is_piecewise() {
            out += &format!("piece {}      {}\n", i + 1, range_words(model, piece));
        }
        for (written, _) in &piece.derivation.written {
            out += &format!("written      {}\n", written.trim());
        }
        for line in piece_lines(model, piece) {
            match line {
                Line::Formula(label, l, r) => {
                    out += &format!("{label:<12} {} = {}\n", text::write(&l), text::write(&r))
                }
                Line::Words(label, words) => out += &format!("{label:<12} {words}\n"),
            }
        }
    }
    if let (Some((l, r)), Some(b)) = (boundary_nodes(model), &model.boundary) {
        out += &format!("written      {}\n", b.written.trim());
        out += &format!("boundary     {} = {}\n", text::write(&l), text::write(&r));
    }
    out
}

/// The derivation as an amsmath `align*` block.
pub fn derivation_latex(model: &Model) -> String {
    let mut rows = Vec::new();
    for piece in &model.pieces {
        let lines = piece_lines(model, piece);
        let formulas: Vec<String> = lines
            .iter()
            .filter_map(|line| match line {
                Line::Formula(label, l, r) => Some(format!(
                    "  {} &= {} && \\text{{{label}}}",
                    latex::write(l),
                    latex::write(r)
                )),
                Line::Words(..) => None,
            })
            .collect();
        let mut block = formulas;
        if model.is_piecewise() {
            if let Some(last) = block.last_mut() {
                *last += &format!("\\text{{ for }} {}", range_latex(model, piece));
            }
        }
        rows.extend(block);
    }
    if let Some((l, r)) = boundary_nodes(model) {
        rows.push(format!(
            "  {} &= {} && \\text{{boundary}}",
            latex::write(&l),
            latex::write(&r)
        ));
    }
    if rows.is_empty() {
        return String::new();
    }
    format!(
        "\\begin{{align*}}\n{}\n\\end{{align*}}\n",
        rows.join(" \\\\\n")
    )
}

/// The JSON field `derivation`.
pub fn derivation_json(model: &Model) -> Value {
    let formula = |l: &Node, r: &Node| {
        json!({
            "text": format!("{} = {}", text::write(l), text::write(r)),
            "latex": format!("{} = {}", latex::write(l), latex::write(r)),
        })
    };
    let pieces: Vec<Value> = model
        .pieces
        .iter()
        .map(|piece| {
            let form = match &piece.derivation.source {
                RuleSource::Ratio => "ratio",
                RuleSource::Balance { .. } => "balance",
                RuleSource::BirthDeathBalance { .. } => "birth_death_balance",
                RuleSource::Rates { .. } => "rates",
            };
            let mut steps = Vec::new();
            for line in piece_lines(model, piece) {
                if let Line::Formula(label, l, r) = line {
                    let mut f = formula(&l, &r);
                    f["step"] = json!(label);
                    steps.push(f);
                }
            }
            json!({
                "form": form,
                "range": { "text": range_words(model, piece), "latex": range_latex(model, piece) },
                "written": piece.derivation.written.iter().map(|(w, _)| w.trim()).collect::<Vec<_>>(),
                "steps": steps,
                "ratio": formula(
                    &Node::frac(term(model, 0), term(model, -1)),
                    &to_node::ratio(&piece.ratio, &model.index),
                ),
                "assumptions": piece.derivation.assumptions.iter().map(|a| assumption_words(a, model)).collect::<Vec<_>>(),
            })
        })
        .collect();
    let boundary = match (boundary_nodes(model), &model.boundary) {
        (Some((l, r)), Some(b)) => json!({
            "index": b.index.to_string(),
            "written": b.written.trim(),
            "value": formula(&l, &r),
        }),
        _ => Value::Null,
    };
    json!({ "pieces": pieces, "boundary": boundary })
}

/// `telescope solve` for a piecewise model: the derivation, then each piece's solution, then
/// how the pieces join; the analysis of the whole model (total, moments, tail) follows it.
pub fn piecewise_text(model: &Model, solution: &ModelSolution) -> String {
    let mut out = derivation_text(model);
    for (i, piece) in solution.pieces.iter().enumerate() {
        out += &format!("\n── piece {} ──\n", i + 1);
        out += &solve_text(&piece.problem, &piece.solution);
        if let Some(last) = &piece.last_index {
            out += &format!("holds up to  {} = {last}\n", model.index);
        }
    }
    out += &format!("\n{}", joins_text(model, solution));
    out
}

fn joins_text(model: &Model, solution: &ModelSolution) -> String {
    let n = &model.sequence;
    let mut out = String::new();
    for (i, piece) in solution.pieces.iter().enumerate().skip(1) {
        out += &format!(
            "joined       piece {} starts from {n}({}), the last value of piece {}\n",
            i + 1,
            piece.problem.base_index(),
            i
        );
    }
    match &solution.tail_piece().last_index {
        Some(last) => {
            out += &format!(
                "support      ends at {} = {last}: a finite state space\n",
                model.index
            )
        }
        None => {
            out += &format!(
                "tail         the large-{} behaviour is that of piece {}\n",
                model.index,
                solution.pieces.len()
            )
        }
    }
    out
}

/// LaTeX for a piecewise model: the derivation and one block per piece.
pub fn piecewise_latex(model: &Model, solution: &ModelSolution) -> String {
    let mut out = derivation_latex(model);
    for piece in &solution.pieces {
        out += &solve_latex(&piece.problem, &piece.solution);
    }
    out
}

/// JSON for a piecewise model: `derivation`, `pieces` (each the single-rule object plus its
/// `last_index`), `breakpoints`, `last_index` (the end of a finite state space, else null);
/// the analysis fields (`normalization`, `mean`, `variance`, `tail`, …) are added beside them.
pub fn piecewise_json(model: &Model, solution: &ModelSolution) -> Value {
    let pieces: Vec<Value> = solution
        .pieces
        .iter()
        .map(|p| {
            let mut v = solve_json(&p.problem, &p.solution);
            v["last_index"] = match &p.last_index {
                Some(l) => json!(l.to_string()),
                None => Value::Null,
            };
            v
        })
        .collect();
    json!({
        "sequence": model.sequence,
        "index": model.index,
        "base_index": solution.base_index().to_string(),
        "derivation": derivation_json(model),
        "pieces": pieces,
        "breakpoints": solution.breakpoints().iter().map(|b| b.to_string()).collect::<Vec<_>>(),
        "last_index": solution.tail_piece().last_index.as_ref().map(|l| l.to_string()),
    })
}
