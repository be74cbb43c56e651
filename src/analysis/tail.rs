//! Large-`k` behaviour: `a(k) ~ C · r^k · (k/e)^(d·k) · k^θ · (1 + c₁/k + c₂/k² + …)`.
//!
//! From the rising form `R(k) = r · Π (k + α_i)^e_i`, telescoping gives
//! `a(k) = a(b) · r^(k−b) · Π [Γ(k + h_i)/Γ(b + h_i)]^e_i` with `h_i = 1 + α_i`, and
//! Stirling's series with Bernoulli polynomials (DLMF 5.11.8),
//! `ln Γ(k+h) ~ (k+h−½) ln k − k + ½ ln 2π + Σ_{m≥1} (−1)^(m+1) B_{m+1}(h) / (m(m+1) k^m)`,
//! summed with the weights `e_i` gives every piece: `d = Σ e_i` (factorial growth when the
//! degrees differ), `θ = Σ e_i (h_i − ½)`, `C = r^(−b) (2π)^(d/2) Π Γ(b+h_i)^(−e_i)`, and the
//! corrections `c_n` from the exponential of `Σ δ_m k^(−m)` — for `d = 0` this is the
//! expansion of a Gamma quotient, DLMF 5.11.13.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Zero};

use super::bernoulli::{bernoulli_numbers, bernoulli_polynomial, bernoulli_polynomial_at};
use super::hypergeometric::RisingForm;
use super::symbolic::{Atom, RatKey, Term};
use crate::algebra::{Poly, RatFunc, Q};
use crate::closed_form::{Affine, Factor, Product};

/// The asymptotic law of the sequence (with `a(b) = 1`).
#[derive(Clone, Debug, PartialEq)]
pub struct Tail {
    /// r
    pub rate: RatFunc,
    /// d = deg(numerator) − deg(denominator) of R(k): the factor (k/e)^(d·k).
    pub factorial_power: i64,
    /// θ
    pub power: RatFunc,
    /// C, a product of Gamma values, powers and √π.
    pub prefactor: Product,
    /// The same prefactor as an exact term (for arithmetic).
    pub prefactor_term: Term,
    /// c₁ … c_N: every asked-for correction that is small enough to write out.
    pub corrections: Vec<RatFunc>,
    /// The asked-for corrections after `corrections` that were too large to write out.
    pub omitted: Option<OmittedCorrections>,
}

/// Corrections `c_first … c_last` left unwritten because `c_first`, over the common
/// denominator, has more than [`MAX_CORRECTION_TERMS`] terms, or building it would take more
/// than [`MAX_CORRECTION_WORK`] products of terms.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct OmittedCorrections {
    pub first: usize,
    pub last: usize,
    /// Terms of c_first's numerator over the common denominator; `None` when the work limit
    /// stopped it before it was built.
    pub terms: Option<usize>,
}

/// The most products of two terms spent on all the symbolic corrections together. Measured on
/// this code: every shipped example and bench rule, and rules with up to five parameter
/// factors above and five below, use at most 60,000 at `--terms 20` (the term limit stops them
/// first); a product costs from 0.1 µs to 3 µs (many names, 17-digit coefficients), so the
/// limit keeps the corrections under about half a second.
pub const MAX_CORRECTION_WORK: u64 = 200_000;

/// Counts products of terms in polynomial multiplication against [`MAX_CORRECTION_WORK`].
#[derive(Default)]
struct Meter {
    used: u64,
}

impl Meter {
    /// `a · b`, or `Err(None)` when its cost would pass the limit. The cost is an upper
    /// bound: the product of the term counts, each product of two terms weighed by the size of
    /// the largest coefficients (1 below 2^64; 36 for two hundred-digit ones), since a rule
    /// with 3,000-digit constants spent 37 s here with few terms.
    fn mul(&mut self, a: &Poly, b: &Poly) -> Result<Poly, Option<usize>> {
        let weight = (1 + a.extra_coeff_words()).saturating_mul(1 + b.extra_coeff_words());
        let pairs = (a.term_count() as u64).saturating_mul(b.term_count() as u64);
        self.used = self.used.saturating_add(pairs.saturating_mul(weight));
        if self.used > MAX_CORRECTION_WORK {
            return Err(None);
        }
        Ok(a * b)
    }
}

