//! Finding the maximum of ℓ: real parameters by Nelder–Mead on their unbounded scale and a
//! Newton polish, integer parameters by a discrete search (each integer point maximised
//! over the real parameters), and the checks that turn a bad maximum into words: a maximum
//! on the boundary of the declared range, a flat likelihood.

use super::likelihood::Likelihood;
use super::optimise::{cholesky, derivatives, grid_start, nelder_mead, solve_cholesky};

/// Grid nodes of the unbounded coordinate for the starting point.
const GRID: [f64; 7] = [-6.0, -3.0, -1.0, 0.0, 1.0, 3.0, 6.0];
/// Relative step of the central differences (of the parameter, or of 1 when it is smaller).
pub const HESSIAN_STEP: f64 = 1e-4;
/// Integer search reach.
const INTEGER_REACH: i64 = 1 << 40;
/// An integer estimate this far out is checked for a likelihood that is merely flat there.
const FLAT_REACH: i64 = 1 << 10;

/// The best point of ℓ over the free parameters.
#[derive(Clone, Debug)]
pub struct Maximum {
    /// θ̂ in the order of `Likelihood::free`.
    pub theta: Vec<f64>,
    pub log_likelihood: f64,
}

/// Why no maximum was found (the words go to the user).
#[derive(Clone, Debug, PartialEq)]
pub enum NoMaximum {
    /// ℓ = −∞ everywhere tried.
    Nowhere,
    /// ℓ keeps increasing towards an end of the declared range.
    Boundary { param: String, towards: String },
}

/// Maximises ℓ from `start` (θ in the order of `free`), or from a grid when `start` is None.
pub fn maximise(like: &Likelihood, start: Option<&[f64]>) -> Result<Maximum, NoMaximum> {
    let integer_index: Vec<usize> = (0..like.free.len())
        .filter(|i| like.free[*i].integer)
        .collect();
    if integer_index.is_empty() {
        return maximise_reals(like, &[], start);
    }
    discrete_search(like, &integer_index, start)
}

/// ℓ maximised over the real parameters with the integer ones held at `ints`.
fn maximise_reals(
    like: &Likelihood,
    ints: &[(usize, i64)],
    start: Option<&[f64]>,
) -> Result<Maximum, NoMaximum> {
    let real: Vec<usize> = (0..like.free.len())
        .filter(|i| !like.free[*i].integer)
        .collect();
    let assemble = |u: &[f64]| -> Vec<f64> {
        let mut theta = vec![0.0; like.free.len()];
        for (slot, i) in real.iter().enumerate() {
            theta[*i] = like.free[*i].scale.to_param(u[slot]);
        }
        for (i, v) in ints {
            theta[*i] = *v as f64;
        }
        theta
    };
    if real.is_empty() {
        let theta = assemble(&[]);
        let l = like.log_likelihood(&theta);
        return if l.is_finite() {
            Ok(Maximum {
                theta,
                log_likelihood: l,
            })
        } else {
            Err(NoMaximum::Nowhere)
        };
    }
    let mut objective = |u: &[f64]| -> f64 { -like.log_likelihood(&assemble(u)) };
    let u0 = match start {
        Some(theta) => {
            let u: Vec<f64> = real
                .iter()
                .map(|i| like.free[*i].scale.to_unbounded(theta[*i]))
                .collect();
            if objective(&u).is_finite() && u.iter().all(|x| x.is_finite()) {
                Some(u)
            } else {
                grid_start(&mut objective, real.len(), &GRID)
            }
        }
        None => grid_start(&mut objective, real.len(), &GRID),
    };
    let u0 = u0.ok_or(NoMaximum::Nowhere)?;
    // A warm start (a neighbouring profile point, the estimate for a bootstrap replicate)
    // is already close: smaller first steps.
    let step = if start.is_some() { 0.05 } else { 0.5 };
    let found = nelder_mead(&mut objective, &u0, step);
    if !found.value.is_finite() {
        return Err(NoMaximum::Nowhere);
    }
    let mut theta = assemble(&found.point);
    // A maximum that runs off to an end of the range: the unbounded coordinate diverges.
    for (slot, i) in real.iter().enumerate() {
        let p = &like.free[*i];
        let u = found.point[slot];
        let room = p.scale.room(theta[*i]);
        let scale = theta[*i].abs().max(1.0);
        if u.abs() > 30.0 || room < 1e-9 * scale {
            use super::optimise::Scale;
            let end = match p.scale {
                Scale::Interval { lo, hi } => number(if u < 0.0 { lo } else { hi }),
                Scale::Above { lo } => {
                    if u < 0.0 {
                        number(lo)
                    } else {
                        "∞".into()
                    }
                }
                Scale::Below { hi } => {
                    if u < 0.0 {
                        number(hi)
                    } else {
                        "−∞".into()
                    }
                }
                Scale::Free => (if u < 0.0 { "−∞" } else { "∞" }).into(),
            };
            let towards = format!("{} → {end}", p.name);
            return Err(NoMaximum::Boundary {
                param: p.name.clone(),
                towards,
            });
        }
    }
    let mut best = -found.value;
    newton_polish(like, &real, &mut theta, &mut best);
    Ok(Maximum {
        theta,
        log_likelihood: best,
    })
}

