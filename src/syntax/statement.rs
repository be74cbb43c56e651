//! Statements and model files:
//!
//! ```text
//! model     = { separator } [ statement { separator { separator } statement } ] { separator }
//! statement = param_decl | expression [ "=" expression ] [ range ]
//! param_decl = "param" name { "," name } [ "integer" ] [ constraint ]
//! constraint = "in" interval | comparison expression
//! interval  = ( "(" | "[" ) expression "," expression ( ")" | "]" )
//! range     = "for" expression comparison expression [ comparison expression ]
//! ```

use super::ast::{
    Bound, CmpOp, Expr, ExprKind, Model, ParamConstraint, ParamDecl, RangeClause, Statement,
    StatementKind,
};
use super::error::{fail, missing_operand, reserved_word, unexpected, PResult};
use super::expr::{expression, name, peek, punct};
use super::token::{Keyword, Token, TokenKind, Tokens};
use crate::diagnostic::{Diagnostic, Span};
use nom::multi::many0;

/// Every statement up to the final `End` token.
pub(crate) fn model(input: Tokens<'_>) -> PResult<'_, Model> {
    let mut statements = Vec::new();
    let mut input = skip_separators(input);
    while peek(input).kind != TokenKind::End {
        let (rest, parsed) = statement(input)?;
        statements.push(parsed);
        let next = peek(rest);
        if !next.kind.ends_statement() {
            return fail(after_statement(next, &statements[statements.len() - 1]));
        }
        input = skip_separators(rest);
    }
    Ok((input, Model { statements }))
}

fn skip_separators(input: Tokens<'_>) -> Tokens<'_> {
    let kept: PResult<'_, _> = many0(punct(TokenKind::Separator))(input);
    kept.map(|(rest, _)| rest).unwrap_or(input)
}

/// The error for a token left over after a complete statement.
fn after_statement(token: &Token, statement: &Statement) -> Diagnostic {
    match (&token.kind, &statement.kind) {
        (TokenKind::Equals, StatementKind::Equation { range: None, .. }) => {
            Diagnostic::new("a statement can have only one `=`", token.span.clone())
                .with_help("split a chain like `a = b = c` into two statements, separated by `;`")
        }
        (TokenKind::Equals, StatementKind::Param(_)) => Diagnostic::new(
            "a `param` line declares a parameter, it does not set one",
            token.span.clone(),
        )
        .with_help("give values on the command line, as in `--param rho=0.3`"),
        (TokenKind::Keyword(Keyword::For), _) => Diagnostic::new(
            "a statement can have only one `for` clause",
            token.span.clone(),
        )
        .with_help("write a piecewise rule as separate statements, one per range"),
        (TokenKind::Name(_), StatementKind::Param(_)) => Diagnostic::new(
            format!("unexpected {}", token.kind.describe()),
            token.span.clone(),
        )
        .with_help("separate parameter names with commas: `param lambda, mu > 0`"),
        _ => unexpected(token),
    }
}

pub(crate) fn statement(input: Tokens<'_>) -> PResult<'_, Statement> {
    if let Ok((rest, keyword)) = punct(TokenKind::Keyword(Keyword::Param))(input) {
        let (rest, decl) = param_declaration(keyword)(rest)?;
        let span = keyword.span.start..last_end(input, rest);
        return Ok((
            rest,
            Statement {
                kind: StatementKind::Param(decl),
                span,
            },
        ));
    }
    let (rest, lhs) = match expression(input) {
        Ok(done) => done,
        Err(nom::Err::Error(_)) => return fail(statement_start(peek(input))),
        Err(e) => return Err(e),
    };
    let (rest, rhs) = match punct(TokenKind::Equals)(rest) {
        Ok((after, equals)) => match expression(after) {
            Ok((after, rhs)) => (after, Some(rhs)),
            Err(nom::Err::Error(_)) => {
                return fail(missing_operand(equals, "a right-hand side", peek(after)))
            }
            Err(e) => return Err(e),
        },
        Err(_) => (rest, None),
    };
    let (rest, range) = optional_range(rest)?;
    let span = peek(input).span.start..last_end(input, rest);
    let kind = match rhs {
        Some(rhs) => StatementKind::Equation { lhs, rhs, range },
        None => StatementKind::Bare { expr: lhs, range },
    };
    Ok((rest, Statement { kind, span }))
}

/// The end of the last token consumed between `start` and `rest`.
fn last_end(start: Tokens<'_>, rest: Tokens<'_>) -> usize {
    let consumed = start.len() - rest.len();
    match consumed {
        0 => peek(start).span.start,
        n => start[n - 1].span.end,
    }
}

/// Why no statement could start at `token`.
fn statement_start(token: &Token) -> Diagnostic {
    match &token.kind {
        TokenKind::Equals => {
            Diagnostic::new("missing left-hand side before `=`", token.span.clone())
                .with_help("write an equation such as `a(k)/a(k-1) = (k-1)/(k+2)`")
        }
        TokenKind::Keyword(Keyword::For) => {
            Diagnostic::new("a `for` clause needs a rule before it", token.span.clone())
                .with_help("write the rule first: `(k-1)/(k+2) for k >= 2`")
        }
        TokenKind::Keyword(k @ (Keyword::In | Keyword::Integer)) => {
            reserved_word(*k, token.span.clone())
        }
        _ => Diagnostic::new(
            format!(
                "expected a rule or a declaration, found {}",
                token.kind.describe()
            ),
            token.span.clone(),
        ),
    }
}

/// After `param`: names, the `integer` flag, the constraint.
fn param_declaration<'t>(keyword: &'t Token) -> impl Fn(Tokens<'t>) -> PResult<'t, ParamDecl> {
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

fn comparison(kind: &TokenKind) -> Option<CmpOp> {
    match kind {
        TokenKind::Less => Some(CmpOp::Lt),
        TokenKind::LessEq => Some(CmpOp::Le),
        TokenKind::Greater => Some(CmpOp::Gt),
        TokenKind::GreaterEq => Some(CmpOp::Ge),
        _ => None,
    }
}

/// An expression that must be there because `after` announced it.
fn required_expression<'t>(
    after: &'t Token,
    what: &'static str,
) -> impl Fn(Tokens<'t>) -> PResult<'t, Expr> {
    move |input: Tokens<'t>| match expression(input) {
        Err(nom::Err::Error(_)) => fail(missing_operand(after, what, peek(input))),
        other => other,
    }
}

fn optional_range(input: Tokens<'_>) -> PResult<'_, Option<RangeClause>> {
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
fn one_sided(
    left: Expr,
    op: CmpOp,
    right: Expr,
) -> Result<RangeClause, nom::Err<super::error::SyntaxError>> {
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
) -> Result<RangeClause, nom::Err<super::error::SyntaxError>> {
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

    fn parse_one(text: &str) -> Statement {
        let tokens = tokenize(text).unwrap();
        let (rest, s) = statement(&tokens).unwrap();
        assert_eq!(rest.len(), 1, "{text}: left {rest:?}");
        s
    }

    fn param(text: &str) -> ParamDecl {
        match parse_one(text).kind {
            StatementKind::Param(p) => p,
            other => panic!("{other:?}"),
        }
    }

    fn range(text: &str) -> RangeClause {
        let tokens = tokenize(text).unwrap();
        let (rest, r) = optional_range(&tokens).unwrap();
        assert_eq!(rest.len(), 1, "{text}: left {rest:?}");
        r.expect("a range clause")
    }

    /// A range as `var lower(strict?) upper(strict?)` in one line.
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

    fn failure(text: &str) -> Diagnostic {
        let tokens = tokenize(text).unwrap();
        match model(&tokens) {
            Err(nom::Err::Failure(e)) | Err(nom::Err::Error(e)) => e.diagnostic,
            other => panic!("{text}: {other:?}"),
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

    #[test]
    fn param_statement_span() {
        let s = parse_one("param N integer >= 1 ");
        assert_eq!(s.span, 0..20);
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

    #[test]
    fn equations_bare_rules_and_their_ranges() {
        let s = parse_one("n(k)/n(k-1) = (k-1)/(k+alpha) for k >= 2");
        assert_eq!(s.span, 0..40);
        let StatementKind::Equation { lhs, rhs, range } = s.kind else {
            panic!()
        };
        assert_eq!(display_expr(&lhs), "(n(k) / n((k - 1)))");
        assert_eq!(display_expr(&rhs), "((k - 1) / (k + alpha))");
        assert_eq!(range.unwrap().var, "k");

        let StatementKind::Bare { expr, range } = parse_one("(k-1)/(k+2) for k >= 4").kind else {
            panic!()
        };
        assert_eq!(display_expr(&expr), "((k - 1) / (k + 2))");
        assert!(range.is_some());

        let StatementKind::Equation { lhs, .. } =
            parse_one("(k+2) p(k) = (k-1) p(k-1) for k >= 4").kind
        else {
            panic!()
        };
        assert_eq!(display_expr(&lhs), "((k + 2) * p(k))");
        assert!(matches!(
            parse_one("birth(k) = lambda").kind,
            StatementKind::Equation { range: None, .. }
        ));
    }

    #[test]
    fn models_with_comments_semicolons_and_blank_lines() {
        let text = "# a model\n\nparam mu > 0 # rate\n birth(k) = lambda ;  death(k) = k mu\n\n;\n";
        let tokens = tokenize(text).unwrap();
        let (_, m) = model(&tokens).unwrap();
        assert_eq!(m.statements.len(), 3);
        assert_eq!(m.statements[1].span, 32..49);
        assert_eq!(m.statements[2].span, 53..68);
    }

    #[test]
    fn statement_errors() {
        let d = failure("a = b = c");
        assert_eq!(
            (d.message.as_str(), d.span),
            ("a statement can have only one `=`", 6..7)
        );
        assert_eq!(failure("= 3").span, 0..1);
        assert!(failure("=").message.contains("left-hand side"));
        assert_eq!(failure("k =").span, 2..3);
        assert_eq!(failure("k for").span, 2..5);
        assert_eq!(failure("k for k").span, 2..5);
        assert_eq!(failure("k for k = 2").span, 8..9);
        assert_eq!(failure("k for 1 <= k >= 2").span, 13..15);
        assert_eq!(failure("k for 1 <= 2 <= c").span, 11..12);
        assert_eq!(failure("k for 1 <= 2").span, 6..12);
        assert_eq!(failure("k for k >= 1 for k <= 3").span, 13..16);
        assert_eq!(failure("param").span, 0..5);
        assert_eq!(failure("param > 0").span, 6..7);
        assert!(failure("param in (0,1)").message.contains("reserved"));
        assert_eq!(failure("param a, > 0").span, 9..10);
        assert_eq!(failure("param a in").span, 8..10);
        // `0 1` is a product, so the comma is found missing at `)`.
        assert_eq!(failure("param a in (0 1)").span, 15..16);
        assert_eq!(failure("param a in (0;1)").span, 11..12);
        assert_eq!(failure("param a in (0, 1").span, 11..12);
        assert_eq!(failure("param a in (0, 1}").span, 16..17);
        assert_eq!(failure("param a b").span, 8..9);
        assert_eq!(failure("param a = 2").span, 8..9);
        assert_eq!(failure("param a_{1} > 0").span, 8..9);
        assert_eq!(failure("k >= 2").span, 2..4);
        assert_eq!(failure("k) + 1").span, 1..2);
        assert_eq!(failure("2 param a").span, 2..7);
        assert!(failure("for = 2").message.contains("rule before"));
    }
}
