//! Output: text (Unicode), LaTeX, JSON and CSV. Renderers never compute mathematics: they lay
//! out what `solve`, `table` and the analyses produced.

pub mod analysis_output;
pub mod check_output;
pub mod derivation;
pub mod escape;
pub mod figures;
pub mod fit_output;
pub mod greek;
pub mod html;
pub mod latex;
pub mod mathml;
pub mod model_output;
pub mod node;
pub mod probability_output;
pub mod reason;
pub mod region;
pub mod report;
pub mod sample_output;
pub mod solve_output;
pub mod sweep_output;
pub mod sweep_svg;
pub mod symbolic_output;
pub mod table_output;
pub mod text;
pub mod to_node;

pub use analysis_output::{analysis_json, analysis_latex, analysis_text};
pub use check_output::{check_json, check_text};
pub use model_output::{
    derivation_json, derivation_latex, derivation_text, has_derivation, piecewise_json,
    piecewise_latex, piecewise_text,
};
pub use probability_output::{probabilities_json, probabilities_latex, probabilities_text};
pub use report::{solve_report, SolveFormat, SolveReport};
pub use solve_output::{
    solve_json, solve_latex, solve_latex_with, solve_text, solve_text_with, SolveLayout,
};
pub use table_output::{table_csv, table_json, table_text, CsvRows};

use serde_json::{json, Value};

use node::Node;

/// Longest exact value printed in text and HTML; JSON always carries the whole value.
const MAX_SHOWN_EXACT: usize = 100;

/// An exact rational as a reader sees it: whole when short, otherwise its size (a sum over
/// thousands of terms of a finite support can have thousands of digits).
pub fn shown_exact(q: &str) -> String {
    if q.chars().count() <= MAX_SHOWN_EXACT {
        return q.to_string();
    }
    let digits = |s: &str| s.chars().filter(char::is_ascii_digit).count();
    match q.split_once('/') {
        Some((n, d)) => format!(
            "a fraction of {} digits over {} digits, whole in --format json",
            digits(n),
            digits(d)
        ),
        None => format!(
            "an integer of {} digits (whole in --format json)",
            digits(q)
        ),
    }
}

/// A formula in both notations, as the JSON contract wants it.
pub fn formula(node: &Node) -> Value {
    json!({ "text": text::write(node), "latex": latex::write(node) })
}
