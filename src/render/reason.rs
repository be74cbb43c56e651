//! A condition's reason (`solve::reason::Reason`) laid out: as text with Greek names, as LaTeX
//! text with inline math, and as HTML text with inline MathML. Words pass through; values,
//! expressions and numbers go through the same layout nodes as every other formula.

use crate::solve::reason::{Part, Reason};

use super::analysis_output::ratfunc_node;
use super::escape::escape_text;
use super::mathml::Math;
use super::node::Node;
use super::{text, to_node};

/// The formula of one non-word part; `None` for words.
fn math(part: &Part) -> Option<Math> {
    let value = |name: &str, q| {
        Math::node(&Node::sym(name)).op("=", "=", Math::node(&to_node::rational(q)))
    };
    match part {
        Part::Words(_) => None,
        Part::Values(values) => {
            let mut items = values.iter().map(|(n, q)| value(n, q));
            let first = items.next()?;
            Some(items.fold(first, |all, next| all.op(",", ",", next)))
        }
        Part::Number(q) => Some(Math::node(&to_node::rational(q))),
        Part::Equation(e, q) => {
            Some(Math::node(&ratfunc_node(e)).op("=", "=", Math::node(&to_node::rational(q))))
        }
    }
}

fn joined(r: &Reason, piece: impl Fn(&Part) -> Option<String>) -> String {
    r.0.iter()
        .filter_map(piece)
        .filter(|s| !s.is_empty())
        .collect::<Vec<_>>()
        .join(" ")
}

/// Plain text: `(1 − 2ρ)/(ρ − 1) = 0 with ρ = 1/2`.
pub fn text(r: &Reason) -> String {
    joined(r, |part| match part {
        Part::Words(w) => Some(w.clone()),
        Part::Values(values) => Some(
            values
                .iter()
                .map(|(n, q)| {
                    format!(
                        "{} = {}",
                        text::write(&Node::sym(n)),
                        text::write(&to_node::rational(q))
                    )
                })
                .collect::<Vec<_>>()
                .join(", "),
        ),
        Part::Number(q) => Some(text::write(&to_node::rational(q))),
        Part::Equation(e, q) => Some(format!(
            "{} = {}",
            text::write(&ratfunc_node(e)),
            text::write(&to_node::rational(q))
        )),
    })
}

/// LaTeX running text with the formulas in `$…$`.
pub fn latex(r: &Reason) -> String {
    joined(r, |part| match part {
        Part::Words(w) => Some(w.clone()),
        other => math(other).map(|m| format!("${}$", m.latex())),
    })
}

/// HTML running text with the formulas as inline MathML.
pub fn html(r: &Reason) -> String {
    joined(r, |part| match part {
        Part::Words(w) => Some(escape_text(w)),
        other => math(other).map(|m| m.element(false)),
    })
}

/// The LaTeX source of a whole reason as one formula (`\text{…}` around the words), for the
/// places that typeset it in math mode.
pub fn latex_math(r: &Reason) -> String {
    joined(r, |part| match part {
        Part::Words(w) => Some(format!("\\text{{{w}}}")),
        other => math(other).map(|m| m.latex().to_string()),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::{Poly, RatFunc, Q};
    use std::collections::BTreeMap;

    fn citation_variance_failure() -> Reason {
        // (1 − 2ρ)/(ρ − 1) at ρ = 1/2: the citation example's variance condition at its edge.
        let rho = Poly::var("rho");
        let one = Poly::constant(Q::from_integer(1.into()));
        let two = Poly::constant(Q::from_integer(2.into()));
        let expr = RatFunc::new(&one - &(&two * &rho), &rho - &one).unwrap();
        let values = BTreeMap::from([("rho".to_string(), Q::new(1.into(), 2.into()))]);
        Reason::default()
            .then_equation(&expr, &Q::from_integer(0.into()))
            .then_words("with")
            .then_values_of(&expr, &values)
    }

    #[test]
    fn text_uses_greek_names_and_no_ascii_algebra() {
        let t = text(&citation_variance_failure());
        assert_eq!(t, "(1 − 2ρ)/(ρ − 1) = 0 with ρ = 1/2");
    }

    #[test]
    fn latex_and_html_typeset_the_formulas() {
        let r = citation_variance_failure();
        let l = latex(&r);
        assert!(l.starts_with("$\\frac{") && l.contains("\\rho"), "{l}");
        assert!(l.contains(" with $\\rho = \\frac{1}{2}$"), "{l}");
        let h = html(&r);
        assert!(
            h.contains("<math") && h.contains("<mi>ρ</mi>") && h.contains(" with "),
            "{h}"
        );
        assert_eq!(h.matches("<math").count(), 2, "{h}");
        assert!(!h.contains("<mi>rho</mi>") && !h.contains("*"), "{h}");
    }
}
