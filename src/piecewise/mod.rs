//! Piecewise rules: solve every piece, join the closed forms at the breakpoints, and chain the
//! direct product and the table across them.
//!
//! Piece i holds for `first_i ≤ k ≤ last_i`; its closed form is telescoped from its own base
//! `b_i = first_i − 1`, so `a(k) = a(b_i) · P_i(k)` with `P_i(b_i) = 1`. Joining:
//! `a(b_1)` is the model's base term and `a(b_{i+1}) = a(last_i) = a(b_i) · P_i(last_i)`.
//! The direct product runs the rule as written across the whole range; the piecewise closed
//! form is evaluated independently (MPFR log-Gamma) and the two are compared row by row.

mod chain;
mod sums;
pub mod symbolic;

pub use chain::{build_piecewise_table, ChainValue, ChainedProduct};
pub use sums::{exact_terms, MAX_FINITE_TERMS};

use std::collections::BTreeMap;

use num_bigint::BigInt;
use rug::Rational;

use crate::algebra::Q;
use crate::diagnostic::Diagnostic;
use crate::model::{Model, Problem};
use crate::numeric::{
    evaluate_closed_form, to_rug_rational, ClosedValueError, LogReal, GUARD_BITS,
};
use crate::solve::{solve, Solution};

/// One solved piece: its problem (with the breakpoints evaluated), where it ends, and its
/// closed form relative to its own base term.
#[derive(Clone, Debug)]
pub struct SolvedPiece {
    pub problem: Problem,
    pub last_index: Option<BigInt>,
    pub solution: Solution,
}

impl SolvedPiece {
    pub fn contains(&self, k: &BigInt) -> bool {
        *k >= self.problem.first_index && self.last_index.as_ref().map_or(true, |l| k <= l)
    }
}

/// Every piece of a model, solved for the given parameter values.
#[derive(Clone, Debug)]
pub struct ModelSolution {
    pub pieces: Vec<SolvedPiece>,
    pub values: BTreeMap<String, Q>,
}

impl ModelSolution {
    /// The index of the model's base term.
    pub fn base_index(&self) -> BigInt {
        self.pieces[0].problem.base_index()
    }

    /// The piece holding `k`, if any (`None` at or before the base term).
    pub fn piece_at(&self, k: &BigInt) -> Option<usize> {
        self.pieces.iter().position(|p| p.contains(k))
    }

    /// The breakpoints: the last index of every piece but the last.
    pub fn breakpoints(&self) -> Vec<BigInt> {
        self.pieces
            .iter()
            .filter_map(|p| p.last_index.clone())
            .collect()
    }

    /// The piece that decides the large-k behaviour.
    pub fn tail_piece(&self) -> &SolvedPiece {
        self.pieces.last().expect("a model has at least one piece")
    }
}

/// Solves each piece of `model` (breakpoints evaluated from `values`).
pub fn solve_model(
    model: &Model,
    values: &BTreeMap<String, Q>,
) -> Result<ModelSolution, Diagnostic> {
    let mut pieces = Vec::new();
    for resolved in model.resolve(values)? {
        let solution = solve(&resolved.problem, values)?;
        pieces.push(SolvedPiece {
            problem: resolved.problem,
            last_index: resolved.last_index,
            solution,
        });
    }
    Ok(ModelSolution {
        pieces,
        values: values.clone(),
    })
}

/// The piecewise closed form at any k: the base value times the joining factors
/// `P_j(last_j)` of the earlier pieces times `P_i(k)`.
pub struct PiecewiseEvaluator<'a> {
    solution: &'a ModelSolution,
    /// a(b_i) for every piece, from the closed forms.
    joins: Vec<LogReal>,
    digits: u32,
}

