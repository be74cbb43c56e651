//! Numeric value of any claim at one k and one parameter point, in MPFR.
//!
//! Values are kept as sign and log-magnitude (like `numeric::LogReal`), because claims such as
//! Γ(k) at k = 10^6 leave MPFR's exponent range; an exact rational rides along while the value
//! is rational and small, so that poles of Γ and whole-number exponents are decided exactly.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};
use rug::float::Constant;
use rug::Float;

use crate::algebra::Q;
use crate::numeric::{to_rug_integer, to_rug_rational, LogReal};
use crate::syntax::BinOp;

use super::claim::{Claim, ClaimKind, Function};

/// Exact rationals larger than this many bits are dropped in favour of the float.
const EXACT_BITS: u64 = 4096;

#[derive(Clone, Debug)]
enum Size {
    Zero,
    Infinite,
    Finite { sign: i8, ln_abs: Float },
}

/// A claim value: its size, and the exact rational when known.
#[derive(Clone, Debug)]
pub struct Num {
    size: Size,
    exact: Option<Q>,
}

/// Where a claim has no finite real value.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Undefined(pub String);

type R = Result<Num, Undefined>;

fn undefined(why: impl Into<String>) -> Undefined {
    Undefined(why.into())
}

fn small(q: &Q) -> bool {
    q.numer().bits() + q.denom().bits() <= EXACT_BITS
}

impl Num {
    fn from_q(q: Q, prec: u32) -> Num {
        let size = if q.is_zero() {
            Size::Zero
        } else {
            let l = LogReal::from_rational(&to_rug_rational(&q), prec);
            Size::Finite {
                sign: l.sign,
                ln_abs: l.ln_abs,
            }
        };
        Num {
            size,
            exact: small(&q).then_some(q),
        }
    }

    fn finite(sign: i8, ln_abs: Float) -> Num {
        Num {
            size: Size::Finite { sign, ln_abs },
            exact: None,
        }
    }

    fn zero() -> Num {
        Num {
            size: Size::Zero,
            exact: Some(Q::zero()),
        }
    }

    fn infinite() -> Num {
        Num {
            size: Size::Infinite,
            exact: None,
        }
    }

    /// The value as sign and logarithm; an infinite value is an error.
    pub fn to_logreal(&self, prec: u32) -> Result<LogReal, Undefined> {
        match &self.size {
            Size::Zero => Ok(LogReal::zero(prec)),
            Size::Infinite => Err(undefined("the claim is infinite here (a pole)")),
            Size::Finite { sign, ln_abs } => Ok(LogReal {
                sign: *sign,
                ln_abs: ln_abs.clone(),
            }),
        }
    }

    /// The value as an ordinary float, for arguments of functions.
    fn to_float(&self, prec: u32) -> Result<Float, Undefined> {
        if let Some(q) = &self.exact {
            return Ok(Float::with_val(prec, to_rug_rational(q)));
        }
        match &self.size {
            Size::Zero => Ok(Float::new(prec)),
            Size::Infinite => Err(undefined("an argument is infinite")),
            Size::Finite { sign, ln_abs } => {
                if *ln_abs > 1.0e6 {
                    return Err(undefined("an argument is too large to evaluate"));
                }
                let v = Float::with_val(prec, ln_abs.exp_ref());
                Ok(if *sign < 0 { -v } else { v })
            }
        }
    }

    fn from_float(x: Float, prec: u32) -> Num {
        if x.is_zero() {
            return Num::zero();
        }
        let sign = if x.is_sign_negative() { -1 } else { 1 };
        Num::finite(sign, Float::with_val(prec, x.abs_ref()).ln())
    }

    fn exact_integer(&self) -> Option<BigInt> {
        self.exact
            .as_ref()
            .filter(|q| q.is_integer())
            .map(|q| q.to_integer())
    }
}

fn mul(a: &Num, b: &Num) -> R {
    let exact = match (&a.exact, &b.exact) {
        (Some(x), Some(y)) => Some(x * y).filter(small),
        _ => None,
    };
    let size = match (&a.size, &b.size) {
        (Size::Zero, Size::Infinite) | (Size::Infinite, Size::Zero) => {
            return Err(undefined("zero times infinity"))
        }
        (Size::Zero, _) | (_, Size::Zero) => Size::Zero,
        (Size::Infinite, _) | (_, Size::Infinite) => Size::Infinite,
        (Size::Finite { sign: s, ln_abs: x }, Size::Finite { sign: t, ln_abs: y }) => {
            Size::Finite {
                sign: s * t,
                ln_abs: Float::with_val(x.prec(), x + y),
            }
        }
    };
    Ok(Num { size, exact })
}

