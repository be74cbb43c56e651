//! Exact terms of a piecewise model by the chained direct product (the sums over a model live
//! in `probability`, which needs them for totals, moments and probabilities alike).

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use crate::algebra::Q;
use crate::numeric::{from_rug_rational, to_rug_integer, DirectError};

use super::{ChainValue, ChainedProduct, ModelSolution};

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
            ChainValue::Exact(q) => out.push(from_rug_rational(&q)),
            ChainValue::Approx { .. } => unreachable!("the exact route stays exact"),
        }
    }
    Ok(out)
}
