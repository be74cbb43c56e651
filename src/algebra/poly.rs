//! Multivariate polynomials over Q in named variables.
//!
//! Arithmetic operators live in `poly_ops.rs`, the gcd in `gcd.rs`.

use std::cmp::Ordering;
use std::collections::btree_map::Entry;
use std::collections::hash_map::Entry as HashEntry;
use std::collections::{BTreeMap, BTreeSet};
use std::fmt;

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};
use rustc_hash::FxHashMap;

use super::monomial::Monomial;
use super::rational::{add_assign_q, from_rug_rational, to_rug_rational, Q};

/// Evaluation met a variable with no value.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct UnboundVariable(pub String);

impl fmt::Display for UnboundVariable {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "no value given for `{}`", self.0)
    }
}

impl std::error::Error for UnboundVariable {}

/// Storage key that sorts monomials in the canonical term order, so the sorted term list is
/// the order [`Poly::terms`] promises and equal polynomials are equal lists.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub(crate) struct TermKey(pub(crate) Monomial);

impl Ord for TermKey {
    fn cmp(&self, other: &Self) -> Ordering {
        self.0.canonical_cmp(&other.0)
    }
}

impl PartialOrd for TermKey {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

/// A polynomial with rational coefficients; no zero coefficient is ever stored, so the zero
/// polynomial has no terms and equal polynomials are equal values.
///
/// The terms are a vector sorted by [`TermKey`], each monomial once: the polynomials met here
/// have a handful of terms, and a sorted vector is one exact-sized allocation where a
/// `BTreeMap` node takes about a kilobyte.
#[derive(Clone, Debug, PartialEq, Eq, Default)]
pub struct Poly {
    pub(crate) terms: Vec<(TermKey, Q)>,
}

impl std::hash::Hash for Poly {
    /// Hashes each coefficient's numerator and denominator: `Ratio`'s own `Hash` runs a
    /// continued-fraction expansion (so that unreduced ratios hash alike), which the always
    /// reduced coefficients here do not need. Equal polynomials still hash alike.
    fn hash<H: std::hash::Hasher>(&self, state: &mut H) {
        state.write_usize(self.terms.len());
        for (key, c) in &self.terms {
            key.0.hash(state);
            c.numer().hash(state);
            c.denom().hash(state);
        }
    }
}

impl Poly {
    pub fn zero() -> Self {
        Poly::default()
    }

    pub fn one() -> Self {
        Poly::constant(Q::one())
    }

    pub fn constant(c: Q) -> Self {
        Poly::from_term(Monomial::one(), c)
    }

    pub fn from_integer(n: i64) -> Self {
        Poly::constant(Q::from_integer(BigInt::from(n)))
    }

    pub fn var(name: &str) -> Self {
        Poly::from_term(Monomial::var(name), Q::one())
    }

    /// The single term `c * m` (zero when `c` is zero).
    pub fn from_term(m: Monomial, c: Q) -> Self {
        let mut p = Poly::zero();
        p.add_term(m, c);
        p
    }

    /// Sum of `(monomial, coefficient)` pairs; repeated monomials are added together.
    pub fn from_terms(terms: impl IntoIterator<Item = (Monomial, Q)>) -> Self {
        let mut terms: Vec<(TermKey, Q)> =
            terms.into_iter().map(|(m, c)| (TermKey(m), c)).collect();
        // Stable sort, then equal monomials summed in place.
        terms.sort_by(|a, b| a.0.cmp(&b.0));
        let mut out: Vec<(TermKey, Q)> = Vec::with_capacity(terms.len());
        for (key, c) in terms {
            match out.last_mut() {
                Some((last, sum)) if *last == key => add_assign_q(sum, &c),
                _ => {
                    if out.last().is_some_and(|(_, sum)| sum.is_zero()) {
                        out.pop();
                    }
                    out.push((key, c));
                }
            }
        }
        if out.last().is_some_and(|(_, sum)| sum.is_zero()) {
            out.pop();
        }
        Poly { terms: out }
    }

