//! Evaluates a closed form at one `k` as a sum of logarithms (MPFR log-Gamma), independently of
//! the running product. Arguments are exact rationals until the last moment; the working
//! precision is chosen from a first, cheap pass that measures every term.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};
use rug::float::Constant;
use rug::{Float, Rational};

use super::{bits_for_digits, to_rug_rational, LogReal, GUARD_BITS};
use crate::algebra::{EvalError, Q};
use crate::closed_form::{Affine, ClosedForm, Factor};

#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ClosedValueError {
    Unbound(String),
    DivisionByZero,
    /// A factor in the numerator is infinite here (Γ at a non-positive integer).
    Pole(String),
    /// A negative base under a non-integer power.
    NotReal(String),
    /// The value needs more working precision than `MAX_CLOSED_FORM_BITS` (its logarithm, or
    /// an argument's distance to a pole of Γ, is too large).
    TooLarge(String),
}

/// The most bits the closed form is evaluated with (about 30,000 digits of working precision:
/// ten times what 1000 printed digits of a value near 10^(±10^9) need).
pub const MAX_CLOSED_FORM_BITS: u64 = 100_000;

impl From<EvalError> for ClosedValueError {
    fn from(e: EvalError) -> Self {
        match e {
            EvalError::Unbound(name) => ClosedValueError::Unbound(name),
            EvalError::DivisionByZero => ClosedValueError::DivisionByZero,
        }
    }
}

/// One evaluated term: zero, or a log-magnitude and a sign.
enum Term {
    Zero,
    Value { ln_abs: Float, sign: i8 },
}

/// The value of `form` at `k` with the given parameters and base value, carried to `digits`
/// correct significant digits (the logarithm's absolute error is below 2^-(bits+guard)).
pub fn evaluate_closed_form(
    form: &ClosedForm,
    k: &BigInt,
    params: &BTreeMap<String, Q>,
    base_value: &Rational,
    digits: u32,
) -> Result<LogReal, ClosedValueError> {
    // Pass 1: measure each term's size at low precision to size the real pass.
    let probe = evaluate_terms(form, k, params, base_value, 64)?;
    let mut magnitude = 1.0f64;
    for term in &probe.terms {
        if let Term::Value { ln_abs, .. } = term {
            magnitude += ln_abs.to_f64().abs();
        }
    }
    // In u64 and checked: a huge magnitude (or its infinity) must not wrap the precision.
    let size_bits = magnitude.log2().ceil().max(0.0);
    let prec = if size_bits.is_finite() && size_bits < MAX_CLOSED_FORM_BITS as f64 {
        bits_for_digits(digits) as u64
            + GUARD_BITS as u64
            + size_bits as u64
            + probe.extra_bits as u64
    } else {
        u64::MAX
    };
    if prec > MAX_CLOSED_FORM_BITS {
        return Err(ClosedValueError::TooLarge(format!(
            "it needs {} bits of working precision (at most {MAX_CLOSED_FORM_BITS}); its terms' logarithms add up to about {magnitude:.3e}",
            if prec == u64::MAX { "unboundedly many".to_string() } else { prec.to_string() }
        )));
    }
    let prec = prec as u32;
    let exact = evaluate_terms(form, k, params, base_value, prec)?;
    let mut value = LogReal::one(prec);
    for term in exact.terms {
        match term {
            Term::Zero => return Ok(LogReal::zero(prec)),
            Term::Value { ln_abs, sign } => value.mul_log(&ln_abs, sign),
        }
    }
    Ok(value)
}

struct Terms {
    terms: Vec<Term>,
    /// Extra bits needed where an argument sits close to a pole of Γ.
    extra_bits: u32,
}

fn evaluate_terms(
    form: &ClosedForm,
    k: &BigInt,
    params: &BTreeMap<String, Q>,
    base_value: &Rational,
    prec: u32,
) -> Result<Terms, ClosedValueError> {
    let mut out = Terms {
        terms: Vec::new(),
        extra_bits: 0,
    };
    out.terms.push(rational_term(base_value, 1, prec));
    let coefficient = to_rug_rational(&form.product.coefficient.eval(params)?);
    out.terms.push(rational_term(&coefficient, 1, prec));
    for factor in &form.product.factors {
        let term = factor_term(factor, k, params, prec, &mut out.extra_bits)?;
        out.terms.push(term);
    }
    Ok(out)
}

