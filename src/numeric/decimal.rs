//! Decimal strings with a fixed number of significant digits.
//!
//! Exact rationals are rounded exactly (half to even). MPFR values are rounded to nearest from a
//! value whose error bound the caller has made small compared with the last digit, so the printed
//! value is within one unit of the last place of the true one (a faithful rounding).

use std::fmt::Write;

use rug::float::Round;
use rug::ops::Pow;
use rug::{Float, Integer, Rational};

/// Writes `0.d1 d2 d3... × 10^exp10` (mantissa digits without a point) in the project's layout:
/// plain notation when the decimal exponent lies in -5 < e < 7, scientific (`1.25e-7`) otherwise.
pub fn layout(negative: bool, digits: &str, exp10: i64) -> String {
    let sign = if negative { "-" } else { "" };
    let e = exp10 - 1; // value = d1.d2d3... × 10^e
    let (head, tail) = digits.split_at(1);
    if e > -5 && e < 7 {
        if e >= 0 {
            let int_len = (e + 1) as usize;
            if digits.len() <= int_len {
                let zeros = "0".repeat(int_len - digits.len());
                format!("{sign}{digits}{zeros}")
            } else {
                let (int_part, frac_part) = digits.split_at(int_len);
                format!("{sign}{int_part}.{frac_part}")
            }
        } else {
            let zeros = "0".repeat((-e - 1) as usize);
            format!("{sign}0.{zeros}{digits}")
        }
    } else if tail.is_empty() {
        format!("{sign}{head}e{e}")
    } else {
        format!("{sign}{head}.{tail}e{e}")
    }
}

/// `q` rounded exactly to `digits` significant digits (half to even).
pub fn rational_to_decimal(q: &Rational, digits: u32) -> String {
    let digits = digits.max(1);
    if *q == 0 {
        return "0".to_string();
    }
    let negative = *q < 0;
    let numer = Integer::from(q.numer().abs_ref());
    let denom = q.denom().clone();
    // First guess of floor(log10 |q|) from bit lengths, then corrected exactly below.
    let bit_gap = numer.significant_bits() as i64 - denom.significant_bits() as i64;
    let mut e = (bit_gap as f64 * std::f64::consts::LOG10_2).floor() as i64;
    let lower = Integer::from(10).pow(digits - 1);
    let upper = Integer::from(10).pow(digits);
    loop {
        let (scaled, remainder) = scale_and_divide(&numer, &denom, digits as i64 - 1 - e);
        if scaled < lower {
            e -= 1;
            continue;
        }
        if scaled >= upper {
            e += 1;
            continue;
        }
        let twice = Integer::from(&remainder * 2u32);
        let divisor = divisor_for(&denom, digits as i64 - 1 - e);
        let round_up = match twice.cmp(&divisor) {
            std::cmp::Ordering::Greater => true,
            std::cmp::Ordering::Less => false,
            std::cmp::Ordering::Equal => scaled.is_odd(),
        };
        let mut mantissa = scaled;
        if round_up {
            mantissa += 1;
        }
        if mantissa == upper {
            mantissa = lower.clone();
            e += 1;
        }
        return layout(negative, &mantissa.to_string(), e + 1);
    }
}

/// floor(numer * 10^shift / denom) and the remainder, for either sign of `shift`.
fn scale_and_divide(numer: &Integer, denom: &Integer, shift: i64) -> (Integer, Integer) {
    let (top, bottom) = if shift >= 0 {
        (numer * Integer::from(10).pow(shift as u32), denom.clone())
    } else {
        (
            numer.clone(),
            denom * Integer::from(10).pow((-shift) as u32),
        )
    };
    top.div_rem_floor(bottom)
}

fn divisor_for(denom: &Integer, shift: i64) -> Integer {
    if shift >= 0 {
        denom.clone()
    } else {
        denom * Integer::from(10).pow((-shift) as u32)
    }
}

/// `x` rounded to nearest with `digits` significant digits.
pub fn float_to_decimal(x: &Float, digits: u32) -> String {
    if x.is_zero() {
        return "0".to_string();
    }
    if !x.is_finite() {
        return if x.is_nan() {
            "nan".into()
        } else if x.is_sign_negative() {
            "-inf".into()
        } else {
            "inf".into()
        };
    }
    let (negative, mantissa, exp) =
        x.to_sign_string_exp_round(10, Some(digits.max(1) as usize), Round::Nearest);
    layout_owned(negative, mantissa, exp.unwrap_or(0) as i64)
}

/// `layout` reusing the digit string where the result is in scientific notation (the common
/// case in long tables): the point and the exponent are put into it without a new string.
fn layout_owned(negative: bool, mut digits: String, exp10: i64) -> String {
    let e = exp10 - 1;
    if e > -5 && e < 7 {
        return layout(negative, &digits, exp10);
    }
    if digits.len() > 1 {
        digits.insert(1, '.');
    }
    if negative {
        digits.insert(0, '-');
    }
    // Writing into a String cannot fail.
    let _ = write!(digits, "e{e}");
    digits
}

/// A short form (3 significant digits) for error figures such as relative differences.
pub fn short(x: &Float) -> String {
    float_to_decimal(x, 3)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn owned_layout_is_the_layout() {
        for digits in ["1", "12", "12345678901234567890"] {
            for exp10 in -12..12 {
                for negative in [false, true] {
                    assert_eq!(
                        layout_owned(negative, digits.to_string(), exp10),
                        layout(negative, digits, exp10),
                        "{negative} {digits} {exp10}"
                    );
                }
            }
        }
    }

    #[test]
    fn exact_rounding_of_rationals() {
        // 1/3 to 5 digits (common practice)
        assert_eq!(rational_to_decimal(&Rational::from((1, 3)), 5), "0.33333");
        assert_eq!(rational_to_decimal(&Rational::from((2, 3)), 5), "0.66667");
        // half to even: 0.125 -> 0.12, 0.375 -> 0.38
        assert_eq!(rational_to_decimal(&Rational::from((1, 8)), 2), "0.12");
        assert_eq!(rational_to_decimal(&Rational::from((3, 8)), 2), "0.38");
        // carrying into a new decade: 9.9996 to 4 digits is 10.00
        assert_eq!(
            rational_to_decimal(&Rational::from((99996, 10000)), 4),
            "10.00"
        );
        assert_eq!(rational_to_decimal(&Rational::from(-7), 3), "-7.00");
        assert_eq!(
            rational_to_decimal(&Rational::from((1, 1_000_000)), 3),
            "1.00e-6"
        );
        assert_eq!(
            rational_to_decimal(&Rational::from(123_456_789), 4),
            "1.235e8"
        );
    }

    #[test]
    fn reference_pmf_value_reproduced() {
        // Yule–Simon alpha = 5/2 at k = 1: alpha/(alpha+1) = 5/7
        // (scipy.stats.yulesimon, value in tests/reference/distributions.json)
        assert_eq!(
            rational_to_decimal(&Rational::from((5, 7)), 40),
            "0.7142857142857142857142857142857142857143"
        );
    }

    #[test]
    fn floats_round_to_nearest() {
        let x = Float::with_val(200, Rational::from((2, 3)));
        assert_eq!(float_to_decimal(&x, 10), "0.6666666667");
        let tiny = Float::with_val(64, 1.5e-300_f64);
        assert_eq!(float_to_decimal(&tiny, 2), "1.5e-300");
    }
}
