//! Balance equations: a linear form in consecutive sequence terms solved for the ratio.
//!
//! Two terms `A(k)·a(k) + B(k)·a(k−1) = 0` give `a(k)/a(k−1) = −B(k)/A(k)`. Three terms are
//! accepted in the birth–death form `λ(k−1)a(k−1) + μ(k+1)a(k+1) − (λ(k)+μ(k))a(k) = 0`: the
//! net flux `J(k) = λ(k−1)a(k−1) − μ(k)a(k)` then satisfies `J(k) = J(k+1)`, so it is constant,
//! and if it vanishes at the boundary `a(k)/a(k−1) = λ(k−1)/μ(k)` (the reduction used for
//! stationary birth–death chains, e.g. Karlin & Taylor, *A First Course in Stochastic
//! Processes*, 2nd ed., §4.7).

use num_traits::Signed;

use crate::algebra::{Poly, RatFunc};
use crate::diagnostic::{Diagnostic, Span};
use crate::ratio::Ratio;

use super::derivation::{Assumption, RuleSource};
use super::expr::ProductForm;
use super::linear::{LinearForm, LinearTerm, TermAt};
use super::normal_form::normal_form;

/// The ratio a balance equation defines, how it was found, and how far the index moved
/// (`index_shift` is added to the equation's first index: `a(k+1) = … a(k)` for k ≥ 1 is the
/// rule for k ≥ 2).
#[derive(Debug)]
pub struct BalanceRule {
    pub ratio: Ratio,
    pub form: ProductForm,
    pub source: RuleSource,
    pub assumptions: Vec<Assumption>,
    pub index_shift: i64,
}

/// Solves a collected balance equation (terms already moved to one side).
pub fn balance_rule(
    form: &LinearForm,
    sequence: &str,
    index: &str,
    span: Span,
) -> Result<BalanceRule, Diagnostic> {
    if let Some((free, free_span)) = &form.free {
        if !free.is_zero() {
            return Err(Diagnostic::new(
                format!("this term does not contain {sequence}: a balance equation must be homogeneous in {sequence}"),
                free_span.clone(),
            )
            .with_help(format!(
                "every term should be a coefficient times {sequence}(k), {sequence}(k-1) or {sequence}(k+1); an equation for one fixed term such as {sequence}(1) = … is a boundary equation"
            )));
        }
    }
    if let Some(fixed) = form.terms.iter().find(|t| matches!(t.at, TermAt::Fixed(_))) {
        return Err(Diagnostic::new(
            format!("a fixed term of {sequence} in a balance equation for general {index}"),
            fixed.span.clone(),
        )
        .with_help(format!(
            "write boundary equations (such as {sequence}(1) = …) as separate statements"
        )));
    }
    let shifts: Vec<i64> = form
        .terms
        .iter()
        .map(|t| match t.at {
            TermAt::Shift(s) => s,
            TermAt::Fixed(_) => unreachable!("refused above"),
        })
        .collect();
    let (Some(&low), Some(&high)) = (shifts.first(), shifts.last()) else {
        return Err(Diagnostic::new(
            format!("the terms of {sequence} cancel: nothing is left to solve"),
            span,
        ));
    };
    let consecutive = shifts.windows(2).all(|w| w[1] == w[0] + 1);
    if shifts.len() == 1 || !consecutive || shifts.len() > 3 {
        let which = form.terms.last().expect("non-empty").span.clone();
        return Err(Diagnostic::new(
            format!(
                "a balance equation needs two consecutive terms, {sequence}({index}) and {sequence}({index}-1) (or three, with {sequence}({index}+1)); this one has {}",
                describe_shifts(&shifts, sequence, index)
            ),
            which,
        )
        .with_help("a first-order rule relates each term to the one before it"));
    }
    // Move the terms so that the lowest is a(k−1): a(k + s) with k = j + t.
    let t = -1 - low;
    let terms: Vec<LinearTerm> = form
        .terms
        .iter()
        .map(|term| LinearTerm {
            at: term.at.clone(),
            coefficient: shift_form(&term.coefficient, index, t),
            span: term.span.clone(),
        })
        .collect();
    let index_shift = -t;
    let _ = high;
    if terms.len() == 2 {
        two_term(&terms[0], &terms[1], sequence, index, index_shift)
    } else {
        three_term(&terms, sequence, index, index_shift)
    }
}

fn describe_shifts(shifts: &[i64], sequence: &str, index: &str) -> String {
    let list: Vec<String> = shifts
        .iter()
        .map(|s| match s.cmp(&0) {
            std::cmp::Ordering::Equal => format!("{sequence}({index})"),
            std::cmp::Ordering::Greater => format!("{sequence}({index}+{s})"),
            std::cmp::Ordering::Less => format!("{sequence}({index}-{})", -s),
        })
        .collect();
    list.join(", ")
}

