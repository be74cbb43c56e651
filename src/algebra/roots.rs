//! Rational roots of univariate polynomials with rational coefficients.
//!
//! After clearing denominators, a root `u/v` in lowest terms of a primitive integer
//! polynomial has `v` dividing the leading coefficient `L` (rational root theorem), so `L·r`
//! is an integer for every rational root `r`. Rather than enumerate divisors of the constant
//! term (which needs factoring and can blow up), Sturm sequences locate the real roots of the
//! square-free part, bisection narrows each to an interval shorter than `1/L`, and the single
//! multiple of `1/L` inside, if any, is checked exactly.

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};

use num_integer::Integer;

use super::dense::{
    derivative, divide, gcd, integer_primitive, sign_at, sign_at_fraction, trimmed,
};
use super::rational::Q;

/// Rational roots of `Σ coeffs[i] x^i`, each with its multiplicity, ascending by root, and the
/// cofactor left after dividing them out (no rational roots; its leading coefficient is the
/// input's), so that `poly = cofactor · Π (x - r)^m` exactly. Trailing zero coefficients are
/// ignored; the zero polynomial gives no roots and an empty cofactor.
pub fn rational_roots(coeffs: &[Q]) -> (Vec<(Q, u32)>, Vec<Q>) {
    let poly = trimmed(coeffs.to_vec());
    if poly.len() <= 1 {
        return (Vec::new(), poly);
    }
    let candidates = divisor_search(&poly).unwrap_or_else(|| {
        // p / gcd(p, p') keeps each distinct root once (characteristic 0; Geddes, Czapor,
        // Labahn, "Algorithms for Computer Algebra", ch. 8).
        let square_free = integer_primitive(&divide(&poly, &gcd(&poly, &derivative(&poly))).0);
        let mut found = Vec::new();
        search_roots(&square_free, &mut found);
        found
    });

    let mut cofactor = poly;
    let mut roots = Vec::with_capacity(candidates.len());
    for root in candidates {
        let mut multiplicity = 0;
        while let Some(quotient) = divide_by_linear(&cofactor, &root) {
            cofactor = quotient;
            multiplicity += 1;
        }
        roots.push((root, multiplicity));
    }
    (roots, cofactor)
}

/// The divisor search below runs only when the end coefficients are at most this big...
const SMALL_END_COEFFICIENT: u64 = 1 << 20;
/// ...and the candidates u/v number at most this many; otherwise the Sturm search runs.
const MAX_DIVISOR_CANDIDATES: usize = 512;

/// The distinct rational roots, ascending, by the rational root theorem when that is cheap:
/// with integer coefficients a_j..a_n (a_j the lowest non-zero one), a non-zero root u/v in
/// lowest terms has u | a_j and v | a_n, and x = 0 is a root exactly when j > 0. Each
/// candidate is checked exactly in integers: Σ a_i u^(i−j) v^(n−i) = 0. `None` when the end
/// coefficients are large or have many divisors (the Sturm search then decides); the answer
/// is the same set either way.
fn divisor_search(poly: &[Q]) -> Option<Vec<Q>> {
    let ints: Vec<BigInt> = integer_primitive(poly)
        .iter()
        .map(|c| c.to_integer())
        .collect();
    let low = ints.iter().position(|c| !c.is_zero())?;
    let reduced = &ints[low..];
    let small = |c: &BigInt| {
        c.magnitude()
            .to_u64()
            .filter(|&m| m <= SMALL_END_COEFFICIENT)
    };
    let trailing = small(&reduced[0])?;
    let lead = small(reduced.last().expect("non-zero"))?;
    let (numerators, denominators) = (divisors(trailing), divisors(lead));
    if 2 * numerators.len() * denominators.len() > MAX_DIVISOR_CANDIDATES {
        return None;
    }
    let mut roots = Vec::new();
    if low > 0 {
        roots.push(Q::zero());
    }
    let degree = reduced.len() - 1;
    for &u in &numerators {
        for &v in &denominators {
            if num_integer::gcd(u, v) != 1 {
                continue;
            }
            for sign in [1i64, -1] {
                let (u, v) = (BigInt::from(u) * sign, BigInt::from(v));
                // Σ a_i u^i v^(d−i) by Horner's scheme from the top, the powers of v rising
                // as the powers of u fall.
                let mut value = reduced[degree].clone();
                let mut v_power = BigInt::one();
                for a in reduced[..degree].iter().rev() {
                    v_power *= &v;
                    value = value * &u + a * &v_power;
                }
                if value.is_zero() {
                    roots.push(Q::new(u, v));
                }
            }
        }
    }
    roots.sort();
    Some(roots)
}

