//! The simplicity measure that picks the simplest form among everything the rewrites reach.
//!
//! Lexicographic, smaller is simpler:
//! 1. the number of special-function factors (Gamma, Beta, Pochhammer, factorial, binomial),
//!    counted with their exponents' multiplicity, since each is a symbol a reader must look up;
//! 2. the written size: a weight per factor kind (a factorial reads as fast as a linear factor,
//!    a binomial or power faster than a Pochhammer symbol or Beta, a Gamma slowest) plus the size of every argument and of the
//!    coefficient, measured in polynomial terms.
//!
//! Ties keep the form reached in fewer steps (the driver's concern, not this module's).

use crate::algebra::RatFunc;
use crate::closed_form::{Affine, Factor, Product};

/// How complicated a product reads; `Ord` is the documented order.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct Measure {
    pub special_factors: usize,
    pub size: usize,
}

/// Terms a reader sees in a rational function of the parameters.
pub fn ratfunc_size(r: &RatFunc) -> usize {
    let denominator = if r.denom().is_one() {
        0
    } else {
        r.denom().term_count()
    };
    r.numer().term_count().max(1) + denominator
}

/// Terms in `c·k + constant`.
pub fn affine_size(a: &Affine) -> usize {
    let k_part = usize::from(a.depends_on_k());
    if a.constant.is_zero() {
        k_part.max(1)
    } else {
        k_part + ratfunc_size(&a.constant)
    }
}

fn kind_weight(f: &Factor) -> usize {
    match f {
        Factor::Linear { .. } | Factor::SqrtPi { .. } | Factor::Factorial { .. } => 1,
        Factor::Power { .. } | Factor::Binomial { .. } => 2,
        Factor::Rising { .. } | Factor::Beta { .. } => 3,
        Factor::Gamma { .. } => 4,
    }
}

fn arguments_size(f: &Factor) -> usize {
    match f {
        Factor::Gamma { arg, .. } | Factor::Linear { arg, .. } | Factor::Factorial { arg, .. } => {
            affine_size(arg)
        }
        Factor::Power { base, exponent } => ratfunc_size(base) + affine_size(exponent),
        Factor::Rising { base, count, .. } => affine_size(base) + affine_size(count),
        Factor::Beta { a, b, .. } => affine_size(a) + affine_size(b),
        Factor::Binomial { top, bottom, .. } => affine_size(top) + affine_size(bottom),
        Factor::SqrtPi { .. } => 0,
    }
}

/// The measure of `coefficient · Π factors`.
pub fn measure(p: &Product) -> Measure {
    let special_factors = p
        .factors
        .iter()
        .filter(|f| f.is_special())
        .map(|f| f.exponent().unsigned_abs() as usize)
        .sum();
    let coefficient = if p.coefficient.is_one() {
        0
    } else {
        ratfunc_size(&p.coefficient)
    };
    let size = coefficient
        + p.factors
            .iter()
            .map(|f| kind_weight(f) + arguments_size(f))
            .sum::<usize>();
    Measure {
        special_factors,
        size,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::Q;

    fn k_plus(n: i64) -> Affine {
        Affine::k_plus(RatFunc::from_integer(n))
    }

    fn product(factors: Vec<Factor>) -> Product {
        Product::of(factors)
    }

    #[test]
    fn fewer_special_factors_win_over_size() {
        // 1/(k(k+1)(k+2)) is longer than Γ(k)/Γ(k+3) but has no special function.
        let linear = product(
            (0..3)
                .map(|n| Factor::Linear {
                    arg: k_plus(n),
                    exponent: -1,
                })
                .collect(),
        );
        let gamma = product(vec![
            Factor::Gamma {
                arg: k_plus(0),
                exponent: 1,
            },
            Factor::Gamma {
                arg: k_plus(3),
                exponent: -1,
            },
        ]);
        assert!(measure(&linear) < measure(&gamma));
    }

    #[test]
    fn factorial_reads_simpler_than_gamma() {
        let gamma = product(vec![Factor::Gamma {
            arg: k_plus(1),
            exponent: -1,
        }]);
        let factorial = product(vec![Factor::Factorial {
            arg: k_plus(0),
            exponent: -1,
        }]);
        assert!(measure(&factorial) < measure(&gamma));
    }

    #[test]
    fn squared_gamma_counts_twice() {
        let p = product(vec![Factor::Gamma {
            arg: Affine::constant(RatFunc::constant(Q::new(1.into(), 3.into()))),
            exponent: -2,
        }]);
        assert_eq!(measure(&p).special_factors, 2);
    }
}
