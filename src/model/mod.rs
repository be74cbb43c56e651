//! The meaning of the input: from a syntax tree to a [`Problem`] (sequence, parameters, the
//! rule in factor normal form). Knows nothing of MPFR or rendering.

mod build;
mod expr;
mod normal_form;
mod problem;

pub use build::{build_problem, DEFAULT_FIRST_INDEX, DEFAULT_SEQUENCE};
pub use expr::{
    from_ratfunc, to_product, IndexFactor, Names, ProductForm, CONSTANT_NAMES, FUNCTION_NAMES,
};
pub use normal_form::normal_form;
pub use problem::{Param, Problem};
