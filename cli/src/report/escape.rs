//! Escaping of text for HTML and SVG, shared by every page and figure (a leaf module: it
//! imports nothing of the report).

/// Escapes text for HTML and SVG content and attribute values.
pub fn esc(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::esc;

    #[test]
    fn escapes_the_five_markup_characters_and_keeps_the_rest() {
        // The five characters of OWASP's XSS Prevention Cheat Sheet, rule 1 (from memory):
        // & < > " ' as entities (decimal &#39;, the same character as its &#x27;).
        assert_eq!(
            esc(r#"a<b>&"c"'d' µ→"#),
            "a&lt;b&gt;&amp;&quot;c&quot;&#39;d&#39; µ→"
        );
        assert_eq!(esc(""), "");
    }
}
