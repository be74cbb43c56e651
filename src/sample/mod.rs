//! `telescope sample`: independent draws from the normalised law by the inverse of its
//! cumulative distribution function.
//!
//! The table of p(k) comes from the verified running product of the rule as written (MPFR,
//! with its a-priori error bound; `numeric/direct.rs`) divided by the total (closed form or
//! numeric sum, `law`), accumulated in MPFR and rounded once to double — the resolution of a
//! 53-bit uniform draw. The table runs until the mass left beyond it is below
//! [`TAIL_MASS`] or the support ends, at most [`MAX_TABLE`] entries; a draw that lands in the
//! mass left beyond is taken from the tail law (a power law `C k^θ`, or the geometric rate
//! R(K) for a rule that decays geometrically), and that mass is stated.
//!
//! The random stream is documented so that draws can be reproduced anywhere: ChaCha8
//! (`rand_chacha::ChaCha8Rng`, seeded with `seed_from_u64(seed)`, stream 0 for `sample`,
//! stream r + 1 for the r-th bootstrap replicate of `fit`), each uniform the top 53 bits of
//! one `next_u64`, divided by 2^53.

mod stream;

use std::collections::BTreeMap;

use rug::{Assign, Float, Integer, Rational};

use crate::algebra::Q;
use crate::law::{LawAt, LawError};
use crate::model::Problem;
use crate::numeric::direct::RunningProduct;
use crate::table::numeric_ratio;

pub use stream::{uniform, Stream};

/// Mass left beyond the table at which tabulation stops.
pub const TAIL_MASS: f64 = 1e-12;
/// Largest table (entries); 2^20 doubles are 8 MiB.
pub const MAX_TABLE: usize = 1 << 20;
/// Significant digits carried by the running product.
const TABLE_DIGITS: u32 = 25;
/// Bits of the cumulative sums.
const SUM_BITS: u32 = 160;

/// How a draw beyond the table is made.
#[derive(Clone, Debug, PartialEq)]
pub enum TailDraw {
    /// The table holds the whole support (or all but less than 2^-53 of the mass).
    None,
    /// `P(X ≥ x | X > K) = ((x − 1/2)/(K + 1/2))^(θ+1)`, the continuous form of `C k^θ`.
    PowerLaw { theta: f64 },
    /// `P(X ≥ x | X > K) = r^(x−K−1)` with r = R(K+1).
    Geometric { rate: f64 },
}

/// The inverse cumulative distribution function of a law, ready to draw from.
#[derive(Clone, Debug)]
pub struct Sampler {
    /// k of `cdf[0]`.
    pub first: i64,
    /// `cdf[i]` = P(X ≤ first + i), rounded to double.
    cdf: Vec<f64>,
    /// `pmf[i]` = p(first + i), rounded to double from MPFR.
    pmf: Vec<f64>,
    /// `guide[g]`: the first i with cdf[i] > g / guide.len().
    guide: Vec<u32>,
    /// Mass beyond the last tabulated k, and a bound on its absolute error.
    pub mass_beyond: f64,
    pub mass_beyond_error: f64,
    pub tail: TailDraw,
    /// Bound on the relative error of every tabulated p(k) (running product and total).
    pub pmf_rel_error: f64,
}

/// Why a law cannot be sampled.
#[derive(Clone, Debug, PartialEq)]
pub enum SampleError {
    Law(LawError),
    Table(String),
}

impl SampleError {
    pub fn message(&self) -> String {
        match self {
            SampleError::Law(e) => e.message().to_string(),
            SampleError::Table(m) => m.clone(),
        }
    }
}

