//! Deciding conditions from the declared parameter ranges.
//!
//! One parameter on an interval: a rational function `f = N/D` of it is continuous and
//! monotone between consecutive breakpoints (the interval's ends, the poles of `f`, the zeros
//! of `f'`), so its image is a union of intervals whose ends are one-sided limits, computed
//! exactly (Taylor shift at a finite point, leading terms at infinity). Zeros are located
//! exactly: rational ones by [`rational_roots`], irrational ones only counted, by Sturm's
//! theorem (Basu, Pollack, Roy, *Algorithms in Real Algebraic Geometry*, Thm. 2.50); when an
//! irrational breakpoint lies inside the interval the question is left undecided rather than
//! guessed. Several free parameters: decided only when interval arithmetic over the box of
//! ranges proves a sign ([`super::box_sign`]).

use std::cmp::Ordering;
use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, Zero};

use crate::algebra::{from_rug_rational, rational_roots, to_rug_rational, RatFunc, Q};
use crate::model::{Param, Problem};

use super::box_sign::{box_sign, BoxSign};

/// A point of the extended real line.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Extended {
    MinusInfinity,
    Finite(Q),
    PlusInfinity,
}

impl PartialOrd for Extended {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Extended {
    fn cmp(&self, other: &Self) -> Ordering {
        use Extended::*;
        match (self, other) {
            (Finite(a), Finite(b)) => a.cmp(b),
            (MinusInfinity, MinusInfinity) | (PlusInfinity, PlusInfinity) => Ordering::Equal,
            (MinusInfinity, _) | (_, PlusInfinity) => Ordering::Less,
            (PlusInfinity, _) | (_, MinusInfinity) => Ordering::Greater,
        }
    }
}

/// An interval of the real line with each end included or not (infinite ends never are).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Interval {
    pub low: Extended,
    pub low_included: bool,
    pub high: Extended,
    pub high_included: bool,
}

impl Interval {
    /// The declared range of a parameter.
    pub fn of_param(p: &Param) -> Interval {
        let (low, low_included) = match &p.lower {
            Some((q, closed)) => (Extended::Finite(q.clone()), *closed),
            None => (Extended::MinusInfinity, false),
        };
        let (high, high_included) = match &p.upper {
            Some((q, closed)) => (Extended::Finite(q.clone()), *closed),
            None => (Extended::PlusInfinity, false),
        };
        Interval {
            low,
            low_included,
            high,
            high_included,
        }
    }

    pub fn is_everything(&self) -> bool {
        self.low == Extended::MinusInfinity && self.high == Extended::PlusInfinity
    }

    pub fn contains(&self, x: &Q) -> bool {
        let x = Extended::Finite(x.clone());
        let above = match x.cmp(&self.low) {
            Ordering::Greater => true,
            Ordering::Equal => self.low_included,
            Ordering::Less => false,
        };
        let below = match x.cmp(&self.high) {
            Ordering::Less => true,
            Ordering::Equal => self.high_included,
            Ordering::Greater => false,
        };
        above && below
    }

    /// Whether some integer ≥ `min` lies in the interval.
    pub fn has_integer_at_least(&self, min: &BigInt) -> bool {
        let mut candidate = Q::from_integer(min.clone());
        if let Extended::Finite(low) = &self.low {
            let mut first = low.ceil();
            if first == *low && !self.low_included {
                first += Q::one();
            }
            candidate = candidate.max(first);
        }
        self.contains(&candidate)
    }
}

/// What the ranges say about a question.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Verdict {
    /// True for every admissible value.
    Always,
    /// False for every admissible value.
    Never,
    /// True for some admissible values and false for others.
    Sometimes,
    /// Not decided; the string says why.
    Open(String),
}

// ---- dense univariate polynomials, `p[i]` multiplies x^i ----

pub(super) fn trim(mut p: Vec<Q>) -> Vec<Q> {
    while p.last().is_some_and(Zero::is_zero) {
        p.pop();
    }
    p
}

