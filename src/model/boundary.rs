//! Boundary equations: an equation in one fixed term of the sequence (`n(1) = rho − (1−rho) n(1)`)
//! solved for that term, which becomes the base value a(b) as an exact expression.

use crate::algebra::RatFunc;
use crate::diagnostic::{Diagnostic, Span};

use super::linear::{LinearForm, TermAt};
use super::problem::Boundary;

/// Solves `A·a(m) + F = 0` for `a(m) = −F/A`.
pub fn boundary_value(
    form: &LinearForm,
    sequence: &str,
    written: String,
    span: Span,
) -> Result<Boundary, Diagnostic> {
    let Some(first) = form.terms.first() else {
        return Err(Diagnostic::new(
            format!("the terms of {sequence} cancel: this equation fixes nothing"),
            span,
        ));
    };
    if let Some(other) = form.terms.get(1) {
        return Err(Diagnostic::new(
            format!("a boundary equation fixes one term of {sequence}; this one has several"),
            other.span.clone(),
        )
        .with_help(format!(
            "write one equation for the base term, such as {sequence}(1) = …"
        )));
    }
    let TermAt::Fixed(index) = &first.at else {
        unreachable!("a boundary equation has only fixed terms")
    };
    let coefficient = first.coefficient.expand();
    let free = form
        .free
        .as_ref()
        .map(|(f, _)| f.expand())
        .unwrap_or_else(RatFunc::zero);
    if free.is_zero() {
        return Err(Diagnostic::new(
            format!("this sets {sequence}({index}) = 0, and then every term of the rule is zero"),
            span,
        )
        .with_help(
            "a boundary equation needs a term without the sequence, e.g. n(1) = rho - (1-rho) n(1)",
        ));
    }
    let value = (-free)
        .checked_div(&coefficient)
        .expect("zero coefficients were dropped");
    let mut divisors = first.coefficient.divisors.clone();
    if let Some((f, _)) = &form.free {
        divisors.extend(f.divisors.iter().cloned());
    }
    if coefficient.numer().as_constant().is_none() {
        divisors.push((coefficient.numer().clone(), first.span.clone()));
    }
    Ok(Boundary {
        index: index.clone(),
        value,
        divisors,
        written,
        span,
    })
}

#[cfg(test)]
mod tests {
    use crate::algebra::RatFunc;
    use crate::model::build_model;

    #[test]
    fn the_boundary_fixes_the_base_term() {
        let m = build_model("(k+2) p(k) = (k-1) p(k-1) for k >= 4\n3 p(3) = 1/2").unwrap();
        let b = m.boundary.unwrap();
        assert_eq!(b.index, 3.into());
        assert_eq!(b.value, RatFunc::constant(crate::algebra::q(1, 6)));
    }

    #[test]
    fn boundary_errors() {
        let e = build_model("(k+2) p(k) = (k-1) p(k-1) for k >= 4\np(2) = 1").unwrap_err();
        assert!(e.message.contains("base term is p(3)"), "{e:?}");
        let e = build_model("(k+2) p(k) = (k-1) p(k-1) for k >= 4\np(3) = 2 p(3)").unwrap_err();
        assert!(
            e.message.contains("every term of the rule is zero"),
            "{e:?}"
        );
        let e = build_model("(k+2) p(k) = (k-1) p(k-1) for k >= 4\np(3) = p(2)").unwrap_err();
        assert!(e.message.contains("several"), "{e:?}");
        let e =
            build_model("(k+2) p(k) = (k-1) p(k-1) for k >= 4\np(3) = 1\np(3) = 2").unwrap_err();
        assert!(e.message.contains("second boundary"), "{e:?}");
    }
}
