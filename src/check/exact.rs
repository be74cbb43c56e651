//! The exact route: claim(k)/claim(k−1) as a rational function of k and the parameters,
//! compared with the rule's ratio; the claim's value at the base index, exactly where the
//! Gamma functions cancel or land on integers and half-integers.

use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive};

use rug::ops::Pow;
use rug::{Integer, Rational};

use crate::algebra::{from_rug_rational, Poly, RatFunc, Q};
use crate::closed_form::{Affine, Factor};
use crate::ratio::{Orientation, Ratio};

use super::hyper::HyperTerm;

/// Largest integer gap between two Gamma arguments that is cancelled symbolically, and the
/// largest integer argument turned into a factorial.
const MAX_GAP: i64 = 400;
const MAX_FACTORIAL: i64 = 5000;

/// A term written with Gamma functions only: `rational · Π Γ(arg)^e · Π base^exponent · π^(half_pi/2)`.
#[derive(Clone, Debug, Default)]
pub struct GammaForm {
    pub rational: RatFunc,
    pub gammas: Vec<(Affine, i32)>,
    pub powers: Vec<(RatFunc, Affine)>,
    pub half_pi: i32,
}

fn shift(a: &Affine, by: i64) -> Affine {
    a.shifted(&RatFunc::from_integer(by))
}

fn sum(a: &Affine, b: &Affine) -> Affine {
    Affine {
        k_coeff: a.k_coeff + b.k_coeff,
        constant: &a.constant + &b.constant,
    }
}

fn difference(a: &Affine, b: &Affine) -> Affine {
    Affine {
        k_coeff: a.k_coeff - b.k_coeff,
        constant: &a.constant - &b.constant,
    }
}

/// Rewrites every special function through Γ.
pub fn gamma_form(term: &HyperTerm, index: &str) -> GammaForm {
    let mut g = GammaForm {
        rational: term.rational.clone(),
        ..GammaForm::default()
    };
    for f in &term.factors {
        match f {
            Factor::Gamma { arg, exponent } => g.gammas.push((arg.clone(), *exponent)),
            // n! = Γ(n + 1) (DLMF 5.4.1)
            Factor::Factorial { arg, exponent } => g.gammas.push((shift(arg, 1), *exponent)),
            // B(a, b) = Γ(a)Γ(b)/Γ(a + b) (DLMF 5.12.1)
            Factor::Beta { a, b, exponent } => {
                g.gammas.push((a.clone(), *exponent));
                g.gammas.push((b.clone(), *exponent));
                g.gammas.push((sum(a, b), -exponent));
            }
            // binomial(n, m) = Γ(n+1)/(Γ(m+1)Γ(n−m+1)) (DLMF 26.3.1 with 5.4.1)
            Factor::Binomial {
                top,
                bottom,
                exponent,
            } => {
                g.gammas.push((shift(top, 1), *exponent));
                g.gammas.push((shift(bottom, 1), -exponent));
                g.gammas
                    .push((shift(&difference(top, bottom), 1), -exponent));
            }
            // (x)_n = Γ(x + n)/Γ(x) (DLMF 5.2.5)
            Factor::Rising {
                base,
                count,
                exponent,
            } => {
                g.gammas.push((sum(base, count), *exponent));
                g.gammas.push((base.clone(), -exponent));
            }
            Factor::Power { base, exponent } => g.powers.push((base.clone(), exponent.clone())),
            Factor::Linear { arg, exponent } => {
                let linear = affine_ratfunc(arg, index);
                if let Some(p) = linear.pow(*exponent) {
                    g.rational = &g.rational * &p;
                }
            }
            Factor::SqrtPi { half_exponent } => g.half_pi += half_exponent,
        }
    }
    g
}

/// `s·k + c` as a rational function in the variable `index`.
pub fn affine_ratfunc(a: &Affine, index: &str) -> RatFunc {
    &(&RatFunc::var(index) * &RatFunc::from_integer(a.k_coeff)) + &a.constant
}

