//! Output formats. One file per format; each turns results into text and
//! never writes files or computes physics.

pub mod bom;
pub mod csv;
pub mod json;
pub mod spice;
pub mod svg;
pub mod table;
pub mod text;
pub mod verify_table;

/// User text (a specification's `name`, a stock list's name) made safe to
/// print: every control character (ESC, NUL, CR, LF, ...) is written as a
/// visible escape (`\u{1b}`), so it cannot drive a terminal, break a table
/// or a comment line, or make an SVG invalid XML (XML 1.0 admits no
/// control character but tab and line ends, not even as a reference).
/// Other text, accents and symbols included, is unchanged.
pub fn printable(text: &str) -> std::borrow::Cow<'_, str> {
    if !text.chars().any(char::is_control) {
        return std::borrow::Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len() + 8);
    for c in text.chars() {
        if c.is_control() {
            out.push_str(&format!("\\u{{{:x}}}", u32::from(c)));
        } else {
            out.push(c);
        }
    }
    std::borrow::Cow::Owned(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    // ESC (a terminal's command prefix), NUL and line ends become visible
    // escapes; printable text, non-ASCII included, is kept as it is.
    #[test]
    fn control_characters_are_escaped() {
        assert_eq!(printable("stage \u{1b}[31mred"), "stage \\u{1b}[31mred");
        assert_eq!(printable("a\0b\r\nc\td"), "a\\u{0}b\\u{d}\\u{a}c\\u{9}d");
        assert_eq!(printable("Ω µ — ±5 % stage"), "Ω µ — ±5 % stage");
        assert_eq!(printable("\u{9b}"), "\\u{9b}");
    }
}
