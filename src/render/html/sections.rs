//! Sections 1–5 and 9: the model, the rule, the closed form, the support, the conditions, and
//! the commands that reproduce the page.

use crate::model::Problem;
use crate::piecewise::SolvedPiece;
use crate::solve::{Condition, Solution, Status, SupportEnd};

use super::super::escape::escape_text;
use super::super::mathml::Math;
use super::super::model_output::{boundary_nodes, piece_lines, range_words, Line};
use super::super::node::Node;
use super::super::solve_output::{
    closed_nodes, condition_shape, param_range_text, raw_nodes, rule_nodes, split_conditions,
    status_parts, ConditionShape,
};
use super::super::to_node;
use super::ReportPage;

/// `lhs = rhs` as a displayed formula.
pub(crate) fn equation(lhs: &Node, rhs: &Node) -> String {
    Math::node(lhs).op("=", "=", Math::node(rhs)).element(true)
}

/// A heading for each piece of a piecewise model (nothing for a single rule).
fn piece_heading(page: &ReportPage, i: usize) -> String {
    if !page.model.is_piecewise() {
        return String::new();
    }
    let piece = &page.model.pieces[i];
    format!(
        "<h3>Piece {}: {}</h3>\n",
        i + 1,
        escape_text(&range_words(&page.model, piece))
    )
}

pub(super) fn model(page: &ReportPage) -> String {
    let model = &page.model;
    let mut out = format!(
        "<p>As written ({}):</p>\n<pre class=\"source\">{}</pre>\n",
        escape_text(&page.input.name),
        escape_text(page.input.text.trim_end())
    );
    let mut derived = false;
    for (i, piece) in model.pieces.iter().enumerate() {
        let lines = piece_lines(model, piece);
        if lines.is_empty() {
            continue;
        }
        derived = true;
        out += &piece_heading(page, i);
        for line in lines {
            match line {
                Line::Formula(label, lhs, rhs) => {
                    out += &format!("<p class=\"formula-label\">{}</p>\n", escape_text(label));
                    out += &equation(&lhs, &rhs);
                    out += "\n";
                }
                Line::Words(label, words) => {
                    out += &format!(
                        "<p><em>{}</em>: {}</p>\n",
                        escape_text(label),
                        escape_text(&words)
                    );
                }
            }
        }
    }
    if let (Some((lhs, rhs)), Some(boundary)) = (boundary_nodes(model), &model.boundary) {
        derived = true;
        out += &format!(
            "<p class=\"formula-label\">boundary, from <code>{}</code></p>\n",
            escape_text(boundary.written.trim())
        );
        out += &equation(&lhs, &rhs);
        out += "\n";
    }
    if !derived {
        out += "<p>The rule is given directly as a ratio; nothing had to be derived.</p>\n";
    }
    if model.is_piecewise() {
        out += &format!(
            "<p>{} pieces on consecutive ranges; each is solved from the previous piece's last value.</p>\n",
            model.pieces.len()
        );
    }
    out
}

fn params_line(problem: &Problem, solution: &Solution) -> String {
    if problem.params.is_empty() {
        return String::new();
    }
    let list: Vec<String> = problem
        .params
        .iter()
        .map(|p| {
            let name = super::super::text::write(&Node::sym(&p.name));
            let value = solution
                .values
                .get(&p.name)
                .map(|v| format!(" = {v}"))
                .unwrap_or_default();
            match param_range_text(p) {
                Some(r) => format!("{name}{value} (declared {r})"),
                None => format!("{name}{value}"),
            }
        })
        .collect();
    format!("<p>Parameters: {}.</p>\n", escape_text(&list.join("; ")))
}

fn pieces(page: &ReportPage) -> impl Iterator<Item = (usize, &SolvedPiece)> {
    page.solved.pieces.iter().enumerate()
}

