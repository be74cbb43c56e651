//! What is wrong with a refuted claim, with the evidence: a constant factor, a wrong base
//! value, an index shift, a wrong power of k, a wrong geometric rate, or else the first point
//! where claim and truth part.
//!
//! The exact route answers in exact terms when the claim is a hypergeometric term (the claim's
//! ratio divided by the rule's, q(k), is a rational function whose limits name the rate and
//! the power); the numeric route answers for every claim from values at one parameter point.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive};
use rug::float::Constant;
use rug::ops::Pow;
use rug::Float;

use crate::algebra::{RatFunc, Q};
use crate::model::Problem;
use crate::numeric::{decimal, to_rug_rational, LogReal};

use super::claim::Claim;
use super::estimate::{
    float_quantity, is_one, log_quotient, numeric_quantity_digits, shifted_factor, SHOWN_DIGITS,
    SMALL_DENOMINATOR,
};
use super::exact::{self, ExactValue, Growth};
use super::hyper::HyperTerm;
use super::numeric_route::{claim_precision, PointRun};
use super::{BaseCheck, CheckRequest, ExactRoute};

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    /// claim = c · truth with a constant c ≠ 1 (the claim names the base term).
    ConstantFactor,
    /// The claim solves the rule but starts from another base value (or is not proportional
    /// to the base term).
    WrongBaseValue,
    /// claim(k) = truth(k + shift).
    IndexShift,
    /// claim/truth ~ C·k^δ.
    WrongPowerOfK,
    /// claim/truth ~ C·r^k.
    WrongGeometricRate,
    /// None of the above: the first point where they part.
    PartsAt,
}

impl Kind {
    pub fn name(self) -> &'static str {
        match self {
            Kind::ConstantFactor => "constant_factor",
            Kind::WrongBaseValue => "wrong_base_value",
            Kind::IndexShift => "index_shift",
            Kind::WrongPowerOfK => "wrong_power_of_k",
            Kind::WrongGeometricRate => "wrong_geometric_rate",
            Kind::PartsAt => "parts_at",
        }
    }
}

/// A number found by the diagnosis: its decimal value at the evidence point, its exact form
/// when the exact route gives one, and a nearby simple fraction for numeric estimates.
#[derive(Clone, Debug, PartialEq)]
pub struct Quantity {
    pub decimal: String,
    pub exact: Option<ExactValue>,
    pub near: Option<Q>,
}

