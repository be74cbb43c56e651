//! `telescope fit`: maximum-likelihood estimates of a rule's parameters from observed counts,
//! with standard errors, profile-likelihood intervals, AIC/BIC and goodness of fit.
//!
//! The law is the verified rule normalised over k ≥ k_min (`law`); the log-likelihood is
//! summed over distinct k (`likelihood.rs`); `maximise.rs` finds the maximum and says in
//! words when there is none; `profile.rs` gives the errors and intervals; `gof.rs` the
//! chi-square test and the Kolmogorov–Smirnov distance; `bootstrap.rs` the distance's
//! parametric-bootstrap p-value.

pub mod bootstrap;
pub mod exact;
pub mod gof;
pub mod likelihood;
pub mod maximise;
pub mod optimise;
pub mod profile;

use std::collections::BTreeMap;
use std::time::Instant;

use num_traits::ToPrimitive;

use crate::algebra::Q;
use crate::data::Counts;
use crate::law::{LawFamily, TotalRoute};
use crate::model::Problem;

pub use bootstrap::Bootstrap;
pub use gof::{Bin, ChiSquare};
pub use likelihood::{FreeParam, Likelihood};
pub use maximise::{NoMaximum, HESSIAN_STEP};
pub use profile::{End, Interval};

/// What to fit and how.
#[derive(Clone, Debug, Default)]
pub struct FitRequest {
    /// Leave out k < k_min and renormalise over k ≥ k_min (default: the base index).
    pub k_min: Option<i64>,
    /// Parameters held at given values (`--param`).
    pub fixed: BTreeMap<String, Q>,
    /// Bootstrap replicates of the KS distance (0: none).
    pub bootstrap: usize,
    pub seed: u64,
    /// Show a progress bar on a terminal.
    pub progress: bool,
    /// Only the estimates and standard errors (no intervals, no goodness of fit): for
    /// simulation studies.
    pub estimates_only: bool,
    /// Stop here (the command's time budget): a fit not done by then says so, with no
    /// estimate.
    pub deadline: Option<Instant>,
    /// The budget the deadline comes from, for the words of a stop.
    pub max_seconds: Option<f64>,
}

/// One estimated parameter.
#[derive(Clone, Debug, PartialEq)]
pub struct Estimate {
    pub name: String,
    pub integer: bool,
    pub value: f64,
    /// The estimate as an exact fraction, when the likelihood equation has a rational root
    /// (`exact.rs`); `value` is then its nearest double.
    pub exact: Option<Q>,
    /// From the observed information; None for an integer parameter.
    pub standard_error: Option<f64>,
    /// The central-difference step used for it.
    pub step: Option<f64>,
    /// None with `estimates_only`.
    pub interval: Option<Interval>,
}

/// A successful fit.
#[derive(Clone, Debug, PartialEq)]
pub struct Fitted {
    pub estimates: Vec<Estimate>,
    pub log_likelihood: f64,
    pub aic: f64,
    pub bic: f64,
    pub total_route: TotalRoute,
    /// None with `estimates_only`.
    pub chi_square: Option<ChiSquare>,
    pub ks_distance: Option<f64>,
    pub bootstrap: Option<Result<Bootstrap, String>>,
}

/// A fit that found no estimate, in words.
#[derive(Clone, Debug, PartialEq)]
pub enum FitFailure {
    NoData(String),
    NotALaw(String),
    Boundary(String),
    Flat(String),
    /// The time budget ran out before the fit finished.
    OverBudget(String),
}

impl FitFailure {
    pub fn message(&self) -> &str {
        match self {
            FitFailure::NoData(m)
            | FitFailure::NotALaw(m)
            | FitFailure::Boundary(m)
            | FitFailure::Flat(m)
            | FitFailure::OverBudget(m) => m,
        }
    }

    pub fn kind(&self) -> &'static str {
        match self {
            FitFailure::NoData(_) => "no_data",
            FitFailure::NotALaw(_) => "not_a_law",
            FitFailure::Boundary(_) => "boundary_maximum",
            FitFailure::Flat(_) => "flat_likelihood",
            FitFailure::OverBudget(_) => "over_budget",
        }
    }
}

/// Everything `fit` reports for one model.
#[derive(Clone, Debug, PartialEq)]
pub struct FitReport {
    pub k_min: i64,
    /// Observations used (k ≥ k_min) and left out.
    pub observations: u64,
    pub left_out: u64,
    pub distinct: usize,
    pub fixed: BTreeMap<String, Q>,
    pub free: Vec<String>,
    pub outcome: Result<Fitted, FitFailure>,
}

