//! The meaning of a model: what sequence, which parameters with which ranges, and the rule
//! in factor normal form. Built from the syntax tree by `model::build`; consumed by `solve`.

use num_bigint::BigInt;

use crate::algebra::{Poly, Q};
use crate::diagnostic::Span;
use crate::ratio::Ratio;

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
