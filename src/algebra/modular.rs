//! Images of polynomials over Q in the integers modulo one large prime, for degree bounds.
//!
//! The gcd needs, for each variable, an upper bound on the degree of gcd(a, b) in it. The
//! degree of the gcd of two univariate images is such a bound as long as neither leading
//! coefficient vanishes in the image: the image of a common divisor divides both images and
//! keeps its degree (Geddes, Czapor, Labahn, "Algorithms for Computer Algebra", §7.4, where
//! "unlucky" images only overestimate). Reducing modulo a prime as well as evaluating the other
//! variables keeps every number in one machine word; evaluating over Q made numbers of
//! thousands of digits on fuzzed rules with many names, and took minutes.

use std::collections::BTreeMap;

use num_bigint::Sign;

use super::monomial::Monomial;
use super::poly::Poly;
use super::rational::Q;

/// 2^61 − 1, a Mersenne prime: products of two residues fit in a `u128`.
const PRIME: u64 = (1 << 61) - 1;

/// a·b mod 2^61 − 1 for residues a, b: 2^61 ≡ 1, so the high bits of the product fold onto
/// the low ones (two folds and one subtraction, no 128-bit division).
fn mul(a: u64, b: u64) -> u64 {
    let product = a as u128 * b as u128;
    let folded = (product as u64 & PRIME) + (product >> 61) as u64;
    reduce((folded & PRIME) + (folded >> 61))
}

/// x mod 2^61 − 1 for x < 2^62.
fn reduce(x: u64) -> u64 {
    if x >= PRIME {
        x - PRIME
    } else {
        x
    }
}

fn add(a: u64, b: u64) -> u64 {
    reduce(a + b)
}

fn sub(a: u64, b: u64) -> u64 {
    (a + PRIME - b) % PRIME
}

fn pow(mut base: u64, mut e: u64) -> u64 {
    let mut acc = 1;
    while e > 0 {
        if e & 1 == 1 {
            acc = mul(acc, base);
        }
        base = mul(base, base);
        e >>= 1;
    }
    acc
}

/// Inverse of a non-zero residue (Fermat).
fn inverse(a: u64) -> u64 {
    pow(a, PRIME - 2)
}

fn integer_residue(n: &num_bigint::BigInt) -> u64 {
    let magnitude = n
        .magnitude()
        .iter_u64_digits()
        .rev()
        .fold(0u64, |acc, digit| {
            // acc · 2^64 + digit, with 2^64 ≡ 8 (mod 2^61 − 1).
            add(mul(acc, 8), digit % PRIME)
        });
    if n.sign() == Sign::Minus {
        sub(0, magnitude)
    } else {
        magnitude
    }
}

/// The residue of a rational, or `None` when its denominator is a multiple of the prime.
fn residue(q: &Q) -> Option<u64> {
    if q.is_integer() {
        // No inverse to take (61 squarings each, once per term of every image).
        return Some(integer_residue(q.numer()));
    }
    let denominator = integer_residue(q.denom());
    (denominator != 0).then(|| mul(integer_residue(q.numer()), inverse(denominator)))
}

/// A point for the variables other than the main one: distinct pseudo-random residues that
/// change with `attempt` (a fixed splitmix64 stream, so that runs are reproducible).
pub(super) fn point(names: &[String], attempt: u64) -> BTreeMap<&str, u64> {
    names
        .iter()
        .enumerate()
        .map(|(i, name)| {
            let mut z = (attempt << 32 | i as u64).wrapping_add(0x9E37_79B9_7F4A_7C15);
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            z ^= z >> 31;
            (name.as_str(), 2 + z % (PRIME - 2))
        })
        .collect()
}

/// Coefficients (constant term first) of `p` as a polynomial in `var` with the other variables
/// at `point`, modulo the prime; `None` when a coefficient's denominator vanishes there.
pub(super) fn image(p: &Poly, var: &str, point: &BTreeMap<&str, u64>) -> Option<Vec<u64>> {
    let mut coeffs = vec![0u64; p.degree_in(var) as usize + 1];
    for (monomial, c) in p.terms() {
        let (value, degree) = term_at(monomial, c, point, Some(var))?;
        coeffs[degree] = add(coeffs[degree], value);
    }
    Some(coeffs)
}

/// The term `c·monomial` with every variable but `free` at `point`, and the exponent of
/// `free`; `None` when the coefficient's denominator vanishes modulo the prime.
fn term_at(
    monomial: &Monomial,
    c: &Q,
    point: &BTreeMap<&str, u64>,
    free: Option<&str>,
) -> Option<(u64, usize)> {
    let mut value = residue(c)?;
    let mut degree = 0;
    for (name, e) in monomial.factors() {
        if Some(name) == free {
            degree = e as usize;
        } else {
            let x = point[name];
            value = mul(value, if e == 1 { x } else { pow(x, e.into()) });
        }
    }
    Some((value, degree))
}

/// The value of `p` modulo the prime with every variable at `point` (which must hold them
/// all); `None` when a coefficient's denominator is a multiple of the prime.
pub(super) fn value(p: &Poly, point: &BTreeMap<&str, u64>) -> Option<u64> {
    p.terms().try_fold(0, |sum, (monomial, c)| {
        Some(add(sum, term_at(monomial, c, point, None)?.0))
    })
}

