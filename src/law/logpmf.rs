//! `ln a(k)/a(k_min)` at the observed k in double precision, over distinct k only: the
//! log-likelihood costs O(distinct k), not O(observations). Between two observed k the
//! product telescopes: `Π_{j=A+1..B} (j + s) = Γ(B+1+s)/Γ(A+1+s)` (DLMF 5.5.1), used when
//! the stretch is long and every argument is positive; short stretches are summed term by
//! term. Double precision is the optimiser's working precision (a statistics routine that
//! works in double); the reported estimates are good to far more digits than printed (see
//! DEVELOPERS.md, "Precision policy").

use statrs::function::gamma::ln_gamma;

/// Stretches shorter than this are summed term by term.
const DIRECT_STRETCH: i64 = 48;

/// R(k) = constant · Π (k + s)^e.
pub fn ratio_at(constant: f64, shifts: &[(f64, i32)], k: i64) -> f64 {
    let k = k as f64;
    shifts
        .iter()
        .fold(constant, |r, (s, e)| r * (k + s).powi(*e))
}

/// `ln |R(k)|`.
fn ln_ratio_at(ln_constant: f64, shifts: &[(f64, i32)], k: i64) -> f64 {
    let k = k as f64;
    shifts.iter().fold(ln_constant, |acc, (s, e)| {
        acc + *e as f64 * (k + s).abs().ln()
    })
}

/// `ln a(k)/a(k_min)` for each k of `ks` (increasing, ≥ k_min). The caller has checked the
/// signs: every R(j) in between is positive.
pub fn log_ratios(constant: f64, shifts: &[(f64, i32)], k_min: i64, ks: &[i64]) -> Vec<f64> {
    let ln_c = constant.abs().ln();
    let mut out = Vec::with_capacity(ks.len());
    let mut at = k_min;
    let mut value = 0.0f64;
    for &k in ks {
        debug_assert!(k >= at);
        let span = k - at;
        let positive = shifts.iter().all(|(s, _)| at as f64 + 1.0 + s > 0.5);
        if span >= DIRECT_STRETCH && positive {
            value += span as f64 * ln_c;
            for (s, e) in shifts {
                value += *e as f64 * (ln_gamma(k as f64 + 1.0 + s) - ln_gamma(at as f64 + 1.0 + s));
            }
        } else {
            for j in (at + 1)..=k {
                value += ln_ratio_at(ln_c, shifts, j);
            }
        }
        at = k;
        out.push(value);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gamma_stretches_agree_with_term_by_term_sums() {
        // (k-1)/(k+5/2): both routes must give the same Σ ln R(j) (DLMF 5.5.1).
        let shifts = [(-1.0, 1), (2.5, -1)];
        let ks = [1, 3, 200, 100_000];
        let fast = log_ratios(1.0, &shifts, 1, &ks);
        let mut slow = Vec::new();
        let mut v = 0.0;
        let mut at = 1;
        for &k in &ks {
            for j in (at + 1)..=k {
                v += ln_ratio_at(0.0, &shifts, j);
            }
            at = k;
            slow.push(v);
        }
        for (a, b) in fast.iter().zip(&slow) {
            assert!((a - b).abs() < 1e-9 * b.abs().max(1.0), "{a} vs {b}");
        }
    }
}