impl<'a> PiecewiseEvaluator<'a> {
    pub fn new(
        solution: &'a ModelSolution,
        base_value: &Q,
        digits: u32,
    ) -> Result<Self, ClosedValueError> {
        // A few products of correctly rounded logs: common practice is a handful of extra digits.
        let inner = digits + 10;
        let prec = crate::numeric::bits_for_digits(inner) + GUARD_BITS;
        let mut join = LogReal::from_rational(&to_rug_rational(base_value), prec);
        let mut joins = vec![join.clone()];
        for piece in &solution.pieces[..solution.pieces.len() - 1] {
            let last = piece
                .last_index
                .as_ref()
                .expect("only the last piece is open");
            let factor = evaluate_closed_form(
                &piece.solution.closed_form,
                last,
                &solution.values,
                &Rational::from(1),
                inner,
            )?;
            join = wide_mul(&join, &factor);
            joins.push(join.clone());
        }
        Ok(PiecewiseEvaluator {
            solution,
            joins,
            digits: inner,
        })
    }

    /// a(k) from the closed forms; `k` must not lie before the base term.
    pub fn value(&self, k: &BigInt) -> Result<LogReal, ClosedValueError> {
        let Some(i) = self.solution.piece_at(k) else {
            // Past the end of a finite state space a(k) = 0; before the base term, a(b).
            if k > &self.solution.base_index() {
                return Ok(LogReal::zero(self.joins[0].ln_abs.prec()));
            }
            return Ok(self.joins[0].clone());
        };
        let piece = &self.solution.pieces[i];
        let within = evaluate_closed_form(
            &piece.solution.closed_form,
            k,
            &self.solution.values,
            &Rational::from(1),
            self.digits,
        )?;
        Ok(wide_mul(&self.joins[i], &within))
    }
}

/// A product at the wider of the two precisions.
pub(crate) fn wide_mul(a: &LogReal, b: &LogReal) -> LogReal {
    if a.ln_abs.prec() >= b.ln_abs.prec() {
        a.mul(b)
    } else {
        b.mul(a)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::model::build_model;
    use crate::numeric::decimal;
    use num_traits::One;

    fn desk(c: i64) -> ModelSolution {
        let model = build_model(
            "param c integer >= 1\na(k)/a(k-1) = 3/k for 1 <= k <= c\na(k)/a(k-1) = 3/c for k > c",
        )
        .unwrap();
        let values: BTreeMap<String, Q> = [("c".to_string(), q(c, 1))].into_iter().collect();
        solve_model(&model, &values).unwrap()
    }

    #[test]
    fn the_exact_and_mpfr_chains_agree_across_the_breakpoint() {
        let s = desk(4);
        let mut exact = ChainedProduct::new(&s, &Q::one(), true, 40, 30);
        let mut approx = ChainedProduct::new(&s, &Q::one(), false, 40, 30);
        for _ in 0..30 {
            exact.step().unwrap();
            approx.step().unwrap();
            let ChainValue::Exact(e) = exact.value() else {
                panic!()
            };
            let ChainValue::Approx {
                value,
                rel_error_bound,
            } = approx.value()
            else {
                panic!()
            };
            let rel = value.rel_diff(&LogReal::from_rational(&e, 300), 64);
            assert!(
                rel <= rel_error_bound,
                "k = {}: {rel} > {rel_error_bound}",
                exact.index()
            );
            assert!(rel_error_bound < 1e-40f64);
        }
        assert_eq!(exact.index(), BigInt::from(30));
        // a(5) = a(4)·3/4 with a(4) = 3^4/4! (the rule as written; arithmetic by hand)
        let terms = exact_terms(&s, &Q::one(), &BigInt::from(5)).unwrap();
        assert_eq!(terms[4], q(81, 24));
        assert_eq!(terms[5], q(81, 24) * q(3, 4));
    }

    #[test]
    fn the_joined_closed_form_matches_the_exact_terms() {
        let s = desk(3);
        let closed = PiecewiseEvaluator::new(&s, &q(2, 1), 30).unwrap();
        let terms = exact_terms(&s, &q(2, 1), &BigInt::from(12)).unwrap();
        for (k, t) in terms.iter().enumerate() {
            let v = closed.value(&BigInt::from(k)).unwrap();
            assert_eq!(
                v.to_decimal(30),
                decimal::rational_to_decimal(&to_rug_rational(t), 30),
                "k = {k}"
            );
        }
    }
}
