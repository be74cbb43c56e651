//! Probabilities in closed form for a single open-ended rule, with the parameters symbolic:
//! `P(k ≥ L) = a(L)/a(b) · S_L / S_b`, where `a(L)/a(b)` is the closed form at k = L (every
//! argument `α + β·k` becomes `α + β·L`), `S_L = Σ_{n≥0} a(L+n)/a(L)` is the rule's series
//! from L (solved in the local index j = k − L, so L may be symbolic) and `S_b` the total's
//! series, both summed by the classical theorems. Ranges follow by difference:
//! `P(L₁ ≤ k ≤ L₂) = T(L₁) − T(L₂+1)` and `P(k ≤ L) = 1 − T(L+1)` with `T(L) = P(k ≥ L)`.
//! Gamma values at integer-spaced arguments fold (DLMF 5.5.1), so a geometric law gives ρ^L.

use num_bigint::BigInt;

use crate::algebra::{RatFunc, Q};
use crate::analysis::{closed_sum, Atom, Expr, HyperSeries, RisingForm, Term};
use crate::closed_form::{Factor, Product};
use crate::model::Problem;
use crate::piecewise::symbolic::{product_at, shifted_ratio};
use crate::solve::Solution;

use super::spec::Event;

/// A closed-form product at a point where no index is left, as a term of Gamma values,
/// powers and √π; `None` when a Gamma argument is a pole (a non-positive integer).
fn product_term(p: &Product) -> Option<Term> {
    let mut atoms: Vec<(Atom, i32)> = Vec::new();
    let mut coefficient = p.coefficient.clone();
    let gamma = |x: RatFunc, e: i32| (Atom::Gamma(crate::analysis::symbolic::RatKey(x)), e);
    let one = RatFunc::one();
    for f in &p.factors {
        match f {
            Factor::Gamma { arg, exponent } => atoms.push(gamma(arg.constant.clone(), *exponent)),
            Factor::Power { base, exponent } => {
                let t = Term::power(base.clone(), exponent.constant.clone());
                coefficient = &coefficient * &t.coefficient;
                atoms.extend(t.atoms);
            }
            Factor::Linear { arg, exponent } => {
                coefficient =
                    &coefficient * &arg.constant.pow(*exponent).unwrap_or_else(RatFunc::zero);
            }
            Factor::Rising {
                base,
                count,
                exponent,
            } => {
                // (x)_n = Γ(x+n)/Γ(x) (DLMF 5.2.5)
                atoms.push(gamma(&base.constant + &count.constant, *exponent));
                atoms.push(gamma(base.constant.clone(), -exponent));
            }
            Factor::Beta { a, b, exponent } => {
                // B(a, b) = Γ(a)Γ(b)/Γ(a+b) (DLMF 5.12.1)
                atoms.push(gamma(a.constant.clone(), *exponent));
                atoms.push(gamma(b.constant.clone(), *exponent));
                atoms.push(gamma(&a.constant + &b.constant, -exponent));
            }
            Factor::Factorial { arg, exponent } => {
                // n! = Γ(n+1) (DLMF 5.4.1)
                atoms.push(gamma(&arg.constant + &one, *exponent));
            }
            Factor::Binomial {
                top,
                bottom,
                exponent,
            } => {
                // binomial(n, m) = Γ(n+1)/(Γ(m+1)Γ(n−m+1)) (DLMF 1.2.1, 5.4.1)
                atoms.push(gamma(&top.constant + &one, *exponent));
                atoms.push(gamma(&bottom.constant + &one, -exponent));
                atoms.push(gamma(&(&top.constant - &bottom.constant) + &one, -exponent));
            }
            Factor::SqrtPi { half_exponent } => atoms.push((Atom::SqrtPi, *half_exponent)),
        }
    }
    let pole = atoms.iter().any(|(atom, _)| match atom {
        Atom::Gamma(x) => {
            x.0.as_constant()
                .is_some_and(|q| q.is_integer() && q <= Q::from_integer(0.into()))
        }
        _ => false,
    });
    (!pole).then(|| Term { coefficient, atoms }.normalized())
}

/// `T(L) = P(k ≥ L)` for a symbolic L (at least the first index b + 1).
fn at_least(problem: &Problem, solution: &Solution, total: &Term, lower: &RatFunc) -> Option<Term> {
    // a(L)/a(b): the closed form, which counts k from b, at k = L.
    let a_l = product_term(&product_at(&solution.simplest.product, lower))?;
    // S_L from the rule shifted so that its base term is a(L): j = k − L, rule for j ≥ 1.
    let local = shifted_ratio(&problem.ratio, lower);
    let series = HyperSeries::of_sum(&RisingForm::from_ratio(&local), &BigInt::from(0));
    let (s_l, _) = closed_sum(&series)?;
    Some(a_l.mul(&s_l).mul(&total.inv()?))
}

/// The event's probability in closed form, when the total and the needed tails have one.
pub fn closed_probability(problem: &Problem, solution: &Solution, event: &Event) -> Option<Expr> {
    let form = RisingForm::from_ratio(&problem.ratio);
    let (total, _) = closed_sum(&HyperSeries::of_sum(&form, &solution.base_index))?;
    let first = RatFunc::constant(Q::from_integer(solution.base_index.clone()));
    let one = RatFunc::one();
    let (lower, upper) = event.inclusive_bounds();
    // Bounds at or below the base term mean "from the start".
    let below_start = |x: &RatFunc| {
        x.as_constant()
            .is_some_and(|q| q <= first.as_constant().unwrap())
    };
    let tail = |l: &RatFunc| -> Option<Expr> {
        if below_start(l) {
            Some(Expr::from_term(Term::rational(one.clone())))
        } else {
            Some(Expr::from_term(at_least(problem, solution, &total, l)?))
        }
    };
    match (&lower, &upper) {
        (Some(l), None) => tail(l),
        (None, Some(u)) => {
            Some(Expr::from_term(Term::rational(one.clone())).plus(&tail(&(u + &one))?.negate()))
        }
        (Some(l), Some(u)) => Some(tail(l)?.plus(&tail(&(u + &one))?.negate())),
        (None, None) => Some(Expr::from_term(Term::rational(one))),
    }
}