/// The first place where claim and truth differ.
#[derive(Clone, Debug, PartialEq)]
pub struct Parting {
    pub k: BigInt,
    pub values: BTreeMap<String, Q>,
    pub base: Q,
    /// The claim's value, or why it has none.
    pub claim: String,
    pub truth: String,
    pub rel_diff: String,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Diagnosis {
    pub kind: Kind,
    /// claim / truth, when constant.
    pub factor: Option<Quantity>,
    /// truth / claim: what the claim misses.
    pub missing: Option<Quantity>,
    /// The claim's value at the base index, and the base value it should have.
    pub claim_at_base: Option<String>,
    pub base_value: Option<Q>,
    /// The power of the base term when it is not 1.
    pub base_power: Option<i32>,
    pub shift: Option<i64>,
    /// δ in claim/truth ~ C·k^δ.
    pub exponent_error: Option<Quantity>,
    /// r in claim/truth ~ C·r^k.
    pub rate_error: Option<Quantity>,
    /// d in claim/truth ~ C·(k!)^d.
    pub factorial_power: Option<i64>,
    /// The parameter point of the numeric evidence.
    pub evidence_at: BTreeMap<String, Q>,
    pub parting: Option<Parting>,
}

impl Diagnosis {
    fn new(kind: Kind, evidence_at: BTreeMap<String, Q>) -> Self {
        Diagnosis {
            kind,
            factor: None,
            missing: None,
            claim_at_base: None,
            base_value: None,
            base_power: None,
            shift: None,
            exponent_error: None,
            rate_error: None,
            factorial_power: None,
            evidence_at,
            parting: None,
        }
    }
}

/// Where the growth of claim/truth is read (offsets from the base index); the last one only
/// confirms that ln|claim/truth| really has the form ln C + k ln r + δ ln k + O(1/k).
const FAR: [u64; 3] = [100_000, 1_000_000, 300_000];

/// Finds what is wrong. `runs` is non-empty.
pub fn diagnose(
    problem: &Problem,
    claim: &Claim,
    term: Option<&HyperTerm>,
    exact: Option<&ExactRoute>,
    runs: &[PointRun],
    request: &CheckRequest,
    tol: &Float,
) -> Diagnosis {
    let run = runs.iter().find(|r| !r.agrees).unwrap_or(&runs[0]);
    let prec = claim_precision(request.digits);
    let index = problem.index.as_str();
    let values = run.truth.point.values.clone();
    let parting = first_parting(run, tol, request.digits);
    let mut d = match exact {
        // The exact route found nothing wrong, yet the values differ: the claim is undefined
        // (0/0, a pole) or vanishes somewhere the truth does not.
        Some(e) if e.ratios_agree && e.base_agrees => {
            Diagnosis::new(Kind::PartsAt, BTreeMap::new())
        }
        Some(e) => exact_diagnosis(claim, term, e, run, request, prec, tol, index),
        None => numeric_diagnosis(claim, run, prec, tol),
    };
    d.evidence_at = values;
    d.parting = parting;
    d
}

fn first_parting(run: &PointRun, tol: &Float, digits: u32) -> Option<Parting> {
    let c = run
        .comparisons
        .iter()
        .find(|c| c.rel_diff > *tol || c.rel_diff.is_nan())?;
    Some(Parting {
        k: c.k.clone(),
        values: run.truth.point.values.clone(),
        base: run.truth.point.base.clone(),
        claim: match &c.claim {
            Ok(v) => v.to_decimal(digits.min(SHOWN_DIGITS * 2)),
            Err(why) => format!("undefined ({})", why.0),
        },
        truth: c.truth.to_decimal(digits.min(SHOWN_DIGITS * 2)),
        rel_diff: decimal::short(&c.rel_diff),
    })
}

/// An exact value at the evidence point, as decimals.
fn exact_quantity(v: &ExactValue, values: &BTreeMap<String, Q>, prec: u32) -> Quantity {
    let decimal = match v.rational.eval(values) {
        Ok(q) => {
            let mut x = Float::with_val(prec, to_rug_rational(&q));
            if v.half_pi != 0 {
                let pi = Float::with_val(prec, Constant::Pi);
                x *= pi.pow(Float::with_val(prec, v.half_pi) / 2u32);
            }
            decimal::float_to_decimal(&x, SHOWN_DIGITS)
        }
        Err(_) => "undefined".into(),
    };
    Quantity {
        decimal,
        exact: Some(v.clone()),
        near: None,
    }
}

fn plain(r: RatFunc) -> ExactValue {
    ExactValue {
        rational: r,
        half_pi: 0,
    }
}

#[allow(clippy::too_many_arguments)]
fn exact_diagnosis(
    claim: &Claim,
    term: Option<&HyperTerm>,
    e: &ExactRoute,
    run: &PointRun,
    request: &CheckRequest,
    prec: u32,
    tol: &Float,
    index: &str,
) -> Diagnosis {
    let values = run.truth.point.values.clone();
    if e.ratios_agree {
        return base_diagnosis(claim, term, e, run, request, prec, tol);
    }
    for s in [1i64, -1, 2, -2] {
        if exact::is_shift_of(&e.claim_ratio, &e.rule_ratio, s, index) {
            let mut d = Diagnosis::new(Kind::IndexShift, values.clone());
            d.shift = Some(s);
            let base = request
                .base
                .clone()
                .unwrap_or_else(|| Q::from_integer(1.into()));
            if let Some(f) = term.and_then(|t| shift_factor(t, e, run, s, &base, index)) {
                if !f.is_one() {
                    d.factor = Some(exact_quantity(&f, &values, prec));
                    d.missing = Some(exact_quantity(&inverse(&f), &values, prec));
                }
            } else if let Some((f, m)) = shifted_factor(claim, run, s, prec, tol) {
                if !is_one(&f) {
                    d.factor = Some(f);
                    d.missing = Some(m);
                }
            }
            return d;
        }
    }
    let q_ratio = e
        .claim_ratio
        .checked_div(&e.rule_ratio)
        .expect("the rule's ratio is non-zero");
    match exact::growth(&q_ratio, index) {
        Some(Growth::Rate(r)) => {
            let mut d = Diagnosis::new(Kind::WrongGeometricRate, values.clone());
            d.rate_error = Some(exact_quantity(&plain(r), &values, prec));
            if let Some(Growth::Power(delta)) = power_after_rate(&q_ratio, index) {
                d.exponent_error = Some(exact_quantity(&plain(delta), &values, prec));
            }
            d
        }
        Some(Growth::Power(delta)) => {
            let mut d = Diagnosis::new(Kind::WrongPowerOfK, values.clone());
            d.exponent_error = Some(exact_quantity(&plain(delta), &values, prec));
            d
        }
        Some(Growth::FactorialPower(n)) => {
            let mut d = Diagnosis::new(Kind::PartsAt, values);
            d.factorial_power = Some(n);
            d
        }
        _ => Diagnosis::new(Kind::PartsAt, values),
    }
}

fn inverse(v: &ExactValue) -> ExactValue {
    ExactValue {
        rational: v.rational.inv().unwrap_or_else(RatFunc::zero),
        half_pi: -v.half_pi,
    }
}

/// claim(k)/truth(k + s) exactly, read at the first k where both sides are defined: the
/// claim's exact value there over the truth's Π R(j) from the base (DLMF 5.2.5 in reverse).
fn shift_factor(
    term: &HyperTerm,
    e: &ExactRoute,
    run: &PointRun,
    s: i64,
    base: &Q,
    index: &str,
) -> Option<ExactValue> {
    let b = run.truth.base_index();
    let k0 = b + BigInt::from((-s).max(0));
    let form = exact::gamma_form(term, index);
    let claim_value = exact::value_at(&form, term, &k0, index)?;
    let mut truth = RatFunc::one();
    let mut j: BigInt = b + 1;
    let last: BigInt = &k0 + s;
    while j <= last {
        let at = RatFunc::constant(Q::from_integer(j.clone()));
        truth = &truth * &e.rule_ratio.substitute(index, &at)?;
        j += 1;
    }
    let truth = match term.base_power {
        1 => truth,
        0 => &truth * &RatFunc::constant(base.clone()),
        _ => return None,
    };
    claim_value.divided_by(&truth)
}

/// The power left once the rate is divided out: q(k)/r = 1 + δ/k + ….
fn power_after_rate(q_ratio: &RatFunc, index: &str) -> Option<Growth> {
    let Some(Growth::Rate(r)) = exact::growth(q_ratio, index) else {
        return None;
    };
    exact::growth(&q_ratio.checked_div(&r)?, index)
}

/// The claim's ratio is right; its value at the base index is not.
fn base_diagnosis(
    claim: &Claim,
    term: Option<&HyperTerm>,
    e: &ExactRoute,
    run: &PointRun,
    request: &CheckRequest,
    prec: u32,
    tol: &Float,
) -> Diagnosis {
    let values = run.truth.point.values.clone();
    let base_power = term.map(|t| t.base_power).unwrap_or(1);
    let kind = if base_power == 1 {
        Kind::ConstantFactor
    } else {
        Kind::WrongBaseValue
    };
    let mut d = Diagnosis::new(kind, values.clone());
    if base_power != 0 && base_power != 1 {
        d.base_power = Some(base_power);
        return d;
    }
    let expected = request
        .base
        .clone()
        .unwrap_or_else(|| Q::from_integer(1.into()));
    match &e.base_check {
        BaseCheck::Exact(v) => {
            let divisor = if base_power == 1 {
                RatFunc::one()
            } else {
                RatFunc::constant(expected.clone())
            };
            if let Some(f) = v.divided_by(&divisor) {
                d.factor = Some(exact_quantity(&f, &values, prec));
                d.missing = Some(exact_quantity(&inverse(&f), &values, prec));
            }
            if base_power == 0 {
                d.claim_at_base = Some(exact_quantity(v, &values, prec).decimal);
                d.base_value = Some(expected);
            }
        }
        BaseCheck::Numeric => {
            let Some((f, m)) = shifted_factor(claim, run, 0, prec, tol) else {
                // Right ratio, yet not a constant multiple where evaluated: the claim is
                // undefined or zero somewhere the truth is not.
                return Diagnosis::new(Kind::PartsAt, values);
            };
            d.factor = Some(f);
            d.missing = Some(m);
            if base_power == 0 {
                d.claim_at_base = claim_at_base(run, request.digits);
                d.base_value = Some(run.truth.point.base.clone());
            }
        }
    }
    d
}

fn claim_at_base(run: &PointRun, digits: u32) -> Option<String> {
    let first = run.comparisons.first()?;
    match &first.claim {
        Ok(v) => Some(v.to_decimal(digits.min(SHOWN_DIGITS))),
        Err(why) => Some(format!("undefined ({})", why.0)),
    }
}

/// Diagnosis from values alone.
fn numeric_diagnosis(claim: &Claim, run: &PointRun, prec: u32, tol: &Float) -> Diagnosis {
    let values = run.truth.point.values.clone();
    if let Some((f, m)) = shifted_factor(claim, run, 0, prec, tol) {
        let kind = if claim.mentions_base() {
            Kind::ConstantFactor
        } else {
            Kind::WrongBaseValue
        };
        let mut d = Diagnosis::new(kind, values);
        if kind == Kind::WrongBaseValue {
            d.claim_at_base = claim_at_base(run, SHOWN_DIGITS);
            d.base_value = Some(run.truth.point.base.clone());
        }
        d.factor = Some(f);
        d.missing = Some(m);
        return d;
    }
    for s in [1i64, -1, 2, -2] {
        if let Some((f, m)) = shifted_factor(claim, run, s, prec, tol) {
            let mut d = Diagnosis::new(Kind::IndexShift, values);
            d.shift = Some(s);
            if !is_one(&f) {
                d.factor = Some(f);
                d.missing = Some(m);
            }
            return d;
        }
    }
    if run.truth.last().is_none() {
        if let Some(d) = growth_diagnosis(claim, run, prec, &values) {
            return d;
        }
    }
    Diagnosis::new(Kind::PartsAt, values)
}

/// Reads ln|claim/truth| = ln C + k ln r + δ ln k + O(1/k) at two far pairs of k.
fn growth_diagnosis(
    claim: &Claim,
    run: &PointRun,
    prec: u32,
    values: &BTreeMap<String, Q>,
) -> Option<Diagnosis> {
    let b = run.truth.base_index().clone();
    let mut steps = Vec::new();
    let mut signs = Vec::new();
    for far in FAR {
        let k = &b + BigInt::from(far);
        let (s0, l0) = log_quotient(claim, run, &k, 0, prec)?;
        let (s1, l1) = log_quotient(claim, run, &(&k + 1), 0, prec)?;
        steps.push((k, Float::with_val(prec, &l1 - &l0)));
        signs.push(s0 * s1);
    }
    // g(K) = ln r + δ ln(1 + 1/K) + O(1/K²): two K give δ and ln r.
    let log_step = |k: &BigInt| {
        let kf = Float::with_val(prec, k.to_f64().unwrap_or(f64::MAX));
        Float::with_val(prec, kf.recip_ref()).ln_1p()
    };
    let (k1, g1) = &steps[0];
    let (k2, g2) = &steps[1];
    let (h1, h2) = (log_step(k1), log_step(k2));
    let delta = Float::with_val(prec, g1 - g2) / Float::with_val(prec, &h1 - &h2);
    let ln_rate = Float::with_val(prec, g2 - Float::with_val(prec, &delta * &h2));
    // The third pair must fit the same r and δ, or the growth is of another kind (exp(k²) …).
    let (k3, g3) = &steps[2];
    let predicted = Float::with_val(
        prec,
        &ln_rate + Float::with_val(prec, &delta * log_step(k3)),
    );
    let misfit = Float::with_val(prec, g3 - &predicted).abs();
    let scale =
        Float::with_val(prec, g3.abs_ref()).max(&Float::with_val(prec, k3.to_f64()?.recip()));
    if misfit > Float::with_val(prec, &scale * 1e-3) {
        return None;
    }
    let rate_sign = signs[1];
    let coarse = Float::with_val(64, 1e-4);
    if ln_rate.clone().abs() > 1e-8 || rate_sign < 0 {
        let mut d = Diagnosis::new(Kind::WrongGeometricRate, values.clone());
        let r = LogReal {
            sign: rate_sign,
            ln_abs: ln_rate,
        };
        let mut rate = numeric_quantity_digits(&r, prec, &coarse, 8);
        rate.near = rate
            .near
            .filter(|q| q.denom().abs() <= BigInt::from(SMALL_DENOMINATOR));
        d.rate_error = Some(rate);
        if delta.clone().abs() > 1e-3 {
            d.exponent_error = Some(float_quantity(&delta, &coarse));
        }
        return Some(d);
    }
    if delta.clone().abs() > 1e-3 {
        let mut d = Diagnosis::new(Kind::WrongPowerOfK, values.clone());
        d.exponent_error = Some(float_quantity(&delta, &coarse));
        return Some(d);
    }
    None
}
