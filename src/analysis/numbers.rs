//! The numbers of an analysis when every parameter has a value: closed forms evaluated
//! (exactly when rational), the independent numeric sums with their error bounds, mean and
//! variance derived with propagated bounds, and the tail law's numbers with its check at a
//! large k.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, Zero};
use rug::ops::Pow;
use rug::{Float, Rational};

use super::hypergeometric::RisingForm;
use super::numeric_sum::{moment_sums, Bounded, MomentSums, NumericRule, SumFailure};
use super::report::{
    AnalysisRequest, Finiteness, Moment, Normalization, NumberReport, TailCheck, TailNumbers,
};
use super::symbolic::Expr;
use super::tail::{numeric_corrections, Tail};
use crate::algebra::Q;
use crate::closed_form::ClosedForm;
use crate::model::Problem;
use crate::numeric::{
    bits_for_digits, decimal, evaluate_closed_form, to_rug_rational, LogReal, GUARD_BITS,
};
use crate::solve::{Solution, SupportEnd};

/// The numbers of the total, mean and variance, from closed forms and from numeric sums.
pub(super) struct Numbers {
    pub(super) total: Option<Bounded>,
    mean: Option<Bounded>,
    variance: Option<Bounded>,
    sums_method: Option<String>,
    pub(super) failure: Option<SumFailure>,
    closed_total: Option<Bounded>,
    closed_mean: Option<Bounded>,
    closed_variance: Option<Bounded>,
}

/// An exact or MPFR value of a closed-form expression.
pub(super) fn evaluate_expr(
    e: &Expr,
    values: &BTreeMap<String, Q>,
    digits: u32,
) -> Option<Bounded> {
    let prec = bits_for_digits(digits + 2) + GUARD_BITS;
    if let Some(r) = e.as_rational() {
        let q = r.eval(values).ok()?;
        return Some(Bounded::exact(to_rug_rational(&q), prec));
    }
    // Cancellation between terms: retry with more bits until the bound is small.
    let mut extra = 32u32;
    for _ in 0..6 {
        let (value, error) = e.to_float(values, prec + extra)?;
        if !value.is_finite() || !error.is_finite() {
            return None; // beyond MPFR's exponent range
        }
        let rel = if value.is_zero() {
            Float::with_val(64, f64::INFINITY)
        } else {
            Float::with_val(64, &error / &value).abs()
        };
        if rel < Float::with_val(64, Float::i_exp(1, -(bits_for_digits(digits + 2) as i32))) {
            return Some(Bounded {
                value,
                error,
                exact: None,
            });
        }
        extra *= 2;
    }
    None
}

/// mean = S1/S0 and variance = S2/S0 − mean², with propagated bounds (exact when the sums are).
fn derived(sums: &MomentSums) -> (Option<Bounded>, Option<Bounded>) {
    let [s0, s1, s2] = &sums.sums;
    let Some(s0) = s0 else {
        return (None, None);
    };
    // The terms cancel (or cannot be told from cancelling): S1/S0 has no value.
    if total_vanishes(s0) {
        return (None, None);
    }
    let prec = s0.value.prec();
    let mean = s1.as_ref().map(|s1| {
        if let (Some(a), Some(b)) = (&s1.exact, &s0.exact) {
            return Bounded::exact(Rational::from(a / b), prec);
        }
        let value = Float::with_val(prec, &s1.value / &s0.value);
        let denom = Float::with_val(64, s0.value.abs_ref()) - &s0.error;
        let error = (Float::with_val(64, &s1.error)
            + Float::with_val(64, value.abs_ref()) * &s0.error)
            / denom;
        // plus the division's rounding
        let error = error
            + Float::with_val(64, value.abs_ref())
                * Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
        Bounded {
            value,
            error,
            exact: None,
        }
    });
    let variance = match (s2, &mean) {
        (Some(s2), Some(m)) => {
            if let (Some(a), Some(b), Some(mq)) = (&s2.exact, &s0.exact, &m.exact) {
                let e2 = Rational::from(a / b);
                let v = e2 - Rational::from(mq * mq);
                Some(Bounded::exact(v, prec))
            } else {
                let e2 = Float::with_val(prec, &s2.value / &s0.value);
                let denom = Float::with_val(64, s0.value.abs_ref()) - &s0.error;
                let e2_err = (Float::with_val(64, &s2.error)
                    + Float::with_val(64, e2.abs_ref()) * &s0.error)
                    / denom;
                let value =
                    Float::with_val(prec, &e2 - Float::with_val(prec, m.value.square_ref()));
                let ulp = Float::with_val(64, Float::i_exp(1, 2 - prec as i32));
                let error = e2_err
                    + (Float::with_val(64, m.value.abs_ref()) * 2u32 + &m.error) * &m.error
                    + Float::with_val(64, e2.abs_ref()) * &ulp * 2u32;
                Some(Bounded {
                    value,
                    error,
                    exact: None,
                })
            }
        }
        _ => None,
    };
    (mean, variance)
}

