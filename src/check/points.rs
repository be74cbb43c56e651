//! Where the numeric route looks: parameter points drawn deterministically from the declared
//! ranges, and the indices k (small, medium, large) at which claim and truth are compared.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::One;

use crate::algebra::{q, Q};
use crate::model::{Param, Problem};

/// A parameter point: a value for every parameter and the base value a(b).
#[derive(Clone, Debug, PartialEq)]
pub struct Point {
    pub values: BTreeMap<String, Q>,
    pub base: Q,
}

/// How many points when some parameter is free.
pub const POINTS: usize = 3;

/// Offsets from the base index: every k up to b + 12, then medium and large ones.
const OFFSETS: &[u64] = &[
    0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 20, 50, 100, 316, 1000, 10_000, 100_000, 1_000_000,
];

/// A second base value, used when the claim names the base term and `--base` is not given, so
/// that a claim not proportional to a(b) cannot pass (an arbitrary value, common practice).
pub fn alternative_base() -> Q {
    q(7, 3)
}

/// Fractions of an interval, spread out and unlikely to hit special values.
const INTERVAL_FRACTIONS: [(i64, i64); 3] = [(2, 7), (5, 9), (4, 5)];
/// Distances from a one-sided bound.
const STEPS: [(i64, i64); 3] = [(3, 7), (13, 6), (47, 5)];
/// Values for a parameter declared nowhere.
const UNDECLARED: [(i64, i64); 3] = [(3, 7), (2, 9), (5, 8)];

/// Deterministic candidate values for one parameter, in its declared range.
fn candidates(p: &Param) -> Vec<Q> {
    let raw: Vec<Q> = if p.integer {
        let lo = p.lower.as_ref().map(|(v, closed)| {
            let c = v.ceil().to_integer();
            if !closed && Q::from_integer(c.clone()) == *v {
                c + 1
            } else {
                c
            }
        });
        let hi = p.upper.as_ref().map(|(v, closed)| {
            let f = v.floor().to_integer();
            if !closed && Q::from_integer(f.clone()) == *v {
                f - 1
            } else {
                f
            }
        });
        let ints: Vec<BigInt> = match (lo, hi) {
            (Some(l), Some(h)) => {
                let width = &h - &l;
                [(1, 4), (1, 2), (1, 1)]
                    .iter()
                    .map(|(a, b)| &l + (&width * BigInt::from(*a)).div_floor(&BigInt::from(*b)))
                    .collect()
            }
            (Some(l), None) => [1, 4, 11].iter().map(|d| &l + BigInt::from(*d)).collect(),
            (None, Some(h)) => [1, 4, 11].iter().map(|d| &h - BigInt::from(*d)).collect(),
            (None, None) => [2, 5, 12].iter().map(|d| BigInt::from(*d)).collect(),
        };
        ints.into_iter().map(Q::from_integer).collect()
    } else {
        match (&p.lower, &p.upper) {
            (Some((l, _)), Some((h, _))) => INTERVAL_FRACTIONS
                .iter()
                .map(|(a, b)| l + (h - l) * q(*a, *b))
                .collect(),
            (Some((l, _)), None) => STEPS.iter().map(|(a, b)| l + q(*a, *b)).collect(),
            (None, Some((h, _))) => STEPS.iter().map(|(a, b)| h - q(*a, *b)).collect(),
            // Undeclared: values in (0, 1), where rates such as p and 1 − p stay positive.
            (None, None) => UNDECLARED.iter().map(|(a, b)| q(*a, *b)).collect(),
        }
    };
    let mut out: Vec<Q> = raw.into_iter().filter(|v| p.admits(v)).collect();
    out.dedup();
    out
}

/// The parameter points: fixed values as given, free parameters from their candidates (the
/// j-th parameter takes candidate (i + j) mod n at point i, so they do not move in step).
pub fn parameter_points(
    problem: &Problem,
    fixed: &BTreeMap<String, Q>,
    base: Option<&Q>,
    claim_names_base: bool,
) -> Vec<Point> {
    let free: Vec<(&Param, Vec<Q>)> = problem
        .params
        .iter()
        .filter(|p| !fixed.contains_key(&p.name))
        .map(|p| (p, candidates(p)))
        .collect();
    let vary_base = base.is_none() && claim_names_base;
    let count = if free.is_empty() {
        if vary_base {
            2
        } else {
            1
        }
    } else {
        POINTS
    };
    let mut points = Vec::new();
    for i in 0..count {
        let mut values = fixed.clone();
        let mut complete = true;
        for (j, (p, cands)) in free.iter().enumerate() {
            if cands.is_empty() {
                complete = false;
                break;
            }
            values.insert(p.name.clone(), cands[(i + j) % cands.len()].clone());
        }
        if !complete {
            continue;
        }
        let base = match base {
            Some(b) => b.clone(),
            None if vary_base && i % 2 == 1 => alternative_base(),
            None => Q::one(),
        };
        let point = Point { values, base };
        if !points.contains(&point) {
            points.push(point);
        }
    }
    points
}

/// The k to check from base index `b`, stopping two past a finite support's last index.
pub fn sample_indices(b: &BigInt, last: Option<&BigInt>) -> Vec<BigInt> {
    let mut out: Vec<BigInt> = OFFSETS.iter().map(|d| b + BigInt::from(*d)).collect();
    if let Some(last) = last {
        let stop = last + 2;
        out.retain(|k| *k <= stop);
        // Past the end of the support both sides must vanish.
        for extra in [last.clone(), last + 1, stop] {
            if extra >= *b && !out.contains(&extra) {
                out.push(extra);
            }
        }
        out.sort();
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::build_problem;

    #[test]
    fn points_respect_declared_ranges_and_fixed_values() {
        let p = build_problem(
            "param N integer >= 1\nparam p in (0, 1)\na(k)/a(k-1) = (N-k+1)/k * p/(1-p) for k >= 1",
        )
        .unwrap();
        let pts = parameter_points(&p, &BTreeMap::new(), None, true);
        assert_eq!(pts.len(), 3);
        for pt in &pts {
            assert!(p.param("N").unwrap().admits(&pt.values["N"]));
            assert!(p.param("p").unwrap().admits(&pt.values["p"]));
        }
        assert_ne!(pts[0].base, pts[1].base);
        let fixed = [("N".to_string(), Q::from_integer(12.into()))].into();
        let pts = parameter_points(&p, &fixed, Some(&Q::one()), true);
        assert!(pts
            .iter()
            .all(|pt| pt.values["N"] == Q::from_integer(12.into())));
        assert!(pts.iter().all(|pt| pt.base.is_one()));
    }

    #[test]
    fn indices_stop_after_a_finite_support() {
        let ks = sample_indices(&BigInt::from(0), Some(&BigInt::from(12)));
        assert_eq!(ks.last(), Some(&BigInt::from(14)));
        assert_eq!(ks.len(), 15);
        let ks = sample_indices(&BigInt::from(1), None);
        assert_eq!(ks.last(), Some(&BigInt::from(1_000_001)));
    }
}