/// `c(k)` → `c(k + t)`, factor by factor.
pub fn shift_form(form: &ProductForm, index: &str, t: i64) -> ProductForm {
    if t == 0 {
        return form.clone();
    }
    let by = &Poly::var(index) + &Poly::from_integer(t);
    let mut out = form.clone();
    for f in &mut out.factors {
        f.poly = f.poly.substitute(index, &by);
    }
    out
}

fn shift_ratfunc(r: &RatFunc, index: &str, t: i64) -> RatFunc {
    let by = &RatFunc::var(index) + &RatFunc::from_integer(t);
    r.substitute(index, &by)
        .expect("shifting the index keeps a non-zero denominator")
}

/// Factors one coefficient on its own first, so that a failure names the term it belongs to.
fn check_factorable(term: &LinearTerm, sequence: &str, index: &str) -> Result<(), Diagnostic> {
    normal_form(&term.coefficient, index)
        .map(|_| ())
        .map_err(|e| {
            Diagnostic::new(
                format!(
                    "the coefficient of {} cannot be factored into linear factors in {index}: {}",
                    term_name(&term.at, sequence, index),
                    e.message
                ),
                term.span.clone(),
            )
            .with_help(e.help.unwrap_or_default())
        })
}

fn term_name(at: &TermAt, sequence: &str, index: &str) -> String {
    match at {
        TermAt::Shift(s) => describe_shifts(&[*s], sequence, index),
        TermAt::Fixed(m) => format!("{sequence}({m})"),
    }
}

fn two_term(
    previous: &LinearTerm,
    current: &LinearTerm,
    sequence: &str,
    index: &str,
    index_shift: i64,
) -> Result<BalanceRule, Diagnostic> {
    check_factorable(previous, sequence, index)?;
    check_factorable(current, sequence, index)?;
    let form = previous
        .coefficient
        .clone()
        .negated()
        .divided_by(current.coefficient.clone(), current.span.clone())
        .expect("zero coefficients were dropped");
    let ratio = normal_form(&form, index)?;
    Ok(BalanceRule {
        ratio,
        form,
        source: RuleSource::Balance {
            current: current.coefficient.clone(),
            previous: previous.coefficient.clone().negated(),
        },
        assumptions: Vec::new(),
        index_shift,
    })
}

fn three_term(
    terms: &[LinearTerm],
    sequence: &str,
    index: &str,
    index_shift: i64,
) -> Result<BalanceRule, Diagnostic> {
    let (previous, current, next) = (&terms[0], &terms[1], &terms[2]);
    let p = previous.coefficient.expand();
    let c = current.coefficient.expand();
    let n = next.coefficient.expand();
    // λ(k) = P(k+1), μ(k) = N(k−1); the form requires C(k) = −(λ(k) + μ(k)).
    let birth = shift_ratfunc(&p, index, 1);
    let death = shift_ratfunc(&n, index, -1);
    // Shown as 0 = λ(k−1)a(k−1) − (λ(k)+μ(k))a(k) + μ(k+1)a(k+1), whichever side it was on.
    let sign = if looks_negative(&c) { 1 } else { -1 };
    let scale = RatFunc::from_integer(sign);
    let oriented = |f: &ProductForm| {
        if sign < 0 {
            f.clone().negated()
        } else {
            f.clone()
        }
    };
    let sum = &(&c + &birth) + &death;
    if !sum.is_zero() {
        let (birth, death) = (&birth * &scale, &death * &scale);
        return Err(Diagnostic::new(
            format!(
                "with {sequence}({index}+1) this must be the birth–death balance λ({index}−1){sequence}({index}−1) + μ({index}+1){sequence}({index}+1) − (λ({index}) + μ({index})){sequence}({index}) = 0, but the coefficient of {sequence}({index}) is not −(λ({index}) + μ({index})) for λ({index}) = {birth}, μ({index}) = {death} read from the other two terms"
            ),
            current.span.clone(),
        )
        .with_help("check the signs and the shifts of the rates: the outflow of state k is the sum of its birth and death rates"));
    }
    check_factorable(previous, sequence, index)?;
    let death_at_k = super::linear::LinearTerm {
        at: TermAt::Shift(1),
        coefficient: shift_form(&next.coefficient, index, -1),
        span: next.span.clone(),
    };
    check_factorable(&death_at_k, sequence, index)?;
    // a(k)/a(k−1) = λ(k−1)/μ(k) = P(k)/N(k−1).
    let form = previous
        .coefficient
        .clone()
        .divided_by(death_at_k.coefficient, next.span.clone())
        .expect("zero coefficients were dropped");
    let ratio = normal_form(&form, index)?;
    Ok(BalanceRule {
        ratio,
        form,
        source: RuleSource::BirthDeathBalance {
            previous: oriented(&previous.coefficient),
            current: oriented(&current.coefficient),
            next: oriented(&next.coefficient),
            birth: &birth * &scale,
            death: &death * &scale,
        },
        assumptions: vec![Assumption::ZeroFluxAtBoundary],
        index_shift,
    })
}

