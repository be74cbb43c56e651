//! Dense univariate polynomials over Q as coefficient slices (`p[i]` multiplies `x^i`), with
//! no trailing zeros; the empty slice is zero. The working form for root finding and for the
//! evaluation images in the multivariate gcd.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

use rug::Integer as Whole;

use super::rational::{from_rug_integer, to_rug_integer, Q};

pub(crate) fn trimmed(mut p: Vec<Q>) -> Vec<Q> {
    while p.last().is_some_and(Zero::is_zero) {
        p.pop();
    }
    p
}

/// Horner's scheme.
pub(crate) fn evaluate(p: &[Q], x: &Q) -> Q {
    p.iter().rev().fold(Q::zero(), |acc, a| acc * x + a)
}

/// The sign of `p(x)`: −1, 0 or 1.
pub(crate) fn sign_at(p: &[Q], x: &Q) -> i8 {
    sign_at_fraction(p, x.numer(), x.denom())
}

/// The sign of `p(u/v)` for v > 0 (u/v need not be in lowest terms). With integer coefficients
/// (the Sturm chains of the root search) it is the sign of Σ a_i u^i v^(d−i), found in
/// integers: no rational is normalised, which at the long dyadic midpoints of a deep bisection
/// costs far more than the products themselves.
pub(crate) fn sign_at_fraction(p: &[Q], u: &BigInt, v: &BigInt) -> i8 {
    let sign = |value: &BigInt| match value.sign() {
        num_bigint::Sign::Minus => -1,
        num_bigint::Sign::NoSign => 0,
        num_bigint::Sign::Plus => 1,
    };
    if !p.iter().all(|a| a.is_integer()) {
        let x = Q::new(u.clone(), v.clone());
        return sign(evaluate(p, &x).numer());
    }
    let Some(top) = p.last() else {
        return 0;
    };
    // Horner from the top: the powers of v rise as the powers of u fall.
    let mut value = top.to_integer();
    let mut v_power = BigInt::one();
    for a in p[..p.len() - 1].iter().rev() {
        v_power *= v;
        value = value * u + a.numer() * &v_power;
    }
    sign(&value)
}

pub(crate) fn derivative(p: &[Q]) -> Vec<Q> {
    p.iter()
        .enumerate()
        .skip(1)
        .map(|(i, a)| a * Q::from_integer(BigInt::from(i)))
        .collect()
}

/// `(quotient, remainder)` of polynomial long division; `divisor` must be non-zero.
pub(crate) fn divide(dividend: &[Q], divisor: &[Q]) -> (Vec<Q>, Vec<Q>) {
    let divisor = trimmed(divisor.to_vec());
    let lead = divisor.last().expect("non-zero divisor");
    let mut remainder = trimmed(dividend.to_vec());
    if remainder.len() < divisor.len() {
        return (Vec::new(), remainder);
    }
    let mut quotient = vec![Q::zero(); remainder.len() - divisor.len() + 1];
    while remainder.len() >= divisor.len() {
        let shift = remainder.len() - divisor.len();
        let factor = remainder.last().expect("non-empty") / lead;
        for (i, d) in divisor.iter().enumerate() {
            remainder[shift + i] -= &factor * d;
        }
        quotient[shift] = factor;
        // The leading coefficient cancels exactly; drop it and any zeros below it.
        remainder.pop();
        remainder = trimmed(remainder);
    }
    (quotient, remainder)
}

/// The gcd by the primitive remainder sequence in GMP integers (Knuth, *TAOCP* vol. 2,
/// §4.6.1, Algorithm E): both inputs scaled to coprime integer coefficients, then pseudo-
/// remainders, each divided by its content. Euclid over Q normalises a fraction at every
/// step, which with `num-bigint` took seconds on degree-30 polynomials with 60-digit
/// coefficients. The result is primitive with integer coefficients (the scale of a gcd is
/// irrelevant to its callers); with one input zero, it is the other input as given.
pub(crate) fn gcd(a: &[Q], b: &[Q]) -> Vec<Q> {
    let (a, b) = (trimmed(a.to_vec()), trimmed(b.to_vec()));
    if a.is_empty() || b.is_empty() {
        return if a.is_empty() { b } else { a };
    }
    let (mut x, mut y) = (integer_coefficients(&a), integer_coefficients(&b));
    if x.len() < y.len() {
        std::mem::swap(&mut x, &mut y);
    }
    while !y.is_empty() {
        let remainder = primitive(pseudo_remainder(x, &y));
        x = y;
        y = remainder;
    }
    x.iter()
        .map(|c| Q::from_integer(from_rug_integer(c)))
        .collect()
}

