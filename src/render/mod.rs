//! Output: text (Unicode), LaTeX, JSON and CSV. Renderers never compute mathematics: they lay
//! out what `solve`, `table` and the analyses produced.

pub mod analysis_output;
pub mod greek;
pub mod latex;
pub mod node;
pub mod solve_output;
pub mod table_output;
pub mod text;
pub mod to_node;

pub use analysis_output::{analysis_json, analysis_latex, analysis_text};
pub use solve_output::{solve_json, solve_latex, solve_text};
pub use table_output::{table_csv, table_json, table_text};

use serde_json::{json, Value};

use node::Node;

/// A formula in both notations, as the JSON contract wants it.
pub fn formula(node: &Node) -> Value {
    json!({ "text": text::write(node), "latex": latex::write(node) })
}
