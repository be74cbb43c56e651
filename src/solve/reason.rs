//! Why a condition holds or fails, as data: words, parameter values, expressions and numbers.
//! The renderers lay it out (`render::reason`): Greek names and typeset fractions in text,
//! LaTeX and MathML, never the algebra's ASCII (`(-2*rho + 1)/(rho - 1)`).

use std::collections::BTreeMap;

use crate::algebra::{RatFunc, Q};

/// One piece of a reason; the pieces are read in order, separated by spaces.
#[derive(Clone, Debug, PartialEq)]
pub enum Part {
    /// Plain words.
    Words(String),
    /// Parameter values: `ρ = 1/2, β = 2`.
    Values(Vec<(String, Q)>),
    /// A number.
    Number(Q),
    /// An expression equal to a number, as one formula: `(1 − 2ρ)/(ρ − 1) = 0`.
    Equation(RatFunc, Q),
}

/// Why a condition holds or fails (`ρ = 1/2`; `(1 − 2ρ)/(ρ − 1) = 0 with ρ = 1/2`).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Reason(pub Vec<Part>);

impl Reason {
    /// Words alone.
    pub fn words(words: impl Into<String>) -> Reason {
        Reason(Vec::new()).then_words(words)
    }

    /// The values of the parameters `expr` depends on: what settles a condition on it.
    pub fn values_of(expr: &RatFunc, values: &BTreeMap<String, Q>) -> Reason {
        Reason(Vec::new()).then_values_of(expr, values)
    }

    pub fn then_words(mut self, words: impl Into<String>) -> Reason {
        self.0.push(Part::Words(words.into()));
        self
    }

    /// The values of the parameters `expr` depends on, in name order; "a number" when it
    /// depends on none.
    pub fn then_values_of(mut self, expr: &RatFunc, values: &BTreeMap<String, Q>) -> Reason {
        let shown: Vec<(String, Q)> = expr
            .variables()
            .into_iter()
            .filter_map(|v| values.get(&v).map(|q| (v, q.clone())))
            .collect();
        if shown.is_empty() && expr.variables().is_empty() {
            return self.then_words("a number");
        }
        self.0.push(Part::Values(shown));
        self
    }

    pub fn then_value(mut self, name: &str, value: &Q) -> Reason {
        self.0
            .push(Part::Values(vec![(name.to_string(), value.clone())]));
        self
    }

    pub fn then_equation(mut self, expr: &RatFunc, value: &Q) -> Reason {
        self.0.push(Part::Equation(expr.clone(), value.clone()));
        self
    }

    pub fn then_number(mut self, q: &Q) -> Reason {
        self.0.push(Part::Number(q.clone()));
        self
    }

    /// True when nothing is said.
    pub fn is_empty(&self) -> bool {
        self.0.iter().all(|p| match p {
            Part::Words(w) => w.is_empty(),
            Part::Values(v) => v.is_empty(),
            _ => false,
        })
    }

    /// True when one of the word pieces contains `needle`.
    pub fn says(&self, needle: &str) -> bool {
        self.0
            .iter()
            .any(|p| matches!(p, Part::Words(w) if w.contains(needle)))
    }
}

impl From<&str> for Reason {
    fn from(words: &str) -> Reason {
        Reason::words(words)
    }
}

impl From<String> for Reason {
    fn from(words: String) -> Reason {
        Reason::words(words)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::Poly;

    #[test]
    fn values_of_names_only_the_parameters_of_the_expression() {
        let expr = RatFunc::from_poly(Poly::var("rho"));
        let values = BTreeMap::from([
            ("rho".to_string(), Q::new(1.into(), 2.into())),
            ("beta".to_string(), Q::from_integer(3.into())),
        ]);
        let r = Reason::values_of(&expr, &values);
        assert_eq!(
            r.0,
            vec![Part::Values(vec![(
                "rho".into(),
                Q::new(1.into(), 2.into())
            )])]
        );
        let constant = RatFunc::from_poly(Poly::constant(Q::from_integer(2.into())));
        assert!(Reason::values_of(&constant, &values).says("a number"));
    }
}
