//! Real algebraic numbers: a root of a squarefree rational polynomial, isolated in a rational
//! interval by Sturm sequences and refined by bisection (Basu, Pollack, Roy, *Algorithms in
//! Real Algebraic Geometry*, §10.2). Quadratic ones also carry their radical form.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};

use crate::algebra::{univariate_gcd, Q};
use rug::{ops::Pow, Integer as Whole, Rational};
use std::cmp::Ordering;

use crate::numeric::{from_rug_integer, from_rug_rational, rational_to_decimal, to_rug_rational};

use super::ranges::{derivative, evaluate, sturm_chain, trim, Extended};

/// `rational + coefficient·√radicand`, radicand > 1 and free of small square factors.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Radical {
    pub rational: Q,
    pub coefficient: Q,
    pub radicand: BigInt,
}

/// The only root of `poly` in the open interval (`low`, `high`); `poly` is squarefree and has
/// no rational root, so neither end (nor any rational point) is a root.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Algebraic {
    /// Coefficients, `poly[i]` multiplies x^i.
    pub poly: Vec<Q>,
    pub low: Q,
    pub high: Q,
    /// The radical form when `poly` is quadratic.
    pub radical: Option<Radical>,
    /// The value to the digits asked for, correctly rounded.
    pub decimal: String,
}

fn monic(p: Vec<Q>) -> Vec<Q> {
    let p = trim(p);
    match p.last().cloned() {
        Some(lead) => p.into_iter().map(|c| c / &lead).collect(),
        None => p,
    }
}

/// a / b for b dividing a exactly.
pub(super) fn quotient(a: &[Q], b: &[Q]) -> Vec<Q> {
    let mut r = trim(a.to_vec());
    let lead = b.last().expect("non-zero divisor").clone();
    if r.len() < b.len() {
        return Vec::new();
    }
    let mut q = vec![Q::zero(); r.len() - b.len() + 1];
    while r.len() >= b.len() && !r.is_empty() {
        let factor = r.last().unwrap() / &lead;
        let offset = r.len() - b.len();
        for (i, c) in b.iter().enumerate() {
            r[offset + i] -= &factor * c;
        }
        q[offset] = factor;
        r = trim(r);
    }
    trim(q)
}

/// The squarefree part p / gcd(p, p′).
pub fn squarefree(p: &[Q]) -> Vec<Q> {
    let p = trim(p.to_vec());
    if p.len() <= 2 {
        return p;
    }
    // The primitive remainder sequence in GMP integers (`algebra::dense`): Euclid over Q in
    // `num` was a third of the time on conditions with 60-digit coefficients.
    let g = monic(univariate_gcd(&p, &derivative(&p)));
    if g.len() <= 1 {
        p
    } else {
        quotient(&p, &g)
    }
}

/// A rational bound on the absolute value of every root (Cauchy: 1 + max |a_i / a_n|).
fn root_bound(p: &[Q]) -> Q {
    let lead = p.last().expect("non-zero polynomial").abs();
    let max = p[..p.len() - 1]
        .iter()
        .map(|c| c.abs() / &lead)
        .max()
        .unwrap_or_else(Q::zero);
    max + Q::one()
}

/// The roots of `p` (squarefree, without rational roots) strictly between `a` and `b`, each
/// in its own rational interval, in increasing order.
pub fn isolate(p: &[Q], a: &Extended, b: &Extended, digits: u32) -> Vec<Algebraic> {
    if p.len() <= 1 {
        return Vec::new();
    }
    let bound = root_bound(p);
    let finite = |x: &Extended, fallback: Q| match x {
        Extended::Finite(v) => to_rug_rational(v),
        _ => to_rug_rational(&fallback),
    };
    let (low, high) = (finite(a, -bound.clone()), finite(b, bound));
    // The chain in GMP rationals once; each bisection point is counted once and its count
    // kept with the interval (counting converted every coefficient at every point, which was
    // most of the time on conditions with long coefficients).
    let chain: Vec<Vec<Rational>> = sturm_chain(p)
        .iter()
        .map(|q| q.iter().map(to_rug_rational).collect())
        .collect();
    let variations = |x: &Rational| -> usize {
        let signs: Vec<Ordering> = chain
            .iter()
            .map(|q| sign_at(q, x))
            .filter(|s| *s != Ordering::Equal)
            .collect();
        signs.windows(2).filter(|w| w[0] != w[1]).count()
    };
    let mut out = Vec::new();
    let (v_low, v_high) = (variations(&low), variations(&high));
    let mut stack = vec![(low, v_low, high, v_high)];
    while let Some((lo, v_lo, hi, v_hi)) = stack.pop() {
        match v_lo.saturating_sub(v_hi) {
            0 => {}
            1 => out.push(Algebraic::new(
                p.to_vec(),
                from_rug_rational(&lo),
                from_rug_rational(&hi),
                digits,
            )),
            _ => {
                let mid = Rational::from(&lo + &hi) / 2u32;
                let v_mid = variations(&mid);
                stack.push((mid.clone(), v_mid, hi, v_hi));
                stack.push((lo, v_lo, mid, v_mid));
            }
        }
    }
    out.sort_by(|x, y| x.low.cmp(&y.low));
    out
}

