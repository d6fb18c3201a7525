//! Byte offset ↔ line/column conversion, used only at the edges (CLI output, LSP positions).
//! Columns can be counted in UTF-8 bytes, UTF-16 code units or characters; lines end at `\n`
//! (a `\r` before it belongs to the line ending, not to a column).

/// A 0-based line and column.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct LineCol {
    pub line: u32,
    pub col: u32,
}

/// How columns are counted.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Encoding {
    Utf8,
    Utf16,
    /// Unicode scalar values, as a human counts them in a terminal.
    Chars,
}

#[derive(Clone, Debug)]
pub struct LineIndex {
    /// Byte offset of the start of every line.
    line_starts: Vec<usize>,
    len: usize,
}

impl LineIndex {
    pub fn new(text: &str) -> Self {
        let mut line_starts = vec![0];
        line_starts.extend(text.match_indices('\n').map(|(i, _)| i + 1));
        LineIndex {
            line_starts,
            len: text.len(),
        }
    }

    pub fn line_count(&self) -> usize {
        self.line_starts.len()
    }

    /// The line/column of a byte offset; offsets past the end clamp to the end, offsets inside
    /// a multi-byte character clamp to its start.
    pub fn line_col(&self, text: &str, offset: usize, enc: Encoding) -> LineCol {
        let mut offset = offset.min(self.len).min(text.len());
        while offset > 0 && !text.is_char_boundary(offset) {
            offset -= 1;
        }
        let line = self.line_starts.partition_point(|&s| s <= offset) - 1;
        let start = self.line_starts[line];
        let col = count(&text[start..offset], enc);
        LineCol {
            line: line as u32,
            col: col as u32,
        }
    }

    /// The byte offset of a line/column; a column past the line's end clamps to the end of the
    /// line (before its `\r\n`), a line past the end clamps to the end of the text.
    pub fn offset(&self, text: &str, pos: LineCol, enc: Encoding) -> usize {
        let Some(&start) = self.line_starts.get(pos.line as usize) else {
            return text.len();
        };
        let end = self
            .line_starts
            .get(pos.line as usize + 1)
            .map_or(text.len(), |&next| next - 1);
        let line = &text[start..end.min(text.len())];
        let line = line.strip_suffix('\r').unwrap_or(line);
        let mut units = 0usize;
        for (i, ch) in line.char_indices() {
            if units >= pos.col as usize {
                return start + i;
            }
            units += match enc {
                Encoding::Utf8 => ch.len_utf8(),
                Encoding::Utf16 => ch.len_utf16(),
                Encoding::Chars => 1,
            };
            if units > pos.col as usize {
                // The position falls inside a character: take its start.
                return start + i;
            }
        }
        start + line.len()
    }
}

fn count(s: &str, enc: Encoding) -> usize {
    match enc {
        Encoding::Utf8 => s.len(),
        Encoding::Utf16 => s.encode_utf16().count(),
        Encoding::Chars => s.chars().count(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn utf16_and_crlf() {
        let text = "ab\r\n\u{1F600}x µ\nlast";
        let idx = LineIndex::new(text);
        let x = text.find('x').unwrap();
        assert_eq!(
            idx.line_col(text, x, Encoding::Utf16),
            LineCol { line: 1, col: 2 }
        );
        assert_eq!(
            idx.line_col(text, x, Encoding::Utf8),
            LineCol { line: 1, col: 4 }
        );
        assert_eq!(
            idx.line_col(text, x, Encoding::Chars),
            LineCol { line: 1, col: 1 }
        );
        assert_eq!(
            idx.offset(text, LineCol { line: 1, col: 2 }, Encoding::Utf16),
            x
        );
        // Past the end of a CRLF line clamps before the `\r`.
        assert_eq!(
            idx.offset(text, LineCol { line: 0, col: 99 }, Encoding::Utf16),
            2
        );
        // Inside a surrogate pair clamps to the character's start.
        assert_eq!(
            idx.offset(text, LineCol { line: 1, col: 1 }, Encoding::Utf16),
            4
        );
        assert_eq!(
            idx.offset(text, LineCol { line: 9, col: 0 }, Encoding::Utf16),
            text.len()
        );
        assert_eq!(
            idx.line_col(text, 10_000, Encoding::Utf8),
            LineCol { line: 2, col: 4 }
        );
    }
}