/// Fits `problem` to `counts`.
pub fn fit(problem: &Problem, counts: &Counts, request: &FitRequest) -> FitReport {
    let (mut report, like) = prepare(problem, counts, request);
    if let Some(like) = like {
        report.outcome = fit_likelihood(problem, &like, request);
    }
    report
}

/// What fitting `problem` to `counts` is expected to cost, from one timed evaluation of ℓ
/// (`budget::Estimate::fit` counts the evaluations); trivial when the fit ends before any.
pub fn estimate_cost(
    problem: &Problem,
    counts: &Counts,
    request: &FitRequest,
) -> crate::budget::Estimate {
    let (report, like) = prepare(problem, counts, request);
    let Some(like) = like.map(|l| l.with_deadline(None)) else {
        return crate::budget::Estimate::trivial("a fit that ends before it starts");
    };
    // Timed away from the centre of the scales: a double such as 0.5 makes the exact
    // arithmetic of the law cheaper than at the points the optimiser visits. The first
    // evaluation may fill caches; a quick one is timed again at another point.
    let mut seconds = f64::INFINITY;
    for offset in [0.3, -0.7] {
        let probe = shifted_probe(&like, offset);
        let started = Instant::now();
        like.log_likelihood(&probe);
        seconds = seconds.min(started.elapsed().as_secs_f64());
        if seconds > 0.01 {
            break;
        }
    }
    let integer = like.free.iter().filter(|p| p.integer).count();
    crate::budget::Estimate::fit(crate::budget::FitWork {
        evaluation_seconds: seconds,
        real: like.free.len() - integer,
        integer,
        intervals: !request.estimates_only,
        bootstrap: request.bootstrap,
        observations: report.observations,
        threads: rayon::current_num_threads(),
    })
}

/// The report's counts and, when there is something to fit, the likelihood.
fn prepare(
    problem: &Problem,
    counts: &Counts,
    request: &FitRequest,
) -> (FitReport, Option<Likelihood>) {
    let free: Vec<FreeParam> = problem
        .params
        .iter()
        .filter(|p| !request.fixed.contains_key(&p.name))
        .map(FreeParam::new)
        .collect();
    let mut report = FitReport {
        k_min: request.k_min.unwrap_or(0),
        observations: 0,
        left_out: 0,
        distinct: 0,
        fixed: request.fixed.clone(),
        free: free.iter().map(|p| p.name.clone()).collect(),
        outcome: Err(FitFailure::NoData(String::new())),
    };
    let family = match LawFamily::new(problem, request.k_min) {
        Ok(f) => f,
        Err(e) => {
            report.outcome = Err(FitFailure::NotALaw(e.message().to_string()));
            return (report, None);
        }
    };
    report.k_min = family.k_min;
    let (kept, left_out) = counts.at_least(family.k_min);
    report.observations = kept.total();
    report.left_out = left_out;
    report.distinct = kept.by_k.len();
    if left_out > 0 && request.k_min.is_none() {
        report.outcome = Err(FitFailure::NoData(format!(
            "{left_out} of the {} observations lie below the support (k < {}), where the law gives probability 0; leave them out with --k-min {} or check the data",
            counts.total(),
            family.k_min,
            family.k_min
        )));
        return (report, None);
    }
    if kept.total() == 0 {
        report.outcome = Err(FitFailure::NoData(format!(
            "no observation lies in the support k ≥ {}",
            family.k_min
        )));
        return (report, None);
    }
    let like =
        Likelihood::new(family, kept, request.fixed.clone(), free).with_deadline(request.deadline);
    (report, Some(like))
}

/// The words of a fit stopped by its budget.
fn over_budget(request: &FitRequest, what: &str) -> String {
    let budget = request
        .max_seconds
        .unwrap_or(crate::budget::DEFAULT_MAX_SECONDS);
    format!(
        "{what} did not finish within the time budget of {budget} s, so nothing from it is reported; pass --max-seconds {} to allow more",
        (budget * 4.0).ceil()
    )
}

