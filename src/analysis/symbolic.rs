//! Exact results that are not rational functions: a sum of terms, each a rational function
//! of the parameters times powers of Gamma values, `u^v`, `exp`, `ln` and `√π`. Gamma values
//! whose arguments differ by integers are brought to one argument (DLMF 5.5.1), so results
//! such as `Γ(α+2)Γ(α)/Γ(α+1)²` become the rational function they are.

use std::collections::BTreeMap;

use num_traits::{Signed, ToPrimitive};
use rug::float::Constant;
use rug::Float;

use super::hypergeometric::gamma_shift_ratio;
use crate::algebra::{RatFunc, Q};
use crate::numeric::to_rug_rational;

/// A transcendental factor (raised to an integer power in a [`Term`]).
#[derive(Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Atom {
    /// Γ(x)
    Gamma(RatKey),
    /// base^exponent with a non-integer or symbolic exponent
    Power { base: RatKey, exponent: RatKey },
    /// e^x
    Exp(RatKey),
    /// ln x
    Log(RatKey),
    /// √π
    SqrtPi,
}

/// A rational function ordered by its printed form (so atoms sort deterministically).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct RatKey(pub RatFunc);

impl PartialOrd for RatKey {
    fn partial_cmp(&self, other: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for RatKey {
    fn cmp(&self, other: &Self) -> std::cmp::Ordering {
        self.0.to_string().cmp(&other.0.to_string())
    }
}

/// `coefficient · Π atom^exponent`, kept in a normal form by [`Term::normalized`].
#[derive(Clone, Debug, PartialEq)]
pub struct Term {
    pub coefficient: RatFunc,
    pub atoms: Vec<(Atom, i32)>,
}

/// A sum of terms with distinct atom lists.
#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub terms: Vec<Term>,
}

impl Term {
    /// Terms of every polynomial in it (numerators and denominators of the coefficient and of
    /// each atom's arguments): the measure of how costly arithmetic with it will be.
    pub fn size(&self) -> usize {
        let of = |r: &RatFunc| r.numer().term_count() + r.denom().term_count();
        let atoms: usize = self
            .atoms
            .iter()
            .map(|(atom, _)| match atom {
                Atom::Gamma(x) | Atom::Exp(x) | Atom::Log(x) => of(&x.0),
                Atom::Power { base, exponent } => of(&base.0) + of(&exponent.0),
                Atom::SqrtPi => 0,
            })
            .sum();
        of(&self.coefficient) + atoms
    }

    pub fn rational(c: RatFunc) -> Term {
        Term {
            coefficient: c,
            atoms: Vec::new(),
        }
    }

    pub fn gamma(x: RatFunc, exponent: i32) -> Term {
        Term {
            coefficient: RatFunc::one(),
            atoms: vec![(Atom::Gamma(RatKey(x)), exponent)],
        }
        .normalized()
    }

    pub fn power(base: RatFunc, exponent: RatFunc) -> Term {
        Term {
            coefficient: RatFunc::one(),
            atoms: vec![(
                Atom::Power {
                    base: RatKey(base),
                    exponent: RatKey(exponent),
                },
                1,
            )],
        }
        .normalized()
    }

    pub fn exp(x: RatFunc) -> Term {
        Term {
            coefficient: RatFunc::one(),
            atoms: vec![(Atom::Exp(RatKey(x)), 1)],
        }
        .normalized()
    }

    pub fn log(x: RatFunc) -> Term {
        Term {
            coefficient: RatFunc::one(),
            atoms: vec![(Atom::Log(RatKey(x)), 1)],
        }
        .normalized()
    }

    pub fn is_zero(&self) -> bool {
        self.coefficient.is_zero()
    }

    /// The rational function it is, when no transcendental factor is left.
    pub fn as_rational(&self) -> Option<&RatFunc> {
        self.atoms.is_empty().then_some(&self.coefficient)
    }

    pub fn mul(&self, other: &Term) -> Term {
        let mut atoms = self.atoms.clone();
        atoms.extend(other.atoms.iter().cloned());
        Term {
            coefficient: &self.coefficient * &other.coefficient,
            atoms,
        }
        .normalized()
    }

    /// `1/self`; `None` when the coefficient is zero.
    pub fn inv(&self) -> Option<Term> {
        Some(
            Term {
                coefficient: self.coefficient.inv()?,
                atoms: self.atoms.iter().map(|(a, e)| (a.clone(), -e)).collect(),
            }
            .normalized(),
        )
    }

    pub fn scale(&self, c: &RatFunc) -> Term {
        Term {
            coefficient: &self.coefficient * c,
            atoms: self.atoms.clone(),
        }
    }

