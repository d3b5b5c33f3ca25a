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
        .flat_map(|c| {
            if c.is_control() {
                c.escape_default().collect::<Vec<_>>()
            } else {
                vec![c]
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn control_characters_are_escaped() {
        assert_eq!(printable("a\u{1b}[31mb"), "a\\u{1b}[31mb");
        let t = render(&["x"], &[vec!["bell\u{7}".into()]]);
        assert!(!t.contains('\u{7}'));
    }
}
