//! The whole `solve` output for a model: the derivation (when the rule was derived from an
//! equation or rates), then the solution — or the piece-by-piece output of a piecewise model.
//! The CLI and the tests both go through here, so what the tests check is what users see.

use crate::analysis::Analysis;
use crate::model::Model;
use crate::piecewise::ModelSolution;
use crate::probability::Probability;

use super::{
    analysis_json, analysis_latex, analysis_text, derivation, derivation_json, derivation_latex,
    derivation_text, has_derivation, piecewise_json, piecewise_latex, piecewise_text,
    probabilities_json, probabilities_latex, probabilities_text, solve_json, solve_latex_with,
    solve_text_with, SolveLayout,
};

/// What was computed beyond the closed form: the analysis (tail, total, moments) of a single
/// rule or of a whole piecewise model, and the probabilities asked for.
#[derive(Clone, Copy, Default)]
pub struct SolveReport<'a> {
    pub analysis: Option<&'a Analysis>,
    /// The digits the analysis was asked for (reported in JSON).
    pub digits: u32,
    /// Answers to `--prob` events (empty when none was asked for).
    pub probabilities: &'a [Probability],
}

/// The output formats of `solve`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SolveFormat {
    Text,
    Latex,
    Json,
}

fn pretty(v: &serde_json::Value) -> String {
    serde_json::to_string_pretty(v).expect("JSON values always serialise") + "\n"
}

/// Everything `telescope solve` prints for a solved model.
pub fn solve_report(
    model: &Model,
    solved: &ModelSolution,
    report: &SolveReport,
    format: SolveFormat,
    layout: SolveLayout,
) -> String {
    let first = &solved.pieces[0].problem;
    // Only the asked-for format is rendered.
    let analysis_text_part = || {
        report.analysis.map(analysis_text).unwrap_or_default()
            + &probabilities_text(report.probabilities)
    };
    let analysis_latex_part = || {
        report.analysis.map(analysis_latex).unwrap_or_default()
            + &probabilities_latex(report.probabilities)
    };
    let wrap = |body: String| {
        if layout.standalone {
            derivation::standalone(first, &body)
        } else {
            body
        }
    };
    if model.is_piecewise() {
        return match format {
            SolveFormat::Text => piecewise_text(model, solved) + &analysis_text_part(),
            SolveFormat::Latex => wrap(piecewise_latex(model, solved) + &analysis_latex_part()),
            SolveFormat::Json => {
                let mut json = piecewise_json(model, solved);
                if let (Some(analysis), serde_json::Value::Object(fields)) =
                    (report.analysis, &mut json)
                {
                    fields.insert("digits".into(), report.digits.to_string().into());
                    fields.extend(analysis_json(analysis));
                }
                json["probabilities"] = probabilities_json(report.probabilities);
                pretty(&json)
            }
        };
    }
    let (problem, solution) = (first, &solved.pieces[0].solution);
    let shown = has_derivation(model);
    match format {
        SolveFormat::Text if shown => {
            derivation_text(model)
                + "\n"
                + &solve_text_with(problem, solution, layout)
                + &analysis_text_part()
        }
        SolveFormat::Text => solve_text_with(problem, solution, layout) + &analysis_text_part(),
        SolveFormat::Latex => {
            let inner = SolveLayout {
                standalone: false,
                ..layout
            };
            let mut body = solve_latex_with(problem, solution, inner);
            if shown {
                body = derivation_latex(model) + &body;
            }
            wrap(body + &analysis_latex_part())
        }
        SolveFormat::Json => {
            let mut json = solve_json(problem, solution);
            json["derivation"] = derivation_json(model);
            if let (Some(analysis), serde_json::Value::Object(fields)) =
                (report.analysis, &mut json)
            {
                fields.insert("digits".into(), report.digits.to_string().into());
                fields.extend(analysis_json(analysis));
            }
            json["probabilities"] = probabilities_json(report.probabilities);
            pretty(&json)
        }
    }
}
