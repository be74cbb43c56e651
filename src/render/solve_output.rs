//! `telescope solve` in text, LaTeX and JSON.

use num_bigint::BigInt;
use serde_json::{json, Value};

use crate::algebra::Q;
use crate::model::{Param, Problem};
use crate::solve::{Condition, ConditionKind, Solution, Status, SupportEnd};

use super::node::Node;
use super::region::{region_json, region_latex, region_text};
use super::{derivation, formula, latex, reason, text, to_node};
use crate::analysis::Region;

/// `a(k)/a(k−1) = R(k)` as one node pair.
pub(crate) fn rule_nodes(problem: &Problem) -> (Node, Node) {
    let lhs = Node::frac(
        to_node::sequence_at(&problem.sequence, &problem.index),
        to_node::sequence_before(&problem.sequence, &problem.index),
    );
    (lhs, to_node::ratio(&problem.ratio, &problem.index))
}

/// `a(k) = …` for the simplest form.
pub(crate) fn closed_nodes(solution: &Solution, index: &str) -> (Node, Node) {
    (
        to_node::sequence_at(&solution.sequence, index),
        to_node::closed_form_rhs(&solution.simplest, index),
    )
}

/// `a(k) = …` for the telescoped Gamma quotient.
pub(crate) fn raw_nodes(solution: &Solution, index: &str) -> (Node, Node) {
    (
        to_node::sequence_at(&solution.sequence, index),
        to_node::closed_form_rhs(&solution.closed_form, index),
    )
}

/// A condition's layout: the quantity and what it must avoid.
pub(crate) enum ConditionShape {
    /// `x ≠ 0`, or a parameter `≠` a value.
    NotEqual(Node, Node),
    /// `x ∉ {first, next, …}`
    NotIn(Node, Node, Node),
}

pub(crate) fn condition_shape(c: &Condition) -> ConditionShape {
    match &c.kind {
        ConditionKind::NonZero(e) => ConditionShape::NotEqual(to_node::ratfunc(e), Node::int(0)),
        ConditionKind::NotEqual { param, value } => {
            ConditionShape::NotEqual(Node::sym(param), to_node::rational(value))
        }
        ConditionKind::NotIntegerAtLeast { expr, min } => {
            // −α − 1 ∉ {0, 1, …} reads better as α + 1 ∉ {0, −1, …}: write whichever of
            // ±expr shows fewer minus signs.
            let n = to_node::ratfunc(expr);
            let flipped = to_node::ratfunc(&-expr.clone());
            let minus_signs = |node: &Node| text::write(node).matches('−').count();
            // On a tie the flipped form wins: it names the quantity that must avoid the poles
            // (1/(1 − ρ) ∉ {−2, −3, …}).
            let (n, first, next) = if minus_signs(&flipped) <= minus_signs(&n) {
                let first: BigInt = -min.clone();
                let next: BigInt = -(min + BigInt::from(1));
                (flipped, first, next)
            } else {
                (n, min.clone(), min + 1)
            };
            ConditionShape::NotIn(
                n,
                to_node::rational(&Q::from_integer(first)),
                to_node::rational(&Q::from_integer(next)),
            )
        }
    }
}

/// Condition as (text, latex).
pub fn condition_strings(c: &Condition) -> (String, String) {
    match condition_shape(c) {
        ConditionShape::NotEqual(n, v) => (
            format!("{} ≠ {}", text::write(&n), text::write(&v)),
            format!("{} \\neq {}", latex::write(&n), latex::write(&v)),
        ),
        ConditionShape::NotIn(n, first, next) => (
            format!(
                "{} ∉ {{{}, {}, …}}",
                text::write(&n),
                text::write(&first),
                text::write(&next)
            ),
            format!(
                "{} \\notin \\{{{}, {}, \\dots\\}}",
                latex::write(&n),
                latex::write(&first),
                latex::write(&next)
            ),
        ),
    }
}

