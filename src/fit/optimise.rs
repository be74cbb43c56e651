//! Maximising the log-likelihood: real parameters on an unbounded scale that maps onto their
//! declared range (logistic for an interval, exponential for a half-line), Nelder–Mead
//! (Nelder & Mead 1965, with the standard coefficients 1, 2, 1/2, 1/2 of Lagarias et al.,
//! SIAM J. Optim. 9 (1998)) from the best point of a coarse grid, then Newton steps on the
//! parameters themselves with a central-difference gradient and Hessian.
//!
//! The optimiser works in double precision (common practice for likelihood maximisation);
//! the Newton polish leaves the estimate where the gradient vanishes to the noise of the
//! double-precision log-likelihood, far below the printed digits.

/// How one real parameter maps to the optimiser's unbounded coordinate u.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Scale {
    /// θ = lo + (hi − lo)/(1 + e^(−u))
    Interval { lo: f64, hi: f64 },
    /// θ = lo + e^u
    Above { lo: f64 },
    /// θ = hi − e^u
    Below { hi: f64 },
    /// θ = u
    Free,
}

impl Scale {
    pub fn new(lo: Option<f64>, hi: Option<f64>) -> Scale {
        match (lo, hi) {
            (Some(lo), Some(hi)) => Scale::Interval { lo, hi },
            (Some(lo), None) => Scale::Above { lo },
            (None, Some(hi)) => Scale::Below { hi },
            (None, None) => Scale::Free,
        }
    }

    pub fn to_param(self, u: f64) -> f64 {
        match self {
            Scale::Interval { lo, hi } => lo + (hi - lo) / (1.0 + (-u).exp()),
            Scale::Above { lo } => lo + u.exp(),
            Scale::Below { hi } => hi - u.exp(),
            Scale::Free => u,
        }
    }

    pub fn to_unbounded(self, theta: f64) -> f64 {
        match self {
            Scale::Interval { lo, hi } => {
                let t = (theta - lo) / (hi - lo);
                (t / (1.0 - t)).ln()
            }
            Scale::Above { lo } => (theta - lo).ln(),
            Scale::Below { hi } => (hi - theta).ln(),
            Scale::Free => theta,
        }
    }

    /// Distance from θ to the nearest end of the range (∞ without one).
    pub fn room(self, theta: f64) -> f64 {
        match self {
            Scale::Interval { lo, hi } => (theta - lo).min(hi - theta),
            Scale::Above { lo } => theta - lo,
            Scale::Below { hi } => hi - theta,
            Scale::Free => f64::INFINITY,
        }
    }
}

/// The best point found and its value (a minimum of `f`).
#[derive(Clone, Debug)]
pub struct Minimum {
    pub point: Vec<f64>,
    pub value: f64,
    pub evaluations: usize,
}

/// Nelder–Mead minimisation of `f` (which may return +∞ where it is undefined) from `start`
/// with initial steps `step`, restarted from its own result until it stops improving.
pub fn nelder_mead(f: &mut dyn FnMut(&[f64]) -> f64, start: &[f64], step: f64) -> Minimum {
    let mut best = simplex_run(f, start, step);
    for _ in 0..2 {
        let again = simplex_run(f, &best.point.clone(), step / 10.0);
        let evaluations = best.evaluations + again.evaluations;
        let improved = again.value < best.value - 1e-12 * best.value.abs().max(1.0);
        if again.value <= best.value {
            best = Minimum {
                evaluations,
                ..again
            };
        } else {
            best.evaluations = evaluations;
        }
        if !improved {
            break;
        }
    }
    best
}