/// p(x) by Horner's scheme, in GMP: the Sturm chains of high-degree conditions carry
/// coefficients of hundreds of digits, and `num`'s binary gcd at every step took 10 s to
/// isolate the roots of a degree-20 rate (a fuzz finding).
pub(super) fn evaluate(p: &[Q], x: &Q) -> Q {
    let x = to_rug_rational(x);
    let mut acc = rug::Rational::new();
    for a in p.iter().rev() {
        acc *= &x;
        acc += to_rug_rational(a);
    }
    from_rug_rational(&acc)
}

pub(super) fn derivative(p: &[Q]) -> Vec<Q> {
    p.iter()
        .enumerate()
        .skip(1)
        .map(|(i, a)| a * Q::from_integer(BigInt::from(i)))
        .collect()
}

pub(super) fn multiply(a: &[Q], b: &[Q]) -> Vec<Q> {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![Q::zero(); a.len() + b.len() - 1];
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j] += x * y;
        }
    }
    trim(out)
}

fn subtract(a: &[Q], b: &[Q]) -> Vec<Q> {
    let mut out = vec![Q::zero(); a.len().max(b.len())];
    for (i, x) in a.iter().enumerate() {
        out[i] += x;
    }
    for (i, y) in b.iter().enumerate() {
        out[i] -= y;
    }
    trim(out)
}

pub(super) fn remainder(a: &[Q], b: &[Q]) -> Vec<Q> {
    let mut r = trim(a.to_vec());
    let lead = b.last().expect("non-zero divisor").clone();
    while r.len() >= b.len() && !r.is_empty() {
        let factor = r.last().unwrap() / &lead;
        let offset = r.len() - b.len();
        for (i, c) in b.iter().enumerate() {
            r[offset + i] -= &factor * c;
        }
        r = trim(r);
    }
    r
}

fn sign_at_infinity(p: &[Q], positive: bool) -> i32 {
    let Some(lead) = p.last() else { return 0 };
    let s = if lead.is_positive() { 1 } else { -1 };
    if !positive && (p.len() - 1) % 2 == 1 {
        -s
    } else {
        s
    }
}

fn sign_at(p: &[Q], x: &Extended) -> i32 {
    match x {
        Extended::MinusInfinity => sign_at_infinity(p, false),
        Extended::PlusInfinity => sign_at_infinity(p, true),
        Extended::Finite(v) => {
            let value = evaluate(p, v);
            if value.is_zero() {
                0
            } else if value.is_positive() {
                1
            } else {
                -1
            }
        }
    }
}

/// Sign changes along the Sturm chain at `x` (zeros skipped).
fn variations(chain: &[Vec<Q>], x: &Extended) -> usize {
    let signs: Vec<i32> = chain
        .iter()
        .map(|p| sign_at(p, x))
        .filter(|s| *s != 0)
        .collect();
    signs.windows(2).filter(|w| w[0] != w[1]).count()
}

/// Distinct real roots of `p` strictly between `a` and `b`, neither of which is a root
/// (Sturm's theorem).
pub(super) fn count_roots_between(p: &[Q], a: &Extended, b: &Extended) -> usize {
    if p.len() <= 1 {
        return 0;
    }
    count_with_chain(&sturm_chain(p), a, b)
}

/// The Sturm chain p, p′, −rem(p, p′), … (built once for repeated counts).
pub(super) fn sturm_chain(p: &[Q]) -> Vec<Vec<Q>> {
    let mut chain = vec![p.to_vec(), derivative(p)];
    while chain.last().is_some_and(|q| q.len() > 1) {
        let n = chain.len();
        let r = remainder(&chain[n - 2], &chain[n - 1]);
        if r.is_empty() {
            break;
        }
        // A positive factor changes no sign: −r / |lead(r)| keeps the numbers small.
        let scale = r.last().expect("non-empty remainder").abs();
        chain.push(r.into_iter().map(|c| -c / &scale).collect());
    }
    chain
}

/// Distinct real roots strictly between `a` and `b` (neither a root), from a Sturm chain.
pub(super) fn count_with_chain(chain: &[Vec<Q>], a: &Extended, b: &Extended) -> usize {
    variations(chain, a).saturating_sub(variations(chain, b))
}

