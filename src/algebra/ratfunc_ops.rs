//! Field operators for [`RatFunc`]: `+`, `-`, `*` for every owned/borrowed pairing, unary
//! `-`, and the compound assignments. Division is [`RatFunc::checked_div`] only, so that a
//! zero divisor is a value the caller must handle rather than a panic.

use std::ops::{Add, AddAssign, Mul, MulAssign, Neg, Sub, SubAssign};

use super::poly::Poly;
use super::ratfunc::RatFunc;

/// The operators below cancel every common factor themselves, so only the content of the
/// denominator is left to normalise.
fn canonical(num: Poly, den: Poly) -> RatFunc {
    RatFunc::from_coprime(num, den)
}

/// Division by a gcd, which always divides.
fn exact(p: &Poly, divisor: &Poly) -> Poly {
    p.div_exact(divisor).expect("a gcd divides its arguments")
}

impl Add<&RatFunc> for &RatFunc {
    type Output = RatFunc;
    fn add(self, other: &RatFunc) -> RatFunc {
        // Henrici's sum (Knuth, TAOCP vol. 2, §4.5.1): with g = gcd(b, d),
        // a/b + c/d = (a·(d/g) + c·(b/g)) / ((b/g)·d), and since a/b, c/d are reduced, only
        // gcd(numerator, g) can cancel, so the big gcd is never taken.
        let (a, b, c, d) = (self.numer(), self.denom(), other.numer(), other.denom());
        // Fast paths with the same result as the general one below.
        if self.is_zero() {
            return other.clone();
        }
        if other.is_zero() {
            return self.clone();
        }
        if b.is_one() && d.is_one() {
            // A sum of polynomials is canonical over the denominator 1.
            return RatFunc::from_poly(a + c);
        }
        if b == d {
            // g = b: only gcd(a + c, b) can cancel.
            let num = a + c;
            let h = Poly::gcd(&num, b);
            return canonical(exact(&num, &h), exact(b, &h));
        }
        if b.is_one() || d.is_one() {
            // a + c/d = (a·d + c)/d with gcd(a·d + c, d) = gcd(c, d) = 1, and d is already
            // primitive with a positive leading coefficient.
            let (p, n, den) = if b.is_one() { (a, c, d) } else { (c, a, b) };
            return canonical(p * den + n, den.clone());
        }
        let g = Poly::gcd(b, d);
        let b_rest = exact(b, &g);
        let d_rest = exact(d, &g);
        let num = a * &d_rest + c * &b_rest;
        let h = Poly::gcd(&num, &g);
        canonical(exact(&num, &h), &b_rest * &exact(d, &h))
    }
}

impl Sub<&RatFunc> for &RatFunc {
    type Output = RatFunc;
    fn sub(self, other: &RatFunc) -> RatFunc {
        self + &(-other)
    }
}

impl Mul<&RatFunc> for &RatFunc {
    type Output = RatFunc;
    fn mul(self, other: &RatFunc) -> RatFunc {
        // Cross-cancel before multiplying (Knuth, TAOCP vol. 2, §4.5.1): with both factors
        // reduced, (a/b)(c/d) = ((a/g1)(c/g2)) / ((b/g2)(d/g1)) for g1 = gcd(a, d),
        // g2 = gcd(c, b) is reduced as well.
        let (a, b, c, d) = (self.numer(), self.denom(), other.numer(), other.denom());
        if self.is_zero() || other.is_zero() {
            return RatFunc::zero();
        }
        if b.is_one() && d.is_one() {
            // A product of polynomials is canonical over the denominator 1.
            return RatFunc::from_poly(a * c);
        }
        let g1 = Poly::gcd(a, d);
        let g2 = Poly::gcd(c, b);
        canonical(
            &exact(a, &g1) * &exact(c, &g2),
            &exact(b, &g2) * &exact(d, &g1),
        )
    }
}

