//! Weighted sums `Σ_{k=lo..hi} k^j a(k)` (j = 0, 1, 2, a(b) = 1) over a model whose every
//! parameter has a value: the part before the open last piece (or the whole range, when it is
//! finite) as an exact sum of the rules as written (binary splitting, rounded once when the
//! fraction is too long to keep); the open tail `Σ_{k≥s}` as
//! `a(s)` times the last piece's hypergeometric series from `s`, summed in closed form where a
//! theorem applies (geometric tails by the binomial theorem, Gauss, Chu–Vandermonde, the
//! exponential series) and numerically with an error bound otherwise — both when both exist,
//! so the closed form carries an independent check.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive, Zero};
use rug::{Float, Integer, Rational};

use crate::algebra::{RatFunc, Q};
use crate::analysis::numeric_sum::{fraction, Bounded};
use crate::analysis::{
    closed_sum, moment_sums, tail_law, Expr, HyperSeries, NumericRule, RisingForm, SumFailure, Term,
};
use crate::numeric::split::split_sums;
use crate::numeric::{
    bits_for_digits, from_rug_integer, to_rug_integer, to_rug_rational, GUARD_BITS,
};
use crate::piecewise::ModelSolution;
use crate::solve::SupportEnd;

/// Largest number of terms walked exactly (the part before the open tail, or a finite range).
pub const MAX_EXACT_STEPS: u64 = 1_000_000;

/// A non-negative-weight sum with a bound on its absolute error; `exact` when rational.
#[derive(Clone, Debug)]
pub struct Sum {
    pub value: Float,
    pub error: Float,
    pub exact: Option<Rational>,
}

impl From<Bounded> for Sum {
    fn from(b: Bounded) -> Sum {
        Sum {
            value: b.value,
            error: b.error,
            exact: b.exact,
        }
    }
}

impl Sum {
    pub fn exact(q: Rational, prec: u32) -> Sum {
        Sum {
            value: Float::with_val(prec, &q),
            error: Float::new(64),
            exact: Some(q),
        }
    }

    fn plus(&self, other: &Sum) -> Sum {
        if let (Some(a), Some(b)) = (&self.exact, &other.exact) {
            return Sum::exact(Rational::from(a + b), self.value.prec());
        }
        let prec = self.value.prec();
        let value = Float::with_val(prec, &self.value + &other.value);
        let ulp = Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
        let error = Float::with_val(64, &self.error + &other.error)
            + Float::with_val(64, value.abs_ref()) * ulp;
        Sum {
            value,
            error,
            exact: None,
        }
    }

    /// `q · self` for an exact rational q.
    fn times(&self, q: &Rational) -> Sum {
        let prec = self.value.prec();
        if let Some(e) = &self.exact {
            return Sum::exact(Rational::from(e * q), prec);
        }
        let value = Float::with_val(prec, &self.value * q);
        let ulp = Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
        let error = Float::with_val(64, &self.error * Float::with_val(64, q).abs())
            + Float::with_val(64, value.abs_ref()) * ulp;
        Sum {
            value,
            error,
            exact: None,
        }
    }

    /// `f · self` for an inexact f with absolute error `f_error`.
    fn times_inexact(&self, f: &Float, f_error: &Float) -> Sum {
        let prec = self.value.prec();
        let value = Float::with_val(prec, &self.value * f);
        let ulp = Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
        let error = Float::with_val(64, &self.error * Float::with_val(64, f.abs_ref()))
            + Float::with_val(64, self.value.abs_ref()) * f_error
            + Float::with_val(64, &self.error * f_error)
            + Float::with_val(64, value.abs_ref()) * ulp;
        Sum {
            value,
            error,
            exact: None,
        }
    }

    /// `self − other` (absolute errors add, plus one rounding); exact when both are.
    pub fn minus(&self, other: &Sum) -> Sum {
        if let (Some(a), Some(b)) = (&self.exact, &other.exact) {
            return Sum::exact(Rational::from(a - b), self.value.prec());
        }
        let prec = self.value.prec();
        let value = Float::with_val(prec, &self.value - &other.value);
        let ulp = Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
        let error = Float::with_val(64, &self.error + &other.error)
            + Float::with_val(64, value.abs_ref()) * ulp;
        Sum {
            value,
            error,
            exact: None,
        }
    }

