//! Puts the analyses together for one solved rule: the tail law, the total, the mean and the
//! variance, symbolic where a theorem applies, with numbers (and their error bounds) when
//! every parameter has a value.

use num_bigint::BigInt;
use num_traits::{One, Signed};
use rug::{Float, Rational};

use super::conditions::{joint_region, Inequality, Region, Requirement, Verdict};
use super::hypergeometric::{HyperSeries, RisingForm};
use super::moments::closed_moments;
use super::numbers::{evaluate_expr, tail_numbers, Numbers};
use super::numeric_sum::{Bounded, SumFailure};
use super::sums::{closed_sum, Theorem};
use super::symbolic::{Expr, Term};
use super::tail::{tail_law, Tail};
use crate::algebra::{RatFunc, Q};
use crate::diagnostic::Diagnostic;
use crate::model::Problem;
use crate::solve::reason::Reason;
use crate::solve::{Solution, SupportEnd};

#[derive(Clone, Debug)]
pub struct AnalysisRequest {
    /// Correction terms c₁…c_N of the tail law.
    pub terms: usize,
    /// Significant digits of every number.
    pub digits: u32,
    /// Choose a(b) so that the total is 1.
    pub normalize: bool,
}

impl Default for AnalysisRequest {
    fn default() -> Self {
        AnalysisRequest {
            terms: 2,
            digits: 30,
            normalize: false,
        }
    }
}

/// Finite, infinite (with the failed condition) or not decided.
#[derive(Clone, Debug, PartialEq)]
pub enum Finiteness {
    Finite,
    /// Infinite, and why.
    Infinite(Reason),
    Undecided,
    /// Finite sums, but the quantity divides by a total that is 0.
    Undefined(Reason),
}

/// A number to `digits` digits with its provenance.
#[derive(Clone, Debug, PartialEq)]
pub struct NumberReport {
    pub value: String,
    /// The exact rational, when it is one (`7/5`).
    pub exact: Option<String>,
    /// Bound on the absolute error of `value` before rounding to `digits` digits.
    pub error_bound: String,
    pub method: String,
    /// The independent numeric sum's relative difference from the closed form, when both exist.
    pub check: Option<String>,
}

#[derive(Clone, Debug)]
pub struct TailCheck {
    pub k: BigInt,
    /// |a(k) / expansion − 1| with the closed form's a(k).
    pub rel_diff: String,
    /// |c_{N+1}| / k^(N+1): the size the difference should have.
    pub next_term: String,
}

#[derive(Clone, Debug)]
pub struct TailNumbers {
    pub rate: String,
    pub power: String,
    /// γ = −θ when the law is a pure power (r = 1, no factorial part).
    pub tail_exponent: Option<String>,
    pub prefactor: String,
    pub corrections: Vec<String>,
    pub check: Option<TailCheck>,
}

#[derive(Clone, Debug)]
pub struct TailReport {
    pub law: Tail,
    /// The prefactor with a(b) chosen by `--normalize` (C divided by the total, which may
    /// bring exp or ln factors).
    pub normalized_prefactor: Option<Term>,
    /// The law holds only when the support is infinite (its end depends on the parameters).
    pub conditional: bool,
    pub numbers: Option<TailNumbers>,
}

#[derive(Clone, Debug)]
pub struct Normalization {
    pub base_index: BigInt,
    /// Σ_{k≥b} a(k) = a(b) · series (`None` for a piecewise model, summed over its pieces).
    pub series: Option<HyperSeries>,
    /// The series' sum in closed form and the theorem that gave it.
    pub closed_form: Option<(Expr, Theorem)>,
    pub requirements: Vec<Requirement>,
    pub finiteness: Finiteness,
    /// Where the total is finite when the ranges leave it open (see [`Region`]).
    pub finite_for: Option<Region>,
    /// The total with a(b) = 1.
    pub value: Option<NumberReport>,
    /// With `--normalize`: a(b) = 1/series, symbolically and as a number.
    pub base_value: Option<(Option<Expr>, Option<NumberReport>)>,
    pub finite_support: bool,
    /// Why no number was given although the parameters are numeric.
    pub numeric_note: Option<String>,
    /// A piecewise model's total split at its last breakpoint (`None` for a single rule).
    pub parts: Option<TotalParts>,
}

