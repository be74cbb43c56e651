//! User-facing errors that point at a place in the input.
//!
//! Every layer that rejects input (parser, model builder, solver) returns a [`Diagnostic`]
//! carrying a byte span into the source text; [`Diagnostic::render`] turns it into the
//! message a researcher reads: what went wrong, the line with a caret under the column, and
//! how to fix it.

use std::fmt;
use std::ops::Range;

/// Byte offsets into the source text.
pub type Span = Range<usize>;

/// An error in the user's input, with the place it was found.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Diagnostic {
    pub message: String,
    pub span: Span,
    pub help: Option<String>,
}

impl Diagnostic {
    pub fn new(message: impl Into<String>, span: Span) -> Self {
        Diagnostic {
            message: message.into(),
            span,
            help: None,
        }
    }

    pub fn with_help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }

    /// 1-based line and column (in characters) of the start of the span.
    pub fn line_column(&self, source: &str) -> (usize, usize) {
        let start = self.span.start.min(source.len());
        let before = &source[..floor_char_boundary(source, start)];
        let line = before.matches('\n').count() + 1;
        let line_start = before.rfind('\n').map(|i| i + 1).unwrap_or(0);
        let column = before[line_start..].chars().count() + 1;
        (line, column)
    }

    /// The full message: headline, location, the offending line with a caret, and the hint.
    pub fn render(&self, source_name: &str, source: &str) -> String {
        let (line, column) = self.line_column(source);
        let text_line = source.lines().nth(line - 1).unwrap_or("");
        let start = floor_char_boundary(source, self.span.start.min(source.len()));
        let end = floor_char_boundary(source, self.span.end.min(source.len())).max(start);
        let width = source[start..end]
            .split('\n')
            .next()
            .map(|s| s.chars().count())
            .unwrap_or(0)
            .max(1);
        let gutter = line.to_string().len();
        let mut out = format!(
            "error: {}\n{:>g$}--> {}, line {}, column {}\n",
            self.message,
            "",
            source_name,
            line,
            column,
            g = gutter
        );
        out += &format!("{:>g$} |\n", "", g = gutter);
        out += &format!("{} | {}\n", line, text_line);
        out += &format!(
            "{:>g$} | {}{}\n",
            "",
            " ".repeat(column - 1),
            "^".repeat(width),
            g = gutter
        );
        if let Some(help) = &self.help {
            out += &format!("{:>g$} = help: {}\n", "", help, g = gutter);
        }
        out
    }
}

impl fmt::Display for Diagnostic {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.message)
    }
}

impl std::error::Error for Diagnostic {}

fn floor_char_boundary(s: &str, mut i: usize) -> usize {
    while i > 0 && !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn caret_points_at_the_column() {
        let source = "param rho in (0,1)\nn(k)/n(k-1) = (k-1))";
        let d = Diagnostic::new("unexpected ')'", 38..39).with_help("remove it");
        assert_eq!(d.line_column(source), (2, 20));
        let text = d.render("model.tsc", source);
        assert!(text.contains("line 2, column 20"), "{text}");
        assert!(text.contains("\n  |                    ^\n"), "{text}");
        assert!(text.contains("help: remove it"));
    }
}
