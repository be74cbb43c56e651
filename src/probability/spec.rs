//! `--prob` events: `k >= K`, `k > K`, `k <= K`, `k < K`, `k = K` and `K1 <= k <= K2`
//! (`<` as well), with every bound an expression in the model's parameters (`c`, `c + 1`,
//! `N/2`). Read with the rule language's expression parser; spans point into the event text.

use std::collections::BTreeMap;

use num_bigint::BigInt;

use crate::algebra::{RatFunc, Q};
use crate::diagnostic::{Diagnostic, Span};
use crate::model::Param;
use crate::model::{to_product, Names};
use crate::syntax::parse_expr;

/// One side of an event: `k >= bound` (lower) or `k <= bound` (upper); `strict` for `>`/`<`.
#[derive(Clone, Debug, PartialEq)]
pub struct EventBound {
    pub value: RatFunc,
    pub strict: bool,
}

/// An event `lower ≤ k ≤ upper` as the user wrote it (`text`), with symbolic bounds.
#[derive(Clone, Debug, PartialEq)]
pub struct Event {
    pub text: String,
    pub index: String,
    pub lower: Option<EventBound>,
    pub upper: Option<EventBound>,
}

/// The event's integer range `first ≤ k ≤ last` once the parameters have values
/// (`None`: no bound on that side).
#[derive(Clone, Debug, PartialEq)]
pub struct IndexRange {
    pub first: Option<BigInt>,
    pub last: Option<BigInt>,
}

#[derive(Clone, Copy, Debug, PartialEq)]
enum Cmp {
    Less { strict: bool },
    Greater { strict: bool },
    Equal,
}

/// Comparison operators at bracket depth 0, with their byte spans.
fn comparisons(text: &str) -> Vec<(Cmp, Span)> {
    let mut out = Vec::new();
    let mut depth = 0i32;
    let mut chars = text.char_indices().peekable();
    while let Some((i, c)) = chars.next() {
        let next_is_eq = matches!(chars.peek(), Some((_, '=')));
        let (cmp, width) = match c {
            '(' | '[' | '{' => {
                depth += 1;
                continue;
            }
            ')' | ']' | '}' => {
                depth -= 1;
                continue;
            }
            _ if depth != 0 => continue,
            '<' if next_is_eq => (Cmp::Less { strict: false }, 2),
            '>' if next_is_eq => (Cmp::Greater { strict: false }, 2),
            '<' => (Cmp::Less { strict: true }, 1),
            '>' => (Cmp::Greater { strict: true }, 1),
            '≤' => (Cmp::Less { strict: false }, c.len_utf8()),
            '≥' => (Cmp::Greater { strict: false }, c.len_utf8()),
            '=' if next_is_eq => (Cmp::Equal, 2),
            '=' => (Cmp::Equal, 1),
            _ => continue,
        };
        if width == 2 {
            chars.next();
        }
        out.push((cmp, i..i + width));
    }
    out
}

fn help() -> String {
    "write an event such as \"k >= 5\", \"k <= c\", \"k = c\" or \"2 <= k <= N/2\"".into()
}

