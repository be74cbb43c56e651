//! Rules that combine Gamma functions: integer shifts (the recurrence, Pochhammer's symbol),
//! binomial coefficients and Beta functions.

use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive};

use crate::algebra::{RatFunc, Residue, Q};
use crate::closed_form::{Affine, Factor, Product};

use super::measure::affine_size;
use super::rules::{
    affine_minus, constant_value, gamma_pairs, gammas, integer_difference, integer_value, rewrite,
    Context,
};

/// Constant shifts up to this are folded by the recurrence; beyond, the Gammas stay.
const LONGEST_CONSTANT_SHIFT: u32 = 64;
/// Rising factorials up to this many factors are written out as linear factors.
const LONGEST_EXPANDED_POCHHAMMER: u32 = 4;

/// Γ(x + n)/Γ(x) = x(x+1)…(x+n−1) for constant x and integer n (DLMF 5.5.1, iterated): a
/// number folds into the coefficient; a symbolic x gives linear factors for short shifts and
/// Pochhammer's (x)_n (DLMF 5.2.5) for long ones.
pub fn gamma_constant_shift(p: &Product, _: &Context) -> Vec<Product> {
    let mut out = Vec::new();
    for ((i, top), (j, bottom), m) in gamma_pairs(p) {
        if top.depends_on_k() || bottom.depends_on_k() {
            continue;
        }
        let Some(shift) = integer_difference(top, bottom) else {
            continue;
        };
        let n = shift.abs().to_u32().unwrap_or(u32::MAX);
        if n == 0 || n > LONGEST_CONSTANT_SHIFT {
            continue;
        }
        let (low, exponent) = if shift.is_positive() {
            (bottom, m)
        } else {
            (top, -m)
        };
        let taken = [(i, m), (j, -m)];
        if low.constant.as_constant().is_some() {
            let mut pochhammer = RatFunc::one();
            for step in 0..n {
                pochhammer = &pochhammer * &(&low.constant + &RatFunc::from_integer(step as i64));
            }
            if let Some(scale) = pochhammer.pow(exponent) {
                out.push(rewrite(p, &taken, vec![], &scale));
            }
        } else if n <= LONGEST_EXPANDED_POCHHAMMER {
            let linear = (0..n)
                .map(|step| Factor::Linear {
                    arg: low.shifted(&RatFunc::from_integer(step as i64)),
                    exponent,
                })
                .collect();
            out.push(rewrite(p, &taken, linear, &RatFunc::one()));
        } else {
            let rising = Factor::Rising {
                base: low.clone(),
                count: Affine::constant(RatFunc::from_integer(n as i64)),
                exponent,
            };
            out.push(rewrite(p, &taken, vec![rising], &RatFunc::one()));
        }
    }
    out
}

/// Whether `count` may stand as the length of a rising factorial with this base: a positive
/// integer, or `k + integer` over a constant base (non-negative on the support k ≥ b).
fn pochhammer_count(base: &Affine, count: &Affine, context: &Context) -> bool {
    match count.k_coeff {
        0 => integer_value(count).is_some_and(|n| n.is_positive()),
        1 => {
            !base.depends_on_k()
                && count.constant.as_constant().is_some_and(|c| {
                    c.is_integer() && c.to_integer() + &context.base_index >= BigInt::from(0)
                })
        }
        _ => false,
    }
}

/// Γ(x + n)/Γ(x) = (x)_n (DLMF 5.2.5), in either direction.
pub fn gamma_quotient_to_pochhammer(p: &Product, context: &Context) -> Vec<Product> {
    let mut out = Vec::new();
    for ((i, top), (j, bottom), m) in gamma_pairs(p) {
        if !top.depends_on_k() && !bottom.depends_on_k() {
            continue;
        }
        // Both counts below need a numeric constant, the case of few pairs: decide that
        // before forming the differences.
        let Some(difference) = top.constant.difference_if_number(&bottom.constant) else {
            continue;
        };
        let up = Affine {
            k_coeff: top.k_coeff - bottom.k_coeff,
            constant: RatFunc::constant(difference.clone()),
        };
        let down = Affine {
            k_coeff: bottom.k_coeff - top.k_coeff,
            constant: RatFunc::constant(-difference),
        };
        let rising = if pochhammer_count(bottom, &up, context) {
            Factor::Rising {
                base: bottom.clone(),
                count: up,
                exponent: m,
            }
        } else if pochhammer_count(top, &down, context) {
            Factor::Rising {
                base: top.clone(),
                count: down,
                exponent: -m,
            }
        } else {
            continue;
        };
        out.push(rewrite(
            p,
            &[(i, m), (j, -m)],
            vec![rising],
            &RatFunc::one(),
        ));
    }
    out
}