    /// [`Poly::from_terms`] for many pairs with many repeats (the products of a
    /// multiplication): equal monomials are summed in a hash map first, and only the distinct
    /// ones are sorted, by total degree computed once each.
    pub(crate) fn from_many_terms(terms: impl IntoIterator<Item = (Monomial, Q)>) -> Self {
        let mut sums: FxHashMap<Monomial, Q> = FxHashMap::default();
        for (m, c) in terms {
            match sums.entry(m) {
                HashEntry::Occupied(mut sum) => add_assign_q(sum.get_mut(), &c),
                HashEntry::Vacant(slot) => {
                    slot.insert(c);
                }
            }
        }
        let mut keyed: Vec<(u32, Monomial, Q)> = sums
            .into_iter()
            .filter(|(_, c)| !c.is_zero())
            .map(|(m, c)| (m.degree(), m, c))
            .collect();
        keyed.sort_unstable_by(|x, y| y.0.cmp(&x.0).then_with(|| x.1.lex_cmp(&y.1)));
        Poly {
            terms: keyed.into_iter().map(|(_, m, c)| (TermKey(m), c)).collect(),
        }
    }

    /// Adds `c * m` in place, dropping the term if it cancels.
    pub(crate) fn add_term(&mut self, m: Monomial, c: Q) {
        if c.is_zero() {
            return;
        }
        let key = TermKey(m);
        match self.terms.binary_search_by(|(k, _)| k.cmp(&key)) {
            Ok(at) => {
                let existing = &mut self.terms[at].1;
                add_assign_q(existing, &c);
                if existing.is_zero() {
                    self.terms.remove(at);
                }
            }
            Err(at) => self.terms.insert(at, (key, c)),
        }
    }

    pub fn is_zero(&self) -> bool {
        self.terms.is_empty()
    }

    pub fn is_one(&self) -> bool {
        self.terms.len() == 1
            && self
                .terms
                .first()
                .is_some_and(|(key, c)| key.0.is_one() && c.is_one())
    }

    /// `Some(c)` when no variable occurs (`Some(0)` for the zero polynomial).
    pub fn as_constant(&self) -> Option<Q> {
        match self.terms.len() {
            0 => Some(Q::zero()),
            1 => self.constant_term_if_alone(),
            _ => None,
        }
    }

    fn constant_term_if_alone(&self) -> Option<Q> {
        let (key, c) = self.terms.first()?;
        key.0.is_one().then(|| c.clone())
    }

    pub fn variables(&self) -> BTreeSet<String> {
        // Names borrowed first, so each is copied once rather than once per term (a third of
        // the time of a fuzzed rule in twenty names went to these copies).
        let names: BTreeSet<&str> = self
            .terms
            .iter()
            .flat_map(|(key, _)| key.0.factors().map(|(name, _)| name))
            .collect();
        names.into_iter().map(String::from).collect()
    }

    pub fn contains_var(&self, var: &str) -> bool {
        self.terms.iter().any(|(key, _)| key.0.degree_in(var) > 0)
    }

    /// Total degree; 0 for constants and for the zero polynomial.
    pub fn total_degree(&self) -> u32 {
        self.leading_term().map_or(0, |(m, _)| m.degree())
    }

    /// Degree in one variable; 0 when it does not occur (and for the zero polynomial).
    pub fn degree_in(&self, var: &str) -> u32 {
        self.terms
            .iter()
            .map(|(key, _)| key.0.degree_in(var))
            .max()
            .unwrap_or(0)
    }

    /// Coefficients as a polynomial in `var`: `result[i]` multiplies `var^i`
    /// (length degree + 1; empty for the zero polynomial).
    pub fn coeffs_in(&self, var: &str) -> Vec<Poly> {
        if self.is_zero() {
            return Vec::new();
        }
        let mut coeffs = vec![Poly::zero(); self.degree_in(var) as usize + 1];
        for (key, c) in &self.terms {
            let (rest, e) = key.0.split_var(var);
            coeffs[e as usize].add_term(rest, c.clone());
        }
        coeffs
    }