/// True when the total is 0, or its error bound does not exclude 0: the mean S1/S0 and the
/// normalising a(b) = 1/S0 are then undefined (e.g. a(k)/a(k−1) = k − 3 from k = 2: 1 − 1 + 0).
pub(super) fn total_vanishes(total: &Bounded) -> bool {
    match &total.exact {
        Some(q) => *q == 0,
        None => total.value.is_zero() || Float::with_val(64, total.value.abs_ref()) <= total.error,
    }
}

/// Most digits a retry of the numeric sums may add beyond those asked for.
const MAX_LOST_DIGITS: f64 = 300.0;

/// How many decimal digits `b` falls short of `digits` significant ones (0 when it has them,
/// and when its value is 0, which a retry at 12 more digits may still separate from 0). An
/// estimate that only picks the working precision of a retry: no reported digit depends on
/// this f64.
fn digits_lost(b: &Bounded, digits: u32) -> f64 {
    if b.exact.is_some() {
        return 0.0;
    }
    let relative = b.relative_error();
    if !relative.is_finite() || relative.is_zero() {
        return 0.0;
    }
    (relative.log10().to_f64() + f64::from(digits) + 1.0).max(0.0)
}

fn good_enough(b: &Option<Bounded>, digits: u32) -> bool {
    match b {
        None => true,
        Some(b) => {
            b.exact.is_some()
                || b.relative_error()
                    <= Float::with_val(64, Float::i_exp(1, -(bits_for_digits(digits + 1) as i32)))
        }
    }
}

