//! Piecewise rules: solve every piece, join the closed forms at the breakpoints, and chain the
//! direct product and the table across them.
//!
//! Piece i holds for `first_i ≤ k ≤ last_i`; its closed form is telescoped from its own base
//! `b_i = first_i − 1`, so `a(k) = a(b_i) · P_i(k)` with `P_i(b_i) = 1`. Joining:
//! `a(b_1)` is the model's base term and `a(b_{i+1}) = a(last_i) = a(b_i) · P_i(last_i)`.
//! The direct product runs the rule as written across the whole range; the piecewise closed
//! form is evaluated independently (MPFR log-Gamma) and the two are compared row by row.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};
use rug::{Float, Rational};

use crate::algebra::Q;
use crate::diagnostic::{Diagnostic, Span};
use crate::model::{Model, Problem};
use crate::numeric::{
    decimal, evaluate_closed_form, to_rug_integer, to_rug_rational, ClosedValueError, DirectError,
    DirectValue, LogReal, RunningProduct, GUARD_BITS,
};
use crate::solve::{solve, Solution, SupportEnd};
use crate::table::{
    numeric_ratio, sample_offsets, DirectMethod, Row, Table, TableRequest, EXACT_STEPS, MAX_ROWS,
    MAX_STEPS,
};

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
fn wide_mul(a: &LogReal, b: &LogReal) -> LogReal {
    if a.ln_abs.prec() >= b.ln_abs.prec() {
        a.mul(b)
    } else {
        b.mul(a)
    }
}

/// The direct product run across the pieces: each piece's running product starts from the
/// previous piece's last value.
pub struct ChainedProduct<'a> {
    solution: &'a ModelSolution,
    piece: usize,
    run: RunningProduct,
    /// The value the current run started from (approximate route only; the exact route
    /// carries it inside the run).
    scale: Option<(LogReal, Float)>,
    exact: bool,
    digits: u32,
    max_steps: u64,
    k: BigInt,
}

/// One directly computed a(k).
pub enum ChainValue {
    Exact(Rational),
    Approx {
        value: LogReal,
        rel_error_bound: Float,
    },
}

impl<'a> ChainedProduct<'a> {
    pub fn new(
        solution: &'a ModelSolution,
        base_value: &Q,
        exact: bool,
        digits: u32,
        max_steps: u64,
    ) -> Self {
        let first = &solution.pieces[0];
        let base = solution.base_index();
        let (start, scale) = if exact {
            (to_rug_rational(base_value), None)
        } else {
            let prec = crate::numeric::bits_for_digits(digits) + GUARD_BITS + 64;
            let scale = LogReal::from_rational(&to_rug_rational(base_value), prec);
            (Rational::from(1), Some((scale, Float::new(64))))
        };
        let run = RunningProduct::new(
            numeric_ratio(&first.problem, &solution.values),
            to_rug_integer(&base),
            start,
            exact,
            digits,
            max_steps,
        );
        ChainedProduct {
            solution,
            piece: 0,
            run,
            scale,
            exact,
            digits,
            max_steps,
            k: base,
        }
    }

    /// The k of the current value.
    pub fn index(&self) -> BigInt {
        self.k.clone()
    }

    /// Moves from a(k) to a(k+1), switching piece at a breakpoint.
    pub fn step(&mut self) -> Result<(), DirectError> {
        let k = self.index();
        let next = &k + 1;
        let pieces = &self.solution.pieces;
        if self.piece + 1 < pieces.len() && !pieces[self.piece].contains(&next) {
            let carried = self.value();
            self.piece += 1;
            let ratio = numeric_ratio(&pieces[self.piece].problem, &self.solution.values);
            let start = match carried {
                ChainValue::Exact(q) => q,
                ChainValue::Approx {
                    value,
                    rel_error_bound,
                } => {
                    self.scale = Some((value, rel_error_bound));
                    Rational::from(1)
                }
            };
            self.run = RunningProduct::new(
                ratio,
                to_rug_integer(&k),
                start,
                self.exact,
                self.digits,
                self.max_steps,
            );
        }
        self.run.step()?;
        self.k = next;
        Ok(())
    }

    pub fn value(&self) -> ChainValue {
        match (self.run.value(), &self.scale) {
            (DirectValue::Exact(q), _) => ChainValue::Exact(q),
            (
                DirectValue::Approx {
                    mantissa,
                    exp2,
                    rel_error_bound,
                },
                Some((scale, scale_bound)),
            ) => {
                let prec = scale.ln_abs.prec();
                let here = LogReal::from_scaled(&mantissa, exp2, prec);
                // (1+e1)(1+e2) − 1 = e1 + e2 + e1·e2, plus one rounding of the sum of logs.
                let mut bound = Float::with_val(64, &rel_error_bound + scale_bound);
                bound += Float::with_val(64, &rel_error_bound * scale_bound);
                bound += Float::with_val(64, Float::i_exp(1, 2 - prec as i32));
                ChainValue::Approx {
                    value: scale.mul(&here),
                    rel_error_bound: bound,
                }
            }
            (DirectValue::Approx { .. }, None) => unreachable!("the approximate route has a scale"),
        }
    }
}

impl ChainValue {
    fn log(&self, prec: u32) -> LogReal {
        match self {
            ChainValue::Exact(q) => LogReal::from_rational(q, prec),
            ChainValue::Approx { value, .. } => value.clone(),
        }
    }

    fn decimal(&self, digits: u32) -> String {
        match self {
            ChainValue::Exact(q) => decimal::rational_to_decimal(q, digits),
            ChainValue::Approx { value, .. } => value.to_decimal(digits),
        }
    }
}