/// The real roots of `p` strictly inside the interval's ends, when all of them are rational.
fn interior_roots(p: &[Q], interval: &Interval) -> Result<Vec<Q>, String> {
    let (roots, cofactor) = rational_roots(p);
    if count_roots_between(&cofactor, &interval.low, &interval.high) > 0 {
        return Err("an irrational breakpoint lies inside the range".into());
    }
    Ok(roots
        .into_iter()
        .map(|(r, _)| r)
        .filter(|r| {
            let x = Extended::Finite(r.clone());
            x > interval.low && x < interval.high
        })
        .collect())
}

/// Coefficients of p(x0 + t) in t (Taylor shift).
fn taylor_shift(p: &[Q], x0: &Q) -> Vec<Q> {
    let mut out = p.to_vec();
    // Repeated synthetic division by (x − x0): Horner's scheme for the shift.
    let n = out.len();
    for i in 0..n {
        for j in (i..n.saturating_sub(1)).rev() {
            let carry = &out[j + 1] * x0;
            out[j] += carry;
        }
    }
    out
}

/// The limit of N/D at a finite point from the right (`from_right`) or the left.
fn one_sided_limit(num: &[Q], den: &[Q], x0: &Q, from_right: bool) -> Extended {
    let n = taylor_shift(num, x0);
    let d = taylor_shift(den, x0);
    let order = |p: &[Q]| p.iter().position(|c| !c.is_zero()).unwrap_or(usize::MAX);
    let (i, j) = (order(&n), order(&d));
    if i == usize::MAX {
        return Extended::Finite(Q::zero());
    }
    match i.cmp(&j) {
        Ordering::Greater => Extended::Finite(Q::zero()),
        Ordering::Equal => Extended::Finite(&n[i] / &d[j]),
        Ordering::Less => {
            let mut positive = (&n[i] / &d[j]).is_positive();
            if !from_right && (j - i) % 2 == 1 {
                positive = !positive;
            }
            if positive {
                Extended::PlusInfinity
            } else {
                Extended::MinusInfinity
            }
        }
    }
}

fn limit_at_infinity(num: &[Q], den: &[Q], positive: bool) -> Extended {
    let (dn, dd) = (num.len() as i64 - 1, den.len() as i64 - 1);
    if num.is_empty() || dn < dd {
        return Extended::Finite(Q::zero());
    }
    let ratio = num.last().unwrap() / den.last().unwrap();
    if dn == dd {
        return Extended::Finite(ratio);
    }
    let mut up = ratio.is_positive();
    if !positive && (dn - dd) % 2 == 1 {
        up = !up;
    }
    if up {
        Extended::PlusInfinity
    } else {
        Extended::MinusInfinity
    }
}

/// The image of `N/D` over `interval`, as intervals.
fn image(num: &[Q], den: &[Q], interval: &Interval) -> Result<Vec<Interval>, String> {
    let poles = interior_roots(den, interval)?;
    let slope = subtract(
        &multiply(&derivative(num), den),
        &multiply(num, &derivative(den)),
    );
    let critical = interior_roots(&slope, interval)?;
    let mut breaks: Vec<Q> = poles.iter().chain(critical.iter()).cloned().collect();
    breaks.sort();
    breaks.dedup();
    let mut points = vec![interval.low.clone()];
    points.extend(breaks.iter().cloned().map(Extended::Finite));
    points.push(interval.high.clone());
    let value_at = |x: &Q| -> Option<Q> {
        let d = evaluate(den, x);
        (!d.is_zero()).then(|| evaluate(num, x) / d)
    };
    let mut out = Vec::new();
    for (position, pair) in points.windows(2).enumerate() {
        let (a, b) = (&pair[0], &pair[1]);
        let left = match a {
            Extended::Finite(x) => one_sided_limit(num, den, x, true),
            _ => limit_at_infinity(num, den, false),
        };
        let right = match b {
            Extended::Finite(x) => one_sided_limit(num, den, x, false),
            _ => limit_at_infinity(num, den, true),
        };
        // An end's value belongs to the image when f is defined there and the point is in the
        // interval: interior critical points always, the interval's own ends when included.
        let included = |x: &Extended, is_interval_end: bool, end_included: bool| match x {
            Extended::Finite(v) => {
                (!is_interval_end || end_included) && value_at(v).is_some() && !poles.contains(v)
            }
            _ => false,
        };
        let first = position == 0;
        let last = position + 2 == points.len();
        let left_in = included(a, first, interval.low_included);
        let right_in = included(b, last, interval.high_included);
        let (low, low_included, high, high_included) = if left <= right {
            (left, left_in, right, right_in)
        } else {
            (right, right_in, left, left_in)
        };
        out.push(Interval {
            low,
            low_included,
            high,
            high_included,
        });
    }
    Ok(out)
}