    /// `self / other` with the relative errors added (plus one rounding).
    pub fn ratio(&self, other: &Sum) -> Option<Sum> {
        let prec = self.value.prec();
        if let (Some(a), Some(b)) = (&self.exact, &other.exact) {
            if *b == 0 {
                return None;
            }
            return Some(Sum::exact(Rational::from(a / b), prec));
        }
        if other.value.is_zero() {
            return None;
        }
        let value = Float::with_val(prec, &self.value / &other.value);
        let denominator = Float::with_val(64, other.value.abs_ref()) - &other.error;
        if denominator <= 0 {
            return None;
        }
        // |a/b − â/b̂| ≤ (e_a + |â/b̂|·e_b) / (|b̂| − e_b), plus the division's rounding.
        let ulp = Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
        let error = (Float::with_val(64, &self.error)
            + Float::with_val(64, value.abs_ref()) * &other.error)
            / denominator
            + Float::with_val(64, value.abs_ref()) * ulp;
        Some(Sum {
            value,
            error,
            exact: None,
        })
    }
}

/// `Σ k^j a(k)` for j = 0, 1, 2 over one range, and how it was found; `sums[j]` is `None`
/// when that sum diverges (`sums[0]` always has a value: a divergent total is an error).
#[derive(Clone, Debug)]
pub struct Moments {
    pub sums: [Option<Sum>; 3],
    /// How each part was summed, in words.
    pub method: Vec<String>,
    /// The closed form's relative difference from the independent numeric sum of the tail.
    pub check: Option<Float>,
    /// The theorem that summed the tail in closed form, if one did.
    pub theorem: Option<&'static str>,
}

/// Why a range could not be summed.
#[derive(Clone, Debug, PartialEq)]
pub enum MassError {
    Divergent(String),
    Unsupported(String),
}

/// The law of a model with every parameter given, as the engine needs it.
pub struct Support<'a> {
    pub solved: &'a ModelSolution,
    pub base: BigInt,
    /// The last index with a(k) possibly non-zero (`None`: infinite).
    pub end: Option<BigInt>,
    /// The first index of the open last piece (`None` when the support is finite).
    pub tail_from: Option<BigInt>,
    pub prec: u32,
    pub digits: u32,
}