    /// Merges equal atoms, folds Gamma values at integer-spaced arguments into one
    /// (DLMF 5.5.1), evaluates Γ at positive integers and half-integers (DLMF 5.4.1, 5.4.6),
    /// and moves integer powers into the coefficient.
    pub fn normalized(self) -> Term {
        let mut coefficient = self.coefficient;
        if coefficient.is_zero() {
            return Term::rational(RatFunc::zero());
        }
        let mut gammas: Vec<(RatFunc, i32)> = Vec::new();
        let mut merged: BTreeMap<Atom, i32> = BTreeMap::new();
        let mut exp_sum = RatFunc::zero();
        let mut powers: Vec<(RatFunc, RatFunc)> = Vec::new();
        for (atom, e) in self.atoms {
            if e == 0 {
                continue;
            }
            match atom {
                Atom::Gamma(RatKey(x)) => gammas.push((x, e)),
                Atom::Exp(RatKey(x)) => {
                    exp_sum = &exp_sum + &(&x * &RatFunc::from_integer(e as i64))
                }
                Atom::Power { base, exponent } => {
                    let exponent = &exponent.0 * &RatFunc::from_integer(e as i64);
                    match powers.iter_mut().find(|(b, _)| *b == base.0) {
                        Some(p) => p.1 = &p.1 + &exponent,
                        None => powers.push((base.0, exponent)),
                    }
                }
                Atom::Log(RatKey(x)) => {
                    if x.is_one() {
                        return Term::rational(RatFunc::zero());
                    }
                    *merged.entry(Atom::Log(RatKey(x))).or_insert(0) += e;
                }
                Atom::SqrtPi => *merged.entry(Atom::SqrtPi).or_insert(0) += e,
            }
        }
        for (base, exponent) in powers {
            if base.is_one() || exponent.is_zero() {
                continue;
            }
            // Integer powers fold into the coefficient unless they are too large to write out.
            let small = |n: &Q| n.abs() <= Q::from_integer(MAX_FOLD.into());
            match exponent.as_constant() {
                Some(n) if n.is_integer() && small(&n) && expands_briefly(&base, &n) => {
                    let n = n.to_integer().to_i32().unwrap_or(0);
                    match base.pow(n) {
                        Some(p) => coefficient = &coefficient * &p,
                        None => return Term::rational(RatFunc::zero()),
                    }
                }
                // b^(n + f) = b^n · b^f with 0 < f < 1 for a numeric base: 2^(−1/2) = 2^(1/2)/2.
                Some(n) if !n.is_integer() && small(&n) && base.as_constant().is_some() => {
                    let whole = n.floor();
                    let fraction = &n - &whole;
                    let whole = whole.to_integer().to_i32().unwrap_or(0);
                    match base.pow(whole) {
                        Some(p) => coefficient = &coefficient * &p,
                        None => return Term::rational(RatFunc::zero()),
                    }
                    *merged
                        .entry(Atom::Power {
                            base: RatKey(base),
                            exponent: RatKey(RatFunc::constant(fraction)),
                        })
                        .or_insert(0) += 1
                }
                _ => {
                    *merged
                        .entry(Atom::Power {
                            base: RatKey(base),
                            exponent: RatKey(exponent),
                        })
                        .or_insert(0) += 1
                }
            }
        }
        if !exp_sum.is_zero() {
            *merged.entry(Atom::Exp(RatKey(exp_sum))).or_insert(0) += 1;
        }
        for (x, e, extra) in fold_gammas(gammas, &mut coefficient) {
            if extra {
                *merged.entry(Atom::SqrtPi).or_insert(0) += e;
            } else {
                *merged.entry(Atom::Gamma(RatKey(x))).or_insert(0) += e;
            }
        }
        Term {
            coefficient,
            atoms: merged.into_iter().filter(|(_, e)| *e != 0).collect(),
        }
    }

