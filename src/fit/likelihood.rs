//! The log-likelihood of observed counts under the normalised law, as a function of the free
//! parameters: `ℓ(θ) = Σ_k n_k ln a(k)/a(k_min) − n ln Σ_{j≥k_min} a(j)/a(k_min)`, summed over
//! distinct k with their counts.

use std::collections::BTreeMap;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Instant;

use num_rational::BigRational;
use num_traits::ToPrimitive;

use crate::algebra::Q;
use crate::data::Counts;
use crate::law::{LawAt, LawError, LawFamily};
use crate::model::Param;

use super::optimise::Scale;

/// A parameter the fit estimates.
#[derive(Clone, Debug)]
pub struct FreeParam {
    pub name: String,
    pub integer: bool,
    pub param: Param,
    pub scale: Scale,
    /// The declared range in double precision (for integer search and messages).
    pub lower: Option<f64>,
    pub upper: Option<f64>,
}

impl FreeParam {
    pub fn new(param: &Param) -> FreeParam {
        let lower = param.lower.as_ref().and_then(|(q, _)| q.to_f64());
        let upper = param.upper.as_ref().and_then(|(q, _)| q.to_f64());
        FreeParam {
            name: param.name.clone(),
            integer: param.integer,
            param: param.clone(),
            scale: Scale::new(lower, upper),
            lower,
            upper,
        }
    }

    /// The smallest and largest integers in the declared range.
    pub fn integer_bounds(&self) -> (i64, i64) {
        let lo = match &self.param.lower {
            Some((q, closed)) => {
                let c = q.ceil().to_integer().to_i64().unwrap_or(i64::MIN / 4);
                if !closed && q.is_integer() {
                    c + 1
                } else {
                    c
                }
            }
            None => -(1 << 40),
        };
        let hi = match &self.param.upper {
            Some((q, closed)) => {
                let f = q.floor().to_integer().to_i64().unwrap_or(i64::MAX / 4);
                if !closed && q.is_integer() {
                    f - 1
                } else {
                    f
                }
            }
            None => 1 << 40,
        };
        (lo, hi)
    }
}

/// Everything the log-likelihood needs, prepared once.
#[derive(Clone, Debug)]
pub struct Likelihood {
    pub family: LawFamily,
    pub counts: Counts,
    pub fixed: BTreeMap<String, Q>,
    pub free: Vec<FreeParam>,
    ks: Vec<i64>,
    ns: Vec<f64>,
    pub n: f64,
    /// Past this instant every evaluation is −∞ and `timed_out` is set, so that every loop of
    /// the optimiser, the profiles and the bootstrap ends at once (the command's budget).
    deadline: Option<Instant>,
    timed_out: Arc<AtomicBool>,
}

impl Likelihood {
    pub fn new(
        family: LawFamily,
        counts: Counts,
        fixed: BTreeMap<String, Q>,
        free: Vec<FreeParam>,
    ) -> Likelihood {
        let ks: Vec<i64> = counts.by_k.keys().copied().collect();
        let ns: Vec<f64> = counts.by_k.values().map(|n| *n as f64).collect();
        let n = counts.total() as f64;
        Likelihood {
            family,
            counts,
            fixed,
            free,
            ks,
            ns,
            n,
            deadline: None,
            timed_out: Arc::new(AtomicBool::new(false)),
        }
    }

    /// The same likelihood, stopping at `deadline`.
    pub fn with_deadline(mut self, deadline: Option<Instant>) -> Likelihood {
        self.deadline = deadline;
        self
    }

    /// Another likelihood over the same law family (a profile with one more parameter held,
    /// a bootstrap replicate's counts) under the same deadline.
    pub fn derived(
        &self,
        counts: Counts,
        fixed: BTreeMap<String, Q>,
        free: Vec<FreeParam>,
    ) -> Likelihood {
        let mut like = Likelihood::new(self.family.clone(), counts, fixed, free);
        like.deadline = self.deadline;
        like.timed_out = Arc::clone(&self.timed_out);
        like
    }

    /// Whether the deadline passed during an evaluation (results since are not to be used).
    pub fn timed_out(&self) -> bool {
        self.timed_out.load(Ordering::Relaxed)
    }

    /// The parameter point: fixed values and θ (exact: a double is a dyadic rational;
    /// integer parameters rounded). `None` outside a declared range.
    pub fn values(&self, theta: &[f64]) -> Option<BTreeMap<String, Q>> {
        let mut values = self.fixed.clone();
        for (p, t) in self.free.iter().zip(theta) {
            let q = if p.integer {
                Q::from_integer((t.round() as i64).into())
            } else {
                BigRational::from_float(*t)?
            };
            if !p.param.admits(&q) {
                return None;
            }
            values.insert(p.name.clone(), q);
        }
        Some(values)
    }

    /// The law at θ.
    pub fn law(&self, theta: &[f64]) -> Result<LawAt, LawError> {
        let values = self
            .values(theta)
            .ok_or_else(|| LawError::Unsupported("outside the declared range".into()))?;
        self.family.at(&values)
    }

    /// ℓ(θ), or −∞ where the rule is not a summable probability law or gives an observed k
    /// probability 0.
    pub fn log_likelihood(&self, theta: &[f64]) -> f64 {
        if self.deadline.is_some_and(|d| Instant::now() >= d) {
            self.timed_out.store(true, Ordering::Relaxed);
            return f64::NEG_INFINITY;
        }
        match self.law(theta) {
            Ok(law) => self.log_likelihood_of(&law),
            Err(_) => f64::NEG_INFINITY,
        }
    }

    pub fn log_likelihood_of(&self, law: &LawAt) -> f64 {
        if let (Some(last), Some(max)) = (law.last, self.ks.last()) {
            if *max > last {
                return f64::NEG_INFINITY;
            }
        }
        let ratios = law.log_ratios(&self.ks);
        let sum: f64 = ratios.iter().zip(&self.ns).map(|(l, n)| l * n).sum();
        let value = sum - self.n * law.ln_total;
        if value.is_nan() {
            f64::NEG_INFINITY
        } else {
            value
        }
    }

    /// How many observations (of the kept ones) lie beyond a finite support at θ.
    pub fn beyond_support(&self, law: &LawAt) -> u64 {
        law.last.map_or(0, |last| {
            self.counts.by_k.range(last + 1..).map(|(_, n)| *n).sum()
        })
    }

    pub fn distinct(&self) -> usize {
        self.ks.len()
    }
}
