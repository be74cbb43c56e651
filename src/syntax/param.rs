//! Parameter declarations:
//!
//! ```text
//! param_decl = "param" name { "," name } [ "integer" ] [ constraint ]
//! constraint = "in" interval | comparison expression
//! interval   = ( "(" | "[" ) expression "," expression ( ")" | "]" )
//! ```

use super::ast::{ParamConstraint, ParamDecl};
use super::error::{fail, reserved_word, PResult};
use super::expr::{comparison, name, peek, punct, required_expression};
use super::token::{Keyword, Token, TokenKind, Tokens};
use crate::diagnostic::{Diagnostic, Span};

/// After `param`: names, the `integer` flag, the constraint.
pub(crate) fn param_declaration<'t>(
    keyword: &'t Token,
) -> impl Fn(Tokens<'t>) -> PResult<'t, ParamDecl> {
    move |input: Tokens<'t>| {
        let (mut rest, first) = param_name(keyword)(input)?;
        let mut names = vec![first];
        while let Ok((after, comma)) = punct(TokenKind::Comma)(rest) {
            let (after, next) = param_name(comma)(after)?;
            names.push(next);
            rest = after;
        }
        let (rest, integer) = match punct(TokenKind::Keyword(Keyword::Integer))(rest) {
            Ok((after, _)) => (after, true),
            Err(_) => (rest, false),
        };
        let (rest, constraint) = param_constraint(rest)?;
        Ok((
            rest,
            ParamDecl {
                names,
                integer,
                constraint,
            },
        ))
    }
}

/// A declared name: plain (`rho`) or with a simple subscript (`lambda_0`), which is
/// stored as written so it matches the same subscripted name in a rule.
fn param_name<'t>(after: &'t Token) -> impl Fn(Tokens<'t>) -> PResult<'t, (String, Span)> {
    move |input: Tokens<'t>| {
        let token = peek(input);
        let (rest, (base, span)) = match &token.kind {
            TokenKind::Name(_) => name(input)?,
            TokenKind::Keyword(k) => return fail(reserved_word(*k, token.span.clone())),
            _ => {
                let message = if after.kind == TokenKind::Comma {
                    format!(
                        "expected a parameter name after `,`, found {}",
                        token.kind.describe()
                    )
                } else {
                    "`param` needs a name".to_string()
                };
                let span = if token.kind.ends_statement() {
                    after.span.clone()
                } else {
                    token.span.clone()
                };
                return fail(Diagnostic::new(message, span).with_help(
                    "declare parameters as `param rho in (0, 1)` or `param N integer >= 1`",
                ));
            }
        };
        let Ok((rest, _)) = punct(TokenKind::Underscore)(rest) else {
            return Ok((rest, (base, span)));
        };
        let index = peek(rest);
        let written = match &index.kind {
            TokenKind::Name(n) => n.clone(),
            TokenKind::Number(v) => v.to_string(),
            TokenKind::Keyword(k) => return fail(reserved_word(*k, index.span.clone())),
            _ => {
                return fail(
                    Diagnostic::new(
                        "a parameter name takes only a simple subscript",
                        index.span.clone(),
                    )
                    .with_help("write `lambda_0` or `lambda_k`, without braces"),
                )
            }
        };
        Ok((
            &rest[1..],
            (format!("{base}_{written}"), span.start..index.span.end),
        ))
    }
}