/// Pochhammer's (x)_n = x(x+1)…(x+n−1) for n ≥ 0 (DLMF 5.2.4).
fn pochhammer(x: &RatFunc, n: i64) -> RatFunc {
    let mut out = RatFunc::one();
    for i in 0..n {
        out = &out * &(x + &RatFunc::from_integer(i));
    }
    out
}

/// claim(k)/claim(k−1) exactly.
pub fn claim_ratio(form: &GammaForm, index: &str) -> Option<RatFunc> {
    let k = RatFunc::var(index);
    let previous = &k - &RatFunc::one();
    let mut ratio = form
        .rational
        .checked_div(&form.rational.substitute(index, &previous)?)?;
    for (arg, e) in &form.gammas {
        let x = affine_ratfunc(arg, index);
        let p = arg.k_coeff;
        // Γ(x)/Γ(x − p) = (x − p)_p for p > 0, and 1/(x)_{−p} for p < 0 (DLMF 5.2.5)
        let step = if p >= 0 {
            pochhammer(&(&x - &RatFunc::from_integer(p)), p)
        } else {
            pochhammer(&x, -p).inv()?
        };
        ratio = &ratio * &step.pow(*e)?;
    }
    for (base, exponent) in &form.powers {
        let step = base.pow(exponent.k_coeff.try_into().ok()?)?;
        ratio = &ratio * &step;
    }
    Some(ratio)
}

/// The rule's R(k) as one rational function.
pub fn rule_ratio(ratio: &Ratio, index: &str) -> RatFunc {
    let k = RatFunc::var(index);
    let mut out = ratio.constant.clone();
    for f in &ratio.factors {
        let linear = match f.orientation {
            Orientation::Rising => &k + &f.shift,
            Orientation::Falling => &f.shift - &k,
        };
        out = &out * &linear.pow(f.exponent).expect("rule factors are non-zero");
    }
    out
}

/// An exact constant: a rational function of the parameters times π^(half_pi/2).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ExactValue {
    pub rational: RatFunc,
    pub half_pi: i32,
}

impl ExactValue {
    pub fn is_one(&self) -> bool {
        self.rational.is_one() && self.half_pi == 0
    }

    pub fn divided_by(&self, other: &RatFunc) -> Option<ExactValue> {
        Some(ExactValue {
            rational: self.rational.checked_div(other)?,
            half_pi: self.half_pi,
        })
    }
}

/// The claim's value at k = b without its base-term factor, when it is an exact constant:
/// Gamma functions whose arguments differ by integers cancel into rising factorials, the rest
/// must land on positive integers or half-integers. `None` when that is not so (the base value
/// is then compared numerically).
pub fn value_at(form: &GammaForm, term: &HyperTerm, b: &BigInt, index: &str) -> Option<ExactValue> {
    if !term.constants.is_empty() {
        return None;
    }
    let at_b = RatFunc::constant(Q::from_integer(b.clone()));
    let mut rational = form.rational.substitute(index, &at_b)?;
    let mut half_pi = form.half_pi;
    let mut gammas: Vec<(RatFunc, i32)> = Vec::new();
    for (arg, e) in &form.gammas {
        let x = affine_ratfunc(arg, index).substitute(index, &at_b)?;
        let gap = gammas.iter().enumerate().find_map(|(i, (y, _))| {
            let d = (&x - y).as_constant()?;
            let d = d.is_integer().then(|| d.to_integer().to_i64())??;
            (d.abs() <= MAX_GAP).then_some((i, d))
        });
        match gap {
            Some((i, d)) => {
                let y = gammas[i].0.clone();
                // Γ(y + d) = (y)_d Γ(y), and Γ(y − d) = Γ(y)/(y − d)_d (DLMF 5.2.5)
                let link = if d >= 0 {
                    pochhammer(&y, d)
                } else {
                    pochhammer(&x, -d).inv()?
                };
                rational = &rational * &link.pow(*e)?;
                gammas[i].1 += e;
            }
            None => gammas.push((x, *e)),
        }
    }
    for (x, e) in gammas.into_iter().filter(|(_, e)| *e != 0) {
        let x = x.as_constant()?;
        let (value, pi) = gamma_exact(&x)?;
        rational = &rational * &RatFunc::constant(value).pow(e)?;
        half_pi += pi * e;
    }
    // Powers of one base are gathered first: (1−p)^(N−k)·(1−p)^(−N) is (1−p)^(−k).
    let mut gathered: Vec<(RatFunc, RatFunc)> = Vec::new();
    for (base, exponent) in &form.powers {
        let n = affine_ratfunc(exponent, index).substitute(index, &at_b)?;
        match gathered.iter_mut().find(|(b, _)| b == base) {
            Some((_, total)) => *total = &*total + &n,
            None => gathered.push((base.clone(), n)),
        }
    }
    for (base, n) in &gathered {
        if base.is_one() || n.is_zero() {
            continue;
        }
        let n = n.as_constant()?;
        if !n.is_integer() || n.abs() > Q::from_integer(MAX_FACTORIAL.into()) {
            return None;
        }
        rational = &rational * &base.pow(n.to_integer().to_i32()?)?;
    }
    Some(ExactValue { rational, half_pi })
}

