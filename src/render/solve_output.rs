//! `telescope solve` in text, LaTeX and JSON.

use num_bigint::BigInt;
use serde_json::{json, Value};

use crate::model::{Param, Problem};
use crate::solve::{Condition, ConditionKind, Solution, Status, SupportEnd};

use super::node::Node;
use super::{formula, latex, text, to_node};

/// `a(k)/a(k−1) = R(k)` as one node pair.
fn rule_nodes(problem: &Problem) -> (Node, Node) {
    let lhs = Node::frac(
        to_node::sequence_at(&problem.sequence, &problem.index),
        to_node::sequence_before(&problem.sequence, &problem.index),
    );
    (lhs, to_node::ratio(&problem.ratio, &problem.index))
}

fn closed_nodes(solution: &Solution, index: &str) -> (Node, Node) {
    (
        to_node::sequence_at(&solution.sequence, index),
        to_node::closed_form_rhs(&solution.closed_form, index),
    )
}

/// Condition as (text, latex).
pub fn condition_strings(c: &Condition) -> (String, String) {
    match &c.kind {
        ConditionKind::NonZero(e) => {
            let n = to_node::ratfunc(e);
            (
                format!("{} ≠ 0", text::write(&n)),
                format!("{} \\neq 0", latex::write(&n)),
            )
        }
        ConditionKind::NotEqual { param, value } => {
            let p = Node::sym(param);
            let v = to_node::rational(value);
            (
                format!("{} ≠ {}", text::write(&p), text::write(&v)),
                format!("{} \\neq {}", latex::write(&p), latex::write(&v)),
            )
        }
        ConditionKind::NotIntegerAtLeast { expr, min } => {
            let n = to_node::ratfunc(expr);
            let next: BigInt = min + 1;
            (
                format!("{} ∉ {{{min}, {next}, …}}", text::write(&n)),
                format!("{} \\notin \\{{{min}, {next}, \\dots\\}}", latex::write(&n)),
            )
        }
    }
}

fn status_word(s: &Status) -> (&'static str, Option<&str>) {
    match s {
        Status::Undecided => ("undecided", None),
        Status::Holds(why) => ("holds", Some(why.as_str())),
        Status::Fails(why) => ("fails", Some(why.as_str())),
    }
}

fn support_text(solution: &Solution, index: &str) -> String {
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

fn support_latex(solution: &Solution, index: &str) -> String {
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

fn param_range_text(p: &Param) -> Option<String> {
    let name = text::write(&Node::sym(&p.name));
    let lo = p
        .lower
        .as_ref()
        .map(|(q, closed)| (q.to_string(), if *closed { "≤" } else { "<" }));
    let hi = p
        .upper
        .as_ref()
        .map(|(q, closed)| (q.to_string(), if *closed { "≤" } else { "<" }));
    let range = match (lo, hi) {
        (Some((l, a)), Some((h, b))) => Some(format!("{l} {a} {name} {b} {h}")),
        (Some((l, a)), None) => Some(format!("{l} {a} {name}")),
        (None, Some((h, b))) => Some(format!("{name} {b} {h}")),
        (None, None) => None,
    };
    match (range, p.integer) {
        (Some(r), true) => Some(format!("{r}, integer")),
        (Some(r), false) => Some(r),
        (None, true) => Some(format!("{name} integer")),
        (None, false) => None,
    }
}

/// Human-readable report.
pub fn solve_text(problem: &Problem, solution: &Solution) -> String {
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
    out += &format!("support      {}\n", support_text(solution, index));
    if solution.conditions.is_empty() {
        out += "conditions   none\n";
    } else {
        out += "conditions\n";
        for c in &solution.conditions {
            let (t, _) = condition_strings(c);
            let (word, why) = status_word(&c.status);
            let status = match why {
                Some(w) if !w.is_empty() => format!("{word}: {w}"),
                _ => word.to_string(),
            };
            out += &format!("  {t}   ({}; {status})\n", c.reason);
        }
    }
    out
}

/// A LaTeX fragment (amsmath): the rule, the closed form and the conditions.
pub fn solve_latex(problem: &Problem, solution: &Solution) -> String {
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
    if !solution.conditions.is_empty() {
        let list: Vec<String> = solution
            .conditions
            .iter()
            .map(|c| format!("${}$", condition_strings(c).1))
            .collect();
        out += &format!("valid for {}.\n", list.join(", "));
    }
    out
}

/// The stable JSON interface (documented in the README).
pub fn solve_json(problem: &Problem, solution: &Solution) -> Value {
    let index = &problem.index;
    let (lhs, rhs) = rule_nodes(problem);
    let (cl, cr) = closed_nodes(solution, index);
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
        "support": {
            "first": solution.support.first.to_string(),
            "last": last,
            "last_is_conditional": matches!(solution.support.last, SupportEnd::Symbolic { certain: false, .. }),
            "text": support_text(solution, index),
            "latex": support_latex(solution, index),
        },
        "conditions": solution.conditions.iter().map(|c| {
            let (t, l) = condition_strings(c);
            let (word, why) = status_word(&c.status);
            json!({ "text": t, "latex": l, "reason": c.reason, "status": word, "settled_by": why })
        }).collect::<Vec<_>>(),
    })
}
