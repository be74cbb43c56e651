//! Telescoping the product of a factor normal form into Gamma functions.

use std::collections::BTreeMap;

use num_bigint::BigInt;

use crate::algebra::{RatFunc, Q};
use crate::closed_form::{Affine, ClosedForm, Factor, Product};
use crate::ratio::{LinearFactor, Orientation, Ratio};

/// `a(k) = a(b) · c^(k−b) · Π (rising) [Γ(k+1+α)/Γ(b+1+α)]^e · Π (falling) [Γ(β−b)/Γ(β−k)]^e`.
///
/// Rising: Π_{j=b+1..k} (j+α) = Γ(k+1+α)/Γ(b+1+α) (DLMF 5.2.5, Pochhammer's symbol).
/// Falling: Π_{j=b+1..k} (β−j) = Γ(β−b)/Γ(β−k), which stays finite for integer β and gives
/// finite support (DLMF 5.2.5 applied to the reversed product).
/// `sign_flips` counts factors whose orientation was reversed, each contributing (−1)^(k−b).
pub fn telescope(
    sequence: &str,
    ratio: &Ratio,
    base_index: &BigInt,
    sign_flips: u32,
) -> ClosedForm {
    let b = RatFunc::constant(Q::from_integer(base_index.clone()));
    let one = RatFunc::one();
    let mut factors = Vec::new();
    let mut geometric = ratio.constant.clone();
    if sign_flips % 2 == 1 {
        geometric = -geometric;
    }
    if !geometric.is_one() {
        factors.push(Factor::Power {
            base: geometric,
            exponent: Affine {
                k_coeff: 1,
                constant: -b.clone(),
            },
        });
    }
    for factor in &ratio.factors {
        let e = factor.exponent;
        match factor.orientation {
            Orientation::Rising => {
                let start = &(&b + &one) + &factor.shift;
                factors.push(Factor::Gamma {
                    arg: Affine::k_plus(&one + &factor.shift),
                    exponent: e,
                });
                factors.push(Factor::Gamma {
                    arg: Affine::constant(start),
                    exponent: -e,
                });
            }
            Orientation::Falling => {
                factors.push(Factor::Gamma {
                    arg: Affine::constant(&factor.shift - &b),
                    exponent: e,
                });
                factors.push(Factor::Gamma {
                    arg: Affine::c_minus_k(factor.shift.clone()),
                    exponent: -e,
                });
            }
        }
    }
    ClosedForm {
        sequence: sequence.to_string(),
        base_index: base_index.clone(),
        product: Product {
            coefficient: RatFunc::one(),
            factors,
        },
    }
}

/// Reverses the orientation of factors whose Gamma form would start on a pole: a rising
/// factor `k + α` with integer α and b+1+α ≤ 0 becomes −(−α − k), a falling factor `β − k`
/// with integer β ≤ b becomes −(k − β). The product is unchanged; the Gamma arguments stay
/// positive. Returns the new ratio and how many sign flips (per step) were introduced.
pub fn orient_for_poles(
    ratio: &Ratio,
    first_index: &BigInt,
    values: &BTreeMap<String, Q>,
) -> (Ratio, u32) {
    let b = first_index - 1;
    let mut flips = 0u32;
    let mut out = ratio.clone();
    for factor in &mut out.factors {
        let Some(shift) = numeric_shift(&factor.shift, values) else {
            continue;
        };
        if !shift.is_integer() {
            continue;
        }
        let shift = shift.to_integer();
        let reverse = match factor.orientation {
            Orientation::Rising => (&b + 1 + &shift) <= BigInt::from(0),
            Orientation::Falling => (&shift - &b) <= BigInt::from(0),
        };
        if reverse {
            *factor = LinearFactor {
                orientation: match factor.orientation {
                    Orientation::Rising => Orientation::Falling,
                    Orientation::Falling => Orientation::Rising,
                },
                shift: -factor.shift.clone(),
                exponent: factor.exponent,
                span: factor.span.clone(),
            };
            flips += factor.exponent.unsigned_abs();
        }
    }
    (out, flips)
}

/// The shift as a number: directly when it is constant, or with the supplied values.
pub(crate) fn numeric_shift(shift: &RatFunc, values: &BTreeMap<String, Q>) -> Option<Q> {
    shift.as_constant().or_else(|| shift.eval(values).ok())
}