/// Whether a coefficient reads as negative (its leading term has a minus sign): the outflow
/// term −(λ+μ) usually does, and the recognised rates are shown with the matching sign.
fn looks_negative(r: &RatFunc) -> bool {
    let lead = |p: &Poly| {
        p.leading_term()
            .map(|(_, c)| c.is_negative())
            .unwrap_or(false)
    };
    lead(r.numer()) != lead(r.denom())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::expr::Names;
    use crate::model::linear::collect_equation;
    use crate::ratio::Orientation;
    use crate::syntax::{parse_model, StatementKind};

    fn rule(text: &str) -> Result<BalanceRule, Diagnostic> {
        let model = parse_model(text).unwrap();
        let StatementKind::Equation { lhs, rhs, .. } = &model.statements[0].kind else {
            panic!()
        };
        let mut names = Names {
            index: "k",
            sequence: "p",
            params: Vec::new(),
            work: 0,
        };
        let form = collect_equation(lhs, rhs, &mut names)?;
        balance_rule(&form, "p", "k", 0..text.len())
    }

    #[test]
    fn two_terms_give_the_ratio() {
        let r = rule("(k+2) p(k) = (k-1) p(k-1)").unwrap();
        assert_eq!(r.index_shift, 0);
        let shifts: Vec<_> = r
            .ratio
            .factors
            .iter()
            .map(|f| (f.shift.clone(), f.exponent))
            .collect();
        assert_eq!(
            shifts,
            vec![
                (RatFunc::from_integer(-1), 1),
                (RatFunc::from_integer(2), -1)
            ]
        );
    }

    #[test]
    fn a_forward_relation_moves_the_index() {
        // (k+1) p(k+1) = lambda p(k): the Poisson balance, ratio lambda/k from one step later.
        let r = rule("(k+1) p(k+1) = lambda p(k)").unwrap();
        assert_eq!(r.index_shift, 1);
        assert_eq!(r.ratio.factors.len(), 1);
        assert_eq!(r.ratio.factors[0].shift, RatFunc::zero());
        assert_eq!(r.ratio.factors[0].exponent, -1);
        assert_eq!(r.ratio.constant, RatFunc::var("lambda"));
    }

    #[test]
    fn the_birth_death_form_reduces_by_zero_flux() {
        // lambda p(k-1) + (k+1) mu p(k+1) - (lambda + k mu) p(k) = 0: the M/M/∞ balance
        let r = rule("0 = lambda p(k-1) + (k+1) mu p(k+1) - (lambda + k mu) p(k)").unwrap();
        assert_eq!(r.assumptions, vec![Assumption::ZeroFluxAtBoundary]);
        let RuleSource::BirthDeathBalance { birth, death, .. } = &r.source else {
            panic!()
        };
        assert_eq!(birth, &RatFunc::var("lambda"));
        assert_eq!(death, &(&RatFunc::var("mu") * &RatFunc::var("k")));
        let lambda_over_mu = RatFunc::var("lambda")
            .checked_div(&RatFunc::var("mu"))
            .unwrap();
        assert_eq!(r.ratio.constant, lambda_over_mu);
        assert_eq!(r.ratio.factors.len(), 1);
        assert_eq!(r.ratio.factors[0].orientation, Orientation::Rising);
    }

    #[test]
    fn refusals_name_the_term() {
        let e = rule("0 = lambda p(k-1) + mu p(k+1) - (lambda + 2 mu) p(k)").unwrap_err();
        assert!(e.message.contains("not −(λ(k) + μ(k))"), "{e:?}");
        let e = rule("(k^2 + a) p(k) = p(k-1)").unwrap_err();
        assert!(
            e.message
                .starts_with("the coefficient of p(k) cannot be factored"),
            "{e:?}"
        );
        assert_eq!(e.span, 0..14);
        let e = rule("(k^2 + 1) p(k) = p(k-1)").unwrap_err();
        assert!(e.message.contains("no rational roots"), "{e:?}");
        let e = rule("p(k) = p(k-2)").unwrap_err();
        assert!(e.message.contains("two consecutive terms"), "{e:?}");
        let e = rule("p(k) = p(k-1) + 1").unwrap_err();
        assert!(e.message.contains("homogeneous"), "{e:?}");
    }
}
