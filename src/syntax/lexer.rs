//! Text to tokens: names, exact numbers, operators, statement separators.
//!
//! Blanks and `#` comments vanish here; a line break and `;` both become one
//! `Separator` token. Subscripts are recognised here because `n_2k` vs `n_{2k}` is a
//! question about characters, not about the expression grammar.

use super::token::{Keyword, Token, TokenKind};
use crate::diagnostic::{Diagnostic, Span};
use nom::branch::alt;
use nom::bytes::complete::{tag, take_till, take_while, take_while1};
use nom::character::complete::{alpha1, alphanumeric0, char, digit1, one_of};
use nom::combinator::{map, opt, recognize, value};
use nom::error::{ErrorKind, ParseError};
use nom::multi::many0_count;
use nom::sequence::{pair, preceded};
use nom::IResult;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Pow;

/// Scientific exponents beyond this are refused, so `1e999999999` cannot stall the parser. A
/// thousand digits is far past any constant a model carries, and exact products of rules
/// with 3,000-digit constants took seconds per value.
const MAX_DECIMAL_EXPONENT: u32 = 1_000;

/// Limits that keep every recursion over the tree (parsing, dropping, later layers) far
/// from the end of the stack; real rules stay well inside them.
const MAX_NESTING: usize = 64;
const MAX_STATEMENT_TOKENS: usize = 2_000;

/// A lexer error. Its place is stored as the length of the text that remains at the
/// offending byte, which every sub-parser knows without knowing the whole text.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct LexError {
    remaining: usize,
    len: usize,
    message: String,
    help: Option<String>,
}

type LexResult<'a, O> = IResult<&'a str, O, LexError>;

impl<'a> ParseError<&'a str> for LexError {
    fn from_error_kind(input: &'a str, _kind: ErrorKind) -> Self {
        LexError::unexpected_character(input)
    }

    fn append(_input: &'a str, _kind: ErrorKind, other: Self) -> Self {
        other
    }
}

impl LexError {
    fn at(rest: &str, len: usize, message: impl Into<String>) -> Self {
        LexError {
            remaining: rest.len(),
            len,
            message: message.into(),
            help: None,
        }
    }

    fn help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }

    fn unexpected_character(rest: &str) -> Self {
        let Some(c) = rest.chars().next() else {
            return LexError::at(rest, 0, "unexpected end of input");
        };
        let error = LexError::at(rest, c.len_utf8(), format!("unexpected character `{c}`"));
        match c {
            '.' => error.help("a decimal number needs a digit before the point: write `0.5`"),
            '_' => error.help("`_` must follow a name directly, as in `n_k` or `n_{k-1}`"),
            c if c.is_alphabetic() => {
                error.help("names are spelled with ASCII letters: write `rho` for ρ, `mu` for μ")
            }
            _ => error,
        }
    }

    fn into_diagnostic(self, source: &str) -> Diagnostic {
        let start = source.len() - self.remaining;
        let diagnostic = Diagnostic::new(self.message, start..start + self.len);
        match self.help {
            Some(help) => diagnostic.with_help(help),
            None => diagnostic,
        }
    }
}

fn failure<T>(error: LexError) -> LexResult<'static, T> {
    Err(nom::Err::Failure(error))
}

/// Splits `source` into tokens, ending with an `End` token at `source.len()`.
pub(crate) fn tokenize(source: &str) -> Result<Vec<Token>, Diagnostic> {
    let mut tokens = Vec::new();
    let mut limits = Limits::default();
    let mut rest = source;
    let offset = |rest: &str| source.len() - rest.len();
    loop {
        rest = match blanks(rest) {
            Ok((after, _)) => after,
            Err(e) => return Err(lex_diagnostic(e, source)),
        };
        if rest.is_empty() {
            break;
        }
        let start = offset(rest);
        let (after, kind) = token(rest).map_err(|e| lex_diagnostic(e, source))?;
        limits.count(&kind, start..offset(after))?;
        let follows_name = matches!(kind, TokenKind::Name(_));
        tokens.push(Token {
            kind,
            span: start..offset(after),
        });
        rest = after;
        if follows_name && rest.starts_with('_') {
            let (after, subscript) =
                subscript_start(rest).map_err(|e| lex_diagnostic(e, source))?;
            for (kind, from, to) in subscript {
                tokens.push(Token {
                    kind,
                    span: offset(from)..offset(to),
                });
            }
            rest = after;
        }
    }
    tokens.push(Token {
        kind: TokenKind::End,
        span: source.len()..source.len(),
    });
    Ok(tokens)
}

/// Bracket depth and statement length, counted as the tokens go by.
#[derive(Default)]
struct Limits {
    depth: usize,
    statement_tokens: usize,
}

