//! Standard errors from the observed information and profile-likelihood intervals.
//!
//! The 95 % profile interval of θ_i is the set where 2(ℓ̂ − ℓ_p(θ_i)) ≤ χ²₁(0.95), with
//! ℓ_p(θ_i) = max over the other parameters (Wilks' theorem; Pawitan, *In All Likelihood*,
//! 2001, §2.4 and §3.4). Ends are found by doubling steps out from θ̂ and bisection.

use statrs::distribution::{ChiSquared, ContinuousCDF};

use super::likelihood::Likelihood;
use super::maximise::{maximise, observed_information, restricted, steps_for};
use super::optimise::{cholesky, inverse_from_cholesky};

/// One end of an interval.
#[derive(Clone, Debug, PartialEq)]
pub enum End {
    /// ℓ falls by χ²/2 at this value.
    At(f64),
    /// ℓ stays above the cut up to the end of the declared range (or the search's reach).
    RangeEnd(f64),
}

#[derive(Clone, Debug, PartialEq)]
pub struct Interval {
    pub lower: End,
    pub upper: End,
}

/// The observed information −∇²ℓ at θ̂ over the real parameters, its inverse's diagonal
/// square roots (standard errors, in the order of `real`), and the steps used; `None` when
/// the information is not positive definite (a flat likelihood).
pub fn standard_errors(
    like: &Likelihood,
    real: &[usize],
    theta: &[f64],
) -> Option<(Vec<f64>, Vec<f64>)> {
    if real.is_empty() {
        return Some((Vec::new(), Vec::new()));
    }
    let steps = steps_for(like, real, theta);
    let mut f = restricted(like, real, theta);
    let x: Vec<f64> = real.iter().map(|i| theta[*i]).collect();
    let (_, information) = observed_information(&mut f, &x, &steps);
    // A curvature below the noise of ℓ (≈ 1e-10·|ℓ| over h²) is no curvature at all.
    let l0 = f(&x).abs().max(1.0);
    for (i, row) in information.iter().enumerate() {
        if !row[i].is_finite() || row[i] * steps[i] * steps[i] < 1e-10 * l0 {
            return None;
        }
    }
    let factor = cholesky(&information)?;
    let covariance = inverse_from_cholesky(&factor);
    let errors = (0..real.len())
        .map(|i| covariance[i][i].sqrt())
        .collect::<Vec<_>>();
    Some((errors, steps))
}

/// χ²₁(0.95)/2: the drop of ℓ at the ends of a 95 % profile interval.
pub fn cut() -> f64 {
    ChiSquared::new(1.0)
        .expect("one degree of freedom")
        .inverse_cdf(0.95)
        / 2.0
}

/// The profile ℓ with parameter `index` held at `value` (the others maximised).
fn profile_at(like: &Likelihood, index: usize, value: f64, theta_hat: &[f64]) -> f64 {
    if like.free.len() == 1 {
        return like.log_likelihood(&[value]);
    }
    let mut fixed = like.fixed.clone();
    let p = &like.free[index];
    let q = if p.integer {
        crate::algebra::Q::from_integer((value.round() as i64).into())
    } else {
        match num_rational::BigRational::from_float(value) {
            Some(q) => q,
            None => return f64::NEG_INFINITY,
        }
    };
    if !p.param.admits(&q) {
        return f64::NEG_INFINITY;
    }
    fixed.insert(p.name.clone(), q);
    let mut free = like.free.clone();
    free.remove(index);
    let mut start = theta_hat.to_vec();
    start.remove(index);
    let reduced = like.derived(like.counts.clone(), fixed, free);
    maximise(&reduced, Some(&start)).map_or(f64::NEG_INFINITY, |m| m.log_likelihood)
}

