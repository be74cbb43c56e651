//! Real numbers of any size as a sign and the natural logarithm of the magnitude.
//!
//! Sequence values reach 10^±(10^18) at k = 10^18, far beyond MPFR's exponent range, so the
//! closed form is always evaluated as a sum of logarithms and only turned into digits at the end.

use rug::float::Constant;
use rug::ops::Pow;
use rug::{Float, Integer, Rational};

use super::decimal;

#[derive(Clone, Debug)]
pub struct LogReal {
    /// -1, 0 or +1; when 0 the value is zero and `ln_abs` is meaningless.
    pub sign: i8,
    pub ln_abs: Float,
}

impl LogReal {
    pub fn zero(prec: u32) -> Self {
        LogReal {
            sign: 0,
            ln_abs: Float::new(prec),
        }
    }

    pub fn one(prec: u32) -> Self {
        LogReal {
            sign: 1,
            ln_abs: Float::new(prec),
        }
    }

    pub fn is_zero(&self) -> bool {
        self.sign == 0
    }

    pub fn from_rational(q: &Rational, prec: u32) -> Self {
        if *q == 0 {
            return Self::zero(prec);
        }
        let sign = if *q < 0 { -1 } else { 1 };
        // ln|n| - ln d, each from an exact integer: no overflow whatever the size.
        let numer = Integer::from(q.numer().abs_ref());
        let ln_abs = ln_integer(&numer, prec) - ln_integer(q.denom(), prec);
        LogReal { sign, ln_abs }
    }

    /// `mantissa · 2^exp2` (the running product keeps large exponents outside MPFR's range).
    pub fn from_scaled(mantissa: &Float, exp2: i64, prec: u32) -> Self {
        if mantissa.is_zero() {
            return Self::zero(prec);
        }
        let sign = if mantissa.is_sign_negative() { -1 } else { 1 };
        let mut ln_abs = Float::with_val(prec, mantissa.abs_ref()).ln();
        if exp2 != 0 {
            let ln2 = Float::with_val(prec, Constant::Log2);
            ln_abs += ln2 * Float::with_val(prec, exp2);
        }
        LogReal { sign, ln_abs }
    }

    pub fn mul(&self, other: &LogReal) -> LogReal {
        if self.is_zero() || other.is_zero() {
            return Self::zero(self.ln_abs.prec());
        }
        LogReal {
            sign: self.sign * other.sign,
            ln_abs: Float::with_val(self.ln_abs.prec(), &self.ln_abs + &other.ln_abs),
        }
    }

    /// Multiplies by a factor given as its log-magnitude and sign.
    pub fn mul_log(&mut self, ln_abs: &Float, sign: i8) {
        if sign == 0 {
            self.sign = 0;
        }
        if self.sign == 0 {
            return;
        }
        self.sign *= sign;
        self.ln_abs += ln_abs;
    }

    /// The value as a decimal string with `digits` significant digits. The caller's precision
    /// must carry the logarithm to an absolute error well below 10^-digits.
    pub fn to_decimal(&self, digits: u32) -> String {
        if self.is_zero() {
            return "0".to_string();
        }
        let prec = self.ln_abs.prec();
        let ln10 = Float::with_val(prec, 10).ln();
        let log10 = Float::with_val(prec, &self.ln_abs / &ln10);
        let exp10 = log10.clone().floor();
        let fraction = Float::with_val(prec, &log10 - &exp10);
        let mantissa = Float::with_val(prec, 10).pow(&fraction);
        let exp10 = exp10.to_integer().unwrap_or_default();
        if let Some(e) = exp10.to_i64().filter(|e| e.abs() < i64::MAX / 4) {
            let (_, mantissa_digits, mantissa_exp) =
                mantissa.to_sign_string_exp(10, Some(digits as usize));
            return decimal::layout(
                self.sign < 0,
                &mantissa_digits,
                e + mantissa_exp.unwrap_or(1) as i64,
            );
        }
        // Past 10^(2^61) the exponent is written as the integer it is (it saturated at
        // 4611686018427387903 before: a fuzz finding), and the mantissa keeps only the digits
        // the logarithm carries: its absolute error is about |log10| · 2^−prec.
        let carried =
            f64::from(prec) * std::f64::consts::LOG10_2 - log10.to_f64().abs().log10() - 1.0;
        let shown = (digits as f64).min(carried.floor()).max(1.0) as usize;
        let (_, mantissa_digits, mantissa_exp) = mantissa.to_sign_string_exp(10, Some(shown));
        let e = exp10 + (mantissa_exp.unwrap_or(1) - 1);
        let (head, tail) = mantissa_digits.split_at(1);
        let sign = if self.sign < 0 { "-" } else { "" };
        if tail.is_empty() {
            format!("{sign}{head}e{e}")
        } else {
            format!("{sign}{head}.{tail}e{e}")
        }
    }

    /// |self/other − 1|, with 0 when both are zero and +inf when exactly one is.
    pub fn rel_diff(&self, other: &LogReal, prec: u32) -> Float {
        match (self.is_zero(), other.is_zero()) {
            (true, true) => return Float::new(prec),
            (true, false) | (false, true) => {
                return Float::with_val(prec, rug::float::Special::Infinity)
            }
            _ => {}
        }
        if self.sign != other.sign {
            return Float::with_val(prec, 2);
        }
        let diff = Float::with_val(prec, &self.ln_abs - &other.ln_abs);
        diff.exp_m1().abs()
    }

    /// The value as an ordinary MPFR float when it fits the exponent range.
    pub fn to_float(&self, prec: u32) -> Option<Float> {
        if self.is_zero() {
            return Some(Float::new(prec));
        }
        let value = Float::with_val(prec, self.ln_abs.exp_ref());
        if !value.is_normal() {
            return None;
        }
        Some(if self.sign < 0 { -value } else { value })
    }
}

/// ln n for a positive integer of any size, at `prec` bits.
fn ln_integer(n: &Integer, prec: u32) -> Float {
    let bits = n.significant_bits();
    if bits < 1 << 20 {
        return Float::with_val(prec, n).ln();
    }
    // Split off a power of two so the conversion to Float keeps every needed bit.
    let shift = bits - prec.max(64);
    let top = Integer::from(n >> shift);
    let ln2 = Float::with_val(prec, Constant::Log2);
    Float::with_val(prec, &top).ln() + ln2 * Float::with_val(prec, shift)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn huge_exponents_print_correctly() {
        // 10^(-5021643) region, cf. Poisson pmf at k = 10^6 in the reference file
        // (scipy.stats.poisson): here ln|x| = -5021643·ln 10 exactly gives 1.000e-5021643.
        let prec = 256;
        let ln10 = Float::with_val(prec, 10).ln();
        let x = LogReal {
            sign: 1,
            ln_abs: ln10 * Float::with_val(prec, -5_021_643),
        };
        assert_eq!(x.to_decimal(4), "1.000e-5021643");
    }

    #[test]
    fn rational_logs_and_relative_difference() {
        let a = LogReal::from_rational(&Rational::from((5, 7)), 200);
        assert_eq!(a.to_decimal(10), "0.7142857143");
        let b = LogReal::from_rational(&Rational::from((-3, 4)), 200);
        assert_eq!(a.mul(&b).to_decimal(5), "-0.53571");
        let near = LogReal::from_rational(&Rational::from((5_000_001, 7_000_000)), 200);
        let d = a.rel_diff(&near, 64);
        // |(5000001/7000000)/(5/7) - 1| = 2e-7 exactly (common practice arithmetic)
        assert_eq!(decimal::float_to_decimal(&d, 3), "2.00e-7");
    }
}
