//! Goodness of fit: Pearson's chi-square with adjacent k pooled until every expected count
//! is at least 5 (Cochran, Ann. Math. Statist. 23 (1952) — the usual rule), and the
//! Kolmogorov–Smirnov distance sup_k |F_n(k) − F(k)| of the discrete law. Statistics in
//! double precision (they are themselves approximations); the p-value from `statrs`.

use statrs::distribution::{ChiSquared, ContinuousCDF};

use crate::data::Counts;
use crate::law::LawAt;

/// Expected count a bin must reach.
pub const MIN_EXPECTED: f64 = 5.0;
/// Longest stretch of k walked for the bins and the distance.
const MAX_WALK: i64 = 50_000_000;

/// One pooled bin `first ..= last` (`last` None: and everything beyond).
#[derive(Clone, Debug, PartialEq)]
pub struct Bin {
    pub first: i64,
    pub last: Option<i64>,
    pub observed: u64,
    pub expected: f64,
}

#[derive(Clone, Debug, PartialEq)]
pub struct ChiSquare {
    pub bins: Vec<Bin>,
    pub statistic: f64,
    /// bins − 1 − fitted parameters; None when that is below 1.
    pub degrees_of_freedom: Option<u64>,
    pub p_value: Option<f64>,
}

/// The law's probabilities from k_min on, one k at a time: p(k_min) = 1/total, then ×R(k).
pub struct PmfWalk<'a> {
    law: &'a LawAt,
    k: i64,
    p: f64,
}

impl<'a> PmfWalk<'a> {
    pub fn new(law: &'a LawAt) -> PmfWalk<'a> {
        PmfWalk {
            law,
            k: law.k_min,
            p: (-law.ln_total).exp(),
        }
    }
}

impl Iterator for PmfWalk<'_> {
    type Item = (i64, f64);
    fn next(&mut self) -> Option<(i64, f64)> {
        if self.law.last.is_some_and(|l| self.k > l) || self.k - self.law.k_min > MAX_WALK {
            return None;
        }
        let out = (self.k, self.p);
        self.k += 1;
        self.p *= self.law.ratio_at(self.k);
        Some(out)
    }
}

/// Pearson's chi-square of `counts` (all at k ≥ k_min) against `law`, `fitted` parameters.
pub fn chi_square(counts: &Counts, law: &LawAt, fitted: usize) -> ChiSquare {
    let n = counts.total() as f64;
    let mut bins: Vec<Bin> = Vec::new();
    let mut cumulative = 0.0f64;
    let mut current = Bin {
        first: law.k_min,
        last: None,
        observed: 0,
        expected: 0.0,
    };
    let mut walk = PmfWalk::new(law).peekable();
    let mut closed = false;
    while let Some((k, p)) = walk.next() {
        cumulative += p;
        current.expected += n * p;
        current.observed += counts.by_k.get(&k).copied().unwrap_or(0);
        let rest = n * (1.0 - cumulative).max(0.0);
        let end_of_support = walk.peek().is_none();
        if end_of_support || rest < MIN_EXPECTED {
            // The last bin takes everything beyond k.
            current.expected += rest;
            current.observed += counts.by_k.range(k + 1..).map(|(_, c)| *c).sum::<u64>();
            current.last = if end_of_support && law.last.is_some() {
                Some(k)
            } else {
                None
            };
            push_or_merge(&mut bins, current.clone());
            closed = true;
            break;
        }
        if current.expected >= MIN_EXPECTED {
            current.last = Some(k);
            let next = Bin {
                first: k + 1,
                last: None,
                observed: 0,
                expected: 0.0,
            };
            bins.push(std::mem::replace(&mut current, next));
        }
    }
    if !closed {
        // The walk stopped at its length limit (a very slow tail): the rest is one open bin.
        current.expected += n * (1.0 - cumulative).max(0.0);
        current.observed = counts.by_k.range(current.first..).map(|(_, c)| *c).sum();
        current.last = None;
        push_or_merge(&mut bins, current);
    }
    let statistic: f64 = bins
        .iter()
        .map(|b| (b.observed as f64 - b.expected).powi(2) / b.expected)
        .sum();
    let df = bins.len() as i64 - 1 - fitted as i64;
    let (degrees_of_freedom, p_value) = if df >= 1 {
        let p = ChiSquared::new(df as f64).map(|d| d.sf(statistic)).ok();
        (Some(df as u64), p)
    } else {
        (None, None)
    };
    ChiSquare {
        bins,
        statistic,
        degrees_of_freedom,
        p_value,
    }
}

/// A last bin below the minimum joins the one before it.
fn push_or_merge(bins: &mut Vec<Bin>, bin: Bin) {
    if bin.expected < MIN_EXPECTED {
        if let Some(previous) = bins.last_mut() {
            previous.last = bin.last;
            previous.observed += bin.observed;
            previous.expected += bin.expected;
            return;
        }
    }
    bins.push(bin);
}

/// sup_k |F_n(k) − F(k)| over k from k_min to the largest observation (beyond it both tend
/// to 1 and F_n is 1).
pub fn ks_distance(counts: &Counts, law: &LawAt) -> f64 {
    let n = counts.total() as f64;
    let Some(max) = counts.max_k() else {
        return 0.0;
    };
    let mut empirical = 0u64;
    let mut cumulative = 0.0f64;
    let mut distance = 0.0f64;
    for (k, p) in PmfWalk::new(law) {
        cumulative += p;
        empirical += counts.by_k.get(&k).copied().unwrap_or(0);
        distance = distance.max((empirical as f64 / n - cumulative).abs());
        if k >= max {
            break;
        }
    }
    distance
}