/// `Σ a(k)` (a(b) = 1) as the part up to the last breakpoint and the last piece's part.
#[derive(Clone, Debug)]
pub struct TotalParts {
    /// Σ_{k=b..b'} a(k), exact.
    pub finite_part: String,
    /// Σ_{k>b'} a(k): exact or a decimal with `tail_error_bound`; `None` when it diverges or
    /// could not be summed.
    pub tail_part: Option<String>,
    pub tail_exact: bool,
    pub tail_error_bound: Option<String>,
}

#[derive(Clone, Debug)]
pub struct Moment {
    pub closed_form: Option<(Expr, Vec<Theorem>)>,
    pub requirements: Vec<Requirement>,
    pub finiteness: Finiteness,
    /// Where the moment is finite when the ranges leave it open (see [`Region`]).
    pub finite_for: Option<Region>,
    pub value: Option<NumberReport>,
}

#[derive(Clone, Debug)]
pub struct Analysis {
    pub index: String,
    pub sequence: String,
    pub digits: u32,
    pub normalize: bool,
    pub tail: Option<TailReport>,
    pub normalization: Normalization,
    pub mean: Moment,
    pub variance: Moment,
}

/// The terms `Σ k^j a(k)` of the j-th moment sum, in the problem's own names (`k²·n(k)`).
fn moment_terms(j: usize, sequence: &str, index: &str) -> String {
    let term = format!("{sequence}({index})");
    match j {
        0 => term,
        1 => format!("{index}·{term}"),
        _ => format!("{index}²·{term}"),
    }
}

/// Purpose of the j-th convergence requirement (total, mean, variance).
fn purpose(j: usize, sequence: &str, index: &str) -> String {
    let terms = moment_terms(j, sequence, index);
    match j {
        0 => format!("the total Σ {terms} converges"),
        1 => format!("Σ {terms} converges (finite mean)"),
        _ => format!("Σ {terms} converges (finite variance)"),
    }
}

/// When `Σ k^j a(k)` converges, from the tail law: factorial decay always, factorial growth
/// never, geometric when |r| < 1, and for r = 1 when θ + j < −1 (comparison with Σ k^s,
/// common practice); r = −1 needs θ + j < 0 (alternating series test).
/// `None` when it always converges.
fn convergence(tail: &Tail, j: i64, terms: &str) -> Option<Inequality> {
    let d = tail.factorial_power;
    if d > 0 {
        return Some(Inequality::Never(format!(
            "R(k) grows like k^{d}: the terms grow factorially"
        )));
    }
    if d < 0 {
        return None;
    }
    let shifted = &tail.power + &RatFunc::from_integer(j);
    // A numeric exponent is decided here, with the reason in words.
    let decided = |expr: RatFunc, bound: i64| -> Option<Inequality> {
        match expr.as_constant() {
            Some(e) if e < Q::from_integer(bound.into()) => None,
            Some(e) => Some(Inequality::Never(format!(
                "{terms} ~ C·k^({e}), and {e} is not below {bound}"
            ))),
            None => Some(Inequality::Positive(&RatFunc::from_integer(bound) - &expr)),
        }
    };
    match tail.rate.as_constant() {
        Some(r) if r.is_one() => decided(shifted, -1),
        Some(r) if r == -Q::one() => decided(shifted, 0),
        Some(r) if r.abs() < Q::one() => None,
        Some(r) => Some(Inequality::Never(format!(
            "|r| = {} > 1: the terms grow geometrically",
            r.abs()
        ))),
        None => Some(Inequality::AbsBelowOne(tail.rate.clone())),
    }
}

pub(super) fn finiteness(requirements: &[Requirement]) -> Finiteness {
    for r in requirements {
        if let Verdict::Fails(why) = &r.verdict {
            return Finiteness::Infinite(why.clone());
        }
    }
    if requirements
        .iter()
        .all(|r| matches!(r.verdict, Verdict::Holds(_)))
    {
        Finiteness::Finite
    } else {
        Finiteness::Undecided
    }
}

