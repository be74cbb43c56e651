//! The parser's error type and the messages for the mistakes people actually make.
//!
//! nom's recoverable `Err::Error` means "this production does not start here" (so `alt`
//! and `opt` may try something else); `Err::Failure` carries a finished [`Diagnostic`] and
//! stops the parse, so the user sees the first real mistake, not the last backtrack.

use super::token::{Keyword, Token, TokenKind, Tokens};
use crate::diagnostic::{Diagnostic, Span};
use nom::error::{ErrorKind, ParseError};

#[derive(Clone, Debug, PartialEq)]
pub(crate) struct SyntaxError {
    pub diagnostic: Diagnostic,
}

pub(crate) type PResult<'t, O> = nom::IResult<Tokens<'t>, O, SyntaxError>;

impl<'t> ParseError<Tokens<'t>> for SyntaxError {
    fn from_error_kind(input: Tokens<'t>, _kind: ErrorKind) -> Self {
        SyntaxError {
            diagnostic: match input.first() {
                Some(token) => unexpected(token),
                // Unreachable in practice: the `End` token is never consumed.
                None => Diagnostic::new("unexpected end of input", 0..0),
            },
        }
    }

    fn append(_input: Tokens<'t>, _kind: ErrorKind, other: Self) -> Self {
        other
    }
}

impl SyntaxError {
    pub(crate) fn new(diagnostic: Diagnostic) -> Self {
        SyntaxError { diagnostic }
    }
}

/// A committed error: the parse stops here.
pub(crate) fn fail<T>(diagnostic: Diagnostic) -> Result<T, nom::Err<SyntaxError>> {
    Err(nom::Err::Failure(SyntaxError::new(diagnostic)))
}

/// A recoverable error at `input`: "nothing of this kind starts here".
pub(crate) fn no_match<T>(input: Tokens<'_>) -> Result<T, nom::Err<SyntaxError>> {
    Err(nom::Err::Error(SyntaxError::from_error_kind(
        input,
        ErrorKind::Verify,
    )))
}

/// Turns a recoverable error into the final diagnostic (used at the top of the parse).
pub(crate) fn into_diagnostic(error: nom::Err<SyntaxError>) -> Diagnostic {
    match error {
        nom::Err::Error(e) | nom::Err::Failure(e) => e.diagnostic,
        // Only streaming parsers ask for more input; ours are all complete.
        nom::Err::Incomplete(_) => Diagnostic::new("unexpected end of input", 0..0),
    }
}

pub(crate) fn span_of(token: &Token) -> Span {
    token.span.clone()
}

/// The message for a token that cannot appear where it stands.
pub(crate) fn unexpected(token: &Token) -> Diagnostic {
    let span = span_of(token);
    match &token.kind {
        TokenKind::RParen => Diagnostic::new("unexpected `)`: there is no open `(` to close", span)
            .with_help("remove it, or add the missing `(` earlier"),
        TokenKind::RBracket | TokenKind::RBrace => {
            Diagnostic::new(format!("unexpected {}", token.kind.describe()), span).with_help(
                "brackets close an interval like `[0, 1]`, braces a subscript like `n_{k-1}`",
            )
        }
        TokenKind::Comma => Diagnostic::new("unexpected `,`", span).with_help(
            "commas separate function arguments, parameter names and the two ends of an interval",
        ),
        TokenKind::Less | TokenKind::LessEq | TokenKind::Greater | TokenKind::GreaterEq => {
            Diagnostic::new(
                format!(
                    "unexpected {}: comparisons belong in a `for` clause or a `param` line",
                    token.kind.describe()
                ),
                span,
            )
            .with_help("to say where a rule holds, write it after the rule: `... for k >= 2`")
        }
        TokenKind::Keyword(Keyword::Param) => {
            Diagnostic::new("`param` must start its own statement", span)
                .with_help("put the declaration on its own line, or separate it with `;`")
        }
        TokenKind::Keyword(k) => reserved_word(*k, span),
        TokenKind::End | TokenKind::Separator => {
            Diagnostic::new("unexpected end of the statement", span)
        }
        other => Diagnostic::new(format!("unexpected {}", other.describe()), span),
    }
}

pub(crate) fn reserved_word(keyword: Keyword, span: Span) -> Diagnostic {
    Diagnostic::new(
        format!(
            "`{}` is a reserved word and cannot be used as a name",
            keyword.word()
        ),
        span,
    )
    .with_help("the reserved words are `param`, `in`, `for` and `integer`; choose another name")
}

/// An operand is missing after `operator` (a binary operator, unary minus, `^`, `=`...).
pub(crate) fn missing_operand(operator: &Token, what: &str, found: &Token) -> Diagnostic {
    if found.kind.ends_statement() {
        Diagnostic::new(
            format!("missing {what} after {}", operator.kind.describe()),
            span_of(operator),
        )
        .with_help(format!(
            "write an expression after {}, or remove it",
            operator.kind.describe()
        ))
    } else if let TokenKind::Keyword(k @ (Keyword::Param | Keyword::In | Keyword::Integer)) =
        found.kind
    {
        reserved_word(k, span_of(found))
    } else {
        Diagnostic::new(
            format!(
                "expected {what} after {}, found {}",
                operator.kind.describe(),
                found.kind.describe()
            ),
            span_of(found),
        )
    }
}