/// The most terms a symbolic correction's numerator may have over the common denominator
/// before it is reduced. The size grows about geometrically with n and the number of
/// parameters: a rule with three parameter factors above and three below has 1,282 terms at
/// c₄, 40,038 at c₈ and 369,286 at c₁₂ (4 minutes to reduce). Nobody reads such a
/// correction; the numbers at given parameter values are still computed for every n.
pub const MAX_CORRECTION_TERMS: usize = 2000;

impl Tail {
    /// γ = −θ, the power-law tail exponent, when the law is a pure power (r = 1, d = 0).
    pub fn tail_exponent(&self) -> Option<RatFunc> {
        (self.factorial_power == 0 && self.rate.is_one()).then(|| -self.power.clone())
    }
}

/// The shifts `h_i = 1 + α_i` with their exponents.
fn gamma_shifts(form: &RisingForm) -> Vec<(RatFunc, i32)> {
    form.factors
        .iter()
        .map(|(alpha, e)| (alpha + &RatFunc::one(), *e))
        .collect()
}

/// `δ_m = Σ_i e_i (−1)^(m+1) B_{m+1}(h_i) / (m(m+1))` for m = 1..=count (DLMF 5.11.8).
pub fn log_coefficients(form: &RisingForm, count: usize) -> Vec<RatFunc> {
    let numbers = bernoulli_numbers(count + 1);
    let shifts = gamma_shifts(form);
    (1..=count)
        .map(|m| {
            let mut sum = RatFunc::zero();
            for (h, e) in &shifts {
                let b = bernoulli_polynomial(m + 1, h, &numbers);
                sum = &sum + &(&b * &RatFunc::from_integer(*e as i64));
            }
            let sign = if m % 2 == 1 { 1 } else { -1 };
            let denominator = Q::from_integer(BigInt::from((m * (m + 1)) as u64));
            &sum * &RatFunc::constant(Q::from_integer(BigInt::from(sign)) / denominator)
        })
        .collect()
}

/// The coefficients of `exp(Σ_{m≥1} δ_m x^m) = Σ c_n x^n`, from `n c_n = Σ_{m=1}^n m δ_m c_{n−m}`
/// (differentiate `E = exp(D)`: `E' = D'E`, common practice for power series).
pub fn exp_series(deltas: &[RatFunc]) -> Vec<RatFunc> {
    let mut c = vec![RatFunc::one()];
    for n in 1..=deltas.len() {
        let mut sum = RatFunc::zero();
        for m in 1..=n {
            let term = &(&deltas[m - 1] * &c[n - m]) * &RatFunc::from_integer(m as i64);
            sum = &sum + &term;
        }
        c.push(&sum * &RatFunc::constant(Q::new(BigInt::one(), BigInt::from(n as u64))));
    }
    c
}