fn sign(q: &Q) -> i32 {
    if q.is_zero() {
        0
    } else if q.is_positive() {
        1
    } else {
        -1
    }
}

impl Algebraic {
    fn new(poly: Vec<Q>, low: Q, high: Q, digits: u32) -> Algebraic {
        let mut a = Algebraic {
            poly,
            low,
            high,
            radical: None,
            decimal: String::new(),
        };
        a.radical = a.radical_form();
        if digits > 0 {
            a.decimal = a.decimal_digits(digits);
        }
        a
    }

    /// The same number as a root of `factor`, a squarefree polynomial without rational roots
    /// that changes sign on the isolating interval (a factor of `poly` that vanishes there),
    /// written with coprime integer coefficients and a positive leading one.
    pub fn with_factor(&self, factor: &[Q], digits: u32) -> Algebraic {
        let lead = factor.last().expect("non-zero factor").clone();
        let monic: Vec<Q> = factor.iter().map(|c| c / &lead).collect();
        let lcm = monic
            .iter()
            .fold(BigInt::one(), |acc, c| acc.lcm(c.denom()));
        let integral: Vec<BigInt> = monic
            .iter()
            .map(|c| (c * Q::from_integer(lcm.clone())).to_integer())
            .collect();
        let content = integral
            .iter()
            .fold(BigInt::zero(), |acc, c| acc.gcd(c))
            .max(BigInt::one());
        let poly = integral
            .into_iter()
            .map(|c| Q::from_integer(c / &content))
            .collect();
        Algebraic::new(poly, self.low.clone(), self.high.clone(), digits)
    }

    /// Whether `p` changes sign across the isolating interval.
    pub fn changes_sign(&self, p: &[Q]) -> bool {
        sign(&evaluate(p, &self.low)) * sign(&evaluate(p, &self.high)) < 0
    }

    /// Whether the number is below `q`, leaving `q` outside the closed isolating interval.
    /// One sign of the polynomial at `q` decides; halving then moves the end that `q` became
    /// off it (it terminates because the number is irrational).
    pub fn is_below(&mut self, q: &Q) -> bool {
        let x = to_rug_rational(q);
        let mut b = Bisection::of(self);
        let below = b.cut_at(&x);
        while b.low == x || b.high == x {
            b.halve();
        }
        b.store(self);
        below
    }

    /// ⌊x⌋ (x is irrational, so ⌈x⌉ = ⌊x⌋ + 1), by bisection over the integers between the
    /// ends: one sign per halving of the integer range, so an interval of width 10^500 takes
    /// about 1,700 signs at integers.
    pub fn floor(&mut self) -> BigInt {
        let mut b = Bisection::of(self);
        let mut low = b.low.clone().floor().into_numer_denom().0;
        let mut high = b.high.clone().ceil().into_numer_denom().0;
        // The number lies strictly between `low` and `high`.
        while Whole::from(&high - &low) > 1 {
            let middle = Whole::from(&low + &high) >> 1u32;
            if b.cut_at(&Rational::from(middle.clone())) {
                high = middle;
            } else {
                low = middle;
            }
        }
        b.store(self);
        from_rug_integer(&low)
    }

    /// The value to `digits` significant digits, correctly rounded (`isolate` with
    /// `digits` = 0 leaves it empty).
    pub fn decimal_digits(&self, digits: u32) -> String {
        let mut b = Bisection::of(self);
        // Off zero (the number is irrational), then narrow to a relative width of
        // 10^−(digits+2) before any decimal is formatted.
        while b.low.cmp0() != b.high.cmp0() || b.low.cmp0() == Ordering::Equal {
            b.halve();
        }
        let scale = Rational::from(Whole::from(10).pow(digits + 2));
        loop {
            let width = Rational::from(&b.high - &b.low) * &scale;
            let size = Rational::from(b.low.abs_ref()).min(Rational::from(b.high.abs_ref()));
            if width <= size {
                break;
            }
            b.halve();
        }
        // Both ends rounding alike proves the rounding of the number between them.
        for _ in 0..(4 * digits + 400) {
            let lo = rational_to_decimal(&b.low, digits);
            let hi = rational_to_decimal(&b.high, digits);
            if lo == hi {
                return lo;
            }
            b.halve();
        }
        rational_to_decimal(&(Rational::from(&b.low + &b.high) / 2u32), digits)
    }