fn simplex_run(f: &mut dyn FnMut(&[f64]) -> f64, start: &[f64], step: f64) -> Minimum {
    let m = start.len();
    let mut evaluations = 0usize;
    let mut eval = |x: &[f64], count: &mut usize| -> f64 {
        *count += 1;
        let v = f(x);
        if v.is_nan() {
            f64::INFINITY
        } else {
            v
        }
    };
    let mut simplex: Vec<(Vec<f64>, f64)> = Vec::with_capacity(m + 1);
    let v0 = eval(start, &mut evaluations);
    simplex.push((start.to_vec(), v0));
    for i in 0..m {
        let mut x = start.to_vec();
        x[i] += step;
        let mut v = eval(&x, &mut evaluations);
        if !v.is_finite() {
            x[i] = start[i] - step;
            v = eval(&x, &mut evaluations);
        }
        simplex.push((x, v));
    }
    let max_evaluations = 400 * (m + 1);
    while evaluations < max_evaluations {
        simplex.sort_by(|a, b| a.1.total_cmp(&b.1));
        let (lo, hi) = (simplex[0].1, simplex[m].1);
        let size = simplex
            .iter()
            .skip(1)
            .flat_map(|(x, _)| x.iter().zip(&simplex[0].0).map(|(a, b)| (a - b).abs()))
            .fold(0.0f64, f64::max);
        if (hi - lo).abs() <= 1e-13 * lo.abs().max(1e-300) && size < 1e-7 || size < 1e-11 {
            break;
        }
        let centroid: Vec<f64> = (0..m)
            .map(|i| simplex[..m].iter().map(|(x, _)| x[i]).sum::<f64>() / m as f64)
            .collect();
        let along = |t: f64| -> Vec<f64> {
            centroid
                .iter()
                .zip(&simplex[m].0)
                .map(|(c, w)| c + t * (c - w))
                .collect()
        };
        let reflected = along(1.0);
        let fr = eval(&reflected, &mut evaluations);
        if fr < simplex[0].1 {
            let expanded = along(2.0);
            let fe = eval(&expanded, &mut evaluations);
            simplex[m] = if fe < fr {
                (expanded, fe)
            } else {
                (reflected, fr)
            };
            continue;
        }
        if fr < simplex[m - 1].1 {
            simplex[m] = (reflected, fr);
            continue;
        }
        let (contracted, fc) = if fr < simplex[m].1 {
            let x = along(0.5);
            let v = eval(&x, &mut evaluations);
            (x, v.min(f64::INFINITY))
        } else {
            let x = along(-0.5);
            let v = eval(&x, &mut evaluations);
            (x, v)
        };
        if fc < simplex[m].1.min(fr) {
            simplex[m] = (contracted, fc);
            continue;
        }
        // Shrink towards the best point.
        let best = simplex[0].0.clone();
        for entry in simplex.iter_mut().skip(1) {
            let x: Vec<f64> = entry
                .0
                .iter()
                .zip(&best)
                .map(|(a, b)| b + 0.5 * (a - b))
                .collect();
            let v = eval(&x, &mut evaluations);
            *entry = (x, v);
        }
    }
    simplex.sort_by(|a, b| a.1.total_cmp(&b.1));
    let (point, value) = simplex.swap_remove(0);
    Minimum {
        point,
        value,
        evaluations,
    }
}

/// The smallest value of `f` on a grid of unbounded coordinates (a start for Nelder–Mead):
/// every combination of `nodes` in each coordinate for up to 3 coordinates, else the axes.
pub fn grid_start(f: &mut dyn FnMut(&[f64]) -> f64, m: usize, nodes: &[f64]) -> Option<Vec<f64>> {
    let mut best: Option<(Vec<f64>, f64)> = None;
    let mut consider = |x: Vec<f64>, f: &mut dyn FnMut(&[f64]) -> f64| {
        let v = f(&x);
        if v.is_finite() && best.as_ref().map_or(true, |(_, b)| v < *b) {
            best = Some((x, v));
        }
    };
    if m <= 3 {
        let total = nodes.len().pow(m as u32);
        for mut index in 0..total {
            let mut x = Vec::with_capacity(m);
            for _ in 0..m {
                x.push(nodes[index % nodes.len()]);
                index /= nodes.len();
            }
            consider(x, f);
        }
    } else {
        consider(vec![0.0; m], f);
        for i in 0..m {
            for &node in nodes {
                let mut x = vec![0.0; m];
                x[i] = node;
                consider(x, f);
            }
        }
    }
    best.map(|(x, _)| x)
}

/// Gradient and Hessian of `f` at `x` by central differences with steps `h` (each at most a
/// quarter of the room to the range's ends).
pub fn derivatives(
    f: &mut dyn FnMut(&[f64]) -> f64,
    x: &[f64],
    h: &[f64],
) -> (Vec<f64>, Vec<Vec<f64>>) {
    let m = x.len();
    let f0 = f(x);
    let at = |shifts: &[(usize, f64)], f: &mut dyn FnMut(&[f64]) -> f64| {
        let mut y = x.to_vec();
        for (i, s) in shifts {
            y[*i] += s;
        }
        f(&y)
    };
    let mut gradient = vec![0.0; m];
    let mut hessian = vec![vec![0.0; m]; m];
    for i in 0..m {
        let plus = at(&[(i, h[i])], f);
        let minus = at(&[(i, -h[i])], f);
        // The gradient by Richardson extrapolation of central differences at 4h and 2h
        // (error O(h⁴) instead of O(h²)): the Newton step needs it far more accurate than
        // the Hessian.
        let central = |step: f64, f: &mut dyn FnMut(&[f64]) -> f64| {
            (at(&[(i, step)], f) - at(&[(i, -step)], f)) / (2.0 * step)
        };
        let wide = central(4.0 * h[i], f);
        let narrow = central(2.0 * h[i], f);
        gradient[i] = (4.0 * narrow - wide) / 3.0;
        hessian[i][i] = (plus - 2.0 * f0 + minus) / (h[i] * h[i]);
        for j in 0..i {
            let pp = at(&[(i, h[i]), (j, h[j])], f);
            let pm = at(&[(i, h[i]), (j, -h[j])], f);
            let mp = at(&[(i, -h[i]), (j, h[j])], f);
            let mm = at(&[(i, -h[i]), (j, -h[j])], f);
            let v = (pp - pm - mp + mm) / (4.0 * h[i] * h[j]);
            hessian[i][j] = v;
            hessian[j][i] = v;
        }
    }
    (gradient, hessian)
}