/// c₁ … c_count as rational functions of the parameters: [`log_coefficients`] and
/// [`exp_series`] computed over one common denominator. With `h_i = P_i/D`, `δ_m = A_m/D^(m+1)`
/// and `c_n = C_n/D^(2n)` where `C_n = (1/n) Σ_{m=1}^n m A_m C_{n−m} D^(m−1)` — polynomial
/// arithmetic only, and one reduction per `c_n` at the end (reducing every intermediate sum
/// made `--terms 10` take 21 s on a one-parameter rule). Stops before the first `c_n` whose
/// numerator has more than [`MAX_CORRECTION_TERMS`] terms, and says which were left out.
pub fn symbolic_corrections(
    form: &RisingForm,
    count: usize,
) -> (Vec<RatFunc>, Option<OmittedCorrections>) {
    let shifts = gamma_shifts(form);
    // D = lcm of the shifts' denominators.
    let mut common = Poly::one();
    for (h, _) in &shifts {
        let g = Poly::gcd(&common, h.denom());
        let cofactor = h.denom().div_exact(&g).expect("the gcd divides");
        common = &common * &cofactor;
    }
    let numerators: Vec<(Poly, i32)> = shifts
        .iter()
        .map(|(h, e)| {
            let scale = common.div_exact(h.denom()).expect("D is a multiple");
            (h.numer() * &scale, *e)
        })
        .collect();
    let numbers = bernoulli_numbers(count + 1);
    let mut meter = Meter::default();
    // Powers of D and of each P_i, extended as the corrections need them.
    let mut d_powers = vec![Poly::one()];
    let mut p_powers: Vec<Vec<Poly>> = numerators.iter().map(|_| vec![Poly::one()]).collect();
    let mut a: Vec<Poly> = Vec::new();
    let mut c = vec![Poly::one()];
    let mut written = Vec::new();
    let mut denominator = Poly::one();
    for n in 1..=count {
        let built = (|| {
            // D^j and P_i^j for j ≤ n + 1, which A_n needs.
            while d_powers.len() < n + 2 {
                let next = meter.mul(d_powers.last().expect("D⁰"), &common)?;
                d_powers.push(next);
            }
            for ((p, _), powers) in numerators.iter().zip(&mut p_powers) {
                while powers.len() < n + 2 {
                    let next = meter.mul(powers.last().expect("P⁰"), p)?;
                    powers.push(next);
                }
            }
            // A_m = (−1)^(m+1)/(m(m+1)) Σ_i e_i D^(m+1) B_{m+1}(P_i/D), with
            // D^n B_n(P/D) = Σ_j C(n, j) B_j P^(n−j) D^j (DLMF 24.2.5); here m = n.
            let (m, degree) = (n, n + 1);
            let mut sum = Poly::zero();
            for ((_, e), powers) in numerators.iter().zip(&p_powers) {
                let mut binom = BigInt::one();
                let mut b = Poly::zero();
                for (j, bj) in numbers.iter().enumerate().take(degree + 1) {
                    if !bj.is_zero() {
                        let coefficient = bj * Q::from_integer(binom.clone());
                        b += &meter
                            .mul(&powers[degree - j], &d_powers[j])?
                            .scale(&coefficient);
                    }
                    binom = binom * BigInt::from(degree - j) / BigInt::from(j + 1);
                }
                sum += &b.scale(&Q::from_integer(BigInt::from(*e)));
            }
            let sign = if m % 2 == 1 { 1 } else { -1 };
            a.push(sum.scale(&Q::new(
                BigInt::from(sign),
                BigInt::from((m * (m + 1)) as u64),
            )));
            // C_n = (1/n) Σ_{m=1}^n m A_m C_{n−m} D^(m−1)
            let mut sum = Poly::zero();
            for m in 1..=n {
                let product = meter.mul(&a[m - 1], &c[n - m])?;
                let term = meter.mul(&product, &d_powers[m - 1])?;
                sum += &term.scale(&Q::from_integer(BigInt::from(m as u64)));
            }
            if sum.term_count() > MAX_CORRECTION_TERMS {
                return Err(Some(sum.term_count()));
            }
            let next_denominator = meter.mul(&denominator, &d_powers[2])?;
            Ok((sum, next_denominator))
        })();
        let (sum, next_denominator) = match built {
            Ok(parts) => parts,
            Err(terms) => {
                return (
                    written,
                    Some(OmittedCorrections {
                        first: n,
                        last: count,
                        terms,
                    }),
                );
            }
        };
        denominator = next_denominator;
        let c_n = sum.scale(&Q::new(BigInt::one(), BigInt::from(n as u64)));
        written.push(RatFunc::new(c_n.clone(), denominator.clone()).expect("D is not zero"));
        c.push(c_n);
    }
    (written, None)
}

