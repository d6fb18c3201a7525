//! The document store's unit: the text the client holds, its line index and its version.
//!
//! No rope: models are small, and a `String` plus a [`LineIndex`] rebuilt after each change is
//! simpler to keep right. Ranges are applied one after another, each against the text the
//! previous one produced (LSP 3.17, `TextDocumentContentChangeEvent`).

use sprung_syntax::{Encoding, LineCol, LineIndex};
use tower_lsp_server::ls_types::{Position, Range, TextDocumentContentChangeEvent};

/// The largest document the server keeps; beyond it the document is dropped (the engine would
/// refuse it anyway).
pub const MAX_DOCUMENT_BYTES: usize = 16 * 1024 * 1024;

#[derive(Clone, Debug)]
pub struct Document {
    pub text: String,
    pub index: LineIndex,
    pub version: i32,
}

/// Why a change could not be applied. The store drops the document when it sees one, rather
/// than keep a copy that no longer matches the client's.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum EditError {
    /// The version did not increase.
    Version { had: i32, got: i32 },
    /// A range whose start lies after its end.
    ReversedRange { change: usize },
    /// The text would exceed [`MAX_DOCUMENT_BYTES`].
    TooLarge,
}

impl std::fmt::Display for EditError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            EditError::Version { had, got } => write!(
                f,
                "version {got} does not follow version {had}; changes must arrive in increasing version order"
            ),
            EditError::ReversedRange { change } => {
                write!(
                    f,
                    "change {change} has a range whose start is after its end"
                )
            }
            EditError::TooLarge => {
                write!(f, "the document would exceed {MAX_DOCUMENT_BYTES} bytes")
            }
        }
    }
}

impl Document {
    pub fn new(text: String, version: i32) -> Self {
        let index = LineIndex::new(&text);
        Document {
            text,
            index,
            version,
        }
    }

    /// The byte offset of a protocol position; out-of-range lines and columns clamp (to the end
    /// of the text and of the line), a position inside a character clamps to its start.
    pub fn offset(&self, pos: Position, enc: Encoding) -> usize {
        offset(&self.text, &self.index, pos, enc)
    }

    /// Applies the changes of one `didChange` in order. On error the document is left
    /// unchanged; the caller drops it.
    pub fn apply(
        &mut self,
        version: i32,
        changes: Vec<TextDocumentContentChangeEvent>,
        enc: Encoding,
    ) -> Result<(), EditError> {
        if version <= self.version {
            return Err(EditError::Version {
                had: self.version,
                got: version,
            });
        }
        // Whole-text fast path: the last full replacement makes everything before it moot.
        let last_full = changes.iter().rposition(|c| c.range.is_none());
        let (mut text, mut index, rest) = match last_full {
            Some(i) => {
                let mut changes = changes;
                let rest = changes.split_off(i + 1);
                let full = changes.pop().map(|c| c.text).unwrap_or_default();
                let index = LineIndex::new(&full);
                (full, index, rest)
            }
            None => (self.text.clone(), self.index.clone(), changes),
        };
        let first = last_full.map_or(0, |i| i + 1);
        for (n, change) in rest.into_iter().enumerate() {
            let Some(range) = change.range else {
                // Unreachable: every full change is before `rest`.
                text = change.text;
                index = LineIndex::new(&text);
                continue;
            };
            let start = offset(&text, &index, range.start, enc);
            let end = offset(&text, &index, range.end, enc);
            if start > end {
                return Err(EditError::ReversedRange { change: first + n });
            }
            if text.len() - (end - start) + change.text.len() > MAX_DOCUMENT_BYTES {
                return Err(EditError::TooLarge);
            }
            text.replace_range(start..end, &change.text);
            index = LineIndex::new(&text);
        }
        if text.len() > MAX_DOCUMENT_BYTES {
            return Err(EditError::TooLarge);
        }
        self.text = text;
        self.index = index;
        self.version = version;
        Ok(())
    }
}

