//! Exact rational numbers: the coefficient field, and reading them from text.

use num_bigint::{BigInt, Sign};
use num_traits::{One, Zero};
use rug::integer::Order;
use rug::{Integer, Rational};

/// The coefficient field of every polynomial: exact rationals.
pub type Q = num_rational::BigRational;

/// `n/d` as an exact rational. Panics if `d` is zero (a programming error, not bad input).
pub fn q(n: i64, d: i64) -> Q {
    assert!(d != 0, "q(n, d) with d = 0");
    Q::new(BigInt::from(n), BigInt::from(d))
}

/// `a += b`, without the gcd of the general sum when both are integers: `num` reduces every
/// sum, and its binary gcd against a denominator of 1 takes a step per bit of the numerator
/// (most of three seconds on a fuzzed rule with 600-digit coefficients).
pub(crate) fn add_assign_q(a: &mut Q, b: &Q) {
    if a.denom().is_one() && b.denom().is_one() {
        let sum = a.numer() + b.numer();
        *a = Q::from_integer(sum);
    } else {
        *a += b;
    }
}

/// `a − b`, as [`add_assign_q`].
pub(crate) fn sub_q(a: &Q, b: &Q) -> Q {
    if a.denom().is_one() && b.denom().is_one() {
        Q::from_integer(a.numer() - b.numer())
    } else {
        a - b
    }
}

/// The same integer in GMP.
pub fn to_rug_integer(n: &BigInt) -> Integer {
    let (sign, magnitude) = n.to_bytes_le();
    let value = Integer::from_digits(&magnitude, Order::Lsf);
    if sign == Sign::Minus {
        -value
    } else {
        value
    }
}

/// The same rational in GMP.
pub fn to_rug_rational(q: &Q) -> Rational {
    Rational::from((to_rug_integer(q.numer()), to_rug_integer(q.denom())))
}

/// A GMP integer back in `num`.
pub fn from_rug_integer(n: &Integer) -> BigInt {
    let magnitude = BigInt::from_bytes_le(Sign::Plus, &n.to_digits::<u8>(Order::Lsf));
    if n.is_negative() {
        -magnitude
    } else {
        magnitude
    }
}

/// A GMP rational back in `num` (already in lowest terms, so no gcd is taken).
pub fn from_rug_rational(q: &Rational) -> Q {
    Q::new_raw(from_rug_integer(q.numer()), from_rug_integer(q.denom()))
}

/// Largest decimal exponent accepted by [`parse_q`]; beyond it a typo such as `1e999999999`
/// would ask for gigabytes of digits. The same limit as the rule syntax's.
const MAX_DECIMAL_EXPONENT: u32 = 1_000;

/// Reads an exact rational from text: an integer (`12`, `-7`), a decimal (`0.3` is exactly
/// 3/10, `.5`, `2.`), scientific notation (`2.5e-3`, `1E6`) or a fraction of two such numbers
/// (`-3/10`). Surrounding whitespace is ignored; anything else (`1.2.3`, `abc`, ``, `1/0`)
/// gives `None`.
pub fn parse_q(s: &str) -> Option<Q> {
    let s = s.trim();
    match s.split_once('/') {
        Some((num, den)) => {
            let den = parse_decimal(den)?;
            if den.is_zero() {
                return None;
            }
            Some(parse_decimal(num)? / den)
        }
        None => parse_decimal(s),
    }
}

/// `[+-]digits[.digits][(e|E)[+-]digits]`, with at least one mantissa digit.
fn parse_decimal(s: &str) -> Option<Q> {
    let (negative, unsigned) = match s.as_bytes().first()? {
        b'-' => (true, &s[1..]),
        b'+' => (false, &s[1..]),
        _ => (false, s),
    };
    let (mantissa, exponent) = match unsigned.find(['e', 'E']) {
        Some(at) => (&unsigned[..at], parse_exponent(&unsigned[at + 1..])?),
        None => (unsigned, 0),
    };
    let (whole, fraction) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    let all_digits = |t: &str| t.bytes().all(|b| b.is_ascii_digit());
    if whole.len() + fraction.len() == 0 || !all_digits(whole) || !all_digits(fraction) {
        return None;
    }
    let digits: BigInt = format!("{whole}{fraction}").parse().ok()?;
    let shift = exponent - i64::try_from(fraction.len()).ok()?;
    if shift.unsigned_abs() > u64::from(MAX_DECIMAL_EXPONENT) * 2 {
        return None;
    }
    let ten_power = num_traits::pow(
        BigInt::from(10),
        usize::try_from(shift.unsigned_abs()).ok()?,
    );
    let value = if shift >= 0 {
        Q::from_integer(digits * ten_power)
    } else {
        Q::new(digits, ten_power)
    };
    Some(if negative { -value } else { value })
}