/// The tail law with `terms` correction coefficients.
pub fn tail_law(form: &RisingForm, base_index: &BigInt, terms: usize) -> Tail {
    let shifts = gamma_shifts(form);
    let d = form.degree_difference();
    let half = RatFunc::constant(Q::new(BigInt::one(), BigInt::from(2)));
    let mut power = RatFunc::zero();
    for (h, e) in &shifts {
        power = &power + &(&(h - &half) * &RatFunc::from_integer(*e as i64));
    }
    let b = RatFunc::constant(Q::from_integer(base_index.clone()));
    // C = r^(−b) · (2π)^(d/2) · Π Γ(b + h_i)^(−e_i)
    let mut atoms: Vec<(Atom, i32)> = shifts
        .iter()
        .map(|(h, e)| (Atom::Gamma(RatKey(&b + h)), -e))
        .collect();
    if d != 0 {
        atoms.push((
            Atom::Power {
                base: RatKey(RatFunc::from_integer(2)),
                exponent: RatKey(RatFunc::constant(Q::new(BigInt::from(d), BigInt::from(2)))),
            },
            1,
        ));
        atoms.push((Atom::SqrtPi, d as i32));
    }
    // r^(−b) as a power atom: `Term::normalized` folds it into the coefficient when it
    // expands briefly, and keeps it a power of a rate with many terms.
    if !base_index.is_zero() && !form.constant.is_one() {
        atoms.push((
            Atom::Power {
                base: RatKey(form.constant.clone()),
                exponent: RatKey(RatFunc::constant(Q::from_integer(-base_index.clone()))),
            },
            1,
        ));
    }
    let prefactor_term = Term {
        coefficient: RatFunc::one(),
        atoms,
    }
    .normalized();
    let (corrections, omitted) = symbolic_corrections(form, terms);
    Tail {
        rate: form.constant.clone(),
        factorial_power: d,
        power,
        prefactor: term_to_product(&prefactor_term),
        prefactor_term,
        corrections,
        omitted,
    }
}

/// A term of Gamma values, powers and √π as a closed-form product (exp and ln have no
/// closed-form factor; they do not occur in a prefactor).
pub fn term_to_product(t: &Term) -> Product {
    let mut factors = Vec::new();
    for (atom, e) in &t.atoms {
        match atom {
            Atom::Gamma(RatKey(x)) => factors.push(Factor::Gamma {
                arg: Affine::constant(x.clone()),
                exponent: *e,
            }),
            Atom::Power { base, exponent } => factors.push(Factor::Power {
                base: base.0.clone(),
                exponent: Affine::constant(&exponent.0 * &RatFunc::from_integer(*e as i64)),
            }),
            Atom::SqrtPi => factors.push(Factor::SqrtPi { half_exponent: *e }),
            Atom::Exp(_) | Atom::Log(_) => {}
        }
    }
    Product {
        coefficient: t.coefficient.clone(),
        factors,
    }
}

/// The corrections c₀ = 1, c₁ … c_count as exact rationals when every parameter has a value:
/// the same recurrences as [`log_coefficients`] and [`exp_series`] in plain rationals, fast
/// enough for the few dozen terms an Euler–Maclaurin tail needs.
pub fn numeric_corrections(
    form: &RisingForm,
    values: &BTreeMap<String, Q>,
    count: usize,
) -> Option<Vec<Q>> {
    let form = form.substituted(values);
    let shifts: Vec<(Q, i32)> = form
        .factors
        .iter()
        .map(|(alpha, e)| Some((alpha.as_constant()? + Q::one(), *e)))
        .collect::<Option<_>>()?;
    let numbers = bernoulli_numbers(count + 1);
    let deltas: Vec<Q> = (1..=count)
        .map(|m| {
            let mut sum = Q::from_integer(BigInt::from(0));
            for (h, e) in &shifts {
                sum +=
                    bernoulli_polynomial_at(m + 1, h, &numbers) * Q::from_integer(BigInt::from(*e));
            }
            let sign = if m % 2 == 1 { 1 } else { -1 };
            sum * Q::new(BigInt::from(sign), BigInt::from((m * (m + 1)) as u64))
        })
        .collect();
    let mut c = vec![Q::one()];
    for n in 1..=count {
        let mut sum = Q::from_integer(BigInt::from(0));
        for m in 1..=n {
            sum += &deltas[m - 1] * &c[n - m] * Q::from_integer(BigInt::from(m as u64));
        }
        c.push(sum / Q::from_integer(BigInt::from(n as u64)));
    }
    Some(c)
}

