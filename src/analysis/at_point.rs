//! The analysis of a rule solved once with symbolic parameters, decided and evaluated at one
//! parameter point: the inner loop of `sweep`. The tail law, the hypergeometric series, the
//! closed-form sums and the convergence inequalities are reused as they are; only their
//! verdicts and their numbers are new at each point, so that a thousand points cost a
//! thousand evaluations, not a thousand solves.
//!
//! The numbers come from the same code as `solve` (`Numbers`, `evaluate_expr`, the prefactor
//! as a closed-form product), so a point and a single `solve --param …` agree digit for digit.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::Zero;
use rug::{Float, Rational};

use super::conditions::Requirement;
use super::hypergeometric::RisingForm;
use super::numbers::{evaluate_expr, number, Numbers};
use super::numeric_sum::Bounded;
use super::report::{finiteness, Analysis, AnalysisRequest, Finiteness, Moment, Normalization};
use crate::algebra::Q;
use crate::closed_form::ClosedForm;
use crate::model::Problem;
use crate::numeric::{decimal, evaluate_closed_form, LogReal};
use crate::solve::{Solution, SupportEnd};

/// Which numbers to compute at a point.
#[derive(Clone, Debug)]
pub struct PointRequest {
    pub digits: u32,
    /// Total, mean, variance: which of the three are wanted.
    pub moments: [bool; 3],
    /// Run the independent numeric sums even where closed forms give the numbers, as `solve`
    /// does; they fill each `NumberReport::check`.
    pub cross_check: bool,
    /// The tail's prefactor C.
    pub prefactor: bool,
}

/// The tail law's numbers at a point.
#[derive(Clone, Debug)]
pub struct PointTail {
    pub rate: Q,
    pub power: Q,
    /// C to `digits` digits (a(b) = 1), as `solve` prints it; `None` when it cannot be
    /// evaluated (a pole of Γ, say), with the reason.
    pub prefactor: Result<String, String>,
}

/// Everything known at one point.
#[derive(Clone, Debug)]
pub struct PointAnalysis {
    /// The last index of the support at this point, when it is finite.
    pub support_end: Option<BigInt>,
    /// `None` for a finite support (no tail).
    pub tail: Option<PointTail>,
    pub normalization: Normalization,
    pub mean: Moment,
    pub variance: Moment,
}

/// The last index of the support at a point: a numerator factor that vanishes at an integer
/// k ≥ the rule's first index ends it (as `solve` finds it with values).
pub fn support_end(problem: &Problem, values: &BTreeMap<String, Q>) -> Option<BigInt> {
    problem
        .ratio
        .numerator_factors()
        .filter_map(|f| f.root().eval(values).ok())
        .filter(|r| r.is_integer() && r.to_integer() >= problem.first_index)
        .map(|r| r.to_integer() - 1)
        .min()
}

