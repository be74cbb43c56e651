//! Escaping for HTML and XML text and attribute values (the report's page, its MathML and
//! its SVG). The five characters of XML's predefined entities are replaced; nothing else is
//! touched, so Unicode (ρ, Γ, −) passes through as UTF-8.

/// Text content of an element: `&`, `<`, `>` (and quotes, so the result is also safe in an
/// attribute value).
pub fn escape_text(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            other => out.push(other),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markup_characters_are_replaced() {
        assert_eq!(
            escape_text("<script>alert('x') && \"y\"</script>"),
            "&lt;script&gt;alert(&#39;x&#39;) &amp;&amp; &quot;y&quot;&lt;/script&gt;"
        );
    }

    #[test]
    fn unicode_and_plain_text_pass_through() {
        assert_eq!(escape_text("ρ ∈ (0, 1) — Γ(k)"), "ρ ∈ (0, 1) — Γ(k)");
        assert_eq!(escape_text(""), "");
    }

    #[test]
    fn escaping_twice_escapes_the_ampersands_again() {
        // Not idempotent on purpose: the input is text, never markup.
        assert_eq!(escape_text("&amp;"), "&amp;amp;");
    }
}
