//! One point of a sweep: the rule's conditions decided, the analysis evaluated
//! (`analysis::at_point`), a(K) by the direct product, each quantity a number or the reason
//! it has none.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::Zero;
use rug::Float;

use super::{Cell, Missing, Number, Plan, Quantity, RulePlan};
use crate::algebra::Q;
use crate::analysis::at_point::{analyse_at, PointAnalysis, PointRequest, PointTail};
use crate::analysis::AnalysisRequest;
use crate::analysis::{Finiteness, Moment, NumberReport, Verdict};
use crate::numeric::{decimal, to_rug_integer, to_rug_rational, LogReal, RunningProduct};
use crate::piecewise::solve_model;
use crate::piecewise::{build_piecewise_table, exact_terms, ModelSolution};
use crate::probability::analyse_model;
use crate::probability::{Event, Law};
use crate::solve::{Condition, ConditionKind};
use crate::table::TableRequest;
use crate::table::{numeric_ratio, DirectSource, EXACT_STEPS};

/// The cells of one point, and the cross-checks made there (quantity, relative difference).
pub(super) fn evaluate(
    plan: &Plan,
    names: &[&str],
    at: &[Q],
    quantities: &[Quantity],
    digits: u32,
    cross_check: bool,
) -> (Vec<Cell>, Vec<(Quantity, String)>) {
    let mut values = plan.fixed.clone();
    for (name, v) in names.iter().zip(at) {
        values.insert(name.to_string(), v.clone());
    }
    // A piecewise model, and any model asked for probabilities, is solved at the point: the
    // pieces are joined from the values, and the probability engine works on a solved model.
    let wants_probabilities = quantities
        .iter()
        .any(|q| matches!(q, Quantity::Probability(_)));
    let solved = (plan.piecewise || wants_probabilities).then(|| solve_model(&plan.model, &values));
    if let Some(Err(d)) = &solved {
        let cell = Cell::Missing(Missing::Unavailable(format!(
            "outside the model: {}",
            d.message
        )));
        return (vec![cell; quantities.len()], Vec::new());
    }
    let solved = solved.and_then(Result::ok);
    let analysis = match (&plan.rule, plan.piecewise, &solved) {
        (Some(rule), false, _) => {
            let end = crate::analysis::at_point::support_end(&rule.problem, &values);
            if let Some((condition, why)) = failed_condition(rule, &values, end.as_ref()) {
                let cell = Cell::Missing(Missing::Invalid(condition, why));
                return (vec![cell; quantities.len()], Vec::new());
            }
            let mut moments = [false; 3];
            for q in quantities {
                if let Some(j) = q.moment() {
                    moments[j] = true;
                }
            }
            let request = PointRequest {
                digits,
                moments,
                cross_check,
                prefactor: quantities.contains(&Quantity::Prefactor),
            };
            analyse_at(
                &rule.problem,
                &rule.solution,
                &rule.analysis,
                &rule.form,
                &values,
                &request,
            )
        }
        (_, _, Some(solved)) => match piecewise_analysis(solved, digits) {
            Ok(a) => a,
            Err(why) => {
                let cell = Cell::Missing(Missing::Unavailable(why));
                return (vec![cell; quantities.len()], Vec::new());
            }
        },
        _ => unreachable!("a one-rule model always has its plan"),
    };
    let law = solved
        .as_ref()
        .filter(|_| wants_probabilities)
        .map(|s| Law::new(s, digits));
    let mut checks = Vec::new();
    let cells = quantities
        .iter()
        .map(|q| {
            let cell = match (q, &law, &solved) {
                (Quantity::Probability(event), Some(law), _) => probability(law, event),
                (Quantity::Term(k), _, Some(solved)) if plan.piecewise => {
                    piecewise_term(solved, k, digits)
                }
                _ => cell(plan, &analysis, &values, q, digits),
            };
            if let (true, Some(j)) = (cross_check, q.moment()) {
                let moment = moment_of(&analysis, j);
                if let Some(check) = moment.2.and_then(|v| v.check.clone()) {
                    checks.push((q.clone(), check));
                }
            }
            cell
        })
        .collect();
    (cells, checks)
}

/// The analysis of a piecewise model at a point, by the model-level analysis `solve` uses
/// (so the numbers agree with `solve`), in the shape of a one-rule point.
fn piecewise_analysis(solved: &ModelSolution, digits: u32) -> Result<PointAnalysis, String> {
    let request = AnalysisRequest {
        terms: 0,
        digits,
        normalize: false,
    };
    let a =
        analyse_model(solved, &request).map_err(|d| format!("outside the model: {}", d.message))?;
    let tail = a
        .tail
        .as_ref()
        .and_then(|t| t.numbers.as_ref())
        .and_then(|n| {
            Some(PointTail {
                rate: crate::algebra::parse_q(&n.rate)?,
                power: crate::algebra::parse_q(&n.power)?,
                prefactor: Ok(n.prefactor.clone()),
            })
        });
    Ok(PointAnalysis {
        support_end: None,
        tail,
        normalization: a.normalization,
        mean: a.mean,
        variance: a.variance,
    })
}

