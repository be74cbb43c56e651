//! The meaning of a model: what sequence, which parameters with which ranges, and the rule
//! in factor normal form (one [`Problem`] per piece), with its boundary term. Built from the
//! syntax tree by `model::build`; consumed by `solve` and `piecewise`.

use std::collections::BTreeMap;

use num_bigint::BigInt;

use crate::algebra::{Poly, RatFunc, Q};
use crate::diagnostic::{Diagnostic, Span};
use crate::ratio::Ratio;

use super::derivation::Derivation;

/// A declared or discovered parameter.
#[derive(Clone, Debug, PartialEq)]
pub struct Param {
    pub name: String,
    pub integer: bool,
    /// Lower bound and whether it is included.
    pub lower: Option<(Q, bool)>,
    /// Upper bound and whether it is included.
    pub upper: Option<(Q, bool)>,
    /// Where it was declared (`param …`), if it was.
    pub declared_at: Option<Span>,
}

impl Param {
    pub fn undeclared(name: &str) -> Self {
        Param {
            name: name.to_string(),
            integer: false,
            lower: None,
            upper: None,
            declared_at: None,
        }
    }

    /// Whether `value` lies in the declared range (and is an integer if required).
    pub fn admits(&self, value: &Q) -> bool {
        if self.integer && !value.is_integer() {
            return false;
        }
        if let Some((lo, closed)) = &self.lower {
            if value < lo || (!closed && value == lo) {
                return false;
            }
        }
        if let Some((hi, closed)) = &self.upper {
            if value > hi || (!closed && value == hi) {
                return false;
            }
        }
        true
    }
}

/// A ratio rule ready to solve.
#[derive(Clone, Debug, PartialEq)]
pub struct Problem {
    /// Name of the sequence (`n` in `n(k)/n(k-1)`; `a` for a bare ratio).
    pub sequence: String,
    /// Name of the index variable (`k`).
    pub index: String,
    pub params: Vec<Param>,
    pub ratio: Ratio,
    /// The rule holds for k ≥ first_index; the base term is a(first_index − 1).
    pub first_index: BigInt,
    /// Parameter polynomials the user divided by: each must not vanish.
    pub divisors: Vec<(Poly, Span)>,
    /// The span of the rule statement, for messages.
    pub rule_span: Span,
}

impl Problem {
    pub fn base_index(&self) -> BigInt {
        &self.first_index - 1
    }

    pub fn param(&self, name: &str) -> Option<&Param> {
        self.params.iter().find(|p| p.name == name)
    }
}

/// One piece of a rule: its ratio and the index range where it holds. Bounds are integers or
/// expressions in integer parameters (a breakpoint `c` given later with `--param`).
#[derive(Clone, Debug)]
pub struct Piece {
    pub ratio: Ratio,
    /// The first k at which the piece holds.
    pub first: RatFunc,
    /// The last k, or `None` when the piece runs to infinity.
    pub last: Option<RatFunc>,
    pub divisors: Vec<(Poly, Span)>,
    /// The statement(s) the piece came from, and its range clause.
    pub span: Span,
    pub range_span: Option<Span>,
    pub derivation: Derivation,
}

/// A boundary equation solved for the base term: `a(index) = value`.
#[derive(Clone, Debug)]
pub struct Boundary {
    pub index: BigInt,
    pub value: RatFunc,
    pub divisors: Vec<(Poly, Span)>,
    pub written: String,
    pub span: Span,
}

/// Everything a model file says: the pieces of the rule in index order, the boundary term,
/// the parameters.
#[derive(Clone, Debug)]
pub struct Model {
    pub sequence: String,
    pub index: String,
    pub params: Vec<Param>,
    pub pieces: Vec<Piece>,
    pub boundary: Option<Boundary>,
}

/// A piece with its bounds evaluated: a [`Problem`] that `solve` accepts, and its last index.
#[derive(Clone, Debug)]
pub struct ResolvedPiece {
    pub problem: Problem,
    pub last_index: Option<BigInt>,
}

impl Model {
    /// Several pieces, or one cut at an upper bound (a finite state space): such models are
    /// solved, summed and tabulated piece by piece.
    pub fn is_piecewise(&self) -> bool {
        self.pieces.len() > 1 || self.pieces.last().is_some_and(|p| p.last.is_some())
    }

    /// The last index of a finite state space cut at an upper bound, as written.
    pub fn capacity(&self) -> Option<&RatFunc> {
        self.pieces.last().and_then(|p| p.last.as_ref())
    }

    pub fn param(&self, name: &str) -> Option<&Param> {
        self.params.iter().find(|p| p.name == name)
    }

    /// The index of the base term, a(first − 1) of the first piece, when it is a number.
    pub fn base_index(&self, values: &BTreeMap<String, Q>) -> Result<BigInt, Diagnostic> {
        let first = &self.pieces[0];
        Ok(integer_bound(&first.first, values, first)? - 1)
    }

    /// Every piece as a [`Problem`], with the breakpoints evaluated from `values`. Fails when a
    /// breakpoint has no value, is not a whole number, or leaves a piece empty.
    pub fn resolve(&self, values: &BTreeMap<String, Q>) -> Result<Vec<ResolvedPiece>, Diagnostic> {
        let mut out: Vec<ResolvedPiece> = Vec::new();
        for piece in &self.pieces {
            let first = integer_bound(&piece.first, values, piece)?;
            let last = match &piece.last {
                Some(l) => Some(integer_bound(l, values, piece)?),
                None => None,
            };
            if let Some(l) = &last {
                // A bounded last piece may be empty (K = c: no room beyond the c-th state);
                // the piece before it then ends the state space.
                let is_last = std::ptr::eq(piece, self.pieces.last().expect("non-empty"));
                if is_last && !out.is_empty() && l + 1 == first {
                    continue;
                }
                if *l < first {
                    return Err(Diagnostic::new(
                        format!("with these values this piece is empty ({first} ≤ k ≤ {l})"),
                        piece.range_span.clone().unwrap_or(piece.span.clone()),
                    )
                    .with_help(
                        "choose parameter values that leave every piece at least one index",
                    ));
                }
            }
            out.push(ResolvedPiece {
                problem: Problem {
                    sequence: self.sequence.clone(),
                    index: self.index.clone(),
                    params: self.params.clone(),
                    ratio: piece.ratio.clone(),
                    first_index: first,
                    divisors: piece.divisors.clone(),
                    rule_span: piece.span.clone(),
                },
                last_index: last,
            });
        }
        Ok(out)
    }
}

/// A bound's value as a whole number.
fn integer_bound(
    bound: &RatFunc,
    values: &BTreeMap<String, Q>,
    piece: &Piece,
) -> Result<BigInt, Diagnostic> {
    let here = piece.range_span.clone().unwrap_or(piece.span.clone());
    let value = bound.eval(values).map_err(|e| {
        let missing = match e {
            crate::algebra::EvalError::Unbound(name) => name,
            crate::algebra::EvalError::DivisionByZero => "?".into(),
        };
        Diagnostic::new(
            format!("the breakpoint depends on `{missing}`, which has no value"),
            here.clone(),
        )
        .with_help(format!(
            "give it with --param {missing}=…; a piecewise rule is solved for a given breakpoint"
        ))
    })?;
    if !value.is_integer() {
        return Err(Diagnostic::new(
            format!("the breakpoint evaluates to {value}, not a whole number"),
            here,
        ));
    }
    Ok(value.to_integer())
}