/// An undecided finiteness whose conditions, solved together, hold nowhere on the declared
/// range is infinite; the region is kept only while it is partial.
fn settle(f: Finiteness, region: Option<Region>) -> (Finiteness, Option<Region>) {
    match (&f, &region) {
        (Finiteness::Undecided, Some(Region::Intervals(split)))
            if split.everywhere() == Some(false) =>
        {
            (
                Finiteness::Infinite(
                    "no value in the declared range meets all its conditions together".into(),
                ),
                None,
            )
        }
        (Finiteness::Undecided, _) => (f, region),
        _ => (f, None),
    }
}

/// Runs every analysis for a solved rule.
pub fn analyse(
    problem: &Problem,
    solution: &Solution,
    request: &AnalysisRequest,
) -> Result<Analysis, Diagnostic> {
    let values = &solution.values;
    let base = solution.base_index.clone();
    // The rule as written: the solver's re-oriented copy carries its sign flips separately.
    let form = RisingForm::from_ratio(&problem.ratio);
    let numeric = problem.params.iter().all(|p| values.contains_key(&p.name));
    let (finite_support, conditional) = match &solution.support.last {
        SupportEnd::At(_) => (true, false),
        SupportEnd::Symbolic { certain, .. } => (*certain, !*certain),
        SupportEnd::Infinite => (false, false),
    };
    let law = tail_law(&form, &base, request.terms);
    let series = HyperSeries::of_sum(&form, &base);
    let closed = closed_sum(&series);
    // The total's, the mean's and the variance's conditions are often one inequality (|r| < 1
    // for a geometric tail): it is decided once. Cutting the range of a parameter can take
    // seconds when the conditions carry long coefficients (a fuzz finding took 2 s per cut).
    let mut decided: Vec<Requirement> = Vec::new();
    let requirements: Vec<Vec<Requirement>> = (0..3)
        .map(|j| {
            if finite_support {
                return Vec::new();
            }
            let (sequence, index) = (&problem.sequence, &problem.index);
            let terms = moment_terms(j, sequence, index);
            convergence(&law, j as i64, &terms)
                .map(|i| {
                    let why = purpose(j, sequence, index);
                    match decided.iter().find(|r| r.inequality == i) {
                        Some(earlier) => Requirement {
                            purpose: why,
                            ..earlier.clone()
                        },
                        None => {
                            let r =
                                Requirement::new(i, &why, values, &problem.params, request.digits);
                            decided.push(r.clone());
                            r
                        }
                    }
                })
                .into_iter()
                .collect()
        })
        .collect();
    let region = |r: &[Requirement]| joint_region(r, values, &problem.params, request.digits);
    let (total_finiteness, total_region) =
        settle(finiteness(&requirements[0]), region(&requirements[0]));
    let total_term = closed.as_ref().map(|(t, _)| t.clone());
    let moments = total_term
        .as_ref()
        .map(|t| closed_moments(&series, t, &base));
    // Moments need a convergent total as well as their own sum.
    let moment_requirements = |j: usize| -> Vec<Requirement> {
        let mut r = requirements[0].clone();
        r.extend(requirements[j].iter().cloned());
        r.dedup_by(|a, b| a.inequality == b.inequality);
        r
    };
    let mut normalization = Normalization {
        base_index: base.clone(),
        series: Some(series.clone()),
        // A divergent series has no sum (Gauss's formula would sit on a pole of Γ).
        closed_form: closed
            .as_ref()
            .filter(|_| !matches!(total_finiteness, Finiteness::Infinite(_)))
            .map(|(t, th)| (Expr::from_term(t.clone()), *th)),
        requirements: requirements[0].clone(),
        finiteness: total_finiteness.clone(),
        finite_for: total_region,
        value: None,
        base_value: None,
        finite_support,
        numeric_note: None,
        parts: None,
    };
    let moment_finiteness = |j: usize| -> (Finiteness, Option<Region>) {
        match &total_finiteness {
            Finiteness::Infinite(_) => (
                Finiteness::Infinite("the total diverges, so there is no distribution".into()),
                None,
            ),
            _ => settle(
                finiteness(&moment_requirements(j)),
                region(&moment_requirements(j)),
            ),
        }
    };
    let (mean_finiteness, mean_region) = moment_finiteness(1);
    let (variance_finiteness, variance_region) = moment_finiteness(2);
    let mut mean = Moment {
        closed_form: moments.as_ref().and_then(|m| m.mean.clone()),
        requirements: moment_requirements(1),
        finiteness: mean_finiteness,
        finite_for: mean_region,
        value: None,
    };
    let mut variance = Moment {
        closed_form: moments.as_ref().and_then(|m| m.variance.clone()),
        requirements: moment_requirements(2),
        finiteness: variance_finiteness,
        finite_for: variance_region,
        value: None,
    };
    let mut tail = (!finite_support).then(|| TailReport {
        law: law.clone(),
        normalized_prefactor: None,
        conditional,
        numbers: None,
    });
    if request.normalize {
        let inverse = total_term.as_ref().and_then(|t| t.inv());
        if let (Some(t), Some(inv)) = (&mut tail, &inverse) {
            t.normalized_prefactor = Some(t.law.prefactor_term.mul(inv));
        }
        normalization.base_value = Some((inverse.map(Expr::from_term), None));
    }
    if numeric {
        let numbers = Numbers::compute(&form, solution, request, &normalization, &mean, &variance);
        numbers.apply(&mut normalization, &mut mean, &mut variance, request.digits);
        if let Some(t) = &mut tail {
            t.numbers = tail_numbers(
                &form,
                problem,
                solution,
                request,
                &t.law,
                numbers.total.as_ref(),
            );
        }
    }
    Ok(Analysis {
        index: problem.index.clone(),
        sequence: problem.sequence.clone(),
        digits: request.digits,
        normalize: request.normalize,
        tail,
        normalization,
        mean,
        variance,
    })
}

