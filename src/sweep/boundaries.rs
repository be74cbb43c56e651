//! Where a quantity changes finiteness inside the swept range.
//!
//! The total, the mean and the variance are finite exactly when their convergence
//! requirements hold (`analysis::conditions`): inequalities `f > 0` or `|f| < 1` with `f` a
//! rational function of the parameters. With every other parameter fixed, `f` is a rational
//! function of the varied one, and finiteness can only change where a numerator or a
//! denominator vanishes. Rational roots are found exactly (`algebra::rational_roots`), and the
//! boundary is stated as an exact value; irrational roots are bracketed by exact bisection
//! to a width of about 2^-60 of the range and stated as brackets. Finiteness is decided on
//! either side and at the root itself, so only real changes are reported. As a last net, two
//! neighbouring sweep points that disagree with no boundary found between them give a
//! bracket by the sweep points.
//!
//! In a grid, boundaries are found along the first varied parameter, on every line of the
//! second.

use std::collections::BTreeMap;
use std::fmt;

use num_traits::{Signed, Zero};

use super::{Cell, Missing, Plan, Point, Quantity, RulePlan, SweepRequest};
use crate::algebra::{rational_roots, RatFunc, Q};
use crate::analysis::{Inequality, Verdict};

/// Where the boundary lies.
#[derive(Clone, Debug, PartialEq)]
pub enum Location {
    /// An exact rational root of the governing inequality.
    Exact(Q),
    /// Inside `[low, high]`: an irrational root bracketed by exact bisection, or two
    /// neighbouring sweep points.
    Bracketed { low: Q, high: Q, by: Bracket },
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Bracket {
    /// Bisection on the governing inequality (an irrational root).
    Bisection,
    /// Two neighbouring sweep points disagree; nothing finer is known.
    SweepPoints,
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Location::Exact(q) => write!(f, "{q}"),
            Location::Bracketed { low, high, .. } => write!(f, "[{low}, {high}]"),
        }
    }
}

/// Finite, infinite, or outside the model.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum State {
    Finite,
    Infinite,
    Invalid,
}

/// A change of finiteness of one quantity along the first varied parameter.
#[derive(Clone, Debug, PartialEq)]
pub struct Boundary {
    pub quantity: Quantity,
    pub param: String,
    /// In a grid, the value of the second varied parameter on this line.
    pub line: Option<(String, Q)>,
    pub location: Location,
    /// The state just below, at (for exact boundaries) and just above the boundary; `None`
    /// below (above) a boundary at the start (end) of the range.
    pub below: Option<State>,
    pub at: Option<State>,
    pub above: Option<State>,
    /// The requirement whose sign changes there, when one does.
    pub requirement: Option<Inequality>,
}

/// Bisection steps for an irrational root (the bracket is about 2^-60 of the range).
const BISECTIONS: u32 = 60;
/// Uniform subdivisions searched for sign changes of a polynomial with no rational roots.
const SCAN: u32 = 256;

