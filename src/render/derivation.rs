//! The derivation, step by step: the rule, the telescoped product written out, the Gamma
//! form, every rewrite with its source, the final form and the conditions in words. Text gets
//! Unicode lines; LaTeX gets one `align*` (amsmath) with `\intertext` for the words, and an
//! optional complete document around it.

use crate::model::Problem;
use crate::solve::Solution;

use super::node::Node;
use super::solve_output::{
    closed_nodes, condition_strings, conditions_latex, raw_nodes, rule_nodes, split_conditions,
    support_latex, support_text,
};
use super::{latex, text, to_node};

/// The product's running index: a letter that is not already in use.
fn dummy_index(problem: &Problem) -> &'static str {
    ["j", "i", "m", "l", "r", "s"]
        .into_iter()
        .find(|c| *c != problem.index && *c != problem.sequence && problem.param(c).is_none())
        .unwrap_or("j")
}

/// `a(b) · ∏_{j=b+1}^{k} R(j)` as (text, LaTeX).
fn telescoped_product(problem: &Problem, solution: &Solution) -> (String, String) {
    let j = dummy_index(problem);
    let factor = to_node::ratio(&problem.ratio, j);
    let base = Node::Term(
        solution.sequence.clone(),
        Box::new(Node::Int(solution.base_index.clone())),
    );
    let first = &problem.first_index;
    let index = &problem.index;
    let factor_text = match factor {
        Node::Sum(_) | Node::Frac(..) | Node::Product(_) | Node::Neg(_) => {
            format!("({})", text::write(&factor))
        }
        _ => text::write(&factor),
    };
    (
        format!(
            "{}·∏_{{{j}={first}}}^{{{index}}} {factor_text}",
            text::write(&base)
        ),
        format!(
            "{} \\prod_{{{j}={first}}}^{{{index}}} {}",
            latex::write(&base),
            latex::write(&factor)
        ),
    )
}

/// The conditions in words, for the text derivation.
fn conditions_text(problem: &Problem, solution: &Solution) -> String {
    let (open, settled) = split_conditions(solution);
    let mut out = format!("for {}", support_text(solution, &problem.index));
    let list = |items: &[&crate::solve::Condition]| -> String {
        items
            .iter()
            .map(|c| condition_strings(c).0)
            .collect::<Vec<_>>()
            .join(", ")
    };
    if open.is_empty() {
        out += ", with no further condition on the parameters";
    } else {
        out += &format!(", provided {}", list(&open));
    }
    if !settled.is_empty() {
        out += &format!(
            "; {} {} on the declared ranges and {} dropped",
            list(&settled),
            if settled.len() == 1 { "holds" } else { "hold" },
            if settled.len() == 1 { "is" } else { "are" }
        );
    }
    out
}

const TELESCOPING: &str = "each linear factor's product as a Gamma quotient (DLMF 5.2.5)";

/// The derivation as indented Unicode lines (a description, then the formula).
pub fn text(problem: &Problem, solution: &Solution) -> String {
    let index = &problem.index;
    let (lhs, rhs) = rule_nodes(problem);
    let (cl, cr) = closed_nodes(solution, index);
    let (_, rr) = raw_nodes(solution, index);
    let a_k = text::write(&cl);
    let mut out = String::new();
    let mut entry = |what: &str, formula: String| {
        out += &format!("  {what}\n      {formula}\n");
    };
    entry(
        "the rule",
        format!(
            "{} = {},  {index} ≥ {}",
            text::write(&lhs),
            text::write(&rhs),
            problem.first_index
        ),
    );
    let (product, _) = telescoped_product(problem, solution);
    entry(
        "telescoping down to the base term",
        format!("{a_k} = {product}"),
    );
    entry(TELESCOPING, format!("{a_k} = {}", text::write(&rr)));
    for step in &solution.steps {
        let r = to_node::closed_form_rhs(&step.form, index);
        entry(
            &format!("{} ({})", step.rule.title, step.rule.source),
            format!("{a_k} = {}", text::write(&r)),
        );
    }
    entry(
        &format!("the simplest form, {}", conditions_text(problem, solution)),
        format!("{a_k} = {}", text::write(&cr)),
    );
    out
}

/// The derivation as one `align*` block.
pub fn latex(problem: &Problem, solution: &Solution) -> String {
    let index = &problem.index;
    let (lhs, rhs) = rule_nodes(problem);
    let (cl, cr) = closed_nodes(solution, index);
    let (_, rr) = raw_nodes(solution, index);
    let a_k = latex::write(&cl);
    let (_, product) = telescoped_product(problem, solution);
    let mut rows: Vec<String> = Vec::new();
    rows.push(format!(
        "  {} &= {}, \\qquad {index} \\ge {}",
        latex::write(&lhs),
        latex::write(&rhs),
        problem.first_index
    ));
    rows.push("  \\intertext{Telescoping down to the base term,}".to_string());
    rows.push(format!("  {a_k} &= {product}"));
    rows.push(format!("  \\intertext{{and writing {TELESCOPING}:}}"));
    rows.push(format!("  {a_k} &= {}", latex::write(&rr)));
    for step in &solution.steps {
        let r = to_node::closed_form_rhs(&step.form, index);
        rows.push(format!(
            "  \\intertext{{{} ({}):}}",
            sentence_case(step.rule.title),
            step.rule.source
        ));
        rows.push(format!("  &= {}", latex::write(&r)));
    }
    rows.push(format!(
        "  \\intertext{{{} Hence}}",
        conditions_latex(problem, solution)
    ));
    rows.push(format!(
        "  {a_k} &= {}, \\qquad {}",
        latex::write(&cr),
        support_latex(solution, index)
    ));
    // `\intertext` must follow a `\\`; it ends no row itself.
    let mut out = String::from("\\begin{align*}\n");
    for (i, row) in rows.iter().enumerate() {
        out += row;
        if i + 1 < rows.len() && !row.trim_start().starts_with("\\intertext") {
            out += " \\\\";
        }
        out += "\n";
    }
    out += "\\end{align*}\n";
    out
}

/// The title with a capital first letter, to open a sentence.
fn sentence_case(s: &str) -> String {
    let mut chars = s.chars();
    match chars.next() {
        Some(c) => c.to_uppercase().chain(chars).collect(),
        None => String::new(),
    }
}

/// A complete document around `body` that compiles with pdflatex and amsmath alone.
pub fn standalone(problem: &Problem, body: &str) -> String {
    let sequence = latex::write(&to_node::sequence_at(&problem.sequence, &problem.index));
    format!(
        "\\documentclass{{article}}\n\\usepackage{{amsmath}}\n\\begin{{document}}\n\\section*{{The closed form of ${sequence}$}}\n{body}\\end{{document}}\n"
    )
}
