//! `telescope check`: prove or refute a claimed closed form, and say what is wrong.
//!
//! 1. [`claim`] reads the claim (the rule language plus Gamma, Beta, binomial, factorial,
//!    rising factorials, exp, log, sqrt, pi and the base term by name).
//! 2. [`hyper`] recognises a hypergeometric term in k; then [`exact`] compares
//!    claim(k)/claim(k−1) with the rule's ratio as exact rational functions and the value at
//!    the base index exactly (the exact route: the only one that can give `proved`).
//! 3. [`numeric_route`] always compares claim and rule at many k and several parameter points
//!    drawn from the declared ranges ([`points`]), at `--digits` with guard bits.
//! 4. When they differ, [`diagnosis`] says how: a constant factor, a wrong base value, an index
//!    shift, a wrong power of k, a wrong geometric rate, or the first point where they part.
//!
//! ```
//! use telescope::check::{check_claim, CheckRequest, Verdict};
//! let problem = telescope::model::build_problem("n(k)/n(k-1) = (k-1)/(k+5/2) for k >= 2").unwrap();
//! let request = CheckRequest::new("n(1) * (7/2) * Beta(k, 7/2)");
//! let report = check_claim(&problem, &request).unwrap();
//! assert_eq!(report.verdict, Verdict::Proved);
//! ```

pub mod claim;
pub mod diagnosis;
mod estimate;
pub mod evaluate;
pub mod exact;
pub mod hyper;
pub mod numeric_route;
pub mod points;

use std::collections::BTreeMap;

use num_bigint::BigInt;
use rug::Float;

use crate::algebra::{RatFunc, Q};
use crate::diagnostic::Diagnostic;
use crate::model::Problem;
use crate::numeric::decimal;
use crate::ratio::Ratio;

use claim::{read_claim, Claim, ClaimContext};

use exact::ExactValue;
use hyper::{hypergeometric_term, HyperTerm, Stop};
use numeric_route::{run_point, tolerance, PointRun, Truth};
use points::parameter_points;

pub use diagnosis::{Diagnosis, Kind, Parting, Quantity};

/// What to check.
#[derive(Clone, Debug)]
pub struct CheckRequest {
    pub claim: String,
    /// Parameter values fixed with `--param`.
    pub values: BTreeMap<String, Q>,
    /// a(b) from `--base`; otherwise 1 (and, when the claim names the base term, 7/3 as well).
    pub base: Option<Q>,
    pub digits: u32,
}

impl CheckRequest {
    pub fn new(claim: &str) -> Self {
        CheckRequest {
            claim: claim.to_string(),
            values: BTreeMap::new(),
            base: None,
            digits: DEFAULT_DIGITS,
        }
    }
}

/// Digits of the numeric route unless `--digits` says otherwise.
pub const DEFAULT_DIGITS: u32 = 30;
/// Fewest digits the numeric route accepts (its tolerance is digits − 3).
pub const MIN_DIGITS: u32 = 8;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Verdict {
    /// Exact route: the ratios agree as rational functions and the base value matches.
    Proved,
    /// Numeric route only: agreement at every point tried.
    HoldsNumerically,
    Refuted,
}

/// How the claim's value at the base index was compared.
#[derive(Clone, Debug, PartialEq)]
pub enum BaseCheck {
    /// Exactly: the claim's value at b (without its base-term factor).
    Exact(ExactValue),
    /// Numerically at every parameter point (Gamma at non-integer points, exp, log …).
    Numeric,
}

/// The exact route's findings.
#[derive(Clone, Debug)]
pub struct ExactRoute {
    pub claim_ratio: RatFunc,
    pub rule_ratio: RatFunc,
    pub ratios_agree: bool,
    pub base_power: i32,
    pub base_check: BaseCheck,
    /// Whether the base value matches (exactly, or numerically when `base_check` is numeric).
    pub base_agrees: bool,
}

/// Why the claim had only the numeric route, with the column in the claim text.
#[derive(Clone, Debug, PartialEq)]
pub struct NumericOnly {
    pub reason: String,
    pub span: std::ops::Range<usize>,
}