/// (x)_n = x(x+1)…(x+n−1) for a short constant length n (DLMF 5.2.4), all such factors at
/// once.
pub fn pochhammer_to_linear(p: &Product, _: &Context) -> Vec<Product> {
    let mut taken = Vec::new();
    let mut linear = Vec::new();
    for (i, f) in p.factors.iter().enumerate() {
        let Factor::Rising {
            base,
            count,
            exponent,
        } = f
        else {
            continue;
        };
        let Some(n) = integer_value(count).and_then(|n| n.to_u32()) else {
            continue;
        };
        if n == 0 || n > LONGEST_EXPANDED_POCHHAMMER {
            continue;
        }
        taken.push((i, *exponent));
        linear.extend((0..n).map(|step| Factor::Linear {
            arg: base.shifted(&RatFunc::from_integer(step as i64)),
            exponent: *exponent,
        }));
    }
    if taken.is_empty() {
        return Vec::new();
    }
    vec![rewrite(p, &taken, linear, &RatFunc::one())]
}

/// Γ(n + 1)/(Γ(m + 1) Γ(n − m + 1)) = binomial(n, m) (DLMF 1.2.1 with Γ(j + 1) = j!,
/// DLMF 5.4.1; the Gamma form is the standard extension to non-integer n). The lower entry is
/// the shorter of the two candidates, `k` itself when possible.
pub fn binomial_from_gammas(p: &Product, _: &Context) -> Vec<Product> {
    let all = gammas(p);
    let mut out = Vec::new();
    let one = RatFunc::one();
    // left + right for each pair of denominator Gammas, formed once and only for pairs whose
    // k coefficients can match a numerator's.
    let mut pair_sums: Vec<Vec<Option<RatFunc>>> = vec![vec![None; all.len()]; all.len()];
    // Each constant's value at one point modulo a prime: a pair whose values do not add up to
    // the numerator's plus one cannot match, and is passed over without forming its sum (a
    // fuzzed rule in several names with nested fractions spent 40% of `check` on those
    // sums, each a product of long polynomials and a gcd).
    let constants: Vec<&RatFunc> = all.iter().map(|(_, g, _)| &g.constant).collect();
    let residues = RatFunc::residues(&constants);
    let one_residue = Residue::from_integer(1);
    for (top_position, &(i, top, ei)) in all.iter().enumerate() {
        if ei <= 0 {
            continue;
        }
        let top_plus_one = &top.constant + &one;
        for (position, &(j, left, ej)) in all.iter().enumerate() {
            for (offset, &(l, right, el)) in all[position + 1..].iter().enumerate() {
                if ej >= 0 || el >= 0 {
                    continue;
                }
                if left.k_coeff + right.k_coeff != top.k_coeff {
                    continue;
                }
                if !(top.depends_on_k() || left.depends_on_k() || right.depends_on_k()) {
                    continue;
                }
                let right_position = position + 1 + offset;
                if let (Some(t), Some(l), Some(r)) = (
                    residues[top_position],
                    residues[position],
                    residues[right_position],
                ) {
                    if l + r != t + one_residue {
                        continue;
                    }
                }
                let sum = pair_sums[position][right_position]
                    .get_or_insert_with(|| &left.constant + &right.constant);
                if *sum != top_plus_one {
                    continue;
                }
                let m = ei.min(-ej).min(-el);
                let minus_one = RatFunc::from_integer(-1);
                let (a, b) = (left.shifted(&minus_one), right.shifted(&minus_one));
                let bottom =
                    if (affine_size(&b), b.k_coeff != 1) < (affine_size(&a), a.k_coeff != 1) {
                        b
                    } else {
                        a
                    };
                let binomial = Factor::Binomial {
                    top: top.shifted(&minus_one),
                    bottom,
                    exponent: m,
                };
                out.push(rewrite(
                    p,
                    &[(i, m), (j, -m), (l, -m)],
                    vec![binomial],
                    &RatFunc::one(),
                ));
            }
        }
    }
    out
}

