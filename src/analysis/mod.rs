//! After the closed form: how the sequence behaves for large `k` ([`tail`]), what it sums to
//! ([`hypergeometric`], [`sums`], [`numeric_sum`]), and its mean and variance ([`moments`]),
//! each exact where a theorem applies and to any number of digits otherwise, with the
//! conditions under which it is finite.
//!
//! ```
//! use std::collections::BTreeMap;
//! use telescope::analysis::{analyse, AnalysisRequest};
//! let problem = telescope::model::build_problem("a(k)/a(k-1) = (k-1)/(k+5/2) for k >= 2").unwrap();
//! let solution = telescope::solve::solve(&problem, &BTreeMap::new()).unwrap();
//! let analysis = analyse(&problem, &solution, &AnalysisRequest::default()).unwrap();
//! assert_eq!(analysis.normalization.value.unwrap().exact.as_deref(), Some("7/5"));
//! ```

pub mod at_point;
pub mod bernoulli;
pub mod conditions;
pub mod hurwitz;
pub mod hypergeometric;
pub mod moments;
mod numbers;
pub mod numeric_sum;
pub mod report;
pub mod sums;
pub mod symbolic;
pub mod tail;

pub use conditions::{Inequality, Region, Requirement, Verdict};
pub use hypergeometric::{HyperSeries, RisingForm};
pub use numeric_sum::{moment_sums, Bounded, MomentSums, NumericRule, SumFailure, SumMethod};
pub use report::{
    analyse, normalizing_base_value, Analysis, AnalysisRequest, Finiteness, Moment, Normalization,
    NumberReport, TailCheck, TailNumbers, TailReport, TotalParts,
};
pub use sums::{closed_sum, Theorem};
pub use symbolic::{Atom, Expr, Term};
pub use tail::{
    numeric_corrections, tail_law, OmittedCorrections, Tail, MAX_CORRECTION_TERMS,
    MAX_CORRECTION_WORK,
};
