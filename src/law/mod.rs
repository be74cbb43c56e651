//! The rule as a probability law over k ≥ k_min, for `fit` and `sample`:
//! `p(k) = a(k) / Σ_{j≥k_min} a(j)`, the total from the closed-form sum of the
//! hypergeometric series when a theorem gives one (Gauss, Chu–Vandermonde, binomial,
//! exponential, logarithm), otherwise the numeric sum with its error bound.
//!
//! [`LawFamily`] is prepared once per rule and `k_min` (the symbolic series and its closed
//! form); [`LawFamily::at`] substitutes a parameter point, checks that the terms are
//! non-negative and summable there, and gives the total. [`LawAt::log_ratios`] gives
//! `ln a(k)/a(k_min)` at the observed k in double precision (see `logpmf.rs`).

pub(crate) mod logpmf;

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};
use rug::Float;

use crate::algebra::Q;
use crate::analysis::numeric_sum::{moment_sums, NumericRule, SumFailure};
use crate::analysis::{closed_sum, HyperSeries, RisingForm, Term, Theorem};
use crate::model::{Param, Problem};

/// Bits of the closed-form total (its value feeds a double-precision log-likelihood).
const TOTAL_BITS: u32 = 128;
/// Digits of a numeric total.
const NUMERIC_DIGITS: u32 = 17;

/// How the total Σ_{k≥k_min} a(k)/a(k_min) was found.
#[derive(Clone, Debug, PartialEq)]
pub enum TotalRoute {
    Closed(Theorem),
    Numeric(String),
}

impl TotalRoute {
    pub fn describe(&self) -> String {
        match self {
            TotalRoute::Closed(theorem) => format!("closed form by {}", theorem.name()),
            TotalRoute::Numeric(method) => format!("numeric sum: {method}"),
        }
    }
}

/// Why the rule is not a probability law at a parameter point.
#[derive(Clone, Debug, PartialEq)]
pub enum LawError {
    /// Some a(k) is negative, or R(k) divides by zero inside the support.
    NotAProbability(String),
    /// The total is infinite.
    Divergent(String),
    /// A case we cannot evaluate.
    Unsupported(String),
}

impl LawError {
    pub fn message(&self) -> &str {
        match self {
            LawError::NotAProbability(m) | LawError::Divergent(m) | LawError::Unsupported(m) => m,
        }
    }
}

/// The rule with `k_min`, prepared for evaluation at many parameter points.
#[derive(Clone, Debug)]
pub struct LawFamily {
    pub form: RisingForm,
    pub k_min: i64,
    pub params: Vec<Param>,
    closed: Option<(Term, Theorem)>,
}

/// The law at one parameter point.
#[derive(Clone, Debug)]
pub struct LawAt {
    pub values: BTreeMap<String, Q>,
    pub k_min: i64,
    /// The last k of a finite support.
    pub last: Option<i64>,
    /// ln Σ_{k≥k_min} a(k)/a(k_min).
    pub ln_total: f64,
    /// The total in MPFR, with a bound on its relative error.
    pub total: Float,
    pub total_rel_error: f64,
    pub route: TotalRoute,
    /// R(k) = constant · Π (k + shift)^exponent in double precision.
    constant: f64,
    shifts: Vec<(f64, i32)>,
    /// The large-k law when the tail is a power law: a(k) ~ C k^θ with θ given here.
    pub power: Option<f64>,
}

impl LawFamily {
    /// `k_min` defaults to the base index b; a `k_min` below b is b.
    pub fn new(problem: &Problem, k_min: Option<i64>) -> Result<LawFamily, LawError> {
        let base = problem
            .base_index()
            .to_i64()
            .ok_or_else(|| LawError::Unsupported("the base index is too large".into()))?;
        let k_min = k_min.map_or(base, |k| k.max(base));
        let form = RisingForm::from_ratio(&problem.ratio);
        let series = HyperSeries::of_sum(&form, &BigInt::from(k_min));
        let closed = closed_sum(&series);
        Ok(LawFamily {
            form,
            k_min,
            params: problem.params.clone(),
            closed,
        })
    }

    /// The total Σ_{k≥k_min} a(k)/a(k_min) in closed form with its theorem, when one applies.
    pub fn closed_total(&self) -> Option<&(Term, Theorem)> {
        self.closed.as_ref()
    }