impl Numbers {
    pub(super) fn compute(
        form: &RisingForm,
        solution: &Solution,
        request: &AnalysisRequest,
        normalization: &Normalization,
        mean: &Moment,
        variance: &Moment,
    ) -> Numbers {
        let values = &solution.values;
        let digits = request.digits;
        let rule = NumericRule {
            form: form.substituted(values),
            base_index: solution.base_index.clone(),
            last: match &solution.support.last {
                SupportEnd::At(n) => Some(n.clone()),
                SupportEnd::Symbolic { last, .. } => last
                    .eval(values)
                    .ok()
                    .filter(|q| q.is_integer() && q.to_integer() >= solution.base_index)
                    .map(|q| q.to_integer()),
                SupportEnd::Infinite => None,
            },
        };
        let mut out = Numbers {
            total: None,
            mean: None,
            variance: None,
            sums_method: None,
            failure: None,
            closed_total: normalization
                .closed_form
                .as_ref()
                .filter(|_| normalization.finiteness == Finiteness::Finite)
                .and_then(|(e, _)| evaluate_expr(e, values, digits)),
            closed_mean: mean
                .closed_form
                .as_ref()
                .filter(|_| mean.finiteness == Finiteness::Finite)
                .and_then(|(e, _)| evaluate_expr(e, values, digits)),
            closed_variance: variance
                .closed_form
                .as_ref()
                .filter(|_| variance.finiteness == Finiteness::Finite)
                .and_then(|(e, _)| evaluate_expr(e, values, digits)),
        };
        let mut work = digits + 2;
        let mut last_lost = f64::INFINITY;
        for _ in 0..5 {
            match moment_sums(&rule, work) {
                Ok(sums) => {
                    let (m, v) = derived(&sums);
                    let total = sums.sums[0].clone();
                    let ok = good_enough(&total, digits)
                        && good_enough(&m, digits)
                        && good_enough(&v, digits);
                    out.sums_method = Some(sums.method.describe());
                    out.total = total;
                    out.mean = m;
                    out.variance = v;
                    if ok {
                        break;
                    }
                    // Cancellation (in the variance, or between terms of both signs): ask for
                    // the digits lost, at least 12 more. Past MAX_LOST_DIGITS, or when a retry
                    // gained nothing, the bounded values stand as they are (an alternating sum
                    // of 940,000 terms, five sums of a second each that all fell short alike).
                    let lost = [&out.total, &out.mean, &out.variance]
                        .into_iter()
                        .flatten()
                        .map(|b| digits_lost(b, digits))
                        .fold(0.0, f64::max);
                    if lost > MAX_LOST_DIGITS || lost >= last_lost - 1.0 {
                        // Too many digits lost, or the last retry gained none (the loss is
                        // not rounding, which precision would cure).
                        break;
                    }
                    last_lost = lost;
                    work = (digits + 2 + lost.ceil() as u32 + 3).max(work + 12);
                }
                Err(e) => {
                    out.failure = Some(e);
                    break;
                }
            }
        }
        out
    }

    pub(super) fn apply(
        &self,
        normalization: &mut Normalization,
        mean: &mut Moment,
        variance: &mut Moment,
        digits: u32,
    ) {
        if let Some(failure) = &self.failure {
            normalization.numeric_note = Some(match failure {
                SumFailure::Divergent(why) | SumFailure::Unsupported(why) => why.clone(),
            });
        }
        let zero_total = self
            .closed_total
            .as_ref()
            .or(self.total.as_ref())
            .is_some_and(total_vanishes);
        if zero_total {
            let why = "the terms sum to 0, and the moments divide by the total";
            for m in [&mut *mean, &mut *variance] {
                if !matches!(m.finiteness, Finiteness::Infinite(_)) {
                    m.finiteness = Finiteness::Undefined(why.into());
                }
            }
        }
        let method = self.sums_method.clone().unwrap_or_default();
        let theorem = normalization
            .closed_form
            .as_ref()
            .map(|(_, th)| format!("closed form by {}", th.name()));
        normalization.value = report(
            self.closed_total.as_ref(),
            self.total.as_ref(),
            &method,
            theorem,
            digits,
        );
        mean.value = report(
            self.closed_mean.as_ref(),
            self.mean.as_ref(),
            &method,
            None,
            digits,
        );
        variance.value = report(
            self.closed_variance.as_ref(),
            self.variance.as_ref(),
            &method,
            None,
            digits,
        );
        if let Some(total) = self.closed_total.as_ref().or(self.total.as_ref()) {
            if zero_total {
                if normalization.base_value.is_some() {
                    normalization.base_value = None;
                    normalization.numeric_note =
                        Some("the total is 0, so no a(b) makes it 1".into());
                }
                return;
            }
            if let Some((expr, _)) = &normalization.base_value {
                let prec = total.value.prec();
                let inv = match &total.exact {
                    Some(q) if *q != 0 => Bounded::exact(Rational::from(q.recip_ref()), prec),
                    _ => {
                        let value = Float::with_val(prec, total.value.recip_ref());
                        let denom = Float::with_val(64, total.value.abs_ref()) - &total.error;
                        let error = Float::with_val(64, &total.error)
                            / Float::with_val(64, denom.square_ref())
                            + Float::with_val(64, value.abs_ref())
                                * Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
                        Bounded {
                            value,
                            error,
                            exact: None,
                        }
                    }
                };
                let method = if expr.is_some() {
                    "1 / closed form"
                } else {
                    "1 / numeric total"
                };
                normalization.base_value =
                    Some((expr.clone(), Some(number(&inv, method, None, digits))));
            }
        }
    }
}

