//! Range clauses, saying for which indices a rule holds:
//!
//! ```text
//! range    = "for" relation
//! relation = expression comparison expression [ comparison expression ]
//! ```

use super::ast::{Bound, CmpOp, Expr, ExprKind, RangeClause};
use super::error::{fail, PResult, SyntaxError};
use super::expr::{comparison, last_end, peek, punct, required_expression};
use super::token::{Keyword, Token, TokenKind, Tokens};
use crate::diagnostic::Diagnostic;

pub(crate) fn optional_range(input: Tokens<'_>) -> PResult<'_, Option<RangeClause>> {
    match punct(TokenKind::Keyword(Keyword::For))(input) {
        Ok((rest, keyword)) => {
            let (rest, range) = range_clause(keyword)(rest)?;
            Ok((rest, Some(range)))
        }
        Err(_) => Ok((input, None)),
    }
}

/// After `for`: `k >= M`, `k < N`, `M <= k`, `M <= k < N`, `N >= k >= M`.
fn range_clause<'t>(keyword: &'t Token) -> impl Fn(Tokens<'t>) -> PResult<'t, RangeClause> {
    move |input: Tokens<'t>| {
        if peek(input).kind.ends_statement() {
            return fail(no_relation(keyword));
        }
        let (rest, first) = required_expression(keyword, "a relation")(input)?;
        let Some(first_op) = comparison(&peek(rest).kind) else {
            let found = peek(rest);
            if found.kind.ends_statement() {
                return fail(no_relation(keyword));
            }
            return fail(
                Diagnostic::new(
                    format!(
                        "expected a comparison (`>=`, `>`, `<=`, `<`), found {}",
                        found.kind.describe()
                    ),
                    found.span.clone(),
                )
                .with_help("a range reads like `for k >= 2` or `for 1 <= k <= c`"),
            );
        };
        let first_op_token = peek(rest);
        let (rest, second) = required_expression(first_op_token, "a bound")(&rest[1..])?;
        let chained = comparison(&peek(rest).kind).map(|op| (op, peek(rest)));
        let (rest, clause) = match chained {
            None => (rest, one_sided(first, first_op, second)?),
            Some((second_op, second_op_token)) => {
                let (rest, third) = required_expression(second_op_token, "a bound")(&rest[1..])?;
                let clause = two_sided(first, first_op, second, second_op, second_op_token, third)?;
                (rest, clause)
            }
        };
        let span = keyword.span.start..last_end(input, rest);
        Ok((rest, RangeClause { span, ..clause }))
    }
}

fn no_relation(keyword: &Token) -> Diagnostic {
    Diagnostic::new("the `for` clause has no relation", keyword.span.clone())
        .with_help("say where the rule holds, as in `for k >= 2` or `for 1 <= k <= c`")
}

fn plain_name(e: &Expr) -> Option<&str> {
    match &e.kind {
        ExprKind::Ident(n) => Some(n),
        _ => None,
    }
}

fn is_lower(op: CmpOp) -> bool {
    matches!(op, CmpOp::Gt | CmpOp::Ge)
}

fn bound(value: Expr, op: CmpOp) -> Bound {
    Bound {
        value,
        strict: matches!(op, CmpOp::Lt | CmpOp::Gt),
    }
}

/// `k op M` (the variable on the left, if the left side is a bare name) or `M op k`.
fn one_sided(left: Expr, op: CmpOp, right: Expr) -> Result<RangeClause, nom::Err<SyntaxError>> {
    let clause = |var: &Expr, other: Expr, var_is_lower_side: bool| {
        let b = bound(other, op);
        let (lower, upper) = if var_is_lower_side {
            (Some(b), None)
        } else {
            (None, Some(b))
        };
        RangeClause {
            var: plain_name(var).unwrap_or_default().to_string(),
            var_span: var.span.clone(),
            lower,
            upper,
            span: 0..0,
        }
    };
    if plain_name(&left).is_some() {
        // `k >= M` bounds k from below.
        Ok(clause(&left, right, is_lower(op)))
    } else if plain_name(&right).is_some() {
        // `M <= k` bounds k from below too.
        Ok(clause(&right, left, !is_lower(op)))
    } else {
        fail(
            Diagnostic::new(
                "one side of the comparison must be the index variable",
                left.span.start..right.span.end,
            )
            .with_help(format!("write it as `for k {} ...`", op.symbol())),
        )
    }
}

/// `M <= k <= N` or `N >= k >= M`, with any mix of strict and non-strict.
fn two_sided(
    left: Expr,
    first: CmpOp,
    middle: Expr,
    second: CmpOp,
    second_token: &Token,
    right: Expr,
) -> Result<RangeClause, nom::Err<SyntaxError>> {
    if is_lower(first) != is_lower(second) {
        return fail(
            Diagnostic::new(
                "a double comparison must point one way",
                second_token.span.clone(),
            )
            .with_help("write `1 <= k <= c` (or `c >= k >= 1`)"),
        );
    }
    let Some(var) = plain_name(&middle) else {
        return fail(
            Diagnostic::new(
                "the index variable must stand between the two comparisons",
                middle.span.clone(),
            )
            .with_help("write `1 <= k <= c`"),
        );
    };
    let (lower, upper) = if is_lower(first) {
        (bound(right, second), bound(left, first))
    } else {
        (bound(left, first), bound(right, second))
    };
    Ok(RangeClause {
        var: var.to_string(),
        var_span: middle.span.clone(),
        lower: Some(lower),
        upper: Some(upper),
        span: 0..0,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::display_expr;
    use crate::syntax::lexer::tokenize;

    fn range(text: &str) -> RangeClause {
        let tokens = tokenize(text).unwrap();
        let (rest, r) = optional_range(&tokens).unwrap();
        assert_eq!(rest.len(), 1, "{text}: left {rest:?}");
        r.expect("a range clause")
    }

    /// A range as `var [lower] [upper]` in one line.
    fn range_shape(text: &str) -> String {
        let r = range(text);
        let show = |b: &Option<Bound>| match b {
            None => "-".to_string(),
            Some(b) => format!(
                "{}{}",
                display_expr(&b.value),
                if b.strict { " strict" } else { "" }
            ),
        };
        format!("{} [{}] [{}]", r.var, show(&r.lower), show(&r.upper))
    }

    #[test]
    fn one_sided_ranges() {
        assert_eq!(range_shape("for k >= 2"), "k [2] [-]");
        assert_eq!(range_shape("for k > c"), "k [c strict] [-]");
        assert_eq!(range_shape("for k <= N"), "k [-] [N]");
        assert_eq!(range_shape("for k < c+1"), "k [-] [(c + 1) strict]");
        assert_eq!(range_shape("for 2 <= k"), "k [2] [-]");
        assert_eq!(range_shape("for 2 > k"), "k [-] [2 strict]");
        assert_eq!(range_shape("for k ≥ 4"), "k [4] [-]");
    }

    #[test]
    fn two_sided_ranges() {
        assert_eq!(range_shape("for 1 <= k <= c"), "k [1] [c]");
        assert_eq!(range_shape("for 1 < k <= c"), "k [1 strict] [c]");
        assert_eq!(range_shape("for 0 ≤ j < N"), "j [0] [N strict]");
        assert_eq!(range_shape("for c >= k > 1"), "k [1 strict] [c]");
    }

    #[test]
    fn range_spans() {
        let r = range("for 1 <= k <= c ");
        assert_eq!((r.span, r.var_span), (0..15, 9..10));
    }
}
