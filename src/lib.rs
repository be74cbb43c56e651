//! telescope: solve first-order ratio rules `a(k)/a(k-1) = R(k)` into checked closed forms.
//!
//! The pipeline runs in one direction: text → [`syntax`] → [`model`] (factor normal form,
//! [`ratio`]) → [`solve`] (telescoping into a [`closed_form`]) → [`numeric`] / [`table`]
//! (evidence at high precision) → [`render`]. [`algebra`] is the exact floor under all of it.
//!
//! ```
//! use std::collections::BTreeMap;
//! let problem = telescope::model::build_problem("n(k)/n(k-1) = (k-1)/(k+2)  for k >= 2").unwrap();
//! let solution = telescope::solve::solve(&problem, &BTreeMap::new()).unwrap();
//! let text = telescope::render::solve_text(&problem, &solution);
//! assert!(text.contains("Γ"));
//! ```

pub mod algebra;
pub mod analysis;
pub mod budget;
pub mod check;
pub mod closed_form;
pub mod data;
pub mod diagnostic;
pub mod fit;
pub mod fuzzing;
pub mod html_report;
pub mod law;
pub mod model;
pub mod numeric;
pub mod piecewise;
pub mod plot;
pub mod probability;
pub mod ratio;
pub mod render;
pub mod sample;
pub mod session;
pub mod simplify;
pub mod solve;
pub mod sweep;
pub mod syntax;
pub mod table;