    /// The value at the given parameters, at `prec` bits (`None` when a parameter is
    /// unbound, a Gamma argument is a pole or a logarithm's argument is not positive).
    pub fn to_float(&self, values: &BTreeMap<String, Q>, prec: u32) -> Option<Float> {
        let eval = |r: &RatFunc| -> Option<Q> { r.eval(values).ok() };
        let mut out = Float::with_val(prec, to_rug_rational(&eval(&self.coefficient)?));
        for (atom, e) in &self.atoms {
            let v = match atom {
                Atom::Gamma(RatKey(x)) => {
                    let x = eval(x)?;
                    if x.is_integer() && !x.is_positive() {
                        return None;
                    }
                    Float::with_val(prec, to_rug_rational(&x)).gamma()
                }
                Atom::Power { base, exponent } => {
                    let b = eval(&base.0)?;
                    let n = eval(&exponent.0)?;
                    // An integer power of any base (a rate r < 0 kept unexpanded as r^(−b)).
                    if n.is_integer() {
                        let n = n.to_integer().to_i32()?;
                        if num_traits::Zero::is_zero(&b) && n < 0 {
                            return None;
                        }
                        rug::ops::Pow::pow(Float::with_val(prec, to_rug_rational(&b)), n)
                    } else {
                        if !b.is_positive() {
                            return None;
                        }
                        let b = Float::with_val(prec, to_rug_rational(&b));
                        let n = Float::with_val(prec, to_rug_rational(&n));
                        (b.ln() * n).exp()
                    }
                }
                Atom::Exp(RatKey(x)) => Float::with_val(prec, to_rug_rational(&eval(x)?)).exp(),
                Atom::Log(RatKey(x)) => {
                    let x = eval(x)?;
                    if !x.is_positive() {
                        return None;
                    }
                    Float::with_val(prec, to_rug_rational(&x)).ln()
                }
                Atom::SqrtPi => Float::with_val(prec, Constant::Pi).sqrt(),
            };
            if *e >= 0 {
                for _ in 0..*e {
                    out *= &v;
                }
            } else {
                for _ in 0..e.unsigned_abs() {
                    out /= &v;
                }
            }
        }
        Some(out)
    }
}

/// Groups Γ(x) whose arguments differ by integers; each group becomes one Gamma value times
/// rational factors. Returns (argument, exponent, is_sqrt_pi) for what is left.
fn fold_gammas(
    gammas: Vec<(RatFunc, i32)>,
    coefficient: &mut RatFunc,
) -> Vec<(RatFunc, i32, bool)> {
    // Each group: a representative and its members as (integer offset, exponent).
    let mut groups: Vec<(RatFunc, Vec<(i64, i32)>)> = Vec::new();
    for (x, e) in gammas {
        let placed = groups.iter_mut().find_map(|(rep, members)| {
            let d = (&x - &*rep).as_constant()?;
            if d.is_integer() {
                members.push((d.to_integer().to_i64()?, e));
                Some(())
            } else {
                None
            }
        });
        if placed.is_none() {
            groups.push((x, vec![(0, e)]));
        }
    }
    let mut out = Vec::new();
    for (rep, members) in groups {
        let min = members.iter().map(|(m, _)| *m).min().unwrap_or(0);
        let max = members.iter().map(|(m, _)| *m).max().unwrap_or(0);
        // A symbolic group folds into a rising product of degree spread × exponent in the
        // parameters: past `MAX_SYMBOLIC_FOLD` (the degree a parameter may have in a rule),
        // the Gamma values stay apart. `(k−1)/(k + A/2) for k > 662` folded Γ(A/2 + 663)
        // against Γ(A/2 + 2) into a polynomial of degree 661 in A: 406 s.
        let weight = members
            .iter()
            .map(|(_, e)| i64::from(e.unsigned_abs()))
            .max()
            .unwrap_or(1);
        let spread = if rep.as_constant().is_none() {
            (MAX_SYMBOLIC_FOLD / weight).max(1)
        } else {
            MAX_FOLD
        };
        if max - min > spread {
            // Too far apart to write as one rational factor: clusters of nearby arguments
            // fold on their own (Γ(x)/Γ(x + 1) still becomes 1/x when Γ(x + 662) is there).
            let mut members = members;
            members.sort_by_key(|(offset, _)| *offset);
            let mut clusters: Vec<Vec<(RatFunc, i32)>> = Vec::new();
            let mut start = members[0].0;
            for (offset, e) in members {
                if clusters.is_empty() || offset - start > spread {
                    clusters.push(Vec::new());
                    start = offset;
                }
                let gamma = (&rep + &RatFunc::from_integer(offset), e);
                clusters.last_mut().expect("one cluster").push(gamma);
            }
            for cluster in clusters {
                out.extend(fold_gammas(cluster, coefficient));
            }
            continue;
        }
        // From the smallest argument the remaining factors are rising products.
        let base = &rep + &RatFunc::from_integer(min);
        let mut total = 0i32;
        for (offset, e) in members {
            let m = offset - min;
            // Γ(base + m) = Γ(base)·(base)_m (DLMF 5.5.1)
            match gamma_shift_ratio(&base, m).and_then(|r| r.pow(e)) {
                Some(r) => *coefficient = &*coefficient * &r,
                None => {
                    // A pole: keep the Gamma value as it is, unfolded.
                    out.push((&base + &RatFunc::from_integer(m), e, false));
                    continue;
                }
            }
            total += e;
        }
        if total == 0 {
            continue;
        }
        let half = Q::new(1.into(), 2.into());
        match base.as_constant() {
            // Γ(n) = (n−1)! (DLMF 5.4.1)
            Some(c)
                if c.is_integer() && c.is_positive() && c <= Q::from_integer(MAX_FOLD.into()) =>
            {
                let n = c.to_integer().to_i64().unwrap_or(1);
                let factorial = gamma_shift_ratio(&RatFunc::one(), n - 1).expect("positive");
                if folds_briefly(&factorial, total) {
                    *coefficient = &*coefficient * &factorial.pow(total).expect("non-zero");
                } else {
                    out.push((base, total, false));
                }
            }
            // Γ(n + 1/2) = √π·(1/2)_n (DLMF 5.4.6 with DLMF 5.5.1)
            Some(c)
                if (&c - &half).is_integer()
                    && c.is_positive()
                    && c <= Q::from_integer(MAX_FOLD.into()) =>
            {
                let n = (&c - &half).to_integer().to_i64().unwrap_or(0);
                let rising = gamma_shift_ratio(&RatFunc::constant(half), n).expect("positive");
                if folds_briefly(&rising, total) {
                    *coefficient = &*coefficient * &rising.pow(total).expect("non-zero");
                    out.push((base, total, true));
                } else {
                    out.push((base, total, false));
                }
            }
            _ => out.push((base, total, false)),
        }
    }
    out
}

/// Largest integer spread folded into rational factors (beyond it the products would be
/// enormous and tell a reader nothing).
const MAX_FOLD: i64 = 1000;

/// Largest degree (integer spread times exponent) a group of Gamma values with a symbolic
/// argument folds into: the degree a parameter may have in a rule
/// (`model::size::MAX_PARAMETER_DEGREE`).
const MAX_SYMBOLIC_FOLD: i64 = 48;

/// Most bits a constant Γ value raised to its exponent may take and still fold into a
/// number: `p(k)/p(k-1) = (k + 662)^110` has Γ(664)^(−110) in its tail prefactor, a fraction
/// of 176,000 digits that took seconds to build and to evaluate. Beyond it the Γ value stays
/// a power (the same size as `model::size::MAX_NUMBER_BITS`).
const MAX_FOLDED_BITS: u64 = 20_000;

/// Whether the constant `value^exponent` stays within `MAX_FOLDED_BITS` (a value that is not
/// a constant is judged by its terms elsewhere).
fn folds_briefly(value: &RatFunc, exponent: i32) -> bool {
    match value.as_constant() {
        Some(c) => {
            (c.numer().bits() + c.denom().bits()) * u64::from(exponent.unsigned_abs())
                <= MAX_FOLDED_BITS
        }
        None => true,
    }
}

/// Most terms an integer power may expand to and still fold into a coefficient: a rate with
/// many terms, raised to the first index, stays a power (r^(−5) of a sum of twenty names
/// would be a sum of tens of thousands of terms).
const MAX_FOLDED_TERMS: u64 = 64;

/// Whether `base^n` expands to at most `MAX_FOLDED_TERMS` terms above and below: a sum of t
/// terms to the power |n| has at most C(t + |n| − 1, |n|) of them (monomials, r and 1/r always
/// fold).
fn expands_briefly(base: &RatFunc, n: &Q) -> bool {
    let t = base.numer().term_count().max(base.denom().term_count()) as u64;
    let n = n.abs().to_integer().to_u64().unwrap_or(u64::MAX);
    if t <= 1 || n <= 1 {
        return true;
    }
    // C(t − 1 + n, n) by the running product C(t − 1 + i, i), stopping past the limit.
    let mut count: u64 = 1;
    for i in 1..=n {
        count = count.saturating_mul(t - 1 + i) / i;
        if count > MAX_FOLDED_TERMS {
            return false;
        }
    }
    true
}

impl Expr {
    pub fn zero() -> Expr {
        Expr { terms: Vec::new() }
    }

