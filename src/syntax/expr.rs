//! Expressions, one function per level of precedence (lowest first):
//!
//! ```text
//! sum       = product { ("+" | "-") product }
//! product   = juxtaposed { ("*" | "/") juxtaposed }
//! juxtaposed = signed { power }          implicit multiplication: `2k`, `(1-rho)(k-1)`
//! signed    = "-" signed | power
//! power     = postfix [ "^" signed ]     right associative; `2^-1` allowed
//! postfix   = atom { "!" }
//! atom      = number | name | "(" sum ")"
//! ```
//!
//! Juxtaposition binds tighter than `*` and `/`, so `1/2k` is `1/(2k)`, as a reader of a
//! paper expects. A juxtaposed factor after the first cannot start with `-`: `2 -k` is a
//! difference.

use super::ast::{BinOp, CmpOp, Expr, ExprKind};
use super::error::{fail, missing_operand, no_match, reserved_word, PResult};
use super::token::{Keyword, Token, TokenKind, Tokens};
use crate::diagnostic::{Diagnostic, Span};
use nom::combinator::opt;
use nom::multi::{many0, separated_list1};

/// Consumes one token of exactly this kind. Never consumes the final `End` token.
pub(crate) fn punct<'t>(kind: TokenKind) -> impl Fn(Tokens<'t>) -> PResult<'t, &'t Token> {
    move |input: Tokens<'t>| match input.split_first() {
        Some((first, rest)) if first.kind == kind && first.kind != TokenKind::End => {
            Ok((rest, first))
        }
        _ => no_match(input),
    }
}

/// The next token, not consumed.
pub(crate) fn peek(input: Tokens<'_>) -> &Token {
    // The token list always ends with `End`, which no production consumes.
    &input[0]
}