    /// Inverse of [`Poly::coeffs_in`]: `Σ coeffs[i] * var^i`.
    pub fn from_coeffs_in(var: &str, coeffs: &[Poly]) -> Poly {
        let mut p = Poly::zero();
        for (i, coeff) in coeffs.iter().enumerate() {
            let power = Monomial::from_factors([(var, i as u32)]);
            for (m, c) in coeff.terms() {
                p.add_term(m.mul(&power), c.clone());
            }
        }
        p
    }

    /// Rational coefficients in `var` (`result[i]` multiplies `var^i`) when no other variable
    /// occurs: the input [`rational_roots`](super::rational_roots) takes. Empty for zero.
    pub fn univariate_coeffs(&self, var: &str) -> Option<Vec<Q>> {
        self.coeffs_in(var).iter().map(Poly::as_constant).collect()
    }

    /// `Σ coeffs[i] * var^i`.
    pub fn from_univariate(var: &str, coeffs: &[Q]) -> Poly {
        Poly::from_terms(
            coeffs
                .iter()
                .enumerate()
                .map(|(i, c)| (Monomial::from_factors([(var, i as u32)]), c.clone())),
        )
    }

    /// The coefficient of the highest power of `var` (zero for the zero polynomial).
    pub fn leading_coeff_in(&self, var: &str) -> Poly {
        self.coeffs_in(var).pop().unwrap_or_default()
    }

    /// Terms in the canonical order of [`Monomial::canonical_cmp`]: total degree descending,
    /// then lexicographic with variables ranked by name (`a^2, a*b, b^2, a, b, 1`).
    pub fn terms(&self) -> impl Iterator<Item = (&Monomial, &Q)> {
        self.terms.iter().map(|(key, c)| (&key.0, c))
    }

    /// Number of non-zero terms.
    pub fn term_count(&self) -> usize {
        self.terms.len()
    }

    /// 64-bit words beyond the first in the largest numerator or denominator of a
    /// coefficient: 0 for coefficients below 2^64, about n/19 for n-digit ones. Arithmetic on
    /// a coefficient costs about (1 + this)² times a small one's, which is what work limits
    /// weigh a product by.
    pub fn extra_coeff_words(&self) -> u64 {
        self.terms
            .iter()
            .map(|(_, c)| c.numer().bits().max(c.denom().bits()).saturating_sub(1) / 64)
            .max()
            .unwrap_or(0)
    }

    /// The first term in canonical order; `None` for zero.
    pub fn leading_term(&self) -> Option<(&Monomial, &Q)> {
        self.terms().next()
    }

    pub fn pow(&self, e: u32) -> Poly {
        // Square-and-multiply (common practice).
        let mut result = Poly::one();
        let mut base = self.clone();
        let mut e = e;
        while e > 0 {
            if e & 1 == 1 {
                result = &result * &base;
            }
            e >>= 1;
            if e > 0 {
                base = &base * &base;
            }
        }
        result
    }

    pub fn scale(&self, c: &Q) -> Poly {
        if c.is_zero() {
            return Poly::zero();
        }
        if c.is_one() {
            return self.clone();
        }
        if c.denom().is_one() && c.numer().is_negative() && c.numer().magnitude().is_one() {
            return -self;
        }
        Poly {
            terms: self
                .terms
                .iter()
                .map(|(key, coeff)| (key.clone(), coeff * c))
                .collect(),
        }
    }

    /// Value with every variable bound; the first unbound variable (by name) is an error.
    pub fn eval(&self, values: &BTreeMap<String, Q>) -> Result<Q, UnboundVariable> {
        if let Some(missing) = self
            .variables()
            .into_iter()
            .find(|v| !values.contains_key(v))
        {
            return Err(UnboundVariable(missing));
        }
        // In GMP: its gcd is subquadratic, where `num`'s binary gcd made a rule with
        // 3,000-digit constants take seconds per value.
        let values: BTreeMap<&str, rug::Rational> = values
            .iter()
            .map(|(name, value)| (name.as_str(), to_rug_rational(value)))
            .collect();
        let mut sum = rug::Rational::new();
        for (m, c) in self.terms() {
            let mut term = to_rug_rational(c);
            for (name, e) in m.factors() {
                let value = &values[name];
                let power = rug::Rational::from(rug::ops::Pow::pow(value, e));
                term *= &power;
            }
            sum += &term;
        }
        Ok(from_rug_rational(&sum))
    }

