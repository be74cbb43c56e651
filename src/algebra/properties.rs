//! Property tests: field laws for [`RatFunc`], the defining properties of [`Poly::gcd`] (on
//! small random polynomials in three variables), rational roots and `parse_q` round trips.

use proptest::prelude::*;

use super::{parse_q, q, rational_roots, Monomial, Poly, RatFunc, Q};

const VARIABLES: [&str; 3] = ["x", "y", "z"];

/// Up to four terms, exponents 0..=2 per variable, coefficients n/d with |n| <= 5, d in 1..=3.
fn small_poly() -> impl Strategy<Value = Poly> {
    let term = (-5i64..=5, 1i64..=3, [0u32..=2, 0u32..=2, 0u32..=2]);
    prop::collection::vec(term, 1..=4).prop_map(|terms| {
        Poly::from_terms(terms.into_iter().map(|(n, d, exponents)| {
            let monomial = Monomial::from_factors(VARIABLES.into_iter().zip(exponents));
            (monomial, q(n, d))
        }))
    })
}

fn nonzero_poly() -> impl Strategy<Value = Poly> {
    small_poly().prop_filter("non-zero", |p| !p.is_zero())
}

fn small_ratfunc() -> impl Strategy<Value = RatFunc> {
    (small_poly(), nonzero_poly()).prop_map(|(num, den)| RatFunc::new(num, den).unwrap())
}

fn nonzero_ratfunc() -> impl Strategy<Value = RatFunc> {
    small_ratfunc().prop_filter("non-zero", |r| !r.is_zero())
}

/// Distinct roots n/d with |n| <= 40, d in 1..=12, each with multiplicity 1..=3.
fn root_set() -> impl Strategy<Value = Vec<(Q, u32)>> {
    prop::collection::vec(((-40i64..=40, 1i64..=12), 1u32..=3), 0..=4).prop_map(|raw| {
        let mut roots: Vec<(Q, u32)> = raw.into_iter().map(|((n, d), m)| (q(n, d), m)).collect();
        roots.sort();
        roots.dedup_by(|a, b| a.0 == b.0);
        roots
    })
}

/// Normalised as `Poly::gcd` normalises: primitive, positive leading coefficient.
fn normalised(p: &Poly) -> Poly {
    p.content_and_primitive().1
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    // Field axioms (any algebra text, e.g. Lang, "Algebra", ch. II).
    #[test]
    fn addition_and_multiplication_commute(a in small_ratfunc(), b in small_ratfunc()) {
        prop_assert_eq!(&a + &b, &b + &a);
        prop_assert_eq!(&a * &b, &b * &a);
    }

    #[test]
    fn addition_and_multiplication_associate(
        a in small_ratfunc(), b in small_ratfunc(), c in small_ratfunc()
    ) {
        prop_assert_eq!(&(&a + &b) + &c, &a + &(&b + &c));
        prop_assert_eq!(&(&a * &b) * &c, &a * &(&b * &c));
    }

    #[test]
    fn multiplication_distributes(a in small_ratfunc(), b in small_ratfunc(), c in small_ratfunc()) {
        prop_assert_eq!(&a * &(&b + &c), &(&a * &b) + &(&a * &c));
    }

    #[test]
    fn inverses(a in nonzero_ratfunc(), b in small_ratfunc()) {
        prop_assert_eq!(&a * &a.inv().unwrap(), RatFunc::one());
        prop_assert_eq!(&b.checked_div(&a).unwrap() * &a, b.clone());
        prop_assert_eq!(&(&b - &a) + &a, b.clone());
        prop_assert!((&b - &b).is_zero());
    }

    #[test]
    fn inverse_without_gcd_is_the_canonical_one(a in nonzero_ratfunc()) {
        // `inv` swaps an already coprime numerator and denominator without a gcd; the result
        // must be the same struct as the general constructor's.
        prop_assert_eq!(a.inv(), RatFunc::new(a.denom().clone(), a.numer().clone()));
    }

    #[test]
    fn canonical_form_is_unique(num in small_poly(), den in nonzero_poly(), c in nonzero_poly()) {
        let plain = RatFunc::new(num.clone(), den.clone()).unwrap();
        let inflated = RatFunc::new(&num * &c, &den * &c).unwrap();
        prop_assert_eq!(&plain, &inflated);
        // Canonical form: coprime parts, primitive denominator with positive leading term.
        prop_assert!(Poly::gcd(plain.numer(), plain.denom()).is_one() || plain.is_zero());
        prop_assert_eq!(&normalised(plain.denom()), plain.denom());
    }

    #[test]
    fn gcd_divides_both(a in small_poly(), b in small_poly()) {
        let g = Poly::gcd(&a, &b);
        if a.is_zero() && b.is_zero() {
            prop_assert!(g.is_zero());
        } else {
            prop_assert!(a.div_exact(&g).is_some());
            prop_assert!(b.div_exact(&g).is_some());
            prop_assert_eq!(&normalised(&g), &g);
        }
    }

    #[test]
    fn gcd_of_multiples(a in small_poly(), b in small_poly(), c in nonzero_poly()) {
        let g = Poly::gcd(&(&a * &c), &(&b * &c));
        prop_assert_eq!(g, normalised(&(&Poly::gcd(&a, &b) * &c)));
    }

    #[test]
    fn cofactors_of_gcd_are_coprime(a in nonzero_poly(), b in nonzero_poly()) {
        let g = Poly::gcd(&a, &b);
        let a_rest = a.div_exact(&g).unwrap();
        let b_rest = b.div_exact(&g).unwrap();
        prop_assert!(Poly::gcd(&a_rest, &b_rest).is_one());
    }

    // Rational root theorem round trip: expand lead·(x^2 + x + 1)·Π (x - r)^m and recover
    // the roots; x^2 + x + 1 has negative discriminant, so no rational root (common practice).
    #[test]
    fn rational_roots_round_trip(roots in root_set(), lead_n in 1i64..=9, lead_d in 1i64..=5) {
        let x = Poly::var("x");
        let cofactor = Poly::constant(q(lead_n, lead_d)) * (x.pow(2) + &x + Poly::one());
        let product = roots.iter().fold(cofactor.clone(), |acc, (r, m)| {
            acc * (&x - Poly::constant(r.clone())).pow(*m)
        });
        let (found, rest) = rational_roots(&product.univariate_coeffs("x").unwrap());
        prop_assert_eq!(found, roots);
        prop_assert_eq!(Poly::from_univariate("x", &rest), cofactor);
    }

    #[test]
    fn parse_q_reads_fractions_back(n in -10_000i64..=10_000, d in 1i64..=10_000) {
        let value = q(n, d);
        prop_assert_eq!(parse_q(&value.to_string()), Some(value.clone()));
        prop_assert_eq!(parse_q(&format!("{n}/{d}")), Some(value));
    }
}