/// Γ(x) for a positive integer or a half-integer as `rational · √π^pi_half`; `None` at poles
/// and elsewhere.
fn gamma_exact(x: &Q) -> Option<(Q, i32)> {
    let two_x = x * Q::from_integer(2.into());
    if !two_x.is_integer() || x.abs() > Q::from_integer(MAX_FACTORIAL.into()) {
        return None;
    }
    // From Γ(x + 1) = x Γ(x) (DLMF 5.5.1) and Γ(1/2) = √π (DLMF 5.4.6), with GMP's
    // factorials: a product walked in `num` rationals reduced by a gcd at every step, and
    // Γ(3888) took 4 s.
    let factorial = |n: u32| Integer::from(Integer::factorial(n));
    if x.is_integer() {
        if !x.is_positive() {
            return None;
        }
        // Γ(n) = (n − 1)!
        let n = x.to_integer().to_u32()?;
        return Some((from_rug_rational(&Rational::from(factorial(n - 1))), 0));
    }
    let m = x.floor().to_integer().to_i64()?;
    let n = m.unsigned_abs() as u32;
    let four_n = Integer::from(4).pow(n);
    let value = if m >= 0 {
        // Γ(n + 1/2) = (2n)! / (4^n n!) · √π
        Rational::from((factorial(2 * n), four_n * factorial(n)))
    } else {
        // Γ(1/2 − n) = (−4)^n n! / (2n)! · √π
        let sign = if n % 2 == 0 { 1 } else { -1 };
        Rational::from((four_n * factorial(n) * sign, factorial(2 * n)))
    };
    Some((from_rug_rational(&value), 1))
}

/// The coefficient of k^(degree) in a polynomial over the parameters.
fn coefficient(p: &Poly, index: &str, degree: usize) -> Poly {
    p.coeffs_in(index)
        .get(degree)
        .cloned()
        .unwrap_or_else(Poly::zero)
}

/// How claim and truth grow apart, read off q(k) = claim ratio / rule ratio.
#[derive(Clone, Debug, PartialEq)]
pub enum Growth {
    /// q(k) → rate ≠ 1: the claim carries an extra geometric factor rate^k.
    Rate(RatFunc),
    /// q(k) = 1 + δ/k + …: the claim carries an extra k^δ (Π (1 + δ/j) ~ k^δ, DLMF 5.11.12).
    Power(RatFunc),
    /// q(k) grows or decays like k^d: an extra (k!)^d.
    FactorialPower(i64),
    /// q(k) = 1 + O(1/k²): same rate and power, different lower-order terms.
    Subtle,
}

/// Most terms (numerator and denominator) of a quotient whose growth [`growth`] reads.
const MAX_GROWTH_TERMS: usize = 400;

