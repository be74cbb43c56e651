//! The canonical shape every rewrite result is brought into before it is compared: constants
//! folded into the coefficient, like factors merged, powers with the same exponent gathered,
//! factors in a fixed reading order. None of this changes a value; it is bookkeeping, so it is
//! not shown as a derivation step of its own.

#[cfg(test)]
use std::cmp::Ordering;

use crate::algebra::{RatFunc, Q};
use crate::closed_form::{Affine, Factor, Product};

/// `f` with its exponent replaced (Power factors carry theirs in the exponent argument and
/// are returned unchanged).
pub fn with_exponent(f: &Factor, e: i32) -> Factor {
    let mut out = f.clone();
    set_exponent(&mut out, e);
    out
}

/// Sets the exponent of `f` in place (Power factors carry theirs in the exponent argument and
/// are left unchanged).
fn set_exponent(f: &mut Factor, e: i32) {
    match f {
        Factor::Gamma { exponent, .. }
        | Factor::Linear { exponent, .. }
        | Factor::Rising { exponent, .. }
        | Factor::Beta { exponent, .. }
        | Factor::Factorial { exponent, .. }
        | Factor::Binomial { exponent, .. } => *exponent = e,
        Factor::SqrtPi { half_exponent } => *half_exponent = e,
        Factor::Power { .. } => {}
    }
}

/// Whether `a` and `b` differ at most in their exponents: `with_exponent(a, 0) ==
/// with_exponent(b, 0)` without the two copies.
fn alike(a: &Factor, b: &Factor) -> bool {
    match (a, b) {
        (Factor::Gamma { arg: x, .. }, Factor::Gamma { arg: y, .. })
        | (Factor::Linear { arg: x, .. }, Factor::Linear { arg: y, .. })
        | (Factor::Factorial { arg: x, .. }, Factor::Factorial { arg: y, .. }) => x == y,
        (
            Factor::Rising {
                base: x, count: m, ..
            },
            Factor::Rising {
                base: y, count: n, ..
            },
        ) => x == y && m == n,
        (Factor::Beta { a: x, b: m, .. }, Factor::Beta { a: y, b: n, .. }) => x == y && m == n,
        (
            Factor::Binomial {
                top: x, bottom: m, ..
            },
            Factor::Binomial {
                top: y, bottom: n, ..
            },
        ) => x == y && m == n,
        (Factor::SqrtPi { .. }, Factor::SqrtPi { .. }) => true,
        (Factor::Power { .. }, Factor::Power { .. }) => a == b,
        _ => false,
    }
}

/// Folds the factors that do not depend on `k` and have an exact value into the coefficient.
fn fold_constants(p: &mut Product) {
    let mut kept = Vec::with_capacity(p.factors.len());
    for f in std::mem::take(&mut p.factors) {
        let folded = match &f {
            // Numbers only: a symbolic factor such as (α + 1) stays a factor, so a product of
            // several reads as one instead of an expanded polynomial.
            Factor::Linear { arg, exponent }
                if arg.constant.as_constant().is_some() && !arg.depends_on_k() =>
            {
                arg.constant.pow(*exponent).map(|v| &p.coefficient * &v)
            }
            // c^n = c·c·…·c for an integer n (laws of exponents, common practice)
            Factor::Power { base, exponent } if !exponent.depends_on_k() => exponent
                .constant
                .as_constant()
                .filter(Q::is_integer)
                .and_then(|n| i32::try_from(n.to_integer()).ok())
                .and_then(|n| base.pow(n))
                .map(|v| &p.coefficient * &v),
            Factor::Power { base, .. } if base.is_one() => Some(p.coefficient.clone()),
            _ => None,
        };
        match folded {
            Some(c) => p.coefficient = c,
            None => kept.push(f),
        }
    }
    p.factors = kept;
}

/// Merges equal factors by adding exponents, and gathers powers with one exponent:
/// a^x · b^x = (ab)^x (laws of exponents, common practice; exact for any bases when x is an
/// integer, which every `c^(k−b)` is on the support).
fn merge(p: &mut Product) {
    let mut merged: Vec<Factor> = Vec::new();
    for f in std::mem::take(&mut p.factors) {
        if let Factor::Power { base, exponent } = &f {
            if let Some(Factor::Power { base: other, .. }) = merged
                .iter_mut()
                .find(|g| matches!(g, Factor::Power { exponent: e, .. } if e == exponent))
            {
                *other = &*other * base;
                continue;
            }
            merged.push(f);
            continue;
        }
        if let Some(existing) = merged.iter_mut().find(|g| alike(g, &f)) {
            let sum = existing.exponent() + f.exponent();
            set_exponent(existing, sum);
            continue;
        }
        merged.push(f);
    }
    merged.retain(|f| match f {
        Factor::Power { base, .. } => !base.is_one(),
        other => other.exponent() != 0,
    });
    p.factors = merged;
}

