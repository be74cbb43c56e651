//! The Hurwitz zeta function `ζ(s, N) = Σ_{k≥N} k^(−s)` (DLMF 25.11.1) for real `s > 1` and a
//! large integer `N`, by the Euler–Maclaurin formula (DLMF 2.10.1) applied to `x^(−s)`:
//! `ζ(s, N) = N^(1−s)/(s−1) + N^(−s)/2 + Σ_{i≥1} B_{2i}/(2i)! · (s)_{2i−1} · N^(1−s−2i) + R`.
//! `x^(−s)` is completely monotone, so the remainder after any term is smaller in magnitude
//! than the first term left out (Olver, *Asymptotics and Special Functions*, ch. 8 §1);
//! we report twice that.

use rug::Float;

use crate::algebra::Q;
use crate::numeric::to_rug_rational;

/// `ζ(s, n)` at `prec` bits with a bound on its absolute error (truncation plus rounding),
/// using Bernoulli numbers `bernoulli` (index = order), already rounded to at least `prec`
/// bits (converting the exact ones at every call was most of the time at 1000 digits). `None` when `s ≤ 1` or the series
/// does not get below `target` relative size with the numbers given.
pub fn hurwitz_zeta(
    s: &Q,
    n: u64,
    prec: u32,
    bernoulli: &[Float],
    target: &Float,
) -> Option<(Float, Float)> {
    let s_f = Float::with_val(prec, to_rug_rational(s));
    if s_f <= 1 {
        return None;
    }
    let n_f = Float::with_val(prec, n);
    let ln_n = Float::with_val(prec, n_f.ln_ref());
    // N^(−s)
    let n_pow = (-Float::with_val(prec, &s_f * &ln_n)).exp();
    let s_minus_1 = Float::with_val(prec, &s_f - 1u32);
    let mut value = Float::with_val(prec, &n_pow * &n_f) / &s_minus_1;
    value += Float::with_val(prec, &n_pow / 2u32);
    let n_sq = Float::with_val(prec, &n_f * &n_f);
    // term_i = B_2i/(2i)! · (s)_{2i−1} · N^(1−s−2i); keep (s)_{2i−1} N^(1−s−2i)/(2i)! running.
    let mut running = Float::with_val(prec, &n_pow / &n_f) * &s_f / 2u32; // i = 1: s N^(−s−1)/2!
    let mut i = 1usize;
    loop {
        if 2 * i >= bernoulli.len() {
            return None;
        }
        let term = Float::with_val(prec, &running * &bernoulli[2 * i]);
        // next running: multiply by (s+2i−1)(s+2i)/((2i+1)(2i+2) N²)
        let mut next = Float::with_val(
            prec,
            &running * (Float::with_val(prec, &s_f + (2 * i - 1) as u32)),
        );
        next *= Float::with_val(prec, &s_f + (2 * i) as u32);
        next /= ((2 * i + 1) * (2 * i + 2)) as u32;
        next /= &n_sq;
        let b_next = &bernoulli[(2 * i + 2).min(bernoulli.len() - 1)];
        let next_term = Float::with_val(prec, &next * b_next).abs();
        value += &term;
        let small =
            Float::with_val(prec, &next_term * 2u32) <= Float::with_val(prec, &value * target);
        if small {
            // Remainder ≤ |first omitted term|, doubled; plus a few ulps per operation.
            let ulps = Float::with_val(64, Float::i_exp(1, 8 - prec as i32));
            let error = Float::with_val(64, &next_term * 2u32)
                + Float::with_val(64, &value * &ulps) * (4 * i + 8) as u32;
            return Some((value, error));
        }
        if next_term >= Float::with_val(prec, term.abs_ref()) {
            // The asymptotic terms have started to grow: N is too small for this target.
            return None;
        }
        running = next;
        i += 1;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::analysis::bernoulli::bernoulli_numbers_gmp;
    use rug::ops::Pow;

    #[test]
    fn matches_riemann_zeta_minus_the_first_terms() {
        // ζ(2, 100) = π²/6 − Σ_{k<100} k^(−2) (DLMF 25.11.1 with DLMF 25.6.1, ζ(2) = π²/6)
        let prec = 300;
        let b: Vec<Float> = bernoulli_numbers_gmp(80)
            .iter()
            .map(|r| Float::with_val(prec, r))
            .collect();
        let target = Float::with_val(prec, Float::i_exp(1, -260));
        let (v, err) = hurwitz_zeta(&q(2, 1), 100, prec, &b, &target).unwrap();
        let mut direct = Float::with_val(prec, rug::float::Constant::Pi).square() / 6u32;
        for k in 1..100u32 {
            direct -= Float::with_val(prec, k).square().recip();
        }
        let diff = Float::with_val(prec, &v - &direct).abs();
        assert!(diff <= err, "{diff} > {err}");
        assert!(err < 1e-70f64);
        // ζ(7/2, 64) against MPFR's ζ(7/2) minus the head (DLMF 25.11.1)
        let (v, err) = hurwitz_zeta(&q(7, 2), 64, prec, &b, &target).unwrap();
        let mut direct = Float::with_val(prec, 3.5f64).zeta();
        for k in 1..64u32 {
            direct -= Float::with_val(prec, k).pow(Float::with_val(prec, -3.5f64));
        }
        let diff = Float::with_val(prec, &v - &direct).abs();
        assert!(diff <= err, "{diff} > {err}");
    }
}