impl Limits {
    fn count(&mut self, kind: &TokenKind, span: Span) -> Result<(), Diagnostic> {
        match kind {
            TokenKind::Separator => {
                *self = Limits::default();
                return Ok(());
            }
            TokenKind::LParen | TokenKind::LBracket | TokenKind::LBrace => self.depth += 1,
            TokenKind::RParen | TokenKind::RBracket | TokenKind::RBrace => {
                self.depth = self.depth.saturating_sub(1)
            }
            _ => {}
        }
        self.statement_tokens += 1;
        if self.depth > MAX_NESTING {
            return Err(
                Diagnostic::new("brackets are nested too deeply", span).with_help(format!(
                    "at most {MAX_NESTING} levels of brackets are accepted"
                )),
            );
        }
        if self.statement_tokens > MAX_STATEMENT_TOKENS {
            return Err(
                Diagnostic::new("this statement is too long", span).with_help(format!(
                "a statement may hold at most {MAX_STATEMENT_TOKENS} tokens; split it into several"
            )),
            );
        }
        Ok(())
    }
}

fn lex_diagnostic(error: nom::Err<LexError>, source: &str) -> Diagnostic {
    match error {
        nom::Err::Error(e) | nom::Err::Failure(e) => e.into_diagnostic(source),
        nom::Err::Incomplete(_) => {
            Diagnostic::new("unexpected end of input", source.len()..source.len())
        }
    }
}

/// Spaces, tabs, carriage returns and comments: nothing a statement needs.
fn blanks(input: &str) -> LexResult<'_, usize> {
    many0_count(alt((
        take_while1(|c| c == ' ' || c == '\t' || c == '\r'),
        comment,
    )))(input)
}

/// `#` to the end of the line; the line break itself stays, it ends the statement.
fn comment(input: &str) -> LexResult<'_, &str> {
    recognize(pair(char('#'), take_till(|c| c == '\n')))(input)
}

fn token(input: &str) -> LexResult<'_, TokenKind> {
    alt((separator, number, word, operator))(input).or_else(|e| match e {
        nom::Err::Error(_) => failure(LexError::unexpected_character(input)),
        other => Err(other),
    })
}

fn separator(input: &str) -> LexResult<'_, TokenKind> {
    value(TokenKind::Separator, one_of("\n;"))(input)
}

/// A name or a reserved word: an ASCII letter, then letters and digits.
fn word(input: &str) -> LexResult<'_, TokenKind> {
    map(
        recognize(pair(alpha1, alphanumeric0)),
        |w: &str| match Keyword::from_word(w) {
            Some(k) => TokenKind::Keyword(k),
            None => TokenKind::Name(w.to_string()),
        },
    )(input)
}

fn operator(input: &str) -> LexResult<'_, TokenKind> {
    if input.starts_with("==") {
        return failure(
            LexError::at(input, 2, "`==` is not an operator here")
                .help("an equation uses a single `=`"),
        );
    }
    if input.starts_with("**") {
        return failure(
            LexError::at(input, 2, "`**` is not an operator here")
                .help("write powers with `^`, as in `k^2`"),
        );
    }
    alt((
        alt((
            value(TokenKind::GreaterEq, alt((tag(">="), tag("≥")))),
            value(TokenKind::LessEq, alt((tag("<="), tag("≤")))),
            value(TokenKind::Greater, char('>')),
            value(TokenKind::Less, char('<')),
            value(TokenKind::Equals, char('=')),
        )),
        alt((
            value(TokenKind::Plus, char('+')),
            // U+2212 MINUS SIGN arrives whenever a formula is pasted from a PDF.
            value(TokenKind::Minus, one_of("-\u{2212}")),
            value(TokenKind::Star, one_of("*\u{00D7}\u{00B7}")),
            value(TokenKind::Slash, char('/')),
            value(TokenKind::Caret, char('^')),
            value(TokenKind::Bang, char('!')),
        )),
        alt((
            value(TokenKind::LParen, char('(')),
            value(TokenKind::RParen, char(')')),
            value(TokenKind::LBracket, char('[')),
            value(TokenKind::RBracket, char(']')),
            value(TokenKind::LBrace, char('{')),
            value(TokenKind::RBrace, char('}')),
            value(TokenKind::Comma, char(',')),
        )),
    ))(input)
}