fn reciprocal(a: &Num) -> R {
    let exact = a.exact.as_ref().filter(|q| !q.is_zero()).map(|q| q.recip());
    let size = match &a.size {
        Size::Zero => Size::Infinite,
        Size::Infinite => Size::Zero,
        Size::Finite { sign, ln_abs } => Size::Finite {
            sign: *sign,
            ln_abs: -ln_abs.clone(),
        },
    };
    Ok(Num { size, exact })
}

fn div(a: &Num, b: &Num) -> R {
    if matches!((&a.size, &b.size), (Size::Zero, Size::Zero)) {
        return Err(undefined("zero divided by zero"));
    }
    if matches!((&a.size, &b.size), (Size::Infinite, Size::Infinite)) {
        return Err(undefined("infinity divided by infinity"));
    }
    mul(a, &reciprocal(b)?)
}

fn negate(a: &Num) -> Num {
    let size = match &a.size {
        Size::Finite { sign, ln_abs } => Size::Finite {
            sign: -sign,
            ln_abs: ln_abs.clone(),
        },
        other => other.clone(),
    };
    Num {
        size,
        exact: a.exact.as_ref().map(|q| -q),
    }
}

fn add(a: &Num, b: &Num, prec: u32) -> R {
    if let (Some(x), Some(y)) = (&a.exact, &b.exact) {
        return Ok(Num::from_q(x + y, prec));
    }
    match (&a.size, &b.size) {
        (Size::Infinite, Size::Infinite) => Err(undefined("infinity plus infinity")),
        (Size::Infinite, _) | (_, Size::Infinite) => Ok(Num::infinite()),
        (Size::Zero, _) => Ok(b.clone()),
        (_, Size::Zero) => Ok(a.clone()),
        (Size::Finite { sign: s, ln_abs: x }, Size::Finite { sign: t, ln_abs: y }) => {
            let (big_sign, big, small_sign, little) =
                if x >= y { (s, x, t, y) } else { (t, y, s, x) };
            // ln(|A| ± |B|) = ln|A| + ln(1 ± |B|/|A|), |B| ≤ |A| (common practice: log-sum-exp)
            let mut t_ratio = Float::with_val(prec, little - big).exp();
            if big_sign != small_sign {
                t_ratio = -t_ratio;
            }
            let log1p = t_ratio.ln_1p();
            if log1p.is_infinite() {
                return Ok(Num::zero());
            }
            Ok(Num::finite(*big_sign, Float::with_val(prec, big + &log1p)))
        }
    }
}

fn power(a: &Num, b: &Num, prec: u32) -> R {
    if let Some(n) = b.exact_integer() {
        // `unsigned_abs`: the exponent may be i64::MIN ((−8)^21), whose `abs` overflows.
        let n_small = n.to_i64().filter(|n| n.unsigned_abs() <= 1_000_000_000);
        if let Some(n) = n_small {
            let exact = match &a.exact {
                Some(x)
                    if (x.numer().bits() + x.denom().bits()).saturating_mul(n.unsigned_abs())
                        <= EXACT_BITS =>
                {
                    if x.is_zero() && n < 0 {
                        None
                    } else {
                        Some(x.pow(n as i32))
                    }
                }
                _ => None,
            };
            if let Some(q) = exact {
                return Ok(Num::from_q(q, prec));
            }
        }
        // A whole exponent of any size: the sign by its parity, the size by n·ln|a|.
        let size = match &a.size {
            Size::Zero if n.is_positive() => Size::Zero,
            Size::Zero if n.is_negative() => Size::Infinite,
            Size::Infinite if n.is_positive() => Size::Infinite,
            Size::Infinite if n.is_negative() => Size::Zero,
            Size::Zero | Size::Infinite => return Err(undefined("0^0 or infinity^0")),
            Size::Finite { sign, ln_abs } => Size::Finite {
                sign: if n.is_even() { 1 } else { *sign },
                ln_abs: Float::with_val(prec, ln_abs * Float::with_val(prec, to_rug_integer(&n))),
            },
        };
        return Ok(Num { size, exact: None });
    }
    let y = b.to_float(prec)?;
    match &a.size {
        Size::Zero if y.is_sign_positive() && !y.is_zero() => Ok(Num::zero()),
        Size::Zero => Err(undefined("zero to a power that is not positive")),
        Size::Infinite => Err(undefined("infinity to a power")),
        Size::Finite { sign, .. } if *sign < 0 => Err(undefined(
            "a negative number to a power that is not a whole number",
        )),
        Size::Finite { ln_abs, .. } => Ok(Num::finite(1, Float::with_val(prec, ln_abs * &y))),
    }
}