    /// For a quadratic a·x² + b·x + c: (−b ± √(b² − 4ac))/(2a) with the square part of the
    /// discriminant taken out (trial division by small primes).
    fn radical_form(&self) -> Option<Radical> {
        if self.poly.len() != 3 {
            return None;
        }
        // Integer coefficients: multiply by the lcm of the denominators.
        let lcm = self
            .poly
            .iter()
            .fold(BigInt::one(), |acc, c| acc.lcm(c.denom()));
        let [c, b, a] =
            [0, 1, 2].map(|i| (&self.poly[i] * Q::from_integer(lcm.clone())).to_integer());
        let discriminant: BigInt = &b * &b - BigInt::from(4) * &a * &c;
        let (square_root, radicand) = split_square(&discriminant);
        let two_a = Q::from_integer(BigInt::from(2) * &a);
        let center = Q::from_integer(-b) / &two_a;
        let spread = (Q::from_integer(square_root) / &two_a).abs();
        let mut probe = self.clone();
        let above = !probe.is_below(&center);
        Some(Radical {
            rational: center,
            coefficient: if above { spread } else { -spread },
            radicand,
        })
    }
}

/// Halves the isolating intervals of two distinct numbers, the wider first, until they are
/// disjoint (roots of coprime polynomials isolated one polynomial at a time may share
/// intervals).
pub fn separate(a: &mut Algebraic, b: &mut Algebraic) {
    let (mut x, mut y) = (Bisection::of(a), Bisection::of(b));
    while x.high >= y.low && y.high >= x.low {
        let x_width = Rational::from(&x.high - &x.low);
        if x_width >= Rational::from(&y.high - &y.low) {
            x.halve();
        } else {
            y.halve();
        }
    }
    x.store(a);
    y.store(b);
}

/// The isolating interval in GMP rationals, for bisection: `num-rational` reduces every sum
/// and product by a gcd, which dominates once the coefficients run to hundreds of digits.
struct Bisection {
    coefficients: Vec<Rational>,
    low: Rational,
    high: Rational,
    low_sign: Ordering,
}

impl Bisection {
    fn of(a: &Algebraic) -> Bisection {
        let coefficients: Vec<Rational> = a.poly.iter().map(to_rug_rational).collect();
        let low = to_rug_rational(&a.low);
        let low_sign = sign_at(&coefficients, &low);
        Bisection {
            coefficients,
            low,
            high: to_rug_rational(&a.high),
            low_sign,
        }
    }

    fn store(self, a: &mut Algebraic) {
        a.low = from_rug_rational(&self.low);
        a.high = from_rug_rational(&self.high);
    }

    /// Whether the number is below `x`; when `x` is inside the interval, it becomes an end.
    fn cut_at(&mut self, x: &Rational) -> bool {
        if *x <= self.low {
            return false;
        }
        if *x >= self.high {
            return true;
        }
        if sign_at(&self.coefficients, x) == self.low_sign {
            self.low = x.clone();
            false
        } else {
            self.high = x.clone();
            true
        }
    }

    fn halve(&mut self) {
        let middle = Rational::from(&self.low + &self.high) / 2u32;
        self.cut_at(&middle);
    }
}

/// The sign of the polynomial at `x` (Horner).
fn sign_at(coefficients: &[Rational], x: &Rational) -> Ordering {
    let mut acc = Rational::new();
    for c in coefficients.iter().rev() {
        acc *= x;
        acc += c;
    }
    acc.cmp0()
}