/// The positive divisors of `n > 0`, by trial division up to √n.
fn divisors(n: u64) -> Vec<u64> {
    let mut small = Vec::new();
    let mut large = Vec::new();
    let mut d = 1;
    while d * d <= n {
        if n % d == 0 {
            small.push(d);
            if d * d != n {
                large.push(n / d);
            }
        }
        d += 1;
    }
    small.extend(large.into_iter().rev());
    small
}

/// Finds the rational roots of a square-free primitive integer polynomial, ascending.
fn search_roots(square_free: &[Q], out: &mut Vec<Q>) {
    let chain = sturm_chain(square_free);
    let lead = square_free.last().expect("non-constant").abs().to_integer();
    let bound = cauchy_bound(square_free)
        .to_integer()
        .min(fujiwara_bound(square_free));
    let mut search = RootSearch {
        poly: square_free,
        chain: &chain,
        lead: &lead,
        out,
    };
    if let Some(roots) = low_degree_roots(square_free) {
        search.out.extend(roots);
        return;
    }
    let (low, high) = (Dyadic::integer(-bound.clone()), Dyadic::integer(bound));
    let (v_low, v_high) = (search.variations(&low), search.variations(&high));
    search.bisect(low, v_low, high, v_high);
}

/// The rational roots of a square-free integer polynomial of degree 1 or 2, ascending, in
/// closed form: −b/a, or (−b ± √D)/(2a) when the discriminant D = b² − 4ac is a perfect
/// square (no rational root otherwise). The bisection would need as many levels as the
/// roots have bits: ρ = 1/909^1000 took 19,000 levels.
fn low_degree_roots(poly: &[Q]) -> Option<Vec<Q>> {
    match poly {
        [b, a] => Some(vec![-b / a]),
        [c, b, a] => {
            let (a, b, c) = (a.to_integer(), b.to_integer(), c.to_integer());
            let discriminant: BigInt = &b * &b - BigInt::from(4) * &a * &c;
            if discriminant.is_negative() {
                return Some(Vec::new());
            }
            let root = discriminant.sqrt();
            if &root * &root != discriminant {
                return Some(Vec::new());
            }
            let two_a = Q::from_integer(BigInt::from(2) * &a);
            let mut roots = vec![
                Q::from_integer(-&b - &root) / &two_a,
                Q::from_integer(-&b + &root) / &two_a,
            ];
            roots.sort();
            roots.dedup();
            Some(roots)
        }
        _ => None,
    }
}

/// `num / 2^exp`: the bisection's points, kept as integers so that no step normalises a
/// rational (the midpoints of a deep search have long denominators, and a polynomial with
/// large coefficients needs a deep search).
#[derive(Clone, Debug)]
struct Dyadic {
    num: BigInt,
    exp: u32,
}

impl Dyadic {
    fn integer(n: BigInt) -> Self {
        Dyadic { num: n, exp: 0 }
    }

    fn denominator(&self) -> BigInt {
        BigInt::one() << self.exp
    }

    /// The numerator over 2^exp, for exp ≥ self.exp.
    fn over(&self, exp: u32) -> BigInt {
        &self.num << (exp - self.exp)
    }

    fn midpoint(&self, other: &Dyadic) -> Dyadic {
        let exp = self.exp.max(other.exp);
        let mut mid = Dyadic {
            num: self.over(exp) + other.over(exp),
            exp: exp + 1,
        };
        // Keep the fraction short: drop common factors of 2.
        let twos = mid.num.trailing_zeros().unwrap_or(0).min(mid.exp as u64) as u32;
        mid.num >>= twos;
        mid.exp -= twos;
        mid
    }
}