/// The analysis at `values` (every parameter has one) of the rule whose symbolic solution
/// and analysis are given.
pub fn analyse_at(
    problem: &Problem,
    solution: &Solution,
    symbolic: &Analysis,
    form: &RisingForm,
    values: &BTreeMap<String, Q>,
    request: &PointRequest,
) -> PointAnalysis {
    let end = support_end(problem, values);
    let finite_support = end.is_some();
    let decide = |rs: &[Requirement]| -> Vec<Requirement> {
        if finite_support {
            return Vec::new();
        }
        rs.iter()
            .map(|r| {
                Requirement::new(
                    r.inequality.clone(),
                    &r.purpose,
                    values,
                    &problem.params,
                    request.digits,
                )
            })
            .collect()
    };
    let mut normalization = symbolic.normalization.clone();
    normalization.requirements = decide(&normalization.requirements);
    normalization.finiteness = finiteness(&normalization.requirements);
    // decided here: the symbolic region is no longer the answer
    normalization.finite_for = None;
    normalization.finite_support = finite_support;
    if let Finiteness::Infinite(_) = normalization.finiteness {
        normalization.closed_form = None;
    }
    let total_infinite = matches!(normalization.finiteness, Finiteness::Infinite(_));
    let moment = |m: &Moment| -> Moment {
        let mut m = m.clone();
        m.requirements = decide(&m.requirements);
        m.finite_for = None;
        m.finiteness = if total_infinite {
            Finiteness::Infinite("the total diverges, so there is no distribution".into())
        } else {
            finiteness(&m.requirements)
        };
        m
    };
    let mut mean = moment(&symbolic.mean);
    let mut variance = moment(&symbolic.variance);

    let point_solution = Solution {
        values: values.clone(),
        support: crate::solve::Support {
            first: solution.base_index.clone(),
            last: match &end {
                Some(e) => SupportEnd::At(e.clone()),
                None => SupportEnd::Infinite,
            },
        },
        ..solution.clone()
    };
    let digits = request.digits;
    let closed = [
        normalization.closed_form.as_ref().map(|(e, _)| e),
        mean.closed_form.as_ref().map(|(e, _)| e),
        variance.closed_form.as_ref().map(|(e, _)| e),
    ];
    let finite = [
        &normalization.finiteness,
        &mean.finiteness,
        &variance.finiteness,
    ]
    .map(|f| *f == Finiteness::Finite);
    // The numeric sums are the slow part: run them where a wanted number has no closed form
    // (or, for evidence, when asked to).
    let mut needs_sums = request.cross_check
        || (0..3).any(|j| request.moments[j] && closed[j].is_none() && finite[j]);
    if !needs_sums {
        let evaluate = |j: usize| -> Option<Bounded> {
            if !(request.moments[j] || j == 0) || !finite[j] {
                return None;
            }
            evaluate_expr(closed[j]?, values, digits)
        };
        let found = [evaluate(0), evaluate(1), evaluate(2)];
        // A closed form that cannot be evaluated here (a pole of Γ, say) leaves the number
        // to the numeric sums.
        needs_sums = (0..3).any(|j| request.moments[j] && finite[j] && found[j].is_none());
        if !needs_sums {
            let theorem = normalization
                .closed_form
                .as_ref()
                .map(|(_, th)| format!("closed form by {}", th.name()));
            let report = |b: &Option<Bounded>, method: Option<String>| {
                b.as_ref().map(|b| {
                    number(
                        b,
                        &method.unwrap_or_else(|| "closed form".into()),
                        None,
                        digits,
                    )
                })
            };
            normalization.value = report(&found[0], theorem);
            mean.value = report(&found[1], None);
            variance.value = report(&found[2], None);
        }
    }
    if needs_sums {
        let analysis_request = AnalysisRequest {
            terms: 0,
            digits,
            normalize: false,
        };
        let numbers = Numbers::compute(
            form,
            &point_solution,
            &analysis_request,
            &normalization,
            &mean,
            &variance,
        );
        numbers.apply(&mut normalization, &mut mean, &mut variance, digits);
    }

    let tail = (!finite_support).then(|| {
        let rate = symbolic
            .tail
            .as_ref()
            .and_then(|t| t.law.rate.eval(values).ok());
        let power = symbolic
            .tail
            .as_ref()
            .and_then(|t| t.law.power.eval(values).ok());
        (rate, power)
    });
    let tail = match (tail, &symbolic.tail) {
        (Some((Some(rate), Some(power))), Some(t)) => Some(PointTail {
            rate,
            power,
            prefactor: if request.prefactor {
                prefactor(problem, &t.law.prefactor, values, digits)
            } else {
                Err("not asked for".into())
            },
        }),
        _ => None,
    };
    PointAnalysis {
        support_end: end,
        tail,
        normalization,
        mean,
        variance,
    }
}

/// C with a(b) = 1, as `solve` evaluates and prints it (the product of Gamma values and
/// powers at `digits + 5` digits; by its logarithm when the exponent would not print).
fn prefactor(
    problem: &Problem,
    product: &crate::closed_form::Product,
    values: &BTreeMap<String, Q>,
    digits: u32,
) -> Result<String, String> {
    let form = ClosedForm {
        sequence: problem.sequence.clone(),
        base_index: BigInt::zero(),
        product: product.clone(),
    };
    let c = evaluate_closed_form(
        &form,
        &BigInt::zero(),
        values,
        &Rational::from(1),
        digits + 5,
    )
    .map_err(|e| format!("C cannot be evaluated here ({e:?})"))?;
    Ok(log_real_decimal(&c, digits))
}

/// A sign + logarithm number in decimal, or as `exp(…)` beyond printable exponents.
pub fn log_real_decimal(c: &LogReal, digits: u32) -> String {
    if Float::with_val(64, c.ln_abs.abs_ref()) < 1e17f64 {
        c.to_decimal(digits)
    } else {
        let sign = if c.sign < 0 { "-" } else { "" };
        format!(
            "{sign}exp({})",
            decimal::float_to_decimal(&c.ln_abs, digits)
        )
    }
}
