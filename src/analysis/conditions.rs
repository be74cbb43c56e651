//! Convergence and finiteness conditions as inequalities in the parameters, decided from
//! `--param` values or from the declared ranges: in one parameter solved exactly into the
//! intervals where they hold, in several proved from the box of ranges or solved for a
//! parameter in which they are linear (`solve::inequality`).

use std::collections::BTreeMap;

use num_traits::{One, Signed, Zero};

use crate::algebra::{RatFunc, Q};
use crate::model::Param;
use crate::solve::box_sign::{box_sign, BoxSign};
use crate::solve::inequality::{solve_linear, split_univariate_open, LinearSolution, Split};
use crate::solve::ranges::Interval;
use crate::solve::reason::Reason;

/// One inequality in the parameters.
#[derive(Clone, Debug, PartialEq)]
pub enum Inequality {
    /// expr > 0
    Positive(RatFunc),
    /// |expr| < 1
    AbsBelowOne(RatFunc),
    /// Never holds; the string says why (factorial growth, |r| > 1 …).
    Never(String),
}

/// Whether an inequality holds, and why (typed: the renderers lay out its formulas).
#[derive(Clone, Debug, PartialEq)]
pub enum Verdict {
    Holds(Reason),
    Fails(Reason),
    Undecided,
}

/// Where an inequality holds when the ranges leave it open.
#[derive(Clone, Debug, PartialEq)]
pub enum Region {
    /// One parameter: the intervals of its declared range where it holds and where it fails.
    Intervals(Split),
    /// Several parameters: solved for one in which it is linear, the others remaining.
    Linear(LinearSolution),
}

/// An inequality, what it guarantees, and whether it holds here.
#[derive(Clone, Debug, PartialEq)]
pub struct Requirement {
    pub inequality: Inequality,
    /// What it is for, in words ("the total converges").
    pub purpose: String,
    pub verdict: Verdict,
    /// Where it holds, when the verdict is undecided and that can be said exactly.
    pub region: Option<Region>,
}

impl Requirement {
    /// `digits`: the decimals of irrational ends of `region`.
    pub fn new(
        inequality: Inequality,
        purpose: &str,
        values: &BTreeMap<String, Q>,
        params: &[Param],
        digits: u32,
    ) -> Requirement {
        let (verdict, region) = decide_with_region(&inequality, values, params, digits);
        Requirement {
            inequality,
            purpose: purpose.to_string(),
            verdict,
            region,
        }
    }

    pub fn fails(&self) -> bool {
        matches!(self.verdict, Verdict::Fails(_))
    }
}

/// `(1 − 2ρ)/(ρ − 1) = 0 with ρ = 1/2`, or `it equals 0` for a number.
fn failure(expr: &RatFunc, value: &Q, values: &BTreeMap<String, Q>) -> Reason {
    if expr.variables().is_empty() {
        Reason::words("it equals").then_number(value)
    } else {
        Reason::default()
            .then_equation(expr, value)
            .then_words("with")
            .then_values_of(expr, values)
    }
}

pub fn decide(ineq: &Inequality, values: &BTreeMap<String, Q>, params: &[Param]) -> Verdict {
    decide_with_region(ineq, values, params, DEFAULT_DIGITS).0
}

/// Digits of irrational interval ends when no `--digits` is at hand.
const DEFAULT_DIGITS: u32 = 30;

/// The inequality as `f > 0` conditions (|r| < 1 is 1 − r > 0 and 1 + r > 0), each with
/// whether its zeros are open: |r| = 1 fails the inequality, yet whether the sum converges
/// there depends on the power of k, which this inequality does not see.
fn as_positive(ineq: &Inequality) -> Vec<(RatFunc, bool)> {
    let one = RatFunc::one();
    match ineq {
        Inequality::Never(_) => Vec::new(),
        Inequality::Positive(expr) => vec![(expr.clone(), false)],
        Inequality::AbsBelowOne(expr) => vec![(&one - expr, true), (&one + expr, true)],
    }
}

/// The conditions with the values substituted; `None` when a value divides by zero.
fn substituted(
    conditions: Vec<(RatFunc, bool)>,
    values: &BTreeMap<String, Q>,
) -> Option<Vec<(RatFunc, bool)>> {
    conditions
        .into_iter()
        .map(|(f, open)| f.eval_partial(values).ok().map(|f| (f, open)))
        .collect()
}

/// The verdict, and where the inequality holds when the ranges leave it open.
fn decide_with_region(
    ineq: &Inequality,
    values: &BTreeMap<String, Q>,
    params: &[Param],
    digits: u32,
) -> (Verdict, Option<Region>) {
    let expr = match ineq {
        Inequality::Never(why) => return (Verdict::Fails(Reason::words(why.clone())), None),
        Inequality::Positive(expr) | Inequality::AbsBelowOne(expr) => expr,
    };
    if let Ok(v) = expr.eval(values) {
        let holds = match ineq {
            Inequality::Positive(_) => v.is_positive(),
            _ => v.abs() < Q::one(),
        };
        let verdict = if holds {
            Verdict::Holds(Reason::values_of(expr, values))
        } else {
            Verdict::Fails(failure(expr, &v, values))
        };
        return (verdict, None);
    }
    let Some(conditions) = substituted(as_positive(ineq), values) else {
        return (Verdict::Undecided, None);
    };
    let fails = match ineq {
        Inequality::Positive(_) => "the declared ranges make it ≤ 0",
        _ => "the declared ranges make it ≥ 1",
    };
    if let Some(split) = split_of(&conditions, params, digits) {
        return match split.everywhere() {
            Some(true) => (Verdict::Holds("the declared ranges".into()), None),
            Some(false) => (Verdict::Fails(fails.into()), None),
            None => (Verdict::Undecided, Some(Region::Intervals(split))),
        };
    }
    // Several parameters: a sign proven on the box of ranges, else solve for one of them.
    let signs: Vec<Option<BoxSign>> = conditions
        .iter()
        .map(|(f, _)| box_sign(f, params))
        .collect();
    if signs.iter().all(|s| *s == Some(BoxSign::Positive)) {
        return (Verdict::Holds("the declared ranges".into()), None);
    }
    if signs
        .iter()
        .any(|s| matches!(s, Some(BoxSign::Negative | BoxSign::NonPositive)))
    {
        return (Verdict::Fails(fails.into()), None);
    }
    let region = match conditions.as_slice() {
        [(only, _)] => solve_linear(only, params).map(Region::Linear),
        _ => None,
    };
    (Verdict::Undecided, region)
}

