//! Ring operators for [`Poly`]: `+`, `-`, `*` for every owned/borrowed pairing, unary `-`,
//! and the compound assignments.

use std::cmp::Ordering;
use std::ops::{Add, AddAssign, Mul, MulAssign, Neg, Sub, SubAssign};

use num_traits::{One, Zero};

use super::poly::{Poly, TermKey};
use super::rational::{add_assign_q, sub_q, Q};

/// `a + sign·b` by merging the two sorted term lists.
fn merge(a: &Poly, b: &Poly, negate: bool) -> Poly {
    let (x, y) = (&a.terms, &b.terms);
    let mut terms = Vec::with_capacity(x.len() + y.len());
    let (mut i, mut j) = (0, 0);
    let signed = |c: &Q| if negate { -c } else { c.clone() };
    while i < x.len() && j < y.len() {
        match x[i].0.cmp(&y[j].0) {
            Ordering::Less => {
                terms.push(x[i].clone());
                i += 1;
            }
            Ordering::Greater => {
                terms.push((y[j].0.clone(), signed(&y[j].1)));
                j += 1;
            }
            Ordering::Equal => {
                let sum = if negate {
                    sub_q(&x[i].1, &y[j].1)
                } else {
                    let mut sum = x[i].1.clone();
                    add_assign_q(&mut sum, &y[j].1);
                    sum
                };
                if !sum.is_zero() {
                    terms.push((x[i].0.clone(), sum));
                }
                i += 1;
                j += 1;
            }
        }
    }
    terms.extend_from_slice(&x[i..]);
    terms.extend(y[j..].iter().map(|(key, c)| (key.clone(), signed(c))));
    Poly { terms }
}

/// `a·b` for rationals, without the two gcds of the general product when both are integers.
fn mul_q(a: &Q, b: &Q) -> Q {
    if a.denom().is_one() && b.denom().is_one() {
        Q::from_integer(a.numer() * b.numer())
    } else {
        a * b
    }
}

impl Add<&Poly> for &Poly {
    type Output = Poly;
    fn add(self, other: &Poly) -> Poly {
        merge(self, other, false)
    }
}

impl Sub<&Poly> for &Poly {
    type Output = Poly;
    fn sub(self, other: &Poly) -> Poly {
        merge(self, other, true)
    }
}

impl Mul<&Poly> for &Poly {
    type Output = Poly;
    fn mul(self, other: &Poly) -> Poly {
        if self.is_zero() || other.is_zero() {
            return Poly::zero();
        }
        // One side a single term (a constant, a common monomial of the gcd, a power of k):
        // multiplying every monomial by the same one keeps the canonical order (a monomial
        // order), so no sort is needed; by 1, a copy.
        for (single, many) in [(self, other), (other, self)] {
            if single.term_count() == 1 {
                let (m, c) = single.leading_term().expect("one term");
                if m.is_one() && c.is_one() {
                    return many.clone();
                }
                return Poly {
                    terms: many
                        .terms
                        .iter()
                        .map(|(key, x)| (TermKey(key.0.mul(m)), mul_q(x, c)))
                        .collect(),
                };
            }
        }
        let products = self
            .terms()
            .flat_map(|(a, ca)| other.terms().map(move |(b, cb)| (a.mul(b), mul_q(ca, cb))));
        if self.term_count() * other.term_count() > 16 {
            Poly::from_many_terms(products)
        } else {
            Poly::from_terms(products)
        }
    }
}

impl Neg for &Poly {
    type Output = Poly;
    fn neg(self) -> Poly {
        Poly {
            terms: self
                .terms
                .iter()
                .map(|(key, c)| (key.clone(), -c))
                .collect(),
        }
    }
}

impl Neg for Poly {
    type Output = Poly;
    fn neg(self) -> Poly {
        -&self
    }
}

impl AddAssign<&Poly> for Poly {
    fn add_assign(&mut self, other: &Poly) {
        *self = merge(self, other, false);
    }
}

impl SubAssign<&Poly> for Poly {
    fn sub_assign(&mut self, other: &Poly) {
        *self = merge(self, other, true);
    }
}

impl MulAssign<&Poly> for Poly {
    fn mul_assign(&mut self, other: &Poly) {
        *self = &*self * other;
    }
}

/// The owned forms of a binary operator and its assignment, all delegating to `&a op &b`.
macro_rules! owned_forms {
    ($Trait:ident, $method:ident, $AssignTrait:ident, $assign_method:ident) => {
        impl $Trait<Poly> for Poly {
            type Output = Poly;
            fn $method(self, other: Poly) -> Poly {
                (&self).$method(&other)
            }
        }
        impl $Trait<&Poly> for Poly {
            type Output = Poly;
            fn $method(self, other: &Poly) -> Poly {
                (&self).$method(other)
            }
        }
        impl $Trait<Poly> for &Poly {
            type Output = Poly;
            fn $method(self, other: Poly) -> Poly {
                self.$method(&other)
            }
        }
        impl $AssignTrait<Poly> for Poly {
            fn $assign_method(&mut self, other: Poly) {
                self.$assign_method(&other);
            }
        }
    };
}

owned_forms!(Add, add, AddAssign, add_assign);
owned_forms!(Sub, sub, SubAssign, sub_assign);
owned_forms!(Mul, mul, MulAssign, mul_assign);

#[cfg(test)]
mod tests {
    use crate::algebra::rational::q;
    use crate::algebra::Poly;

    fn x() -> Poly {
        Poly::var("x")
    }
    fn y() -> Poly {
        Poly::var("y")
    }

    #[test]
    fn addition_cancels_terms() {
        let p = x() + y();
        assert_eq!(&p - &p, Poly::zero());
        assert_eq!((&p + &(-&p)).term_count(), 0);
        assert_eq!(p.clone() + Poly::zero(), p);
    }

    #[test]
    fn all_operand_forms_agree() {
        let a = x() + Poly::constant(q(1, 2));
        let b = y() - Poly::from_integer(3);
        let expected_sum = &a + &b;
        assert_eq!(a.clone() + b.clone(), expected_sum);
        assert_eq!(a.clone() + &b, expected_sum);
        assert_eq!(&a + b.clone(), expected_sum);
        let expected_product = &a * &b;
        assert_eq!(a.clone() * b.clone(), expected_product);
        assert_eq!(a.clone() * &b, expected_product);
        assert_eq!(&a * b.clone(), expected_product);
        let expected_difference = &a - &b;
        assert_eq!(a.clone() - b.clone(), expected_difference);
        assert_eq!(a.clone() - &b, expected_difference);
        assert_eq!(&a - b.clone(), expected_difference);
        assert_eq!(-a.clone(), Poly::zero() - &a);
    }

    #[test]
    fn compound_assignment() {
        let mut p = x();
        p += y();
        p -= &x();
        assert_eq!(p, y());
        p *= y();
        assert_eq!(p, y().pow(2));
        p *= &Poly::zero();
        assert!(p.is_zero());
    }

    #[test]
    fn product_of_binomials() {
        // (x + y)(x - y) = x^2 - y^2 (difference of squares).
        assert_eq!((x() + y()) * (x() - y()), x().pow(2) - y().pow(2));
        assert_eq!(x() * Poly::zero(), Poly::zero());
        assert_eq!(x() * Poly::one(), x());
    }
}