pub fn growth(q_ratio: &RatFunc, index: &str) -> Option<Growth> {
    let (num, den) = (q_ratio.numer(), q_ratio.denom());
    // The rate divides leading coefficients, a multivariate gcd: on a quotient of 1,118 terms
    // in ten names (a fuzz finding) that took 7 s, for a diagnosis only. Past
    // `MAX_GROWTH_TERMS` the growth is left unread.
    if num.term_count() + den.term_count() > MAX_GROWTH_TERMS {
        return None;
    }
    let (dn, dd) = (num.degree_in(index) as i64, den.degree_in(index) as i64);
    if dn != dd {
        return Some(Growth::FactorialPower(dn - dd));
    }
    let d = dn as usize;
    let lead_n = RatFunc::from_poly(coefficient(num, index, d));
    let lead_d = RatFunc::from_poly(coefficient(den, index, d));
    let rate = lead_n.checked_div(&lead_d)?;
    if !rate.is_one() {
        return Some(Growth::Rate(rate));
    }
    if d == 0 {
        return Some(Growth::Subtle);
    }
    let next_n = RatFunc::from_poly(coefficient(num, index, d - 1));
    let next_d = RatFunc::from_poly(coefficient(den, index, d - 1));
    let delta = (&next_n - &next_d).checked_div(&lead_d)?;
    if delta.is_zero() {
        Some(Growth::Subtle)
    } else {
        Some(Growth::Power(delta))
    }
}