impl<'a> Support<'a> {
    pub fn new(solved: &'a ModelSolution, digits: u32) -> Support<'a> {
        let base = solved.base_index();
        let mut end: Option<BigInt> = None;
        let mut earliest = |n: BigInt| {
            end = Some(match end.take() {
                Some(e) if e < n => e,
                _ => n,
            });
        };
        let count = solved.pieces.len();
        for (i, piece) in solved.pieces.iter().enumerate() {
            let is_last = i + 1 == count;
            // A finite state space: the last piece's own upper bound.
            if let (true, Some(last)) = (is_last, &piece.last_index) {
                earliest(last.clone());
            }
            // A factor that vanishes inside the piece ends the support there.
            let within = |n: &BigInt| is_last || piece.last_index.as_ref().map_or(true, |l| n < l);
            match &piece.solution.support.last {
                SupportEnd::At(n) if within(n) => earliest(n.clone()),
                SupportEnd::Symbolic { last, .. } => {
                    if let Some(n) = last
                        .eval(&solved.values)
                        .ok()
                        .filter(|n| n.is_integer() && *n >= Q::from_integer(base.clone()))
                        .map(|n| n.to_integer())
                        .filter(|n| within(n))
                    {
                        earliest(n);
                    }
                }
                _ => {}
            }
        }
        let tail_from = end
            .is_none()
            .then(|| solved.tail_piece().problem.first_index.clone());
        Support {
            solved,
            base,
            end,
            tail_from,
            prec: bits_for_digits(digits + 4) + GUARD_BITS,
            digits,
        }
    }

    /// `Σ_{k=first..last} k^j a(k)` with a(b) = 1 (`None` bounds: the whole support's).
    pub fn moments(
        &self,
        first: Option<&BigInt>,
        last: Option<&BigInt>,
    ) -> Result<Moments, MassError> {
        let lo = first.map_or(self.base.clone(), |f| f.max(&self.base).clone());
        let hi = match (last, &self.end) {
            (Some(l), Some(e)) => Some(l.min(e).clone()),
            (Some(l), None) => Some(l.clone()),
            (None, e) => e.clone(),
        };
        let zero = || Some(Sum::exact(Rational::new(), self.prec));
        if hi.as_ref().is_some_and(|h| *h < lo) {
            return Ok(Moments {
                sums: [zero(), zero(), zero()],
                method: vec!["the range is empty or lies outside the support".into()],
                check: None,
                theorem: None,
            });
        }
        // The exact part runs to `hi`, or up to the open tail's start.
        let (walk_to, tail_start) = match (&hi, &self.tail_from) {
            (Some(h), _) => (h.clone(), None),
            (None, Some(t)) => {
                let s = t.max(&lo).clone();
                (s.clone(), Some(s))
            }
            (None, None) => unreachable!("a finite support has an end"),
        };
        // Far out in the open last piece: a(s) from the joined closed form (MPFR) instead of
        // an exact walk of millions of steps.
        if let Some(start) = &tail_start {
            let far = (start - &self.base).to_u64().unwrap_or(u64::MAX) > MAX_EXACT_STEPS;
            if far && *start == lo {
                return self.far_tail(start);
            }
        }
        let (head, at_start) = self.exact_walk(&lo, &walk_to, tail_start.is_some())?;
        let terms = (&walk_to - &lo + 1u32).to_u64().unwrap_or(0);
        let rounded = head.iter().any(|s| s.exact.is_none());
        let walk = |n: u64| match rounded {
            false => format!("exact rational sum of {}", terms_word(n)),
            true => format!("sum of {} in exact integers, rounded once", terms_word(n)),
        };
        let Some(start) = tail_start else {
            return Ok(Moments {
                sums: head.map(Some),
                method: vec![walk(terms)],
                check: None,
                theorem: None,
            });
        };
        let head_sums = head.map(Some);
        let mut method = Vec::new();
        if terms > 1 {
            method.push(format!("{} before k = {start}", walk(terms - 1)));
        }
        if at_start.value.is_zero() {
            method.push(format!("a({start}) = 0: nothing beyond"));
            return Ok(Moments {
                sums: head_sums,
                method,
                check: None,
                theorem: None,
            });
        }
        let tail = self.tail_series(&start)?;
        method.extend(tail.method.iter().cloned());
        let sums = [0, 1, 2].map(|j| {
            let (Some(head), Some(tail)) = (&head_sums[j], &tail.sums[j]) else {
                return None;
            };
            let scaled = match &at_start.exact {
                Some(q) => tail.times(q),
                None => tail.times_inexact(&at_start.value, &at_start.error),
            };
            Some(head.plus(&scaled))
        });
        Ok(Moments {
            sums,
            method,
            check: tail.check,
            theorem: tail.theorem,
        })
    }

    /// `Σ_{k≥s} k^j a(k)` for s far beyond the base: a(s) by the joined closed form at
    /// `digits + 10` digits (log-Gamma in MPFR with the precision policy's guard bits; its
    /// relative error is taken as 10^(−digits−8)), times the last piece's series from s.
    fn far_tail(&self, start: &BigInt) -> Result<Moments, MassError> {
        let evaluator = crate::piecewise::PiecewiseEvaluator::new(
            self.solved,
            &Q::from_integer(1.into()),
            self.digits + 10,
        )
        .map_err(|e| {
            MassError::Unsupported(format!("the closed form cannot be evaluated: {e:?}"))
        })?;
        let value = evaluator
            .value(start)
            .map_err(|e| {
                MassError::Unsupported(format!(
                    "the closed form cannot be evaluated at k = {start}: {e:?}"
                ))
            })?
            .to_float(self.prec)
            .ok_or_else(|| {
                MassError::Unsupported(format!("a({start}) is beyond the floating-point range"))
            })?;
        let relative = Float::with_val(
            64,
            Float::i_exp(1, -(bits_for_digits(self.digits + 8) as i32)),
        );
        let error = Float::with_val(64, value.abs_ref()) * relative;
        let tail = self.tail_series(start)?;
        let sums = [0, 1, 2].map(|j| {
            tail.sums[j]
                .as_ref()
                .map(|t| t.times_inexact(&value, &error))
        });
        let mut method = vec![format!("a({start}) from the closed form (MPFR)")];
        method.extend(tail.method.iter().cloned());
        Ok(Moments {
            sums,
            method,
            check: tail.check,
            theorem: tail.theorem,
        })
    }

    /// `Σ_{k=lo..to} k^j a(k)` (the last term left out when `exclude_last`), and a(to): exact
    /// integer fractions by binary splitting (`numeric::split`), reduced when small enough and
    /// rounded once otherwise.
    fn exact_walk(
        &self,
        lo: &BigInt,
        to: &BigInt,
        exclude_last: bool,
    ) -> Result<([Sum; 3], Sum), MassError> {
        let steps = (to - &self.base).to_u64().unwrap_or(u64::MAX);
        if steps > MAX_EXACT_STEPS {
            return Err(MassError::Unsupported(format!(
                "the range reaches {} steps past the base term; at most {MAX_EXACT_STEPS} are summed exactly",
                to - &self.base
            )));
        }
        let zero = || Sum::exact(Rational::new(), self.prec);
        if *to < self.base {
            return Ok((
                [zero(), zero(), zero()],
                Sum::exact(Rational::from(1), self.prec),
            ));
        }
        let start = lo.max(&self.base);
        let step = |m: &Integer| self.step(m);
        // a(start) as p0/q0: the product of the steps before the range.
        let (p0, q0) = if *start > self.base {
            let count = (start - &self.base + 1u32).to_u64().unwrap_or(u64::MAX);
            let prefix = split_sums(&to_rug_integer(&self.base), count, 0, step)?;
            (prefix.p, prefix.q)
        } else {
            (Integer::from(1), Integer::from(1))
        };
        if p0 == 0 {
            // a(start) = 0: every later term is zero, and no later step is evaluated.
            return Ok(([zero(), zero(), zero()], zero()));
        }
        let count = (to - start + 1u32).to_u64().unwrap_or(u64::MAX);
        let mut range = split_sums(&to_rug_integer(start), count, 3, step)?;
        if exclude_last {
            let to = to_rug_integer(to);
            let mut w = range.p.clone();
            for t in range.t.iter_mut() {
                *t -= &w;
                w *= &to;
            }
        }
        let q = q0 * range.q;
        let sums = range
            .t
            .into_iter()
            .map(|t| Sum::from(fraction(Integer::from(&p0 * &t), &q, self.prec)))
            .collect::<Vec<_>>()
            .try_into()
            .expect("three weights");
        let at_to = Sum::from(fraction(p0 * range.p, &q, self.prec));
        Ok((sums, at_to))
    }

    /// The rule's step a(m)/a(m−1) at m, from the piece that holds m.
    fn step(&self, m: &Integer) -> Result<(Integer, Integer), MassError> {
        let k = from_rug_integer(m);
        let piece = self
            .solved
            .piece_at(&k)
            .map(|i| &self.solved.pieces[i])
            .ok_or_else(|| MassError::Unsupported(format!("no piece holds at k = {k}")))?;
        let r = piece
            .problem
            .ratio
            .eval_at(&Q::from_integer(k.clone()), &self.solved.values)
            .map_err(|e| MassError::Unsupported(format!("the rule cannot be evaluated: {e:?}")))?
            .ok_or_else(|| {
                MassError::Unsupported(format!("the rule divides by zero at k = {k}"))
            })?;
        let r = to_rug_rational(&r);
        let (p, q) = r.into_numer_denom();
        Ok((p, q))
    }

    /// `Σ_{k≥s} k^j a(k)/a(s)` under the last piece's rule: each sum in closed form where a
    /// theorem gives one and the sum converges, numerically otherwise.
    fn tail_series(&self, start: &BigInt) -> Result<Moments, MassError> {
        let values = &self.solved.values;
        let form =
            RisingForm::from_ratio(&self.solved.tail_piece().problem.ratio).substituted(values);
        let numeric = moment_sums(
            &NumericRule {
                form: form.clone(),
                base_index: start.clone(),
                last: None,
            },
            self.digits + 2,
        );
        if let Err(SumFailure::Divergent(why)) = &numeric {
            return Err(MassError::Divergent(why.clone()));
        }
        if !converges(&form, start, 0) {
            return Err(MassError::Divergent(
                "the last piece's terms do not decay fast enough".into(),
            ));
        }
        // A theorem's value of a divergent series is no sum: only convergent ones are kept.
        let (closed, theorem) = match closed_moments(&form, start) {
            Some((exprs, theorem)) => {
                let mut out: [Option<Sum>; 3] = [None, None, None];
                for (j, e) in exprs.iter().enumerate() {
                    if converges(&form, start, j as i64) {
                        out[j] = e
                            .as_ref()
                            .and_then(|e| evaluate(e, values, self.digits + 2, self.prec));
                    }
                }
                (out, Some(theorem))
            }
            None => ([None, None, None], None),
        };
        let numeric_sums: [Option<Sum>; 3] = match &numeric {
            Ok(n) => [0, 1, 2].map(|j| {
                n.sums[j].as_ref().map(|b| Sum {
                    value: b.value.clone(),
                    error: b.error.clone(),
                    exact: b.exact.clone(),
                })
            }),
            Err(_) => [None, None, None],
        };
        let check = match (&closed[0], &numeric_sums[0]) {
            (Some(c), Some(n)) if !c.value.is_zero() => {
                let diff = Float::with_val(64, &n.value - &c.value);
                Some((diff / Float::with_val(64, &c.value)).abs())
            }
            _ => None,
        };
        let mut method = Vec::new();
        match (&closed[0], theorem) {
            (Some(_), Some(theorem)) => method.push(format!(
                "the tail from k = {start} in closed form by {theorem}"
            )),
            _ => match &numeric {
                Ok(n) => method.push(format!(
                    "the tail from k = {start}: {}",
                    n.method.describe()
                )),
                Err(SumFailure::Unsupported(why) | SumFailure::Divergent(why)) => {
                    return Err(MassError::Unsupported(why.clone()))
                }
            },
        }
        let theorem = theorem.filter(|_| closed[0].is_some());
        let [c0, c1, c2] = closed;
        let [n0, n1, n2] = numeric_sums;
        Ok(Moments {
            sums: [c0.or(n0), c1.or(n1), c2.or(n2)],
            method,
            check,
            theorem,
        })
    }
}

/// The tail's `Σ_{n≥0} (s+n)^j t_n` for j = 0, 1, 2 in closed form, with t_n the series of
/// the rule from s: `Σ n t_n = F₁`, `Σ n(n−1) t_n = F₂` by the derivative of the series
/// (DLMF 16.3.1), so `Σ (s+n) t_n = s F₀ + F₁` and `Σ (s+n)² t_n = s² F₀ + (2s+1) F₁ + F₂`.
fn closed_moments(form: &RisingForm, start: &BigInt) -> Option<([Option<Expr>; 3], &'static str)> {
    let series = HyperSeries::of_sum(form, start);
    let (f0, theorem) = closed_sum(&series)?;
    let factorial: Vec<Option<Term>> = (1..=2)
        .map(|r| {
            let (factor, shifted) = series.factorial_moment(r);
            if factor.is_zero() {
                Some(Term::rational(RatFunc::zero()))
            } else {
                closed_sum(&shifted).map(|(t, _)| t.scale(&factor))
            }
        })
        .collect();
    let s = RatFunc::constant(Q::from_integer(start.clone()));
    let e0 = Expr::from_term(f0.clone());
    let e1 = factorial[0]
        .as_ref()
        .map(|f1| Expr::from_term(f0.scale(&s)).plus_term(f1.clone()));
    let two_s_plus_one = &(&s + &s) + &RatFunc::one();
    let e2 = match (&factorial[0], &factorial[1]) {
        (Some(f1), Some(f2)) => Some(
            Expr::from_term(f0.scale(&(&s * &s)))
                .plus_term(f1.scale(&two_s_plus_one))
                .plus_term(f2.clone()),
        ),
        _ => None,
    };
    Some(([Some(e0), e1, e2], theorem.name()))
}

/// Whether `Σ k^j a(k)` converges past `start`, from the tail law (common practice, as in the
/// analysis: factorial decay always, |r| < 1 always, r = 1 when θ + j < −1, r = −1 when
/// θ + j < 0 by the alternating series test).
fn converges(form: &RisingForm, start: &BigInt, j: i64) -> bool {
    let d = form.degree_difference();
    if d != 0 {
        return d < 0;
    }
    let Some(r) = form.constant.as_constant() else {
        return false;
    };
    let one = Q::from_integer(1.into());
    if r.abs() != one {
        return r.abs() < one;
    }
    let bound = if r == one { -one.clone() } else { Q::zero() };
    let law = tail_law(form, start, 0);
    law.power
        .as_constant()
        .is_some_and(|theta| theta + Q::from_integer(j.into()) < bound)
}

fn terms_word(n: u64) -> String {
    if n == 1 {
        "1 term".into()
    } else {
        format!("{n} terms")
    }
}

/// An expression's value: exact when rational, else MPFR with a bound (more bits when terms
/// cancel).
fn evaluate(e: &Expr, values: &BTreeMap<String, Q>, digits: u32, prec: u32) -> Option<Sum> {
    if let Some(r) = e.as_rational() {
        return Some(Sum::exact(to_rug_rational(&r.eval(values).ok()?), prec));
    }
    let target = Float::with_val(64, Float::i_exp(1, -(bits_for_digits(digits) as i32)));
    let mut extra = 32;
    for _ in 0..6 {
        let (value, error) = e.to_float(values, prec + extra)?;
        if !value.is_finite() || !error.is_finite() {
            return None;
        }
        if !value.is_zero() && Float::with_val(64, &error / &value).abs() < target {
            return Some(Sum {
                value: Float::with_val(prec, &value),
                error: error
                    + Float::with_val(64, value.abs_ref())
                        * Float::with_val(64, Float::i_exp(1, 1 - prec as i32)),
                exact: None,
            });
        }
        extra *= 2;
    }
    None
}
