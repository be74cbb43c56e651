//! Sums over a piecewise model: the finite part (base term and every piece but the last)
//! exactly, plus the last piece's tail when it is geometric or has finite support.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};
use rug::Rational;

use crate::algebra::Q;
use crate::numeric::{to_rug_integer, DirectError};
use crate::solve::SupportEnd;

use super::{ChainValue, ChainedProduct, ModelSolution, SolvedPiece};

/// Σ a(k) over the whole support, split as the issue asks: the finite part (the base term and
/// every piece but the last, exactly) plus the tail part (the last piece).
#[derive(Clone, Debug, PartialEq)]
pub struct PiecewiseSum {
    /// Σ a(k) for k from the base term to the last breakpoint.
    pub finite_part: Q,
    pub tail: TailSum,
}

/// The last piece's contribution `Σ_{k ≥ first} a(k)`.
#[derive(Clone, Debug, PartialEq)]
pub enum TailSum {
    /// Exact: a geometric series or a finite support.
    Exact(Q),
    /// The series diverges (a geometric ratio of size ≥ 1).
    Divergent,
    /// Neither geometric nor finite: left to the general summation (Gauss, numeric with an
    /// asymptotic tail), which lives in the analysis layer.
    NotGeometric,
    /// Summed by the analysis layer: the tail part and the total as decimal strings, with a
    /// bound on their absolute error and how the last piece's series was summed.
    Numeric {
        tail: String,
        total: String,
        error_bound: String,
        method: String,
    },
}

impl PiecewiseSum {
    pub fn total(&self) -> Option<Q> {
        match &self.tail {
            TailSum::Exact(t) => Some(&self.finite_part + t),
            _ => None,
        }
    }
}

/// Largest number of terms summed exactly in the finite part.
pub const MAX_FINITE_TERMS: u64 = 1_000_000;

/// The exact terms a(b), …, a(to) by the chained direct product (all parameters rational).
pub fn exact_terms(
    solution: &ModelSolution,
    base_value: &Q,
    to: &BigInt,
) -> Result<Vec<Q>, DirectError> {
    let base = solution.base_index();
    let steps = (to - &base).to_u64().unwrap_or(u64::MAX);
    if steps > MAX_FINITE_TERMS {
        return Err(DirectError::TooManySteps {
            steps: to_rug_integer(&(to - &base)),
            limit: MAX_FINITE_TERMS,
        });
    }
    let mut chain = ChainedProduct::new(solution, base_value, true, 10, steps);
    let mut out = vec![base_value.clone()];
    while chain.index() < *to {
        chain.step()?;
        match chain.value() {
            ChainValue::Exact(q) => out.push(from_rug(&q)),
            ChainValue::Approx { .. } => unreachable!("the exact route stays exact"),
        }
    }
    Ok(out)
}

fn from_rug(q: &Rational) -> Q {
    let (n, d) = (q.numer().to_string(), q.denom().to_string());
    Q::new(n.parse().expect("integer"), d.parse().expect("integer"))
}

/// The sum over the whole support with every parameter given.
pub fn piecewise_sum(
    solution: &ModelSolution,
    base_value: &Q,
) -> Result<PiecewiseSum, DirectError> {
    let tail_piece = solution.tail_piece();
    let tail_base = tail_piece.problem.base_index();
    let terms = exact_terms(solution, base_value, &tail_base)?;
    let finite_part: Q = terms.iter().fold(Q::zero(), |acc, t| acc + t);
    let at_tail_base = terms.last().cloned().unwrap_or_else(Q::zero);
    let tail = tail_sum(tail_piece, &solution.values, &at_tail_base)?;
    Ok(PiecewiseSum { finite_part, tail })
}

fn tail_sum(
    piece: &SolvedPiece,
    values: &BTreeMap<String, Q>,
    start: &Q,
) -> Result<TailSum, DirectError> {
    if start.is_zero() {
        return Ok(TailSum::Exact(Q::zero()));
    }
    let ratio = &piece.problem.ratio;
    if let SupportEnd::At(last) = &piece.solution.support.last {
        let steps = (last - piece.problem.base_index())
            .to_u64()
            .unwrap_or(u64::MAX);
        if steps > MAX_FINITE_TERMS {
            return Err(DirectError::TooManySteps {
                steps: to_rug_integer(&(last - piece.problem.base_index())),
                limit: MAX_FINITE_TERMS,
            });
        }
        let mut k = piece.problem.first_index.clone();
        let (mut term, mut sum) = (start.clone(), Q::zero());
        while k <= *last {
            let r = ratio
                .eval_at(&Q::from_integer(k.clone()), values)
                .expect("every parameter has a value")
                .ok_or(DirectError::ZeroDenominator {
                    k: to_rug_integer(&k),
                    factor: 0,
                })?;
            term *= r;
            sum += &term;
            k += 1;
        }
        return Ok(TailSum::Exact(sum));
    }
    if !ratio.factors.is_empty() {
        return Ok(TailSum::NotGeometric);
    }
    let r = ratio
        .constant
        .eval(values)
        .expect("every parameter has a value");
    if r.abs() >= Q::one() {
        return Ok(TailSum::Divergent);
    }
    // Σ_{n≥1} r^n = r/(1 − r) for |r| < 1 (geometric series, DLMF 4.2.3 context; common practice)
    Ok(TailSum::Exact(start * &r / (Q::one() - &r)))
}