pub fn offset(text: &str, index: &LineIndex, pos: Position, enc: Encoding) -> usize {
    index.offset(
        text,
        LineCol {
            line: pos.line,
            col: pos.character,
        },
        enc,
    )
}

pub fn position(text: &str, index: &LineIndex, offset: usize, enc: Encoding) -> Position {
    let lc = index.line_col(text, offset, enc);
    Position::new(lc.line, lc.col)
}

pub fn range(text: &str, index: &LineIndex, span: sprung_syntax::Span, enc: Encoding) -> Range {
    Range::new(
        position(text, index, span.start, enc),
        position(text, index, span.end, enc),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn change(
        range: Option<((u32, u32), (u32, u32))>,
        text: &str,
    ) -> TextDocumentContentChangeEvent {
        TextDocumentContentChangeEvent {
            range: range
                .map(|((a, b), (c, d))| Range::new(Position::new(a, b), Position::new(c, d))),
            range_length: None,
            text: text.to_string(),
        }
    }

    #[test]
    fn ranges_apply_in_order_against_the_previous_result() {
        let mut doc = Document::new("mass m = 1 kg\n".into(), 1);
        let changes = vec![
            change(Some(((0, 9), (0, 10))), "25"),
            // Against the text after the first change: "mass m = 25 kg".
            change(Some(((0, 12), (0, 14))), "g"),
        ];
        doc.apply(2, changes, Encoding::Utf16).unwrap();
        assert_eq!(doc.text, "mass m = 25 g\n");
        assert_eq!(doc.version, 2);
    }

    #[test]
    fn whole_text_then_ranges() {
        let mut doc = Document::new("old".into(), 1);
        let changes = vec![
            change(Some(((0, 0), (0, 1))), "x"),
            change(None, "ab\r\ncd"),
            change(Some(((1, 0), (1, 1))), "C"),
        ];
        doc.apply(2, changes, Encoding::Utf16).unwrap();
        assert_eq!(doc.text, "ab\r\nCd");
    }

    #[test]
    fn utf16_columns_count_surrogate_pairs() {
        // "😀" is two UTF-16 units and four UTF-8 bytes.
        let mut doc = Document::new("# 😀x\n".into(), 1);
        doc.apply(
            2,
            vec![change(Some(((0, 4), (0, 5))), "y")],
            Encoding::Utf16,
        )
        .unwrap();
        assert_eq!(doc.text, "# 😀y\n");
        doc.apply(3, vec![change(Some(((0, 6), (0, 7))), "z")], Encoding::Utf8)
            .unwrap();
        assert_eq!(doc.text, "# 😀z\n");
    }

    #[test]
    fn bad_edits_leave_the_document_unchanged() {
        let mut doc = Document::new("abc".into(), 5);
        assert_eq!(
            doc.apply(5, vec![change(None, "x")], Encoding::Utf16),
            Err(EditError::Version { had: 5, got: 5 })
        );
        assert_eq!(
            doc.apply(
                6,
                vec![
                    change(Some(((0, 0), (0, 1))), "X"),
                    change(Some(((0, 2), (0, 1))), "")
                ],
                Encoding::Utf16
            ),
            Err(EditError::ReversedRange { change: 1 })
        );
        assert_eq!(doc.text, "abc");
        assert_eq!(doc.version, 5);
    }

    #[test]
    fn out_of_range_positions_clamp() {
        let mut doc = Document::new("ab\ncd".into(), 1);
        doc.apply(
            2,
            vec![change(Some(((0, 99), (0, 99))), "!")],
            Encoding::Utf16,
        )
        .unwrap();
        assert_eq!(doc.text, "ab!\ncd");
        doc.apply(
            3,
            vec![change(Some(((9, 0), (9, 0))), "?")],
            Encoding::Utf16,
        )
        .unwrap();
        assert_eq!(doc.text, "ab!\ncd?");
    }
}