fn advance(input: Tokens<'_>) -> Tokens<'_> {
    &input[1..]
}

pub(crate) fn name(input: Tokens<'_>) -> PResult<'_, (String, Span)> {
    match &peek(input).kind {
        TokenKind::Name(n) => Ok((advance(input), (n.clone(), peek(input).span.clone()))),
        _ => no_match(input),
    }
}

fn join(a: &Span, b: &Span) -> Span {
    a.start..b.end
}

fn binary(op: BinOp, lhs: Expr, rhs: Expr) -> Expr {
    let span = join(&lhs.span, &rhs.span);
    Expr::new(
        ExprKind::Binary {
            op,
            lhs: Box::new(lhs),
            rhs: Box::new(rhs),
        },
        span,
    )
}

/// Runs `operand` after `operator`; an operand that does not even start is reported
/// as missing, at the operator.
pub(crate) fn operand_after<'t>(
    operator: &'t Token,
    what: &'static str,
    operand: impl Fn(Tokens<'t>) -> PResult<'t, Expr>,
) -> impl Fn(Tokens<'t>) -> PResult<'t, Expr> {
    move |input: Tokens<'t>| match operand(input) {
        Err(nom::Err::Error(_)) => fail(missing_operand(operator, what, peek(input))),
        other => other,
    }
}

/// The comparison a token stands for, if any.
pub(crate) fn comparison(kind: &TokenKind) -> Option<CmpOp> {
    match kind {
        TokenKind::Less => Some(CmpOp::Lt),
        TokenKind::LessEq => Some(CmpOp::Le),
        TokenKind::Greater => Some(CmpOp::Gt),
        TokenKind::GreaterEq => Some(CmpOp::Ge),
        _ => None,
    }
}

/// An expression that must be there because `after` announced it.
pub(crate) fn required_expression<'t>(
    after: &'t Token,
    what: &'static str,
) -> impl Fn(Tokens<'t>) -> PResult<'t, Expr> {
    operand_after(after, what, expression)
}

/// The end of the last token consumed between `start` and `rest`.
pub(crate) fn last_end(start: Tokens<'_>, rest: Tokens<'_>) -> usize {
    let consumed = start.len() - rest.len();
    match consumed {
        0 => peek(start).span.start,
        n => start[n - 1].span.end,
    }
}

/// How deep an expression tree may be, so that every layer may walk it recursively.
pub const MAX_EXPR_DEPTH: usize = 256;

/// A whole expression.
pub(crate) fn expression(input: Tokens<'_>) -> PResult<'_, Expr> {
    let (rest, expr) = sum(input)?;
    if let Some(deep) = expr.node_at_depth(MAX_EXPR_DEPTH) {
        return fail(
            Diagnostic::new("this expression is nested too deeply", deep.span.clone()).with_help(
                format!(
                "at most {MAX_EXPR_DEPTH} levels of operations are accepted; split it into parts"
            ),
            ),
        );
    }
    Ok((rest, expr))
}

fn sum(input: Tokens<'_>) -> PResult<'_, Expr> {
    left_associative(input, product, |kind| match kind {
        TokenKind::Plus => Some(BinOp::Add),
        TokenKind::Minus => Some(BinOp::Sub),
        _ => None,
    })
}

fn product(input: Tokens<'_>) -> PResult<'_, Expr> {
    left_associative(input, juxtaposed, |kind| match kind {
        TokenKind::Star => Some(BinOp::Mul),
        TokenKind::Slash => Some(BinOp::Div),
        _ => None,
    })
}

fn left_associative<'t>(
    input: Tokens<'t>,
    operand: fn(Tokens<'t>) -> PResult<'t, Expr>,
    operator: fn(&TokenKind) -> Option<BinOp>,
) -> PResult<'t, Expr> {
    let (mut input, mut acc) = operand(input)?;
    while let Some(op) = operator(&peek(input).kind) {
        let op_token = peek(input);
        let (rest, rhs) = operand_after(op_token, "an operand", operand)(advance(input))?;
        acc = binary(op, acc, rhs);
        input = rest;
    }
    Ok((input, acc))
}

/// Implicit multiplication: factors written side by side.
fn juxtaposed(input: Tokens<'_>) -> PResult<'_, Expr> {
    let (mut input, mut acc) = signed(input)?;
    while starts_atom(&peek(input).kind) {
        let (rest, rhs) = power(input)?;
        acc = binary(BinOp::ImplicitMul, acc, rhs);
        input = rest;
    }
    Ok((input, acc))
}

fn starts_atom(kind: &TokenKind) -> bool {
    matches!(
        kind,
        TokenKind::Number(_) | TokenKind::Name(_) | TokenKind::LParen
    )
}

/// Unary minus, binding looser than `^`: `-k^2` is `-(k^2)`.
fn signed(input: Tokens<'_>) -> PResult<'_, Expr> {
    let (rest, minuses) = many0(punct(TokenKind::Minus))(input)?;
    let (rest, inner) = match minuses.last() {
        Some(minus) => operand_after(minus, "an operand", power)(rest)?,
        None => power(rest)?,
    };
    Ok((rest, negate(minuses, inner)))
}

/// Wraps `inner` in one `Neg` per minus sign, the innermost for the last sign.
fn negate(minuses: Vec<&Token>, inner: Expr) -> Expr {
    minuses.into_iter().rev().fold(inner, |acc, minus| {
        let span = join(&minus.span, &acc.span);
        Expr::new(ExprKind::Neg(Box::new(acc)), span)
    })
}

/// `base ^ exponent`, right associative, each exponent optionally negated: `2^3^2` is
/// `2^(3^2)`, `2^-3^2` is `2^(-(3^2))`. Built in a loop, not by recursion, so a long
/// chain cannot exhaust the stack.
fn power(input: Tokens<'_>) -> PResult<'_, Expr> {
    let (mut rest, base) = postfix(input)?;
    let mut exponents = Vec::new();
    while let Ok((after_caret, caret)) = punct(TokenKind::Caret)(rest) {
        let (after_signs, minuses) = many0(punct(TokenKind::Minus))(after_caret)?;
        let (announcer, what) = match minuses.last() {
            Some(minus) => (*minus, "an operand"),
            None => (caret, "an exponent"),
        };
        // In an exponent, `k (1-p)` is k times (1-p), not a call: `p^k (1-p)^(N-k)`.
        let (after, exponent) = operand_after(announcer, what, exponent_operand)(after_signs)?;
        exponents.push((minuses, exponent));
        rest = after;
    }
    let mut tower: Option<Expr> = None;
    for (minuses, operand) in exponents.into_iter().rev() {
        let raised = match tower.take() {
            None => operand,
            Some(higher) => binary(BinOp::Pow, operand, higher),
        };
        tower = Some(negate(minuses, raised));
    }
    let expr = match tower {
        None => base,
        Some(exponent) => binary(BinOp::Pow, base, exponent),
    };
    Ok((rest, expr))
}

/// `k!`, `(k+1)!`; `k!!` is `(k!)!`.
fn postfix(input: Tokens<'_>) -> PResult<'_, Expr> {
    postfix_with(input, true)
}

/// The operand of `^`: like `postfix`, but a name followed by a space and `(` ends at the name.
fn exponent_operand(input: Tokens<'_>) -> PResult<'_, Expr> {
    postfix_with(input, false)
}

fn postfix_with(input: Tokens<'_>, spaced_calls: bool) -> PResult<'_, Expr> {
    let (input, inner) = atom_with(input, spaced_calls)?;
    let (input, bangs) = many0(punct(TokenKind::Bang))(input)?;
    let expr = bangs.into_iter().fold(inner, |acc, bang| {
        let span = join(&acc.span, &bang.span);
        Expr::new(ExprKind::Factorial(Box::new(acc)), span)
    });
    Ok((input, expr))
}

#[cfg(test)]
fn atom(input: Tokens<'_>) -> PResult<'_, Expr> {
    atom_with(input, true)
}

fn atom_with(input: Tokens<'_>, spaced_calls: bool) -> PResult<'_, Expr> {
    let token = peek(input);
    match &token.kind {
        TokenKind::Number(value) => Ok((
            advance(input),
            Expr::new(ExprKind::Number(value.clone()), token.span.clone()),
        )),
        TokenKind::Name(_) => named_with(input, spaced_calls),
        TokenKind::LParen => parenthesised(input),
        // `for` after an operator means the operand is missing, not misused.
        TokenKind::Keyword(Keyword::For) => no_match(input),
        TokenKind::Keyword(k) => fail(reserved_word(*k, token.span.clone())),
        _ => no_match(input),
    }
}

/// `( sum )`; the node's span grows to cover the parentheses.
fn parenthesised(input: Tokens<'_>) -> PResult<'_, Expr> {
    let (rest, open) = punct(TokenKind::LParen)(input)?;
    let (rest, inner) = operand_after(open, "an expression", expression)(rest)?;
    let (rest, close) = closing(open, TokenKind::RParen, "parenthesis")(rest)?;
    Ok((
        rest,
        Expr {
            span: join(&open.span, &close.span),
            ..inner
        },
    ))
}

/// The closing bracket for `open`. When the statement ends first, the error points at
/// the opening bracket, which is where the reader has to look.
pub(crate) fn closing<'t>(
    open: &'t Token,
    close: TokenKind,
    what: &'static str,
) -> impl Fn(Tokens<'t>) -> PResult<'t, &'t Token> {
    move |input: Tokens<'t>| {
        if let Ok(done) = punct(close.clone())(input) {
            return Ok(done);
        }
        let found = peek(input);
        if found.kind.ends_statement() {
            fail(
                Diagnostic::new(format!("unclosed {what}"), open.span.clone()).with_help(format!(
                    "add the missing {} before the end of the statement",
                    close.describe()
                )),
            )
        } else {
            fail(
                Diagnostic::new(
                    format!(
                        "expected {} to close the {what}, found {}",
                        close.describe(),
                        found.kind.describe()
                    ),
                    found.span.clone(),
                )
                .with_help(format!(
                    "an opening {} earlier on the line is still waiting for its {}",
                    open.kind.describe(),
                    close.describe()
                )),
            )
        }
    }
}

/// A name, possibly subscripted (`n_k`, `n_{k-1}`) or called (`n(k-1)`, `Gamma(k, 2)`).
#[cfg(test)]
fn named(input: Tokens<'_>) -> PResult<'_, Expr> {
    named_with(input, true)
}

/// `spaced_calls: false` leaves `name (…)` as the name alone (used in exponents).
fn named_with(input: Tokens<'_>, spaced_calls: bool) -> PResult<'_, Expr> {
    let (rest, (name, name_span)) = name(input)?;
    if let Ok((rest, underscore)) = punct(TokenKind::Underscore)(rest) {
        let (rest, index) = subscript(underscore)(rest)?;
        let span = join(&name_span, &index.1);
        let kind = ExprKind::Subscript {
            name,
            index: Box::new(index.0),
        };
        return Ok((rest, Expr::new(kind, span)));
    }
    let call = punct(TokenKind::LParen)(rest)
        .ok()
        .filter(|(_, open)| spaced_calls || open.span.start == name_span.end);
    if let Some((after_open, open)) = call {
        let spaced = open.span.start != name_span.end;
        let (after_args, args) = arguments(open)(after_open)?;
        let (after_close, close) = closing(open, TokenKind::RParen, "argument list")(after_args)?;
        let kind = ExprKind::Call {
            name,
            name_span: name_span.clone(),
            args,
            spaced,
        };
        return Ok((after_close, Expr::new(kind, join(&name_span, &close.span))));
    }
    Ok((rest, Expr::new(ExprKind::Ident(name), name_span)))
}

/// What follows `_`: a name, a number (the lexer has already checked the run), or
/// `{ expression }`. Returns the index and the span up to its last character.
fn subscript<'t>(underscore: &'t Token) -> impl Fn(Tokens<'t>) -> PResult<'t, (Expr, Span)> {
    move |input: Tokens<'t>| {
        let token = peek(input);
        match &token.kind {
            TokenKind::Name(n) => Ok((
                advance(input),
                (
                    Expr::new(ExprKind::Ident(n.clone()), token.span.clone()),
                    token.span.clone(),
                ),
            )),
            TokenKind::Number(v) => Ok((
                advance(input),
                (
                    Expr::new(ExprKind::Number(v.clone()), token.span.clone()),
                    token.span.clone(),
                ),
            )),
            TokenKind::Keyword(k) => fail(reserved_word(*k, token.span.clone())),
            TokenKind::LBrace => {
                let rest = advance(input);
                if let TokenKind::RBrace = peek(rest).kind {
                    return fail(
                        Diagnostic::new("empty subscript", join(&token.span, &peek(rest).span))
                            .with_help("write the index inside the braces, as in `n_{k-1}`"),
                    );
                }
                let (rest, index) = operand_after(token, "a subscript", expression)(rest)?;
                let (rest, close) = closing(token, TokenKind::RBrace, "subscript brace")(rest)?;
                Ok((rest, (index, close.span.clone())))
            }
            _ => fail(missing_operand(underscore, "a subscript", token)),
        }
    }
}

/// `arg, arg, ...` after the `(` of a call; at least one argument.
fn arguments<'t>(open: &'t Token) -> impl Fn(Tokens<'t>) -> PResult<'t, Vec<Expr>> {
    move |input: Tokens<'t>| {
        if let TokenKind::RParen = peek(input).kind {
            return fail(
                Diagnostic::new("empty argument list", join(&open.span, &peek(input).span))
                    .with_help("a call needs at least one argument, as in `n(k-1)`"),
            );
        }
        let (rest, first) = operand_after(open, "an argument", expression)(input)?;
        let (rest, more) = opt(|i| {
            let (i, comma) = punct(TokenKind::Comma)(i)?;
            separated_list1(punct(TokenKind::Comma), move |j| {
                operand_after(comma, "an argument", expression)(j)
            })(i)
        })(rest)?;
        let mut args = vec![first];
        args.extend(more.unwrap_or_default());
        Ok((rest, args))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::display_expr;
    use crate::syntax::lexer::tokenize;
    use num_rational::BigRational;

    /// Runs one production on `text`; returns the tree's shape and what is left unread.
    fn run(
        production: fn(Tokens<'_>) -> PResult<'_, Expr>,
        text: &str,
    ) -> (String, Vec<TokenKind>) {
        let tokens = tokenize(text).unwrap();
        let (rest, e) = production(&tokens).unwrap();
        (
            display_expr(&e),
            rest.iter().map(|t| t.kind.clone()).collect(),
        )
    }

    fn shape(text: &str) -> String {
        let (s, rest) = run(expression, text);
        assert_eq!(rest, vec![TokenKind::End], "{text} left tokens unread");
        s
    }

    fn error(text: &str) -> Diagnostic {
        let tokens = tokenize(text).unwrap();
        match expression(&tokens) {
            Err(nom::Err::Failure(e)) | Err(nom::Err::Error(e)) => e.diagnostic,
            Ok((rest, e)) => panic!("{text} parsed as {} leaving {rest:?}", display_expr(&e)),
            Err(e) => panic!("{e:?}"),
        }
    }

    #[test]
    fn atom_reads_numbers_names_and_parentheses() {
        assert_eq!(run(atom, "2.5 k").0, "5/2");
        assert_eq!(run(atom, "rho").0, "rho");
        assert_eq!(run(atom, "(k-1) k").0, "(k - 1)");
        assert_eq!(run(atom, "(k-1) k").1.len(), 2);
    }

    #[test]
    fn parenthesised_span_covers_the_parentheses() {
        let tokens = tokenize(" (k+1) ").unwrap();
        let (_, e) = atom(&tokens).unwrap();
        assert_eq!(e.span, 1..6);
    }

    #[test]
    fn postfix_factorial() {
        assert_eq!(run(postfix, "k!").0, "(k!)");
        assert_eq!(run(postfix, "(k+1)!").0, "((k + 1)!)");
        assert_eq!(run(postfix, "k!!").0, "((k!)!)");
        assert_eq!(shape("2k!"), "(2 * (k!))");
        assert_eq!(shape("k^2!"), "(k ^ (2!))");
    }

    #[test]
    fn power_is_right_associative_and_takes_a_signed_exponent() {
        assert_eq!(run(power, "2^3^2").0, "(2 ^ (3 ^ 2))");
        assert_eq!(run(power, "2^-1").0, "(2 ^ (-1))");
        assert_eq!(run(power, "k^-k^2").0, "(k ^ (-(k ^ 2)))");
    }

    #[test]
    fn a_spaced_parenthesis_after_an_exponent_name_is_a_product() {
        // p^k (1-p)^(N-k): the binomial pmf shape (common practice notation)
        assert_eq!(shape("p^k (1-p)^(N-k)"), "((p ^ k) * ((1 - p) ^ (N - k)))");
        assert_eq!(shape("x^f(2)"), "(x ^ f(2))");
    }

    #[test]
    fn unary_minus_binds_looser_than_power() {
        assert_eq!(run(signed, "-k^2").0, "(-(k ^ 2))");
        assert_eq!(run(signed, "--k").0, "(-(-k))");
        assert_eq!(shape("-2k"), "((-2) * k)");
        assert_eq!(shape("a - -b"), "(a - (-b))");
    }

    #[test]
    fn juxtaposition_is_implicit_multiplication() {
        assert_eq!(run(juxtaposed, "2k").0, "(2 * k)");
        assert_eq!(run(juxtaposed, "2 k").0, "(2 * k)");
        assert_eq!(run(juxtaposed, "k mu").0, "(k * mu)");
        assert_eq!(run(juxtaposed, "(1-rho)(k-1)").0, "((1 - rho) * (k - 1))");
        assert_eq!(run(juxtaposed, "2(k+1)").0, "(2 * (k + 1))");
        assert_eq!(run(juxtaposed, "(k+1)k").0, "((k + 1) * k)");
        assert_eq!(run(juxtaposed, "3rho^2").0, "(3 * (rho ^ 2))");
        assert_eq!(run(juxtaposed, "2 3 k").0, "((2 * 3) * k)");
        // A juxtaposed factor never starts with a minus: that is a difference.
        assert_eq!(run(juxtaposed, "2 -k").1.len(), 3);
        let tokens = tokenize("2k").unwrap();
        let (_, e) = juxtaposed(&tokens).unwrap();
        assert!(matches!(
            e.kind,
            ExprKind::Binary {
                op: BinOp::ImplicitMul,
                ..
            }
        ));
    }

    #[test]
    fn implicit_multiplication_binds_tighter_than_division() {
        assert_eq!(shape("1/2k"), "(1 / (2 * k))");
        assert_eq!(shape("1/2 k"), "(1 / (2 * k))");
        assert_eq!(shape("a/b*c"), "((a / b) * c)");
        assert_eq!(shape("a*b c"), "(a * (b * c))");
        assert_eq!(shape("c/k"), "(c / k)");
    }

    #[test]
    fn sums_and_products_are_left_associative() {
        assert_eq!(run(sum, "a - b - c").0, "((a - b) - c)");
        assert_eq!(run(product, "a / b / c").0, "((a / b) / c)");
        assert_eq!(shape("1 + 2*3^2"), "(1 + (2 * (3 ^ 2)))");
    }

    #[test]
    fn the_ratio_from_the_brief() {
        assert_eq!(
            shape("(1-rho)(k-1) / (1 + (1-rho) k)"),
            "(((1 - rho) * (k - 1)) / (1 + ((1 - rho) * k)))"
        );
    }

    #[test]
    fn calls_keep_all_arguments_and_note_spacing() {
        assert_eq!(shape("Gamma(k + 1, 2, a b)"), "Gamma((k + 1), 2, (a * b))");
        assert_eq!(shape("k(k+1)"), "k((k + 1))");
        assert_eq!(shape("k (k+1)"), "k ((k + 1))");
        let tokens = tokenize("n  (k-1)").unwrap();
        let (_, e) = named(&tokens).unwrap();
        match e.kind {
            ExprKind::Call {
                name,
                name_span,
                args,
                spaced,
            } => {
                assert_eq!(
                    (name.as_str(), name_span, args.len(), spaced),
                    ("n", 0..1, 1, true)
                );
            }
            other => panic!("{other:?}"),
        }
        assert_eq!(e.span, 0..8);
    }

    #[test]
    fn subscripts_hold_a_name_a_number_or_an_expression() {
        assert_eq!(shape("n_k"), "n_{k}");
        assert_eq!(shape("lambda_0"), "lambda_{0}");
        assert_eq!(shape("n_{k-1}"), "n_{(k - 1)}");
        assert_eq!(shape("n_k/n_{k-1}"), "(n_{k} / n_{(k - 1)})");
        let tokens = tokenize("n_{k-1} ").unwrap();
        let (_, e) = named(&tokens).unwrap();
        assert_eq!(e.span, 0..7);
        match e.kind {
            ExprKind::Subscript { name, index } => {
                assert_eq!(name, "n");
                assert_eq!(index.span, 3..6);
            }
            other => panic!("{other:?}"),
        }
        let tokens = tokenize("x_12").unwrap();
        let (_, e) = named(&tokens).unwrap();
        let ExprKind::Subscript { index, .. } = e.kind else {
            panic!()
        };
        assert_eq!(
            index.kind,
            ExprKind::Number(BigRational::from_integer(12.into()))
        );
    }

    #[test]
    fn walk_reaches_every_name() {
        let tokens = tokenize("a(b, c_d) + e!").unwrap();
        let (_, e) = expression(&tokens).unwrap();
        let mut names = Vec::new();
        e.walk(&mut |node| match &node.kind {
            ExprKind::Ident(n) => names.push(n.clone()),
            ExprKind::Call { name, .. } | ExprKind::Subscript { name, .. } => {
                names.push(name.clone())
            }
            _ => {}
        });
        assert_eq!(names, ["a", "b", "c", "d", "e"]);
    }

    #[test]
    fn expression_errors_point_at_the_culprit() {
        let d = error("k + ");
        assert_eq!(
            (d.message.as_str(), d.span),
            ("missing an operand after `+`", 2..3)
        );
        assert_eq!(error("k + * 2").span, 4..5);
        assert_eq!(error("(k + 1").span, 0..1);
        assert!(error("(k + 1").message.contains("unclosed"));
        assert_eq!(error("f(k, 2").span, 1..2);
        assert_eq!(error("f(k,)").span, 4..5);
        assert_eq!(error("f()").span, 1..3);
        assert_eq!(error("n_{}").span, 2..4);
        assert_eq!(error("n_{k").span, 2..3);
        assert_eq!(error("k^").span, 1..2);
        assert!(error("k^").message.contains("exponent"));
        assert!(error("in + 1").message.contains("reserved"));
        assert_eq!(error("(k ] 2)").span, 3..4);
    }
}