/// a(K) of a piecewise model: the chained direct product across the pieces, as `table`
/// computes it.
fn piecewise_term(solved: &ModelSolution, k: &BigInt, digits: u32) -> Cell {
    let request = TableRequest {
        from: k.clone(),
        to: k.clone(),
        digits,
        base_value: Q::from_integer(1.into()),
        check_all: false,
    };
    let steps = k - solved.base_index();
    if steps <= BigInt::from(EXACT_STEPS) {
        if let Ok(terms) = exact_terms(solved, &Q::from_integer(1.into()), k) {
            if let Some(q) = terms.last() {
                return Cell::Value(exact_number(
                    q,
                    digits,
                    "exact direct product across the pieces",
                ));
            }
        }
    }
    match build_piecewise_table(solved, &request, 0..0) {
        Ok(table) => Cell::Value(Number {
            value: table.rows[0].direct.clone(),
            exact: None,
            error_bound: format!("{} (relative)", table.direct_error_bound),
            method: "MPFR direct product across the pieces".into(),
        }),
        Err(d) => Cell::Missing(Missing::Unavailable(d.message)),
    }
}

/// The first condition of the rule that fails at these values, with the reason.
fn failed_condition(
    plan: &RulePlan,
    values: &BTreeMap<String, Q>,
    end: Option<&BigInt>,
) -> Option<(Condition, String)> {
    for c in &plan.conditions {
        let why = match &c.kind {
            ConditionKind::NonZero(e) => match e.eval(values) {
                Ok(v) if !v.is_zero() => None,
                _ => Some("a divisor of the rule is zero".to_string()),
            },
            ConditionKind::NotEqual { param, value } => {
                (values.get(param) == Some(value)).then(|| format!("{param} = {value} is excluded"))
            }
            ConditionKind::NotIntegerAtLeast { expr, min } => match expr.eval(values) {
                Ok(v) => {
                    let inside = end.map_or(true, |e| v <= Q::from_integer(e + 1));
                    (v.is_integer() && v.to_integer() >= *min && inside)
                        .then(|| format!("a factor of the rule's denominator vanishes at k = {v}"))
                }
                Err(_) => Some("a divisor of the rule is zero".to_string()),
            },
        };
        if let Some(why) = why {
            return Some((c.clone(), why));
        }
    }
    // The rule's constant and shifts must evaluate (the conditions above cover their
    // divisors; this keeps the direct product from ever dividing by zero).
    let ratio = &plan.problem.ratio;
    let evaluates = ratio.constant.eval(values).is_ok()
        && ratio.factors.iter().all(|f| f.shift.eval(values).is_ok());
    if !evaluates {
        let c = plan.conditions.first().cloned()?;
        return Some((c, "a divisor of the rule is zero".into()));
    }
    None
}

/// The finiteness, decided requirements and number of the total (0), mean (1) or variance (2).
fn moment_of(
    analysis: &PointAnalysis,
    j: usize,
) -> (
    &Finiteness,
    &[crate::analysis::Requirement],
    Option<&NumberReport>,
) {
    match j {
        0 => {
            let n = &analysis.normalization;
            (&n.finiteness, &n.requirements, n.value.as_ref())
        }
        1 => moment_parts(&analysis.mean),
        _ => moment_parts(&analysis.variance),
    }
}

fn moment_parts(
    m: &Moment,
) -> (
    &Finiteness,
    &[crate::analysis::Requirement],
    Option<&NumberReport>,
) {
    (&m.finiteness, &m.requirements, m.value.as_ref())
}

fn from_report(r: &NumberReport) -> Number {
    Number {
        value: r.value.clone(),
        exact: r.exact.as_deref().and_then(crate::algebra::parse_q),
        error_bound: r.error_bound.clone(),
        method: r.method.clone(),
    }
}

fn exact_number(q: &Q, digits: u32, method: &str) -> Number {
    Number {
        value: decimal::rational_to_decimal(&to_rug_rational(q), digits),
        exact: Some(q.clone()),
        error_bound: "0".into(),
        method: method.into(),
    }
}