impl Neg for &RatFunc {
    type Output = RatFunc;
    fn neg(self) -> RatFunc {
        // Negating the numerator keeps the canonical form.
        canonical(-self.numer(), self.denom().clone())
    }
}

impl Neg for RatFunc {
    type Output = RatFunc;
    fn neg(self) -> RatFunc {
        -&self
    }
}

/// The owned forms of a binary operator and all assignment forms, delegating to `&a op &b`.
macro_rules! owned_forms {
    ($Trait:ident, $method:ident, $AssignTrait:ident, $assign_method:ident) => {
        impl $Trait<RatFunc> for RatFunc {
            type Output = RatFunc;
            fn $method(self, other: RatFunc) -> RatFunc {
                (&self).$method(&other)
            }
        }
        impl $Trait<&RatFunc> for RatFunc {
            type Output = RatFunc;
            fn $method(self, other: &RatFunc) -> RatFunc {
                (&self).$method(other)
            }
        }
        impl $Trait<RatFunc> for &RatFunc {
            type Output = RatFunc;
            fn $method(self, other: RatFunc) -> RatFunc {
                self.$method(&other)
            }
        }
        impl $AssignTrait<&RatFunc> for RatFunc {
            fn $assign_method(&mut self, other: &RatFunc) {
                *self = (&*self).$method(other);
            }
        }
        impl $AssignTrait<RatFunc> for RatFunc {
            fn $assign_method(&mut self, other: RatFunc) {
                *self = (&*self).$method(&other);
            }
        }
    };
}

owned_forms!(Add, add, AddAssign, add_assign);
owned_forms!(Sub, sub, SubAssign, sub_assign);
owned_forms!(Mul, mul, MulAssign, mul_assign);

#[cfg(test)]
mod tests {
    use std::collections::BTreeMap;

    use crate::algebra::rational::q;
    use crate::algebra::{EvalError, Poly, RatFunc, Q};

    fn v(name: &str) -> RatFunc {
        RatFunc::var(name)
    }
    fn c(n: i64) -> RatFunc {
        RatFunc::from_integer(n)
    }
    fn p(name: &str) -> Poly {
        Poly::var(name)
    }
    fn frac(num: Poly, den: Poly) -> RatFunc {
        RatFunc::new(num, den).unwrap()
    }

    #[test]
    fn numeric_differences_over_a_shared_denominator() {
        // By hand: (x + y + 3)/(2x + y) − (−x + 2)/(2x + y) = (2x + y + 1)/(2x + y), not a
        // number; (5x + 3y)/(2x + y) − (x + y)/(2x + y) = 2; and a difference of 0.
        let (x, y) = (p("x"), p("y"));
        let den = &(&x * &Poly::from_integer(2)) + &y;
        let a = frac(&(&x + &y) + &Poly::from_integer(3), den.clone());
        let b = frac(&Poly::from_integer(2) - &x, den.clone());
        assert_eq!(a.difference_if_number(&b), None);
        let five_x_three_y = &(&x * &Poly::from_integer(5)) + &(&y * &Poly::from_integer(3));
        let d = frac(five_x_three_y, den.clone());
        let e = frac(&x + &y, den.clone());
        assert_eq!(d.difference_if_number(&e), Some(q(2, 1)));
        assert_eq!(e.difference_if_number(&d), Some(q(-2, 1)));
        assert_eq!(d.difference_if_number(&d), Some(q(0, 1)));
        // Each agrees with the difference formed and reduced.
        for (f, g) in [(&a, &b), (&d, &e), (&e, &d)] {
            assert_eq!(f.difference_if_number(g), (f - g).as_constant());
        }
    }

    #[test]
    fn sum_is_canonical() {
        // 1 + 1/(1 - rho) = (2 - rho)/(1 - rho)
        let rho = p("rho");
        let one_minus = Poly::one() - &rho;
        let lhs = c(1) + frac(Poly::one(), one_minus.clone());
        let rhs = frac(Poly::from_integer(2) - &rho, one_minus);
        assert_eq!(lhs, rhs);
        // The denominator is normalised to a positive leading coefficient.
        assert_eq!(lhs.denom(), &(&rho - Poly::one()));
        assert_eq!(lhs.numer(), &(&rho - Poly::from_integer(2)));
        assert_eq!(lhs.to_string(), "(rho - 2)/(rho - 1)");
    }