/// The status in one word and what settled it, in text and in LaTeX.
pub(crate) fn status_parts(
    problem: &Problem,
    s: &Status,
) -> (&'static str, Option<(String, String)>) {
    match s {
        Status::Undecided | Status::NotDecided(_) => ("undecided", None),
        Status::Holds(why) => ("holds", Some((reason::text(why), reason::latex(why)))),
        Status::Fails(why) => ("fails", Some((reason::text(why), reason::latex(why)))),
        Status::SettledByRange(names) => {
            let ranges: Vec<(String, String)> = names
                .iter()
                .filter_map(|n| problem.param(n))
                .filter_map(|p| Some((param_range_text(p)?, param_range_latex(p)?)))
                .collect();
            let text: Vec<&str> = ranges.iter().map(|r| r.0.as_str()).collect();
            let latex: Vec<String> = ranges.iter().map(|r| format!("${}$", r.1)).collect();
            let word = if ranges.len() > 1 { "ranges" } else { "range" };
            (
                "holds",
                Some((
                    format!("the {word} {}", text.join(", ")),
                    format!("the {word} {}", latex.join(", ")),
                )),
            )
        }
    }
}

/// Conditions split into those still to check and those the declared ranges settle.
pub(crate) fn split_conditions(solution: &Solution) -> (Vec<&Condition>, Vec<&Condition>) {
    solution
        .conditions
        .iter()
        .partition(|c| !matches!(c.status, Status::SettledByRange(_)))
}

/// One condition as a text line: formula, reason, status.
fn condition_line(problem: &Problem, c: &Condition) -> String {
    let (t, _) = condition_strings(c);
    let (word, why) = status_parts(problem, &c.status);
    let mut status = match why {
        Some((w, _)) if !w.is_empty() => format!("{word}: {w}"),
        _ => word.to_string(),
    };
    if let Status::NotDecided(note) = &c.status {
        status = format!("{status}: {note}");
    }
    if let Some(split) = &c.holds_for {
        status += &format!(
            "; {}",
            region_text(&Region::Intervals(split.clone()), "holds", "fails")
        );
    }
    format!("  {t}   ({}; {status})\n", c.reason)
}

pub(crate) fn support_text(solution: &Solution, index: &str) -> String {
    let first = &solution.support.first;
    match &solution.support.last {
        SupportEnd::Infinite => format!("{index} ≥ {first}"),
        SupportEnd::At(last) => format!("{first} ≤ {index} ≤ {last} (a({index}) = 0 beyond)"),
        SupportEnd::Symbolic { last, certain } => {
            let l = text::write(&to_node::ratfunc(last));
            if *certain {
                format!("{first} ≤ {index} ≤ {l}")
            } else {
                format!("{first} ≤ {index} ≤ {l} when {l} is an integer ≥ {}, otherwise {index} ≥ {first}", first)
            }
        }
    }
}

pub(crate) fn support_latex(solution: &Solution, index: &str) -> String {
    let first = &solution.support.first;
    match &solution.support.last {
        SupportEnd::Infinite => format!("{index} \\ge {first}"),
        SupportEnd::At(last) => format!("{first} \\le {index} \\le {last}"),
        SupportEnd::Symbolic { last, .. } => {
            format!(
                "{first} \\le {index} \\le {}",
                latex::write(&to_node::ratfunc(last))
            )
        }
    }
}

fn param_range(p: &Param, latex_out: bool) -> Option<String> {
    let name = if latex_out {
        latex::write(&Node::sym(&p.name))
    } else {
        text::write(&Node::sym(&p.name))
    };
    let sign = |closed: bool| match (latex_out, closed) {
        (false, true) => "≤",
        (false, false) => "<",
        (true, true) => "\\le",
        (true, false) => "<",
    };
    let number = |q: &Q| {
        let n = to_node::rational(q);
        if latex_out {
            latex::write(&n)
        } else {
            q.to_string()
        }
    };
    let lo = p
        .lower
        .as_ref()
        .map(|(q, closed)| (number(q), sign(*closed)));
    let hi = p
        .upper
        .as_ref()
        .map(|(q, closed)| (number(q), sign(*closed)));
    let range = match (lo, hi) {
        (Some((l, a)), Some((h, b))) => Some(format!("{l} {a} {name} {b} {h}")),
        (Some((l, a)), None) => Some(format!("{l} {a} {name}")),
        (None, Some((h, b))) => Some(format!("{name} {b} {h}")),
        (None, None) => None,
    };
    let integer = if latex_out {
        "\\text{ integer}"
    } else {
        " integer"
    };
    match (range, p.integer) {
        (Some(r), true) => Some(format!("{r},{integer}")),
        (Some(r), false) => Some(r),
        (None, true) => Some(format!("{name}{integer}")),
        (None, false) => None,
    }
}

pub(crate) fn param_range_text(p: &Param) -> Option<String> {
    param_range(p, false)
}