/// Several linear solutions `x > b_i` (or all `x < b_i`) whose bounds differ by numbers: the
/// conjunction is the one with the largest (smallest) bound.
fn strongest_linear(open: &[&Requirement]) -> Option<LinearSolution> {
    let solutions: Vec<&LinearSolution> = open
        .iter()
        .map(|r| match &r.region {
            Some(Region::Linear(l)) => Some(l),
            _ => None,
        })
        .collect::<Option<_>>()?;
    let first = solutions[0];
    let mut best = first;
    for l in &solutions[1..] {
        if l.param != first.param || l.greater != first.greater {
            return None;
        }
        let gap = (&l.bound - &best.bound).as_constant()?;
        if gap.is_positive() == first.greater && !gap.is_zero() {
            best = l;
        }
    }
    Some(best.clone())
}

/// The conjunction `f_i > 0` solved exactly when every `f_i` is in the same one parameter.
fn split_of(conditions: &[(RatFunc, bool)], params: &[Param], digits: u32) -> Option<Split> {
    let mut variables = conditions.iter().flat_map(|(f, _)| f.variables());
    let name = variables.next()?;
    if variables.any(|v| v != name) {
        return None;
    }
    let param = params.iter().find(|p| p.name == name)?;
    let coeffs = |p: &crate::algebra::Poly| p.univariate_coeffs(&name).unwrap_or_default();
    let pairs: Vec<(Vec<Q>, Vec<Q>)> = conditions
        .iter()
        .map(|(f, _)| (coeffs(f.numer()), coeffs(f.denom())))
        .collect();
    let open_at: Vec<Vec<Q>> = conditions
        .iter()
        .filter(|(_, open)| *open)
        .map(|(f, _)| coeffs(f.numer()))
        .collect();
    Some(split_univariate_open(
        &name,
        param.integer,
        &pairs,
        &open_at,
        &Interval::of_param(param),
        digits,
    ))
}

/// Where every requirement holds together: the conjunction of the undecided ones solved in
/// their one parameter, or the one undecided requirement's linear solution; `None` when
/// nothing is undecided or they cannot be combined.
pub fn joint_region(
    requirements: &[Requirement],
    values: &BTreeMap<String, Q>,
    params: &[Param],
    digits: u32,
) -> Option<Region> {
    let open: Vec<&Requirement> = requirements
        .iter()
        .filter(|r| r.verdict == Verdict::Undecided)
        .collect();
    if open.is_empty() || open.iter().any(|r| r.region.is_none()) {
        return None;
    }
    if let [only] = open.as_slice() {
        return only.region.clone();
    }
    if let Some(strongest) = strongest_linear(&open) {
        return Some(Region::Linear(strongest));
    }
    let conditions = substituted(
        open.iter()
            .flat_map(|r| as_positive(&r.inequality))
            .collect(),
        values,
    )?;
    split_of(&conditions, params, digits).map(Region::Intervals)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    fn param(name: &str, lower: Option<(Q, bool)>, upper: Option<(Q, bool)>) -> Param {
        Param {
            lower,
            upper,
            ..Param::undeclared(name)
        }
    }

    #[test]
    fn values_decide_and_ranges_decide_affine_cases() {
        let alpha = RatFunc::var("alpha");
        let cond = Inequality::Positive(&alpha - &RatFunc::one());
        let values = [("alpha".to_string(), q(5, 2))].into();
        assert!(matches!(decide(&cond, &values, &[]), Verdict::Holds(_)));
        let values = [("alpha".to_string(), q(1, 2))].into();
        assert!(matches!(decide(&cond, &values, &[]), Verdict::Fails(_)));
        // alpha in (1, ∞): alpha − 1 > 0 holds on the open range
        let params = [param("alpha", Some((q(1, 1), false)), None)];
        assert!(matches!(
            decide(&cond, &BTreeMap::new(), &params),
            Verdict::Holds(_)
        ));
        // alpha > 0 alone does not settle alpha − 1 > 0
        let params = [param("alpha", Some((q(0, 1), false)), None)];
        assert_eq!(decide(&cond, &BTreeMap::new(), &params), Verdict::Undecided);
        // p in (0, 1): |1 − p| < 1
        let p = RatFunc::var("p");
        let params = [param("p", Some((q(0, 1), false)), Some((q(1, 1), false)))];
        let abs = Inequality::AbsBelowOne(&RatFunc::one() - &p);
        assert!(matches!(
            decide(&abs, &BTreeMap::new(), &params),
            Verdict::Holds(_)
        ));
    }
}