    /// Substitutes values for the variables that have one; the others stay symbolic.
    pub fn eval_partial(&self, values: &BTreeMap<String, Q>) -> Poly {
        let mut result = Poly::zero();
        for (m, c) in self.terms() {
            let mut coeff = c.clone();
            let mut kept = Vec::new();
            for (name, e) in m.factors() {
                match values.get(name) {
                    Some(value) => coeff *= num_traits::pow(value.clone(), e as usize),
                    None => kept.push((name, e)),
                }
            }
            result.add_term(Monomial::from_factors(kept), coeff);
        }
        result
    }

    /// Replaces `var` by the polynomial `by` (Horner's scheme in `var`).
    pub fn substitute(&self, var: &str, by: &Poly) -> Poly {
        if !self.contains_var(var) {
            return self.clone();
        }
        self.coeffs_in(var)
            .iter()
            .rev()
            .fold(Poly::zero(), |acc, coeff| &(&acc * by) + coeff)
    }

    /// Partial derivative with respect to `var`.
    pub fn derivative(&self, var: &str) -> Poly {
        let mut result = Poly::zero();
        for (m, c) in self.terms() {
            let (rest, e) = m.split_var(var);
            if e > 0 {
                let lowered = rest.mul(&Monomial::from_factors([(var, e - 1)]));
                result.add_term(lowered, c * Q::from_integer(BigInt::from(e)));
            }
        }
        result
    }

    /// `(c, primitive)` with `self = c * primitive`, `primitive` having coprime integer
    /// coefficients and a positive leading coefficient (so `c` has the sign of the leading
    /// coefficient). Zero gives `(0, 0)`.
    pub fn content_and_primitive(&self) -> (Q, Poly) {
        let Some((_, lead)) = self.leading_term() else {
            return (Q::zero(), Poly::zero());
        };
        // Content of a rational polynomial: gcd of numerators over lcm of denominators
        // (common practice).
        let mut numer_gcd = BigInt::zero();
        let mut denom_lcm = BigInt::one();
        for (_, c) in self.terms() {
            if !numer_gcd.is_one() {
                numer_gcd = numer_gcd.gcd(c.numer());
            }
            if !c.denom().is_one() {
                denom_lcm = denom_lcm.lcm(c.denom());
            }
        }
        let mut content = Q::new(numer_gcd, denom_lcm);
        if lead.is_negative() {
            content = -content;
        }
        let inverse = content.recip();
        (content, self.scale(&inverse))
    }

    /// Exact quotient `self / divisor`, or `None` when the division leaves a remainder or the
    /// divisor is zero.
    pub fn div_exact(&self, divisor: &Poly) -> Option<Poly> {
        let (divisor_monomial, divisor_coeff) = divisor.leading_term()?;
        if let Some(c) = divisor.as_constant() {
            return Some(self.scale(&c.recip()));
        }
        if let Some(result) = self.div_exact_in_integers(divisor) {
            return result;
        }
        // Division by the leading term in a monomial order: if divisor | self, every
        // intermediate remainder is a multiple of divisor, so its leading monomial must be
        // divisible by the divisor's (Cox, Little, O'Shea, "Ideals, Varieties, and
        // Algorithms", ch. 2 §3). Leading monomials strictly decrease, so the loop ends.
        // The remainder is a search tree: every step removes its leading term and adds a
        // shifted divisor, which on the sorted vector moved every other term (quadratic in
        // the size of the dividend, 80% of a gcd on a rule with many names).
        // The coefficients are GMP rationals: `num` reduced every one by its binary gcd, which
        // on 600-digit fractions was most of a second per division (a fuzzed rule with
        // 10^589 in nested fractions).
        let lead = to_rug_rational(divisor_coeff);
        let rest: Vec<(&Monomial, rug::Rational)> = divisor
            .terms()
            .skip(1)
            .map(|(m, c)| (m, to_rug_rational(c)))
            .collect();
        let mut remainder: BTreeMap<TermKey, rug::Rational> = self
            .terms
            .iter()
            .map(|(key, c)| (key.clone(), to_rug_rational(c)))
            .collect();
        let mut quotient = Vec::new();
        while let Some((TermKey(m), c)) = remainder.pop_first() {
            let factor_monomial = m.checked_div(divisor_monomial)?;
            let factor = c / &lead;
            // The divisor's leading term cancels the removed term exactly.
            for (dm, dc) in &rest {
                let delta = rug::Rational::from(dc * &factor);
                match remainder.entry(TermKey(factor_monomial.mul(dm))) {
                    Entry::Occupied(mut entry) => {
                        *entry.get_mut() -= delta;
                        if entry.get().cmp0() == Ordering::Equal {
                            entry.remove();
                        }
                    }
                    Entry::Vacant(entry) => {
                        entry.insert(-delta);
                    }
                }
            }
            quotient.push((factor_monomial, from_rug_rational(&factor)));
        }
        Some(Poly::from_terms(quotient))
    }