/// `expr` as a univariate rational function of its one free parameter, with that parameter's
/// range, after substituting known values. `Err` says why it is not decided.
fn univariate<'a>(
    expr: &RatFunc,
    problem: &'a Problem,
    values: &BTreeMap<String, Q>,
) -> Result<(Vec<Q>, Vec<Q>, &'a Param), String> {
    let expr = expr
        .eval_partial(values)
        .map_err(|_| "the values divide by zero".to_string())?;
    let variables = expr.variables();
    if variables.len() != 1 {
        return Err("it depends on several parameters: not decided from the ranges".into());
    }
    let name = variables.into_iter().next().unwrap();
    let param = problem
        .param(&name)
        .ok_or_else(|| format!("{name} has no declared range"))?;
    let num = expr.numer().univariate_coeffs(&name).unwrap_or_default();
    let den = expr.denom().univariate_coeffs(&name).unwrap_or_default();
    Ok((trim(num), trim(den), param))
}

/// Whether `expr` takes an integer value ≥ `min` somewhere on the declared range.
pub fn takes_integer_at_least(
    expr: &RatFunc,
    min: &BigInt,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) -> Verdict {
    let (num, den, param) = match univariate(expr, problem, values) {
        Ok(parts) => parts,
        Err(why) => {
            // Several parameters: below `min` on the whole box of ranges means never.
            let below = expr
                .eval_partial(values)
                .ok()
                .map(|e| &RatFunc::constant(Q::from_integer(min.clone())) - &e)
                .and_then(|gap| box_sign(&gap, &problem.params));
            return match below {
                Some(BoxSign::Positive) => Verdict::Never,
                _ => Verdict::Open(why),
            };
        }
    };
    let interval = Interval::of_param(param);
    if interval.is_everything() && !param.integer {
        return Verdict::Open(format!("{} has no declared range", param.name));
    }
    let pieces = match image(&num, &den, &interval) {
        Ok(p) => p,
        Err(why) => return Verdict::Open(why),
    };
    if !pieces.iter().any(|piece| piece.has_integer_at_least(min)) {
        return Verdict::Never;
    }
    // Every admissible value hits such an integer only for an integer-valued polynomial whose
    // smallest value on the range is already ≥ min.
    let integer_valued =
        param.integer && den.len() == 1 && den[0].is_one() && num.iter().all(Q::is_integer);
    let everywhere = pieces.iter().all(|piece| match &piece.low {
        Extended::Finite(low) => *low >= Q::from_integer(min.clone()),
        _ => false,
    });
    if integer_valued && everywhere {
        Verdict::Always
    } else {
        Verdict::Sometimes
    }
}

/// Most integers listed by [`integers_reached`].
const MAX_INTEGERS_REACHED: usize = 20;

/// The integers ≥ `min` that `expr` (one free parameter) takes on the declared range, when
/// its image is bounded above so that they are few; `None` otherwise.
pub fn integers_reached(
    expr: &RatFunc,
    min: &BigInt,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) -> Option<Vec<BigInt>> {
    let (num, den, param) = univariate(expr, problem, values).ok()?;
    let pieces = image(&num, &den, &Interval::of_param(param)).ok()?;
    let mut out: Vec<BigInt> = Vec::new();
    for piece in pieces {
        let Extended::Finite(high) = &piece.high else {
            if piece.has_integer_at_least(min) {
                return None;
            }
            continue;
        };
        let mut m = min.clone();
        while Q::from_integer(m.clone()) <= *high {
            if piece.contains(&Q::from_integer(m.clone())) && !out.contains(&m) {
                out.push(m.clone());
                if out.len() > MAX_INTEGERS_REACHED {
                    return None;
                }
            }
            m += 1;
        }
    }
    out.sort();
    Some(out)
}