fn fit_likelihood(
    problem: &Problem,
    like: &Likelihood,
    request: &FitRequest,
) -> Result<Fitted, FitFailure> {
    let stopped = || FitFailure::OverBudget(over_budget(request, "the fit"));
    let maximum = maximise::maximise(like, None);
    if like.timed_out() {
        return Err(stopped());
    }
    let maximum = maximum.map_err(|e| match e {
        NoMaximum::Nowhere => nowhere(like),
        NoMaximum::Boundary { param, towards } => FitFailure::Boundary(format!(
            "the likelihood keeps increasing as {towards}, the end of the declared range of {param}: there is no maximum inside the range, so no estimate is given"
        )),
    })?;
    let mut theta = maximum.theta.clone();
    let mut best = maximum.log_likelihood;
    let exact = match theta.as_slice() {
        [found] => {
            exact::exact_estimate(&like.family, &like.fixed, &like.free, &like.counts, *found)
        }
        _ => None,
    };
    if let Some(q) = &exact {
        theta[0] = q.to_f64().unwrap_or(theta[0]);
        let at_exact = like.log_likelihood(&theta);
        if at_exact.is_finite() {
            best = at_exact;
        }
    }
    let law = like
        .law(&theta)
        .map_err(|e| FitFailure::NotALaw(e.message().to_string()))?;
    let real: Vec<usize> = (0..like.free.len())
        .filter(|i| !like.free[*i].integer)
        .collect();
    let (errors, steps) = profile::standard_errors(like, &real, &theta).ok_or_else(|| {
        let names: Vec<&str> = real.iter().map(|i| like.free[*i].name.as_str()).collect();
        FitFailure::Flat(format!(
            "the likelihood is flat near its best point (the observed information of {} is not positive definite): these data do not determine the parameters, so no estimate is given",
            names.join(", ")
        ))
    })?;
    let mut estimates = Vec::new();
    for (i, p) in like.free.iter().enumerate() {
        let slot = real.iter().position(|r| *r == i);
        let se = slot.map(|s| errors[s]);
        let interval = (!request.estimates_only)
            .then(|| profile::profile_interval(like, i, &theta, best, se.unwrap_or(1.0)));
        estimates.push(Estimate {
            name: p.name.clone(),
            integer: p.integer,
            value: theta[i],
            exact: exact.clone(),
            standard_error: se,
            step: slot.map(|s| steps[s]),
            interval,
        });
    }
    let m = like.free.len() as f64;
    let full = !request.estimates_only;
    let chi_square = full.then(|| gof::chi_square(&like.counts, &law, like.free.len()));
    let ks_distance = full.then(|| gof::ks_distance(&like.counts, &law));
    if like.timed_out() {
        return Err(stopped());
    }
    let bootstrap = ks_distance
        .filter(|_| request.bootstrap > 0)
        .map(|distance| {
            let found = bootstrap::bootstrap_ks(
                problem,
                like,
                &theta,
                distance,
                request.bootstrap,
                request.seed,
                request.progress,
            );
            if like.timed_out() {
                Err(over_budget(request, "the bootstrap"))
            } else {
                found
            }
        });
    Ok(Fitted {
        estimates,
        log_likelihood: best,
        aic: 2.0 * m - 2.0 * best,
        bic: m * like.n.ln() - 2.0 * best,
        total_route: law.route.clone(),
        chi_square,
        ks_distance,
        bootstrap,
    })
}

/// A representative point of the declared ranges: the centre of each real parameter's
/// scale, 1 (or the nearest allowed integer) for an integer one.
fn probe_point(like: &Likelihood) -> Vec<f64> {
    shifted_probe(like, 0.0)
}

/// The probe point with each real parameter moved `offset` along its unbounded scale.
fn shifted_probe(like: &Likelihood, offset: f64) -> Vec<f64> {
    like.free
        .iter()
        .map(|p| {
            if p.integer {
                let (lo, hi) = p.integer_bounds();
                lo.max(hi.min(1)) as f64
            } else {
                p.scale.to_param(offset)
            }
        })
        .collect()
}

/// Why ℓ is −∞ everywhere: the law at a representative point, or the data.
fn nowhere(like: &Likelihood) -> FitFailure {
    let probe = probe_point(like);
    match like.law(&probe) {
        Err(e) => FitFailure::NotALaw(format!(
            "the rule is not a normalisable probability law anywhere tried in the declared ranges (e.g. {})",
            e.message()
        )),
        Ok(law) if like.beyond_support(&law) > 0 => FitFailure::NoData(format!(
            "some observations lie beyond the law's finite support (k ≤ {}) for every parameter value tried",
            law.last.unwrap_or(0)
        )),
        Ok(_) => FitFailure::NotALaw(
            "the likelihood is undefined (−∞) everywhere tried in the declared ranges".into(),
        ),
    }
}

/// Several models fitted to the same data, best AIC first (failures last).
pub fn rank_by_aic(reports: &mut [(String, FitReport)]) {
    let aic = |r: &FitReport| r.outcome.as_ref().map_or(f64::INFINITY, |f| f.aic);
    reports.sort_by(|a, b| aic(&a.1).total_cmp(&aic(&b.1)));
}
