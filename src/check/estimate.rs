//! Estimates from values alone, for the diagnosis: claim(k)/truth(k + s) when it is constant,
//! and the nearest simple fraction to a number found numerically.

use num_bigint::BigInt;
use num_traits::Signed;
use rug::Float;

use crate::algebra::Q;
use crate::numeric::LogReal;

use super::claim::Claim;
use super::diagnosis::Quantity;
use super::numeric_route::{claim_at, PointRun};
use crate::numeric::decimal;

/// Largest denominator offered as the likely exact value of an estimate from large k.
pub(super) const SMALL_DENOMINATOR: i64 = 24;
/// Digits shown for diagnosed quantities.
pub(super) const SHOWN_DIGITS: u32 = 12;

/// sign and ln|claim(k)/truth(k + s)| at one k, when both are finite and non-zero.
pub(super) fn log_quotient(
    claim: &Claim,
    run: &PointRun,
    k: &BigInt,
    s: i64,
    prec: u32,
) -> Option<(i8, Float)> {
    let c = claim_at(claim, &run.truth.point, k, prec).ok()?;
    let t = run.truth.at(&(k + BigInt::from(s)), prec)?;
    if c.is_zero() || t.is_zero() {
        return None;
    }
    Some((
        c.sign * t.sign,
        Float::with_val(prec, &c.ln_abs - &t.ln_abs),
    ))
}

/// claim(k)/truth(k + s) when it is the same at every sampled k (and the zeros agree):
/// the factor and its reciprocal.
pub(super) fn shifted_factor(
    claim: &Claim,
    run: &PointRun,
    s: i64,
    prec: u32,
    tol: &Float,
) -> Option<(Quantity, Quantity)> {
    let b = run.truth.base_index().clone();
    let mut first: Option<(i8, Float)> = None;
    let mut seen = 0;
    for c in &run.comparisons {
        let k = &c.k;
        if k + BigInt::from(s) < b {
            continue;
        }
        let claim_value = claim_at(claim, &run.truth.point, k, prec);
        let truth = run.truth.at(&(k + BigInt::from(s)), prec)?;
        match &claim_value {
            Ok(v) if v.is_zero() != truth.is_zero() => return None,
            Ok(v) if v.is_zero() => continue,
            Ok(_) => {}
            Err(_) => return None,
        }
        let here = log_quotient(claim, run, k, s, prec)?;
        match &first {
            None => first = Some(here),
            Some((sign, ln)) => {
                let gap = Float::with_val(prec, &here.1 - ln).abs();
                if here.0 != *sign || gap > *tol {
                    return None;
                }
            }
        }
        seen += 1;
    }
    if seen < 2 {
        return None;
    }
    let (sign, ln) = first?;
    let f = LogReal { sign, ln_abs: ln };
    let m = LogReal {
        sign,
        ln_abs: -f.ln_abs.clone(),
    };
    Some((
        numeric_quantity(&f, prec, tol),
        numeric_quantity(&m, prec, tol),
    ))
}

pub(super) fn is_one(q: &Quantity) -> bool {
    q.near
        .as_ref()
        .is_some_and(|x| *x == Q::from_integer(1.into()))
}

pub(super) fn numeric_quantity(v: &LogReal, prec: u32, tol: &Float) -> Quantity {
    let x = v.to_float(prec);
    let near = x.as_ref().and_then(|x| simple_fraction(x, tol));
    Quantity {
        decimal: v.to_decimal(SHOWN_DIGITS),
        exact: None,
        near,
    }
}

/// The fraction with the smallest denominator (at most 10^6) within `tol` (relative) of x,
/// by continued fractions (common practice).
pub fn simple_fraction(x: &Float, tol: &Float) -> Option<Q> {
    let target = x.to_rational()?;
    let allowed = Float::with_val(x.prec(), x.abs_ref()) * tol;
    let allowed = allowed.max(tol);
    let (mut h0, mut h1) = (rug::Integer::from(0), rug::Integer::from(1));
    let (mut k0, mut k1) = (rug::Integer::from(1), rug::Integer::from(0));
    let mut rest = target.clone();
    for _ in 0..64 {
        let a = rest.clone().floor().numer().clone();
        let h = rug::Integer::from(&a * &h1) + &h0;
        let k = rug::Integer::from(&a * &k1) + &k0;
        if k > 1_000_000 {
            return None;
        }
        let candidate = rug::Rational::from((h.clone(), k.clone()));
        let gap = Float::with_val(x.prec(), rug::Rational::from(&candidate - &target)).abs();
        if gap <= allowed {
            return Some(Q::new(
                h.to_string().parse().ok()?,
                k.to_string().parse().ok()?,
            ));
        }
        let fraction = rest.clone() - rug::Rational::from(a.clone());
        if fraction == 0 {
            return None;
        }
        rest = fraction.recip();
        h0 = std::mem::replace(&mut h1, h);
        k0 = std::mem::replace(&mut k1, k);
    }
    None
}

pub(super) fn numeric_quantity_digits(
    v: &LogReal,
    prec: u32,
    tol: &Float,
    digits: u32,
) -> Quantity {
    let mut q = numeric_quantity(v, prec, tol);
    q.decimal = v.to_decimal(digits);
    q
}

pub(super) fn float_quantity(x: &Float, tol: &Float) -> Quantity {
    // An estimate from k = 10^5 and 10^6: about five digits are meaningful.
    Quantity {
        decimal: decimal::float_to_decimal(x, 6),
        exact: None,
        near: simple_fraction(x, tol)
            .filter(|q| q.denom().abs() <= BigInt::from(SMALL_DENOMINATOR)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::float::Constant;

    #[test]
    fn simple_fractions_are_found_and_noise_is_not() {
        let tol = Float::with_val(64, 1e-20);
        let x = Float::with_val(200, 7) / 2u32;
        assert_eq!(simple_fraction(&x, &tol), Some(crate::algebra::q(7, 2)));
        let pi = Float::with_val(200, Constant::Pi);
        assert_eq!(simple_fraction(&pi, &tol), None);
        let x = Float::with_val(200, -2) / 7u32;
        assert_eq!(simple_fraction(&x, &tol), Some(crate::algebra::q(-2, 7)));
    }
}