    pub fn from_term(t: Term) -> Expr {
        Expr::zero().plus_term(t)
    }

    pub fn plus_term(mut self, t: Term) -> Expr {
        if t.is_zero() {
            return self;
        }
        match self.terms.iter_mut().find(|u| u.atoms == t.atoms) {
            Some(u) => u.coefficient = &u.coefficient + &t.coefficient,
            None => self.terms.push(t),
        }
        self.terms.retain(|u| !u.is_zero());
        self
    }

    pub fn plus(mut self, other: &Expr) -> Expr {
        for t in &other.terms {
            self = self.plus_term(t.clone());
        }
        self
    }

    pub fn mul_term(&self, t: &Term) -> Expr {
        self.terms
            .iter()
            .fold(Expr::zero(), |acc, u| acc.plus_term(u.mul(t)))
    }

    pub fn mul(&self, other: &Expr) -> Expr {
        other
            .terms
            .iter()
            .fold(Expr::zero(), |acc, t| acc.plus(&self.mul_term(t)))
    }

    pub fn negate(&self) -> Expr {
        self.mul_term(&Term::rational(-RatFunc::one()))
    }

    /// The single term, when there is exactly one (zero counts as the term 0).
    pub fn as_term(&self) -> Option<Term> {
        match self.terms.len() {
            0 => Some(Term::rational(RatFunc::zero())),
            1 => Some(self.terms[0].clone()),
            _ => None,
        }
    }

