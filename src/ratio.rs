//! The factor normal form of a ratio rule:
//! `R(k) = c · Π (k + α_i)^(e_i) · Π (β_j − k)^(f_j)`, with `c`, `α`, `β` exact rational functions
//! of the parameters and integer exponents (negative in the denominator).
//!
//! Factors written with a negative `k` coefficient (`N − k + 1`) keep that orientation: it is
//! the one that telescopes into finite support (`Γ(β − b)/Γ(β − k)`).

use std::collections::BTreeMap;

use crate::algebra::{EvalError, RatFunc, Q};
use crate::diagnostic::Span;

/// Which way `k` enters a linear factor.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Orientation {
    /// `k + shift`
    Rising,
    /// `shift − k`
    Falling,
}

#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LinearFactor {
    pub orientation: Orientation,
    pub shift: RatFunc,
    pub exponent: i32,
    /// Where the user wrote it (for messages), when known.
    pub span: Option<Span>,
}

impl LinearFactor {
    pub fn rising(shift: RatFunc, exponent: i32) -> Self {
        LinearFactor {
            orientation: Orientation::Rising,
            shift,
            exponent,
            span: None,
        }
    }

    pub fn falling(shift: RatFunc, exponent: i32) -> Self {
        LinearFactor {
            orientation: Orientation::Falling,
            shift,
            exponent,
            span: None,
        }
    }

    /// The integer `k` at which the factor vanishes, when that is a fixed rational.
    pub fn root(&self) -> RatFunc {
        match self.orientation {
            Orientation::Rising => -self.shift.clone(),
            Orientation::Falling => self.shift.clone(),
        }
    }

    /// The factor's value at `k` with parameters substituted.
    pub fn eval_at(&self, k: &Q, params: &BTreeMap<String, Q>) -> Result<Q, EvalError> {
        let shift = self.shift.eval(params)?;
        Ok(match self.orientation {
            Orientation::Rising => k + shift,
            Orientation::Falling => shift - k,
        })
    }
}

/// `R(k)` in factor normal form.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Ratio {
    pub constant: RatFunc,
    pub factors: Vec<LinearFactor>,
}

impl Ratio {
    pub fn numerator_factors(&self) -> impl Iterator<Item = &LinearFactor> {
        self.factors.iter().filter(|f| f.exponent > 0)
    }

    pub fn denominator_factors(&self) -> impl Iterator<Item = &LinearFactor> {
        self.factors.iter().filter(|f| f.exponent < 0)
    }

    /// Total degree in k of numerator minus denominator.
    pub fn degree_difference(&self) -> i64 {
        self.factors.iter().map(|f| f.exponent as i64).sum()
    }

    /// R(k) with the parameters substituted; `Ok(None)` when a denominator factor vanishes.
    pub fn eval_at(&self, k: &Q, params: &BTreeMap<String, Q>) -> Result<Option<Q>, EvalError> {
        let mut value = self.constant.eval(params)?;
        for factor in &self.factors {
            let x = factor.eval_at(k, params)?;
            if x == Q::from_integer(0.into()) {
                if factor.exponent < 0 {
                    return Ok(None);
                }
                return Ok(Some(x));
            }
            for _ in 0..factor.exponent.unsigned_abs() {
                if factor.exponent > 0 {
                    value *= &x;
                } else {
                    value /= &x;
                }
            }
        }
        Ok(Some(value))
    }
}