/// The `_` after a name and, unless a `{` follows, the run of letters and digits that
/// forms the subscript. Returns the tokens with the text positions they span.
#[allow(clippy::type_complexity)]
fn subscript_start(input: &str) -> LexResult<'_, Vec<(TokenKind, &str, &str)>> {
    let (after_underscore, _) = char('_')(input)?;
    let mut tokens = vec![(TokenKind::Underscore, input, after_underscore)];
    if after_underscore.starts_with('{') {
        return Ok((after_underscore, tokens));
    }
    let (rest, run) = take_while(|c: char| c.is_ascii_alphanumeric())(after_underscore)?;
    if run.is_empty() {
        return failure(
            LexError::at(input, 1, "`_` must be followed by a subscript")
                .help("write `n_k`, `n_1` or `n_{k-1}`"),
        );
    }
    let kind = if run.bytes().all(|b| b.is_ascii_digit()) {
        TokenKind::Number(BigRational::from_integer(
            run.parse::<BigInt>().unwrap_or_default(),
        ))
    } else if run.as_bytes()[0].is_ascii_alphabetic() {
        match Keyword::from_word(run) {
            Some(k) => TokenKind::Keyword(k),
            None => TokenKind::Name(run.to_string()),
        }
    } else {
        return failure(
            LexError::at(
                after_underscore,
                run.len(),
                format!("`{run}` is not a valid subscript"),
            )
            .help(format!(
                "a subscript is a name or a number; use braces for more: `_{{{run}}}`"
            )),
        );
    };
    if rest.starts_with('_') {
        return failure(
            LexError::at(rest, 1, "a name can carry only one subscript")
                .help("use braces for a compound subscript, as in `x_{i j}`"),
        );
    }
    tokens.push((kind, after_underscore, rest));
    Ok((rest, tokens))
}

/// An exact decimal: `12`, `0.25`, `2.5e-3`. Kept as the rational the text denotes.
fn number(input: &str) -> LexResult<'_, TokenKind> {
    let (rest, integer_part) = digit1(input)?;
    let (rest, fraction) = opt(preceded(char('.'), digit1))(rest)?;
    if fraction.is_none() && rest.starts_with('.') {
        return failure(
            LexError::at(rest, 1, "a decimal point must be followed by digits")
                .help(format!("write `{integer_part}` or `{integer_part}.0`")),
        );
    }
    if fraction.is_some() && rest.starts_with('.') {
        let (_, tail) = take_while(|c: char| c.is_ascii_digit() || c == '.')(rest)?;
        let len = input.len() - rest.len() + tail.len();
        return failure(
            LexError::at(input, len, format!("`{}` is not a number", &input[..len]))
                .help("a number has at most one decimal point"),
        );
    }
    let (rest, exponent) = exponent(rest)?;
    let fraction = fraction.unwrap_or("");
    let digits = format!("{integer_part}{fraction}");
    let mantissa: BigInt = digits.parse().unwrap_or_default();
    let ten = BigInt::from(10);
    let scale = exponent - fraction.len() as i64;
    let power = Pow::pow(&ten, scale.unsigned_abs());
    let value = if scale >= 0 {
        BigRational::from_integer(mantissa * power)
    } else {
        BigRational::new(mantissa, power)
    };
    Ok((rest, TokenKind::Number(value)))
}