/// Reads an event over `index` whose bounds may use the given parameters.
pub fn parse_event(text: &str, index: &str, params: &[Param]) -> Result<Event, Diagnostic> {
    let whole = 0..text.len().max(1);
    let ops = comparisons(text);
    if ops.is_empty() || ops.len() > 2 {
        let message = if ops.is_empty() {
            "an event needs a comparison with the index".to_string()
        } else {
            "at most two comparisons: K1 <= k <= K2".to_string()
        };
        let span = ops.get(2).map(|o| o.1.clone()).unwrap_or(whole);
        return Err(Diagnostic::new(message, span).with_help(help()));
    }
    // The parts between the operators, with their offsets.
    let mut parts: Vec<(&str, usize)> = Vec::new();
    let mut start = 0;
    for (_, span) in &ops {
        parts.push((&text[start..span.start], start));
        start = span.end;
    }
    parts.push((&text[start..], start));
    let is_index = |part: &str| part.trim() == index;
    let mut event = Event {
        text: text.trim().to_string(),
        index: index.to_string(),
        lower: None,
        upper: None,
    };
    if ops.len() == 1 {
        let cmp = ops[0].0;
        let (bound_part, cmp) = if is_index(parts[0].0) {
            (parts[1], cmp)
        } else if is_index(parts[1].0) {
            // `K <= k` is `k >= K`.
            let flipped = match cmp {
                Cmp::Less { strict } => Cmp::Greater { strict },
                Cmp::Greater { strict } => Cmp::Less { strict },
                Cmp::Equal => Cmp::Equal,
            };
            (parts[0], flipped)
        } else {
            return Err(Diagnostic::new(
                format!("one side of the comparison must be the index `{index}`"),
                whole,
            )
            .with_help(help()));
        };
        let value = bound(bound_part, index, params)?;
        match cmp {
            Cmp::Greater { strict } => event.lower = Some(EventBound { value, strict }),
            Cmp::Less { strict } => event.upper = Some(EventBound { value, strict }),
            Cmp::Equal => {
                event.lower = Some(EventBound {
                    value: value.clone(),
                    strict: false,
                });
                event.upper = Some(EventBound {
                    value,
                    strict: false,
                });
            }
        }
        return Ok(event);
    }
    if !is_index(parts[1].0) {
        let (part, offset) = parts[1];
        return Err(Diagnostic::new(
            format!("the index `{index}` belongs between the two comparisons"),
            offset..offset + part.len().max(1),
        )
        .with_help(help()));
    }
    let (low, high) = match (ops[0].0, ops[1].0) {
        (Cmp::Less { strict: s1 }, Cmp::Less { strict: s2 }) => ((parts[0], s1), (parts[2], s2)),
        (Cmp::Greater { strict: s1 }, Cmp::Greater { strict: s2 }) => {
            ((parts[2], s2), (parts[0], s1))
        }
        _ => {
            return Err(Diagnostic::new(
                "both comparisons must point the same way, as in K1 <= k <= K2",
                ops[1].1.clone(),
            )
            .with_help(help()))
        }
    };
    event.lower = Some(EventBound {
        value: bound(low.0, index, params)?,
        strict: low.1,
    });
    event.upper = Some(EventBound {
        value: bound(high.0, index, params)?,
        strict: high.1,
    });
    Ok(event)
}

/// A bound: an expression in the parameters, without the index.
fn bound(
    (part, offset): (&str, usize),
    index: &str,
    params: &[Param],
) -> Result<RatFunc, Diagnostic> {
    let shift = |span: Span| span.start + offset..span.end + offset;
    if part.trim().is_empty() {
        return Err(Diagnostic::new(
            "a bound is missing here",
            offset..offset + part.len().max(1),
        )
        .with_help(help()));
    }
    let expr = parse_expr(part).map_err(|d| Diagnostic {
        span: shift(d.span.clone()),
        ..d
    })?;
    let mut names = Names {
        index: "",
        sequence: "",
        params: Vec::new(),
        work: 0,
    };
    let form = to_product(&expr, &mut names).map_err(|d| Diagnostic {
        span: shift(d.span.clone()),
        ..d
    })?;
    for name in &names.params {
        if name == index {
            return Err(Diagnostic::new(
                format!("the index `{index}` may appear only once, alone between the comparisons"),
                shift(expr.span.clone()),
            )
            .with_help(help()));
        }
        if !params.iter().any(|p| &p.name == name) {
            let known: Vec<&str> = params.iter().map(|p| p.name.as_str()).collect();
            return Err(Diagnostic::new(
                format!("`{name}` is not a parameter of the model"),
                shift(expr.span.clone()),
            )
            .with_help(if known.is_empty() {
                "the model has no parameters: use numbers".to_string()
            } else {
                format!("its parameters: {}", known.join(", "))
            }));
        }
    }
    Ok(form.expand())
}

