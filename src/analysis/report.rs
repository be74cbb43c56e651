//! Puts the analyses together for one solved rule: the tail law, the total, the mean and the
//! variance, symbolic where a theorem applies, with numbers (and their error bounds) when
//! every parameter has a value.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, Zero};
use rug::ops::Pow;
use rug::{Float, Rational};

use super::conditions::{Inequality, Requirement, Verdict};
use super::hypergeometric::{HyperSeries, RisingForm};
use super::moments::closed_moments;
use super::numeric_sum::{moment_sums, Bounded, MomentSums, NumericRule, SumFailure};
use super::sums::{closed_sum, Theorem};
use super::symbolic::{Expr, Term};
use super::tail::{numeric_corrections, tail_law, Tail};
use crate::algebra::{RatFunc, Q};
use crate::closed_form::ClosedForm;
use crate::diagnostic::Diagnostic;
use crate::model::Problem;
use crate::numeric::{
    bits_for_digits, decimal, evaluate_closed_form, to_rug_rational, LogReal, GUARD_BITS,
};
use crate::solve::{Solution, SupportEnd};

#[derive(Clone, Debug)]
pub struct AnalysisRequest {
    /// Correction terms c₁…c_N of the tail law.
    pub terms: usize,
    /// Significant digits of every number.
    pub digits: u32,
    /// Choose a(b) so that the total is 1.
    pub normalize: bool,
}

impl Default for AnalysisRequest {
    fn default() -> Self {
        AnalysisRequest {
            terms: 2,
            digits: 30,
            normalize: false,
        }
    }
}

/// Finite, infinite (with the failed condition) or not decided.
#[derive(Clone, Debug, PartialEq)]
pub enum Finiteness {
    Finite,
    Infinite(String),
    Undecided,
}

/// A number to `digits` digits with its provenance.
#[derive(Clone, Debug, PartialEq)]
pub struct NumberReport {
    pub value: String,
    /// The exact rational, when it is one (`7/5`).
    pub exact: Option<String>,
    /// Bound on the absolute error of `value` before rounding to `digits` digits.
    pub error_bound: String,
    pub method: String,
    /// The independent numeric sum's relative difference from the closed form, when both exist.
    pub check: Option<String>,
}

#[derive(Clone, Debug)]
pub struct TailCheck {
    pub k: BigInt,
    /// |a(k) / expansion − 1| with the closed form's a(k).
    pub rel_diff: String,
    /// |c_{N+1}| / k^(N+1): the size the difference should have.
    pub next_term: String,
}

#[derive(Clone, Debug)]
pub struct TailNumbers {
    pub rate: String,
    pub power: String,
    /// γ = −θ when the law is a pure power (r = 1, no factorial part).
    pub tail_exponent: Option<String>,
    pub prefactor: String,
    pub corrections: Vec<String>,
    pub check: Option<TailCheck>,
}

#[derive(Clone, Debug)]
pub struct TailReport {
    pub law: Tail,
    /// The prefactor with a(b) chosen by `--normalize` (C divided by the total, which may
    /// bring exp or ln factors).
    pub normalized_prefactor: Option<Term>,
    /// The law holds only when the support is infinite (its end depends on the parameters).
    pub conditional: bool,
    pub numbers: Option<TailNumbers>,
}

#[derive(Clone, Debug)]
pub struct Normalization {
    pub base_index: BigInt,
    /// Σ_{k≥b} a(k) = a(b) · series.
    pub series: HyperSeries,
    /// The series' sum in closed form and the theorem that gave it.
    pub closed_form: Option<(Expr, Theorem)>,
    pub requirements: Vec<Requirement>,
    pub finiteness: Finiteness,
    /// The total with a(b) = 1.
    pub value: Option<NumberReport>,
    /// With `--normalize`: a(b) = 1/series, symbolically and as a number.
    pub base_value: Option<(Option<Expr>, Option<NumberReport>)>,
    pub finite_support: bool,
    /// Why no number was given although the parameters are numeric.
    pub numeric_note: Option<String>,
}

#[derive(Clone, Debug)]
pub struct Moment {
    pub closed_form: Option<(Expr, Vec<Theorem>)>,
    pub requirements: Vec<Requirement>,
    pub finiteness: Finiteness,
    pub value: Option<NumberReport>,
}

#[derive(Clone, Debug)]
pub struct Analysis {
    pub index: String,
    pub sequence: String,
    pub digits: u32,
    pub normalize: bool,
    pub tail: Option<TailReport>,
    pub normalization: Normalization,
    pub mean: Moment,
    pub variance: Moment,
}

/// Purposes of the three convergence requirements.
const PURPOSES: [&str; 3] = [
    "the total Σ a(k) converges",
    "Σ k·a(k) converges (finite mean)",
    "Σ k²·a(k) converges (finite variance)",
];