/// The evidence table across the pieces: the direct product chained over the breakpoints
/// next to the joined closed form, on a log-spaced sample plus the rows on both sides of
/// every breakpoint (or every row).
pub fn build_piecewise_table(
    solution: &ModelSolution,
    request: &TableRequest,
    here: Span,
) -> Result<Table, Diagnostic> {
    let fail = |message: String| Diagnostic::new(message, here.clone());
    let values = &solution.values;
    let missing: Vec<&str> = solution.pieces[0]
        .problem
        .params
        .iter()
        .filter(|p| !values.contains_key(&p.name))
        .map(|p| p.name.as_str())
        .collect();
    if !missing.is_empty() {
        return Err(fail(format!(
            "a table needs a value for every parameter; missing: {}",
            missing.join(", ")
        ))
        .with_help(format!("add --param {}=…", missing[0])));
    }
    let base = solution.base_index();
    if request.from < base {
        return Err(fail(format!(
            "the table starts at k = {} but the sequence starts at its base term k = {base}",
            request.from
        ))
        .with_help(format!("use --k {base}..{}", request.to)));
    }
    let rows = (&request.to - &request.from + 1u32)
        .to_u64()
        .unwrap_or(u64::MAX);
    if rows > MAX_ROWS {
        return Err(fail(format!(
            "{rows} rows is too many for one table (at most {MAX_ROWS})"
        )));
    }
    let steps = (&request.to - &base).to_u64().unwrap_or(u64::MAX);
    if steps > MAX_STEPS {
        return Err(fail(format!(
            "the direct product up to k = {} needs {steps} multiplications (at most {MAX_STEPS})",
            request.to
        )));
    }
    let exact = steps <= EXACT_STEPS;
    let closed = PiecewiseEvaluator::new(solution, &request.base_value, request.digits)
        .map_err(|e| fail(format!("the closed form cannot be evaluated: {e:?}")))?;
    let mut chain =
        ChainedProduct::new(solution, &request.base_value, exact, request.digits, steps);
    let direct_error = |e: DirectError| match e {
        DirectError::ZeroDenominator { k, .. } => fail(format!(
            "with these parameter values the rule divides by zero at k = {k}"
        )),
        DirectError::BeforeBase { k } => fail(format!("k = {k} lies before the base term")),
        DirectError::TooManySteps { steps, limit } => {
            fail(format!("{steps} steps exceed the limit {limit}"))
        }
    };
    while chain.index() < request.from {
        chain.step().map_err(direct_error)?;
    }
    let mut sample = sample_offsets(rows, request.check_all);
    for b in solution.breakpoints() {
        for k in [b.clone(), &b + 1] {
            if k >= request.from && k <= request.to {
                sample.push((&k - &request.from).to_u64().expect("inside the table"));
            }
        }
    }
    sample.sort_unstable();
    sample.dedup();
    let mut out_rows = Vec::with_capacity(rows as usize);
    let mut checked_rows = Vec::new();
    let mut max_rel = Float::new(64);
    let mut worst_bound = Float::new(64);
    let mut next_sample = 0usize;
    for offset in 0..rows {
        if offset > 0 {
            chain.step().map_err(direct_error)?;
        }
        let k = &request.from + BigInt::from(offset);
        let value = chain.value();
        if let ChainValue::Approx {
            rel_error_bound, ..
        } = &value
        {
            if *rel_error_bound > worst_bound {
                worst_bound = rel_error_bound.clone();
            }
        }
        let mut row = Row {
            k: k.clone(),
            direct: value.decimal(request.digits),
            closed: None,
            rel_diff: None,
        };
        if next_sample < sample.len() && sample[next_sample] == offset {
            next_sample += 1;
            let c = closed.value(&k).map_err(|e| {
                fail(format!(
                    "the closed form cannot be evaluated at k = {k}: {e:?}"
                ))
            })?;
            let prec = c.ln_abs.prec().max(64);
            let rel = value.log(prec).rel_diff(&c, 64);
            if rel > max_rel {
                max_rel = rel.clone();
            }
            row.closed = Some(c.to_decimal(request.digits));
            row.rel_diff = Some(decimal::short(&rel));
            checked_rows.push(k);
        }
        out_rows.push(row);
    }
    Ok(Table {
        digits: request.digits,
        params: values.clone(),
        base_value: request.base_value.clone(),
        rows: out_rows,
        checked_rows,
        max_rel_diff: decimal::short(&max_rel),
        method: if exact {
            DirectMethod::Exact
        } else {
            DirectMethod::Mpfr {
                bits: crate::numeric::bits_for_digits(request.digits) + GUARD_BITS,
            }
        },
        direct_error_bound: if exact {
            "0".into()
        } else {
            decimal::short(&worst_bound)
        },
    })
}

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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::model::build_model;

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

    #[test]
    fn geometric_tails_sum_exactly_and_large_ratios_diverge() {
        // Σ_{k>3} a(3)·1^{k−3} diverges (ratio 3/c = 1 at c = 3): geometric series (common practice)
        let s = desk(3);
        let sum = piecewise_sum(&s, &Q::one()).unwrap();
        assert_eq!(sum.tail, TailSum::Divergent);
        // c = 6: ratio 1/2, tail = a(6)·(1/2)/(1/2) = a(6)
        let s = desk(6);
        let sum = piecewise_sum(&s, &Q::one()).unwrap();
        let terms = exact_terms(&s, &Q::one(), &BigInt::from(6)).unwrap();
        assert_eq!(sum.tail, TailSum::Exact(terms[6].clone()));
        let finite: Q = terms.iter().fold(Q::zero(), |a, t| a + t);
        assert_eq!(sum.finite_part, finite);
    }
}
