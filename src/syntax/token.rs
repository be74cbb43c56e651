//! Tokens: the words of the input language, each with its byte span.

use crate::diagnostic::Span;
use num_rational::BigRational;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Keyword {
    Param,
    In,
    For,
    Integer,
}

impl Keyword {
    pub(crate) fn from_word(word: &str) -> Option<Keyword> {
        match word {
            "param" => Some(Keyword::Param),
            "in" => Some(Keyword::In),
            "for" => Some(Keyword::For),
            "integer" => Some(Keyword::Integer),
            _ => None,
        }
    }

    pub(crate) fn word(self) -> &'static str {
        match self {
            Keyword::Param => "param",
            Keyword::In => "in",
            Keyword::For => "for",
            Keyword::Integer => "integer",
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub(crate) enum TokenKind {
    Number(BigRational),
    Name(String),
    Keyword(Keyword),
    /// `_` glued to the name before it: a subscript follows.
    Underscore,
    Plus,
    Minus,
    Star,
    Slash,
    Caret,
    Bang,
    LParen,
    RParen,
    LBracket,
    RBracket,
    LBrace,
    RBrace,
    Comma,
    Equals,
    Less,
    LessEq,
    Greater,
    GreaterEq,
    /// `;` or a line break: both end a statement.
    Separator,
    /// Always the last token, with an empty span at the end of the text, so every
    /// parser position has a place to point at.
    End,
}

#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Token {
    pub kind: TokenKind,
    pub span: Span,
}

pub(crate) type Tokens<'t> = &'t [Token];

impl TokenKind {
    /// How the token is named in an error message.
    pub(crate) fn describe(&self) -> String {
        match self {
            TokenKind::Number(_) => "a number".into(),
            TokenKind::Name(name) => format!("the name `{name}`"),
            TokenKind::Keyword(k) => format!("the keyword `{}`", k.word()),
            TokenKind::Separator => "the end of the statement".into(),
            TokenKind::End => "the end of the input".into(),
            other => format!("`{}`", other.symbol()),
        }
    }

    fn symbol(&self) -> &'static str {
        match self {
            TokenKind::Underscore => "_",
            TokenKind::Plus => "+",
            TokenKind::Minus => "-",
            TokenKind::Star => "*",
            TokenKind::Slash => "/",
            TokenKind::Caret => "^",
            TokenKind::Bang => "!",
            TokenKind::LParen => "(",
            TokenKind::RParen => ")",
            TokenKind::LBracket => "[",
            TokenKind::RBracket => "]",
            TokenKind::LBrace => "{",
            TokenKind::RBrace => "}",
            TokenKind::Comma => ",",
            TokenKind::Equals => "=",
            TokenKind::Less => "<",
            TokenKind::LessEq => "<=",
            TokenKind::Greater => ">",
            TokenKind::GreaterEq => ">=",
            _ => "?",
        }
    }

    /// True for the tokens that can end an expression's statement.
    pub(crate) fn ends_statement(&self) -> bool {
        matches!(self, TokenKind::Separator | TokenKind::End)
    }
}
