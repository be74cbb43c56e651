//! Closed forms as typed data: a coefficient times a product of typed factors, each with an
//! argument linear in `k`. Renderers turn this into text or LaTeX; `numeric` evaluates it;
//! the simplifier rewrites it. It is never a string.

use std::collections::BTreeMap;

use num_bigint::BigInt;

use crate::algebra::{from_rug_rational, to_rug_integer, to_rug_rational, EvalError, RatFunc, Q};

/// `k_coeff · k + constant`, the argument of every factor.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Affine {
    pub k_coeff: i64,
    pub constant: RatFunc,
}

impl Affine {
    pub fn constant(c: RatFunc) -> Self {
        Affine {
            k_coeff: 0,
            constant: c,
        }
    }

    /// `k + c`
    pub fn k_plus(c: RatFunc) -> Self {
        Affine {
            k_coeff: 1,
            constant: c,
        }
    }

    /// `c − k`
    pub fn c_minus_k(c: RatFunc) -> Self {
        Affine {
            k_coeff: -1,
            constant: c,
        }
    }

    pub fn depends_on_k(&self) -> bool {
        self.k_coeff != 0
    }

    /// The exact value at index `k`.
    /// The value at `k`, in GMP: `num`'s binary gcd on the long shifts of some rules (17,000
    /// bits) took a check seconds for a few dozen values.
    pub fn eval(&self, k: &BigInt, params: &BTreeMap<String, Q>) -> Result<Q, EvalError> {
        let part = |p: &crate::algebra::Poly| {
            p.eval(params)
                .map(|v| to_rug_rational(&v))
                .map_err(|missing| EvalError::Unbound(missing.0))
        };
        let (numerator, denominator) = (part(self.constant.numer())?, part(self.constant.denom())?);
        if denominator == 0 {
            return Err(EvalError::DivisionByZero);
        }
        let mut value = numerator / denominator;
        value += to_rug_integer(k) * self.k_coeff;
        Ok(from_rug_rational(&value))
    }

    pub fn shifted(&self, by: &RatFunc) -> Affine {
        Affine {
            k_coeff: self.k_coeff,
            constant: &self.constant + by,
        }
    }
}

/// One multiplicative piece of a closed form, raised to an integer power.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub enum Factor {
    /// Γ(arg)^exponent
    Gamma { arg: Affine, exponent: i32 },
    /// base^exponent (the geometric part `c^(k−b)`)
    Power { base: RatFunc, exponent: Affine },
    /// (arg)^exponent: a polynomial or rational factor in k
    Linear { arg: Affine, exponent: i32 },
    /// Pochhammer's rising factorial (x)_n = Γ(x+n)/Γ(x), n a non-negative integer
    Rising {
        base: Affine,
        count: Affine,
        exponent: i32,
    },
    /// B(a, b) = Γ(a)Γ(b)/Γ(a+b) (DLMF 5.12.1)
    Beta { a: Affine, b: Affine, exponent: i32 },
    /// arg! = Γ(arg + 1)
    Factorial { arg: Affine, exponent: i32 },
    /// binomial(top, bottom) = top!/(bottom!(top−bottom)!)
    Binomial {
        top: Affine,
        bottom: Affine,
        exponent: i32,
    },
    /// π^(half_exponent/2): what Γ at half-integers leaves behind (DLMF 5.4.6)
    SqrtPi { half_exponent: i32 },
}

impl Factor {
    pub fn exponent(&self) -> i32 {
        match self {
            Factor::Gamma { exponent, .. }
            | Factor::Linear { exponent, .. }
            | Factor::Rising { exponent, .. }
            | Factor::Beta { exponent, .. }
            | Factor::Factorial { exponent, .. }
            | Factor::Binomial { exponent, .. } => *exponent,
            Factor::Power { .. } => 1,
            Factor::SqrtPi { half_exponent } => *half_exponent,
        }
    }

    /// Whether the factor is a special function (Gamma, Beta, rising factorial, factorial,
    /// binomial); used by the simplicity measure.
    pub fn is_special(&self) -> bool {
        matches!(
            self,
            Factor::Gamma { .. }
                | Factor::Rising { .. }
                | Factor::Beta { .. }
                | Factor::Factorial { .. }
                | Factor::Binomial { .. }
        )
    }

    pub fn depends_on_k(&self) -> bool {
        match self {
            Factor::Gamma { arg, .. }
            | Factor::Linear { arg, .. }
            | Factor::Factorial { arg, .. } => arg.depends_on_k(),
            Factor::Power { exponent, .. } => exponent.depends_on_k(),
            Factor::Rising { base, count, .. } => base.depends_on_k() || count.depends_on_k(),
            Factor::Beta { a, b, .. } => a.depends_on_k() || b.depends_on_k(),
            Factor::Binomial { top, bottom, .. } => top.depends_on_k() || bottom.depends_on_k(),
            Factor::SqrtPi { .. } => false,
        }
    }
}

/// A product `coefficient · Π factors`, optionally times the base term `a(b)`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Product {
    pub coefficient: RatFunc,
    pub factors: Vec<Factor>,
}

impl Product {
    pub fn one() -> Self {
        Product {
            coefficient: RatFunc::one(),
            factors: Vec::new(),
        }
    }

    /// The factors with coefficient one.
    pub fn of(factors: Vec<Factor>) -> Self {
        Product {
            coefficient: RatFunc::one(),
            factors,
        }
    }
}

/// `a(k) = a(b) · product` for k in the support.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ClosedForm {
    pub sequence: String,
    pub base_index: BigInt,
    pub product: Product,
}
