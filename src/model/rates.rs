//! Birth and death rates (`birth(k) = …`, `death(k) = …`) turned into ratio pieces by
//! detailed balance: `π(k)/π(k−1) = birth(k−1)/death(k)` (stationary birth–death chains,
//! e.g. Karlin & Taylor, *A First Course in Stochastic Processes*, 2nd ed., §4.7).
//!
//! The state space starts at the lower bound of the first `birth` range (0 when none is
//! given). One of the two rates may be piecewise (`death(k) = k mu for 1 <= k <= c`,
//! `death(k) = c mu for k > c`); each of its pieces gives a piece of the rule.

use crate::algebra::RatFunc;
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{Expr, ExprKind, RangeClause};

use super::balance::shift_form;
use super::derivation::{Assumption, Derivation, RuleSource};
use super::expr::{to_product, Names, ProductForm};
use super::normal_form::normal_form;
use super::piecewise::index_range;
use super::problem::{Param, Piece};

/// Which rate a statement gives.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RateKind {
    Birth,
    Death,
}

/// `birth(k) = expr [for …]` as written.
pub struct RateStatement<'a> {
    pub kind: RateKind,
    pub var: String,
    pub expr: &'a Expr,
    pub range: Option<&'a RangeClause>,
    pub span: Span,
    pub text: String,
}

/// Recognises `birth(k)` / `death(k)` on the left of an equation.
pub fn rate_lhs(lhs: &Expr) -> Option<(RateKind, &Expr)> {
    let ExprKind::Call { name, args, .. } = &lhs.kind else {
        return None;
    };
    let kind = match name.as_str() {
        "birth" => RateKind::Birth,
        "death" => RateKind::Death,
        _ => return None,
    };
    (args.len() == 1).then(|| (kind, &args[0]))
}

struct RatePiece<'a> {
    statement: &'a RateStatement<'a>,
    form: ProductForm,
    first: Option<RatFunc>,
    last: Option<RatFunc>,
    range_span: Option<Span>,
}