pub(crate) fn param_range_latex(p: &Param) -> Option<String> {
    param_range(p, true)
}

/// What `solve` prints beyond the result: the derivation, a complete LaTeX document.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct SolveLayout {
    /// Add the derivation step by step.
    pub steps: bool,
    /// Wrap LaTeX output in a document that compiles with pdflatex and amsmath.
    pub standalone: bool,
}

/// Human-readable report.
pub fn solve_text(problem: &Problem, solution: &Solution) -> String {
    solve_text_with(problem, solution, SolveLayout::default())
}

/// Human-readable report, with the derivation when `layout.steps` is set.
pub fn solve_text_with(problem: &Problem, solution: &Solution, layout: SolveLayout) -> String {
    let index = &problem.index;
    let (lhs, rhs) = rule_nodes(problem);
    let (cl, cr) = closed_nodes(solution, index);
    let mut out = String::new();
    out += &format!(
        "rule         {} = {}   for {index} ≥ {}\n",
        text::write(&lhs),
        text::write(&rhs),
        problem.first_index
    );
    if !problem.params.is_empty() {
        let list: Vec<String> = problem
            .params
            .iter()
            .map(|p| {
                let name = text::write(&Node::sym(&p.name));
                let value = solution
                    .values
                    .get(&p.name)
                    .map(|v| format!(" = {v}"))
                    .unwrap_or_default();
                match param_range_text(p) {
                    Some(r) => format!("{name}{value} ({r})"),
                    None => format!("{name}{value}"),
                }
            })
            .collect();
        out += &format!("parameters   {}\n", list.join("; "));
    }
    out += &format!(
        "base term    {}\n",
        text::write(&Node::Term(
            solution.sequence.clone(),
            Box::new(Node::Int(solution.base_index.clone()))
        ))
    );
    out += &format!("closed form  {} = {}\n", text::write(&cl), text::write(&cr));
    if solution.simplest != solution.closed_form {
        let (rl, rr) = raw_nodes(solution, index);
        out += &format!("telescoped   {} = {}\n", text::write(&rl), text::write(&rr));
    }
    out += &format!("support      {}\n", support_text(solution, index));
    let (open, settled) = split_conditions(solution);
    if open.is_empty() {
        out += "conditions   none\n";
    } else {
        out += "conditions\n";
        for c in open {
            out += &condition_line(problem, c);
        }
    }
    if !settled.is_empty() {
        out += "settled by the declared ranges (no longer conditions)\n";
        for c in settled {
            out += &condition_line(problem, c);
        }
    }
    if layout.steps {
        out += "derivation\n";
        out += &derivation::text(problem, solution);
    }
    out
}

/// A LaTeX fragment (amsmath): the rule, the closed form and the conditions.
pub fn solve_latex(problem: &Problem, solution: &Solution) -> String {
    solve_latex_with(problem, solution, SolveLayout::default())
}

/// LaTeX: the short result, or with `layout.steps` the derivation as one `align*`; with
/// `layout.standalone` a complete document.
pub fn solve_latex_with(problem: &Problem, solution: &Solution, layout: SolveLayout) -> String {
    let body = if layout.steps {
        derivation::latex(problem, solution)
    } else {
        result_latex(problem, solution)
    };
    if layout.standalone {
        derivation::standalone(problem, &body)
    } else {
        body
    }
}

/// The conditions in words, as LaTeX running text (used after the short form and at the end
/// of the derivation).
pub(crate) fn conditions_latex(problem: &Problem, solution: &Solution) -> String {
    let (open, settled) = split_conditions(solution);
    let index = &problem.index;
    let math = |list: &[&Condition]| -> Vec<String> {
        list.iter()
            .map(|c| match &c.holds_for {
                Some(split) => format!(
                    "${}$ (that is, ${}$)",
                    condition_strings(c).1,
                    region_latex(&Region::Intervals(split.clone()))
                ),
                None => format!("${}$", condition_strings(c).1),
            })
            .collect()
    };
    let mut out = format!("This holds for ${}$", support_latex(solution, index));
    if open.is_empty() {
        out += " with no further condition on the parameters.";
    } else {
        out += &format!(" provided {}.", join_words(&math(&open)));
    }
    if !settled.is_empty() {
        let by: Vec<String> = settled
            .iter()
            .filter_map(|c| status_parts(problem, &c.status).1.map(|(_, l)| l))
            .collect();
        let mut by_unique: Vec<String> = Vec::new();
        for b in by {
            if !by_unique.contains(&b) {
                by_unique.push(b);
            }
        }
        let (subject, verb, pronoun) = if settled.len() == 1 {
            ("The condition", "holds", "it is")
        } else {
            ("The conditions", "hold", "they are")
        };
        out += &format!(
            " {subject} {} {verb} on {}, so {pronoun} dropped.",
            join_words(&math(&settled)),
            join_words(&by_unique)
        );
    }
    out
}