    #[test]
    fn new_cancels_and_moves_content() {
        let (x, y) = (p("x"), p("y"));
        let r = frac((&x + &y) * &x, (&x + &y).scale(&q(-2, 3)));
        assert_eq!(r.numer(), &x.scale(&q(-3, 2)));
        assert_eq!(r.denom(), &Poly::one());
        assert_eq!(r.as_poly(), Some(x.scale(&q(-3, 2))));
        assert_eq!(RatFunc::new(x.clone(), Poly::zero()), None);
        assert_eq!(RatFunc::new(Poly::zero(), x.clone()), Some(RatFunc::zero()));
        assert_eq!(RatFunc::zero().denom(), &Poly::one());
        let half_over_x = frac(Poly::one(), x.scale(&q(2, 1)));
        assert_eq!(half_over_x.numer(), &Poly::constant(q(1, 2)));
        assert_eq!(half_over_x.denom(), &x);
        assert_eq!(half_over_x.as_poly(), None);
    }

    #[test]
    fn constants_and_queries() {
        assert!(RatFunc::zero().is_zero());
        assert!(RatFunc::one().is_one());
        assert_eq!(RatFunc::constant(q(3, 4)).as_constant(), Some(q(3, 4)));
        assert_eq!(RatFunc::from_integer(-2).as_constant(), Some(q(-2, 1)));
        assert_eq!(v("x").as_constant(), None);
        assert_eq!(c(1).checked_div(&v("x")).unwrap().as_constant(), None);
        let r = v("alpha").checked_div(&(v("k") + c(1))).unwrap();
        let vars: Vec<_> = r.variables().into_iter().collect();
        assert_eq!(vars, vec!["alpha", "k"]);
        assert!(r.contains_var("k"));
        assert!(!r.contains_var("rho"));
        assert_eq!(RatFunc::from_poly(p("x")), v("x"));
        assert!(!v("x").is_one());
    }

    #[test]
    fn inverse_and_division() {
        let x = v("x");
        assert_eq!(RatFunc::zero().inv(), None);
        assert_eq!(x.checked_div(&RatFunc::zero()), None);
        let r = (&x + c(1)).checked_div(&(&x - c(1))).unwrap();
        assert_eq!(
            r.inv().unwrap(),
            (&x - c(1)).checked_div(&(&x + c(1))).unwrap()
        );
        assert_eq!(&r * &r.inv().unwrap(), RatFunc::one());
        assert_eq!(c(-2).inv(), Some(RatFunc::constant(q(-1, 2))));
    }

    #[test]
    fn integer_powers() {
        let x = v("x");
        let r = c(2).checked_div(&(&x + c(1))).unwrap();
        assert_eq!(r.pow(0), Some(RatFunc::one()));
        assert_eq!(r.pow(2).unwrap(), &r * &r);
        assert_eq!(
            r.pow(-2).unwrap(),
            (&(&x + c(1)) * &(&x + c(1))).checked_div(&c(4)).unwrap()
        );
        assert_eq!(RatFunc::zero().pow(-1), None);
        assert_eq!(RatFunc::zero().pow(0), Some(RatFunc::one()));
        assert_eq!(RatFunc::zero().pow(3), Some(RatFunc::zero()));
        // The canonical form survives powers: (-x)^(-1) = -1/x, with positive denominator.
        let minus_inverse = (-&x).pow(-1).unwrap();
        assert_eq!(minus_inverse.denom(), &p("x"));
        assert_eq!(minus_inverse.numer(), &Poly::from_integer(-1));
    }