/// Γ(x)/Γ(x + d) = B(x, d)/Γ(d) (DLMF 5.12.1) for x depending on k and d free of k and not an
/// integer (integer shifts are rising factorials). A negative number d is written the other
/// way round, Γ(y + e)/Γ(y) = Γ(e)/B(y, e) with e = −d > 0, so Beta's second entry stays
/// positive.
pub fn beta_pairing(p: &Product, _: &Context) -> Vec<Product> {
    let mut out = Vec::new();
    for ((i, top), (j, bottom), m) in gamma_pairs(p) {
        if !top.depends_on_k() || top.k_coeff != bottom.k_coeff {
            continue;
        }
        let d = affine_minus(bottom, top);
        let value = constant_value(&d);
        if value.as_ref().is_some_and(Q::is_integer) {
            continue;
        }
        let negative = value.as_ref().is_some_and(|v| v.is_negative());
        let added = if negative {
            let e = affine_minus(top, bottom);
            vec![
                Factor::Beta {
                    a: bottom.clone(),
                    b: e.clone(),
                    exponent: -m,
                },
                Factor::Gamma {
                    arg: e,
                    exponent: m,
                },
            ]
        } else {
            vec![
                Factor::Beta {
                    a: top.clone(),
                    b: d.clone(),
                    exponent: m,
                },
                Factor::Gamma {
                    arg: d,
                    exponent: -m,
                },
            ]
        };
        out.push(rewrite(p, &[(i, m), (j, -m)], added, &RatFunc::one()));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::simplify::exact_values::gamma;

    fn product(factors: Vec<Factor>) -> Product {
        Product::of(factors)
    }

    fn k_plus(c: RatFunc) -> Affine {
        Affine::k_plus(c)
    }

    fn n(v: i64) -> RatFunc {
        RatFunc::from_integer(v)
    }

    #[test]
    fn constant_recursion_folds_a_symbolic_shift() {
        // Γ(α + 2)/Γ(α + 1) = α + 1 (DLMF 5.5.1)
        let alpha = RatFunc::var("alpha");
        let p = product(vec![
            gamma(Affine::constant(&alpha + &n(2)), 1),
            gamma(Affine::constant(&alpha + &n(1)), -1),
        ]);
        let out = gamma_constant_shift(&p, &Context::default());
        assert_eq!(out.len(), 1);
        assert_eq!(
            out[0].factors,
            vec![Factor::Linear {
                arg: Affine::constant(&alpha + &n(1)),
                exponent: 1
            }]
        );
        // Γ(c)/Γ(c + 7) = 1/(c)_7 (DLMF 5.2.5): too long to write out.
        let c = RatFunc::var("c");
        let p = product(vec![
            gamma(Affine::constant(c.clone()), 1),
            gamma(Affine::constant(&c + &n(7)), -1),
        ]);
        let out = gamma_constant_shift(&p, &Context::default());
        assert_eq!(
            out[0].factors,
            vec![Factor::Rising {
                base: Affine::constant(c),
                count: Affine::constant(n(7)),
                exponent: -1
            }]
        );
        // Γ(13/2)/Γ(1/2) = (1/2)(3/2)…(11/2) = 10395/64 (DLMF 5.5.1)
        let p = product(vec![
            gamma(Affine::constant(RatFunc::constant(q(13, 2))), 1),
            gamma(Affine::constant(RatFunc::constant(q(1, 2))), -1),
        ]);
        let out = gamma_constant_shift(&p, &Context::default());
        assert_eq!(out[0].coefficient, RatFunc::constant(q(10395, 64)));
    }

    #[test]
    fn integer_shift_in_k_is_a_rising_factorial_then_linear_factors() {
        // Γ(k)/Γ(k + 3) = 1/(k)_3 (DLMF 5.2.5) = 1/(k(k+1)(k+2)) (DLMF 5.2.4)
        let p = product(vec![gamma(k_plus(n(0)), 1), gamma(k_plus(n(3)), -1)]);
        let rising = gamma_quotient_to_pochhammer(&p, &Context::default());
        assert_eq!(
            rising[0].factors,
            vec![Factor::Rising {
                base: k_plus(n(0)),
                count: Affine::constant(n(3)),
                exponent: -1
            }]
        );
        let linear = pochhammer_to_linear(&rising[0], &Context::default());
        assert_eq!(linear[0].factors.len(), 3);
        assert!(linear[0]
            .factors
            .iter()
            .all(|f| matches!(f, Factor::Linear { exponent: -1, .. })));
    }

    #[test]
    fn pochhammer_of_length_k_needs_a_constant_base() {
        // Γ(k + r)/Γ(r) = (r)_k (DLMF 5.2.5)
        let r = RatFunc::var("r");
        let p = product(vec![
            gamma(k_plus(r.clone()), 1),
            gamma(Affine::constant(r), -1),
        ]);
        let out = gamma_quotient_to_pochhammer(&p, &Context::default());
        assert!(matches!(
            out[0].factors[0],
            Factor::Rising { exponent: 1, .. }
        ));
        // Γ(k + 1/2)/Γ(k + 1/3): no integer shift, no rising factorial.
        let q = product(vec![
            gamma(k_plus(RatFunc::constant(q(1, 2))), 1),
            gamma(k_plus(RatFunc::constant(q(1, 3))), -1),
        ]);
        assert!(gamma_quotient_to_pochhammer(&q, &Context::default()).is_empty());
    }

    #[test]
    fn binomial_distribution_gammas_form_binomial_n_k() {
        // Γ(N + 1)/(Γ(k + 1) Γ(N + 1 − k)) = binomial(N, k) (DLMF 1.2.1)
        let big_n = RatFunc::var("N");
        let p = product(vec![
            gamma(Affine::constant(&big_n + &n(1)), 1),
            gamma(Affine::c_minus_k(&big_n + &n(1)), -1),
            gamma(k_plus(n(1)), -1),
        ]);
        let out = binomial_from_gammas(&p, &Context::default());
        assert_eq!(
            out[0].factors,
            vec![Factor::Binomial {
                top: Affine::constant(big_n),
                bottom: k_plus(n(0)),
                exponent: 1
            }]
        );
    }

    #[test]
    fn binomial_pairs_with_fractional_arguments_are_found_and_near_misses_passed_over() {
        // Γ(x + 1)/(Γ(k + 1) Γ(x + 1 − k)) = binomial(x, k) (DLMF 1.2.1) for x = a/(b + 1),
        // beside a denominator Gamma whose argument misses by 1/(b + 1): the values at a point
        // modulo a prime pass over the miss, and the exact sum confirms the match.
        let one = n(1);
        let x = RatFunc::var("a")
            .checked_div(&(&RatFunc::var("b") + &one))
            .unwrap();
        let miss = &(&x + &one) + &one.checked_div(&(&RatFunc::var("b") + &one)).unwrap();
        let p = product(vec![
            gamma(Affine::constant(&x + &one), 1),
            gamma(Affine::c_minus_k(miss), -1),
            gamma(Affine::c_minus_k(&x + &one), -1),
            gamma(k_plus(n(1)), -1),
        ]);
        let out = binomial_from_gammas(&p, &Context::default());
        assert_eq!(out.len(), 1);
        assert!(out[0].factors.contains(&Factor::Binomial {
            top: Affine::constant(x),
            bottom: k_plus(n(0)),
            exponent: 1
        }));
    }

    #[test]
    fn beta_pairing_follows_dlmf_5_12_1() {
        // Γ(k)/Γ(k + α + 1) = B(k, α + 1)/Γ(α + 1) (DLMF 5.12.1)
        let shift = &RatFunc::var("alpha") + &n(1);
        let p = product(vec![
            gamma(k_plus(n(0)), 1),
            gamma(k_plus(shift.clone()), -1),
        ]);
        let out = beta_pairing(&p, &Context::default());
        assert_eq!(
            out[0].factors,
            vec![
                Factor::Beta {
                    a: k_plus(n(0)),
                    b: Affine::constant(shift.clone()),
                    exponent: 1
                },
                Factor::Gamma {
                    arg: Affine::constant(shift),
                    exponent: -1
                }
            ]
        );
        // Γ(k + 5/2)/Γ(k) = Γ(5/2)/B(k, 5/2): the Beta's second entry stays positive.
        let p = product(vec![
            gamma(k_plus(RatFunc::constant(q(5, 2))), 1),
            gamma(k_plus(n(0)), -1),
        ]);
        let out = beta_pairing(&p, &Context::default());
        assert!(matches!(
            &out[0].factors[0],
            Factor::Beta { b, exponent: -1, .. } if *b == Affine::constant(RatFunc::constant(q(5, 2)))
        ));
    }
}