/// Γ(x), with its poles at 0, −1, −2, … decided exactly.
fn gamma(x: &Num, prec: u32) -> R {
    if let Some(n) = x.exact_integer() {
        if !n.is_positive() {
            return Ok(Num::infinite());
        }
    }
    let xf = x.to_float(prec)?;
    if xf.is_integer() && !xf.is_sign_positive() || xf.is_zero() {
        return Ok(Num::infinite());
    }
    let (ln_abs, ordering) = xf.ln_abs_gamma();
    let sign = if ordering == std::cmp::Ordering::Less {
        -1
    } else {
        1
    };
    Ok(Num::finite(sign, ln_abs))
}

fn plus(x: &Num, n: i64, prec: u32) -> R {
    add(x, &Num::from_q(Q::from_integer(n.into()), prec), prec)
}

fn binomial(n: &Num, m: &Num, prec: u32) -> R {
    if let (Some(top), Some(bottom)) = (n.exact_integer(), m.exact_integer()) {
        if bottom.is_negative() || (!top.is_negative() && bottom > top) {
            return Ok(Num::zero());
        }
        if top.is_negative() {
            // binomial(−n, m) = (−1)^m binomial(n + m − 1, m), upper negation (Graham, Knuth,
            // Patashnik, Concrete Mathematics, eq. 5.14)
            let flipped = Num::from_q(Q::from_integer(&bottom - &top - 1), prec);
            let value = binomial(&flipped, m, prec)?;
            let odd = (&bottom % BigInt::from(2)) != BigInt::zero();
            return Ok(if odd { negate(&value) } else { value });
        }
    }
    // binomial(n, m) = Γ(n+1)/(Γ(m+1)Γ(n−m+1)) (DLMF 26.3.1 with 5.4.1)
    let top = gamma(&plus(n, 1, prec)?, prec)?;
    let difference = add(n, &negate(m), prec)?;
    let bottom = mul(
        &gamma(&plus(m, 1, prec)?, prec)?,
        &gamma(&plus(&difference, 1, prec)?, prec)?,
    )?;
    div(&top, &bottom)
}

fn rising(x: &Num, n: &Num, prec: u32) -> R {
    if let (Some(base), Some(count)) = (x.exact_integer(), n.exact_integer()) {
        if !base.is_positive() && !count.is_negative() {
            // (−m)_n = (−1)^n m!/(m−n)! for n ≤ m, and 0 beyond (DLMF 5.2.4: a finite product)
            let m = -base;
            if count > m {
                return Ok(Num::zero());
            }
            let top = gamma(&Num::from_q(Q::from_integer(&m + 1), prec), prec)?;
            let bottom = gamma(&Num::from_q(Q::from_integer(&m - &count + 1), prec), prec)?;
            let value = div(&top, &bottom)?;
            let odd = (&count % BigInt::from(2)) != BigInt::zero();
            return Ok(if odd { negate(&value) } else { value });
        }
    }
    // (x)_n = Γ(x + n)/Γ(x) (DLMF 5.2.5)
    div(&gamma(&add(x, n, prec)?, prec)?, &gamma(x, prec)?)
}

/// Values of the names a claim may use.
pub struct Scope<'a> {
    pub k: &'a BigInt,
    pub params: &'a BTreeMap<String, Q>,
    pub base: &'a Q,
    pub prec: u32,
}