fn join_words(items: &[String]) -> String {
    match items.len() {
        0 => String::new(),
        1 => items[0].clone(),
        2 => format!("{} and {}", items[0], items[1]),
        n => format!("{}, and {}", items[..n - 1].join(", "), items[n - 1]),
    }
}

fn result_latex(problem: &Problem, solution: &Solution) -> String {
    let index = &problem.index;
    let (lhs, rhs) = rule_nodes(problem);
    let (cl, cr) = closed_nodes(solution, index);
    let mut out = String::from("\\begin{align*}\n");
    out += &format!(
        "  {} &= {} && {index} \\ge {} \\\\\n",
        latex::write(&lhs),
        latex::write(&rhs),
        problem.first_index
    );
    out += &format!(
        "  {} &= {} && {}\n",
        latex::write(&cl),
        latex::write(&cr),
        support_latex(solution, index)
    );
    out += "\\end{align*}\n";
    out += &conditions_latex(problem, solution);
    out += "\n";
    out
}

/// The stable JSON interface (documented in the README).
pub fn solve_json(problem: &Problem, solution: &Solution) -> Value {
    let index = &problem.index;
    let (lhs, rhs) = rule_nodes(problem);
    let (cl, cr) = closed_nodes(solution, index);
    let (rl, rr) = raw_nodes(solution, index);
    let equation = |l: &Node, r: &Node| {
        json!({
            "text": format!("{} = {}", text::write(l), text::write(r)),
            "latex": format!("{} = {}", latex::write(l), latex::write(r)),
        })
    };
    let last = match &solution.support.last {
        SupportEnd::Infinite => Value::Null,
        SupportEnd::At(n) => Value::String(n.to_string()),
        SupportEnd::Symbolic { last, .. } => Value::String(text::write(&to_node::ratfunc(last))),
    };
    json!({
        "sequence": solution.sequence,
        "index": index,
        "base_index": solution.base_index.to_string(),
        "first_index": problem.first_index.to_string(),
        "params": problem.params.iter().map(|p| json!({
            "name": p.name,
            "integer": p.integer,
            "range": param_range_text(p),
            "value": solution.values.get(&p.name).map(|v| v.to_string()),
        })).collect::<Vec<_>>(),
        "ratio": formula(&rhs),
        "rule": equation(&lhs, &rhs),
        "closed_form": equation(&cl, &cr),
        "closed_form_raw": equation(&rl, &rr),
        "steps": solution.steps.iter().map(|step| {
            let r = to_node::closed_form_rhs(&step.form, index);
            json!({
                "rule": step.rule.name,
                "title": step.rule.title,
                "source": step.rule.source,
                "text": format!("{} = {}", text::write(&cl), text::write(&r)),
                "latex": format!("{} = {}", latex::write(&cl), latex::write(&r)),
            })
        }).collect::<Vec<_>>(),
        "support": {
            "first": solution.support.first.to_string(),
            "last": last,
            "last_is_conditional": matches!(solution.support.last, SupportEnd::Symbolic { certain: false, .. }),
            "text": support_text(solution, index),
            "latex": support_latex(solution, index),
        },
        "conditions": solution.conditions.iter().map(|c| {
            let (t, l) = condition_strings(c);
            let (word, why) = status_parts(problem, &c.status);
            let by_ranges = match &c.status {
                Status::SettledByRange(names) => names.clone(),
                _ => Vec::new(),
            };
            let note = match &c.status {
                Status::NotDecided(note) => Some(note.clone()),
                _ => None,
            };
            json!({
                "text": t,
                "latex": l,
                "reason": c.reason,
                "status": word,
                "settled_by": why.map(|(text, _)| text),
                "settled_by_ranges": by_ranges,
                "note": note,
                "holds_for": region_json(c.holds_for.clone().map(Region::Intervals).as_ref()),
            })
        }).collect::<Vec<_>>(),
    })
}