/// The rule pieces that a set of rate statements defines.
pub fn rate_pieces(
    statements: &[RateStatement],
    sequence: &str,
    declared: &[Param],
    params: &mut Vec<String>,
) -> Result<Vec<Piece>, Diagnostic> {
    let index = statements[0].var.clone();
    let mut births = Vec::new();
    let mut deaths = Vec::new();
    for s in statements {
        if s.var != index {
            return Err(Diagnostic::new(
                format!(
                    "the rates use `{index}` as their index; this one uses `{}`",
                    s.var
                ),
                s.span.clone(),
            ));
        }
        let mut names = Names {
            index: &index,
            sequence,
            params: std::mem::take(params),
            work: 0,
        };
        let form = to_product(s.expr, &mut names);
        *params = names.params;
        let form = form?;
        if form.is_zero() {
            return Err(Diagnostic::new(
                "a rate that is identically zero leaves no chain to solve",
                s.expr.span.clone(),
            ));
        }
        let range = index_range(s.range, &index, 0, declared)?;
        let piece = RatePiece {
            statement: s,
            form,
            first: s.range.map(|_| range.first.clone()),
            last: range.last.map(|(l, _)| l),
            range_span: range.span,
        };
        match s.kind {
            RateKind::Birth => births.push(piece),
            RateKind::Death => deaths.push(piece),
        }
    }
    let missing = |kind: &str, other: &RateStatement| {
        Diagnostic::new(
            format!("the model gives {} rates but no {kind}({index}) = …", other_kind(kind)),
            other.span.clone(),
        )
        .with_help(format!(
            "a birth–death chain needs both, e.g. birth({index}) = lambda ; death({index}) = {index} mu"
        ))
    };
    if births.is_empty() {
        return Err(missing("birth", deaths[0].statement));
    }
    if deaths.is_empty() {
        return Err(missing("death", births[0].statement));
    }
    if births.len() > 1 && deaths.len() > 1 {
        return Err(Diagnostic::new(
            "both rates are piecewise; only one of them may change form",
            deaths[1].statement.span.clone(),
        )
        .with_help("write the rule's pieces as ratio rules instead, one per range"));
    }
    // A rate in several pieces needs a range on every piece after the first (a fuzz finding:
    // `death(k) = c mu` without `for k > c` after a ranged piece).
    for (kind, parts) in [("birth", &births), ("death", &deaths)] {
        if let Some(part) = parts.iter().skip(1).find(|p| p.first.is_none()) {
            return Err(Diagnostic::new(
                format!("this {kind}({index}) follows another piece of {kind}({index}) but has no range"),
                part.statement.span.clone(),
            )
            .with_help(format!(
                "say where it holds, e.g. `for {index} > c` after `for 0 <= {index} <= c`"
            )));
        }
    }
    let start = births[0].first.clone().unwrap_or_else(RatFunc::zero);
    let first_state = &start + &RatFunc::one();
    if let Some(first) = &deaths[0].first {
        // death(k) is needed from the first state above the start; `for 0 <= k …` is fine too.
        if *first != first_state && *first != start {
            return Err(Diagnostic::new(
                format!(
                    "death({index}) must be given from {index} = {first_state}, the first state above the start {start}"
                ),
                deaths[0].range_span.clone().unwrap_or(deaths[0].statement.span.clone()),
            )
            .with_help(format!(
                "the chain starts at the lower bound of the first birth range ({start} when none is given); give death({index}) for every state after it"
            )));
        }
    }
    let mut assumptions = vec![Assumption::DetailedBalance];
    // Where the state space ends: births given up to E reach E + 1, and no further (a
    // capacity) unless birth(E) = 0, when E itself is the last state; deaths given up to E
    // end it at E.
    let birth_end = births.last().and_then(|b| b.last.clone());
    let death_end = deaths.last().and_then(|d| d.last.clone());
    let mut capacity: Option<RatFunc> = None;
    if let Some(end) = &birth_end {
        let last_birth = births.last().expect("non-empty");
        let at_end = last_birth
            .form
            .expand()
            .substitute(&index, end)
            .unwrap_or_else(RatFunc::one);
        if at_end.is_zero() {
            assumptions.push(Assumption::StateSpaceEnds { at: end.clone() });
        } else {
            capacity = Some(end + &RatFunc::one());
        }
    }
    if let Some(end) = &death_end {
        match &capacity {
            Some(k) if k != end => {
                let last_death = deaths.last().expect("non-empty");
                // Deaths must reach every state the births reach.
                let shorter = (k - end)
                    .as_constant()
                    .map(|d| d > crate::algebra::Q::from_integer(0.into()));
                if shorter != Some(false) {
                    return Err(Diagnostic::new(
                        format!("death({index}) is given up to {end}, but the births reach {index} = {k}"),
                        last_death.range_span.clone().unwrap_or(last_death.statement.span.clone()),
                    )
                    .with_help(format!(
                        "give death({index}) for every state up to {k}, or end the births at {end} - 1"
                    )));
                }
                capacity = Some(end.clone());
            }
            Some(_) => {}
            None if birth_end.is_none() => capacity = Some(end.clone()),
            None => {}
        }
    }
    if let Some(k) = &capacity {
        assumptions.push(Assumption::Capacity { at: k.clone() });
    }
    let mut pieces = Vec::new();
    let piecewise_births = births.len() > 1;
    let varying = if piecewise_births { &births } else { &deaths };
    for (i, part) in varying.iter().enumerate() {
        let (birth, death) = if piecewise_births {
            (part, &deaths[0])
        } else {
            (&births[0], part)
        };
        // birth pieces hold for the state k−1, so they move one step up in the rule's index.
        let lift = |r: &RatFunc| {
            if piecewise_births {
                r + &RatFunc::one()
            } else {
                r.clone()
            }
        };
        let first = if i == 0 {
            first_state.clone()
        } else {
            lift(part.first.as_ref().expect("later pieces have ranges"))
        };
        let is_last = i + 1 == varying.len();
        let last = if is_last {
            capacity.clone()
        } else {
            part.last.as_ref().map(lift)
        };
        if !is_last && last.is_none() {
            return Err(Diagnostic::new(
                "every piece but the last needs an upper bound",
                part.range_span
                    .clone()
                    .unwrap_or(part.statement.span.clone()),
            )
            .with_help(format!(
                "e.g. `for 1 <= {index} <= c` then `for {index} > c`"
            )));
        }
        if i > 0 && part.first.is_none() {
            return Err(Diagnostic::new(
                "a later piece of a rate needs its range",
                part.statement.span.clone(),
            ));
        }
        let form = shift_form(&birth.form, &index, -1)
            .divided_by(death.form.clone(), death.statement.expr.span.clone())
            .expect("zero rates were refused");
        let ratio = normal_form(&form, &index).map_err(|e| {
            Diagnostic::new(
                format!(
                    "the rates do not give a product of linear factors: {}",
                    e.message
                ),
                e.span,
            )
        })?;
        let mut written = vec![
            (birth.statement.text.clone(), birth.statement.span.clone()),
            (death.statement.text.clone(), death.statement.span.clone()),
        ];
        written.sort_by_key(|(_, span)| span.start);
        let span = written[0].1.start..written[1].1.end;
        pieces.push(Piece {
            ratio,
            first,
            last,
            divisors: form.divisors.clone(),
            span,
            range_span: part.range_span.clone(),
            derivation: Derivation {
                source: RuleSource::Rates {
                    birth: birth.form.clone(),
                    death: death.form.clone(),
                },
                written,
                assumptions: assumptions.clone(),
            },
        });
    }
    Ok(pieces)
}

fn other_kind(kind: &str) -> &'static str {
    if kind == "birth" {
        "death"
    } else {
        "birth"
    }
}

#[cfg(test)]
mod tests {
    use crate::algebra::RatFunc;
    use crate::model::build_model;

    #[test]
    fn a_piecewise_birth_rate_moves_up_one_index() {
        // birth(k) for 0 <= k <= 2 feeds the ratio at k = 1..3 (π(k)/π(k−1) = birth(k−1)/death(k))
        let m = build_model("birth(k) = 2 for 0 <= k <= 2\nbirth(k) = 1 for k > 2\ndeath(k) = k")
            .unwrap();
        assert_eq!(m.pieces.len(), 2);
        assert_eq!(m.pieces[0].first, RatFunc::from_integer(1));
        assert_eq!(m.pieces[0].last, Some(RatFunc::from_integer(3)));
        assert_eq!(m.pieces[1].first, RatFunc::from_integer(4));
        assert_eq!(m.pieces[0].ratio.constant, RatFunc::from_integer(2));
        assert_eq!(m.pieces[1].ratio.constant, RatFunc::from_integer(1));
    }

    #[test]
    fn rate_errors() {
        let e = build_model("birth(k) = lambda").unwrap_err();
        assert!(e.message.contains("no death(k)"), "{e:?}");
        let e =
            build_model("birth(k) = 1 for 0 <= k <= 5\ndeath(k) = k for 1 <= k <= 4").unwrap_err();
        assert!(e.message.contains("the births reach k = 6"), "{e:?}");
        let e = build_model("birth(k) = 0\ndeath(k) = k").unwrap_err();
        assert!(e.message.contains("identically zero"), "{e:?}");
        let e = build_model("birth(k) = 1\ndeath(k) = k\na(k)/a(k-1) = 1/k").unwrap_err();
        assert!(e.message.contains("not both"), "{e:?}");
    }
}