/// One quantity at a point.
fn cell(
    plan: &Plan,
    analysis: &PointAnalysis,
    values: &BTreeMap<String, Q>,
    quantity: &Quantity,
    digits: u32,
) -> Cell {
    let no_tail = || match &analysis.support_end {
        Some(end) => Cell::Missing(Missing::NoTail(end.clone())),
        None => Cell::Missing(Missing::Unavailable(
            "the tail law cannot be evaluated here".into(),
        )),
    };
    match quantity {
        Quantity::Rate => match &analysis.tail {
            Some(t) => Cell::Value(exact_number(&t.rate, digits, "tail law")),
            None => no_tail(),
        },
        Quantity::Theta => match &analysis.tail {
            Some(t) => Cell::Value(exact_number(&t.power, digits, "tail law")),
            None => no_tail(),
        },
        Quantity::Prefactor => match &analysis.tail {
            Some(t) => match &t.prefactor {
                Ok(value) => Cell::Value(Number {
                    value: value.clone(),
                    exact: None,
                    error_bound: "below one unit of the last digit".into(),
                    method: "Gamma values of the tail law (MPFR)".into(),
                }),
                Err(why) => Cell::Missing(Missing::Unavailable(why.clone())),
            },
            None => no_tail(),
        },
        Quantity::Total | Quantity::Mean | Quantity::Variance => {
            let j = quantity.moment().unwrap_or(0);
            let (finiteness, requirements, value) = moment_of(analysis, j);
            match (finiteness, value) {
                (Finiteness::Infinite(why), _) => Cell::Missing(Missing::Infinite {
                    failed: requirements
                        .iter()
                        .find(|r| matches!(r.verdict, Verdict::Fails(_)))
                        .map(|r| r.inequality.clone()),
                    why: why.clone(),
                }),
                (_, Some(report)) => Cell::Value(from_report(report)),
                (_, None) => Cell::Missing(Missing::Unavailable(
                    analysis
                        .normalization
                        .numeric_note
                        .clone()
                        .unwrap_or_else(|| {
                            "no closed form, and the numeric sum gave no value".into()
                        }),
                )),
            }
        }
        Quantity::Term(k) => match &plan.rule {
            Some(rule) if !plan.piecewise => term(rule, values, &analysis.support_end, k, digits),
            _ => Cell::Missing(Missing::Unavailable("a(K) needs the solved model".into())),
        },
        Quantity::Probability(_) => Cell::Missing(Missing::Unavailable(
            "the probability engine did not run".into(),
        )),
    }
}

/// P(event) at a point, from the probability engine.
fn probability(law: &Law<'_>, event: &Event) -> Cell {
    let p = law.probability(event);
    match (p.value, p.note) {
        (Some(v), _) => Cell::Value(Number {
            value: v.value,
            exact: v.exact.as_deref().and_then(crate::algebra::parse_q),
            error_bound: v.error_bound,
            method: v.method,
        }),
        (None, note) => Cell::Missing(Missing::Unavailable(
            note.unwrap_or_else(|| "no value".into()),
        )),
    }
}

/// a(K) with a(b) = 1 by the direct product of the rule as written: exact up to
/// `EXACT_STEPS` factors, MPFR with a proven bound beyond (as `table` computes it).
fn term(
    plan: &RulePlan,
    values: &BTreeMap<String, Q>,
    end: &Option<BigInt>,
    k: &BigInt,
    digits: u32,
) -> Cell {
    let base = plan.problem.base_index();
    if let Some(e) = end {
        if k > e {
            return Cell::Value(exact_number(
                &Q::zero(),
                digits,
                "beyond the end of the support",
            ));
        }
    }
    let steps: u64 = (k - &base).try_into().unwrap_or(u64::MAX);
    let exact = steps <= EXACT_STEPS;
    let mut run = RunningProduct::new(
        numeric_ratio(&plan.problem, values),
        to_rug_integer(&base),
        rug::Rational::from(1),
        exact,
        digits,
        steps,
    );
    if let Err(e) = run.advance_to(k) {
        return Cell::Missing(Missing::Unavailable(format!(
            "the direct product stops: {e:?}"
        )));
    }
    match run.value_ref() {
        Ok(q) => {
            let q = crate::algebra::parse_q(&q.to_string()).unwrap_or_default();
            Cell::Value(exact_number(&q, digits, "exact direct product"))
        }
        Err((mantissa, exp2)) => {
            let rel = run.error_bound().unwrap_or_else(|| Float::new(64));
            let prec = mantissa.prec() + 64;
            let mut error = LogReal::from_scaled(mantissa, exp2, prec);
            error.sign = 1;
            let ln_rel = Float::with_val(prec, rel.ln_ref());
            error.mul_log(&ln_rel, 1);
            Cell::Value(Number {
                value: run.decimal(digits),
                exact: None,
                error_bound: error.to_decimal(3),
                method: format!("MPFR direct product, {} bits", mantissa.prec()),
            })
        }
    }
}