struct RootSearch<'a> {
    poly: &'a [Q],
    chain: &'a [Vec<Q>],
    /// |leading coefficient|, an integer: every rational root is a multiple of 1/lead.
    lead: &'a BigInt,
    out: &'a mut Vec<Q>,
}

impl RootSearch<'_> {
    /// Sign changes of the Sturm chain at `x`, zeros skipped. For a square-free polynomial,
    /// `V(a) - V(b)` counts its distinct real roots in `(a, b]` (Sturm's theorem; Basu,
    /// Pollack, Roy, "Algorithms in Real Algebraic Geometry", ch. 2). The half-open form holds
    /// because V is right-continuous at a root of a square-free polynomial.
    fn variations(&self, x: &Dyadic) -> usize {
        let denominator = x.denominator();
        let signs = self
            .chain
            .iter()
            .map(|p| sign_at_fraction(p, &x.num, &denominator))
            .filter(|&sign| sign != 0)
            .collect::<Vec<_>>();
        signs.windows(2).filter(|pair| pair[0] != pair[1]).count()
    }

    /// Looks for rational roots in `(low, high]`, given the chain's variations at both ends,
    /// and appends them in ascending order. The intervals wait on a stack rather than in
    /// recursive calls: a root near 10^−3000 is 20,000 halvings deep.
    fn bisect(&mut self, low: Dyadic, v_low: usize, high: Dyadic, v_high: usize) {
        let mut pending = vec![(low, v_low, high, v_high)];
        while let Some((low, v_low, high, v_high)) = pending.pop() {
            if v_low == v_high {
                continue;
            }
            // Every rational root is a multiple of 1/L; an interval shorter than 1/L holds
            // at most one such multiple, namely floor(L·high)/L if it exceeds low.
            let scaled_high = (self.lead * &high.num).div_floor(&high.denominator());
            // floor(L·high) ≤ L·low, both sides over 2^low.exp.
            if (&scaled_high << low.exp) <= self.lead * &low.num {
                continue;
            }
            let exp = low.exp.max(high.exp);
            if (high.over(exp) - low.over(exp)) * self.lead < (BigInt::one() << exp) {
                let candidate = Q::new(scaled_high, self.lead.clone());
                if sign_at(self.poly, &candidate) == 0 {
                    self.out.push(candidate);
                }
                continue;
            }
            let middle = low.midpoint(&high);
            let v_middle = self.variations(&middle);
            // The upper half waits below the lower one, so roots come out ascending.
            pending.push((middle.clone(), v_middle, high, v_high));
            pending.push((low, v_low, middle, v_middle));
        }
    }
}

/// An integer strictly above every |root|: 1 + max |a_i / a_n| bounds them (Cauchy's root
/// bound; Basu, Pollack, Roy, "Algorithms in Real Algebraic Geometry", ch. 10).
fn cauchy_bound(p: &[Q]) -> Q {
    let lead = p.last().expect("non-zero");
    let largest = p[..p.len() - 1]
        .iter()
        .map(|a| (a / lead).abs())
        .max()
        .unwrap_or_else(Q::zero);
    largest.floor() + Q::from_integer(BigInt::from(2))
}

/// A power of two strictly above every |root| of an integer polynomial, from Fujiwara's bound
/// |z| ≤ 2·max_i |a_(n−i)/a_n|^(1/i) (M. Fujiwara, Tôhoku Math. J. 10, 1916; the last term
/// there is |a_0/(2a_n)|^(1/n), smaller than the one used here). With b(a) the bit length,
/// |a_(n−i)/a_n| < 2^(b(a_(n−i)) − b(a_n) + 1), so each term is below 2^e with
/// e = max_i ⌈(b(a_(n−i)) − b(a_n) + 1)/i⌉ and every root below 2^(e+1). Cauchy's bound grows
/// like the largest ratio itself: for (x + 10^38)^40 − 1 it is 10^1520, where this one is
/// about 2^137, and the bisection's depth follows the bound's bit length.
fn fujiwara_bound(p: &[Q]) -> BigInt {
    let n = p.len() - 1;
    let bits = |a: &Q| a.numer().bits();
    let lead = bits(&p[n]);
    let e = (1..=n)
        .filter(|&i| !p[n - i].is_zero())
        .map(|i| {
            (bits(&p[n - i]) + 1)
                .saturating_sub(lead)
                .div_ceil(i as u64)
        })
        .max()
        .unwrap_or(0);
    BigInt::one() << (e + 1)
}