/// One parameter point of the numeric route.
#[derive(Clone, Debug)]
pub struct PointSummary {
    pub values: BTreeMap<String, Q>,
    pub base: Q,
    pub indices: Vec<BigInt>,
    pub max_rel_diff: String,
    pub agrees: bool,
}

/// The claim's own ratio next to the rule's at a few k (at the first point).
#[derive(Clone, Debug)]
pub struct RatioSample {
    pub k: BigInt,
    pub claim: Option<String>,
    pub rule: Option<String>,
}

/// Everything `check` found.
#[derive(Clone, Debug)]
pub struct CheckReport {
    /// The claim as given (spans point into it), and as read.
    pub claim: String,
    pub read: Claim,
    /// The rule's R(k) in factor normal form, and the first k at which it holds.
    pub rule: Ratio,
    pub first_index: BigInt,
    pub sequence: String,
    pub index: String,
    pub base_index: BigInt,
    pub verdict: Verdict,
    pub exact: Option<ExactRoute>,
    pub numeric_only: Option<NumericOnly>,
    pub digits: u32,
    pub tolerance: String,
    pub points: Vec<PointSummary>,
    /// Points that could not be used, and why.
    pub skipped: Vec<(BTreeMap<String, Q>, String)>,
    pub max_rel_diff: String,
    pub ratio_samples: Vec<RatioSample>,
    pub diagnosis: Option<Diagnosis>,
}

/// Where a check failed before it could judge.
#[derive(Debug)]
pub enum CheckError {
    /// In the claim text (span into the claim).
    Claim(Diagnostic),
    /// In the rule (span into the model text).
    Rule(Diagnostic),
}

/// Reads the claim against the rule.
pub fn read(problem: &Problem, text: &str) -> Result<Claim, Diagnostic> {
    let base_index = problem.base_index();
    let cx = ClaimContext {
        index: &problem.index,
        sequence: &problem.sequence,
        base_index: &base_index,
        params: problem.params.iter().map(|p| p.name.clone()).collect(),
    };
    read_claim(text, &cx)
}

/// Proves or refutes the claim.
pub fn check_claim(problem: &Problem, request: &CheckRequest) -> Result<CheckReport, CheckError> {
    let claim = read(problem, &request.claim).map_err(CheckError::Claim)?;
    let index = problem.index.as_str();
    let b = problem.base_index();
    let term = match hypergeometric_term(&claim, index) {
        Ok(t) => Ok(t),
        Err(Stop::Outside(o)) => Err(NumericOnly {
            reason: o.reason,
            span: o.span,
        }),
        Err(Stop::Bad(d)) => return Err(CheckError::Claim(d)),
    };
    let points = parameter_points(
        problem,
        &request.values,
        request.base.as_ref(),
        claim.mentions_base(),
    );
    let mut runs: Vec<PointRun> = Vec::new();
    let mut skipped = Vec::new();
    for point in &points {
        match Truth::new(problem, point, request.digits) {
            Ok(truth) => {
                let run = run_point(&claim, truth, request.digits);
                if run.comparisons.is_empty() {
                    skipped.push((
                        point.values.clone(),
                        "the rule's closed form cannot be evaluated here".into(),
                    ));
                } else {
                    runs.push(run);
                }
            }
            Err(why) => skipped.push((point.values.clone(), why)),
        }
    }
    if runs.is_empty() {
        let why = skipped
            .first()
            .map(|(_, w)| w.clone())
            .unwrap_or_else(|| "no parameter values lie in the declared ranges".into());
        return Err(CheckError::Rule(
            Diagnostic::new(
                format!("the claim cannot be checked: no usable parameter point ({why})"),
                problem.rule_span.clone(),
            )
            .with_help("give parameter values with --param NAME=VALUE"),
        ));
    }
    let numeric_agrees = runs.iter().all(|r| r.agrees);
    let exact = term
        .as_ref()
        .ok()
        .and_then(|t| exact_route(problem, t, request, &b, numeric_agrees));
    let verdict = match (&exact, numeric_agrees) {
        (Some(e), true) if e.ratios_agree && e.base_agrees => Verdict::Proved,
        (Some(e), _) if !(e.ratios_agree && e.base_agrees) => Verdict::Refuted,
        (_, true) => Verdict::HoldsNumerically,
        (_, false) => Verdict::Refuted,
    };
    let tol = tolerance(request.digits);
    let diagnosis = (verdict == Verdict::Refuted).then(|| {
        diagnosis::diagnose(
            problem,
            &claim,
            term.as_ref().ok(),
            exact.as_ref(),
            &runs,
            request,
            &tol,
        )
    });
    let mut max = Float::new(64);
    for r in &runs {
        if r.max_rel_diff > max || r.max_rel_diff.is_nan() {
            max = r.max_rel_diff.clone();
        }
    }
    let ratio_samples = ratio_samples(problem, &runs[0]);
    Ok(CheckReport {
        claim: request.claim.clone(),
        read: claim.clone(),
        rule: problem.ratio.clone(),
        first_index: problem.first_index.clone(),
        sequence: problem.sequence.clone(),
        index: problem.index.clone(),
        base_index: b,
        verdict,
        numeric_only: term.as_ref().err().cloned(),
        exact,
        digits: request.digits,
        tolerance: decimal::short(&tol),
        points: runs
            .iter()
            .map(|r| PointSummary {
                values: r.truth.point.values.clone(),
                base: r.truth.point.base.clone(),
                indices: r.comparisons.iter().map(|c| c.k.clone()).collect(),
                max_rel_diff: decimal::short(&r.max_rel_diff),
                agrees: r.agrees,
            })
            .collect(),
        skipped,
        max_rel_diff: decimal::short(&max),
        ratio_samples,
        diagnosis,
    })
}

