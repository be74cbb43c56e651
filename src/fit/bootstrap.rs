//! Parametric bootstrap of the Kolmogorov–Smirnov distance: N samples of the observed size
//! drawn from the fitted law (`sample`'s inverse CDF, stream r + 1 of the seed for replicate
//! r), each refitted, and p = (1 + #{D* ≥ D}) / (N + 1) (Davison & Hinkley, *Bootstrap
//! Methods and their Application*, 1997, §4.2; refitting each replicate is what makes the
//! distance's null distribution right when parameters are estimated).

use std::io::IsTerminal;

use indicatif::{ProgressBar, ProgressStyle};
use rayon::prelude::*;

use crate::data::Counts;
use crate::model::Problem;
use crate::sample::{Sampler, Stream};

use super::gof::ks_distance;
use super::likelihood::Likelihood;
use super::maximise::maximise;

#[derive(Clone, Debug, PartialEq)]
pub struct Bootstrap {
    pub replicates: usize,
    /// Replicates whose refit failed (left out of the p-value).
    pub failed: usize,
    pub exceeding: usize,
    pub p_value: Option<f64>,
    pub seed: u64,
}

/// The bootstrap p-value of `distance` for the fit `theta` of `like`.
pub fn bootstrap_ks(
    problem: &Problem,
    like: &Likelihood,
    theta: &[f64],
    distance: f64,
    replicates: usize,
    seed: u64,
    progress: bool,
) -> Result<Bootstrap, String> {
    let law = like.law(theta).map_err(|e| e.message().to_string())?;
    let sampler = Sampler::new(problem, &law).map_err(|e| e.message())?;
    let n = like.counts.total() as usize;
    let bar = if progress && std::io::stderr().is_terminal() {
        let bar = ProgressBar::new(replicates as u64);
        bar.set_style(
            ProgressStyle::with_template("bootstrap {bar:40} {pos}/{len} replicates, {eta} left")
                .unwrap_or_else(|_| ProgressStyle::default_bar()),
        );
        bar
    } else {
        ProgressBar::hidden()
    };
    let outcomes: Vec<Option<f64>> = (0..replicates)
        .into_par_iter()
        .map(|r| {
            let mut stream = Stream::new(seed, r as u64 + 1);
            let draws = sampler.draws(&mut stream, n);
            let counts = Counts::from_observations(draws);
            let replicate = like.derived(counts, like.fixed.clone(), like.free.clone());
            let outcome = maximise(&replicate, Some(theta))
                .ok()
                .and_then(|m| replicate.law(&m.theta).ok())
                .map(|law| ks_distance(&replicate.counts, &law));
            bar.inc(1);
            outcome
        })
        .collect();
    bar.finish_and_clear();
    let done: Vec<f64> = outcomes.iter().flatten().copied().collect();
    let exceeding = done.iter().filter(|d| **d >= distance).count();
    let p_value = (!done.is_empty()).then(|| (1 + exceeding) as f64 / (done.len() + 1) as f64);
    Ok(Bootstrap {
        replicates,
        failed: replicates - done.len(),
        exceeding,
        p_value,
        seed,
    })
}
