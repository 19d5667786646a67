//! Lines and columns of byte offsets in a text, for error messages.
//!
//! The start of every line is found once; each offset is then placed by a
//! binary search, so giving a line to every key of a long file (a stock
//! list of a million parts) costs O(n log n) in all, not a rescan of the
//! text per key.

/// The line starts of one text.
#[derive(Debug, Clone)]
pub struct LineIndex<'a> {
    text: &'a str,
    /// Byte offset of the first byte of each line, ascending; the first is 0.
    starts: Vec<usize>,
}

impl<'a> LineIndex<'a> {
    /// Index the lines of `text` (one pass).
    pub fn new(text: &'a str) -> LineIndex<'a> {
        let mut starts = vec![0];
        starts.extend(
            text.bytes()
                .enumerate()
                .filter(|&(_, b)| b == b'\n')
                .map(|(i, _)| i + 1),
        );
        LineIndex { text, starts }
    }

    /// 1-based line of byte offset `at` (an offset past the end counts as
    /// the end of the text).
    pub fn line(&self, at: usize) -> usize {
        let at = at.min(self.text.len());
        self.starts.partition_point(|&s| s <= at)
    }

    /// 1-based line and column (in characters, not bytes) of byte offset
    /// `at`.
    pub fn line_col(&self, at: usize) -> (usize, usize) {
        let mut at = at.min(self.text.len());
        while !self.text.is_char_boundary(at) {
            at -= 1;
        }
        let line = self.line(at);
        let start = self.starts.get(line - 1).copied().unwrap_or(0);
        let column = self.text.get(start..at).map_or(0, |s| s.chars().count()) + 1;
        (line, column)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The rescan the index replaces: lines are counted as the newlines
    /// before the offset, plus one; columns as the characters after the
    /// last of them.
    fn rescan(text: &str, at: usize) -> (usize, usize) {
        let before = &text[..at];
        let line = before.matches('\n').count() + 1;
        let start = before.rfind('\n').map_or(0, |i| i + 1);
        (line, before[start..].chars().count() + 1)
    }

    #[test]
    fn every_offset_agrees_with_a_rescan() {
        for text in [
            "",
            "\n",
            "a = 1\nb = \"Ω\"\n\n[c]\r\nd = 2",
            "µ\nΩΩ\n",
            "no newline",
        ] {
            let index = LineIndex::new(text);
            for at in (0..=text.len()).filter(|&i| text.is_char_boundary(i)) {
                assert_eq!(index.line_col(at), rescan(text, at), "{text:?} at {at}");
                assert_eq!(index.line(at), rescan(text, at).0, "{text:?} at {at}");
            }
        }
    }

    #[test]
    fn offsets_past_the_end_or_inside_a_character_are_placed() {
        let text = "a\nΩb";
        let index = LineIndex::new(text);
        assert_eq!(index.line_col(99), (2, 3));
        // Byte 3 is inside `Ω` (bytes 2 and 3): it counts as its start.
        assert_eq!(index.line_col(3), (2, 1));
    }
}
