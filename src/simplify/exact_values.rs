//! Rules that replace a Gamma function by an exact value or a factorial.

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};

use crate::algebra::{RatFunc, Q};
use crate::closed_form::{Affine, Factor, Product};

use super::rules::{constant_value, gammas, integer_value, rewrite, Context};

/// Arguments beyond this are left as Gamma: the exact integer would swamp the formula.
const LARGEST_EXACT_ARGUMENT: u32 = 60;

fn factorial(n: u32) -> BigInt {
    (1..=n).fold(BigInt::one(), |acc, i| acc * BigInt::from(i))
}

/// Γ(n) = (n − 1)! for integers 1 ≤ n ≤ 60 (DLMF 5.4.1), folded into the coefficient; all
/// such factors at once, since evaluating one never stops another from being evaluated.
pub fn gamma_at_integer(p: &Product, _: &Context) -> Vec<Product> {
    let mut taken = Vec::new();
    let mut scale = RatFunc::one();
    for (i, arg, e) in gammas(p) {
        let Some(n) = integer_value(arg).and_then(|n| n.to_u32()) else {
            continue;
        };
        if n == 0 || n > LARGEST_EXACT_ARGUMENT {
            continue;
        }
        let value = RatFunc::constant(Q::from_integer(factorial(n - 1)));
        if let Some(power) = value.pow(e) {
            scale = &scale * &power;
            taken.push((i, e));
        }
    }
    if taken.is_empty() {
        return Vec::new();
    }
    vec![rewrite(p, &taken, vec![], &scale)]
}

/// Γ(m + 1/2) / √π as an exact rational, for any integer m: Γ(1/2) = √π (DLMF 5.4.6) and
/// Γ(z + 1) = z Γ(z) (DLMF 5.5.1) walked up or down from 1/2.
pub fn half_integer_gamma_over_sqrt_pi(m: i64) -> Q {
    let half = Q::new(1.into(), 2.into());
    let mut value = Q::one();
    if m >= 0 {
        for i in 0..m {
            value *= &half + Q::from_integer(i.into());
        }
    } else {
        for i in m..0 {
            value /= &half + Q::from_integer(i.into());
        }
    }
    value
}

/// Γ(m + 1/2) → rational · √π (DLMF 5.4.6, 5.5.1), all such factors at once.
pub fn gamma_at_half_integer(p: &Product, _: &Context) -> Vec<Product> {
    let mut taken = Vec::new();
    let mut added = Vec::new();
    let mut scale = RatFunc::one();
    for (i, arg, e) in gammas(p) {
        let Some(x) = constant_value(arg) else {
            continue;
        };
        let shifted = &x - Q::new(1.into(), 2.into());
        if !shifted.is_integer() || shifted.abs() > Q::from_integer(LARGEST_EXACT_ARGUMENT.into()) {
            continue;
        }
        let m = shifted.to_integer().to_i64().unwrap_or(0);
        let ratio = RatFunc::constant(half_integer_gamma_over_sqrt_pi(m));
        if let Some(power) = ratio.pow(e) {
            scale = &scale * &power;
            taken.push((i, e));
            added.push(Factor::SqrtPi { half_exponent: e });
        }
    }
    if taken.is_empty() {
        return Vec::new();
    }
    vec![rewrite(p, &taken, added, &scale)]
}

/// Whether a `k`-free expression is an integer whenever the parameters are: a polynomial with
/// integer coefficients in parameters declared `integer`.
fn integer_valued(c: &RatFunc, context: &Context) -> bool {
    let Some(poly) = c.as_poly() else {
        return false;
    };
    poly.variables()
        .iter()
        .all(|v| context.integer_params.contains(v))
        && poly.terms().all(|(_, c)| c.is_integer())
}