    /// The law at `values` (every parameter given).
    pub fn at(&self, values: &BTreeMap<String, Q>) -> Result<LawAt, LawError> {
        let form = self.form.substituted(values);
        let missing = || LawError::Unsupported("a parameter has no value".into());
        let constant = form.constant.as_constant().ok_or_else(missing)?;
        let shifts: Vec<(Q, i32)> = form
            .factors
            .iter()
            .map(|(s, e)| Some((s.as_constant()?, *e)))
            .collect::<Option<_>>()
            .ok_or_else(missing)?;
        let last = support_end(&shifts, self.k_min)?;
        let constant_f = constant.to_f64().unwrap_or(f64::NAN);
        let shifts_f: Vec<(f64, i32)> = shifts
            .iter()
            .map(|(s, e)| (s.to_f64().unwrap_or(f64::NAN), *e))
            .collect();
        check_signs(&constant, &shifts, self.k_min, last)?;
        let power = if last.is_none() {
            convergence(&constant, &shifts)?
        } else {
            None
        };
        let (total, rel_error, route) = self.total(values, &form, last)?;
        let ln_total = Float::with_val(64, total.ln_ref()).to_f64();
        Ok(LawAt {
            values: values.clone(),
            k_min: self.k_min,
            last,
            ln_total,
            total,
            total_rel_error: rel_error,
            route,
            constant: constant_f,
            shifts: shifts_f,
            power,
        })
    }

    fn total(
        &self,
        values: &BTreeMap<String, Q>,
        form: &RisingForm,
        last: Option<i64>,
    ) -> Result<(Float, f64, TotalRoute), LawError> {
        if let Some((term, theorem)) = &self.closed {
            if let Some(v) = term.to_float(values, TOTAL_BITS) {
                if v.is_finite() && v.is_sign_positive() && !v.is_zero() {
                    // A short MPFR product: a few roundings of 2^(1−128) (common practice).
                    return Ok((v, 1e-35, TotalRoute::Closed(*theorem)));
                }
            }
        }
        if let Some(found) = self.direct_sum(form, last) {
            return Ok(found);
        }
        let rule = NumericRule {
            form: form.clone(),
            base_index: BigInt::from(self.k_min),
            last: last.map(BigInt::from),
        };
        let sums = moment_sums(&rule, NUMERIC_DIGITS).map_err(|e| match e {
            SumFailure::Divergent(why) => LawError::Divergent(why),
            SumFailure::Unsupported(why) => LawError::Unsupported(why),
        })?;
        let total = sums.sums[0]
            .clone()
            .ok_or_else(|| LawError::Divergent("the total diverges".into()))?;
        let rel = total.relative_error().to_f64();
        Ok((
            total.value,
            rel,
            TotalRoute::Numeric(sums.method.describe()),
        ))
    }
}

impl LawFamily {
    /// Σ a(k)/a(k_min) in double for a finite support or terms that decay geometrically or
    /// faster: the exact rational sums of `numeric_sum` grow huge denominators at the
    /// double-valued points an optimiser visits. Summed until the terms fall below 10^-18 of
    /// the sum with R(k) < 1/2, past every sign change, so the rest is below a geometric
    /// series of ratio 1/2 (R(k) decreases there for d < 0 and tends to |c| < 1/2 for d = 0;
    /// a slower geometric decay is left to the numeric sum). None when this does not apply.
    fn direct_sum(&self, form: &RisingForm, last: Option<i64>) -> Option<(Float, f64, TotalRoute)> {
        const MAX_TERMS: i64 = 10_000_000;
        let constant = form.constant.as_constant()?.to_f64()?;
        let shifts: Vec<(f64, i32)> = form
            .factors
            .iter()
            .map(|(s, e)| Some((s.as_constant()?.to_f64()?, *e)))
            .collect::<Option<_>>()?;
        let d: i64 = shifts.iter().map(|(_, e)| *e as i64).sum();
        if last.is_none() && !(d < 0 || (d == 0 && constant.abs() < 0.5)) {
            return None;
        }
        let turn = shifts
            .iter()
            .map(|(s, _)| (-s).ceil() as i64 + 1)
            .max()
            .unwrap_or(self.k_min)
            .max(self.k_min + 1);
        let mut term = 1.0f64;
        let mut sum = 1.0f64;
        let mut k = self.k_min;
        loop {
            if last.is_some_and(|l| k >= l) {
                break;
            }
            if k - self.k_min > MAX_TERMS || !sum.is_finite() {
                return None;
            }
            k += 1;
            let r = logpmf::ratio_at(constant, &shifts, k);
            term *= r;
            sum += term;
            if last.is_none() && k > turn && r < 0.5 && term.abs() < 1e-18 * sum.abs() {
                break;
            }
        }
        if !(sum.is_finite() && sum > 0.0) {
            return None;
        }
        let terms = k - self.k_min + 1;
        // Rounding: about one unit 2^-53 per factor and step, relative (common practice).
        let rel = (terms as f64) * (shifts.len() as f64 + 2.0) * f64::EPSILON + 2e-18;
        let method = if last.is_some() {
            format!("{terms} terms summed in double precision")
        } else {
            format!("{terms} terms summed in double precision; the rest below a geometric series of ratio 1/2")
        };
        Some((
            Float::with_val(TOTAL_BITS, sum),
            rel,
            TotalRoute::Numeric(method),
        ))
    }
}

