//! Dense univariate polynomials over Q as coefficient slices (`p[i]` multiplies `x^i`), with
//! no trailing zeros; the empty slice is zero. The working form for root finding and for the
//! evaluation images in the multivariate gcd.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

use super::rational::Q;

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

/// Euclid's algorithm over Q (the scale of the result is irrelevant to its callers).
pub(crate) fn gcd(a: &[Q], b: &[Q]) -> Vec<Q> {
    let (mut a, mut b) = (trimmed(a.to_vec()), trimmed(b.to_vec()));
    while !b.is_empty() {
        let remainder = divide(&a, &b).1;
        a = b;
        b = integer_primitive(&remainder);
    }
    a
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