    #[test]
    fn unbound_is_reported_by_name_before_division_by_zero() {
        let r = v("z").checked_div(&(v("a") - c(1))).unwrap();
        let mut values: BTreeMap<String, Q> = BTreeMap::new();
        assert_eq!(r.eval(&values), Err(EvalError::Unbound("a".into())));
        values.insert("a".into(), q(1, 1));
        assert_eq!(r.eval(&values), Err(EvalError::Unbound("z".into())));
        values.insert("z".into(), q(1, 1));
        assert_eq!(r.eval(&values), Err(EvalError::DivisionByZero));
        let (num, den) = r.into_parts();
        assert_eq!((num, den), (p("z"), p("a") - Poly::one()));
    }

    #[test]
    fn evaluation() {
        let (x, y) = (v("x"), v("y"));
        let r = (&x + &y).checked_div(&(&x - c(1))).unwrap();
        let mut values: BTreeMap<String, Q> = BTreeMap::new();
        values.insert("x".into(), q(3, 1));
        assert_eq!(r.eval(&values), Err(EvalError::Unbound("y".into())));
        assert_eq!(
            r.eval_partial(&values),
            Ok((&y + c(3)).checked_div(&c(2)).unwrap())
        );
        values.insert("y".into(), q(1, 2));
        assert_eq!(r.eval(&values), Ok(q(7, 4)));
        values.insert("x".into(), q(1, 1));
        assert_eq!(r.eval(&values), Err(EvalError::DivisionByZero));
        assert_eq!(r.eval_partial(&values), Err(EvalError::DivisionByZero));
    }

    #[test]
    fn substitution() {
        let (x, y) = (v("x"), v("y"));
        // x/(x + 1) with x := 1/y gives 1/(1 + y).
        let r = x.checked_div(&(&x + c(1))).unwrap();
        let by = c(1).checked_div(&y).unwrap();
        assert_eq!(r.substitute("x", &by), c(1).checked_div(&(&y + c(1))));
        // 1/(x - 1) with x := 1 has an identically zero denominator.
        let pole = c(1).checked_div(&(&x - c(1))).unwrap();
        assert_eq!(pole.substitute("x", &c(1)), None);
        assert_eq!(pole.substitute("z", &c(1)), Some(pole.clone()));
        assert_eq!(r.substitute("x", &RatFunc::zero()), Some(RatFunc::zero()));
    }

    #[test]
    fn operand_forms_and_assignment() {
        let a = v("x").checked_div(&v("y")).unwrap();
        let b = c(1) - v("y");
        let sum = &a + &b;
        assert_eq!(a.clone() + b.clone(), sum);
        assert_eq!(a.clone() + &b, sum);
        assert_eq!(&a + b.clone(), sum);
        assert_eq!(&sum - &b, a);
        assert_eq!(sum.clone() - b.clone(), a);
        assert_eq!(-(-a.clone()), a);
        let mut acc = a.clone();
        acc += &b;
        acc -= b.clone();
        acc *= c(2);
        acc *= &c(1);
        assert_eq!(acc, &a + &a);
    }

    #[test]
    fn residues_add_like_the_functions_and_tell_unequal_ones_apart() {
        use crate::algebra::Residue;
        // Evaluation at a point modulo a prime is a ring homomorphism where the denominators
        // do not vanish (common practice): the residue of a + b is the sum of the residues, so
        // a pair whose residues do not add up cannot sum to the target.
        let (x, y) = (v("x"), v("y"));
        let over = |a: &RatFunc, b: &RatFunc| a.checked_div(b).unwrap();
        let values = [
            c(3),
            RatFunc::constant(q(1, 2)),
            &x + c(1),
            &x + c(2),
            &(&x * &y) + c(1),
            over(&c(1), &(&x - c(1))),
            over(&(&x + &y), &(&y + c(2))),
            over(&RatFunc::constant(q(7, 3)), &(&(&x * &x) + &y)),
        ];
        for a in &values {
            for b in &values {
                let sum = a + b;
                let residues = RatFunc::residues(&[a, b, &sum]);
                let [Some(ra), Some(rb), Some(rs)] = residues[..] else {
                    panic!("no denominator vanishes at the point: {a}, {b}");
                };
                assert_eq!(ra + rb, rs, "{a} + {b}");
                let other = &sum + &c(1);
                let shifted = RatFunc::residues(&[a, b, &other]);
                assert_ne!(
                    shifted[0].unwrap() + shifted[1].unwrap(),
                    shifted[2].unwrap(),
                    "{a} + {b} against {other}"
                );
                assert_eq!(
                    shifted[2].unwrap(),
                    shifted[0].unwrap() + shifted[1].unwrap() + Residue::from_integer(1)
                );
            }
        }
    }

