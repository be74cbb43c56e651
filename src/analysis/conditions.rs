//! Convergence and finiteness conditions as inequalities in the parameters, decided from
//! `--param` values or, where they settle it, from the declared ranges.

use std::collections::BTreeMap;

use num_traits::{Signed, Zero};

use crate::algebra::{RatFunc, Q};
use crate::model::Param;

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

#[derive(Clone, Debug, PartialEq)]
pub enum Verdict {
    Holds(String),
    Fails(String),
    Undecided,
}

/// An inequality, what it guarantees, and whether it holds here.
#[derive(Clone, Debug, PartialEq)]
pub struct Requirement {
    pub inequality: Inequality,
    /// What it is for, in words ("the total converges").
    pub purpose: String,
    pub verdict: Verdict,
}

impl Requirement {
    pub fn new(
        inequality: Inequality,
        purpose: &str,
        values: &BTreeMap<String, Q>,
        params: &[Param],
    ) -> Requirement {
        let verdict = decide(&inequality, values, params);
        Requirement {
            inequality,
            purpose: purpose.to_string(),
            verdict,
        }
    }

    pub fn fails(&self) -> bool {
        matches!(self.verdict, Verdict::Fails(_))
    }
}

fn settled_by(expr: &RatFunc, values: &BTreeMap<String, Q>) -> String {
    let vars = expr.variables();
    if vars.is_empty() {
        return "a number".to_string();
    }
    vars.iter()
        .filter_map(|v| values.get(v).map(|q| format!("{v} = {q}")))
        .collect::<Vec<_>>()
        .join(", ")
}

fn failure(expr: &RatFunc, value: &Q, values: &BTreeMap<String, Q>) -> String {
    if expr.variables().is_empty() {
        format!("it equals {value}")
    } else {
        format!("{expr} = {value} with {}", settled_by(expr, values))
    }
}

pub fn decide(ineq: &Inequality, values: &BTreeMap<String, Q>, params: &[Param]) -> Verdict {
    match ineq {
        Inequality::Never(why) => Verdict::Fails(why.clone()),
        Inequality::Positive(expr) => match expr.eval(values) {
            Ok(v) if v.is_positive() => Verdict::Holds(settled_by(expr, values)),
            Ok(v) => Verdict::Fails(failure(expr, &v, values)),
            Err(_) => match sign_from_ranges(expr, params) {
                Some(true) => Verdict::Holds("the declared ranges".into()),
                Some(false) => Verdict::Fails("the declared ranges make it ≤ 0".into()),
                None => Verdict::Undecided,
            },
        },
        Inequality::AbsBelowOne(expr) => match expr.eval(values) {
            Ok(v) if v.abs() < Q::from_integer(1.into()) => {
                Verdict::Holds(settled_by(expr, values))
            }
            Ok(v) => Verdict::Fails(failure(expr, &v, values)),
            Err(_) => {
                let one = RatFunc::one();
                let below = sign_from_ranges(&(&one - expr), params);
                let above = sign_from_ranges(&(&one + expr), params);
                match (below, above) {
                    (Some(true), Some(true)) => Verdict::Holds("the declared ranges".into()),
                    (Some(false), _) | (_, Some(false)) => {
                        Verdict::Fails("the declared ranges make it ≥ 1".into())
                    }
                    _ => Verdict::Undecided,
                }
            }
        },
    }
}

/// An end of an interval: a value and whether it is attained.
#[derive(Clone, Debug)]
struct End {
    value: Q,
    attained: bool,
}

/// Whether `expr > 0` everywhere (`Some(true)`) or nowhere (`Some(false)`) on the box of
/// declared ranges, for numerators and denominators affine in the parameters; `None` when
/// that is not settled this way.
fn sign_from_ranges(expr: &RatFunc, params: &[Param]) -> Option<bool> {
    let num = affine_range(expr.numer(), params)?;
    let den = affine_range(expr.denom(), params)?;
    let (num, den) = (sign_of(&num)?, sign_of(&den)?);
    use Sign::*;
    match (num, den) {
        (Positive, Positive) | (Negative, Negative) => Some(true),
        (Positive | Negative, _) if den == NonPositive => None,
        (Negative | NonPositive, Positive) => Some(false),
        (Positive, Negative) => Some(false),
        _ => None,
    }
}

#[derive(Clone, Copy, Debug, PartialEq)]
enum Sign {
    /// > 0 everywhere
    Positive,
    /// < 0 everywhere
    Negative,
    /// ≤ 0 everywhere
    NonPositive,
}

fn sign_of(r: &(Option<End>, Option<End>)) -> Option<Sign> {
    if let Some(lo) = &r.0 {
        if lo.value.is_positive() || (lo.value.is_zero() && !lo.attained) {
            return Some(Sign::Positive);
        }
    }
    if let Some(hi) = &r.1 {
        if hi.value.is_negative() || (hi.value.is_zero() && !hi.attained) {
            return Some(Sign::Negative);
        }
        if hi.value.is_zero() {
            return Some(Sign::NonPositive);
        }
    }
    None
}

/// The range of an affine polynomial over the declared box: (lower end, upper end), `None`
/// for an unbounded side; `None` overall when the polynomial is not affine.
fn affine_range(p: &crate::algebra::Poly, params: &[Param]) -> Option<(Option<End>, Option<End>)> {
    if p.total_degree() > 1 {
        return None;
    }
    let mut lo = Some(End {
        value: Q::zero(),
        attained: true,
    });
    let mut hi = lo.clone();
    for (monomial, c) in p.terms() {
        let vars: Vec<(&str, u32)> = monomial.factors().collect();
        if vars.is_empty() {
            lo = lo.map(|e| End {
                value: e.value + c,
                attained: e.attained,
            });
            hi = hi.map(|e| End {
                value: e.value + c,
                attained: e.attained,
            });
            continue;
        }
        let name = vars[0].0;
        let param = params.iter().find(|p| p.name == name)?;
        let lower = param.lower.clone().map(|(v, closed)| End {
            value: v,
            attained: closed,
        });
        let upper = param.upper.clone().map(|(v, closed)| End {
            value: v,
            attained: closed,
        });
        let (for_lo, for_hi) = if c.is_positive() {
            (lower, upper)
        } else {
            (upper, lower)
        };
        let add = |acc: Option<End>, end: Option<End>| -> Option<End> {
            let (a, e) = (acc?, end?);
            Some(End {
                value: a.value + c * e.value,
                attained: a.attained && e.attained,
            })
        };
        lo = add(lo, for_lo);
        hi = add(hi, for_hi);
    }
    Some((lo, hi))
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