fn number(x: f64) -> String {
    crate::render::sample_output::number(x, 6)
}

/// Newton steps on the real parameters (θ-space, central differences): the polish that
/// leaves the gradient at the noise of ℓ.
fn newton_polish(like: &Likelihood, real: &[usize], theta: &mut [f64], best: &mut f64) {
    for _ in 0..8 {
        let steps = steps_for(like, real, theta);
        let mut f = restricted(like, real, theta);
        let x: Vec<f64> = real.iter().map(|i| theta[*i]).collect();
        let (gradient, information) = observed_information(&mut f, &x, &steps);
        let Some(l) = cholesky(&information) else {
            return;
        };
        let delta = solve_cholesky(&l, &gradient);
        let mut t = 1.0;
        let mut moved = false;
        while t > 1e-4 {
            let trial: Vec<f64> = x.iter().zip(&delta).map(|(a, d)| a + t * d).collect();
            let v = f(&trial);
            // ℓ carries rounding noise of about 1e-13·|ℓ|: a Newton step that the noise hides
            // is still taken (its direction comes from the gradient, which sees more).
            if v.is_finite() && v >= *best - 1e-12 * best.abs().max(1.0) {
                for (slot, i) in real.iter().enumerate() {
                    theta[*i] = trial[slot];
                }
                moved = (v - *best).abs() > 1e-13 * best.abs().max(1.0)
                    || delta
                        .iter()
                        .zip(&x)
                        .any(|(d, a)| (t * d).abs() > 1e-12 * a.abs().max(1e-8));
                *best = v;
                break;
            }
            t /= 2.0;
        }
        if !moved {
            return;
        }
    }
}

/// ℓ as a function of the real parameters alone (in the order of `real`), the others held
/// at their values in `theta`.
pub fn restricted<'a>(
    like: &'a Likelihood,
    real: &'a [usize],
    theta: &[f64],
) -> impl FnMut(&[f64]) -> f64 + 'a {
    let base = theta.to_vec();
    move |x: &[f64]| {
        let mut t = base.clone();
        for (slot, i) in real.iter().enumerate() {
            t[*i] = x[slot];
        }
        like.log_likelihood(&t)
    }
}

/// The gradient of ℓ and the observed information −∇²ℓ at `x`, by central differences.
pub fn observed_information(
    f: &mut dyn FnMut(&[f64]) -> f64,
    x: &[f64],
    steps: &[f64],
) -> (Vec<f64>, Vec<Vec<f64>>) {
    let (gradient, hessian) = derivatives(f, x, steps);
    let information = hessian
        .iter()
        .map(|row| row.iter().map(|v| -v).collect())
        .collect();
    (gradient, information)
}

/// Central-difference steps: [`HESSIAN_STEP`] relative (absolute below 1), never more than a
/// quarter of the room left to the range's ends.
pub fn steps_for(like: &Likelihood, real: &[usize], theta: &[f64]) -> Vec<f64> {
    real.iter()
        .map(|i| {
            let t = theta[*i];
            let h = HESSIAN_STEP * t.abs().max(1.0);
            h.min(like.free[*i].scale.room(t) / 4.0)
        })
        .collect()
}

