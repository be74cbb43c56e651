//! Exact estimates where the likelihood equation has a rational solution.
//!
//! When the one free parameter θ enters the rule only through its constant,
//! `R(k) = c(θ) · g(k)` with `g` and the support free of θ, the law is a power-series family
//! in `c`: `p(k) ∝ b(k) c^(k − k_min)`. Its score is `c′(θ)/c · (Σ n_k (k − k_min) − n ·
//! E[k − k_min])`, so at an interior maximum the mean of the law equals the sample mean
//! (common practice: the power-series distributions of Noack (1950), from memory). When the
//! analysis gives the mean as a rational function of θ, `mean(θ) = x̄` is a polynomial
//! equation; a rational root of it that is the maximum the optimiser found is the estimate,
//! exactly. Poisson (`λ/k`, mean λ), geometric (`q`, mean q/(1 − q)), binomial with N given
//! and negative binomial with r given all fall here.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{ToPrimitive, Zero};

use crate::algebra::{rational_roots, RatFunc, Q};
use crate::analysis::hypergeometric::HyperSeries;
use crate::analysis::moments::closed_moments;
use crate::data::Counts;
use crate::law::LawFamily;

use super::likelihood::FreeParam;

/// How far the optimiser's estimate may be from the exact root it confirms (relative to
/// max(|θ|, 1)): the double-precision maximum is good to about 1e-8; anything further is a
/// different stationary point.
const AGREEMENT: f64 = 1e-6;

/// The exact estimate of the single free parameter, when the likelihood equation is the
/// moment equation and that has a rational root at the numerical maximum `found`.
pub fn exact_estimate(
    family: &LawFamily,
    fixed: &BTreeMap<String, Q>,
    free: &[FreeParam],
    counts: &Counts,
    found: f64,
) -> Option<Q> {
    let [param] = free else { return None };
    if param.integer {
        return None;
    }
    let theta = param.name.as_str();
    let form = &family.form;
    let in_constant = form.constant.contains_var(theta);
    let in_factors = form.factors.iter().any(|(s, _)| s.contains_var(theta));
    if !in_constant || in_factors {
        return None;
    }
    let k_min = BigInt::from(family.k_min);
    let series = HyperSeries::of_sum(form, &k_min);
    let (total, _) = family.closed_total()?;
    let (mean, _) = closed_moments(&series, total, &k_min).mean?;
    let mean = mean.as_rational()?.eval_partial(fixed).ok()?;
    if mean.variables().iter().any(|v| v != theta) {
        return None;
    }
    // mean(θ) = num/den = x̄  ⇔  num − x̄·den = 0
    let (sum, n) = counts.mean_fraction();
    let x_bar = Q::new(BigInt::from(sum), BigInt::from(n));
    let equation = mean.numer() - &mean.denom().scale(&x_bar);
    let coeffs = equation.univariate_coeffs(theta)?;
    let (roots, _) = rational_roots(&coeffs);
    let tolerance = AGREEMENT * found.abs().max(1.0);
    roots
        .into_iter()
        .map(|(root, _)| root)
        .filter(|root| param.param.admits(root) && !pole(&mean, theta, root))
        .find(|root| (root.to_f64().unwrap_or(f64::NAN) - found).abs() <= tolerance)
}

/// The mean's denominator vanishes at θ = `value` (a root of the equation that is not one).
fn pole(mean: &RatFunc, theta: &str, value: &Q) -> bool {
    let at = BTreeMap::from([(theta.to_string(), value.clone())]);
    mean.denom().eval(&at).map_or(true, |d| d.is_zero())
}