/// The 95 % profile interval of parameter `index`; `scale` is a first step (the standard
/// error, or 1 for an integer parameter).
pub fn profile_interval(
    like: &Likelihood,
    index: usize,
    theta_hat: &[f64],
    best: f64,
    scale: f64,
) -> Interval {
    let target = best - cut();
    let p = &like.free[index];
    let g = |v: f64| profile_at(like, index, v, theta_hat) - target;
    let centre = theta_hat[index];
    let end = |direction: f64| -> End {
        if p.integer {
            return integer_end(like, index, theta_hat, target, direction);
        }
        let range_end = if direction < 0.0 { p.lower } else { p.upper };
        let mut inside = centre;
        let mut step = scale.max(1e-12 * centre.abs().max(1.0));
        for _ in 0..80 {
            let mut trial = centre + direction * step;
            let mut at_end = false;
            if let Some(e) = range_end {
                // Stay inside an open range: halfway to its end, then closer.
                if (trial - e) * direction >= 0.0 {
                    trial = inside + (e - inside) * 0.999;
                    at_end = (e - trial).abs() < 1e-9 * e.abs().max(1.0);
                }
            }
            let v = g(trial);
            if v.is_nan() || v < 0.0 {
                let found = bisect(&g, inside, trial);
                // Where ℓ becomes undefined (the law stops being one) before it drops by the
                // cut, the interval ends at the edge of definition, not at the cut.
                let near_cut = g(found).abs() < 0.1 || g(found).is_nan();
                return if near_cut || v.is_finite() {
                    End::At(found)
                } else {
                    End::RangeEnd(found)
                };
            }
            inside = trial;
            if at_end {
                return End::RangeEnd(range_end.unwrap_or(trial));
            }
            step *= 2.0;
            if step > 1e15 {
                return End::RangeEnd(trial);
            }
        }
        End::RangeEnd(inside)
    };
    Interval {
        lower: end(-1.0),
        upper: end(1.0),
    }
}

/// The point between `inside` (g ≥ 0) and `outside` (g < 0 or undefined) where g = 0:
/// regula falsi with the Illinois modification (Dahlquist & Björck, *Numerical Methods*,
/// 1974, §6.2) while g is defined at both ends, bisection otherwise.
fn bisect(g: &dyn Fn(f64) -> f64, mut inside: f64, mut outside: f64) -> f64 {
    let mut g_in = g(inside);
    let mut g_out = g(outside);
    let mut side = 0i8;
    for _ in 0..200 {
        let width = (outside - inside).abs();
        if width <= 1e-10 * inside.abs().max(outside.abs()).max(1e-300) {
            break;
        }
        let mid = if g_in.is_finite() && g_out.is_finite() && g_in > g_out {
            let t = inside + (outside - inside) * g_in / (g_in - g_out);
            // Keep strictly inside the bracket.
            let lo = inside.min(outside) + width * 1e-3;
            let hi = inside.max(outside) - width * 1e-3;
            t.clamp(lo, hi)
        } else {
            0.5 * (inside + outside)
        };
        let v = g(mid);
        if v.is_finite() && v >= 0.0 {
            inside = mid;
            g_in = v;
            if side == 1 {
                g_out /= 2.0;
            }
            side = 1;
        } else {
            outside = mid;
            g_out = v;
            if side == -1 {
                g_in /= 2.0;
            }
            side = -1;
        }
    }
    0.5 * (inside + outside)
}

/// The last integer (stepping by `direction`) whose profile ℓ stays above the cut.
fn integer_end(
    like: &Likelihood,
    index: usize,
    theta_hat: &[f64],
    target: f64,
    direction: f64,
) -> End {
    let (lo, hi) = like.free[index].integer_bounds();
    let mut k = theta_hat[index].round() as i64;
    for _ in 0..100_000 {
        let next = k + direction as i64;
        if next < lo || next > hi {
            return End::RangeEnd(k as f64);
        }
        let v = profile_at(like, index, next as f64, theta_hat);
        if v.is_nan() || v < target {
            return End::At(k as f64);
        }
        k = next;
    }
    End::RangeEnd(k as f64)
}