/// n = s²·m with m free of the square of any prime below 10⁴ (enough for the
/// discriminants met in practice; a larger square left in m only makes the form longer).
fn split_square(n: &BigInt) -> (BigInt, BigInt) {
    let mut m = n.clone();
    let mut s = BigInt::one();
    let mut p = BigInt::from(2);
    let limit = BigInt::from(10_000);
    while p < limit && &p * &p <= m {
        let square = &p * &p;
        while (&m % &square).is_zero() {
            m /= &square;
            s *= &p;
        }
        p += 1;
    }
    (s, m)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    #[test]
    fn the_roots_of_x_squared_minus_two_are_plus_and_minus_root_two() {
        // x² − 2 has the roots ±√2 = ±1.41421356237309504880… (OEIS A002193).
        let p = [q(-2, 1), q(0, 1), q(1, 1)];
        let roots = isolate(&p, &Extended::MinusInfinity, &Extended::PlusInfinity, 20);
        assert_eq!(roots.len(), 2);
        assert_eq!(roots[1].decimal, "1.4142135623730950488");
        assert_eq!(roots[0].decimal, "-1.4142135623730950488");
        let r = roots[1].radical.clone().unwrap();
        assert_eq!(
            (r.rational, r.coefficient, r.radicand),
            (q(0, 1), q(1, 1), 2.into())
        );
        let mut x = roots[1].clone();
        assert_eq!(x.floor(), 1.into());
        assert!(x.is_below(&q(3, 2)) && !x.is_below(&q(7, 5)));
    }

    #[test]
    fn golden_ratio_and_a_cubic() {
        // x² − x − 1: (1 + √5)/2 = 1.6180339887498948482… (OEIS A001622).
        let p = [q(-1, 1), q(-1, 1), q(1, 1)];
        let roots = isolate(&p, &Extended::Finite(q(0, 1)), &Extended::PlusInfinity, 20);
        assert_eq!(roots.len(), 1);
        assert_eq!(roots[0].decimal, "1.6180339887498948482");
        let r = roots[0].radical.clone().unwrap();
        assert_eq!(
            (r.rational, r.coefficient, r.radicand),
            (q(1, 2), q(1, 2), 5.into())
        );
        // x³ − 2x − 5: Wallis's cubic, root 2.0945514815423265915 (Whittaker & Robinson,
        // *The Calculus of Observations*, §44).
        let p = [q(-5, 1), q(-2, 1), q(0, 1), q(1, 1)];
        let roots = isolate(&p, &Extended::MinusInfinity, &Extended::PlusInfinity, 20);
        assert_eq!(roots.len(), 1);
        assert_eq!(roots[0].decimal, "2.0945514815423265915");
        assert!(roots[0].radical.is_none());
    }

    #[test]
    fn floor_of_a_root_just_below_an_interval_end() {
        // √3.9 = 1.9748… isolated in (0, 2): the end 2 never moves, the floor is still 1.
        let p = [q(-39, 10), q(0, 1), q(1, 1)];
        let mut roots = isolate(
            &p,
            &Extended::Finite(q(0, 1)),
            &Extended::Finite(q(2, 1)),
            5,
        );
        assert_eq!(roots[0].decimal, "1.9748");
        assert_eq!(roots[0].floor(), 1.into());
        let p = [q(-41, 10), q(0, 1), q(1, 1)];
        let mut roots = isolate(
            &p,
            &Extended::Finite(q(2, 1)),
            &Extended::Finite(q(3, 1)),
            5,
        );
        assert_eq!(roots[0].floor(), 2.into());
    }

    #[test]
    fn a_root_near_ten_to_the_five_hundred_and_a_fraction_just_below_it() {
        // x² − 2·10^1000 has the root √2·10^500. Its floor is the integer square root of
        // 2·10^1000, which GMP computes independently (rug's `Integer::sqrt`).
        let n = Whole::from(10).pow(1000) * 2u32;
        let p = [Q::from_integer(-from_rug_integer(&n)), q(0, 1), q(1, 1)];
        let roots = isolate(&p, &Extended::Finite(q(0, 1)), &Extended::PlusInfinity, 12);
        assert_eq!(roots.len(), 1);
        assert_eq!(roots[0].decimal, "1.41421356237e500");
        let root = Whole::from(n.sqrt_ref());
        assert_eq!(roots[0].clone().floor(), from_rug_integer(&root));
        // ⌊√2·10^500⌋ / 10^500 lies below √2 by less than 10^−500: one sign decides, and the
        // fraction ends up outside the isolating interval.
        let p = [q(-2, 1), q(0, 1), q(1, 1)];
        let mut root_two =
            isolate(&p, &Extended::Finite(q(0, 1)), &Extended::PlusInfinity, 0).remove(0);
        let close = Q::new(
            from_rug_integer(&root),
            from_rug_integer(&Whole::from(10).pow(500)),
        );
        assert!(!root_two.is_below(&close));
        assert!(root_two.low > close && root_two.high > root_two.low);
        assert!(root_two.is_below(&(close + Q::new(1.into(), 2.into()))));
        assert_eq!(root_two.floor(), 1.into());
    }

    #[test]
    fn squarefree_parts() {
        // (x − 1)²(x + 2) → (x − 1)(x + 2) = x² + x − 2
        let p = [q(2, 1), q(-3, 1), q(0, 1), q(1, 1)];
        assert_eq!(squarefree(&p), vec![q(-2, 1), q(1, 1), q(1, 1)]);
        assert_eq!(split_square(&BigInt::from(72)), (6.into(), 2.into()));
    }
}