/// Every boundary of the requested total, mean and variance.
pub fn find(plan: &Plan, request: &SweepRequest, points: &[Point]) -> Vec<Boundary> {
    let axis = &request.axes[0];
    let lines: Vec<Option<(String, Q)>> = match request.axes.get(1) {
        None => vec![None],
        Some(second) => second
            .values
            .iter()
            .map(|v| Some((second.name.clone(), v.clone())))
            .collect(),
    };
    let mut out = Vec::new();
    for (line_index, line) in lines.iter().enumerate() {
        let mut values = plan.fixed.clone();
        if let Some((name, v)) = line {
            values.insert(name.clone(), v.clone());
        }
        for (qi, quantity) in request.quantities.iter().enumerate() {
            let Some(j) = quantity.moment() else {
                continue;
            };
            let mut found = exact_boundaries(plan, j, &axis.name, &axis.from, &axis.to, &values)
                .into_iter()
                .map(|(location, below, at, above, requirement)| Boundary {
                    quantity: quantity.clone(),
                    param: axis.name.clone(),
                    line: line.clone(),
                    location,
                    below,
                    at,
                    above,
                    requirement,
                })
                .collect::<Vec<_>>();
            // The last net: neighbouring sweep points that disagree.
            let stride = lines.len();
            let row: Vec<(&Q, State)> = axis
                .values
                .iter()
                .enumerate()
                .map(|(i, x)| (x, cell_state(&points[i * stride + line_index].cells[qi])))
                .collect();
            for pair in row.windows(2) {
                let ((x0, s0), (x1, s1)) = (pair[0], pair[1]);
                let differ = (s0 == State::Finite) != (s1 == State::Finite)
                    && s0 != State::Invalid
                    && s1 != State::Invalid;
                let explained = found.iter().any(|b| match &b.location {
                    Location::Exact(q) => q >= x0 && q <= x1,
                    Location::Bracketed { low, high, .. } => high >= x0 && low <= x1,
                });
                if differ && !explained {
                    found.push(Boundary {
                        quantity: quantity.clone(),
                        param: axis.name.clone(),
                        line: line.clone(),
                        location: Location::Bracketed {
                            low: x0.clone(),
                            high: x1.clone(),
                            by: Bracket::SweepPoints,
                        },
                        below: Some(s0),
                        at: None,
                        above: Some(s1),
                        requirement: None,
                    });
                }
            }
            out.extend(found);
        }
    }
    out
}

fn cell_state(cell: &Cell) -> State {
    match cell {
        Cell::Value(_) => State::Finite,
        Cell::Missing(Missing::Infinite { .. }) => State::Infinite,
        Cell::Missing(_) => State::Invalid,
    }
}

type Found = (
    Location,
    Option<State>,
    Option<State>,
    Option<State>,
    Option<Inequality>,
);

/// Boundaries in [from, to] from the roots of the governing inequalities.
fn exact_boundaries(
    plan: &Plan,
    moment: usize,
    name: &str,
    from: &Q,
    to: &Q,
    others: &BTreeMap<String, Q>,
) -> Vec<Found> {
    let Some(rule) = &plan.rule else {
        return Vec::new();
    };
    let requirements = rule.requirements(moment);
    // (root, the requirement it belongs to)
    let mut exact: Vec<(Q, Inequality)> = Vec::new();
    let mut brackets: Vec<(Q, Q, Inequality)> = Vec::new();
    for r in requirements {
        for f in critical_functions(&r.inequality, others) {
            let Some(coeffs) = f.univariate_coeffs(name) else {
                continue;
            };
            if coeffs.len() <= 1 {
                continue;
            }
            let (roots, cofactor) = rational_roots(&coeffs);
            for (root, _) in roots {
                if &root >= from && &root <= to {
                    exact.push((root, r.inequality.clone()));
                }
            }
            for (low, high) in irrational_brackets(&cofactor, from, to) {
                brackets.push((low, high, r.inequality.clone()));
            }
        }
    }
    exact.sort_by(|a, b| a.0.cmp(&b.0));
    exact.dedup_by(|a, b| a.0 == b.0);
    let state = |x: &Q| -> State {
        let mut values = others.clone();
        values.insert(name.to_string(), x.clone());
        state_at(rule, moment, &values)
    };
    // Every critical point, in order, to find the neighbours of each.
    let mut marks: Vec<Q> = exact.iter().map(|(q, _)| q.clone()).collect();
    for (low, high, _) in &brackets {
        marks.push(low.clone());
        marks.push(high.clone());
    }
    marks.sort();
    marks.dedup();
    let half = |a: &Q, b: &Q| (a + b) / Q::from_integer(2.into());
    let neighbours = |x: &Q| -> (Q, Q) {
        let below = marks.iter().rfind(|m| *m < x).unwrap_or(from);
        let above = marks.iter().find(|m| *m > x).unwrap_or(to);
        (half(below, x), half(x, above))
    };
    let mut out = Vec::new();
    for (root, inequality) in exact {
        let (lo, hi) = neighbours(&root);
        let at = state(&root);
        let below = (root != *from).then(|| state(&lo));
        let above = (root != *to).then(|| state(&hi));
        if below.is_some_and(|b| b != at) || above.is_some_and(|a| a != at) {
            out.push((
                Location::Exact(root),
                below,
                Some(at),
                above,
                Some(inequality),
            ));
        }
    }
    for (low, high, inequality) in brackets {
        let (below, above) = (state(&low), state(&high));
        if below != above {
            out.push((
                Location::Bracketed {
                    low,
                    high,
                    by: Bracket::Bisection,
                },
                Some(below),
                None,
                Some(above),
                Some(inequality),
            ));
        }
    }
    out.sort_by(|a, b| left_end(&a.0).cmp(left_end(&b.0)));
    out
}