fn rational_term(q: &Rational, exponent: i32, prec: u32) -> Term {
    if *q == 0 {
        return Term::Zero;
    }
    let log = LogReal::from_rational(q, prec);
    let sign = if exponent % 2 == 0 { 1 } else { log.sign };
    Term::Value {
        ln_abs: log.ln_abs * exponent,
        sign,
    }
}

fn arg_value(
    arg: &Affine,
    k: &BigInt,
    params: &BTreeMap<String, Q>,
) -> Result<Q, ClosedValueError> {
    Ok(arg.eval(k, params)?)
}

fn is_nonpositive_integer(x: &Q) -> bool {
    x.is_integer() && !x.is_positive()
}

/// ln|Γ(x)| and its sign for a rational x that is not a pole.
fn ln_gamma(x: &Q, prec: u32, extra_bits: &mut u32) -> (Float, i8) {
    // Sensitivity of lnΓ to the rounding of x: |x ψ(x)| ≲ |x|(ln|x| + 1) + |x|/dist(x, poles).
    let xf = x.to_f64().unwrap_or(f64::MAX);
    let mut sensitivity = xf.abs() * (xf.abs().ln().abs() + 1.0) + 1.0;
    if xf < 0.5 {
        let nearest = x.round();
        let distance = (x - nearest)
            .abs()
            .to_f64()
            .unwrap_or(1.0)
            .max(f64::MIN_POSITIVE);
        sensitivity += xf.abs() / distance;
    }
    *extra_bits = (*extra_bits).max(sensitivity.log2().ceil().max(0.0) as u32);
    let value = Float::with_val(prec, to_rug_rational(x));
    let (ln_abs, ordering) = value.ln_abs_gamma();
    let sign = if ordering == std::cmp::Ordering::Less {
        -1
    } else {
        1
    };
    (ln_abs, sign)
}

/// e · ln|Γ(x)|, or zero/pole handling at non-positive integers.
fn gamma_term(
    x: &Q,
    exponent: i32,
    prec: u32,
    extra_bits: &mut u32,
    what: &str,
) -> Result<Term, ClosedValueError> {
    if is_nonpositive_integer(x) {
        return if exponent < 0 {
            Ok(Term::Zero)
        } else {
            Err(ClosedValueError::Pole(format!("{what} at {x}")))
        };
    }
    let (ln_abs, sign) = ln_gamma(x, prec, extra_bits);
    Ok(Term::Value {
        ln_abs: ln_abs * exponent,
        sign: if exponent % 2 == 0 { 1 } else { sign },
    })
}

fn combine(terms: Vec<Term>, prec: u32) -> Term {
    let mut ln_abs = Float::new(prec);
    let mut sign = 1i8;
    for term in terms {
        match term {
            Term::Zero => return Term::Zero,
            Term::Value { ln_abs: l, sign: s } => {
                ln_abs += l;
                sign *= s;
            }
        }
    }
    Term::Value { ln_abs, sign }
}