pub(super) fn rule(page: &ReportPage) -> String {
    let mut out = String::new();
    for (i, piece) in pieces(page) {
        let problem = &piece.problem;
        out += &piece_heading(page, i);
        let (lhs, rhs) = rule_nodes(problem);
        let first = Math::node(&Node::sym(&problem.index)).op(
            "≥",
            "\\ge",
            Math::node(&Node::Int(problem.first_index.clone())),
        );
        out += &Math::node(&lhs)
            .op("=", "=", Math::node(&rhs))
            .then(Math::raw("<mspace width=\"2em\"/>", "\\qquad"))
            .then(first)
            .element(true);
        out += "\n";
        let base = Node::Term(
            piece.solution.sequence.clone(),
            Box::new(Node::Int(piece.solution.base_index.clone())),
        );
        out += &format!(
            "<p>Base term {}; the factor normal form writes every factor <i>p·k + q</i> as <i>p·(k + q/p)</i>.</p>\n",
            Math::node(&base).element(false)
        );
        out += &params_line(problem, &piece.solution);
    }
    out
}

pub(super) fn closed_form(page: &ReportPage) -> String {
    let mut out = String::new();
    for (i, piece) in pieces(page) {
        let (solution, index) = (&piece.solution, &piece.problem.index);
        out += &piece_heading(page, i);
        let (lhs, rhs) = closed_nodes(solution, index);
        out += "<p class=\"formula-label\">simplest form</p>\n";
        out += &equation(&lhs, &rhs);
        out += "\n";
        let (lhs, raw) = raw_nodes(solution, index);
        if solution.simplest != solution.closed_form {
            out += "<p class=\"formula-label\">telescoped Gamma quotient it was derived from</p>\n";
            out += &equation(&lhs, &raw);
            out += "\n";
        } else {
            out += "<p>The telescoped product is already the simplest form.</p>\n";
        }
        if !solution.steps.is_empty() {
            out += "<ol class=\"steps\">\n";
            for step in &solution.steps {
                let form = to_node::closed_form_rhs(&step.form, index);
                out += &format!(
                    "<li>{} <span class=\"meta\">({}, {})</span>{}</li>\n",
                    escape_text(step.rule.title),
                    escape_text(step.rule.name),
                    escape_text(step.rule.source),
                    equation(&to_node::sequence_at(&solution.sequence, index), &form)
                );
            }
            out += "</ol>\n";
        }
    }
    out
}

/// The support as a formula, with words when its end is conditional.
fn support_math(solution: &Solution, index: &str) -> (Math, Option<String>) {
    let k = Math::node(&Node::sym(index));
    let first = Math::node(&Node::Int(solution.support.first.clone()));
    match &solution.support.last {
        SupportEnd::Infinite => (k.op("≥", "\\ge", first), None),
        SupportEnd::At(last) => (
            first
                .op("≤", "\\le", k)
                .op("≤", "\\le", Math::node(&Node::Int(last.clone()))),
            Some(format!("a({index}) = 0 beyond")),
        ),
        SupportEnd::Symbolic { last, certain } => {
            let end = Math::node(&to_node::ratfunc(last));
            let words = (!certain).then(|| {
                format!(
                    "when the end is an integer ≥ {}; otherwise {index} ≥ {}",
                    solution.support.first, solution.support.first
                )
            });
            (first.op("≤", "\\le", k).op("≤", "\\le", end), words)
        }
    }
}

pub(super) fn support(page: &ReportPage) -> String {
    if !page.model.is_piecewise() {
        let piece = &page.solved.pieces[0];
        let (math, words) = support_math(&piece.solution, &piece.problem.index);
        let mut out = math.element(true) + "\n";
        if let Some(words) = words {
            out += &format!("<p>{}</p>\n", escape_text(&words));
        }
        return out;
    }
    // A piecewise model: the pieces' ranges, and the support they make together (the last
    // piece may end where the model says, or where its own rule vanishes).
    let index = &page.model.index;
    let k = || Math::node(&Node::sym(index));
    let int = |n: &num_bigint::BigInt| Math::node(&Node::Int(n.clone()));
    let mut out = String::from("<ul class=\"pieces\">\n");
    for (i, piece) in pieces(page) {
        let range = match &piece.last_index {
            Some(last) => {
                int(&piece.problem.first_index)
                    .op("≤", "\\le", k())
                    .op("≤", "\\le", int(last))
            }
            None => k().op("≥", "\\ge", int(&piece.problem.first_index)),
        };
        let (own, _) = support_math(&piece.solution, index);
        out += &format!(
            "<li>piece {}: {}; its rule's product is non-zero for {}</li>\n",
            i + 1,
            range.element(false),
            own.element(false)
        );
    }
    out += "</ul>\n";
    let first = page.solved.base_index();
    let last_piece = page.solved.tail_piece();
    let end = match (&last_piece.last_index, &last_piece.solution.support.last) {
        (Some(last), _) => Some(last.clone()),
        (None, SupportEnd::At(last)) => Some(last.clone()),
        _ => None,
    };
    let whole = match end {
        Some(last) => int(&first).op("≤", "\\le", k()).op("≤", "\\le", int(&last)),
        None => k().op("≥", "\\ge", int(&first)),
    };
    out += "<p>The support of the whole model, from the first piece's base term:</p>\n";
    out + &whole.element(true) + "\n"
}