/// [`numeric_corrections`] in GMP rationals, for the long lists an Euler–Maclaurin tail
/// needs (the same recurrences; num-bigint's gcds made this the slowest step).
pub fn numeric_corrections_gmp(
    form: &RisingForm,
    values: &BTreeMap<String, Q>,
    count: usize,
) -> Option<Vec<rug::Rational>> {
    use crate::numeric::to_rug_rational;
    use rug::Rational;
    let form = form.substituted(values);
    let shifts: Vec<(Rational, i32)> = form
        .factors
        .iter()
        .map(|(alpha, e)| Some((to_rug_rational(&(alpha.as_constant()? + Q::one())), *e)))
        .collect::<Option<_>>()?;
    let numbers = super::bernoulli::bernoulli_numbers_gmp(count + 1);
    // B_n(h) = Σ_j C(n, j) B_j h^(n−j) (DLMF 24.2.5), by Horner's scheme
    let poly_at = |n: usize, h: &Rational| -> Rational {
        let mut binom = rug::Integer::from(1);
        let mut acc = Rational::new();
        for (j, bj) in numbers.iter().enumerate().take(n + 1) {
            acc *= h;
            acc += Rational::from(bj * &binom);
            binom *= (n - j) as u64;
            binom /= (j + 1) as u64;
        }
        acc
    };
    let deltas: Vec<Rational> = (1..=count)
        .map(|m| {
            let mut sum = Rational::new();
            for (h, e) in &shifts {
                sum += poly_at(m + 1, h) * *e;
            }
            let sign: i64 = if m % 2 == 1 { 1 } else { -1 };
            sum * Rational::from((sign, (m * (m + 1)) as u64))
        })
        .collect();
    let mut c = vec![Rational::from(1)];
    for n in 1..=count {
        let mut sum = Rational::new();
        for m in 1..=n {
            sum += Rational::from(&deltas[m - 1] * &c[n - m]) * m as u64;
        }
        c.push(sum / n as u64);
    }
    Some(c)
}

/// Coefficients c_n for the numeric tail sums, with a bound on each one's error.
#[derive(Clone, Debug)]
pub struct FloatCorrections {
    pub values: Vec<rug::Float>,
    pub errors: Vec<rug::Float>,
}

/// Corrections computed exactly before the rest go to MPFR: the short lists of ordinary
/// precisions stay exact, and an expansion that terminates early shows its exact zeros.
const EXACT_CORRECTIONS: usize = 48;

/// [`numeric_corrections_gmp`] for the long lists of a high-precision Euler–Maclaurin tail:
/// the first [`EXACT_CORRECTIONS`] exact, the rest by the same recurrences in MPFR at `prec`
/// bits plus guard bits, each with a forward error bound carried beside it (Higham, *Accuracy
/// and Stability of Numerical Algorithms*, 2002, §3.1 and §5.1: a sum or Horner's scheme of
/// n terms errs by at most γ_2n = 2n·u/(1 − 2n·u) times the sum of the terms' magnitudes).
/// Exact rationals made this the slowest step at 1000 digits (2.5 s of the citation
/// example's 5 s).
pub fn numeric_corrections_float(
    form: &RisingForm,
    values: &BTreeMap<String, Q>,
    count: usize,
    prec: u32,
) -> Option<FloatCorrections> {
    use rug::Float;
    let exact_count = count.min(EXACT_CORRECTIONS);
    let exact = numeric_corrections_gmp(form, values, exact_count)?;
    let working = prec + 64 + count as u32 / 4;
    let (mut floats, mut errors) = corrections_in_floats(form, values, count, working)?;
    // The exact ones, rounded once to the working precision (half an ulp, counted as one).
    for (n, c) in exact.iter().enumerate() {
        floats[n] = Float::with_val(working, c);
        errors[n] = Float::with_val(64, floats[n].abs_ref())
            * Float::with_val(64, Float::i_exp(1, 1 - working as i32));
    }
    Some(FloatCorrections {
        values: floats,
        errors,
    })
}