    /// [`Poly::div_exact`] in integers, when both have integer coefficients and every
    /// quotient coefficient is an integer (always so for a primitive divisor, by Gauss's
    /// lemma): `None` to fall back on rationals. The steps are those of the rational route,
    /// without a gcd per coefficient (num's binary gcd on 600-digit coefficients was most of
    /// two seconds on a fuzzed rule).
    fn div_exact_in_integers(&self, divisor: &Poly) -> Option<Option<Poly>> {
        let integral = |p: &Poly| p.terms.iter().all(|(_, c)| c.denom().is_one());
        if !integral(self) || !integral(divisor) {
            return None;
        }
        let (divisor_monomial, lead) = divisor.leading_term()?;
        let lead = lead.numer();
        let mut remainder: BTreeMap<TermKey, BigInt> = self
            .terms
            .iter()
            .map(|(key, c)| (key.clone(), c.numer().clone()))
            .collect();
        let mut quotient = Vec::new();
        while let Some((TermKey(m), c)) = remainder.pop_first() {
            let Some(factor_monomial) = m.checked_div(divisor_monomial) else {
                return Some(None);
            };
            let (factor, rest) = c.div_rem(lead);
            if !rest.is_zero() {
                return None;
            }
            for (dm, dc) in divisor.terms().skip(1) {
                let delta = -(dc.numer() * &factor);
                add_to_remainder(
                    &mut remainder,
                    TermKey(factor_monomial.mul(dm)),
                    delta,
                    |sum, d| *sum += d,
                );
            }
            quotient.push((factor_monomial, Q::from_integer(factor)));
        }
        Some(Some(Poly::from_terms(quotient)))
    }