/// The `e-3` of `2.5e-3`. An `e` followed by a letter is not an exponent (`2eta` is
/// `2 eta`), but `2e`, `2e+` and `2e-x` are refused rather than guessed at.
fn exponent(input: &str) -> LexResult<'_, i64> {
    let Ok((after_e, _)) = one_of::<_, _, LexError>("eE")(input) else {
        return Ok((input, 0));
    };
    let (after_sign, sign) = opt(one_of("+-"))(after_e)?;
    if sign.is_none() && after_sign.starts_with(|c: char| c.is_ascii_alphabetic()) {
        return Ok((input, 0));
    }
    let Ok((rest, digits)) = digit1::<_, LexError>(after_sign) else {
        let len = input.len() - after_sign.len();
        return failure(
            LexError::at(input, len, "the exponent of this number is missing").help(
                "write digits after `e`, as in `2.5e-3`; to multiply by a name `e`, write `2*e`",
            ),
        );
    };
    let magnitude = match digits.parse::<u32>() {
        Ok(m) if m <= MAX_DECIMAL_EXPONENT => m as i64,
        _ => {
            return failure(
                LexError::at(after_sign, digits.len(), "this exponent is too large").help(format!(
                    "exponents up to {MAX_DECIMAL_EXPONENT} are accepted"
                )),
            )
        }
    };
    let signed = if sign == Some('-') {
        -magnitude
    } else {
        magnitude
    };
    Ok((rest, signed))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kinds(source: &str) -> Vec<TokenKind> {
        tokenize(source)
            .unwrap()
            .into_iter()
            .map(|t| t.kind)
            .collect()
    }

    fn rational(n: i64, d: i64) -> TokenKind {
        TokenKind::Number(BigRational::new(n.into(), d.into()))
    }

    fn error_at(source: &str) -> (String, std::ops::Range<usize>) {
        let d = tokenize(source).unwrap_err();
        (d.message, d.span)
    }

    #[test]
    fn numbers_are_exact_rationals() {
        // Decimal notation read as the exact fraction it denotes (common practice).
        let cases = [
            ("12", rational(12, 1)),
            ("0.3", rational(3, 10)),
            ("2.50", rational(5, 2)),
            ("2.5e-3", rational(1, 400)),
            ("1E3", rational(1000, 1)),
            ("1.5e+2", rational(150, 1)),
            ("007", rational(7, 1)),
        ];
        for (text, expected) in cases {
            let (rest, kind) = number(text).unwrap();
            assert_eq!((rest, kind), ("", expected), "{text}");
        }
    }

    #[test]
    fn an_e_followed_by_a_letter_starts_a_name() {
        assert_eq!(
            kinds("2eta"),
            vec![
                rational(2, 1),
                TokenKind::Name("eta".into()),
                TokenKind::End
            ]
        );
    }

    #[test]
    fn malformed_numbers_are_refused_at_the_right_place() {
        assert_eq!(error_at("x + 1.2.3").1, 4..9);
        assert!(error_at("1.2.3").0.contains("`1.2.3` is not a number"));
        assert_eq!(error_at("2.5e-").1, 3..5);
        assert_eq!(error_at("2e").1, 1..2);
        assert_eq!(error_at("3. + k").1, 1..2);
        assert!(error_at("1e99999").0.contains("too large"));
    }

    #[test]
    fn names_and_keywords() {
        assert_eq!(
            kinds("param rho2 in for integer k"),
            vec![
                TokenKind::Keyword(Keyword::Param),
                TokenKind::Name("rho2".into()),
                TokenKind::Keyword(Keyword::In),
                TokenKind::Keyword(Keyword::For),
                TokenKind::Keyword(Keyword::Integer),
                TokenKind::Name("k".into()),
                TokenKind::End,
            ]
        );
    }

    #[test]
    fn subscripts_are_split_into_their_own_tokens() {
        assert_eq!(
            kinds("n_k lambda_0 n_{"),
            vec![
                TokenKind::Name("n".into()),
                TokenKind::Underscore,
                TokenKind::Name("k".into()),
                TokenKind::Name("lambda".into()),
                TokenKind::Underscore,
                rational(0, 1),
                TokenKind::Name("n".into()),
                TokenKind::Underscore,
                TokenKind::LBrace,
                TokenKind::End,
            ]
        );
        let spans: Vec<_> = tokenize("ab_12")
            .unwrap()
            .into_iter()
            .map(|t| t.span)
            .collect();
        assert_eq!(spans, vec![0..2, 2..3, 3..5, 5..5]);
    }

    #[test]
    fn bad_subscripts() {
        assert_eq!(error_at("n_ k").1, 1..2);
        assert_eq!(error_at("n_2k").1, 2..4);
        assert_eq!(error_at("x_1_2").1, 3..4);
        assert_eq!(error_at("(k)_1").1, 3..4);
    }

    #[test]
    fn comments_blanks_and_separators() {
        assert_eq!(
            kinds("# head\n  k ; \t\r\n# tail"),
            vec![
                TokenKind::Separator,
                TokenKind::Name("k".into()),
                TokenKind::Separator,
                TokenKind::Separator,
                TokenKind::End,
            ]
        );
    }

    #[test]
    fn operators_including_unicode_synonyms() {
        assert_eq!(
            kinds("≥ >= ≤ <= < > = − × · ^ ! ( ) [ ] { } ,"),
            vec![
                TokenKind::GreaterEq,
                TokenKind::GreaterEq,
                TokenKind::LessEq,
                TokenKind::LessEq,
                TokenKind::Less,
                TokenKind::Greater,
                TokenKind::Equals,
                TokenKind::Minus,
                TokenKind::Star,
                TokenKind::Star,
                TokenKind::Caret,
                TokenKind::Bang,
                TokenKind::LParen,
                TokenKind::RParen,
                TokenKind::LBracket,
                TokenKind::RBracket,
                TokenKind::LBrace,
                TokenKind::RBrace,
                TokenKind::Comma,
                TokenKind::End,
            ]
        );
        // Spans are in bytes: `≥` is three of them.
        let spans: Vec<_> = tokenize("k≥2")
            .unwrap()
            .into_iter()
            .map(|t| t.span)
            .collect();
        assert_eq!(spans, vec![0..1, 1..4, 4..5, 5..5]);
    }

    #[test]
    fn unknown_characters() {
        let d = tokenize("k + $").unwrap_err();
        assert_eq!(
            (d.message.as_str(), d.span),
            ("unexpected character `$`", 4..5)
        );
        let d = tokenize("ρ").unwrap_err();
        assert_eq!(d.span, 0..2);
        assert!(d.help.unwrap().contains("rho"));
        assert_eq!(error_at("k ** 2").1, 2..4);
        assert_eq!(error_at("a == b").1, 2..4);
        assert_eq!(error_at(".5").1, 0..1);
    }
}
