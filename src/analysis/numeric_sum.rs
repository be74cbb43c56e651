//! `Σ_{k≥b} k^j a(k)` for j = 0, 1, 2 and numeric parameters, to a requested relative
//! accuracy with an error bound:
//!
//! - finite support: exact rational sums;
//! - geometric or faster decay: term by term until a proven geometric bound on the rest is
//!   small enough;
//! - power-law tails (`r = 1`): the first K terms directly, the rest from the asymptotic
//!   law `a(k) = C k^θ Σ c_n k^(−n)` summed with Hurwitz zeta values (Euler–Maclaurin), since
//!   term-by-term summation would need about 10^(D/(γ−1)) terms.

use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive, Zero};
use rug::ops::Pow;
use rug::{Assign, Float, Integer, Rational};

use super::bernoulli::bernoulli_numbers_gmp;
use super::hurwitz::hurwitz_zeta;
use super::hypergeometric::RisingForm;
use super::tail::{numeric_corrections_float, tail_law, FloatCorrections};
use crate::algebra::Q;
use crate::numeric::split::split_sums;
use crate::numeric::{bits_for_digits, to_rug_integer, to_rug_rational, GUARD_BITS};

/// A rule with every parameter substituted.
#[derive(Clone, Debug)]
pub struct NumericRule {
    pub form: RisingForm,
    pub base_index: BigInt,
    /// The last index of a finite support.
    pub last: Option<BigInt>,
}

/// A value with a bound on its absolute error; `exact` when it is an exact rational.
#[derive(Clone, Debug)]
pub struct Bounded {
    pub value: Float,
    pub error: Float,
    pub exact: Option<Rational>,
}

impl Bounded {
    pub fn exact(q: Rational, prec: u32) -> Bounded {
        Bounded {
            value: Float::with_val(prec, &q),
            error: Float::new(64),
            exact: Some(q),
        }
    }