/// When `Σ k^j a(k)` converges, from the tail law: factorial decay always, factorial growth
/// never, geometric when |r| < 1, and for r = 1 when θ + j < −1 (comparison with Σ k^s,
/// common practice); r = −1 needs θ + j < 0 (alternating series test).
/// `None` when it always converges.
fn convergence(tail: &Tail, j: i64) -> Option<Inequality> {
    let d = tail.factorial_power;
    if d > 0 {
        return Some(Inequality::Never(format!(
            "R(k) grows like k^{d}: the terms grow factorially"
        )));
    }
    if d < 0 {
        return None;
    }
    let shifted = &tail.power + &RatFunc::from_integer(j);
    let terms = ["a(k)", "k·a(k)", "k²·a(k)"][j.clamp(0, 2) as usize];
    // A numeric exponent is decided here, with the reason in words.
    let decided = |expr: RatFunc, bound: i64| -> Option<Inequality> {
        match expr.as_constant() {
            Some(e) if e < Q::from_integer(bound.into()) => None,
            Some(e) => Some(Inequality::Never(format!(
                "{terms} ~ C·k^({e}), and {e} is not below {bound}"
            ))),
            None => Some(Inequality::Positive(&RatFunc::from_integer(bound) - &expr)),
        }
    };
    match tail.rate.as_constant() {
        Some(r) if r.is_one() => decided(shifted, -1),
        Some(r) if r == -Q::one() => decided(shifted, 0),
        Some(r) if r.abs() < Q::one() => None,
        Some(r) => Some(Inequality::Never(format!(
            "|r| = {} > 1: the terms grow geometrically",
            r.abs()
        ))),
        None => Some(Inequality::AbsBelowOne(tail.rate.clone())),
    }
}

fn finiteness(requirements: &[Requirement]) -> Finiteness {
    for r in requirements {
        if let Verdict::Fails(why) = &r.verdict {
            return Finiteness::Infinite(why.clone());
        }
    }
    if requirements
        .iter()
        .all(|r| matches!(r.verdict, Verdict::Holds(_)))
    {
        Finiteness::Finite
    } else {
        Finiteness::Undecided
    }
}

/// Runs every analysis for a solved rule.
pub fn analyse(
    problem: &Problem,
    solution: &Solution,
    request: &AnalysisRequest,
) -> Result<Analysis, Diagnostic> {
    let values = &solution.values;
    let base = solution.base_index.clone();
    // The rule as written: the solver's re-oriented copy carries its sign flips separately.
    let form = RisingForm::from_ratio(&problem.ratio);
    let numeric = problem.params.iter().all(|p| values.contains_key(&p.name));
    let (finite_support, conditional) = match &solution.support.last {
        SupportEnd::At(_) => (true, false),
        SupportEnd::Symbolic { certain, .. } => (*certain, !*certain),
        SupportEnd::Infinite => (false, false),
    };
    let law = tail_law(&form, &base, request.terms);
    let series = HyperSeries::of_sum(&form, &base);
    let closed = closed_sum(&series);
    let requirements: Vec<Vec<Requirement>> = (0..3)
        .map(|j| {
            if finite_support {
                return Vec::new();
            }
            convergence(&law, j as i64)
                .map(|i| Requirement::new(i, PURPOSES[j], values, &problem.params))
                .into_iter()
                .collect()
        })
        .collect();
    let total_finiteness = finiteness(&requirements[0]);
    let total_term = closed.as_ref().map(|(t, _)| t.clone());
    let moments = total_term
        .as_ref()
        .map(|t| closed_moments(&series, t, &base));
    // Moments need a convergent total as well as their own sum.
    let moment_requirements = |j: usize| -> Vec<Requirement> {
        let mut r = requirements[0].clone();
        r.extend(requirements[j].iter().cloned());
        r.dedup_by(|a, b| a.inequality == b.inequality);
        r
    };
    let mut normalization = Normalization {
        base_index: base.clone(),
        series: series.clone(),
        // A divergent series has no sum (Gauss's formula would sit on a pole of Γ).
        closed_form: closed
            .as_ref()
            .filter(|_| !matches!(total_finiteness, Finiteness::Infinite(_)))
            .map(|(t, th)| (Expr::from_term(t.clone()), *th)),
        requirements: requirements[0].clone(),
        finiteness: total_finiteness.clone(),
        value: None,
        base_value: None,
        finite_support,
        numeric_note: None,
    };
    let moment_finiteness = |j: usize| -> Finiteness {
        match &total_finiteness {
            Finiteness::Infinite(_) => {
                Finiteness::Infinite("the total diverges, so there is no distribution".into())
            }
            _ => finiteness(&moment_requirements(j)),
        }
    };
    let mut mean = Moment {
        closed_form: moments.as_ref().and_then(|m| m.mean.clone()),
        requirements: moment_requirements(1),
        finiteness: moment_finiteness(1),
        value: None,
    };
    let mut variance = Moment {
        closed_form: moments.as_ref().and_then(|m| m.variance.clone()),
        requirements: moment_requirements(2),
        finiteness: moment_finiteness(2),
        value: None,
    };
    let mut tail = (!finite_support).then(|| TailReport {
        law: law.clone(),
        normalized_prefactor: None,
        conditional,
        numbers: None,
    });
    if request.normalize {
        let inverse = total_term.as_ref().and_then(|t| t.inv());
        if let (Some(t), Some(inv)) = (&mut tail, &inverse) {
            t.normalized_prefactor = Some(t.law.prefactor_term.mul(inv));
        }
        normalization.base_value = Some((inverse.map(Expr::from_term), None));
    }
    if numeric {
        let numbers = Numbers::compute(&form, solution, request, &normalization, &mean, &variance);
        numbers.apply(&mut normalization, &mut mean, &mut variance, request.digits);
        if let Some(t) = &mut tail {
            t.numbers = tail_numbers(
                &form,
                problem,
                solution,
                request,
                &t.law,
                numbers.total.as_ref(),
            );
        }
    }
    Ok(Analysis {
        index: problem.index.clone(),
        sequence: problem.sequence.clone(),
        digits: request.digits,
        normalize: request.normalize,
        tail,
        normalization,
        mean,
        variance,
    })
}