fn param_constraint(input: Tokens<'_>) -> PResult<'_, ParamConstraint> {
    if let Ok((rest, keyword)) = punct(TokenKind::Keyword(Keyword::In))(input) {
        return interval(keyword)(rest);
    }
    let Some(op) = comparison(&peek(input).kind) else {
        return Ok((input, ParamConstraint::None));
    };
    let op_token = peek(input);
    let (rest, value) = required_expression(op_token, "a bound")(&input[1..])?;
    Ok((rest, ParamConstraint::Compare { op, value }))
}

/// `(lo, hi)`, `[lo, hi]` and the mixed forms, after `in`.
fn interval<'t>(keyword: &'t Token) -> impl Fn(Tokens<'t>) -> PResult<'t, ParamConstraint> {
    move |input: Tokens<'t>| {
        let open = peek(input);
        let lo_closed = match open.kind {
            TokenKind::LParen => false,
            TokenKind::LBracket => true,
            _ => {
                let span = if open.kind.ends_statement() {
                    keyword.span.clone()
                } else {
                    open.span.clone()
                };
                return fail(
                    Diagnostic::new("expected an interval after `in`", span).with_help(
                        "write `(0, 1)` for an open interval, `[1, 10]` for a closed one",
                    ),
                );
            }
        };
        let (rest, lo) = required_expression(open, "the lower end of the interval")(&input[1..])?;
        let Ok((rest, comma)) = punct(TokenKind::Comma)(rest) else {
            let found = peek(rest);
            let span = if found.kind.ends_statement() {
                open.span.clone()
            } else {
                found.span.clone()
            };
            return fail(
                Diagnostic::new(
                    format!(
                        "expected `,` between the ends of the interval, found {}",
                        found.kind.describe()
                    ),
                    span,
                )
                .with_help("write the interval as `(lo, hi)`"),
            );
        };
        let (rest, hi) = required_expression(comma, "the upper end of the interval")(rest)?;
        let close = peek(rest);
        let hi_closed = match close.kind {
            TokenKind::RParen => false,
            TokenKind::RBracket => true,
            _ => {
                let diagnostic = if close.kind.ends_statement() {
                    Diagnostic::new("unclosed interval", open.span.clone())
                        .with_help("close it with `)` (end excluded) or `]` (end included)")
                } else {
                    Diagnostic::new(
                        format!(
                            "expected `)` or `]` to close the interval, found {}",
                            close.kind.describe()
                        ),
                        close.span.clone(),
                    )
                };
                return fail(diagnostic);
            }
        };
        Ok((
            &rest[1..],
            ParamConstraint::Interval {
                lo,
                lo_closed,
                hi,
                hi_closed,
            },
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::ast::{CmpOp, StatementKind};
    use crate::syntax::display_expr;
    use crate::syntax::lexer::tokenize;
    use crate::syntax::statement::statement;

    fn param(text: &str) -> ParamDecl {
        let tokens = tokenize(text).unwrap();
        let (rest, s) = statement(&tokens).unwrap();
        assert_eq!(rest.len(), 1, "{text}: left {rest:?}");
        match s.kind {
            StatementKind::Param(p) => p,
            other => panic!("{other:?}"),
        }
    }

    fn names(p: &ParamDecl) -> Vec<&str> {
        p.names.iter().map(|(n, _)| n.as_str()).collect()
    }

    #[test]
    fn param_with_an_open_interval() {
        let p = param("param rho in (0, 1)");
        assert_eq!(names(&p), ["rho"]);
        assert_eq!(p.names[0].1, 6..9);
        assert!(!p.integer);
        let ParamConstraint::Interval {
            lo,
            lo_closed,
            hi,
            hi_closed,
        } = p.constraint
        else {
            panic!()
        };
        assert_eq!(
            (display_expr(&lo), lo_closed, display_expr(&hi), hi_closed),
            ("0".into(), false, "1".into(), false)
        );
    }

    #[test]
    fn param_with_closed_and_mixed_intervals() {
        for (text, closed) in [
            ("param a in [0, 1]", (true, true)),
            ("param a in (0, 1]", (false, true)),
            ("param a in [0, c+1)", (true, false)),
        ] {
            let ParamConstraint::Interval {
                lo_closed,
                hi_closed,
                ..
            } = param(text).constraint
            else {
                panic!("{text}")
            };
            assert_eq!((lo_closed, hi_closed), closed, "{text}");
        }
    }

    #[test]
    fn param_with_a_comparison() {
        for (text, op) in [
            ("param alpha > 0", CmpOp::Gt),
            ("param alpha >= 0", CmpOp::Ge),
            ("param alpha ≥ 0", CmpOp::Ge),
            ("param alpha < 1", CmpOp::Lt),
            ("param alpha <= 5", CmpOp::Le),
        ] {
            let ParamConstraint::Compare { op: got, .. } = param(text).constraint else {
                panic!("{text}")
            };
            assert_eq!(got, op, "{text}");
        }
    }

    #[test]
    fn param_integer_flag_and_name_lists() {
        let p = param("param N integer >= 1");
        assert!(p.integer);
        assert!(matches!(
            p.constraint,
            ParamConstraint::Compare { op: CmpOp::Ge, .. }
        ));
        let p = param("param lambda, mu > 0");
        assert_eq!(names(&p), ["lambda", "mu"]);
        assert_eq!(p.names[1].1, 14..16);
        let p = param("param c integer in [1, 10]");
        assert!(p.integer && matches!(p.constraint, ParamConstraint::Interval { .. }));
        let p = param("param s");
        assert_eq!(p.constraint, ParamConstraint::None);
        let p = param("param lambda_0, x_k > 0");
        assert_eq!(names(&p), ["lambda_0", "x_k"]);
        assert_eq!(p.names[0].1, 6..14);
    }
}