/// Γ(x + 1) = x! (DLMF 5.4.1) where x = ±k + c is a non-negative integer on the support:
/// `k + n` with b + n ≥ 0, or `c − k` with c integer-valued (finite support ends there). All
/// such factors at once: a factorial always reads better than its Gamma.
pub fn gamma_to_factorial(p: &Product, context: &Context) -> Vec<Product> {
    let mut taken = Vec::new();
    let mut added = Vec::new();
    for (i, arg, e) in gammas(p) {
        let x = arg.shifted(&-RatFunc::one());
        let natural = match x.k_coeff {
            1 => x.constant.as_constant().is_some_and(|n| {
                n.is_integer() && (n.to_integer() + &context.base_index) >= BigInt::zero()
            }),
            -1 => integer_valued(&x.constant, context),
            _ => false,
        };
        if natural {
            taken.push((i, e));
            added.push(Factor::Factorial {
                arg: x,
                exponent: e,
            });
        }
    }
    if taken.is_empty() {
        return Vec::new();
    }
    vec![rewrite(p, &taken, added, &RatFunc::one())]
}

/// Convenience for tests and callers: the Gamma factor Γ(arg)^e.
pub fn gamma(arg: Affine, exponent: i32) -> Factor {
    Factor::Gamma { arg, exponent }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    fn product(factors: Vec<Factor>) -> Product {
        Product::of(factors)
    }

    fn constant(n: i64, d: i64) -> Affine {
        Affine::constant(RatFunc::constant(q(n, d)))
    }

    #[test]
    fn gamma_six_over_gamma_three_is_sixty() {
        // Γ(6) = 5! = 120, Γ(3) = 2! = 2 (DLMF 5.4.1)
        let p = product(vec![gamma(constant(6, 1), 1), gamma(constant(3, 1), -1)]);
        let out = gamma_at_integer(&p, &Context::default());
        assert_eq!(out.len(), 1);
        assert_eq!(out[0].coefficient, RatFunc::from_integer(60));
        assert!(out[0].factors.is_empty());
    }

    #[test]
    fn poles_and_huge_arguments_stay() {
        let p = product(vec![gamma(constant(0, 1), -1), gamma(constant(1000, 1), 1)]);
        assert!(gamma_at_integer(&p, &Context::default()).is_empty());
    }

    #[test]
    fn half_integers_match_dlmf() {
        // Γ(1/2) = √π (DLMF 5.4.6); Γ(5/2) = (3/4)√π and Γ(−1/2) = −2√π (DLMF 5.5.1)
        assert_eq!(half_integer_gamma_over_sqrt_pi(0), q(1, 1));
        assert_eq!(half_integer_gamma_over_sqrt_pi(2), q(3, 4));
        assert_eq!(half_integer_gamma_over_sqrt_pi(-1), q(-2, 1));
        // Γ(9/2) = 105√π/16 (DLMF 5.4.6 with 5.5.1; mpmath 1.3.0: gamma(4.5)/sqrt(pi) = 6.5625)
        assert_eq!(half_integer_gamma_over_sqrt_pi(4), q(105, 16));
        let p = product(vec![gamma(constant(9, 2), -1)]);
        let out = gamma_at_half_integer(&p, &Context::default());
        assert_eq!(out[0].coefficient, RatFunc::constant(q(16, 105)));
        assert_eq!(out[0].factors, vec![Factor::SqrtPi { half_exponent: -1 }]);
    }

    #[test]
    fn factorials_only_where_the_argument_is_a_natural_number() {
        // Γ(k + 1) = k! (DLMF 5.4.1); Γ(N + 1 − k) = (N − k)! when N is an integer.
        let mut context = Context::default();
        context.integer_params.insert("N".into());
        let n_minus_k = Affine::c_minus_k(&RatFunc::var("N") + &RatFunc::one());
        let p = product(vec![
            gamma(Affine::k_plus(RatFunc::one()), -1),
            gamma(n_minus_k, -1),
            gamma(Affine::k_plus(RatFunc::constant(q(1, 2))), 1),
        ]);
        let out = gamma_to_factorial(&p, &context);
        assert_eq!(out.len(), 1);
        assert!(out[0].factors.contains(&Factor::Factorial {
            arg: Affine::k_plus(RatFunc::zero()),
            exponent: -1
        }));
        assert!(out[0].factors.contains(&Factor::Factorial {
            arg: Affine::c_minus_k(RatFunc::var("N")),
            exponent: -1
        }));
        // Γ(k + 1/2) stays; without N declared integer only Γ(k + 1) converts.
        let plain = gamma_to_factorial(&p, &Context::default());
        assert_eq!(
            plain[0]
                .factors
                .iter()
                .filter(|f| matches!(f, Factor::Factorial { .. }))
                .count(),
            1
        );
    }
}