    #[test]
    fn difference_if_number_agrees_with_subtraction() {
        let (x, y) = (v("x"), v("y"));
        let over = |a: &RatFunc, b: &RatFunc| a.checked_div(b).unwrap();
        let values = [
            c(3),
            c(0),
            RatFunc::constant(q(1, 2)),
            &x + c(1),
            &x + RatFunc::constant(q(5, 2)),
            &x - c(1),
            &(&x + &y) + c(4),
            &x * &y,
            &(&x * &y) + c(1),
            over(&c(1), &(&x - c(1))),
            over(&x, &(&x - c(1))),
            over(&(&x + &y), &(&x - c(1))),
            over(&c(1), &(&y + c(2))),
        ];
        for a in &values {
            for b in &values {
                let expected = (a - b).as_constant();
                assert_eq!(a.difference_if_number(b), expected, "{a} − {b}");
            }
        }
    }

    #[test]
    fn sums_and_products_take_the_short_paths_to_the_same_forms() {
        // Each short path (zero, both denominators 1, equal denominators, one denominator 1)
        // against the value it must equal, built another way.
        let (x, y) = (v("x"), v("y"));
        let over = |a: &RatFunc, b: &RatFunc| a.checked_div(b).unwrap();
        let d = &x - c(1);
        assert_eq!(&RatFunc::zero() + &over(&y, &d), over(&y, &d));
        assert_eq!(&over(&y, &d) + &RatFunc::zero(), over(&y, &d));
        // x/(x − 1) + (−1)/(x − 1) = 1: the common factor cancels.
        assert_eq!(&over(&x, &d) + &over(&c(-1), &d), c(1));
        // y/(x − 1) + 2y/(x − 1) = 3y/(x − 1)
        assert_eq!(
            &over(&y, &d) + &over(&(c(2) * &y), &d),
            over(&(c(3) * &y), &d)
        );
        // y + 1/(x − 1) = (xy − y + 1)/(x − 1)
        let expected = frac(
            Poly::var("x") * Poly::var("y") - Poly::var("y") + Poly::one(),
            Poly::var("x") - Poly::one(),
        );
        assert_eq!(&y + &over(&c(1), &d), expected);
        assert_eq!(&over(&c(1), &d) + &y, expected);
        assert_eq!(&(&x + &y) * &(&x - &y), &(&x * &x) - &(&y * &y));
        assert_eq!(&RatFunc::zero() * &over(&y, &d), RatFunc::zero());
    }

    #[test]
    fn display() {
        assert_eq!(RatFunc::zero().to_string(), "0");
        assert_eq!(v("x").to_string(), "x");
        assert_eq!(c(1).checked_div(&v("x")).unwrap().to_string(), "1/x");
        assert_eq!(
            c(1).checked_div(&(c(2) * v("x"))).unwrap().to_string(),
            "(1/2)/x"
        );
        assert_eq!(
            v("y")
                .checked_div(&(v("x").pow(2).unwrap() + c(1)))
                .unwrap()
                .to_string(),
            "y/(x^2 + 1)"
        );
        assert_eq!(
            c(1).checked_div(&(v("x") * v("y"))).unwrap().to_string(),
            "1/(x*y)"
        );
    }
}