/// A residue modulo 2^61 − 1: the value of a rational function at a point (see
/// [`crate::algebra::RatFunc::residues`]). Equal rational functions have equal residues, so
/// unequal residues prove that two differ.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Residue(u64);

impl Residue {
    pub(crate) fn from_integer(n: i64) -> Residue {
        Residue(integer_residue(&n.into()))
    }

    /// `num/den` at `point`; `None` when the denominator vanishes there.
    pub(super) fn of_quotient(
        num: &Poly,
        den: &Poly,
        point: &BTreeMap<&str, u64>,
    ) -> Option<Residue> {
        let den = value(den, point).filter(|&d| d != 0)?;
        Some(Residue(mul(value(num, point)?, inverse(den))))
    }
}

impl std::ops::Add for Residue {
    type Output = Residue;
    fn add(self, other: Residue) -> Residue {
        Residue(add(self.0, other.0))
    }
}

/// Degree of the gcd of two univariate polynomials modulo the prime (Euclid's algorithm);
/// `None` if either is zero.
pub(super) fn gcd_degree(a: &[u64], b: &[u64]) -> Option<usize> {
    let (mut a, mut b) = (trimmed(a), trimmed(b));
    if a.is_empty() || b.is_empty() {
        return None;
    }
    while !b.is_empty() {
        let r = remainder(a, &b);
        a = b;
        b = r;
    }
    Some(a.len() - 1)
}

fn trimmed(p: &[u64]) -> Vec<u64> {
    let len = p.iter().rposition(|&c| c != 0).map_or(0, |i| i + 1);
    p[..len].to_vec()
}

/// `a mod b` for non-zero `b` with a non-zero leading coefficient; the result is trimmed.
fn remainder(mut a: Vec<u64>, b: &[u64]) -> Vec<u64> {
    let lead_inverse = inverse(*b.last().expect("non-zero"));
    while a.len() >= b.len() {
        let shift = a.len() - b.len();
        let factor = mul(*a.last().expect("non-empty"), lead_inverse);
        for (i, &c) in b.iter().enumerate() {
            a[shift + i] = sub(a[shift + i], mul(factor, c));
        }
        a = trimmed(&a);
    }
    a
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::rational::q;
    use num_bigint::BigInt;

    #[test]
    fn residues_agree_with_integer_arithmetic() {
        // 2^64 and 2^128 + 5 modulo 2^61 − 1: 2^61 ≡ 1, so 2^64 ≡ 2^3 = 8 and 2^128 ≡ 2^6 = 64.
        assert_eq!(integer_residue(&(BigInt::from(1) << 64)), 8);
        assert_eq!(integer_residue(&((BigInt::from(1) << 128) + 5)), 69);
        assert_eq!(integer_residue(&BigInt::from(-1)), PRIME - 1);
        // 1/3 · 3 ≡ 1.
        assert_eq!(mul(residue(&q(1, 3)).unwrap(), 3), 1);
        assert_eq!(residue(&Q::new(1.into(), BigInt::from(PRIME))), None);
        assert_eq!(mul(inverse(12345), 12345), 1);
    }

    #[test]
    fn folded_products_agree_with_division() {
        // Common practice (Mersenne reduction): the folded product equals (a·b) mod p by u128
        // division, at the ends of the range and on a splitmix64 stream.
        let mut values = vec![0, 1, 2, PRIME - 2, PRIME - 1, 1 << 60, (1 << 60) + 12345];
        let names: Vec<String> = (0..40).map(|i| i.to_string()).collect();
        values.extend(point(&names, 7).values());
        for &a in &values {
            for &b in &values {
                let expected = ((a as u128 * b as u128) % PRIME as u128) as u64;
                assert_eq!(mul(a, b), expected, "{a} · {b}");
                assert_eq!(add(a, b), ((a as u128 + b as u128) % PRIME as u128) as u64);
            }
        }
    }

    #[test]
    fn gcd_degree_of_images() {
        // (x − 1)(x − 2) and (x − 1)(x + 5): gcd x − 1, degree 1; coprime images: degree 0.
        let a = [2, sub(0, 3), 1];
        let b = [sub(0, 5), 4, 1];
        assert_eq!(gcd_degree(&a, &b), Some(1));
        assert_eq!(gcd_degree(&a, &[1, 1]), Some(0));
        assert_eq!(gcd_degree(&a, &a), Some(2));
        assert_eq!(gcd_degree(&a, &[0, 0]), None);
    }

    #[test]
    fn image_evaluates_the_other_variables() {
        // p = x^2 y + x/2 − y at y = point: coefficients [−y, 1/2, y].
        let x = Poly::var("x");
        let y = Poly::var("y");
        let half = Poly::constant(q(1, 2));
        let p = &(&(&x * &x) * &y) + &(&(&half * &x) - &y);
        let names = ["y".to_string()];
        let at = point(&names, 0);
        let y_value = at["y"];
        let coeffs = image(&p, "x", &at).unwrap();
        assert_eq!(coeffs, vec![sub(0, y_value), inverse(2), y_value]);
    }
}