fn left_end(l: &Location) -> &Q {
    match l {
        Location::Exact(q) => q,
        Location::Bracketed { low, .. } => low,
    }
}

/// The functions of the varied parameter whose zeros can change the inequality's truth.
fn critical_functions(
    inequality: &Inequality,
    others: &BTreeMap<String, Q>,
) -> Vec<crate::algebra::Poly> {
    let partial = |f: &RatFunc| f.eval_partial(others).ok();
    match inequality {
        Inequality::Positive(f) => partial(f)
            .map(|f| vec![f.numer().clone(), f.denom().clone()])
            .unwrap_or_default(),
        Inequality::AbsBelowOne(f) => partial(f)
            .map(|f| {
                let one = RatFunc::one();
                vec![
                    (&one - &f).numer().clone(),
                    (&one + &f).numer().clone(),
                    f.denom().clone(),
                ]
            })
            .unwrap_or_default(),
        Inequality::Never(_) => Vec::new(),
    }
}

/// Finite, infinite or invalid at a point (every parameter has a value).
pub fn state_at(plan: &RulePlan, moment: usize, values: &BTreeMap<String, Q>) -> State {
    let ratio = &plan.problem.ratio;
    if ratio.constant.eval(values).is_err()
        || ratio.factors.iter().any(|f| f.shift.eval(values).is_err())
    {
        return State::Invalid;
    }
    if crate::analysis::at_point::support_end(&plan.problem, values).is_some() {
        return State::Finite;
    }
    let mut finite = true;
    for r in plan.requirements(moment) {
        match crate::analysis::conditions::decide(&r.inequality, values, &plan.problem.params) {
            Verdict::Holds(_) => {}
            Verdict::Fails(_) => return State::Infinite,
            Verdict::Undecided => finite = false,
        }
    }
    if finite {
        State::Finite
    } else {
        State::Invalid
    }
}

/// Horner's rule, exactly.
fn evaluate(coeffs: &[Q], x: &Q) -> Q {
    coeffs.iter().rev().fold(Q::zero(), |acc, c| acc * x + c)
}

/// Brackets around the sign changes in [from, to] of a polynomial with no rational roots.
fn irrational_brackets(coeffs: &[Q], from: &Q, to: &Q) -> Vec<(Q, Q)> {
    if coeffs.len() <= 2 {
        return Vec::new(); // constant, or linear with no rational root: impossible
    }
    let width = to - from;
    let at = |i: u32| from + &width * Q::new(i.into(), SCAN.into());
    let mut out = Vec::new();
    for i in 0..SCAN {
        let (mut lo, mut hi) = (at(i), at(i + 1));
        let (flo, fhi) = (evaluate(coeffs, &lo), evaluate(coeffs, &hi));
        if flo.is_zero() || fhi.is_zero() || flo.is_positive() == fhi.is_positive() {
            continue;
        }
        let lo_positive = flo.is_positive();
        for _ in 0..BISECTIONS {
            let mid = (&lo + &hi) / Q::from_integer(2.into());
            if evaluate(coeffs, &mid).is_positive() == lo_positive {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        out.push((lo, hi));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    #[test]
    fn brackets_close_in_on_the_square_root_of_two() {
        // x² − 2 on [1, 2]: the root √2 = 1.41421356237… (a fact of arithmetic)
        let coeffs = [q(-2, 1), q(0, 1), q(1, 1)];
        let found = irrational_brackets(&coeffs, &q(1, 1), &q(2, 1));
        assert_eq!(found.len(), 1);
        let (lo, hi) = &found[0];
        assert!(lo * lo < q(2, 1) && hi * hi > q(2, 1));
        assert!(hi - lo < q(1, 1_000_000_000_000));
    }
}
