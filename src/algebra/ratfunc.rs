//! Rational functions over Q in named variables, kept in a canonical form so that equal
//! values are equal structs.

use std::collections::{BTreeMap, BTreeSet};
use std::fmt;

use num_traits::{One, Zero};

use super::modular::{self, Residue};
use super::poly::{Poly, UnboundVariable};
use super::rational::Q;

/// Why a rational function could not be evaluated.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum EvalError {
    /// A variable had no value.
    Unbound(String),
    /// The denominator vanished at the given values.
    DivisionByZero,
}

impl fmt::Display for EvalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            EvalError::Unbound(name) => write!(f, "no value given for `{name}`"),
            EvalError::DivisionByZero => write!(f, "the denominator is zero at these values"),
        }
    }
}

impl std::error::Error for EvalError {}

impl From<UnboundVariable> for EvalError {
    fn from(error: UnboundVariable) -> Self {
        EvalError::Unbound(error.0)
    }
}

/// `num/den` in canonical form: `gcd(num, den) = 1`, `den` primitive with integer
/// coefficients and a positive leading coefficient, all rational content in `num`; zero is
/// `0/1`. Because the form is unique, derived `Eq` and `Hash` compare values.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct RatFunc {
    num: Poly,
    den: Poly,
}

impl RatFunc {
    /// `num/den` brought to canonical form; `None` when `den` is zero.
    pub fn new(num: Poly, den: Poly) -> Option<RatFunc> {
        if den.is_zero() {
            return None;
        }
        if num.is_zero() {
            return Some(RatFunc::zero());
        }
        let common = Poly::gcd(&num, &den);
        let num = num
            .div_exact(&common)
            .expect("the gcd divides the numerator");
        let den = den
            .div_exact(&common)
            .expect("the gcd divides the denominator");
        Some(RatFunc::from_coprime(num, den))
    }

    /// Canonical form of `num/den` already known to be coprime (`den` non-zero): only the
    /// rational content of the denominator moves to the numerator.
    pub(crate) fn from_coprime(num: Poly, den: Poly) -> RatFunc {
        if num.is_zero() {
            return RatFunc::zero();
        }
        if den.is_one() {
            return RatFunc { num, den };
        }
        let (content, den) = den.content_and_primitive();
        RatFunc {
            num: num.scale(&content.recip()),
            den,
        }
    }

    pub fn zero() -> Self {
        RatFunc::from_poly(Poly::zero())
    }

    pub fn one() -> Self {
        RatFunc::from_poly(Poly::one())
    }

    pub fn constant(c: Q) -> Self {
        RatFunc::from_poly(Poly::constant(c))
    }

    pub fn from_integer(n: i64) -> Self {
        RatFunc::from_poly(Poly::from_integer(n))
    }

    pub fn var(name: &str) -> Self {
        RatFunc::from_poly(Poly::var(name))
    }

    /// A polynomial is already canonical over the denominator 1.
    pub fn from_poly(p: Poly) -> Self {
        RatFunc {
            num: p,
            den: Poly::one(),
        }
    }

    pub fn numer(&self) -> &Poly {
        &self.num
    }

    pub fn denom(&self) -> &Poly {
        &self.den
    }

    /// `(numerator, denominator)`, consuming the value.
    pub fn into_parts(self) -> (Poly, Poly) {
        (self.num, self.den)
    }

    pub fn is_zero(&self) -> bool {
        self.num.is_zero()
    }

    pub fn is_one(&self) -> bool {
        self.num.is_one() && self.den.is_one()
    }

    /// `Some(c)` when no variable occurs.
    pub fn as_constant(&self) -> Option<Q> {
        if self.den.is_one() {
            self.num.as_constant()
        } else {
            None
        }
    }

    /// The values of `functions` at one pseudo-random point modulo the prime 2^61 − 1 (the
    /// same point for all, reproducible); `None` for one whose denominator vanishes there.
    /// Equal functions have equal residues, so unequal residues prove `a ≠ b` without
    /// forming `a − b`; equal residues say nothing for certain (they agree by chance with a
    /// probability of about degree/2^61; Schwartz–Zippel lemma), so a caller confirms them
    /// exactly.
    pub(crate) fn residues(functions: &[&RatFunc]) -> Vec<Option<Residue>> {
        let mut names = BTreeSet::new();
        for f in functions {
            names.extend(f.num.variables());
            names.extend(f.den.variables());
        }
        let names: Vec<String> = names.into_iter().collect();
        let point = modular::point(&names, 0);
        functions
            .iter()
            .map(|f| Residue::of_quotient(&f.num, &f.den, &point))
            .collect()
    }

    /// `Some(self − other)` when that difference is a rational number, decided without
    /// forming it in the common case: a numeric difference needs equal (canonical)
    /// denominators, and over the denominator 1 it needs every term but the constant one to
    /// agree.
    pub fn difference_if_number(&self, other: &RatFunc) -> Option<Q> {
        if self.den != other.den {
            return None;
        }
        if !self.den.is_one() {
            // (a − c)/d is the number q exactly when a − c = q·d, compared term by term:
            // no gcd, which reducing (a − c)/d would take
            // (the pairings of the simplifier ask this of every pair of Γ arguments).
            let n = &self.num - &other.num;
            let Some((monomial, lead)) = n.leading_term() else {
                return Some(Q::zero());
            };
            let (den_monomial, den_lead) = self.den.leading_term()?;
            if monomial != den_monomial || n.term_count() != self.den.term_count() {
                return None;
            }
            let q = lead / den_lead;
            return (n == self.den.scale(&q)).then_some(q);
        }
        fn variable_terms(p: &Poly) -> impl Iterator<Item = (&super::Monomial, &Q)> {
            p.terms().filter(|(m, _)| !m.is_one())
        }
        if !variable_terms(&self.num).eq(variable_terms(&other.num)) {
            return None;
        }
        let constant_term = |p: &Poly| {
            p.terms()
                .find(|(m, _)| m.is_one())
                .map_or_else(Q::zero, |(_, c)| c.clone())
        };
        Some(constant_term(&self.num) - constant_term(&other.num))
    }