/// Reading order: √π and constant linear factors (they belong with the coefficient), then the
/// special functions (the familiar shapes lead with them: `binomial(N, k)·(p/(1 − p))^k`),
/// then powers, then linear factors in k; within a kind, ascending by the argument's constant
/// when it is a number.
fn kind_rank(f: &Factor) -> u8 {
    match f {
        Factor::SqrtPi { .. } => 0,
        Factor::Linear { arg, .. } if !arg.depends_on_k() => 1,
        Factor::Binomial { .. } => 2,
        Factor::Beta { .. } => 3,
        Factor::Rising { .. } => 4,
        Factor::Factorial { .. } => 5,
        Factor::Gamma { .. } => 6,
        Factor::Power { .. } => 7,
        Factor::Linear { .. } => 8,
    }
}

fn first_argument(f: &Factor) -> Option<&Affine> {
    match f {
        Factor::Gamma { arg, .. } | Factor::Linear { arg, .. } | Factor::Factorial { arg, .. } => {
            Some(arg)
        }
        Factor::Power { exponent, .. } => Some(exponent),
        Factor::Rising { base, .. } => Some(base),
        Factor::Beta { a, .. } => Some(a),
        Factor::Binomial { top, .. } => Some(top),
        Factor::SqrtPi { .. } => None,
    }
}

#[cfg(test)]
fn reading_order(a: &Factor, b: &Factor) -> Ordering {
    let rank = kind_rank(a).cmp(&kind_rank(b));
    let k_first = b.depends_on_k().cmp(&a.depends_on_k());
    let by_value = match (first_argument(a), first_argument(b)) {
        (Some(x), Some(y)) => match (x.constant.as_constant(), y.constant.as_constant()) {
            (Some(p), Some(q)) => p.cmp(&q),
            (Some(_), None) => Ordering::Less,
            (None, Some(_)) => Ordering::Greater,
            (None, None) => Ordering::Equal,
        },
        _ => Ordering::Equal,
    };
    rank.then(k_first).then(by_value).then_with(|| {
        let symbolic = |f: &Factor| first_argument(f).map(|x| x.constant.to_string());
        symbolic(a)
            .cmp(&symbolic(b))
            .then_with(|| a.exponent().cmp(&b.exponent()))
    })
}

/// The key of one factor in the reading order (kind, `k`-dependent first, the argument's
/// constant by value when it is a number, else by its text, then the exponent), computed once
/// per factor instead of once per comparison. Comparing keys gives `reading_order` (checked
/// in the tests): the text of a numeric constant only breaks ties between equal numbers,
/// whose texts are equal, so it is left out.
type ReadingKey = (u8, bool, Option<(bool, Option<Q>)>, Option<String>, i32);

fn reading_key(f: &Factor) -> ReadingKey {
    let argument = first_argument(f);
    let value = argument.map(|x| {
        let number = x.constant.as_constant();
        (number.is_none(), number)
    });
    let symbolic =
        argument.and_then(|x| (x.constant.as_constant().is_none()).then(|| x.constant.to_string()));
    (
        kind_rank(f),
        !f.depends_on_k(),
        value,
        symbolic,
        f.exponent(),
    )
}

/// The canonical shape of `p`.
pub fn tidy(mut p: Product) -> Product {
    fold_constants(&mut p);
    merge(&mut p);
    // Merging can produce new constants (a gathered power with base 1 is dropped above).
    fold_constants(&mut p);
    // Stable, like `sort_by(reading_order)`.
    p.factors.sort_by_cached_key(reading_key);
    p
}

/// Multiplies the coefficient by `c`.
pub fn scale(p: &mut Product, c: &RatFunc) {
    p.coefficient = &p.coefficient * c;
}

#[cfg(test)]
mod tests {
    use super::*;

    fn k_plus(n: i64) -> Affine {
        Affine::k_plus(RatFunc::from_integer(n))
    }