fn factor_term(
    factor: &Factor,
    k: &BigInt,
    params: &BTreeMap<String, Q>,
    prec: u32,
    extra_bits: &mut u32,
) -> Result<Term, ClosedValueError> {
    match factor {
        Factor::Gamma { arg, exponent } => {
            let x = arg_value(arg, k, params)?;
            gamma_term(&x, *exponent, prec, extra_bits, "Gamma")
        }
        Factor::Linear { arg, exponent } => {
            let x = arg_value(arg, k, params)?;
            if x.is_zero() {
                return if *exponent > 0 {
                    Ok(Term::Zero)
                } else {
                    Err(ClosedValueError::DivisionByZero)
                };
            }
            Ok(rational_term(&to_rug_rational(&x), *exponent, prec))
        }
        Factor::Power { base, exponent } => {
            let c = base.eval(params)?;
            let n = arg_value(exponent, k, params)?;
            if c.is_zero() {
                return match n.cmp(&Q::zero()) {
                    std::cmp::Ordering::Greater => Ok(Term::Zero),
                    std::cmp::Ordering::Equal => Ok(Term::Value {
                        ln_abs: Float::new(prec),
                        sign: 1,
                    }),
                    std::cmp::Ordering::Less => Err(ClosedValueError::DivisionByZero),
                };
            }
            if c.is_negative() && !n.is_integer() {
                return Err(ClosedValueError::NotReal(format!("({c})^({n})")));
            }
            let log = LogReal::from_rational(&to_rug_rational(&c), prec);
            let odd = n.is_integer() && (n.to_integer() % BigInt::from(2)) != BigInt::zero();
            let n_float = Float::with_val(prec, to_rug_rational(&n));
            Ok(Term::Value {
                ln_abs: log.ln_abs * n_float,
                sign: if odd { log.sign } else { 1 },
            })
        }
        Factor::Rising {
            base,
            count,
            exponent,
        } => {
            let x = arg_value(base, k, params)?;
            let n = arg_value(count, k, params)?;
            let term = rising_term(&x, &n, prec, extra_bits)?;
            Ok(power_of(term, *exponent))
        }
        Factor::Beta { a, b, exponent } => {
            let x = arg_value(a, k, params)?;
            let y = arg_value(b, k, params)?;
            let sum = &x + &y;
            let parts = vec![
                gamma_term(&x, *exponent, prec, extra_bits, "Beta")?,
                gamma_term(&y, *exponent, prec, extra_bits, "Beta")?,
                gamma_term(&sum, -exponent, prec, extra_bits, "Beta")?,
            ];
            Ok(combine(parts, prec))
        }
        Factor::Factorial { arg, exponent } => {
            let x = arg_value(arg, k, params)? + Q::one();
            gamma_term(&x, *exponent, prec, extra_bits, "factorial")
        }
        Factor::Binomial {
            top,
            bottom,
            exponent,
        } => {
            let n = arg_value(top, k, params)?;
            let m = arg_value(bottom, k, params)?;
            if n.is_integer() && m.is_integer() && !n.is_negative() && (m.is_negative() || m > n) {
                return if *exponent > 0 {
                    Ok(Term::Zero)
                } else {
                    Err(ClosedValueError::DivisionByZero)
                };
            }
            let one = Q::one();
            let parts = vec![
                gamma_term(&(&n + &one), *exponent, prec, extra_bits, "binomial")?,
                gamma_term(&(&m + &one), -exponent, prec, extra_bits, "binomial")?,
                gamma_term(&(&n - &m + &one), -exponent, prec, extra_bits, "binomial")?,
            ];
            Ok(combine(parts, prec))
        }
        Factor::SqrtPi { half_exponent } => {
            let ln_pi = Float::with_val(prec, Constant::Pi).ln();
            Ok(Term::Value {
                ln_abs: ln_pi * *half_exponent / 2,
                sign: 1,
            })
        }
    }
}

fn power_of(term: Term, exponent: i32) -> Term {
    match term {
        Term::Zero => {
            if exponent == 0 {
                Term::Value {
                    ln_abs: Float::new(64),
                    sign: 1,
                }
            } else {
                Term::Zero
            }
        }
        Term::Value { ln_abs, sign } => Term::Value {
            ln_abs: ln_abs * exponent,
            sign: if exponent % 2 == 0 { 1 } else { sign },
        },
    }
}

/// (x)_n for an integer n ≥ 0, also when x is a non-positive integer (then it is a finite
/// product that may vanish).
fn rising_term(x: &Q, n: &Q, prec: u32, extra_bits: &mut u32) -> Result<Term, ClosedValueError> {
    if !n.is_integer() || n.is_negative() {
        // Outside the integer range the Gamma quotient still defines it (DLMF 5.2.5).
        let top = gamma_term(&(x + n), 1, prec, extra_bits, "rising factorial")?;
        let bottom = gamma_term(x, -1, prec, extra_bits, "rising factorial")?;
        return Ok(combine(vec![top, bottom], prec));
    }
    if is_nonpositive_integer(x) {
        let m = -x.clone();
        if *n > m {
            return Ok(Term::Zero);
        }
        // (−m)_n = (−1)^n m!/(m−n)!  (DLMF 5.2.5 with the reflection of the factors)
        let one = Q::one();
        let top = gamma_term(&(&m + &one), 1, prec, extra_bits, "rising factorial")?;
        let bottom = gamma_term(&(&m - n + &one), -1, prec, extra_bits, "rising factorial")?;
        let odd = (n.to_integer() % BigInt::from(2)) != BigInt::zero();
        return Ok(match combine(vec![top, bottom], prec) {
            Term::Value { ln_abs, sign } => Term::Value {
                ln_abs,
                sign: if odd { -sign } else { sign },
            },
            Term::Zero => Term::Zero,
        });
    }
    let top = gamma_term(&(x + n), 1, prec, extra_bits, "rising factorial")?;
    let bottom = gamma_term(x, -1, prec, extra_bits, "rising factorial")?;
    Ok(combine(vec![top, bottom], prec))
}