/// `p` as coprime integers (the same scaling as [`integer_primitive`]).
fn integer_coefficients(p: &[Q]) -> Vec<Whole> {
    integer_primitive(p)
        .iter()
        .map(|c| to_rug_integer(c.numer()))
        .collect()
}

/// `lc(b)^(deg a − deg b + 1) · a` reduced modulo `b`, for deg a ≥ deg b and b ≠ 0.
fn pseudo_remainder(mut r: Vec<Whole>, b: &[Whole]) -> Vec<Whole> {
    let lead = b.last().expect("non-zero divisor");
    while r.len() >= b.len() {
        let shift = r.len() - b.len();
        let top = r.pop().expect("non-empty");
        for c in r.iter_mut() {
            *c *= lead;
        }
        // The leading term cancels: lead·top − top·lead; the rest of top·x^shift·b goes below.
        for (i, d) in b[..b.len() - 1].iter().enumerate() {
            r[shift + i] -= Whole::from(&top * d);
        }
        while r.last().is_some_and(|c| c.is_zero()) {
            r.pop();
        }
    }
    r
}

/// `p` divided by the gcd of its coefficients, with a positive leading one.
fn primitive(mut p: Vec<Whole>) -> Vec<Whole> {
    let mut content = Whole::new();
    for c in &p {
        content.gcd_mut(c);
    }
    if content.is_zero() {
        return Vec::new();
    }
    if p.last().is_some_and(|c| c.is_negative()) {
        content = -content;
    }
    for c in p.iter_mut() {
        c.div_exact_mut(&content);
    }
    p
}

/// `p` scaled by a positive rational to coprime integer coefficients.
pub(crate) fn integer_primitive(p: &[Q]) -> Vec<Q> {
    let mut numer_gcd = BigInt::zero();
    let mut denom_lcm = BigInt::one();
    for a in p {
        numer_gcd = numer_gcd.gcd(a.numer());
        denom_lcm = denom_lcm.lcm(a.denom());
    }
    if numer_gcd.is_zero() {
        return Vec::new();
    }
    let scale = Q::new(denom_lcm, numer_gcd);
    p.iter().map(|a| a * &scale).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::algebra::roots::tests::multiply;

    fn ints(coeffs: &[i64]) -> Vec<Q> {
        coeffs.iter().map(|&c| q(c, 1)).collect()
    }

    #[test]
    fn knuths_coprime_pair() {
        // Knuth, TAOCP vol. 2, §4.6.1: x^8 + x^6 − 3x^4 − 3x^3 + 8x^2 + 2x − 5 and
        // 3x^6 + 5x^4 − 4x^2 − 9x + 21 are coprime; the remainder sequence ends in a constant.
        let u = ints(&[-5, 2, 8, -3, -3, 0, 1, 0, 1]);
        let v = ints(&[21, -9, -4, 0, 5, 0, 3]);
        assert_eq!(gcd(&u, &v).len(), 1);
        assert_eq!(gcd(&v, &u).len(), 1);
    }

    #[test]
    fn a_common_factor_with_long_coefficients() {
        // g = 7x² − (10^60 + 3)x + 2 times two coprime cofactors (by construction): the gcd is
        // g up to its sign and scale, i.e. exactly g once primitive with a positive lead.
        let big: BigInt = num_traits::pow(BigInt::from(10), 60) + 3;
        let g = vec![q(2, 1), Q::from_integer(-big), q(7, 1)];
        let a = multiply(&g, &ints(&[1, 0, 1, 5]));
        let b = multiply(&g, &ints(&[-4, 9, 0, 0, 2]));
        assert_eq!(gcd(&a, &b), g);
        // Rational inputs, scaled by 3/5 and −1/7: the same primitive gcd.
        let scale = |p: &[Q], s: Q| p.iter().map(|c| c * &s).collect::<Vec<Q>>();
        assert_eq!(gcd(&scale(&a, q(3, 5)), &scale(&b, q(-1, 7))), g);
        // One input zero: the other as given.
        assert_eq!(gcd(&[], &a), a);
    }
}