pub(super) fn number(
    b: &Bounded,
    method: &str,
    check: Option<String>,
    digits: u32,
) -> NumberReport {
    let (value, exact) = match &b.exact {
        Some(q) => (
            decimal::rational_to_decimal(q, digits),
            Some(if *q.denom() == 1 {
                q.numer().to_string()
            } else {
                q.to_string()
            }),
        ),
        None => (decimal::float_to_decimal(&b.value, digits), None),
    };
    NumberReport {
        value,
        exact,
        error_bound: if b.exact.is_some() {
            "0".into()
        } else {
            decimal::short(&b.error)
        },
        method: method.to_string(),
        check,
    }
}

/// The reported number: the closed form's value when there is one (checked against the
/// numeric sum), otherwise the numeric sum.
fn report(
    closed: Option<&Bounded>,
    summed: Option<&Bounded>,
    sum_method: &str,
    closed_method: Option<String>,
    digits: u32,
) -> Option<NumberReport> {
    match (closed, summed) {
        (Some(c), s) => {
            let check = s.map(|s| {
                let diff = Float::with_val(c.value.prec(), &c.value - &s.value);
                let rel = if c.value.is_zero() {
                    diff.abs()
                } else {
                    Float::with_val(64, &diff / &c.value).abs()
                };
                decimal::short(&rel)
            });
            let method = closed_method.unwrap_or_else(|| "closed form".into());
            Some(number(c, &method, check, digits))
        }
        (None, Some(s)) => Some(number(s, sum_method, None, digits)),
        (None, None) => None,
    }
}

/// Numbers of the tail law, and its check against the closed form at a large k.
pub(super) fn tail_numbers(
    form: &RisingForm,
    problem: &Problem,
    solution: &Solution,
    request: &AnalysisRequest,
    law: &Tail,
    total: Option<&Bounded>,
) -> Option<TailNumbers> {
    let values = &solution.values;
    let digits = request.digits;
    let rate = law.rate.eval(values).ok()?;
    let power = law.power.eval(values).ok()?;
    let corrections = numeric_corrections(form, values, request.terms + 1)?;
    let prefactor_form = ClosedForm {
        sequence: problem.sequence.clone(),
        base_index: BigInt::zero(),
        product: law.prefactor.clone(),
    };
    let c = evaluate_closed_form(
        &prefactor_form,
        &BigInt::zero(),
        values,
        &Rational::from(1),
        digits + 5,
    )
    .ok()?;
    let c_shown = match (request.normalize, total) {
        (true, Some(t)) => {
            let prec = c.ln_abs.prec().max(t.value.prec());
            let inv = LogReal::from_scaled(&Float::with_val(prec, t.value.recip_ref()), 0, prec);
            c.mul(&inv)
        }
        _ => c.clone(),
    };
    let check = tail_check(
        solution,
        law,
        &c,
        &rate,
        &power,
        &corrections,
        request.terms,
    );
    let pure_power = law.factorial_power == 0 && rate == Q::one();
    // Decimal exponents beyond 10^17 do not print; such a C is shown by its logarithm.
    let printable = Float::with_val(64, c_shown.ln_abs.abs_ref()) < 1e17f64;
    let prefactor = if printable {
        c_shown.to_decimal(digits)
    } else {
        let sign = if c_shown.sign < 0 { "-" } else { "" };
        format!(
            "{sign}exp({})",
            decimal::float_to_decimal(&c_shown.ln_abs, digits)
        )
    };
    Some(TailNumbers {
        rate: rate.to_string(),
        power: power.to_string(),
        tail_exponent: pure_power.then(|| (-power.clone()).to_string()),
        prefactor,
        corrections: corrections[1..=request.terms.min(corrections.len() - 1)]
            .iter()
            .map(|q| q.to_string())
            .collect(),
        check,
    })
}