/// Integer parameters by a pattern search: from a feasible start, steps ±1, ±2, ±4, … while
/// ℓ improves, then back down to ±1; each point maximised over the real parameters.
fn discrete_search(
    like: &Likelihood,
    integer_index: &[usize],
    start: Option<&[f64]>,
) -> Result<Maximum, NoMaximum> {
    let bounds: Vec<(i64, i64)> = integer_index
        .iter()
        .map(|i| like.free[*i].integer_bounds())
        .collect();
    let evaluate = |point: &[i64], warm: Option<&[f64]>| -> Option<Maximum> {
        let ints: Vec<(usize, i64)> = integer_index
            .iter()
            .copied()
            .zip(point.iter().copied())
            .collect();
        maximise_reals(like, &ints, warm).ok()
    };
    // A feasible start: the given one, else from the lower ends outwards by doubling.
    let mut current: Vec<i64> = match start {
        Some(theta) => integer_index
            .iter()
            .map(|i| theta[*i].round() as i64)
            .collect(),
        None => bounds
            .iter()
            .map(|(lo, hi)| (*lo).max((*hi).min(1)))
            .collect(),
    };
    let mut best = evaluate(&current, start);
    if best.is_none() {
        let base = current.clone();
        let mut offset = 1i64;
        while best.is_none() && offset < INTEGER_REACH {
            let trial: Vec<i64> = base
                .iter()
                .zip(&bounds)
                .map(|(b, (_, hi))| (b + offset).min(*hi))
                .collect();
            best = evaluate(&trial, None);
            if best.is_some() {
                current = trial;
            }
            offset *= 2;
        }
    }
    let mut best = best.ok_or(NoMaximum::Nowhere)?;
    loop {
        let mut improved = false;
        for (slot, (lo, hi)) in bounds.iter().enumerate() {
            for direction in [1i64, -1] {
                let mut step = 1i64;
                loop {
                    let mut trial = current.clone();
                    trial[slot] = (current[slot] + direction * step).clamp(*lo, *hi);
                    if trial[slot] == current[slot] {
                        break;
                    }
                    match evaluate(&trial, Some(&best.theta)) {
                        Some(m)
                            if m.log_likelihood
                                > best.log_likelihood + 1e-12 * best.log_likelihood.abs() =>
                        {
                            best = m;
                            current = trial;
                            improved = true;
                            step *= 2;
                            if step > INTEGER_REACH {
                                let p = &like.free[integer_index[slot]];
                                return Err(NoMaximum::Boundary {
                                    param: p.name.clone(),
                                    towards: format!(
                                        "{} → {}",
                                        p.name,
                                        if direction > 0 { "∞" } else { "−∞" }
                                    ),
                                });
                            }
                        }
                        _ => {
                            if step == 1 {
                                break;
                            }
                            step = 1;
                        }
                    }
                }
            }
        }
        if !improved {
            break;
        }
    }
    // A likelihood still rising towards an open end can stall on rounding alone (a binomial N
    // on overdispersed data tends to the Poisson limit): if ℓ at four times the distance from
    // the start stays within rounding of the best, or has no maximum there, the maximum is not
    // where the search stopped.
    for (slot, (lo, hi)) in bounds.iter().enumerate() {
        let at = current[slot];
        let far = at.saturating_mul(4).clamp(*lo, *hi);
        if at.abs() < FLAT_REACH || far == at {
            continue;
        }
        let mut trial = current.clone();
        trial[slot] = far;
        // No maximum over the real parameters out there either (they ran to an end of
        // their range) is the same verdict.
        let flat = evaluate(&trial, Some(&best.theta)).map_or(true, |m| {
            m.log_likelihood >= best.log_likelihood - 1e-10 * best.log_likelihood.abs()
        });
        if flat {
            let p = &like.free[integer_index[slot]];
            return Err(NoMaximum::Boundary {
                param: p.name.clone(),
                towards: format!("{} → {}", p.name, if at > 0 { "∞" } else { "−∞" }),
            });
        }
    }
    Ok(best)
}