    pub fn as_rational(&self) -> Option<RatFunc> {
        self.as_term()?.as_rational().cloned()
    }

    /// The value at `prec` bits and a bound on its absolute error from cancellation between
    /// terms (each term is good to a few ulps at `prec`).
    pub fn to_float(&self, values: &BTreeMap<String, Q>, prec: u32) -> Option<(Float, Float)> {
        let mut sum = Float::new(prec);
        let mut magnitude = Float::new(64);
        for t in &self.terms {
            let v = t.to_float(values, prec)?;
            magnitude += Float::with_val(64, v.abs_ref());
            sum += v;
        }
        // Each term carries ≤ (atoms + 2) roundings of relative size 2^(1−prec) (common
        // practice bound for a short MPFR product); 64 covers every term we build.
        let ulp = Float::with_val(64, Float::i_exp(1, 7 - prec as i32));
        Some((sum, magnitude * ulp))
    }
}

/// |v/expected − 1| < 10^(−digits) for a decimal string (for tests against published values).
#[cfg(test)]
pub(crate) fn agrees(v: &Float, expected: &str, digits: i32) -> bool {
    use rug::ops::Pow;
    let e = Float::with_val(v.prec(), Float::parse(expected).expect("a decimal"));
    let diff = Float::with_val(v.prec(), v - &e);
    let rel = Float::with_val(64, diff / &e).abs();
    rel < Float::with_val(64, 10).pow(-digits)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    #[test]
    fn gauss_value_for_yule_simon_is_rational() {
        // Γ(α+2)Γ(α)/Γ(α+1)² = (α+1)/α (DLMF 5.5.1 twice)
        let alpha = RatFunc::var("alpha");
        let t = Term::gamma(&alpha + &RatFunc::from_integer(2), 1)
            .mul(&Term::gamma(alpha.clone(), 1))
            .mul(&Term::gamma(&alpha + &RatFunc::one(), -2));
        let expected = (&alpha + &RatFunc::one()).checked_div(&alpha).unwrap();
        assert_eq!(t.as_rational(), Some(&expected));
    }

    #[test]
    fn gamma_at_integers_and_half_integers() {
        // Γ(5) = 24 (DLMF 5.4.1); Γ(7/2) = 15√π/8 (DLMF 5.4.6 and 5.5.1)
        let t = Term::gamma(RatFunc::from_integer(5), 1);
        assert_eq!(t.as_rational(), Some(&RatFunc::from_integer(24)));
        let h = Term::gamma(RatFunc::constant(q(7, 2)), 1);
        assert_eq!(h.coefficient, RatFunc::constant(q(15, 8)));
        assert_eq!(h.atoms, vec![(Atom::SqrtPi, 1)]);
        let v = h.to_float(&BTreeMap::new(), 100).unwrap();
        // Γ(3.5) = 3.3233509704478425512 (mpmath 1.3.0, mp.dps = 30: gamma(3.5))
        assert!(crate::analysis::symbolic::agrees(
            &v,
            "3.3233509704478425512",
            19
        ));
    }

    #[test]
    fn integer_powers_fold_and_like_terms_combine() {
        let p = RatFunc::var("p");
        let one_minus = &RatFunc::one() - &p;
        let t = Term::power(one_minus.clone(), RatFunc::from_integer(-2));
        assert_eq!(t.as_rational(), one_minus.pow(-2).as_ref());
        let l = Term::log(one_minus.clone());
        let e = Expr::from_term(l.clone()).plus_term(l.scale(&RatFunc::from_integer(-1)));
        assert!(e.terms.is_empty());
    }
}
