//! The direct product chained across breakpoints, and the evidence table over a piecewise
//! model: the rules as written, run from piece to piece, against the joined closed form.

use num_bigint::BigInt;
use num_traits::ToPrimitive;
use rug::{Float, Rational};

use crate::algebra::Q;
use crate::diagnostic::{Diagnostic, Span};
use crate::numeric::{
    decimal, to_rug_integer, to_rug_rational, DirectError, DirectValue, LogReal, RunningProduct,
    GUARD_BITS,
};
use crate::table::{
    check_request, fill_rows, numeric_ratio, sample_offsets, DirectMethod, DirectSource, Table,
    TableRequest, EXACT_STEPS,
};

use super::{ModelSolution, PiecewiseEvaluator};

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
    /// Past the end of a finite state space: every value is 0.
    beyond: bool,
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
            beyond: false,
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
        // A finite state space: no rule applies past its last state.
        if self.beyond
            || self
                .solution
                .tail_piece()
                .last_index
                .as_ref()
                .is_some_and(|l| next > *l)
        {
            self.beyond = true;
            self.k = next;
            return Ok(());
        }
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
        if self.beyond {
            return match &self.scale {
                None => ChainValue::Exact(Rational::new()),
                Some((scale, _)) => ChainValue::Approx {
                    value: LogReal::zero(scale.ln_abs.prec()),
                    rel_error_bound: Float::new(64),
                },
            };
        }
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
    let values = &solution.values;
    let missing: Vec<&str> = solution.pieces[0]
        .problem
        .params
        .iter()
        .filter(|p| !values.contains_key(&p.name))
        .map(|p| p.name.as_str())
        .collect();
    let base = solution.base_index();
    let (rows, steps) = check_request(&base, &missing, request, &here)?;
    let exact = steps <= EXACT_STEPS;
    let closed =
        PiecewiseEvaluator::new(solution, &request.base_value, request.digits).map_err(|e| {
            Diagnostic::new(
                format!("the closed form cannot be evaluated: {e:?}"),
                here.clone(),
            )
        })?;
    let mut chain =
        ChainedProduct::new(solution, &request.base_value, exact, request.digits, steps);
    // Besides the log-spaced sample, both sides of every breakpoint are checked.
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
    let mut table_rows = Vec::new();
    let filled = fill_rows(
        &mut chain,
        request,
        rows,
        &sample,
        &here,
        |k| closed.value(k).map_err(|e| format!("{e:?}")),
        &mut table_rows,
    )?;
    Ok(Table {
        digits: request.digits,
        params: values.clone(),
        base_value: request.base_value.clone(),
        rows: table_rows,
        checked_rows: filled.checked_rows,
        max_rel_diff: filled.max_rel_diff,
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
            decimal::short(&filled.worst_bound)
        },
    })
}

impl DirectSource for ChainedProduct<'_> {
    fn advance_to(&mut self, k: &BigInt) -> Result<(), DirectError> {
        while self.index() < *k {
            ChainedProduct::step(self)?;
        }
        Ok(())
    }

    fn step(&mut self) -> Result<(), DirectError> {
        ChainedProduct::step(self)
    }

    fn decimal(&self, digits: u32) -> String {
        self.value().decimal(digits)
    }

    fn log(&self, prec: u32) -> LogReal {
        self.value().log(prec)
    }

    fn error_bound(&self) -> Option<Float> {
        match self.value() {
            ChainValue::Exact(_) => None,
            ChainValue::Approx {
                rel_error_bound, ..
            } => Some(rel_error_bound),
        }
    }
}