/// Whether `ratio`(k) equals `rule`(k + s) as rational functions.
pub fn is_shift_of(ratio: &RatFunc, rule: &RatFunc, s: i64, index: &str) -> bool {
    let moved = &RatFunc::var(index) + &RatFunc::from_integer(s);
    rule.substitute(index, &moved).as_ref() == Some(ratio)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::check::claim::{read_claim, ClaimContext};
    use crate::check::hyper::hypergeometric_term;

    fn form(text: &str, base: i64) -> (GammaForm, HyperTerm) {
        let b = BigInt::from(base);
        let cx = ClaimContext {
            index: "k",
            sequence: "n",
            base_index: &b,
            params: vec!["alpha".into(), "p".into(), "N".into()],
        };
        let t = hypergeometric_term(&read_claim(text, &cx).unwrap(), "k").unwrap();
        (gamma_form(&t, "k"), t)
    }

    fn rf(text: &str) -> RatFunc {
        // A rule's right-hand side read by the model layer, as the reference ratio.
        let p = crate::model::build_problem(text).unwrap();
        rule_ratio(&p.ratio, "k")
    }

    #[test]
    fn beta_claim_has_the_yule_simon_ratio_and_base_value_one() {
        // Yule–Simon: pmf alpha·B(k, alpha+1) (scipy.stats.yulesimon); ratio (k−1)/(k+alpha)
        let (g, t) = form("n(1) * (7/2) * Beta(k, 7/2)", 1);
        assert_eq!(claim_ratio(&g, "k").unwrap(), rf("(k-1)/(k+5/2)"));
        let v = value_at(&g, &t, &BigInt::from(1), "k").unwrap();
        // (7/2)·B(1, 7/2) = (7/2)·Γ(1)Γ(7/2)/Γ(9/2) = (7/2)·(2/7) = 1 (DLMF 5.12.1, 5.5.1)
        assert!(v.is_one(), "{v:?}");
        let (g, t) = form("alpha * Beta(k, alpha + 1)", 1);
        assert_eq!(claim_ratio(&g, "k").unwrap(), rf("(k-1)/(k+alpha)"));
        let v = value_at(&g, &t, &BigInt::from(1), "k").unwrap();
        // alpha·B(1, alpha+1) = alpha/(alpha+1) (DLMF 5.12.1 with 5.5.1)
        assert_eq!(v.rational, rf("alpha/(alpha+1)"));
    }

    #[test]
    fn binomial_and_gamma_forms_give_the_same_ratio() {
        // Binomial pmf C(N,k) p^k (1−p)^(N−k) (scipy.stats.binom): ratio (N−k+1)p/(k(1−p))
        let want = rf("(N-k+1)*p/(k*(1-p))");
        for claim in [
            "binomial(N, k) p^k (1-p)^(N-k)",
            "Gamma(N+1)/(Gamma(k+1) Gamma(N-k+1)) * p^k * (1-p)^(N-k)",
            // juxtaposition binds tighter than `/`, hence the `*`
            "N!/(k! (N-k)!) * (p/(1-p))^k",
        ] {
            let (g, _) = form(claim, 0);
            assert_eq!(claim_ratio(&g, "k").unwrap(), want, "{claim}");
        }
    }

    #[test]
    fn exact_gammas_at_integers_and_half_integers() {
        // Γ(n) = (n − 1)!, Γ(1/2) = √π (DLMF 5.4.1, 5.4.6) and the recurrence Γ(x + 1) =
        // x Γ(x) (DLMF 5.5.1): Γ(5/2) = 3√π/4, Γ(−1/2) = −2√π, Γ(−3/2) = 4√π/3.
        assert_eq!(gamma_exact(&q(1, 1)), Some((q(1, 1), 0)));
        assert_eq!(gamma_exact(&q(5, 1)), Some((q(24, 1), 0)));
        assert_eq!(gamma_exact(&q(1, 2)), Some((q(1, 1), 1)));
        assert_eq!(gamma_exact(&q(5, 2)), Some((q(3, 4), 1)));
        assert_eq!(gamma_exact(&q(-1, 2)), Some((q(-2, 1), 1)));
        assert_eq!(gamma_exact(&q(-3, 2)), Some((q(4, 3), 1)));
        assert_eq!(gamma_exact(&q(0, 1)), None);
        assert_eq!(gamma_exact(&q(-2, 1)), None);
        assert_eq!(gamma_exact(&q(1, 3)), None);
        // 3887! (the fuzz claim finding, 4 s before): 12,267 digits (Python's
        // math.lgamma(3888)/ln 10 = 12266.92) and 970 trailing zeros (Legendre's formula:
        // 777 + 155 + 31 + 6 + 1).
        let (big, half) = gamma_exact(&q(3888, 1)).unwrap();
        let digits = big.numer().to_string();
        let zeros = digits.len() - digits.trim_end_matches('0').len();
        assert_eq!((digits.len(), zeros, half), (12_267, 970, 0));
        // Γ(n + 1/2)/Γ(n − 1/2) = n − 1/2 at n = 2000.
        let ratio = gamma_exact(&q(4001, 2)).unwrap().0 / gamma_exact(&q(3999, 2)).unwrap().0;
        assert_eq!(ratio, q(3999, 2));
    }

    #[test]
    fn half_integer_gammas_leave_square_roots_of_pi() {
        // Γ(5/2) = 3√π/4 (DLMF 5.4.6)
        assert_eq!(gamma_exact(&q(5, 2)), Some((q(3, 4), 1)));
        // Γ(−1/2) = −2√π (DLMF 5.5.1 from Γ(1/2) = √π)
        assert_eq!(gamma_exact(&q(-1, 2)), Some((q(-2, 1), 1)));
        assert_eq!(gamma_exact(&q(5, 1)), Some((q(24, 1), 0)));
        assert_eq!(gamma_exact(&q(0, 1)), None);
        assert_eq!(gamma_exact(&q(1, 3)), None);
    }

    #[test]
    fn growth_reads_rate_and_power() {
        let k = RatFunc::var("k");
        // q = 2(k+1)/k: rate 2
        let q1 = (&(&k + &RatFunc::one()) * &RatFunc::from_integer(2))
            .checked_div(&k)
            .unwrap();
        assert_eq!(
            growth(&q1, "k"),
            Some(Growth::Rate(RatFunc::from_integer(2)))
        );
        // q = (k+3)/(k+1) = 1 + 2/k + …: power 2 (the claim has an extra k^2)
        let q2 = (&k + &RatFunc::from_integer(3))
            .checked_div(&(&k + &RatFunc::one()))
            .unwrap();
        assert_eq!(
            growth(&q2, "k"),
            Some(Growth::Power(RatFunc::from_integer(2)))
        );
    }
}