    /// `Some(p)` when the denominator is 1.
    pub fn as_poly(&self) -> Option<Poly> {
        self.den.is_one().then(|| self.num.clone())
    }

    pub fn variables(&self) -> BTreeSet<String> {
        let mut vars = self.num.variables();
        vars.extend(self.den.variables());
        vars
    }

    pub fn contains_var(&self, var: &str) -> bool {
        self.num.contains_var(var) || self.den.contains_var(var)
    }

    /// `1/self`; `None` for zero.
    pub fn inv(&self) -> Option<RatFunc> {
        // Numerator and denominator are coprime already: swapping them needs no gcd, only the
        // denominator's content and sign moved (a gcd of two large coprime polynomials in many
        // names took minutes on a fuzzed rule).
        (!self.num.is_zero()).then(|| RatFunc::from_coprime(self.den.clone(), self.num.clone()))
    }

    /// `self / other`; `None` when `other` is zero.
    pub fn checked_div(&self, other: &RatFunc) -> Option<RatFunc> {
        Some(self * &other.inv()?)
    }

    /// Integer power; `None` for zero to a negative power. `x^0 = 1` for every `x`, including 0.
    pub fn pow(&self, e: i32) -> Option<RatFunc> {
        let magnitude = e.unsigned_abs();
        // Numerator and denominator stay coprime under powers, and the denominator stays
        // primitive (Gauss's lemma), so no gcd is needed.
        let raised = RatFunc {
            num: self.num.pow(magnitude),
            den: self.den.pow(magnitude),
        };
        if e >= 0 {
            Some(raised)
        } else {
            raised.inv()
        }
    }

    /// Value with every variable bound; an unbound variable (the first by name) is reported
    /// before a vanishing denominator.
    pub fn eval(&self, values: &BTreeMap<String, Q>) -> Result<Q, EvalError> {
        if let Some(missing) = self
            .variables()
            .into_iter()
            .find(|v| !values.contains_key(v))
        {
            return Err(EvalError::Unbound(missing));
        }
        let den = self.den.eval(values)?;
        let num = self.num.eval(values)?;
        if den.is_zero() {
            return Err(EvalError::DivisionByZero);
        }
        Ok(num / den)
    }

    /// Substitutes values for the variables that have one; the others stay symbolic. Fails
    /// only when the denominator becomes identically zero.
    pub fn eval_partial(&self, values: &BTreeMap<String, Q>) -> Result<RatFunc, EvalError> {
        RatFunc::new(self.num.eval_partial(values), self.den.eval_partial(values))
            .ok_or(EvalError::DivisionByZero)
    }

    /// Replaces `var` by `by`; `None` when the denominator becomes identically zero.
    pub fn substitute(&self, var: &str, by: &RatFunc) -> Option<RatFunc> {
        if !self.contains_var(var) {
            return Some(self.clone());
        }
        let num = substitute_into_poly(&self.num, var, by);
        let den = substitute_into_poly(&self.den, var, by);
        num.checked_div(&den)
    }
}

/// `p` with `var := by`, by Horner's scheme in `var`.
fn substitute_into_poly(p: &Poly, var: &str, by: &RatFunc) -> RatFunc {
    p.coeffs_in(var)
        .into_iter()
        .rev()
        .fold(RatFunc::zero(), |acc, coeff| {
            &(&acc * by) + &RatFunc::from_poly(coeff)
        })
}

impl Default for RatFunc {
    fn default() -> Self {
        RatFunc::zero()
    }
}

impl From<Poly> for RatFunc {
    fn from(p: Poly) -> Self {
        RatFunc::from_poly(p)
    }
}

impl From<Q> for RatFunc {
    fn from(c: Q) -> Self {
        RatFunc::constant(c)
    }
}

impl fmt::Display for RatFunc {
    /// Plain text such as `(rho - 2)/(rho - 1)` (the denominator's sign is the canonical one).
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.den.is_one() {
            return write!(f, "{}", self.num);
        }
        let bare_num = self.num.term_count() == 1
            && self
                .num
                .leading_term()
                .is_some_and(|(_, c)| super::rational::is_integer(c));
        if !bare_num {
            write!(f, "({})", self.num)?;
        } else {
            write!(f, "{}", self.num)?;
        }
        let bare_den = self.den.term_count() == 1
            && self
                .den
                .leading_term()
                .is_some_and(|(m, c)| c.is_one() && m.factors().count() == 1);
        if bare_den {
            write!(f, "/{}", self.den)
        } else {
            write!(f, "/({})", self.den)
        }
    }
}

impl Zero for RatFunc {
    fn zero() -> Self {
        RatFunc::zero()
    }
    fn is_zero(&self) -> bool {
        RatFunc::is_zero(self)
    }
}

impl One for RatFunc {
    fn one() -> Self {
        RatFunc::one()
    }
}