impl Sampler {
    /// The table of `law` (every parameter of `problem` has a value in `law.values`).
    pub fn new(problem: &Problem, law: &LawAt) -> Result<Sampler, SampleError> {
        let values: &BTreeMap<String, Q> = &law.values;
        let ratio = numeric_ratio(problem, values);
        let mut product = RunningProduct::new(
            ratio,
            Integer::from(law.k_min),
            Rational::from(1),
            false,
            TABLE_DIGITS,
            MAX_TABLE as u64,
        );
        let inverse_total = Float::with_val(SUM_BITS, law.total.recip_ref());
        let mut head = Float::new(SUM_BITS);
        let mut cdf = Vec::new();
        let mut pmf = Vec::new();
        let mut k = law.k_min;
        let mut tail = TailDraw::None;
        // Buffers reused across steps: this loop is most of the cost of a sample.
        let mut term = Float::new(SUM_BITS);
        let mut scratch = Float::new(SUM_BITS);
        loop {
            match product.value_ref() {
                Ok(q) => term.assign(q),
                Err((mantissa, exp2)) => {
                    term.assign(mantissa);
                    term <<= exp2.clamp(-(1 << 30), 1 << 30) as i32;
                }
            }
            scratch.assign(&term * &inverse_total);
            pmf.push(scratch.to_f64());
            head += &term;
            scratch.assign(&head * &inverse_total);
            let cumulative = scratch.to_f64().min(1.0);
            cdf.push(cumulative);
            // In double: 1 − F is only compared with TAIL_MASS ≫ 2^-53.
            let remaining = 1.0 - cumulative;
            if law.last.is_some_and(|l| k >= l) {
                break;
            }
            if remaining < TAIL_MASS {
                if remaining > f64::EPSILON / 2.0 {
                    tail = tail_draw(law, k);
                }
                break;
            }
            if cdf.len() >= MAX_TABLE {
                tail = tail_draw(law, k);
                break;
            }
            product.step().map_err(|e| {
                SampleError::Table(format!(
                    "the running product stopped at k = {}: {e:?}",
                    k + 1
                ))
            })?;
            k += 1;
        }
        let product_error = product.error_bound().map_or(0.0, |b| b.to_f64());
        let pmf_rel_error = product_error + law.total_rel_error;
        let table_mass = *cdf.last().unwrap_or(&0.0);
        let mass_beyond = if law.last.is_some() && tail == TailDraw::None {
            0.0
        } else {
            (1.0 - table_mass).max(0.0)
        };
        Ok(Sampler {
            first: law.k_min,
            guide: guide_table(&cdf),
            cdf,
            pmf,
            mass_beyond,
            // The head sum carries the relative errors of its terms and of the total.
            mass_beyond_error: pmf_rel_error + f64::EPSILON,
            tail,
            pmf_rel_error,
        })
    }

    /// The last tabulated k.
    pub fn last_tabulated(&self) -> i64 {
        self.first + self.cdf.len() as i64 - 1
    }

    /// P(X ≤ k) from the table (1 beyond it when nothing is left there).
    pub fn cdf_at(&self, k: i64) -> f64 {
        if k < self.first {
            return 0.0;
        }
        let i = (k - self.first) as usize;
        match self.cdf.get(i) {
            Some(c) => *c,
            None => 1.0 - self.mass_beyond,
        }
    }

    /// p(k) from the table (0 outside it), rounded once from MPFR.
    pub fn pmf_at(&self, k: i64) -> f64 {
        if k < self.first || k > self.last_tabulated() {
            return 0.0;
        }
        self.pmf[(k - self.first) as usize]
    }

    /// One draw.
    pub fn draw(&self, stream: &mut Stream) -> i64 {
        let u = stream.uniform();
        let table_mass = *self.cdf.last().expect("tables are never empty");
        if u >= table_mass {
            return match self.tail {
                TailDraw::None => self.last_tabulated(),
                TailDraw::PowerLaw { theta } => {
                    let v = 1.0 - stream.uniform(); // in (0, 1]
                    let k0 = self.last_tabulated() as f64 + 0.5;
                    let y = k0 * v.powf(1.0 / (theta + 1.0));
                    saturate(y + 0.5)
                }
                TailDraw::Geometric { rate } => {
                    let v = 1.0 - stream.uniform();
                    let extra = (v.ln() / rate.ln()).floor();
                    saturate(self.last_tabulated() as f64 + 1.0 + extra)
                }
            };
        }
        let g = ((u * self.guide.len() as f64) as usize).min(self.guide.len() - 1);
        let mut i = self.guide[g] as usize;
        while self.cdf[i] <= u {
            i += 1;
        }
        self.first + i as i64
    }

    /// `n` draws from one stream.
    pub fn draws(&self, stream: &mut Stream, n: usize) -> Vec<i64> {
        (0..n).map(|_| self.draw(stream)).collect()
    }
}

fn saturate(x: f64) -> i64 {
    if x >= i64::MAX as f64 {
        i64::MAX
    } else {
        x.floor() as i64
    }
}

