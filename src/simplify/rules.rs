//! The rewrite rules, as data: each has a name (stable, used in JSON), a title (words for the
//! derivation), its source, and a function listing every way it applies to a product. The
//! driver in `mod.rs` searches over them; this file only says what exists.

use std::collections::BTreeSet;

use num_bigint::BigInt;

use crate::algebra::{RatFunc, Q};
use crate::closed_form::{Affine, Factor, Product};

use super::exact_values::{gamma_at_half_integer, gamma_at_integer, gamma_to_factorial};
use super::pairs::{
    beta_pairing, binomial_from_gammas, gamma_constant_shift, gamma_quotient_to_pochhammer,
    pochhammer_to_linear,
};
use super::tidy::with_exponent;

/// What the rules may know about the problem beyond the product itself.
#[derive(Clone, Debug, Default)]
pub struct Context {
    /// The base index b: every form is used for k ≥ b.
    pub base_index: BigInt,
    /// Parameters declared `integer`.
    pub integer_params: BTreeSet<String>,
}

/// One named rewrite.
#[derive(Clone, Copy)]
pub struct Rule {
    pub name: &'static str,
    pub title: &'static str,
    pub source: &'static str,
    /// Every product reachable by one application (untidied).
    pub apply: fn(&Product, &Context) -> Vec<Product>,
}

impl std::fmt::Debug for Rule {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name)
    }
}

/// Every rewrite the simplifier knows, in the order it tries them.
pub const RULES: &[Rule] = &[
    Rule {
        name: "gamma-at-integer",
        title: "Gamma at a positive integer is a factorial",
        source: "DLMF 5.4.1",
        apply: gamma_at_integer,
    },
    Rule {
        name: "gamma-at-half-integer",
        title: "Gamma at a half-integer is a rational multiple of the square root of pi",
        source: "DLMF 5.4.6, 5.5.1",
        apply: gamma_at_half_integer,
    },
    Rule {
        name: "gamma-constant-shift",
        title: "constant Gamma arguments differing by an integer cancel by the recurrence",
        source: "DLMF 5.5.1",
        apply: gamma_constant_shift,
    },
    Rule {
        name: "gamma-quotient-to-pochhammer",
        title: "a Gamma quotient with an integer shift is a rising factorial",
        source: "DLMF 5.2.5",
        apply: gamma_quotient_to_pochhammer,
    },
    Rule {
        name: "pochhammer-to-linear",
        title: "a short rising factorial is a product of linear factors",
        source: "DLMF 5.2.4",
        apply: pochhammer_to_linear,
    },
    Rule {
        name: "gamma-to-factorial",
        title: "Gamma at an integer-valued argument is a factorial",
        source: "DLMF 5.4.1",
        apply: gamma_to_factorial,
    },
    Rule {
        name: "binomial-from-gammas",
        title: "three Gamma functions form a binomial coefficient",
        source: "DLMF 1.2.1 with DLMF 5.4.1",
        apply: binomial_from_gammas,
    },
    Rule {
        name: "beta-pairing",
        title: "a Gamma quotient whose arguments differ by a non-integer is a Beta function",
        source: "DLMF 5.12.1",
        apply: beta_pairing,
    },
];

/// The rule with this name.
pub fn rule_named(name: &str) -> Option<&'static Rule> {
    RULES.iter().find(|r| r.name == name)
}

// ---- helpers shared by the rule files ----

/// `a − b`.
pub(crate) fn affine_minus(a: &Affine, b: &Affine) -> Affine {
    Affine {
        k_coeff: a.k_coeff - b.k_coeff,
        constant: &a.constant - &b.constant,
    }
}

/// The value of a `k`-free argument when it is a rational number.
pub(crate) fn constant_value(a: &Affine) -> Option<Q> {
    if a.depends_on_k() {
        return None;
    }
    a.constant.as_constant()
}

/// The value of a `k`-free argument when it is an integer.
pub(crate) fn integer_value(a: &Affine) -> Option<BigInt> {
    constant_value(a)
        .filter(Q::is_integer)
        .map(|q| q.to_integer())
}

/// `a − b` when it is an integer (equal `k` coefficients, constants differing by an integer),
/// without forming the difference otherwise.
pub(crate) fn integer_difference(a: &Affine, b: &Affine) -> Option<BigInt> {
    if a.k_coeff != b.k_coeff {
        return None;
    }
    a.constant
        .difference_if_number(&b.constant)
        .filter(Q::is_integer)
        .map(|q| q.to_integer())
}

/// `p` with `taken[i].1` removed from the exponent of factor `taken[i].0`, `added` appended and
/// the coefficient multiplied by `scale`.
pub(crate) fn rewrite(
    p: &Product,
    taken: &[(usize, i32)],
    added: Vec<Factor>,
    scale: &RatFunc,
) -> Product {
    let mut factors: Vec<Factor> = p.factors.clone();
    for (index, amount) in taken {
        let f = &factors[*index];
        factors[*index] = with_exponent(f, f.exponent() - amount);
    }
    factors.retain(|f| f.exponent() != 0 || matches!(f, Factor::Power { .. }));
    factors.extend(added);
    Product {
        coefficient: &p.coefficient * scale,
        factors,
    }
}

/// Indices and exponents of the Gamma factors.
pub(crate) fn gammas(p: &Product) -> Vec<(usize, &Affine, i32)> {
    p.factors
        .iter()
        .enumerate()
        .filter_map(|(i, f)| match f {
            Factor::Gamma { arg, exponent } => Some((i, arg, *exponent)),
            _ => None,
        })
        .collect()
}

/// A Gamma factor's position in the product and its argument.
pub(crate) type GammaAt<'a> = (usize, &'a Affine);

/// Pairs (numerator Gamma, denominator Gamma) with the exponent they share.
pub(crate) fn gamma_pairs(p: &Product) -> Vec<(GammaAt<'_>, GammaAt<'_>, i32)> {
    let all = gammas(p);
    let mut out = Vec::new();
    for &(i, a, ei) in &all {
        for &(j, b, ej) in &all {
            if ei > 0 && ej < 0 {
                out.push(((i, a), (j, b), ei.min(-ej)));
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_unique_and_every_rule_cites_a_source() {
        let names: BTreeSet<&str> = RULES.iter().map(|r| r.name).collect();
        assert_eq!(names.len(), RULES.len());
        for rule in RULES {
            assert!(rule.source.starts_with("DLMF"), "{}", rule.name);
            assert!(rule_named(rule.name).is_some());
        }
    }

    #[test]
    fn rewrite_takes_exponents_and_scales() {
        let p = Product {
            coefficient: RatFunc::from_integer(2),
            factors: vec![Factor::Gamma {
                arg: Affine::k_plus(RatFunc::one()),
                exponent: 2,
            }],
        };
        let out = rewrite(&p, &[(0, 1)], vec![], &RatFunc::from_integer(3));
        assert_eq!(out.coefficient, RatFunc::from_integer(6));
        assert_eq!(out.factors[0].exponent(), 1);
    }
}