/// `p, p', -rem(p, p'), ...` until the remainder vanishes (Sturm's sequence). Each member is
/// rescaled by a positive constant, which keeps the signs and the numbers small.
fn sturm_chain(p: &[Q]) -> Vec<Vec<Q>> {
    let mut chain = vec![p.to_vec(), integer_primitive(&derivative(p))];
    loop {
        let n = chain.len();
        let remainder = divide(&chain[n - 2], &chain[n - 1]).1;
        if remainder.is_empty() {
            return chain;
        }
        let negated: Vec<Q> = remainder.iter().map(|a| -a).collect();
        chain.push(integer_primitive(&negated));
    }
}

/// `p / (x - root)` when the division is exact (synthetic division).
fn divide_by_linear(p: &[Q], root: &Q) -> Option<Vec<Q>> {
    if p.len() <= 1 {
        return None;
    }
    let mut quotient = vec![Q::zero(); p.len() - 1];
    let mut carry = Q::zero();
    for i in (1..p.len()).rev() {
        carry = &carry * root + &p[i];
        quotient[i - 1] = carry.clone();
    }
    (&carry * root + &p[0]).is_zero().then_some(quotient)
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use crate::algebra::rational::q;

    fn ints(coeffs: &[i64]) -> Vec<Q> {
        coeffs.iter().map(|&n| q(n, 1)).collect()
    }

    /// Expands `lead · Π (x - r)^m` into ascending coefficients.
    fn expand(lead: Q, roots: &[(Q, u32)]) -> Vec<Q> {
        let mut p = vec![lead];
        for (r, m) in roots {
            for _ in 0..*m {
                let mut next = vec![Q::zero(); p.len() + 1];
                for (i, a) in p.iter().enumerate() {
                    next[i + 1] += a;
                    next[i] -= a * r;
                }
                p = next;
            }
        }
        p
    }

    /// The Sturm search alone, as `rational_roots` ran it before the divisor search.
    fn sturm_roots(poly: &[Q]) -> Vec<Q> {
        let square_free = integer_primitive(&divide(poly, &gcd(poly, &derivative(poly))).0);
        let mut found = Vec::new();
        search_roots(&square_free, &mut found);
        found
    }

    /// The Sturm bisection alone, without the closed form for low degrees.
    fn bisection_roots(poly: &[Q]) -> Vec<Q> {
        let square_free = integer_primitive(&divide(poly, &gcd(poly, &derivative(poly))).0);
        let chain = sturm_chain(&square_free);
        let lead = square_free.last().unwrap().abs().to_integer();
        let bound = cauchy_bound(&square_free).to_integer();
        let mut found = Vec::new();
        let mut search = RootSearch {
            poly: &square_free,
            chain: &chain,
            lead: &lead,
            out: &mut found,
        };
        let (low, high) = (Dyadic::integer(-bound.clone()), Dyadic::integer(bound));
        let (v_low, v_high) = (search.variations(&low), search.variations(&high));
        search.bisect(low, v_low, high, v_high);
        found
    }

    #[test]
    fn low_degrees_in_closed_form_agree_with_the_bisection() {
        // By construction: (7x − 3)(x + 5/2), (x − 10^30 − 1)(3x + 1), 4x² − 9 = (2x − 3)(2x + 3),
        // x² − 2 and x² + x + 1 (no rational roots), 12x − 5.
        let big = q(1, 1) + Q::from_integer(num_traits::pow(BigInt::from(10), 30));
        let cases = [
            multiply(&ints(&[-3, 7]), &[q(5, 2), q(1, 1)]),
            multiply(&[-big, q(1, 1)], &ints(&[1, 3])),
            ints(&[-9, 0, 4]),
            ints(&[-2, 0, 1]),
            ints(&[1, 1, 1]),
            ints(&[-5, 12]),
        ];
        for poly in cases {
            let square_free = integer_primitive(&poly);
            assert_eq!(
                low_degree_roots(&square_free).unwrap(),
                bisection_roots(&poly),
                "{poly:?}"
            );
        }
        // ρ = ±1/909^1000: 19,000 halvings deep for the bisection, at once in closed form.
        let c = Q::from_integer(num_traits::pow(BigInt::from(909), 1000));
        let (roots, cofactor) = rational_roots(&[q(-1, 1), q(0, 1), &c * &c]);
        assert_eq!(roots, vec![(-c.recip(), 1), (c.recip(), 1)]);
        assert_eq!(cofactor.len(), 1);
    }

    #[test]
    fn roots_far_from_zero_are_found_within_fujiwaras_bound() {
        // (x + 10^38 − 1)(x + 10^38 + 1)(x − 3)(2x + 1)·(x² + 1), by construction (common
        // practice): the Sturm search starts from Fujiwara's bound, about 2^128 here, where
        // Cauchy's is about 10^76; every rational root must still be found.
        let big = Q::from_integer(BigInt::from(10u32).pow(38));
        let one = q(1, 1);
        let roots = [
            (-(&big - &one), 1),
            (-(&big + &one), 1),
            (q(3, 1), 1),
            (q(-1, 2), 1),
        ];
        let mut p = expand(q(2, 1), &roots);
        // times x² + 1
        let mut with_quadratic = vec![Q::zero(); p.len() + 2];
        for (i, a) in p.iter().enumerate() {
            with_quadratic[i] += a;
            with_quadratic[i + 2] += a;
        }
        p = with_quadratic;
        let bound = fujiwara_bound(&integer_primitive(&p));
        assert!(Q::from_integer(bound.clone()) > &big + &one);
        assert!(bound < BigInt::one() << 140u32, "{bound}");
        let mut expected: Vec<Q> = roots.iter().map(|(r, _)| r.clone()).collect();
        expected.sort();
        assert_eq!(sturm_roots(&p), expected);
    }

    #[test]
    fn divisor_search_finds_what_the_sturm_search_finds() {
        // Products of linear factors (repeated, zero, fractional roots) with irreducible
        // quadratics and constants, against the Sturm search.
        let linear: Vec<Vec<Q>> = [(0, 1), (1, 1), (-2, 1), (1, 3), (-5, 2), (7, 4), (1, 2)]
            .iter()
            .map(|&(n, d)| vec![q(-n, d), q(1, 1)])
            .collect();
        let others = [
            ints(&[1, 0, 1]),
            ints(&[-2, 0, 1]),
            ints(&[3]),
            ints(&[1, 1, 1]),
        ];
        let multiply = |a: &[Q], b: &[Q]| {
            let mut out = vec![Q::zero(); a.len() + b.len() - 1];
            for (i, x) in a.iter().enumerate() {
                for (j, y) in b.iter().enumerate() {
                    out[i + j] += x * y;
                }
            }
            out
        };
        let mut checked = 0;
        for (i, a) in linear.iter().enumerate() {
            for (j, b) in linear.iter().enumerate().skip(i) {
                for (l, other) in others.iter().enumerate() {
                    let mut p = multiply(&multiply(a, b), other);
                    if (i + j + l) % 3 == 0 {
                        p = multiply(&p, &linear[(i + l) % linear.len()]);
                    }
                    let p: Vec<Q> = p.iter().map(|c| c * q(3, 7)).collect();
                    let found = divisor_search(&p).expect("small coefficients");
                    assert_eq!(found, sturm_roots(&trimmed(p.clone())), "{p:?}");
                    checked += 1;
                }
            }
        }
        assert!(checked > 100);
        // Large end coefficients leave the decision to the Sturm search.
        assert_eq!(divisor_search(&ints(&[1 << 40, 1])), None);
    }

    #[test]
    fn three_simple_roots() {
        // 6x^3 - 11x^2 + 6x - 1 = (3x - 1)(2x - 1)(x - 1)
        let (roots, cofactor) = rational_roots(&ints(&[-1, 6, -11, 6]));
        assert_eq!(roots, vec![(q(1, 3), 1), (q(1, 2), 1), (q(1, 1), 1)]);
        assert_eq!(cofactor, ints(&[6]));
    }

    #[test]
    fn no_rational_roots() {
        let (roots, cofactor) = rational_roots(&ints(&[1, 0, 1]));
        assert!(roots.is_empty());
        assert_eq!(cofactor, ints(&[1, 0, 1]));
        // x^2 - 2: real roots, both irrational.
        let (roots, cofactor) = rational_roots(&ints(&[-2, 0, 1]));
        assert!(roots.is_empty());
        assert_eq!(cofactor, ints(&[-2, 0, 1]));
    }

    #[test]
    fn repeated_root() {
        // (x - 2)^2 (x + 1/2) = x^3 - 7/2 x^2 + 2x + 2
        let p = vec![q(2, 1), q(2, 1), q(-7, 2), q(1, 1)];
        let (roots, cofactor) = rational_roots(&p);
        assert_eq!(roots, vec![(q(-1, 2), 1), (q(2, 1), 2)]);
        assert_eq!(cofactor, ints(&[1]));
    }

    #[test]
    fn zero_root_and_irreducible_cofactor() {
        // x^2 (x - 3/4) (x^2 + x + 1) · 5
        let mut p = expand(q(5, 1), &[(Q::zero(), 2), (q(3, 4), 1)]);
        p = multiply(&p, &ints(&[1, 1, 1]));
        let (roots, cofactor) = rational_roots(&p);
        assert_eq!(roots, vec![(Q::zero(), 2), (q(3, 4), 1)]);
        assert_eq!(cofactor, ints(&[5, 5, 5]));
    }

    #[test]
    fn degenerate_inputs() {
        assert_eq!(rational_roots(&[]), (vec![], vec![]));
        assert_eq!(rational_roots(&ints(&[0, 0])), (vec![], vec![]));
        assert_eq!(rational_roots(&ints(&[7, 0])), (vec![], ints(&[7])));
        // Linear: 2x + 3 has the root -3/2; the cofactor is the leading coefficient.
        assert_eq!(
            rational_roots(&ints(&[3, 2])),
            (vec![(q(-3, 2), 1)], ints(&[2]))
        );
    }

    #[test]
    fn large_coefficients_without_factoring() {
        // Roots 1234567891/1000 and -987654321/1024: divisor enumeration of the constant
        // term would be slow; the search only needs the leading coefficient.
        let roots = vec![(q(-987_654_321, 1024), 1), (q(1_234_567_891, 1000), 3)];
        let p = multiply(&expand(q(3, 7), &roots), &ints(&[3, 0, 1]));
        let (found, cofactor) = rational_roots(&p);
        assert_eq!(found, roots);
        assert_eq!(cofactor, vec![q(9, 7), Q::zero(), q(3, 7)]);
    }

    #[test]
    fn close_roots_are_separated() {
        let roots = vec![(q(1, 1000), 1), (q(1, 999), 2), (q(1, 998), 1)];
        let (found, cofactor) = rational_roots(&expand(q(-1, 1), &roots));
        assert_eq!(found, roots);
        assert_eq!(cofactor, ints(&[-1]));
    }

    pub(crate) fn multiply(a: &[Q], b: &[Q]) -> Vec<Q> {
        let mut out = vec![Q::zero(); a.len() + b.len() - 1];
        for (i, x) in a.iter().enumerate() {
            for (j, y) in b.iter().enumerate() {
                out[i + j] += x * y;
            }
        }
        out
    }
}