    /// |error / value|, +inf for a zero value with a non-zero error.
    pub fn relative_error(&self) -> Float {
        if self.error.is_zero() {
            return Float::new(64);
        }
        Float::with_val(64, &self.error / &self.value).abs()
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum SumMethod {
    /// `rounded` when the sums were too long to reduce and were rounded once at the end.
    ExactFinite {
        terms: u64,
        rounded: bool,
    },
    TermByTerm {
        terms: u64,
    },
    EulerMaclaurin {
        head: u64,
        expansion_terms: usize,
    },
}

impl SumMethod {
    pub fn describe(&self) -> String {
        match self {
            SumMethod::ExactFinite {
                terms,
                rounded: false,
            } => format!("exact rational sum of {terms} terms"),
            SumMethod::ExactFinite {
                terms,
                rounded: true,
            } => format!(
                "sum of {terms} terms in exact integers, rounded once (too long a fraction to keep)"
            ),
            SumMethod::TermByTerm { terms } => {
                format!("{terms} terms summed directly; the rest bounded by a geometric series")
            }
            SumMethod::EulerMaclaurin {
                head,
                expansion_terms,
            } => format!(
                "{head} terms summed directly; the tail from the asymptotic law with {expansion_terms} terms and Hurwitz zeta values (Euler–Maclaurin)"
            ),
        }
    }
}

/// `Σ k^j a(k)` (a(b) = 1) for j = 0, 1, 2; `None` where the sum diverges.
#[derive(Clone, Debug)]
pub struct MomentSums {
    pub sums: [Option<Bounded>; 3],
    pub method: SumMethod,
}

/// Why no numeric value could be given.
#[derive(Clone, Debug, PartialEq)]
pub enum SumFailure {
    /// Every sum diverges.
    Divergent(String),
    /// A case the numeric method does not cover.
    Unsupported(String),
}

/// Largest size (bits) of the exact products of a finite support: 10^6 binomial steps are
/// 4·10^7 bits and take 2.6 s.
const MAX_SPLIT_BITS: u64 = 1 << 26;

/// Largest finite support summed exactly.
const MAX_EXACT_TERMS: u64 = 1_000_000;
/// Largest number of terms summed one by one.
const MAX_TERMS: u64 = 1_000_000;
/// Longest head before an Euler–Maclaurin tail (parameters in the millions need more).
const MAX_HEAD: u64 = 200_000;

/// The three sums to `digits` significant digits (relative error ≤ 10^(−digits−2) for every
/// convergent one).
pub fn moment_sums(rule: &NumericRule, digits: u32) -> Result<MomentSums, SumFailure> {
    let constant =
        rule.form.constant.as_constant().ok_or_else(|| {
            SumFailure::Unsupported("the rule still has symbolic parameters".into())
        })?;
    let shifts: Vec<(Q, i32)> = rule
        .form
        .factors
        .iter()
        .map(|(s, e)| Some((s.as_constant()?, *e)))
        .collect::<Option<_>>()
        .ok_or_else(|| SumFailure::Unsupported("the rule still has symbolic parameters".into()))?;
    let prec = bits_for_digits(digits + 2) + GUARD_BITS;
    if let Some(last) = &rule.last {
        return exact_finite(&constant, &shifts, &rule.base_index, last, prec);
    }
    let d = rule.form.degree_difference();
    let abs_c = constant.abs();
    let one = Q::from_integer(1.into());
    if d > 0 {
        return Err(SumFailure::Divergent(format!(
            "the terms grow like (k/e)^({d}k): R(k) grows without bound"
        )));
    }
    if d == 0 && abs_c > one {
        return Err(SumFailure::Divergent(format!(
            "the terms grow geometrically: |r| = {abs_c} > 1"
        )));
    }
    if d < 0 || abs_c < one {
        // Feasibility only (no reported digit depends on this f64 estimate): the terms peak
        // where |R(k)| = 1, and a ratio r needs about digits·ln 10 / ln(1/r) more terms.
        let c = abs_c.to_f64().unwrap_or(f64::MAX);
        let needed = if d < 0 {
            c.powf(1.0 / (-d) as f64) + digits as f64 * 10.0
        } else {
            digits as f64 * std::f64::consts::LN_10 / -c.ln()
        };
        if needed > MAX_TERMS as f64 {
            return Err(SumFailure::Unsupported(format!(
                "about {needed:.1e} terms would be needed (at most {MAX_TERMS})"
            )));
        }
        return term_by_term(&constant, &shifts, &rule.base_index, digits, prec);
    }
    if constant.is_negative() {
        return Err(SumFailure::Unsupported(
            "alternating power-law terms (r = −1) are not summed numerically".into(),
        ));
    }
    euler_maclaurin(rule, &shifts, digits, prec)
}

/// A bound U(k+1) ≥ sup_{m ≥ k+1} |R(m)| that falls towards |c| as k grows, for k ≥ `start`
/// (where every denominator factor m + b is positive). Each numerator |m + a| ≤ m + |a|; the
/// numerators, largest |a| first, are paired with the denominators, smallest b first. A pair
/// (m + A)/(m + B) is at most max((k+1+A)/(k+1+B), 1) for m ≥ k+1 (it decreases when A ≥ B and
/// stays below 1 when A < B), and each denominator left over at most 1/(k+1+B). Pairing only
/// needs the denominators positive, so the check starts after the most negative denominator
/// shift rather than after the largest shift of any sign (a rule such as
/// k/((k−1)(k + 10^98)) is summed in a few terms, not refused after 10^6).
struct RatioBound {
    /// |a| of every numerator factor (repeated by its power), largest first.
    numerators: Vec<Rational>,
    /// b of every denominator factor (repeated by its power), smallest first.
    denominators: Vec<Rational>,
    start: BigInt,
}

impl RatioBound {
    fn new(shifts: &[(Q, i32)]) -> Self {
        let mut numerators = Vec::new();
        let mut denominators = Vec::new();
        for (s, e) in shifts {
            for _ in 0..e.unsigned_abs() {
                if *e > 0 {
                    numerators.push(to_rug_rational(&s.abs()));
                } else {
                    denominators.push(to_rug_rational(s));
                }
            }
        }
        numerators.sort_by(|a, b| b.cmp(a));
        denominators.sort();
        // The first k with k + 1 + b > 0 for every denominator shift b, and k ≥ 2.
        let most_negative = shifts
            .iter()
            .filter(|(_, e)| *e < 0)
            .map(|(s, _)| -s)
            .max()
            .unwrap_or_else(Q::zero)
            .max(Q::zero());
        let start = most_negative.floor().to_integer() + 2;
        RatioBound {
            numerators,
            denominators,
            start,
        }
    }

    /// Whether there is such a bound: R has no more numerator than denominator factors.
    fn exists(&self) -> bool {
        self.numerators.len() <= self.denominators.len()
    }

    /// U(next); `exists` must hold.
    fn at(&self, abs_c: &Rational, next: &rug::Integer) -> Rational {
        let mut u = abs_c.clone();
        for (i, b) in self.denominators.iter().enumerate() {
            let below = Rational::from(next + b);
            match self.numerators.get(i) {
                Some(a) => {
                    let above = Rational::from(next + a);
                    if above > below {
                        u *= above;
                        u /= below;
                    }
                }
                None => u /= below,
            }
        }
        u
    }
}

/// R(k) = c · Π (k + s)^e exactly, with the constant and the shifts converted to GMP once:
/// a slowly decaying sum takes up to a million steps, and converting them on every step was
/// most of its time.
struct ExactRatio {
    constant: Rational,
    shifts: Vec<(Rational, i32)>,
}

impl ExactRatio {
    fn new(constant: &Q, shifts: &[(Q, i32)]) -> ExactRatio {
        ExactRatio {
            constant: to_rug_rational(constant),
            shifts: shifts
                .iter()
                .map(|(s, e)| (to_rug_rational(s), *e))
                .collect(),
        }
    }

    /// R(k); `None` at a pole. Numerator and denominator are multiplied out as integers
    /// and reduced once (a reduction per factor was a third of a slowly decaying sum's time).
    fn at(&self, k: &Integer) -> Option<Rational> {
        self.parts(k).map(Rational::from)
    }

    /// R(k) as an integer numerator and denominator, not reduced; (0, 1) at a zero of the
    /// numerator, `None` at a pole.
    fn parts(&self, k: &Integer) -> Option<(Integer, Integer)> {
        let mut num = self.constant.numer().clone();
        let mut den = self.constant.denom().clone();
        let mut x = Integer::new();
        for (s, e) in &self.shifts {
            // k + p/q = (qk + p)/q
            x.assign(s.denom() * k);
            x += s.numer();
            if x == 0 {
                if *e < 0 {
                    return None;
                }
                return Some((Integer::new(), Integer::from(1)));
            }
            for _ in 0..e.unsigned_abs() {
                if *e > 0 {
                    num *= &x;
                    den *= s.denom();
                } else {
                    num *= s.denom();
                    den *= &x;
                }
            }
        }
        Some((num, den))
    }
}

/// R(k) exactly (for the tests).
#[cfg(test)]
fn ratio_at(constant: &Q, shifts: &[(Q, i32)], k: &BigInt) -> Option<Rational> {
    ExactRatio::new(constant, shifts).at(&to_rug_integer(k))
}

fn unsupported_zero(k: &impl std::fmt::Display) -> SumFailure {
    SumFailure::Unsupported(format!("the rule divides by zero at k = {k}"))
}

fn exact_finite(
    constant: &Q,
    shifts: &[(Q, i32)],
    base: &BigInt,
    last: &BigInt,
    prec: u32,
) -> Result<MomentSums, SumFailure> {
    let terms = (last - base + 1u32).to_u64().unwrap_or(u64::MAX);
    if terms > MAX_EXACT_TERMS {
        return Err(SumFailure::Unsupported(format!(
            "a finite support of {terms} terms is too long to sum exactly"
        )));
    }
    let ratio = ExactRatio::new(constant, shifts);
    // The products grow by the size of one step a step: bound the whole before starting.
    let last_k = to_rug_integer(last);
    let bits_at = |k: &Integer| {
        ratio.parts(k).map_or(0, |(p, q)| {
            p.significant_bits() as u64 + q.significant_bits() as u64
        })
    };
    let step_bits = bits_at(&last_k).max(bits_at(&Integer::from(&last_k - 1)));
    if step_bits.saturating_mul(terms) > MAX_SPLIT_BITS {
        return Err(SumFailure::Unsupported(format!(
            "a finite support of {terms} terms whose steps take about {step_bits} bits each is too long to sum exactly"
        )));
    }
    let split = split_sums(&to_rug_integer(base), terms, 3, |m| {
        ratio.parts(m).ok_or_else(|| unsupported_zero(m))
    })?;
    let sums: Vec<Option<Bounded>> = split
        .t
        .into_iter()
        .map(|t| Some(fraction(t, &split.q, prec)))
        .collect();
    let rounded = sums.iter().flatten().any(|s| s.exact.is_none());
    Ok(MomentSums {
        sums: sums.try_into().expect("three weights"),
        method: SumMethod::ExactFinite { terms, rounded },
    })
}

/// Largest fraction (bits of numerator and denominator, before reduction) reduced to an exact
/// rational: GMP's gcd at that size takes a few milliseconds, and a longer exact value is of no
/// use in a report.
const MAX_REDUCED_BITS: u64 = 1 << 18;

/// t/q exactly when it is small enough to reduce, otherwise rounded: `t` to `prec` bits, then
/// divided by `q` (two roundings to nearest, each within 2^−prec relative).
pub(crate) fn fraction(t: Integer, q: &Integer, prec: u32) -> Bounded {
    if t.significant_bits() as u64 + q.significant_bits() as u64 <= MAX_REDUCED_BITS {
        return Bounded::exact(Rational::from((t, q.clone())), prec);
    }
    let value = Float::with_val(prec, &t) / q;
    let error = Float::with_val(64, value.abs_ref()) >> (prec as i32 - 2);
    Bounded {
        value,
        error,
        exact: None,
    }
}

/// Running sums of k^j a(k) at `prec` bits with the worst-case rounding count.
struct Head {
    a: Float,
    k: Integer,
    sums: [Float; 3],
    abs_sums: [Float; 3],
    steps: u64,
    /// Working values reused on every step (allocating them was a fifth of the time).
    scratch: [Float; 3],
    scratch_abs: Float,
}

impl Head {
    fn new(base: &BigInt, prec: u32) -> Head {
        let mut head = Head {
            a: Float::with_val(prec, 1),
            k: to_rug_integer(base),
            sums: [Float::new(prec), Float::new(prec), Float::new(prec)],
            abs_sums: [Float::new(64), Float::new(64), Float::new(64)],
            steps: 0,
            scratch: [Float::new(prec), Float::new(prec), Float::new(prec)],
            scratch_abs: Float::new(64),
        };
        head.add_current();
        head
    }

    fn add_current(&mut self) {
        let [kf, term, _] = &mut self.scratch;
        kf.assign(&self.k);
        term.assign(&self.a);
        for j in 0..3 {
            self.scratch_abs.assign(term.abs_ref());
            self.abs_sums[j] += &self.scratch_abs;
            self.sums[j] += &*term;
            *term *= &*kf;
        }
    }

    fn step(&mut self, ratio: &ExactRatio) -> Result<(), SumFailure> {
        self.k += 1;
        let r = ratio.at(&self.k).ok_or_else(|| unsupported_zero(&self.k))?;
        let ratio = &mut self.scratch[2];
        ratio.assign(&r);
        self.a *= &*ratio;
        self.steps += 1;
        self.add_current();
        Ok(())
    }

    /// Bound on the rounding error of sums[j]: each term carries ≤ 2n + 3 roundings (two per
    /// step of the running product, one per power of k) and the summation ≤ n more, all of
    /// relative size 2^(1−p), each against at most Σ|terms| (Higham, *Accuracy and Stability
    /// of Numerical Algorithms*, Lemma 3.1 and §4.2), with the 1.01 of Lemma 3.1.
    fn rounding_error(&self, j: usize) -> Float {
        let n = self.steps + 1;
        let u = Float::with_val(64, Float::i_exp(1, 1 - self.a.prec() as i32));
        Float::with_val(64, &self.abs_sums[j] * &u) * ((3 * n + 4) as f64 * 1.01)
    }
}

fn term_by_term(
    constant: &Q,
    shifts: &[(Q, i32)],
    base: &BigInt,
    digits: u32,
    prec: u32,
) -> Result<MomentSums, SumFailure> {
    let target = Float::with_val(64, Float::i_exp(1, -(bits_for_digits(digits + 3) as i32)));
    let bound = RatioBound::new(shifts);
    // The tail bound needs every denominator factor positive; when that starts beyond the
    // most terms ever summed, say so now rather than after a million steps.
    if !bound.exists() {
        // |R(k)| grows without bound: no remainder bound will ever hold.
        return Err(SumFailure::Unsupported(format!(
            "the terms decay too slowly to sum {MAX_TERMS} of them"
        )));
    }
    if (&bound.start - base) > BigInt::from(MAX_TERMS) {
        return Err(SumFailure::Unsupported(format!(
            "a denominator factor of the rule changes sign at k = {}, and the remainder can only be bounded beyond it (more than {MAX_TERMS} terms)",
            &bound.start - 2
        )));
    }
    let abs_c = to_rug_rational(&constant.abs());
    // U falls as k grows, and every stop needs U < 1: if U is still at least 1 at the last k
    // the loop could reach, no remainder bound will ever hold. A shift of 10^15 took a million
    // steps (7 s) to find that out.
    let last_next = to_rug_integer(&(base.max(&bound.start) + BigInt::from(MAX_TERMS + 1)));
    if bound.at(&abs_c, &last_next) >= 1 {
        return Err(SumFailure::Unsupported(format!(
            "the terms decay too slowly to sum {MAX_TERMS} of them"
        )));
    }
    let ratio = ExactRatio::new(constant, shifts);
    let bound_start = to_rug_integer(&bound.start);
    let mut head = Head::new(base, prec);
    loop {
        if head.steps > MAX_TERMS {
            return Err(SumFailure::Unsupported(format!(
                "the terms decay too slowly to sum {MAX_TERMS} of them"
            )));
        }
        // The check costs about as much as a step: after the first 1024 steps it runs on
        // every 16th, which sums at most 15 terms more than needed.
        let check_now = head.steps < 1024 || head.steps % 16 == 0;
        if check_now && head.k >= bound_start {
            let next = Integer::from(&head.k + 1);
            let u = bound.at(&abs_c, &next);
            let k_now = &head.k;
            let mut done = true;
            let mut bounds = [Float::new(64), Float::new(64), Float::new(64)];
            for (j, bound) in bounds.iter_mut().enumerate() {
                // weight ratio ((m)/(m−1))^j ≤ ((k+1)/k)^j for m > k
                let w = Rational::from((next.clone(), k_now.clone()));
                let mut rho = u.clone();
                for _ in 0..j {
                    rho *= &w;
                }
                if rho >= 1 {
                    done = false;
                    break;
                }
                let last_term = Float::with_val(64, head.a.abs_ref())
                    * Float::with_val(64, k_now).pow(j as u32);
                let tail = Float::with_val(64, &rho / (1 - rho.clone()));
                *bound = last_term * tail * 1.01f64;
                let scale = Float::with_val(64, head.sums[j].abs_ref());
                if *bound > Float::with_val(64, &scale * &target) {
                    done = false;
                }
            }
            if done {
                let sums = [0, 1, 2].map(|j| {
                    Some(Bounded {
                        value: head.sums[j].clone(),
                        error: Float::with_val(64, &bounds[j] + &head.rounding_error(j)),
                        exact: None,
                    })
                });
                return Ok(MomentSums {
                    sums,
                    method: SumMethod::TermByTerm {
                        terms: head.steps + 1,
                    },
                });
            }
        }
        head.step(&ratio)?;
    }
}

fn euler_maclaurin(
    rule: &NumericRule,
    shifts: &[(Q, i32)],
    digits: u32,
    prec: u32,
) -> Result<MomentSums, SumFailure> {
    let law = tail_law(&rule.form, &rule.base_index, 0);
    let theta = law
        .power
        .as_constant()
        .ok_or_else(|| SumFailure::Unsupported("symbolic power".into()))?;
    let minus_one = Q::from_integer((-1).into());
    if theta >= minus_one {
        return Err(SumFailure::Divergent(format!(
            "a(k) ~ C·k^({theta}) with exponent ≥ −1: the total diverges"
        )));
    }
    let max_shift = shifts
        .iter()
        .map(|(s, _)| s.abs())
        .max()
        .unwrap_or_else(Q::zero)
        .ceil()
        .to_integer()
        .to_u64()
        .unwrap_or(u64::MAX / 16);
    // A head long enough that the asymptotic series reaches the target in a few dozen terms:
    // its terms shrink roughly like n/(2πK) (common practice sizing).
    // Saturating: a shift of 3·10^18 overflowed 8·shift (a fuzz finding); any head past
    // MAX_HEAD is refused below.
    let mut head_len = (4 * digits as u64 + 64).max(max_shift.saturating_mul(8).saturating_add(32));
    let constant = constant_of(rule);
    let ratio = ExactRatio::new(&constant, shifts);
    let target = Float::with_val(64, Float::i_exp(1, -(bits_for_digits(digits + 3) as i32)));
    let c_value = law
        .prefactor_term
        .to_float(&Default::default(), prec + 32)
        .ok_or_else(|| SumFailure::Unsupported("the prefactor has a pole".into()))?;
    // Terms shrink like n/(2πK) with K ≈ 4·digits: about digits/2.5 of them reach the target.
    let max_terms = (digits as usize / 2 + 24).min(600);
    let corrections = numeric_corrections_float(&rule.form, &Default::default(), max_terms, prec)
        .ok_or_else(|| SumFailure::Unsupported("symbolic shifts".into()))?;
    // x^(−s) with s up to max_terms: each Euler–Maclaurin term gains ≥ (2πK/(s+2i))², so
    // this many Bernoulli numbers always suffice (common practice sizing).
    let bernoulli: Vec<Float> = bernoulli_numbers_gmp(2 * max_terms + 80)
        .iter()
        .map(|b| Float::with_val(prec, b))
        .collect();
    for _attempt in 0..6 {
        if head_len > MAX_HEAD {
            return Err(SumFailure::Unsupported(format!(
                "the asymptotic law needs more than {MAX_HEAD} direct terms first (parameters this large)"
            )));
        }
        let first_tail = &rule.base_index + BigInt::from(head_len);
        let mut head = Head::new(&rule.base_index, prec);
        let last_head = to_rug_integer(&(&first_tail - 1));
        while head.k < last_head {
            head.step(&ratio)?;
        }
        let big_k = first_tail
            .to_u64()
            .ok_or_else(|| SumFailure::Unsupported("index too large".into()))?;
        let mut sums: [Option<Bounded>; 3] = [None, None, None];
        let mut used_terms = 0usize;
        let mut ok = true;
        // ζ(n − θ − j, K) depends on n − j only: the sums of k·a(k) and k²·a(k) reuse the
        // total's values (half the time at 1000 digits).
        let mut zetas = ZetaCache::default();
        for (j, slot) in sums.iter_mut().enumerate() {
            let jq = Q::from_integer((j as i64).into());
            if &theta + &jq >= minus_one {
                continue; // Σ k^j a(k) diverges
            }
            match tail_sum(
                &corrections,
                &theta,
                j,
                &mut zetas,
                big_k,
                &c_value,
                prec,
                &bernoulli,
                &target,
                &head.sums[j],
            ) {
                Some((value, error, terms)) => {
                    used_terms = used_terms.max(terms);
                    let total = Float::with_val(prec, &head.sums[j] + &value);
                    let error = Float::with_val(64, &error + &head.rounding_error(j));
                    *slot = Some(Bounded {
                        value: total,
                        error,
                        exact: None,
                    });
                }
                None => {
                    ok = false;
                    break;
                }
            }
        }
        if ok {
            return Ok(MomentSums {
                sums,
                method: SumMethod::EulerMaclaurin {
                    head: head_len,
                    expansion_terms: used_terms,
                },
            });
        }
        head_len = head_len.saturating_mul(2);
    }
    Err(SumFailure::Unsupported(
        "the asymptotic series did not reach the requested accuracy".into(),
    ))
}

fn constant_of(rule: &NumericRule) -> Q {
    rule.form.constant.as_constant().unwrap_or_else(Q::zero)
}

/// ζ(m − θ, K) with its error bound by m = n − j, for one K.
type ZetaCache = std::collections::BTreeMap<i64, Option<(Float, Float)>>;

/// `Σ_{k≥K} k^j C k^θ Σ_n c_n k^(−n) = C Σ_n c_n ζ(n − θ − j, K)` with its error bound and the
/// number of expansion terms used; `None` when the series stops shrinking first.
#[allow(clippy::too_many_arguments)]
fn tail_sum(
    corrections: &FloatCorrections,
    theta: &Q,
    j: usize,
    zetas: &mut ZetaCache,
    big_k: u64,
    c_value: &Float,
    prec: u32,
    bernoulli: &[Float],
    target: &Float,
    head_sum: &Float,
) -> Option<(Float, Float, usize)> {
    let mut total = Float::new(prec);
    let mut error = Float::new(64);
    let zeta_target = Float::with_val(64, target / 16u32);
    let scale = Float::with_val(64, head_sum.abs_ref());
    let mut previous: Option<Float> = None;
    let values = &corrections.values;
    for (n, c) in values.iter().enumerate() {
        let shift = n as i64 - j as i64;
        let c_is_zero = c.is_zero();
        let (zeta, zeta_err) = zetas
            .entry(shift)
            .or_insert_with(|| {
                let s = Q::from_integer(shift.into()) - theta;
                hurwitz_zeta(&s, big_k, prec, bernoulli, &zeta_target)
            })
            .clone()?;
        let c_f = Float::with_val(prec, c);
        let term = Float::with_val(prec, &c_f * &zeta) * c_value;
        let magnitude = Float::with_val(64, term.abs_ref());
        // The first omitted term, doubled, bounds the truncation (asymptotic series of a
        // Gamma quotient with real parameters beyond its largest shift, common practice).
        if c_is_zero && n > 0 {
            // An exact expansion (e.g. a rational a(k)) contributes nothing more.
            if values[n..].iter().all(|c| c.is_zero()) {
                return Some((total, error, n));
            }
        }
        if n > 0 && Float::with_val(64, &magnitude * 2u32) <= Float::with_val(64, &scale * target) {
            error += Float::with_val(64, &magnitude * 2u32);
            return Some((total, error, n));
        }
        if let Some(p) = &previous {
            if magnitude > *p && !c_is_zero {
                return None;
            }
        }
        previous = if c_is_zero { previous } else { Some(magnitude) };
        total += &term;
        let rel = Float::with_val(64, &c_f * c_value).abs() * zeta_err;
        error += rel;
        // The coefficient's own error (MPFR beyond the exact ones), times |ζ·C|.
        let c_error = Float::with_val(64, &corrections.errors[n] * &zeta).abs()
            * Float::with_val(64, c_value.abs_ref());
        error += c_error;
    }
    None
}

#[cfg(test)]
mod ratio_bound_tests {
    use super::*;
    use crate::algebra::parse_q;

    /// |R(m)| ≤ U(k+1) for every m ≥ k+1 checked (k + 1 … k + 400 and a few far points), on
    /// rules with shifts of both signs in numerators and denominators (the bound's own
    /// argument; the check is exact, in rationals).
    #[test]
    fn the_bound_holds_beyond_its_start() {
        let rules: [(&str, &[(&str, i32)]); 5] = [
            ("1/2", &[("1", 1), ("3", -1)]),
            ("5", &[("7", 1), ("1", -1), ("1/2", -1)]),
            ("2/3", &[("-9", 1), ("0", -1)]),
            (
                "1/3",
                &[("-1/2", 1), ("-5/2", -1), ("4", 2), ("-1", -1), ("9/2", -2)],
            ),
            (
                "28/3",
                &[("0", 1), ("-1", -1), ("1000000000000000000000001", -1)],
            ),
        ];
        for (c, factors) in rules {
            let constant = parse_q(c).unwrap();
            let shifts: Vec<(Q, i32)> = factors
                .iter()
                .map(|(s, e)| (parse_q(s).unwrap(), *e))
                .collect();
            let bound = RatioBound::new(&shifts);
            let abs_c = to_rug_rational(&constant.abs());
            for k in [bound.start.clone(), &bound.start + 7, &bound.start + 100] {
                let next = to_rug_integer(&(&k + 1));
                assert!(bound.exists(), "deg num ≤ deg den");
                let u = bound.at(&abs_c, &next);
                let far = [10_000u64, 1_000_000, 1 << 40];
                let ms = (1..=400u64)
                    .map(|d| &k + d)
                    .chain(far.iter().map(|&d| &k + d));
                for m in ms {
                    let r = ratio_at(&constant, &shifts, &m).expect("no pole").abs();
                    assert!(r <= u, "{c} {factors:?}: |R({m})| = {r} > U = {u}");
                }
            }
        }
    }
}
