//! Plain text tables shared by all human-readable reports (built on `tabled`).

use tabled::builder::Builder;
use tabled::settings::Style;

/// Render rows under a header as an aligned table with a rule under the header.
pub fn render(header: &[&str], rows: &[Vec<String>]) -> String {
    let mut b = Builder::default();
    b.push_record(header.iter().map(|h| h.to_string()));
    for r in rows {
        b.push_record(r.iter().map(|c| printable(c)));
    }
    let mut t = b.build();
    t.with(Style::psql());
    t.to_string()
}

/// Control characters in user-supplied text are shown escaped, never sent to the terminal.
pub fn printable(s: &str) -> String {
    s.chars()
        .flat_map(|c| if c.is_control() { escaped(c) } else { vec![c] })
        .collect()
}

/// The escape of a control character: `\t`, `\r`, `\n`, else `\u` and four hex digits, the
/// form JSON reads too (so that a JSON document passed through [`printable_text`] stays valid
/// and keeps the same string: serde_json writes the C1 controls U+0080-U+009F raw, as JSON
/// allows, and a Rust-style `\u{81}` would make the document unreadable).
fn escaped(c: char) -> Vec<char> {
    match c {
        '\t' | '\r' | '\n' => c.escape_default().collect(),
        _ => format!("\\u{:04x}", c as u32).chars().collect(),
    }
}

/// A whole text (many lines) as [`printable`] would show it, line breaks and tabs kept: the one
/// function every text the program prints passes through, so that a control character stored
/// in a name (an escape sequence added with `kb add --name`, say) never reaches a terminal raw.
/// A text without such characters is returned as it is (no copy: reports run to megabytes).
pub fn printable_text(s: &str) -> std::borrow::Cow<'_, str> {
    // Control characters are C0 (bytes below 0x20), DEL (0x7f) and C1 (U+0080-U+009F, in
    // UTF-8 0xc2 then 0x80-0x9f; a `°` or `±` is 0xc2 then 0xb0 or 0xb1): a text without such
    // bytes is printable as it is, which a byte scan tells faster than decoding every
    // character of a megabyte report.
    let b = s.as_bytes();
    let suspect = |i: usize| match b[i] {
        b'\n' | b'\t' => false,
        0..0x20 | 0x7f => true,
        0xc2 => b.get(i + 1).is_some_and(|n| (0x80..0xa0).contains(n)),
        _ => false,
    };
    if !(0..b.len()).any(suspect) || !s.chars().any(|c| c.is_control() && c != '\n' && c != '\t') {
        return std::borrow::Cow::Borrowed(s);
    }
    s.chars()
        .flat_map(|c| {
            if c.is_control() && c != '\n' && c != '\t' {
                escaped(c)
            } else {
                vec![c]
            }
        })
        .collect::<String>()
        .into()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn whole_texts_keep_their_layout_but_lose_control_characters() {
        let t = "name,logp\n\u{1b}[31mred\t1.2\r\n\u{7}";
        let p = printable_text(t);
        assert_eq!(p, "name,logp\n\\u001b[31mred\t1.2\\r\n\\u0007");
        assert!(!p.chars().any(|c| c.is_control() && c != '\n' && c != '\t'));
        assert_eq!(printable_text("plain\ttext\n"), "plain\ttext\n");
        // degree and plus-minus signs share the C1 controls' first UTF-8 byte: kept, no copy
        let units = printable_text("25 \u{b0}C \u{b1} 1\n");
        assert!(matches!(units, std::borrow::Cow::Borrowed(_)));
        assert_eq!(printable_text("a\u{85}b\u{9f}"), "a\\u0085b\\u009f");
    }

    #[test]
    fn control_characters_are_escaped() {
        assert_eq!(printable("a\u{1b}[31mb"), "a\\u001b[31mb");
        // a JSON document with a C1 control (written raw by serde_json) stays valid JSON
        let doc = serde_json::to_string(&serde_json::json!({"name": "A\u{81}B"})).unwrap();
        let shown = printable_text(&doc);
        let back: serde_json::Value = serde_json::from_str(&shown).expect("still JSON");
        assert_eq!(back["name"], "A\u{81}B");
        let t = render(&["x"], &[vec!["bell\u{7}".into()]]);
        assert!(!t.contains('\u{7}'));
    }
}