/// The base value a(b) that makes the total 1, as an exact rational when it is one, or an
/// MPFR value with its relative error bound. For `table --normalize`.
pub fn normalizing_base_value(
    problem: &Problem,
    solution: &Solution,
    digits: u32,
) -> Result<(Bounded, String), Diagnostic> {
    let request = AnalysisRequest {
        terms: 0,
        digits: digits + 5,
        normalize: true,
    };
    let analysis = analyse(problem, solution, &request)?;
    let fail = |why: String| Diagnostic::new(why, problem.rule_span.clone());
    if let Finiteness::Infinite(why) = &analysis.normalization.finiteness {
        return Err(fail(format!(
            "--normalize: the total diverges ({}))",
            crate::render::reason::text(why)
        ))
        .with_help("only a sequence with a finite total can be normalised"));
    }
    let values = &solution.values;
    let closed = analysis
        .normalization
        .closed_form
        .as_ref()
        .and_then(|(e, _)| evaluate_expr(e, values, digits + 5));
    let total = match closed {
        Some(t) => t,
        None => {
            let form = RisingForm::from_ratio(&problem.ratio);
            let numbers = Numbers::compute(
                &form,
                solution,
                &request,
                &analysis.normalization,
                &analysis.mean,
                &analysis.variance,
            );
            match (numbers.total, numbers.failure) {
                (Some(t), _) => t,
                (None, Some(SumFailure::Divergent(why) | SumFailure::Unsupported(why))) => {
                    return Err(fail(format!(
                        "--normalize: the total cannot be computed: {why}"
                    )))
                }
                (None, None) => {
                    return Err(fail("--normalize: the total cannot be computed".into()))
                }
            }
        }
    };
    if super::numbers::total_vanishes(&total) {
        return Err(fail(
            "--normalize: the total is 0 (the terms cancel), so no a(b) makes it 1".into(),
        )
        .with_help("a sequence whose terms sum to 0 is not a distribution"));
    }
    let prec = total.value.prec();
    let base = match &total.exact {
        Some(q) if *q != 0 => Bounded::exact(Rational::from(q.recip_ref()), prec),
        _ => {
            let value = Float::with_val(prec, total.value.recip_ref());
            // relative error of 1/S equals that of S to first order, plus one rounding
            let rel = total.relative_error() * 1.01f64
                + Float::with_val(64, Float::i_exp(1, 1 - prec as i32));
            let error = Float::with_val(64, value.abs_ref()) * rel;
            Bounded {
                value,
                error,
                exact: None,
            }
        }
    };
    let method = if analysis.normalization.closed_form.is_some() {
        "closed form".to_string()
    } else {
        "numeric total".to_string()
    };
    Ok((base, method))
}
