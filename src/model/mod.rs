//! The meaning of the input: from a syntax tree to a [`Model`] (sequence, parameters, the rule
//! in factor normal form piece by piece, the boundary term, and how each ratio was derived
//! from what was written) or, for one rule, a [`Problem`]. Knows nothing of MPFR or rendering.

mod balance;
mod boundary;
mod build;
mod derivation;
mod expr;
mod linear;
mod normal_form;
mod piecewise;
mod problem;
mod rates;
mod size;

pub use build::{
    build_model, build_problem, DEFAULT_FIRST_INDEX, DEFAULT_SEQUENCE, RATES_SEQUENCE,
};
pub use derivation::{Assumption, Derivation, RuleSource};
pub use expr::{
    from_ratfunc, subscripted_name, to_product, IndexFactor, Names, ProductForm, CONSTANT_NAMES,
    FUNCTION_NAMES,
};
pub use linear::{LinearForm, TermAt};
pub use normal_form::normal_form;
pub use problem::{Boundary, Model, Param, Piece, Problem, ResolvedPiece};
pub use size::{judge_model, judge_size, MAX_DEGREE};
