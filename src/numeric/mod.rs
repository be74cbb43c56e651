//! Arbitrary-precision evaluation (MPFR via `rug`): running products of the rule, the closed
//! form through log-Gamma, and decimal output whose digits are backed by an error bound.
//!
//! Nothing here knows about syntax or rendering; inputs are exact rationals and typed factors.

pub mod closed;
pub mod convert;
pub mod decimal;
pub mod direct;
pub mod logreal;
pub mod split;

pub use closed::{evaluate_closed_form, ClosedValueError};
pub use convert::{from_rug_integer, from_rug_rational, to_rug_integer, to_rug_rational};
pub use decimal::{float_to_decimal, rational_to_decimal};
pub use direct::{DirectError, DirectValue, NumericFactor, NumericRatio, RunningProduct};
pub use logreal::LogReal;

/// Bits needed to carry `digits` significant decimal digits (ceil(digits * log2 10)).
pub fn bits_for_digits(digits: u32) -> u32 {
    // log2(10) = 3.32192809..., rounded up in the fourth decimal so the result never falls short.
    ((digits as u64 * 33220).div_ceil(10000)) as u32 + 1
}

/// Guard bits added on top of every error budget: common practice for MPFR work, a margin that
/// absorbs the few roundings an error analysis does not itemise.
pub const GUARD_BITS: u32 = 24;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fifty_digits_need_at_least_167_bits() {
        // 10^50 < 2^167 (common practice: digits * log2(10) = 166.1)
        assert!(bits_for_digits(50) >= 167);
        assert!(bits_for_digits(50) <= 170);
    }
}
