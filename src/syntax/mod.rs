//! The input language: model files and rule strings, turned into a syntax tree.
//!
//! Two steps, each with one job: `lexer` turns text into tokens (exact numbers, names,
//! subscripts, operators, statement separators), then the parser (`expr`, `statement`,
//! `param`, `range`) builds the tree with nom, one function per grammar production.
//! The full grammar, with examples that the tests parse, is `grammar/telescope.ebnf`.
//!
//! The parser knows nothing about mathematics: it does not decide whether `k(k+1)` is a
//! sequence term or a product, or whether `lambda_0` is a parameter; it records what was
//! written (with byte spans) and leaves meaning to the model layer.
//!
//! ```
//! use telescope::syntax::{display_expr, parse_expr};
//! let e = parse_expr("1/2k").unwrap();
//! assert_eq!(display_expr(&e), "(1 / (2 * k))");
//! ```

mod ast;
mod display;
mod error;
mod expr;
mod lexer;
mod param;
mod range;
mod statement;
mod token;

pub use ast::{
    BinOp, Bound, CmpOp, Expr, ExprKind, Model, ParamConstraint, ParamDecl, RangeClause, Statement,
    StatementKind,
};
pub use display::display_expr;
pub use expr::MAX_EXPR_DEPTH;

use crate::diagnostic::Diagnostic;
use error::into_diagnostic;
use token::TokenKind;

/// Parses a model file or a rule string: statements separated by line breaks or `;`.
pub fn parse_model(text: &str) -> Result<Model, Diagnostic> {
    let tokens = lexer::tokenize(text)?;
    let (_, model) = statement::model(&tokens).map_err(into_diagnostic)?;
    if model.statements.is_empty() {
        let span = tokens[tokens.len() - 1].span.clone();
        return Err(
            Diagnostic::new("empty input: there is no statement to read", span)
                .with_help("write a rule such as `a(k)/a(k-1) = (k-1)/(k+2)`"),
        );
    }
    Ok(model)
}

/// Parses one expression that must fill the whole text (blanks and a comment aside).
pub fn parse_expr(text: &str) -> Result<Expr, Diagnostic> {
    let all_tokens = lexer::tokenize(text)?;
    // Leading blank and comment lines are harmless; `End` is never a separator.
    let start = all_tokens
        .iter()
        .position(|t| t.kind != TokenKind::Separator)
        .unwrap_or(0);
    let tokens = &all_tokens[start..];
    let first = &tokens[0];
    if first.kind == TokenKind::End {
        return Err(
            Diagnostic::new("empty input: expected an expression", first.span.clone())
                .with_help("write an expression such as `(k-1)/(k+2)`"),
        );
    }
    let (rest, expr) = match expr::expression(tokens) {
        Ok(done) => done,
        Err(nom::Err::Error(_)) => {
            return Err(Diagnostic::new(
                format!("expected an expression, found {}", first.kind.describe()),
                first.span.clone(),
            ))
        }
        Err(e) => return Err(into_diagnostic(e)),
    };
    // Trailing line breaks (a file, standard input) are not a second expression.
    let after_separators = rest.iter().find(|t| t.kind != TokenKind::Separator);
    if after_separators.map(|t| &t.kind) != Some(&TokenKind::End) {
        let next = &rest[0];
        let diagnostic = match next.kind {
            TokenKind::Separator => {
                Diagnostic::new("expected a single expression", next.span.clone())
                    .with_help("remove the `;` or line break and what follows it")
            }
            TokenKind::Equals => {
                Diagnostic::new("expected an expression, not an equation", next.span.clone())
                    .with_help("give only the right-hand side")
            }
            _ => error::unexpected(next),
        };
        return Err(diagnostic);
    }
    Ok(expr)
}

#[cfg(test)]
mod parse_tests;