    /// Greatest common divisor, normalised: primitive with integer coefficients and a positive
    /// leading coefficient; `gcd(0, 0) = 0`, and `gcd(c, p) = 1` for a non-zero constant `c`.
    pub fn gcd(a: &Poly, b: &Poly) -> Poly {
        super::gcd::gcd(a, b)
    }
}

/// Adds `delta` to the remainder's coefficient of `key`, dropping the term if it cancels (the
/// step shared by both routes of [`Poly::div_exact`]).
fn add_to_remainder<C: Zero>(
    remainder: &mut BTreeMap<TermKey, C>,
    key: TermKey,
    delta: C,
    add: impl FnOnce(&mut C, C),
) {
    match remainder.entry(key) {
        Entry::Occupied(mut entry) => {
            add(entry.get_mut(), delta);
            if entry.get().is_zero() {
                entry.remove();
            }
        }
        Entry::Vacant(entry) => {
            entry.insert(delta);
        }
    }
}

impl fmt::Display for Poly {
    /// Plain text such as `2*rho^2 - rho + 1/2`, terms in canonical order.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.is_zero() {
            return write!(f, "0");
        }
        for (index, (m, c)) in self.terms().enumerate() {
            let magnitude = c.abs();
            match (index, c.is_negative()) {
                (0, true) => write!(f, "-")?,
                (0, false) => {}
                (_, true) => write!(f, " - ")?,
                (_, false) => write!(f, " + ")?,
            }
            if m.is_one() {
                write!(f, "{magnitude}")?;
            } else if magnitude.is_one() {
                write!(f, "{m}")?;
            } else {
                write!(f, "{magnitude}*{m}")?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::rational::q;

    fn x() -> Poly {
        Poly::var("x")
    }
    fn y() -> Poly {
        Poly::var("y")
    }
    fn c(n: i64, d: i64) -> Poly {
        Poly::constant(q(n, d))
    }

    #[test]
    fn exact_division_in_integers_and_its_fallback_to_rationals() {
        // (3x + 2y)(x − 5y²) / (3x + 2y), all in integers.
        let (x, y) = (x(), y());
        let divisor = c(3, 1) * &x + c(2, 1) * &y;
        let quotient = &x - c(5, 1) * y.pow(2);
        let product = &divisor * &quotient;
        assert!(product.div_exact_in_integers(&divisor).is_some());
        assert_eq!(product.div_exact(&divisor), Some(quotient.clone()));
        // Integer inputs, a fractional quotient: (x + y)/(2x + 2y) = 1/2 by the rational route.
        let sum = &x + &y;
        let twice = c(2, 1) * &sum;
        assert_eq!(sum.div_exact_in_integers(&twice), None);
        assert_eq!(sum.div_exact(&twice), Some(c(1, 2)));
        // Not a multiple: the integer route says so when a leading monomial does not divide,
        // and hands over to the rational route when a coefficient does not.
        let monic = &x + c(2, 1) * &y;
        assert_eq!(
            (&x * &y + c(1, 1)).div_exact_in_integers(&monic),
            Some(None)
        );
        assert_eq!((&x * &y + c(1, 1)).div_exact(&monic), None);
        let other = &product + &x;
        assert_eq!(other.div_exact_in_integers(&divisor), None);
        assert_eq!(other.div_exact(&divisor), None);
        // Rational coefficients go the rational way.
        let halves = product.scale(&q(1, 2));
        assert_eq!(halves.div_exact_in_integers(&divisor), None);
        assert_eq!(halves.div_exact(&divisor), Some(quotient.scale(&q(1, 2))));
        // 600-digit fractions (the rational route runs in GMP): (x/3 + 10^589/7·y) times
        // (x − 10^300/11) divided by either factor gives the other (exact arithmetic, by
        // construction), and a remainder of 1 is seen.
        let big = |e: u32, d: i64| Poly::constant(Q::new(BigInt::from(10).pow(e), d.into()));
        let a = c(1, 3) * &x + &(&big(589, 7) * &y);
        let b = &x - &big(300, 11);
        let long = &a * &b;
        assert_eq!(long.div_exact(&a), Some(b.clone()));
        assert_eq!(long.div_exact(&b), Some(a.clone()));
        assert_eq!((&long + &c(1, 1)).div_exact(&b), None);
    }
    fn values(pairs: &[(&str, Q)]) -> BTreeMap<String, Q> {
        pairs
            .iter()
            .map(|(name, v)| (name.to_string(), v.clone()))
            .collect()
    }

    #[test]
    fn constants_and_zero() {
        assert!(Poly::zero().is_zero());
        assert!(Poly::one().is_one());
        assert!(Poly::constant(Q::zero()).is_zero());
        assert_eq!(Poly::from_integer(0), Poly::zero());
        assert_eq!(Poly::zero().as_constant(), Some(Q::zero()));
        assert_eq!(Poly::from_integer(-4).as_constant(), Some(q(-4, 1)));
        assert_eq!(x().as_constant(), None);
        assert_eq!((x() + c(1, 1)).as_constant(), None);
        assert!(!x().is_one());
        assert_eq!(Poly::zero().total_degree(), 0);
        assert_eq!(Poly::zero().degree_in("x"), 0);
        assert!(Poly::zero().variables().is_empty());
    }

    #[test]
    fn variables_and_degrees() {
        let p = x().pow(3) * y() + y().pow(2) + Poly::var("alpha");
        let vars: Vec<_> = p.variables().into_iter().collect();
        assert_eq!(vars, vec!["alpha", "x", "y"]);
        assert!(p.contains_var("y"));
        assert!(!p.contains_var("z"));
        assert_eq!(p.total_degree(), 4);
        assert_eq!(p.degree_in("x"), 3);
        assert_eq!(p.degree_in("y"), 2);
        assert_eq!(p.degree_in("z"), 0);
        assert_eq!(p.term_count(), 3);
    }

    #[test]
    fn coeffs_in_round_trip() {
        // (y+1) x^2 - 3 x + y^2
        let p = (y() + c(1, 1)) * x().pow(2) - c(3, 1) * x() + y().pow(2);
        let coeffs = p.coeffs_in("x");
        assert_eq!(coeffs, vec![y().pow(2), c(-3, 1), y() + c(1, 1)]);
        assert_eq!(Poly::from_coeffs_in("x", &coeffs), p);
        assert_eq!(p.leading_coeff_in("x"), y() + c(1, 1));
        assert_eq!(p.coeffs_in("z"), vec![p.clone()]);
        assert!(Poly::zero().coeffs_in("x").is_empty());
        assert_eq!(Poly::from_coeffs_in("x", &[]), Poly::zero());
        assert_eq!(Poly::zero().leading_coeff_in("x"), Poly::zero());
    }

    #[test]
    fn univariate_round_trip() {
        let k = Poly::var("k");
        let p = c(6, 1) * k.pow(2) - c(1, 2);
        let coeffs = p.univariate_coeffs("k").unwrap();
        assert_eq!(coeffs, vec![q(-1, 2), Q::zero(), q(6, 1)]);
        assert_eq!(Poly::from_univariate("k", &coeffs), p);
        assert_eq!((&p * &x()).univariate_coeffs("k"), None);
        assert_eq!(Poly::zero().univariate_coeffs("k"), Some(vec![]));
        assert_eq!(c(3, 1).univariate_coeffs("k"), Some(vec![q(3, 1)]));
    }

    #[test]
    fn sorted_term_lists_merge_and_cancel() {
        // from_terms sums repeated monomials in any order and drops what cancels, like
        // adding the terms one at a time.
        let pieces = [
            (Monomial::var("x"), q(1, 2)),
            (Monomial::one(), q(3, 1)),
            (Monomial::var("y"), q(-1, 1)),
            (Monomial::var("x"), q(-1, 2)),
            (Monomial::from_factors([("x", 1), ("y", 2)]), q(5, 1)),
            (Monomial::one(), q(-3, 1)),
            (Monomial::var("y"), q(2, 1)),
            (Monomial::var("z"), q(0, 1)),
        ];
        let mut one_by_one = Poly::zero();
        for (m, c) in pieces.iter().cloned() {
            one_by_one.add_term(m, c);
        }
        assert_eq!(Poly::from_terms(pieces.iter().cloned()), one_by_one);
        assert_eq!(one_by_one, c(5, 1) * x() * y().pow(2) + y());
        assert_eq!(&one_by_one - &one_by_one, Poly::zero());
        assert_eq!((x() + y()) - x(), y());
        assert_eq!((x() - c(1, 1)) * (x() + c(1, 1)), x().pow(2) - c(1, 1));
        let mut sum = x();
        sum += &(-x());
        assert!(sum.is_zero());
    }

    #[test]
    fn terms_follow_canonical_order() {
        let p = y().pow(2) + x() * y() + x().pow(2) + y() + x() + c(7, 1);
        let listed: Vec<String> = p.terms().map(|(m, _)| m.to_string()).collect();
        assert_eq!(listed, vec!["x^2", "x*y", "y^2", "x", "y", "1"]);
        let (lead, coeff) = p.leading_term().unwrap();
        assert_eq!(
            (lead.to_string(), coeff.clone()),
            ("x^2".to_string(), q(1, 1))
        );
        assert!(Poly::zero().leading_term().is_none());
    }

    #[test]
    fn display_plain_text() {
        let rho = Poly::var("rho");
        let p = c(2, 1) * rho.pow(2) - rho.clone() + c(1, 2);
        assert_eq!(p.to_string(), "2*rho^2 - rho + 1/2");
        assert_eq!((-p).to_string(), "-2*rho^2 + rho - 1/2");
        assert_eq!(Poly::zero().to_string(), "0");
        assert_eq!(c(-3, 4).to_string(), "-3/4");
        assert_eq!((c(1, 3) * rho * x()).to_string(), "1/3*rho*x");
    }

    #[test]
    fn pow_and_scale() {
        // (x + 1)^3 = x^3 + 3x^2 + 3x + 1 (binomial theorem).
        let p = (x() + c(1, 1)).pow(3);
        assert_eq!(
            p,
            x().pow(3) + c(3, 1) * x().pow(2) + c(3, 1) * x() + c(1, 1)
        );
        assert_eq!(x().pow(0), Poly::one());
        assert_eq!(Poly::zero().pow(0), Poly::one());
        assert_eq!(Poly::zero().pow(2), Poly::zero());
        assert_eq!(p.scale(&Q::zero()), Poly::zero());
        assert_eq!(x().scale(&q(-1, 2)), c(-1, 2) * x());
    }

    #[test]
    fn eval_and_unbound() {
        let p = x().pow(2) * y() - c(1, 2);
        let v = values(&[("x", q(3, 1)), ("y", q(1, 3))]);
        assert_eq!(p.eval(&v), Ok(q(5, 2)));
        let partial = values(&[("y", q(2, 1))]);
        assert_eq!(p.eval(&partial), Err(UnboundVariable("x".to_string())));
        assert_eq!(Poly::from_integer(5).eval(&BTreeMap::new()), Ok(q(5, 1)));
        assert_eq!(Poly::zero().eval(&BTreeMap::new()), Ok(Q::zero()));
    }

    #[test]
    fn eval_partial_keeps_free_variables() {
        let p = x().pow(2) * y() + x() * y() - c(1, 2);
        let partial = values(&[("y", q(2, 1)), ("unused", q(9, 1))]);
        assert_eq!(
            p.eval_partial(&partial),
            c(2, 1) * x().pow(2) + c(2, 1) * x() - c(1, 2)
        );
        // Cancellation after substitution drops the terms.
        let cancels = x() * y() - x();
        assert_eq!(
            cancels.eval_partial(&values(&[("y", q(1, 1))])),
            Poly::zero()
        );
    }

    #[test]
    fn substitute_variable_by_polynomial() {
        // (x^2 + x)[x := y - 1] = y^2 - y
        let p = x().pow(2) + x();
        assert_eq!(p.substitute("x", &(y() - c(1, 1))), y().pow(2) - y());
        assert_eq!(p.substitute("z", &y()), p);
        assert_eq!(p.substitute("x", &Poly::zero()), Poly::zero());
    }

    #[test]
    fn derivative_in_one_variable() {
        let p = x().pow(3) * y() + c(5, 1) * y();
        assert_eq!(p.derivative("x"), c(3, 1) * x().pow(2) * y());
        assert_eq!(p.derivative("y"), x().pow(3) + c(5, 1));
        assert_eq!(p.derivative("z"), Poly::zero());
    }

    #[test]
    fn content_and_primitive_part() {
        let p = c(-3, 2) * x() + c(9, 4);
        let (content, primitive) = p.content_and_primitive();
        assert_eq!(content, q(-3, 4));
        assert_eq!(primitive, c(2, 1) * x() - c(3, 1));
        assert_eq!(primitive.scale(&content), p);
        assert_eq!(
            Poly::zero().content_and_primitive(),
            (Q::zero(), Poly::zero())
        );
        assert_eq!(c(-5, 3).content_and_primitive(), (q(-5, 3), Poly::one()));
    }

    #[test]
    fn exact_division() {
        let a = x() + y();
        let b = x() - c(2, 1) * y() + c(1, 3);
        let product = &a * &b;
        assert_eq!(product.div_exact(&a), Some(b.clone()));
        assert_eq!(product.div_exact(&b), Some(a.clone()));
        assert_eq!(product.div_exact(&c(1, 2)), Some(product.scale(&q(2, 1))));
        assert_eq!(product.div_exact(&Poly::zero()), None);
        assert_eq!(product.div_exact(&(x() + c(1, 1))), None);
        assert_eq!(a.div_exact(&product), None);
        assert_eq!(Poly::zero().div_exact(&a), Some(Poly::zero()));
        assert_eq!(x().div_exact(&y()), None);
    }
}