/// The recurrences of [`numeric_corrections_gmp`] in MPFR at `prec` bits, and a bound on
/// each result's absolute error, carried in 64-bit floats rounded upwards by a factor 2.
fn corrections_in_floats(
    form: &RisingForm,
    values: &BTreeMap<String, Q>,
    count: usize,
    prec: u32,
) -> Option<(Vec<rug::Float>, Vec<rug::Float>)> {
    use crate::numeric::to_rug_rational;
    use rug::Float;
    let form = form.substituted(values);
    let shifts: Vec<(Float, i32)> = form
        .factors
        .iter()
        .map(|(alpha, e)| {
            Some((
                Float::with_val(prec, to_rug_rational(&(alpha.as_constant()? + Q::one()))),
                *e,
            ))
        })
        .collect::<Option<_>>()?;
    let numbers: Vec<Float> = super::bernoulli::bernoulli_numbers_gmp(count + 1)
        .iter()
        .map(|b| Float::with_val(prec, b))
        .collect();
    // The unit roundoff u = 2^(1−p), and γ_k = k·u doubled (2ku < 1 by far here).
    let u = Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
    let gamma = |k: usize| Float::with_val(64, &u * (4 * k as u64));
    let low = |x: &Float| Float::with_val(64, x.abs_ref());
    // B_n(h) = Σ_j C(n, j) B_j h^(n−j) (DLMF 24.2.5), by Horner's scheme; its error is at most
    // γ_(2n+2) · Σ_j |C(n, j) B_j| |h|^(n−j), the rounded h and B_j included as one more
    // rounding each (the same scheme on magnitudes, in 64 bits).
    let poly_at = |n: usize, h: &Float| -> (Float, Float) {
        let mut binom = rug::Integer::from(1);
        let mut acc = Float::new(prec);
        let mut magnitude = Float::new(64);
        let h_abs = low(h);
        for (j, bj) in numbers.iter().enumerate().take(n + 1) {
            acc *= h;
            let term = Float::with_val(prec, bj * &binom);
            magnitude = magnitude * &h_abs + low(&term);
            acc += term;
            binom *= (n - j) as u64;
            binom /= (j + 1) as u64;
        }
        // |h| rounded relatively by u moves h^(n−j) by at most (n−j)·u relatively.
        let error = magnitude * gamma(3 * n + 3);
        (acc, error)
    };
    let mut deltas = Vec::with_capacity(count);
    let mut delta_errors = Vec::with_capacity(count);
    for m in 1..=count {
        let mut sum = Float::new(prec);
        let mut error = Float::new(64);
        let mut magnitude = Float::new(64);
        for (h, e) in &shifts {
            let (b, b_error) = poly_at(m + 1, h);
            let scaled = b * *e;
            magnitude += low(&scaled);
            error += b_error * e.unsigned_abs();
            sum += scaled;
        }
        let sign: i32 = if m % 2 == 1 { 1 } else { -1 };
        let delta = sum * sign / (m * (m + 1)) as u64;
        let error = (error + magnitude * gamma(shifts.len() + 2)) / (m * (m + 1)) as u64;
        deltas.push(delta);
        delta_errors.push(error);
    }
    let mut c = vec![Float::with_val(prec, 1)];
    let mut c_errors = vec![Float::new(64)];
    for n in 1..=count {
        let mut sum = Float::new(prec);
        let mut error = Float::new(64);
        let mut magnitude = Float::new(64);
        for m in 1..=n {
            let product = Float::with_val(prec, &deltas[m - 1] * &c[n - m]) * m as u64;
            let (d, dc) = (low(&deltas[m - 1]), low(&c[n - m]));
            // |δ·ε_c| + |ε_δ·c| + |ε_δ·ε_c|, times m
            let propagated = Float::with_val(64, &d * &c_errors[n - m])
                + Float::with_val(64, &delta_errors[m - 1] * &dc)
                + Float::with_val(64, &delta_errors[m - 1] * &c_errors[n - m]);
            error += propagated * m as u64;
            magnitude += low(&product);
            sum += product;
        }
        let error = (error + magnitude * gamma(n + 2)) * 2u32 / n as u64;
        c.push(sum / n as u64);
        c_errors.push(error);
    }
    Some((c, c_errors))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::model::build_problem;

    #[test]
    fn float_corrections_hold_the_exact_ones_within_their_bounds() {
        // The MPFR recurrences against the exact GMP ones (the same DLMF 24.2.5 / 5.11.13
        // expansion): every c_n within its stated error bound, and the bound tiny.
        let problem = build_problem("a(k)/a(k-1) = (k-1/2)(k+1/3)/((k+2)(k+5/2))").unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        let exact = numeric_corrections_gmp(&form, &BTreeMap::new(), 90).unwrap();
        let floats = numeric_corrections_float(&form, &BTreeMap::new(), 90, 400).unwrap();
        for (n, c) in exact.iter().enumerate() {
            let e = rug::Float::with_val(600, c);
            let diff = rug::Float::with_val(64, &e - &floats.values[n]).abs();
            assert!(
                diff <= floats.errors[n],
                "c_{n}: {diff} > {}",
                floats.errors[n]
            );
            let scale = rug::Float::with_val(64, e.abs_ref()).max(&rug::Float::with_val(64, 1));
            assert!(
                floats.errors[n] < scale * 1e-90f64,
                "c_{n}: bound {}",
                floats.errors[n]
            );
        }
    }

    fn law(rule: &str, terms: usize) -> Tail {
        let problem = build_problem(rule).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        tail_law(&form, &problem.base_index(), terms)
    }

    #[test]
    fn yule_simon_tail() {
        // a(k) ~ Γ(α+2) k^(−(α+1)) (reference file, yule_simon tail, scipy.stats.yulesimon)
        let t = law("a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2", 2);
        let alpha = RatFunc::var("alpha");
        assert!(t.rate.is_one());
        assert_eq!(t.factorial_power, 0);
        assert_eq!(t.power, -(&alpha + &RatFunc::one()));
        assert_eq!(t.tail_exponent(), Some(&alpha + &RatFunc::one()));
        assert_eq!(
            t.prefactor.factors,
            vec![Factor::Gamma {
                arg: Affine::constant(&alpha + &RatFunc::from_integer(2)),
                exponent: 1
            }]
        );
        // c₁ = −α(α+1)/2: the first coefficient of DLMF 5.11.13, (a−b)(a+b−1)/2, for
        // Γ(k+a)/Γ(k+b) with a = 0, b = α+1
        let c1 = &(&alpha * &(&alpha + &RatFunc::one())) * &RatFunc::constant(q(-1, 2));
        assert_eq!(t.corrections[0], c1);
    }

    #[test]
    fn poisson_tail_is_stirling() {
        // λ^k/k! ~ (2π)^(−1/2) λ^k (k/e)^(−k) k^(−1/2) (1 − 1/(12k) + 1/(288k²) …)
        // (Stirling's series, DLMF 5.11.3 / 5.11.8 with h = 1)
        let t = law("a(k)/a(k-1) = lambda/k for k >= 1", 2);
        assert_eq!(t.factorial_power, -1);
        assert_eq!(t.power, RatFunc::constant(q(-1, 2)));
        assert_eq!(t.corrections[0], RatFunc::constant(q(-1, 12)));
        assert_eq!(t.corrections[1], RatFunc::constant(q(1, 288)));
    }

    #[test]
    fn gmp_and_exact_corrections_agree() {
        let problem =
            build_problem("a(k)/a(k-1) = (k-1)/(k+1/3) * (k+1/2)/(k+3/4) for k >= 2").unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        let exact = numeric_corrections(&form, &BTreeMap::new(), 8).unwrap();
        let gmp = numeric_corrections_gmp(&form, &BTreeMap::new(), 8).unwrap();
        for (a, b) in exact.iter().zip(&gmp) {
            assert_eq!(crate::numeric::to_rug_rational(a), *b);
        }
    }

    #[test]
    fn common_denominator_corrections_equal_the_reduced_recurrences() {
        // The same c_n as log_coefficients + exp_series reduced at every step.
        for rule in [
            "n(k)/n(k-1) = (1-rho)(k-1) / (1 + (1-rho) k) for k >= 2",
            "a(k)/a(k-1) = (k+s)(k+t)/((k+u)(k+1/3)) for k >= 1",
            "a(k)/a(k-1) = lambda/k for k >= 1",
        ] {
            let problem = build_problem(rule).unwrap();
            let form = RisingForm::from_ratio(&problem.ratio);
            let mut reduced = exp_series(&log_coefficients(&form, 5));
            reduced.remove(0);
            assert_eq!(symbolic_corrections(&form, 5), (reduced, None), "{rule}");
        }
    }

    #[test]
    fn corrections_past_the_term_limit_are_omitted_and_the_rest_are_exact() {
        // Three parameter factors above and three below: c₅ has 3646 terms over the common
        // denominator. c₁ … c₄ are the same as the step-by-step reduced recurrences.
        let rule = "a(k)/a(k-1) = (k+al)*(k+be)*(k+ep)/((k+ga)*(k+de)*(k+ze)) for k >= 1";
        let problem = build_problem(rule).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        let (written, omitted) = symbolic_corrections(&form, 8);
        let mut reduced = exp_series(&log_coefficients(&form, 4));
        reduced.remove(0);
        assert_eq!(written, reduced);
        assert_eq!(
            omitted,
            Some(OmittedCorrections {
                first: 5,
                last: 8,
                terms: Some(3646)
            })
        );
        // A request that stops short of the limit omits nothing.
        assert_eq!(symbolic_corrections(&form, 4).1, None);
    }

    #[test]
    fn corrections_past_the_work_limit_are_omitted_before_they_are_built() {
        // A fuzzed model (shifts in nine names with 17-digit numbers, `fuzz/corpus/model`):
        // c₁ has 744 terms, and building c₂ would take more products of terms than the limit.
        let text = "(k-B-666666666666666kVVVVVVVVVVVVVVVVVV6666666k)/p(k-1) (k+3(k+3h)10rho+00+3(k+3h)10rh)/p(k-1) (k+3(k+3h)10rho+00+3VVVVVV6666667k)/p(k-1) (k+3(k+3(k+3h)10rhk+3h0r)1ho+00h)";
        let model = crate::model::build_model(text).unwrap();
        let pieces = model.resolve(&BTreeMap::new()).unwrap();
        let form = RisingForm::from_ratio(&pieces[0].problem.ratio);
        let (written, omitted) = symbolic_corrections(&form, 3);
        let omitted = omitted.expect("too large");
        assert_eq!(omitted.terms, None, "{omitted:?}");
        assert_eq!(written.len(), omitted.first - 1);
        assert_eq!(omitted.last, 3);
    }

    #[test]
    fn negative_binomial_tail() {
        // Γ(k+n)/(Γ(k+1)Γ(n)) (1−p)^k ~ (1/Γ(n)) (1−p)^k k^(n−1) (reference file, nbinom)
        let t = law("a(k)/a(k-1) = (k+n-1)*(1-p)/k for k >= 1", 1);
        let n = RatFunc::var("n");
        assert_eq!(t.power, &n - &RatFunc::one());
        assert_eq!(t.rate, &RatFunc::one() - &RatFunc::var("p"));
        assert_eq!(t.prefactor.factors.len(), 1);
        assert_eq!(t.tail_exponent(), None);
    }
}