/// The claim's value; `Err` where it has no finite real value.
pub fn evaluate(claim: &Claim, scope: &Scope) -> R {
    let prec = scope.prec;
    match &claim.kind {
        ClaimKind::Number(q) => Ok(Num::from_q(q.clone(), prec)),
        ClaimKind::Param(name) => scope
            .params
            .get(name)
            .map(|q| Num::from_q(q.clone(), prec))
            .ok_or_else(|| undefined(format!("no value for `{name}`"))),
        ClaimKind::Index => Ok(Num::from_q(Q::from_integer(scope.k.clone()), prec)),
        ClaimKind::Pi => Ok(Num::finite(1, Float::with_val(prec, Constant::Pi).ln())),
        ClaimKind::Base => Ok(Num::from_q(scope.base.clone(), prec)),
        ClaimKind::Neg(inner) => Ok(negate(&evaluate(inner, scope)?)),
        ClaimKind::Binary(op, l, r) => {
            let (a, b) = (evaluate(l, scope)?, evaluate(r, scope)?);
            match op {
                BinOp::Add => add(&a, &b, prec),
                BinOp::Sub => add(&a, &negate(&b), prec),
                BinOp::Mul | BinOp::ImplicitMul => mul(&a, &b),
                BinOp::Div => div(&a, &b),
                BinOp::Pow => power(&a, &b, prec),
            }
        }
        ClaimKind::Call(function, args) => {
            let values = args
                .iter()
                .map(|a| evaluate(a, scope))
                .collect::<Result<Vec<_>, _>>()?;
            let x = &values[0];
            match function {
                Function::Gamma => gamma(x, prec),
                // n! = Γ(n + 1) (DLMF 5.4.1)
                Function::Factorial => gamma(&plus(x, 1, prec)?, prec),
                // B(a, b) = Γ(a)Γ(b)/Γ(a + b) (DLMF 5.12.1)
                Function::Beta => {
                    let y = &values[1];
                    let top = mul(&gamma(x, prec)?, &gamma(y, prec)?)?;
                    div(&top, &gamma(&add(x, y, prec)?, prec)?)
                }
                Function::Binomial => binomial(x, &values[1], prec),
                Function::Rising => rising(x, &values[1], prec),
                Function::Exp => {
                    if x.exact.as_ref().is_some_and(|q| q.is_zero()) {
                        return Ok(Num::from_q(Q::one(), prec));
                    }
                    Ok(Num::finite(1, x.to_float(prec)?))
                }
                Function::Log => match &x.size {
                    Size::Finite { sign: 1, ln_abs } => Ok(Num::from_float(ln_abs.clone(), prec)),
                    _ => Err(undefined("log of a number that is not positive")),
                },
                Function::Sqrt => match &x.size {
                    Size::Zero => Ok(Num::zero()),
                    Size::Finite { sign: 1, ln_abs } => {
                        Ok(Num::finite(1, Float::with_val(prec, ln_abs / 2u32)))
                    }
                    _ => Err(undefined("square root of a negative number")),
                },
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::check::claim::{read_claim, ClaimContext};

    fn value(text: &str, k: i64, digits: u32) -> Result<String, Undefined> {
        let b = BigInt::from(1);
        let cx = ClaimContext {
            index: "k",
            sequence: "n",
            base_index: &b,
            params: vec!["p".into()],
        };
        let claim = read_claim(text, &cx).unwrap();
        let params = [("p".to_string(), crate::algebra::q(3, 10))].into();
        let k = BigInt::from(k);
        let base = Q::one();
        let scope = Scope {
            k: &k,
            params: &params,
            base: &base,
            prec: 200,
        };
        Ok(evaluate(&claim, &scope)?
            .to_logreal(200)?
            .to_decimal(digits))
    }

    #[test]
    fn special_values() {
        // Γ(1/2)^2 = π (DLMF 5.4.6)
        assert_eq!(
            value("Gamma(1/2)^2", 1, 20).unwrap(),
            "3.1415926535897932385"
        );
        // binomial(12, 5) = 792 (common practice); binomial(12, 13) = 0
        assert_eq!(value("binomial(12, k)", 5, 10).unwrap(), "792.0000000");
        assert_eq!(value("binomial(12, k)", 13, 10).unwrap(), "0");
        // binomial(−3, 2) = 6 by upper negation (Concrete Mathematics 5.14)
        assert_eq!(value("binomial(-3, k)", 2, 10).unwrap(), "6.000000000");
        // (−3)_2 = (−3)(−2) = 6, (−3)_4 = 0 (DLMF 5.2.4)
        assert_eq!(value("rising(-3, k)", 2, 10).unwrap(), "6.000000000");
        assert_eq!(value("rising(-3, k)", 4, 10).unwrap(), "0");
        // 1/Γ(−k) is zero at the poles (DLMF 5.2.1)
        assert_eq!(value("1/Gamma(-k)", 3, 10).unwrap(), "0");
        // exp(1) (common practice value), log(p) with p = 3/10 (mpmath 1.3.0, mp.dps = 60: log(0.3))
        assert_eq!(value("exp(1)", 1, 15).unwrap(), "2.71828182845905");
        assert_eq!(value("log(p)", 1, 15).unwrap(), "-1.20397280432594");
        // sums and differences of huge terms: k! + k! − k! = k! at k = 10^6 (ln Γ(10^6 + 1))
        assert_eq!(
            value("k! + k! - k!", 1_000_000, 12).unwrap(),
            value("k!", 1_000_000, 12).unwrap()
        );
        // 10^6! (mpmath 1.3.0, mp.dps = 60: factorial(10**6) = 8.26393168833124e+5565708)
        assert_eq!(
            value("k!", 1_000_000, 15).unwrap(),
            "8.26393168833124e5565708"
        );
        // Γ(9/2)Γ(k)/Γ(k+7/2) at k = 10^6 (mpmath 1.3.0, mp.dps = 60:
        // gamma(4.5)*gamma(10**6)/gamma(10**6+3.5) = 1.1631677507917921575e-20)
        assert_eq!(
            value("Gamma(9/2) Gamma(k) / Gamma(k + 7/2)", 1_000_000, 20).unwrap(),
            "1.1631677507917921575e-20"
        );
        assert!(value("Gamma(k - 3)", 2, 10).is_err());
        assert!(value("sqrt(-p)", 1, 10).is_err());
    }
}
