//! Statements and model files:
//!
//! ```text
//! model     = { separator } [ statement { separator { separator } statement } ] { separator }
//! statement = param_decl | expression [ "=" expression ] [ range ]
//! ```
//!
//! `param_decl` is in [`super::param`], `range` in [`super::range`].

use super::ast::{Model, Statement, StatementKind};
use super::error::{fail, missing_operand, reserved_word, unexpected, PResult};
use super::expr::{expression, last_end, peek, punct};
use super::param::param_declaration;
use super::range::optional_range;
use super::token::{Keyword, Token, TokenKind, Tokens};
use crate::diagnostic::Diagnostic;
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
        (TokenKind::Keyword(Keyword::Integer), StatementKind::Param(_)) => Diagnostic::new(
            "`integer` must come right after the names",
            token.span.clone(),
        )
        .with_help("write `param N integer >= 1`"),
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

    fn failure(text: &str) -> Diagnostic {
        let tokens = tokenize(text).unwrap();
        match model(&tokens) {
            Err(nom::Err::Failure(e)) | Err(nom::Err::Error(e)) => e.diagnostic,
            other => panic!("{text}: {other:?}"),
        }
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
        assert!(failure("param N >= 1 integer")
            .message
            .contains("right after the names"));
        assert_eq!(failure("param a_{1} > 0").span, 8..9);
        assert_eq!(failure("k >= 2").span, 2..4);
        assert_eq!(failure("k) + 1").span, 1..2);
        assert_eq!(failure("2 param a").span, 2..7);
        assert!(failure("for = 2").message.contains("rule before"));
    }

    #[test]
    fn param_statement_span() {
        let s = parse_one("param N integer >= 1 ");
        assert_eq!(s.span, 0..20);
    }
}
