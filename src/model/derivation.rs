//! The record of how a rule was obtained from what the user wrote: the equation or rates as
//! written, the coefficients collected, the rates recognised, and the assumptions made. The
//! renderers show it before the solution; nothing here is text for people.

use crate::algebra::RatFunc;
use crate::diagnostic::Span;

use super::expr::ProductForm;

/// How the ratio of a piece was obtained.
#[derive(Clone, Debug)]
pub enum RuleSource {
    /// Written as a ratio (`n(k)/n(k-1) = R(k)` or a bare `R(k)`): nothing to derive.
    Ratio,
    /// `current(k)·a(k) = previous(k)·a(k−1)`, collected from a balance equation; the ratio
    /// is `previous/current`.
    Balance {
        current: ProductForm,
        previous: ProductForm,
    },
    /// `previous(k)·a(k−1) + current(k)·a(k) + next(k)·a(k+1) = 0` recognised as the
    /// birth–death form with `previous(k) = λ(k−1)`, `next(k) = μ(k+1)`,
    /// `current(k) = −(λ(k) + μ(k))` (up to one common factor); reduced by zero net flux.
    BirthDeathBalance {
        previous: ProductForm,
        current: ProductForm,
        next: ProductForm,
        birth: RatFunc,
        death: RatFunc,
    },
    /// `birth(k) = …`, `death(k) = …`: detailed balance `π(k)/π(k−1) = birth(k−1)/death(k)`.
    Rates {
        birth: ProductForm,
        death: ProductForm,
    },
}

/// What the derivation takes for granted.
#[derive(Clone, Debug, PartialEq)]
pub enum Assumption {
    /// The net flux λ(k−1)a(k−1) − μ(k)a(k) is the same for every k (the three-term balance
    /// says so); setting it to zero assumes it vanishes at the boundary.
    ZeroFluxAtBoundary,
    /// A birth–death chain in equilibrium satisfies detailed balance (every chain on a line
    /// is reversible: Kelly, *Reversibility and Stochastic Networks*, 1979, §1.3).
    DetailedBalance,
    /// The declared state space ends at this index, where the birth rate vanishes.
    StateSpaceEnds { at: RatFunc },
    /// A finite state space cut at this index (a capacity): no birth out of it, though the
    /// birth rate written would not vanish there.
    Capacity { at: RatFunc },
}

/// One piece's derivation.
#[derive(Clone, Debug)]
pub struct Derivation {
    pub source: RuleSource,
    /// The statements it came from, as written (source text) with their spans.
    pub written: Vec<(String, Span)>,
    pub assumptions: Vec<Assumption>,
}

impl Derivation {
    pub fn is_plain_ratio(&self) -> bool {
        matches!(self.source, RuleSource::Ratio)
    }
}
