//! The numeric route: claim and truth side by side at many k and several parameter points.
//!
//! The truth is the rule itself: the exact running product for the first steps (no closed
//! form involved), and beyond that the solver's closed form through MPFR log-Gamma, which the
//! project checks against the running product everywhere else.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::ToPrimitive;
use rug::{Float, Rational};

use crate::algebra::Q;
use crate::model::Problem;
use crate::numeric::{
    bits_for_digits, evaluate_closed_form, to_rug_integer, to_rug_rational, DirectValue, LogReal,
    RunningProduct, GUARD_BITS,
};
use crate::solve::{solve, Solution, SupportEnd};
use crate::table::numeric_ratio;

use super::claim::Claim;
use super::evaluate::{evaluate, Scope, Undefined};
use super::points::{sample_indices, Point};

/// Steps of the exact running product kept for the small k.
const DIRECT_STEPS: u64 = 200;
/// Largest exact direct value (numerator and denominator bits) after which the exact walk
/// stops: a rule with a 5,300-digit constant reached a million digits in 200 steps, and the
/// check took 2 s (over 10 s in the instrumented fuzz build).
const MAX_DIRECT_BITS: u32 = 1 << 16;
/// Extra bits for the claim's evaluation, on top of digits and guard bits: the logarithms of
/// values at k = 10^6 carry about 24 bits before the point (common practice margin).
const MAGNITUDE_BITS: u32 = 64;

/// Working precision of the claim's evaluation.
pub fn claim_precision(digits: u32) -> u32 {
    bits_for_digits(digits) + GUARD_BITS + MAGNITUDE_BITS
}

/// Largest relative difference accepted: the requested digits less three (common practice:
/// the last digits of two independent evaluations may differ by rounding).
pub fn tolerance(digits: u32) -> Float {
    let ten = Float::with_val(64, 10);
    let exponent = 3 - digits as i32;
    Float::with_val(64, rug::ops::Pow::pow(&ten, exponent))
}

/// The rule's sequence at one parameter point.
pub struct Truth {
    pub solution: Solution,
    pub point: Point,
    base_index: BigInt,
    /// a(b), a(b+1), … by exact running product.
    direct: Vec<Rational>,
    digits: u32,
}

impl Truth {
    /// Solves the rule at the point; `Err` says why the point cannot be used.
    pub fn new(problem: &Problem, point: &Point, digits: u32) -> Result<Truth, String> {
        let solution = solve(problem, &point.values).map_err(|d| d.message)?;
        let base_index = solution.base_index.clone();
        let base = to_rug_rational(&point.base);
        let ratio = numeric_ratio(problem, &point.values);
        let mut run = RunningProduct::new(
            ratio.clone(),
            to_rug_integer(&base_index),
            base,
            true,
            digits,
            DIRECT_STEPS,
        );
        let mut direct = Vec::new();
        for step in 0..=DIRECT_STEPS {
            if step > 0 && run.step().is_err() {
                return Err(format!(
                    "the rule divides by zero at k = {}",
                    &base_index + BigInt::from(step)
                ));
            }
            if let DirectValue::Exact(q) = run.value() {
                let bits = q.numer().significant_bits() + q.denom().significant_bits();
                direct.push(q);
                if bits > MAX_DIRECT_BITS {
                    // Past this size an exact value costs more to build and to compare than
                    // it adds: the proven closed form answers further out. The rest of the
                    // range is still searched for a vanishing denominator.
                    for later in step + 1..=DIRECT_STEPS {
                        let k = &base_index + BigInt::from(later);
                        if ratio.at(&to_rug_integer(&k)).is_err() {
                            return Err(format!("the rule divides by zero at k = {k}"));
                        }
                    }
                    break;
                }
            }
        }
        Ok(Truth {
            solution,
            point: point.clone(),
            base_index,
            direct,
            digits,
        })
    }

    /// The last index of a finite support, when there is one at this point.
    pub fn last(&self) -> Option<BigInt> {
        match &self.solution.support.last {
            SupportEnd::At(n) => Some(n.clone()),
            _ => None,
        }
    }

    pub fn base_index(&self) -> &BigInt {
        &self.base_index
    }

    /// a(k); `None` before the base index or where the closed form cannot be evaluated.
    pub fn at(&self, k: &BigInt, prec: u32) -> Option<LogReal> {
        let offset = (k - &self.base_index).to_u64()?;
        if let Some(q) = self.direct.get(offset as usize) {
            return Some(LogReal::from_rational(q, prec));
        }
        let base = to_rug_rational(&self.point.base);
        evaluate_closed_form(
            &self.solution.closed_form,
            k,
            &self.point.values,
            &base,
            self.digits,
        )
        .ok()
    }

    /// R(k) exactly at this point (for showing next to the claim's own ratio).
    pub fn rule_ratio_at(&self, problem: &Problem, k: &BigInt) -> Option<Q> {
        problem
            .ratio
            .eval_at(&Q::from_integer(k.clone()), &self.point.values)
            .ok()
            .flatten()
    }
}

/// The claim at one k of one point.
pub fn claim_at(claim: &Claim, point: &Point, k: &BigInt, prec: u32) -> Result<LogReal, Undefined> {
    let scope = Scope {
        k,
        params: &point.values,
        base: &point.base,
        prec,
    };
    evaluate(claim, &scope)?.to_logreal(prec)
}

/// One comparison.
#[derive(Clone, Debug)]
pub struct Comparison {
    pub k: BigInt,
    pub claim: Result<LogReal, Undefined>,
    pub truth: LogReal,
    /// |claim/truth − 1|; +inf where the claim is undefined or exactly one side is zero.
    pub rel_diff: Float,
}

/// Everything compared at one parameter point.
pub struct PointRun {
    pub truth: Truth,
    pub comparisons: Vec<Comparison>,
    pub max_rel_diff: Float,
    pub agrees: bool,
}

/// Relative difference of two values (see [`Comparison::rel_diff`]).
pub fn relative_difference(claim: &Result<LogReal, Undefined>, truth: &LogReal) -> Float {
    match claim {
        Ok(c) => c.rel_diff(truth, 64),
        Err(_) => Float::with_val(64, rug::float::Special::Infinity),
    }
}

/// Compares at every sampled k of one point.
pub fn run_point(claim: &Claim, truth: Truth, digits: u32) -> PointRun {
    let prec = claim_precision(digits);
    let tol = tolerance(digits);
    let ks = sample_indices(truth.base_index(), truth.last().as_ref());
    let mut comparisons = Vec::new();
    let mut max = Float::new(64);
    for k in ks {
        let Some(t) = truth.at(&k, prec) else {
            continue;
        };
        let c = claim_at(claim, &truth.point, &k, prec);
        let rel = relative_difference(&c, &t);
        if rel > max || rel.is_nan() {
            max = rel.clone();
        }
        comparisons.push(Comparison {
            k,
            claim: c,
            truth: t,
            rel_diff: rel,
        });
    }
    let agrees = !comparisons.is_empty() && max <= tol;
    PointRun {
        truth,
        comparisons,
        max_rel_diff: max,
        agrees,
    }
}

/// The values of the point as `name = value` pairs, for messages.
pub fn describe_point(values: &BTreeMap<String, Q>) -> String {
    values
        .iter()
        .map(|(k, v)| format!("{k} = {v}"))
        .collect::<Vec<_>>()
        .join(", ")
}