fn exact_route(
    problem: &Problem,
    term: &HyperTerm,
    request: &CheckRequest,
    b: &BigInt,
    numeric_agrees: bool,
) -> Option<ExactRoute> {
    let index = problem.index.as_str();
    let form = exact::gamma_form(term, index);
    let claim_ratio = exact::claim_ratio(&form, index)?;
    let rule_ratio = exact::rule_ratio(&problem.ratio, index);
    let ratios_agree = claim_ratio == rule_ratio;
    let value = exact::value_at(&form, term, b, index);
    let (base_check, base_agrees) = match value {
        Some(v) => {
            let expected = match (term.base_power, &request.base) {
                // claim = a(b)·X(k): X(b) must be 1.
                (1, _) => Some(RatFunc::one()),
                (0, Some(base)) => Some(RatFunc::constant(base.clone())),
                (0, None) => Some(RatFunc::one()),
                _ => None,
            };
            let agrees = expected.is_some_and(|e| v.half_pi == 0 && v.rational == e);
            (BaseCheck::Exact(v), agrees)
        }
        // Gamma at non-integer points, exp, log …: the numeric route compared k = b at every
        // point to the requested digits.
        None => (
            BaseCheck::Numeric,
            numeric_agrees && matches!(term.base_power, 0 | 1),
        ),
    };
    Some(ExactRoute {
        claim_ratio,
        rule_ratio,
        ratios_agree,
        base_power: term.base_power,
        base_check,
        base_agrees,
    })
}

/// claim(k)/claim(k−1) next to R(k) at the first k of the first point.
fn ratio_samples(problem: &Problem, run: &PointRun) -> Vec<RatioSample> {
    let mut out = Vec::new();
    let cs = &run.comparisons;
    for pair in cs.windows(2).take(4) {
        let (before, here) = (&pair[0], &pair[1]);
        if &here.k - &before.k != BigInt::from(1) {
            continue;
        }
        let claim = match (&here.claim, &before.claim) {
            (Ok(c), Ok(p)) if !p.is_zero() && !c.is_zero() => {
                let mut q = c.clone();
                q.mul_log(&Float::with_val(p.ln_abs.prec(), -&p.ln_abs), p.sign);
                Some(q.to_decimal(12))
            }
            (Ok(c), Ok(p)) if !p.is_zero() && c.is_zero() => Some("0".into()),
            _ => None,
        };
        let rule = run
            .truth
            .rule_ratio_at(problem, &here.k)
            .map(|q| decimal::rational_to_decimal(&crate::numeric::to_rug_rational(&q), 12));
        out.push(RatioSample {
            k: here.k.clone(),
            claim,
            rule,
        });
    }
    out
}