impl Event {
    /// The inclusive integer bounds as rational functions: a strict bound moves by one.
    pub fn inclusive_bounds(&self) -> (Option<RatFunc>, Option<RatFunc>) {
        let one = RatFunc::one();
        let lower = self.lower.as_ref().map(|l| {
            if l.strict {
                &l.value + &one
            } else {
                l.value.clone()
            }
        });
        let upper = self.upper.as_ref().map(|u| {
            if u.strict {
                &u.value - &one
            } else {
                u.value.clone()
            }
        });
        (lower, upper)
    }

    /// The integer range with the parameters' values; an error names a missing value.
    pub fn resolve(&self, values: &BTreeMap<String, Q>) -> Result<IndexRange, String> {
        let eval = |b: &EventBound| -> Result<Q, String> {
            b.value.eval(values).map_err(|e| match e {
                crate::algebra::EvalError::Unbound(name) => {
                    format!("the bound needs a value of `{name}` (--param {name}=…)")
                }
                crate::algebra::EvalError::DivisionByZero => "the bound divides by zero".into(),
            })
        };
        let first = match &self.lower {
            // k ≥ x means k ≥ ⌈x⌉; k > x means k ≥ ⌊x⌋ + 1.
            Some(b) => Some({
                let x = eval(b)?;
                if b.strict {
                    x.floor().to_integer() + 1
                } else {
                    x.ceil().to_integer()
                }
            }),
            None => None,
        };
        let last = match &self.upper {
            Some(b) => Some({
                let x = eval(b)?;
                if b.strict {
                    x.ceil().to_integer() - 1
                } else {
                    x.floor().to_integer()
                }
            }),
            None => None,
        };
        Ok(IndexRange { first, last })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    fn params() -> Vec<Param> {
        let mut c = Param::undeclared("c");
        c.integer = true;
        vec![c, Param::undeclared("rho")]
    }

    fn range(text: &str, values: &[(&str, Q)]) -> IndexRange {
        let values: BTreeMap<String, Q> = values
            .iter()
            .map(|(n, v)| (n.to_string(), v.clone()))
            .collect();
        parse_event(text, "k", &params())
            .unwrap()
            .resolve(&values)
            .unwrap()
    }

    #[test]
    fn every_form_of_event_gives_its_integer_range() {
        let c = [("c", q(4, 1))];
        let r = |first: Option<i64>, last: Option<i64>| IndexRange {
            first: first.map(BigInt::from),
            last: last.map(BigInt::from),
        };
        assert_eq!(range("k >= c", &c), r(Some(4), None));
        assert_eq!(range("k > c", &c), r(Some(5), None));
        assert_eq!(range("k <= c - 1", &c), r(None, Some(3)));
        assert_eq!(range("k < 5/2", &c), r(None, Some(2)));
        assert_eq!(range("k >= 5/2", &c), r(Some(3), None));
        assert_eq!(range("k = c", &c), r(Some(4), Some(4)));
        assert_eq!(range("c <= k", &c), r(Some(4), None));
        assert_eq!(range("2 <= k <= 2c", &c), r(Some(2), Some(8)));
        assert_eq!(range("2 < k < (c+1)", &c), r(Some(3), Some(4)));
        assert_eq!(range("10 >= k >= c", &c), r(Some(4), Some(10)));
        assert_eq!(range("k ≥ c", &c), r(Some(4), None));
    }

    #[test]
    fn bad_events_point_at_the_problem() {
        let err = |text: &str| parse_event(text, "k", &params()).unwrap_err();
        assert!(err("k").message.contains("comparison"));
        assert!(err("k >= N").message.contains("`N` is not a parameter"));
        assert_eq!(err("k >= N").span, 5..6);
        assert!(err("c >= 2").message.contains("must be the index"));
        assert!(err("1 <= k >= 2").message.contains("same way"));
        assert!(err("1 <= k+1 <= 2").message.contains("between"));
        assert!(err("k >= ").message.contains("missing"));
        assert!(err("k >= (1").span.start >= 5);
        let missing = parse_event("k >= c", "k", &params())
            .unwrap()
            .resolve(&BTreeMap::new())
            .unwrap_err();
        assert!(missing.contains("--param c"), "{missing}");
    }
}
