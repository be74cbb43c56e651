//! Bernoulli numbers and polynomials, exactly: the coefficients of Stirling's series
//! (DLMF 5.11.8) and of the Euler–Maclaurin formula (DLMF 2.10.1).

use num_bigint::BigInt;
use num_traits::{One, Zero};

use crate::algebra::{RatFunc, Q};

/// `B_0 … B_n` (with `B_1 = −1/2`), from `Σ_{j=0}^{m−1} C(m, j) B_j = 0` for `m ≥ 2`
/// (DLMF 24.5.3).
pub fn bernoulli_numbers(n: usize) -> Vec<Q> {
    let mut b: Vec<Q> = Vec::with_capacity(n + 1);
    b.push(Q::one());
    for m in 2..=n + 1 {
        let mut sum = Q::zero();
        let mut binom = BigInt::one(); // C(m, j)
        for (j, bj) in b.iter().enumerate() {
            sum += bj * Q::from_integer(binom.clone());
            binom = binom * BigInt::from(m - j) / BigInt::from(j + 1);
        }
        // C(m, m−1) = m
        b.push(-sum / Q::from_integer(BigInt::from(m)));
    }
    b.truncate(n + 1);
    b
}

/// `B_0 … B_n` in GMP rationals (the same recurrence, DLMF 24.5.3): the long lists the
/// Euler–Maclaurin sums need are much faster this way. The numbers are kept once computed
/// (a sweep sums at every point, and each sum wants the same list).
pub fn bernoulli_numbers_gmp(n: usize) -> Vec<rug::Rational> {
    static KNOWN: std::sync::Mutex<Vec<rug::Rational>> = std::sync::Mutex::new(Vec::new());
    // A poisoned lock only means another thread panicked mid-extension; the list is
    // extended one whole number at a time, so what it holds is still right.
    let mut b = KNOWN.lock().unwrap_or_else(|e| e.into_inner());
    if b.is_empty() {
        b.push(rug::Rational::from(1));
    }
    while b.len() < n + 1 {
        let m = b.len() + 1;
        let mut sum = rug::Rational::new();
        let mut binom = rug::Integer::from(1);
        for (j, bj) in b.iter().enumerate() {
            sum += rug::Rational::from(bj * &binom);
            binom *= (m - j) as u64;
            binom /= (j + 1) as u64;
        }
        b.push(-sum / rug::Rational::from(m as u64));
    }
    b[..=n].to_vec()
}

/// `B_n(x) = Σ_j C(n, j) B_j x^(n−j)` (DLMF 24.2.5), by Horner's scheme in `x`.
pub fn bernoulli_polynomial(n: usize, x: &RatFunc, numbers: &[Q]) -> RatFunc {
    let mut binom = BigInt::one();
    let mut coeffs: Vec<Q> = Vec::with_capacity(n + 1); // coefficient of x^(n−j)
    for (j, bj) in numbers.iter().enumerate().take(n + 1) {
        coeffs.push(bj * Q::from_integer(binom.clone()));
        binom = binom * BigInt::from(n - j) / BigInt::from(j + 1);
    }
    let mut acc = RatFunc::zero();
    for c in coeffs {
        acc = &(&acc * x) + &RatFunc::constant(c);
    }
    acc
}

/// `B_n(x)` at a rational `x`.
pub fn bernoulli_polynomial_at(n: usize, x: &Q, numbers: &[Q]) -> Q {
    let mut binom = BigInt::one();
    let mut acc = Q::zero();
    for (j, bj) in numbers.iter().enumerate().take(n + 1) {
        acc = acc * x + bj * Q::from_integer(binom.clone());
        binom = binom * BigInt::from(n - j) / BigInt::from(j + 1);
    }
    acc
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    #[test]
    fn first_bernoulli_numbers() {
        // DLMF Table 24.2.1: B_0..B_8 = 1, −1/2, 1/6, 0, −1/30, 0, 1/42, 0, −1/30
        let b = bernoulli_numbers(12);
        let expected = [
            q(1, 1),
            q(-1, 2),
            q(1, 6),
            q(0, 1),
            q(-1, 30),
            q(0, 1),
            q(1, 42),
            q(0, 1),
            q(-1, 30),
        ];
        assert_eq!(&b[..9], &expected);
        // B_12 = −691/2730 (DLMF Table 24.2.1)
        assert_eq!(b[12], q(-691, 2730));
        let g = bernoulli_numbers_gmp(12);
        for (x, y) in b.iter().zip(&g) {
            assert_eq!(crate::numeric::to_rug_rational(x), *y);
        }
    }

    #[test]
    fn bernoulli_polynomials() {
        let b = bernoulli_numbers(6);
        // B_2(x) = x² − x + 1/6 (DLMF Table 24.2.2)
        let x = RatFunc::var("x");
        let b2 = bernoulli_polynomial(2, &x, &b);
        let expected = &(&(&x * &x) - &x) + &RatFunc::constant(q(1, 6));
        assert_eq!(b2, expected);
        // B_n(1) = B_n(0) for n ≥ 2: B_n(x+1) − B_n(x) = n x^(n−1) at x = 0 (DLMF 24.4.1)
        for n in 2..=6 {
            assert_eq!(bernoulli_polynomial_at(n, &q(1, 1), &b), b[n]);
        }
        // B_3(1/2) = 0 (DLMF 24.4.3 with x = 1/2)
        assert_eq!(bernoulli_polynomial_at(3, &q(1, 2), &b), q(0, 1));
    }
}