pub(crate) fn condition_math(c: &Condition) -> Math {
    match condition_shape(c) {
        ConditionShape::NotEqual(n, v) => Math::node(&n).op("≠", "\\neq", Math::node(&v)),
        ConditionShape::NotIn(n, first, next) => {
            let set = Math::raw(
                format!(
                    "<mo>{{</mo>{}<mo>,</mo>{}<mo>,</mo><mo>…</mo><mo>}}</mo>",
                    Math::node(&first).mathml(),
                    Math::node(&next).mathml()
                ),
                format!(
                    "\\{{{}, {}, \\dots\\}}",
                    Math::node(&first).latex(),
                    Math::node(&next).latex()
                ),
            );
            Math::node(&n).op("∉", "\\notin", set)
        }
    }
}

fn condition_rows(problem: &Problem, conditions: &[&Condition]) -> String {
    let mut out = String::from(
        "<table class=\"conditions\">\n<thead><tr><th>condition</th><th>why</th><th>status</th></tr></thead>\n<tbody>\n",
    );
    for c in conditions {
        let (word, why) = status_parts(problem, &c.status);
        let status = match (&c.status, why) {
            (Status::Holds(r) | Status::Fails(r), _) if !r.is_empty() => {
                format!("{word}: {}", crate::render::reason::html(r))
            }
            (Status::NotDecided(note), _) => escape_text(&format!("{word}: {note}")),
            (_, Some((w, _))) if !w.is_empty() => escape_text(&format!("{word}: {w}")),
            _ => word.to_string(),
        };
        let region = c
            .holds_for
            .as_ref()
            .map(|split| {
                format!(
                    "; {}",
                    super::analysis::region_html(&crate::analysis::Region::Intervals(
                        split.clone()
                    ))
                )
            })
            .unwrap_or_default();
        out += &format!(
            "<tr><td>{}</td><td>{}</td><td class=\"status-{word}\">{}{region}</td></tr>\n",
            condition_math(c).element(false),
            escape_text(&c.reason),
            status
        );
    }
    out + "</tbody>\n</table>\n"
}

pub(super) fn conditions(page: &ReportPage) -> String {
    let mut out = String::new();
    for (i, piece) in pieces(page) {
        out += &piece_heading(page, i);
        let (open, settled) = split_conditions(&piece.solution);
        if open.is_empty() {
            out += "<p>None: the closed form holds wherever the rule does.</p>\n";
        } else {
            out += "<p>Open — the closed form holds when these hold:</p>\n";
            out += &condition_rows(&piece.problem, &open);
        }
        if !settled.is_empty() {
            out += "<p>Settled by the declared ranges (no longer conditions):</p>\n";
            out += &condition_rows(&piece.problem, &settled);
        }
    }
    out
}

pub(super) fn reproduce(page: &ReportPage) -> String {
    let mut out = String::from("<p>These commands reproduce this page, its numbers and its table:</p>\n<pre class=\"commands\">");
    for command in &page.commands {
        out += &escape_text(command);
        out += "\n";
    }
    out += "</pre>\n";
    if page.input.name == "<stdin>" {
        out += "<p>The model was read from standard input; pipe the same text into these commands (INPUT <code>-</code>).</p>\n";
    }
    out
}
