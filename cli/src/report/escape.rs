//! Escaping of text for HTML and SVG, shared by every page and figure (a leaf module: it
//! imports nothing of the report).
//!
//! The page templates (`cli/templates/*.html`) escape every inserted value with
//! [`Entities`], set as the escaper of `.html` templates in `cli/askama.toml`; the SVG
//! charts, built as strings in `svg.rs`, escape their text with [`esc`]. Both write the same
//! five named or decimal entities, so a text reads the same in a table and in a chart.

use std::fmt;

/// The entity of a markup character, or `None` for a character written as it is.
fn entity(c: char) -> Option<&'static str> {
    match c {
        '&' => Some("&amp;"),
        '<' => Some("&lt;"),
        '>' => Some("&gt;"),
        '"' => Some("&quot;"),
        '\'' => Some("&#39;"),
        _ => None,
    }
}

/// Writes `text` to `out` with the five markup characters as entities.
fn write_escaped<W: fmt::Write>(mut out: W, text: &str) -> fmt::Result {
    let mut plain = 0;
    for (i, c) in text.char_indices() {
        if let Some(e) = entity(c) {
            out.write_str(&text[plain..i])?;
            out.write_str(e)?;
            plain = i + c.len_utf8();
        }
    }
    out.write_str(&text[plain..])
}

/// Escapes text for HTML and SVG content and attribute values.
pub fn esc(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    write_escaped(&mut out, text).expect("writing to a String cannot fail");
    out
}

/// The templates' escaper: `&`, `<`, `>`, `"` and `'` as `&amp;`, `&lt;`, `&gt;`, `&quot;`
/// and `&#39;`, the rest as it is (askama's own HTML escaper writes decimal entities for
/// all five; this one keeps the pages as they were written before the templates).
#[derive(Debug, Clone, Copy, Default)]
pub struct Entities;

impl askama::filters::Escaper for Entities {
    fn write_escaped_str<W: fmt::Write>(&self, dest: W, string: &str) -> fmt::Result {
        write_escaped(dest, string)
    }
}

#[cfg(test)]
mod tests {
    use super::{esc, Entities};
    use askama::filters::Escaper;

    #[test]
    fn escapes_the_five_markup_characters_and_keeps_the_rest() {
        // The five characters of OWASP's XSS Prevention Cheat Sheet, rule 1 (from memory):
        // & < > " ' as entities (decimal &#39;, the same character as its &#x27;).
        assert_eq!(
            esc(r#"a<b>&"c"'d' µ→"#),
            "a&lt;b&gt;&amp;&quot;c&quot;&#39;d&#39; µ→"
        );
        assert_eq!(esc(""), "");
        assert_eq!(esc("Δp ≥ 1 m³/s"), "Δp ≥ 1 m³/s");
    }

    #[test]
    fn the_templates_escaper_writes_what_esc_writes() {
        for text in [r#"<script>&"'</script>"#, "plain", "", "µ<→>&&"] {
            let mut out = String::new();
            Entities.write_escaped_str(&mut out, text).unwrap();
            assert_eq!(out, esc(text));
        }
    }
}