/// Whether `expr` vanishes somewhere on the declared range.
pub fn vanishes_somewhere(
    expr: &RatFunc,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) -> Verdict {
    let (num, _, param) = match univariate(expr, problem, values) {
        Ok(parts) => parts,
        Err(why) => {
            // Several parameters: a sign proven on the whole box of ranges means never zero.
            let sign = expr
                .eval_partial(values)
                .ok()
                .and_then(|e| box_sign(&e, &problem.params));
            return match sign {
                Some(BoxSign::Positive | BoxSign::Negative) => Verdict::Never,
                _ => Verdict::Open(why),
            };
        }
    };
    let interval = Interval::of_param(param);
    let (roots, cofactor) = rational_roots(&num);
    let rational_inside = roots
        .iter()
        .any(|(r, _)| interval.contains(r) && (!param.integer || r.is_integer()));
    if rational_inside {
        return Verdict::Sometimes;
    }
    if count_roots_between(&cofactor, &interval.low, &interval.high) > 0 {
        // An irrational zero: an integer parameter never reaches it, a real one does.
        return if param.integer {
            Verdict::Never
        } else {
            Verdict::Sometimes
        };
    }
    Verdict::Never
}

/// Whether the declared range of `param` contains `value`.
pub fn range_contains(problem: &Problem, param: &str, value: &Q) -> Option<bool> {
    let p = problem.param(param)?;
    if p.lower.is_none() && p.upper.is_none() && !p.integer {
        return None;
    }
    Some(Interval::of_param(p).contains(value) && (!p.integer || value.is_integer()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::model::build_problem;

    fn problem(text: &str) -> Problem {
        build_problem(text).unwrap()
    }

    fn rho_fn(num: &[i64], den: &[i64]) -> RatFunc {
        let poly = |c: &[i64]| {
            crate::algebra::Poly::from_univariate(
                "rho",
                &c.iter().map(|v| q(*v, 1)).collect::<Vec<_>>(),
            )
        };
        RatFunc::new(poly(num), poly(den)).unwrap()
    }

    #[test]
    fn one_over_rho_minus_one_never_reaches_positive_integers_on_the_unit_interval() {
        // 1/(ρ − 1) maps (0, 1) onto (−∞, −1): no integer ≥ 2 (and no zero of ρ − 1 inside).
        let p = problem("param rho in (0, 1)\nn(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k)  for k >= 2");
        let f = rho_fn(&[1], &[-1, 1]);
        let none = BTreeMap::new();
        assert_eq!(
            takes_integer_at_least(&f, &2.into(), &p, &none),
            Verdict::Never
        );
        // −1/(ρ − 1) = 1/(1 − ρ) maps (0, 1) onto (1, ∞): it does meet 2, 3, …
        let g = rho_fn(&[-1], &[-1, 1]);
        assert_eq!(
            takes_integer_at_least(&g, &2.into(), &p, &none),
            Verdict::Sometimes
        );
        assert_eq!(range_contains(&p, "rho", &q(1, 1)), Some(false));
    }

    #[test]
    fn a_non_monotone_function_is_split_at_its_critical_point() {
        // ρ(1 − ρ)·8 has its maximum 2 at ρ = 1/2: on (0, 1) its image is (0, 2].
        let p = problem("param rho in (0, 1)\na(k)/a(k-1) = rho/k  for k >= 1");
        let f = rho_fn(&[0, 8, -8], &[1]);
        let none = BTreeMap::new();
        assert_eq!(
            takes_integer_at_least(&f, &2.into(), &p, &none),
            Verdict::Sometimes
        );
        assert_eq!(
            takes_integer_at_least(&f, &3.into(), &p, &none),
            Verdict::Never
        );
    }

    #[test]
    fn irrational_zeros_are_counted_not_guessed() {
        // ρ² − 2 vanishes at √2 ∈ (1, 2) (Sturm); a real parameter reaches it.
        let p = problem("param rho in (1, 2)\na(k)/a(k-1) = rho/k  for k >= 1");
        let f = rho_fn(&[-2, 0, 1], &[1]);
        let none = BTreeMap::new();
        assert_eq!(vanishes_somewhere(&f, &p, &none), Verdict::Sometimes);
        let p = problem("param rho in (2, 3)\na(k)/a(k-1) = rho/k  for k >= 1");
        assert_eq!(vanishes_somewhere(&f, &p, &none), Verdict::Never);
        // The image of 1/(ρ² − 2) over (1, 2) has an irrational pole inside: left open.
        let g = rho_fn(&[1], &[-2, 0, 1]);
        let p = problem("param rho in (1, 2)\na(k)/a(k-1) = rho/k  for k >= 1");
        assert!(matches!(
            takes_integer_at_least(&g, &1.into(), &p, &none),
            Verdict::Open(_)
        ));
    }

    #[test]
    fn integer_parameters_can_settle_a_condition_everywhere() {
        let p = problem("param N integer >= 3\na(k)/a(k-1) = 1/(N - k)  for k >= 1");
        let n = RatFunc::var("N");
        let none = BTreeMap::new();
        assert_eq!(
            takes_integer_at_least(&n, &1.into(), &p, &none),
            Verdict::Always
        );
        assert_eq!(vanishes_somewhere(&n, &p, &none), Verdict::Never);
    }

    #[test]
    fn several_parameters_are_not_decided() {
        let p = problem("param a > 0\nparam b > 0\nx(k)/x(k-1) = 1/(k + a - b)  for k >= 1");
        let e = &RatFunc::var("a") - &RatFunc::var("b");
        let none = BTreeMap::new();
        assert!(matches!(
            takes_integer_at_least(&e, &1.into(), &p, &none),
            Verdict::Open(why) if why.contains("several")
        ));
        // a/b with a, b > 0 is positive on the whole box: it never reaches 0, −1, −2, …
        let ratio = RatFunc::var("a").checked_div(&RatFunc::var("b")).unwrap();
        assert_eq!(
            takes_integer_at_least(&-ratio.clone(), &0.into(), &p, &none),
            Verdict::Never
        );
        assert_eq!(vanishes_somewhere(&ratio, &p, &none), Verdict::Never);
        // With b fixed the question is about a alone: a − 5 on (0, ∞) reaches 1, 2, …
        let fixed = BTreeMap::from([("b".to_string(), q(5, 1))]);
        assert_eq!(
            takes_integer_at_least(&e, &1.into(), &p, &fixed),
            Verdict::Sometimes
        );
    }

    #[test]
    fn the_integers_a_bounded_image_reaches_are_listed() {
        // 1/ρ maps (1/4, 1) onto (1, 4): it reaches 2 and 3; on (0, 1) it is unbounded.
        let f = rho_fn(&[1], &[0, 1]);
        let none = BTreeMap::new();
        let p = problem("param rho in (1/4, 1)\na(k)/a(k-1) = rho/k  for k >= 1");
        assert_eq!(
            integers_reached(&f, &2.into(), &p, &none),
            Some(vec![2.into(), 3.into()])
        );
        let p = problem("param rho in (0, 1)\na(k)/a(k-1) = rho/k  for k >= 1");
        assert_eq!(integers_reached(&f, &2.into(), &p, &none), None);
    }

    #[test]
    fn limits_at_poles_and_infinity() {
        // 1/x from the right of 0 is +∞, from the left −∞; (2x+1)/x → 2 at ∞.
        let one = [q(1, 1)];
        let x = [q(0, 1), q(1, 1)];
        assert_eq!(
            one_sided_limit(&one, &x, &q(0, 1), true),
            Extended::PlusInfinity
        );
        assert_eq!(
            one_sided_limit(&one, &x, &q(0, 1), false),
            Extended::MinusInfinity
        );
        assert_eq!(
            limit_at_infinity(&[q(1, 1), q(2, 1)], &x, true),
            Extended::Finite(q(2, 1))
        );
        // p(x) = x² at x0 = 3: p(3 + t) = 9 + 6t + t²
        assert_eq!(
            taylor_shift(&[q(0, 1), q(0, 1), q(1, 1)], &q(3, 1)),
            vec![q(9, 1), q(6, 1), q(1, 1)]
        );
    }
}