/// The numbers of the total, mean and variance, from closed forms and from numeric sums.
struct Numbers {
    total: Option<Bounded>,
    mean: Option<Bounded>,
    variance: Option<Bounded>,
    sums_method: Option<String>,
    failure: Option<SumFailure>,
    closed_total: Option<Bounded>,
    closed_mean: Option<Bounded>,
    closed_variance: Option<Bounded>,
}

/// An exact or MPFR value of a closed-form expression.
fn evaluate_expr(e: &Expr, values: &BTreeMap<String, Q>, digits: u32) -> Option<Bounded> {
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
    fn compute(
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
                    // Cancellation in the variance: ask for the digits it lost.
                    work += 12;
                }
                Err(e) => {
                    out.failure = Some(e);
                    break;
                }
            }
        }
        out
    }

    fn apply(
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

fn number(b: &Bounded, method: &str, check: Option<String>, digits: u32) -> NumberReport {
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
fn tail_numbers(
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

/// The base value a(b) that makes the total 1, as an exact rational when it is one, or an
/// MPFR value with its relative error bound. For `table --normalize`.
pub fn normalizing_base_value(
    problem: &Problem,
    solution: &Solution,
    digits: u32,
) -> Result<(Bounded, String), Diagnostic> {
    let request = AnalysisRequest {
        terms: 0,
        digits: digits + 5,
        normalize: true,
    };
    let analysis = analyse(problem, solution, &request)?;
    let fail = |why: String| Diagnostic::new(why, problem.rule_span.clone());
    if let Finiteness::Infinite(why) = &analysis.normalization.finiteness {
        return Err(fail(format!("--normalize: the total diverges ({why})"))
            .with_help("only a sequence with a finite total can be normalised"));
    }
    let values = &solution.values;
    let closed = analysis
        .normalization
        .closed_form
        .as_ref()
        .and_then(|(e, _)| evaluate_expr(e, values, digits + 5));
    let total = match closed {
        Some(t) => t,
        None => {
            let form = RisingForm::from_ratio(&problem.ratio);
            let numbers = Numbers::compute(
                &form,
                solution,
                &request,
                &analysis.normalization,
                &analysis.mean,
                &analysis.variance,
            );
            match (numbers.total, numbers.failure) {
                (Some(t), _) => t,
                (None, Some(SumFailure::Divergent(why) | SumFailure::Unsupported(why))) => {
                    return Err(fail(format!(
                        "--normalize: the total cannot be computed: {why}"
                    )))
                }
                (None, None) => {
                    return Err(fail("--normalize: the total cannot be computed".into()))
                }
            }
        }
    };
    let prec = total.value.prec();
    let base = match &total.exact {
        Some(q) if *q != 0 => Bounded::exact(Rational::from(q.recip_ref()), prec),
        _ => {
            let value = Float::with_val(prec, total.value.recip_ref());
            // relative error of 1/S equals that of S to first order, plus one rounding
            let rel = total.relative_error() * 1.01f64
                + Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
            let error = Float::with_val(64, value.abs_ref()) * rel;
            Bounded {
                value,
                error,
                exact: None,
            }
        }
    };
    let method = if analysis.normalization.closed_form.is_some() {
        "closed form".to_string()
    } else {
        "numeric total".to_string()
    };
    Ok((base, method))
}