impl LawAt {
    /// `ln a(k)/a(k_min)` for increasing k ≥ k_min inside the support.
    pub fn log_ratios(&self, ks: &[i64]) -> Vec<f64> {
        logpmf::log_ratios(self.constant, &self.shifts, self.k_min, ks)
    }

    /// R(k) in double precision.
    pub fn ratio_at(&self, k: i64) -> f64 {
        logpmf::ratio_at(self.constant, &self.shifts, k)
    }
}

/// The last k with a(k) ≠ 0: a numerator factor k + s vanishing at an integer k > k_min.
/// A denominator factor vanishing inside the support makes the rule undefined there.
fn support_end(shifts: &[(Q, i32)], k_min: i64) -> Result<Option<i64>, LawError> {
    let mut last: Option<BigInt> = None;
    for (s, e) in shifts {
        if *e > 0 && s.is_integer() {
            let root: BigInt = -s.to_integer();
            if root > BigInt::from(k_min) {
                let end: BigInt = root - 1;
                last = Some(last.map_or(end.clone(), |l: BigInt| l.min(end)));
            }
        }
    }
    for (s, e) in shifts {
        if *e < 0 && s.is_integer() {
            let root: BigInt = -s.to_integer();
            let inside = root > BigInt::from(k_min) && last.as_ref().map_or(true, |l| root <= *l);
            if inside {
                return Err(LawError::NotAProbability(format!(
                    "R(k) divides by zero at k = {root}"
                )));
            }
        }
    }
    last.map(|l| {
        l.to_i64()
            .ok_or_else(|| LawError::Unsupported("the support is too long".into()))
    })
    .transpose()
}

/// Every a(k) ≥ 0: R(k) > 0 up to where every factor is positive, and then the constant.
fn check_signs(
    constant: &Q,
    shifts: &[(Q, i32)],
    k_min: i64,
    last: Option<i64>,
) -> Result<(), LawError> {
    if constant.is_zero() {
        return Err(LawError::NotAProbability("R(k) is identically 0".into()));
    }
    // Beyond the largest root every factor k + s is positive.
    let mut turn = k_min + 1;
    for (s, _) in shifts {
        let root = (-s).ceil().to_integer().to_i64().unwrap_or(i64::MAX);
        turn = turn.max(root.saturating_add(1));
    }
    let end = last.map_or(turn, |l| l.min(turn));
    // The sign of R(k) changes only where k passes a root −s of a factor: checking the first
    // k, and each integer on either side of every root, covers every run of equal signs
    // (a scan of every k made a binomial with a large N cost N rational steps per point).
    let mut candidates: Vec<i64> = vec![k_min + 1, end];
    for (s, _) in shifts {
        let below = (-s).floor().to_integer().to_i64().unwrap_or(i64::MAX);
        candidates.push(below);
        candidates.push(below.saturating_add(1));
    }
    candidates.retain(|k| *k > k_min && *k <= end);
    candidates.sort_unstable();
    candidates.dedup();
    for k in candidates {
        let kq = Q::from_integer(k.into());
        let mut negative = constant.is_negative();
        for (s, e) in shifts {
            let x = &kq + s;
            if x.is_zero() {
                continue;
            }
            if x.is_negative() && e % 2 != 0 {
                negative = !negative;
            }
        }
        if negative {
            return Err(LawError::NotAProbability(format!(
                "R({k}) < 0, so a({k}) and a({}) have opposite signs",
                k - 1
            )));
        }
    }
    if last.is_none() && constant.is_negative() {
        return Err(LawError::NotAProbability(
            "the constant of R(k) is negative: the terms alternate in sign".into(),
        ));
    }
    Ok(())
}

/// Whether Σ a(k) converges for an infinite support, and θ of a power-law tail.
fn convergence(constant: &Q, shifts: &[(Q, i32)]) -> Result<Option<f64>, LawError> {
    let d: i64 = shifts.iter().map(|(_, e)| *e as i64).sum();
    if d > 0 {
        return Err(LawError::Divergent(format!(
            "R(k) grows like k^{d}, so the terms grow without bound"
        )));
    }
    if d < 0 {
        return Ok(None);
    }
    let c = constant.abs();
    if c > Q::one() {
        return Err(LawError::Divergent(format!(
            "the terms grow geometrically (rate {constant})"
        )));
    }
    if c < Q::one() {
        return Ok(None);
    }
    // ln R(k) = Σ e·ln(1 + s/k) = (Σ e·s)/k + O(1/k²), so a(k) ~ C k^θ with θ = Σ e·s.
    let theta: Q = shifts
        .iter()
        .map(|(s, e)| s * Q::from_integer((*e).into()))
        .sum();
    if theta >= -Q::one() {
        return Err(LawError::Divergent(format!(
            "the tail falls like k^{theta}, too slowly to sum (it needs an exponent below −1)"
        )));
    }
    Ok(Some(theta.to_f64().unwrap_or(f64::NAN)))
}
