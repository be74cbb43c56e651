//! From a product of index polynomials to the factor normal form `c · Π (k+α)^e · Π (β−k)^f`.

use num_traits::{Signed, Zero};

use crate::algebra::{rational_roots, Poly, RatFunc, Q};
use crate::diagnostic::Diagnostic;
use crate::ratio::{LinearFactor, Orientation, Ratio};

use super::expr::ProductForm;
use super::size::{too_large, MAX_DEGREE_TIMES_BITS};

/// Every index polynomial becomes linear factors: degree one directly (`p·k + q` →
/// `p·(k + q/p)`, or `|p|·(q/|p| − k)` when p is a negative number, keeping the user's
/// orientation); higher degree with numeric coefficients by its rational roots; anything else
/// is refused with the factor's place.
pub fn normal_form(form: &ProductForm, index: &str) -> Result<Ratio, Diagnostic> {
    let mut constant = form.constant.clone();
    if constant.is_zero() {
        return Err(Diagnostic::new(
            "the ratio is identically zero",
            form.factors.first().map(|f| f.span.clone()).unwrap_or(0..0),
        ));
    }
    let mut factors: Vec<LinearFactor> = Vec::new();
    for factor in &form.factors {
        let coeffs = factor.poly.coeffs_in(index);
        let degree = coeffs.len().saturating_sub(1);
        let mut linear: Vec<(Orientation, RatFunc, i32)> = Vec::new();
        if degree == 1 {
            let (q, p) = (&coeffs[0], &coeffs[1]);
            let negative = p.as_constant().map(|c| c.is_negative()).unwrap_or(false);
            let p = RatFunc::from_poly(p.clone());
            let q = RatFunc::from_poly(q.clone());
            if negative {
                let scale = -p;
                let shift = q.checked_div(&scale).expect("non-zero leading coefficient");
                constant = &constant * &scale.pow(factor.exponent).expect("non-zero");
                linear.push((Orientation::Falling, shift, factor.exponent));
            } else {
                let shift = q.checked_div(&p).expect("non-zero leading coefficient");
                constant = &constant * &p.pow(factor.exponent).expect("non-zero");
                linear.push((Orientation::Rising, shift, factor.exponent));
            }
        } else {
            let numeric: Option<Vec<Q>> = coeffs.iter().map(|c| c.as_constant()).collect();
            let Some(numeric) = numeric else {
                return Err(Diagnostic::new(
                    format!(
                        "this factor has degree {degree} in {index} and coefficients that depend on parameters, so it cannot be split into linear factors"
                    ),
                    factor.span.clone(),
                )
                .with_help(format!(
                    "write it as a product of factors linear in {index}, e.g. ({index} + a)({index} + b) instead of {index}^2 + (a+b){index} + ab"
                )));
            };
            // Its rational roots come from a Sturm root search, whose cost grows with the
            // degree and the coefficients' bit length together (a degree-6 factor with
            // 13,000-bit coefficients took 17 s): the same bound as for parameters.
            let bits = numeric
                .iter()
                .map(|c| c.numer().bits() + c.denom().bits())
                .max()
                .unwrap_or(0);
            if degree as u64 * bits > MAX_DEGREE_TIMES_BITS {
                return Err(too_large(
                    format!(
                        "degree {degree} in {index} with {bits}-bit coefficients (degree × bits at most {MAX_DEGREE_TIMES_BITS})"
                    ),
                    factor.span.clone(),
                ));
            }
            let (roots, cofactor) = rational_roots(&numeric);
            if cofactor.len() > 1 {
                let rest = Poly::from_coeffs_in(
                    index,
                    &cofactor
                        .iter()
                        .cloned()
                        .map(Poly::constant)
                        .collect::<Vec<_>>(),
                );
                return Err(Diagnostic::new(
                    format!(
                        "this factor does not split into linear factors in {index}: {rest} has no rational roots"
                    ),
                    factor.span.clone(),
                )
                .with_help(
                    "R(k) must be a product of factors linear in k with rational (or parameter) shifts",
                ));
            }
            let lead = cofactor.first().cloned().unwrap_or_else(Q::zero);
            constant = &constant
                * &RatFunc::constant(lead)
                    .pow(factor.exponent)
                    .expect("non-zero leading coefficient");
            for (root, multiplicity) in roots {
                linear.push((
                    Orientation::Rising,
                    RatFunc::constant(-root),
                    factor.exponent * multiplicity as i32,
                ));
            }
        }
        for (orientation, shift, exponent) in linear {
            if let Some(existing) = factors
                .iter_mut()
                .find(|f| f.orientation == orientation && f.shift == shift)
            {
                existing.exponent += exponent;
            } else {
                factors.push(LinearFactor {
                    orientation,
                    shift,
                    exponent,
                    span: Some(factor.span.clone()),
                });
            }
        }
    }
    factors.retain(|f| f.exponent != 0);
    Ok(Ratio { constant, factors })
}