/// a(k) from the closed form (MPFR log-Gamma) against C r^k (k/e)^(dk) k^θ (1 + Σ c_n/k^n)
/// at k = b + 10^6.
fn tail_check(
    solution: &Solution,
    law: &Tail,
    c: &LogReal,
    rate: &Q,
    power: &Q,
    corrections: &[Q],
    terms: usize,
) -> Option<TailCheck> {
    let k = &solution.base_index + BigInt::from(1_000_000u32);
    let direct = evaluate_closed_form(
        &solution.closed_form,
        &k,
        &solution.values,
        &Rational::from(1),
        40,
    )
    .ok()?;
    let prec = direct.ln_abs.prec().max(c.ln_abs.prec()) + 64;
    let kf = Float::with_val(prec, crate::numeric::to_rug_integer(&k));
    let ln_k = Float::with_val(prec, kf.ln_ref());
    let mut ln_abs = Float::with_val(prec, &c.ln_abs);
    let mut sign = c.sign;
    if !rate.is_zero() {
        let r = LogReal::from_rational(&to_rug_rational(rate), prec);
        ln_abs += Float::with_val(prec, &r.ln_abs * &kf);
        if r.sign < 0 && (&k % 2u32) == BigInt::one() {
            sign = -sign;
        }
    }
    let d = law.factorial_power;
    if d != 0 {
        ln_abs += Float::with_val(prec, &kf * Float::with_val(prec, &ln_k - 1u32)) * d;
    }
    ln_abs += Float::with_val(prec, &ln_k * Float::with_val(prec, to_rug_rational(power)));
    let mut series = Float::with_val(prec, 1);
    let mut k_pow = Float::with_val(prec, 1);
    for c_n in corrections.iter().skip(1).take(terms) {
        k_pow /= &kf;
        series += Float::with_val(prec, &k_pow * Float::with_val(prec, to_rug_rational(c_n)));
    }
    if series.is_sign_negative() {
        sign = -sign;
    }
    ln_abs += series.abs().ln();
    let expansion = LogReal { sign, ln_abs };
    let rel = direct.rel_diff(&expansion, 64);
    let next = corrections.get(terms + 1).cloned().unwrap_or_else(Q::zero);
    let next_size = Float::with_val(64, to_rug_rational(&next.abs()))
        / Float::with_val(64, crate::numeric::to_rug_integer(&k)).pow((terms + 1) as u32);
    Some(TailCheck {
        k,
        rel_diff: decimal::short(&rel),
        next_term: decimal::short(&next_size),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn bounded(value: f64, error: f64) -> Bounded {
        Bounded {
            value: Float::with_val(64, value),
            error: Float::with_val(64, error),
            exact: None,
        }
    }

    #[test]
    fn digits_lost_counts_the_decimal_digits_a_sum_falls_short() {
        // A relative error of 10^−20 against 30 digits asked for (good to 10^−31): about 11
        // digits short; within the target, none; an exact or zero value gives no estimate.
        let lost = digits_lost(&bounded(2.0, 2e-20), 30);
        assert!((lost - 11.0).abs() < 1e-9, "{lost}");
        assert_eq!(digits_lost(&bounded(2.0, 2e-40), 30), 0.0);
        assert_eq!(digits_lost(&bounded(0.0, 1e-5), 30), 0.0);
        assert_eq!(digits_lost(&Bounded::exact(Rational::from(3), 64), 30), 0.0);
        // A sum whose error is as large as itself is short of every digit asked for, and
        // more: past MAX_LOST_DIGITS no retry is attempted.
        assert!(digits_lost(&bounded(1e-300, 1e10), 30) > MAX_LOST_DIGITS);
    }
}
