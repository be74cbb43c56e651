//! `telescope report`: one self-contained HTML5 page — inline CSS (with a print style), formulas
//! as Presentation MathML with their LaTeX as annotations, plots as inline SVG, no script and
//! nothing fetched from anywhere. Layout only: `html_report` computes everything shown.
//!
//! Sections: 1 the model and how the rule was derived; 2 the rule in factor normal form;
//! 3 the closed form and the telescoped form it came from; 4 support; 5 conditions; 6 the tail
//! law; 7 total, mean and variance; 8 the evidence (plots and table); 9 the commands that
//! reproduce the page.

mod analysis;
mod evidence;
mod sections;
mod style;

use crate::analysis::Analysis;
use crate::model::Model;
use crate::piecewise::ModelSolution;
use crate::probability::Probability;
use crate::table::Table;

use super::escape::escape_text;
use super::figures::TailCurve;
use super::greek::text_name;

/// Everything the page shows, computed by `html_report::build_report`.
#[derive(Clone, Debug)]
pub struct ReportPage {
    pub input: crate::session::Input,
    pub model: Model,
    pub solved: ModelSolution,
    /// Tail, total and moments (of a single rule, or of a whole piecewise model).
    pub analysis: Option<Analysis>,
    /// Answers to `--prob` events under the normalised law.
    pub probabilities: Vec<Probability>,
    /// The evidence table, when every parameter has a value.
    pub table: Option<Table>,
    /// The tail law's leading term at some k, for plot (1).
    pub tail_curve: Option<TailCurve>,
    /// k on a log axis (a power-law tail) rather than a linear one.
    pub log_index: bool,
    /// Parameters without a value (no numbers, no plots).
    pub missing: Vec<String>,
    pub digits: u32,
    /// Shell commands that reproduce the page and its numbers.
    pub commands: Vec<String>,
    pub version: String,
}

/// A numbered section.
pub(crate) fn section(number: usize, id: &str, title: &str, body: &str) -> String {
    format!(
        "<section id=\"{id}\">\n<h2><span class=\"number\">{number}</span> {}</h2>\n{body}</section>\n",
        escape_text(title)
    )
}

/// The page.
pub fn report_html(page: &ReportPage) -> String {
    let title = format!("{} — telescope report", page.input.name);
    let mut body = String::new();
    body += &header(page);
    let parts = [
        (
            "model",
            "The model and how the rule was derived",
            sections::model(page),
        ),
        (
            "rule",
            "The rule in factor normal form",
            sections::rule(page),
        ),
        ("closed-form", "Closed form", sections::closed_form(page)),
        ("support", "Support", sections::support(page)),
        ("conditions", "Conditions", sections::conditions(page)),
        ("tail", "Tail law", analysis::tail(page)),
        (
            "sums",
            "Total, mean and variance",
            analysis::sums(page) + &analysis::probabilities(page),
        ),
        ("evidence", "Evidence", evidence::evidence(page)),
        (
            "reproduce",
            "Reproduce this page",
            sections::reproduce(page),
        ),
    ];
    body += "<nav aria-label=\"Contents\"><ol>\n";
    for (id, heading, _) in &parts {
        body += &format!("<li><a href=\"#{id}\">{}</a></li>\n", escape_text(heading));
    }
    body += "</ol></nav>\n";
    for (number, (id, heading, content)) in parts.iter().enumerate() {
        body += &section(number + 1, id, heading, content);
    }
    body += &format!(
        "<footer><p>Written by telescope {}. Formulas are MathML; each carries its LaTeX source as an annotation (in the page source). No script, nothing fetched from a network.</p></footer>\n",
        escape_text(&page.version)
    );
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<meta name=\"generator\" content=\"telescope {}\">\n<title>{}</title>\n<style>\n{}</style>\n</head>\n<body>\n<main>\n{body}</main>\n</body>\n</html>\n",
        escape_text(&page.version),
        escape_text(&title),
        style::CSS
    )
}

fn header(page: &ReportPage) -> String {
    let model = &page.model;
    let mut out = format!(
        "<header>\n<p class=\"kicker\">telescope report</p>\n<h1>{}</h1>\n",
        escape_text(&page.input.name)
    );
    let params: Vec<String> = model
        .params
        .iter()
        .map(|p| {
            let name = text_name(&p.name);
            match page.solved.values.get(&p.name) {
                Some(v) => format!("{name} = {v}"),
                None => format!("{name} free"),
            }
        })
        .collect();
    let mut facts = vec![format!(
        "sequence {}({})",
        text_name(&model.sequence),
        text_name(&model.index)
    )];
    if !params.is_empty() {
        facts.push(params.join(", "));
    }
    facts.push(format!("{} significant digits", page.digits));
    out += &format!(
        "<p class=\"meta\">{}</p>\n",
        escape_text(&facts.join(" · "))
    );
    if !page.missing.is_empty() {
        out += &missing_note(page);
    }
    out + "</header>\n"
}

/// The one line that says which `--param` values would add the numbers and the plots.
pub(crate) fn missing_note(page: &ReportPage) -> String {
    let flags: Vec<String> = page
        .missing
        .iter()
        .map(|name| format!("--param {name}=…"))
        .collect();
    format!(
        "<p class=\"note\">Formulas only: give {} to add the numbers and the plots.</p>\n",
        escape_text(&flags.join(" "))
    )
}