/// Cholesky factor of a symmetric positive definite matrix, or `None`.
pub fn cholesky(a: &[Vec<f64>]) -> Option<Vec<Vec<f64>>> {
    let m = a.len();
    let mut l = vec![vec![0.0; m]; m];
    for i in 0..m {
        for j in 0..=i {
            let s: f64 = (0..j).map(|p| l[i][p] * l[j][p]).sum();
            if i == j {
                let d = a[i][i] - s;
                if d.is_nan() || d <= 0.0 {
                    return None;
                }
                l[i][i] = d.sqrt();
            } else {
                l[i][j] = (a[i][j] - s) / l[j][j];
            }
        }
    }
    Some(l)
}

/// A⁻¹ from its Cholesky factor.
pub fn inverse_from_cholesky(l: &[Vec<f64>]) -> Vec<Vec<f64>> {
    let m = l.len();
    let mut inverse = vec![vec![0.0; m]; m];
    for col in 0..m {
        // Solve L y = e_col, then Lᵀ x = y.
        let mut y = vec![0.0; m];
        for i in 0..m {
            let e = if i == col { 1.0 } else { 0.0 };
            y[i] = (e - (0..i).map(|p| l[i][p] * y[p]).sum::<f64>()) / l[i][i];
        }
        let mut x = vec![0.0; m];
        for i in (0..m).rev() {
            x[i] = (y[i] - (i + 1..m).map(|p| l[p][i] * x[p]).sum::<f64>()) / l[i][i];
        }
        for (row, value) in inverse.iter_mut().zip(x) {
            row[col] = value;
        }
    }
    inverse
}

/// Solves A x = b for a symmetric positive definite A given by its Cholesky factor.
pub fn solve_cholesky(l: &[Vec<f64>], b: &[f64]) -> Vec<f64> {
    let inverse = inverse_from_cholesky(l);
    inverse
        .iter()
        .map(|row| row.iter().zip(b).map(|(a, x)| a * x).sum())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nelder_mead_finds_the_rosenbrock_minimum() {
        // Rosenbrock's function, minimum 0 at (1, 1) (Rosenbrock, Comput. J. 3 (1960)).
        let mut f = |x: &[f64]| (1.0 - x[0]).powi(2) + 100.0 * (x[1] - x[0] * x[0]).powi(2);
        let m = nelder_mead(&mut f, &[-1.2, 1.0], 0.5);
        assert!(
            (m.point[0] - 1.0).abs() < 1e-5 && (m.point[1] - 1.0).abs() < 1e-5,
            "{m:?}"
        );
    }

    #[test]
    fn scales_round_trip_and_stay_in_range() {
        for scale in [
            Scale::Interval { lo: 0.0, hi: 1.0 },
            Scale::Above { lo: 2.0 },
            Scale::Below { hi: -1.0 },
            Scale::Free,
        ] {
            for u in [-5.0, -0.3, 0.0, 1.7, 6.0] {
                let theta = scale.to_param(u);
                assert!((scale.to_unbounded(theta) - u).abs() < 1e-9);
                assert!(scale.room(theta) > 0.0);
            }
        }
    }

    #[test]
    fn inverse_of_a_small_matrix() {
        let a = vec![vec![4.0, 2.0], vec![2.0, 3.0]];
        let inv = inverse_from_cholesky(&cholesky(&a).unwrap());
        // [[4,2],[2,3]]⁻¹ = [[3,−2],[−2,4]]/8 (common practice)
        assert!((inv[0][0] - 3.0 / 8.0).abs() < 1e-15 && (inv[0][1] + 0.25).abs() < 1e-15);
        assert!(cholesky(&[vec![1.0, 2.0], vec![2.0, 1.0]]).is_none());
    }
}