    #[test]
    fn like_factors_merge_and_cancel() {
        let p = Product {
            coefficient: RatFunc::one(),
            factors: vec![
                Factor::Gamma {
                    arg: k_plus(1),
                    exponent: 1,
                },
                Factor::Linear {
                    arg: k_plus(2),
                    exponent: -1,
                },
                Factor::Gamma {
                    arg: k_plus(1),
                    exponent: -1,
                },
                Factor::Linear {
                    arg: k_plus(2),
                    exponent: -1,
                },
            ],
        };
        let t = tidy(p);
        assert_eq!(
            t.factors,
            vec![Factor::Linear {
                arg: k_plus(2),
                exponent: -2
            }]
        );
    }

    #[test]
    fn powers_with_one_exponent_gather_and_constants_fold() {
        // p^k · (1/p)^k = 1; 3^2 and the constant linear factor 1/2 fold into the coefficient.
        let p_var = RatFunc::var("p");
        let k = Affine {
            k_coeff: 1,
            constant: RatFunc::zero(),
        };
        let p = Product {
            coefficient: RatFunc::one(),
            factors: vec![
                Factor::Power {
                    base: p_var.clone(),
                    exponent: k.clone(),
                },
                Factor::Power {
                    base: p_var.inv().unwrap(),
                    exponent: k,
                },
                Factor::Power {
                    base: RatFunc::from_integer(3),
                    exponent: Affine::constant(RatFunc::from_integer(2)),
                },
                Factor::Linear {
                    arg: Affine::constant(RatFunc::from_integer(2)),
                    exponent: -1,
                },
            ],
        };
        let t = tidy(p);
        assert!(t.factors.is_empty());
        assert_eq!(t.coefficient, RatFunc::constant(Q::new(9.into(), 2.into())));
    }

    #[test]
    fn cached_reading_keys_order_like_the_comparison() {
        // Every kind, numeric and symbolic constants, equal arguments with different
        // exponents: sorting by the cached key must give the comparison's order.
        let alpha = RatFunc::var("alpha");
        let half = RatFunc::constant(Q::new(1.into(), 2.into()));
        let args = [
            k_plus(0),
            k_plus(-2),
            Affine::k_plus(half.clone()),
            Affine::k_plus(alpha.clone()),
            Affine::k_plus(&alpha + &RatFunc::one()),
            Affine::constant(alpha.clone()),
            Affine::constant(half.clone()),
            Affine::c_minus_k(alpha.clone()),
        ];
        let mut factors = vec![Factor::SqrtPi { half_exponent: -1 }];
        for (i, arg) in args.iter().enumerate() {
            let e = if i % 2 == 0 { 1 } else { -2 };
            factors.push(Factor::Gamma {
                arg: arg.clone(),
                exponent: e,
            });
            factors.push(Factor::Gamma {
                arg: arg.clone(),
                exponent: -e,
            });
            factors.push(Factor::Linear {
                arg: arg.clone(),
                exponent: e,
            });
            factors.push(Factor::Factorial {
                arg: arg.clone(),
                exponent: e,
            });
            factors.push(Factor::Beta {
                a: arg.clone(),
                b: Affine::constant(half.clone()),
                exponent: e,
            });
            factors.push(Factor::Rising {
                base: arg.clone(),
                count: k_plus(1),
                exponent: e,
            });
            factors.push(Factor::Binomial {
                top: arg.clone(),
                bottom: k_plus(0),
                exponent: e,
            });
            factors.push(Factor::Power {
                base: alpha.clone(),
                exponent: arg.clone(),
            });
        }
        factors.reverse();
        let mut by_comparison = factors.clone();
        by_comparison.sort_by(reading_order);
        let mut by_key = factors;
        by_key.sort_by_cached_key(reading_key);
        assert_eq!(by_key, by_comparison);
    }

    #[test]
    fn linear_factors_read_in_ascending_order() {
        let p = Product {
            coefficient: RatFunc::one(),
            factors: (0..3)
                .rev()
                .map(|n| Factor::Linear {
                    arg: k_plus(n),
                    exponent: -1,
                })
                .collect(),
        };
        let t = tidy(p);
        let order: Vec<Affine> = t
            .factors
            .iter()
            .map(|f| first_argument(f).unwrap().clone())
            .collect();
        assert_eq!(order, vec![k_plus(0), k_plus(1), k_plus(2)]);
    }
}
