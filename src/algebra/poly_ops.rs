//! Ring operators for [`Poly`]: `+`, `-`, `*` for every owned/borrowed pairing, unary `-`,
//! and the compound assignments.

use std::ops::{Add, AddAssign, Mul, MulAssign, Neg, Sub, SubAssign};

use super::poly::Poly;

impl Add<&Poly> for &Poly {
    type Output = Poly;
    fn add(self, other: &Poly) -> Poly {
        let mut sum = self.clone();
        sum += other;
        sum
    }
}

impl Sub<&Poly> for &Poly {
    type Output = Poly;
    fn sub(self, other: &Poly) -> Poly {
        let mut difference = self.clone();
        difference -= other;
        difference
    }
}

impl Mul<&Poly> for &Poly {
    type Output = Poly;
    fn mul(self, other: &Poly) -> Poly {
        let mut product = Poly::zero();
        for (a, ca) in self.terms() {
            for (b, cb) in other.terms() {
                product.add_term(a.mul(b), ca * cb);
            }
        }
        product
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
        for (m, c) in other.terms() {
            self.add_term(m.clone(), c.clone());
        }
    }
}

impl SubAssign<&Poly> for Poly {
    fn sub_assign(&mut self, other: &Poly) {
        for (m, c) in other.terms() {
            self.add_term(m.clone(), -c);
        }
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