fn parse_exponent(s: &str) -> Option<i64> {
    let (negative, digits) = match s.as_bytes().first()? {
        b'-' => (true, &s[1..]),
        b'+' => (false, &s[1..]),
        _ => (false, s),
    };
    if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return None;
    }
    let magnitude: u32 = digits.parse().ok()?;
    if magnitude > MAX_DECIMAL_EXPONENT {
        return None;
    }
    let magnitude = i64::from(magnitude);
    Some(if negative { -magnitude } else { magnitude })
}

/// Whether a rational is an integer; a small convenience for callers.
pub fn is_integer(x: &Q) -> bool {
    x.denom().is_one()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn q_reduces() {
        assert_eq!(q(6, -4), q(-3, 2));
        assert_eq!(q(0, 5), Q::zero());
        assert!(is_integer(&q(4, 2)));
        assert!(!is_integer(&q(1, 2)));
    }

    #[test]
    fn decimals_are_exact() {
        // A decimal literal denotes the exact fraction digits / 10^places (common practice).
        assert_eq!(parse_q("0.3"), Some(q(3, 10)));
        assert_eq!(parse_q("12"), Some(q(12, 1)));
        assert_eq!(parse_q("-7"), Some(q(-7, 1)));
        assert_eq!(parse_q("+2.50"), Some(q(5, 2)));
        assert_eq!(parse_q(".5"), Some(q(1, 2)));
        assert_eq!(parse_q("2."), Some(q(2, 1)));
        assert_eq!(parse_q(" 0.1 "), Some(q(1, 10)));
    }

    #[test]
    fn scientific_notation() {
        assert_eq!(parse_q("2.5e-3"), Some(q(1, 400)));
        assert_eq!(parse_q("1E6"), Some(q(1_000_000, 1)));
        assert_eq!(parse_q("-1.5e+2"), Some(q(-150, 1)));
        assert_eq!(parse_q("1e1000").map(|x| is_integer(&x)), Some(true));
        assert_eq!(parse_q("1e1001"), None);
    }

    #[test]
    fn sums_of_integers_skip_the_gcd_and_agree_with_the_general_sum() {
        let big = Q::from_integer(BigInt::from(10).pow(600_u32) + 7);
        for (a, b) in [
            (big.clone(), q(-3, 1)),
            (big.clone(), q(1, 3)),
            (q(1, 2), q(1, 2)),
        ] {
            let mut sum = a.clone();
            add_assign_q(&mut sum, &b);
            assert_eq!(sum, &a + &b);
            assert_eq!(sub_q(&a, &b), &a - &b);
        }
    }

    #[test]
    fn fractions() {
        assert_eq!(parse_q("-3/10"), Some(q(-3, 10)));
        assert_eq!(parse_q("6/4"), Some(q(3, 2)));
        assert_eq!(parse_q("1.5/0.5"), Some(q(3, 1)));
        assert_eq!(parse_q("1/0"), None);
        assert_eq!(parse_q("1/"), None);
        assert_eq!(parse_q("/2"), None);
        assert_eq!(parse_q("1/2/3"), None);
    }

    #[test]
    fn rejects_malformed_text() {
        for bad in [
            "", " ", "1.2.3", "abc", "-", "+", ".", "e5", "1e", "1e+", "1e1.5", "0x10", "1 2",
            "--1", "1_000", "∞",
        ] {
            assert_eq!(parse_q(bad), None, "{bad:?}");
        }
    }
}