/// The tail law beyond the last tabulated k.
fn tail_draw(law: &LawAt, k: i64) -> TailDraw {
    match law.power {
        Some(theta) => TailDraw::PowerLaw { theta },
        None => TailDraw::Geometric {
            rate: law
                .ratio_at(k + 1)
                .clamp(f64::MIN_POSITIVE, 1.0 - f64::EPSILON),
        },
    }
}

/// Starting points for the search: a cell per 1/G of probability, G ≈ table size.
fn guide_table(cdf: &[f64]) -> Vec<u32> {
    let cells = cdf.len().clamp(1, 1 << 20);
    let mut guide = Vec::with_capacity(cells);
    let mut i = 0usize;
    for g in 0..cells {
        let u = g as f64 / cells as f64;
        while i + 1 < cdf.len() && cdf[i] <= u {
            i += 1;
        }
        guide.push(i as u32);
    }
    guide
}

/// A finished `sample` run: the law, its table and the draws.
pub struct SampleRun {
    pub law: LawAt,
    pub sampler: Sampler,
    pub seed: u64,
    pub draws: Vec<i64>,
}

/// `n` draws from the normalised law of `problem` at `values` (every parameter given).
pub fn sample_law(
    problem: &Problem,
    values: &BTreeMap<String, Q>,
    n: usize,
    seed: u64,
) -> Result<SampleRun, SampleError> {
    let family = crate::law::LawFamily::new(problem, None).map_err(SampleError::Law)?;
    let law = family.at(values).map_err(SampleError::Law)?;
    let sampler = Sampler::new(problem, &law)?;
    let mut stream = Stream::new(seed, 0);
    let draws = sampler.draws(&mut stream, n);
    Ok(SampleRun {
        law,
        sampler,
        seed,
        draws,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::build_problem;

    fn yule_simon(alpha: &str) -> (Problem, BTreeMap<String, Q>) {
        let problem = build_problem("p(k)/p(k-1) = (k-1)/(k+alpha) for k >= 2").unwrap();
        let values =
            BTreeMap::from([("alpha".to_string(), crate::algebra::parse_q(alpha).unwrap())]);
        (problem, values)
    }

    #[test]
    fn the_table_matches_the_yule_simon_pmf() {
        // Yule–Simon with ρ = 5/2: p(1) = ρ/(ρ+1) = 5/7 and p(2) = ρ·B(2, ρ+1) = 5/7 · 2/(4.5·3.5)·…
        // (scipy.stats.yulesimon(5/2).pmf(1) = 0.7142857142857143, recorded in
        // tests/reference/distributions.json); checked here to 1e-15.
        let (problem, values) = yule_simon("5/2");
        let run = sample_law(&problem, &values, 10, 1).unwrap();
        assert!((run.sampler.pmf_at(1) - 5.0 / 7.0).abs() < 1e-15);
        // p(2) = p(1)·R(2) = 5/7 · 1/4.5
        assert!((run.sampler.pmf_at(2) - 5.0 / 7.0 / 4.5).abs() < 1e-15);
        assert!(matches!(run.sampler.tail, TailDraw::PowerLaw { .. }));
        assert!(run.sampler.mass_beyond < 1e-11);
    }

    #[test]
    fn same_seed_same_draws() {
        let (problem, values) = yule_simon("7/2");
        let a = sample_law(&problem, &values, 50, 9).unwrap().draws;
        let b = sample_law(&problem, &values, 50, 9).unwrap().draws;
        let c = sample_law(&problem, &values, 50, 10).unwrap().draws;
        assert_eq!(a, b);
        assert_ne!(a, c);
    }

    #[test]
    fn a_finite_support_is_tabulated_whole() {
        // Binomial(N = 6, p = 1/3): R(k) = (N−k+1)/k · p/(1−p), p(0) = (2/3)^6 (common practice).
        let problem = build_problem("a(k)/a(k-1) = (7-k)/(2k) for k >= 1").unwrap();
        let run = sample_law(&problem, &BTreeMap::new(), 1000, 3).unwrap();
        assert_eq!(run.sampler.last_tabulated(), 6);
        assert_eq!(run.sampler.mass_beyond, 0.0);
        assert!((run.sampler.pmf_at(0) - (2.0f64 / 3.0).powi(6)).abs() < 1e-15);
        assert!(run.draws.iter().all(|k| (0..=6).contains(k)));
    }
}
