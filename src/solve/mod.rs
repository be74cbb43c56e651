//! From a ratio in factor normal form to a closed form with its support and conditions.
//!
//! `telescope` does the product `Π_{j=b+1..k} R(j)` factor by factor (DLMF 5.2.5 for the
//! rising products, the reflected form for factors written `β − k`); `support` finds where the
//! sequence ends and which parameter values the result excludes.

pub mod algebraic;
pub mod box_sign;
pub mod inequality;
pub mod ranges;
pub mod reason;
mod support;
mod telescope;

/// The rule's own conditions (without the simplest form's), for callers that decide them at
/// many points (`sweep`).
pub use support::conditions as rule_conditions;
pub use support::{Condition, ConditionKind, Status, Support, SupportEnd};
pub use telescope::telescope;

use std::collections::BTreeMap;

use num_bigint::BigInt;

use crate::algebra::Q;
use crate::closed_form::ClosedForm;
use crate::diagnostic::Diagnostic;
use crate::model::Problem;
use crate::ratio::Ratio;
use crate::simplify::{simplify, Context, Step};

/// Everything `solve` knows about a rule.
#[derive(Clone, Debug)]
pub struct Solution {
    pub sequence: String,
    pub base_index: BigInt,
    /// The ratio actually telescoped (orientation adjusted to keep Gamma arguments off poles).
    pub ratio: Ratio,
    /// The telescoped Gamma-quotient form.
    pub closed_form: ClosedForm,
    /// The simplest equal form (see `simplify::measure`).
    pub simplest: ClosedForm,
    /// How `simplest` follows from `closed_form`, one rule at a time.
    pub steps: Vec<Step>,
    pub support: Support,
    pub conditions: Vec<Condition>,
    /// Parameter values the user supplied (used to decide conditions and the support).
    pub values: BTreeMap<String, Q>,
}

/// Solves `problem`; `values` may fix some or all parameters (`--param`).
pub fn solve(problem: &Problem, values: &BTreeMap<String, Q>) -> Result<Solution, Diagnostic> {
    let base_index = problem.base_index();
    let (ratio, sign_flips) =
        telescope::orient_for_poles(&problem.ratio, &problem.first_index, values);
    let support = support::find_support(problem, &ratio, values)?;
    let mut conditions = support::conditions(problem, &ratio, values)?;
    let closed_form = telescope(&problem.sequence, &ratio, &base_index, sign_flips);
    let context = Context {
        base_index: base_index.clone(),
        integer_params: problem
            .params
            .iter()
            .filter(|p| p.integer)
            .map(|p| p.name.clone())
            .collect(),
    };
    let mut simplified = simplify(&closed_form, &context);
    let extra = support::form_conditions(problem, &simplified.simplest, &conditions, values);
    if extra.iter().any(|c| matches!(c.status, Status::Fails(_))) {
        // The supplied values sit where the simplest form breaks but the rule does not
        // (e.g. B(k, 0)): keep the telescoped form, which holds there.
        simplified.simplest = closed_form.clone();
        simplified.steps.clear();
    } else {
        conditions.extend(extra);
    }
    Ok(Solution {
        sequence: problem.sequence.clone(),
        base_index,
        ratio,
        closed_form,
        simplest: simplified.simplest,
        steps: simplified.steps,
        support,
        conditions,
        values: values.clone(),
    })
}
