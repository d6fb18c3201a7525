//! Document and range formatting: `sprung_syntax::format` and `format_range`, answered as the
//! smallest edit that turns the text into the formatted one (the common start and end of the
//! two texts are left alone, so the cursor and unchanged lines do not move). A document with
//! syntax errors gets no edits (`None`): the formatter refuses it rather than half-format it.
//!
//! The client's formatting options (tab size, spaces or tabs) are not used: the format has one
//! canonical layout, the same as `sprung fmt` writes. Line endings follow the document's.

use sprung_syntax::{FormatConfig, Span};
use tower_lsp_server::ls_types::{Range, TextEdit};

use crate::snapshot::Snapshot;

/// The edits that format the whole document; empty when it is formatted already.
pub fn document(snap: &Snapshot) -> Option<Vec<TextEdit>> {
    let formatted = sprung_syntax::format(&snap.text, &FormatConfig::default()).ok()?;
    let whole = Span::new(0, snap.text.len());
    Some(minimal_edit(snap, whole, &formatted).into_iter().collect())
}

/// The edits that format the items and statements overlapping `range`.
pub fn range(snap: &Snapshot, range: Range) -> Option<Vec<TextEdit>> {
    let start = snap.offset(range.start);
    let end = snap.offset(range.end).max(start);
    let edits =
        sprung_syntax::format_range(&snap.text, Span::new(start, end), &FormatConfig::default())
            .ok()?;
    Some(
        edits
            .iter()
            .filter_map(|(span, new)| minimal_edit(snap, *span, new))
            .collect(),
    )
}

/// One edit replacing only the part of `region` that differs from `new`; `None` when nothing
/// differs.
fn minimal_edit(snap: &Snapshot, region: Span, new: &str) -> Option<TextEdit> {
    let old = snap.text.get(region.range())?;
    let (prefix, suffix) = common_ends(old, new);
    if prefix == old.len() && prefix == new.len() {
        return None;
    }
    let changed = Span::new(region.start + prefix, region.end - suffix);
    Some(TextEdit {
        range: snap.range(changed),
        new_text: new[prefix..new.len() - suffix].to_string(),
    })
}

/// The lengths in bytes of the longest common start and (not overlapping it) end of two
/// texts, both on character boundaries.
fn common_ends(old: &str, new: &str) -> (usize, usize) {
    let (a, b) = (old.as_bytes(), new.as_bytes());
    let mut prefix = a.iter().zip(b).take_while(|(x, y)| x == y).count();
    while !(old.is_char_boundary(prefix) && new.is_char_boundary(prefix)) {
        prefix -= 1;
    }
    let room = a.len().min(b.len()) - prefix;
    let mut suffix = a
        .iter()
        .rev()
        .zip(b.iter().rev())
        .take(room)
        .take_while(|(x, y)| x == y)
        .count();
    while !(old.is_char_boundary(old.len() - suffix) && new.is_char_boundary(new.len() - suffix)) {
        suffix -= 1;
    }
    (prefix, suffix)
}

#[cfg(test)]
mod tests {
    use super::common_ends;

    #[test]
    fn common_ends_stay_on_character_boundaries() {
        assert_eq!(common_ends("let a=1\n", "let a = 1\n"), (5, 2));
        assert_eq!(common_ends("same", "same"), (4, 0));
        // `±` (2 bytes) against `+-`: the shared first byte is not a boundary.
        assert_eq!(common_ends("a ±", "a +-"), (2, 0));
        assert_eq!(common_ends("µx", "μx"), (0, 1));
        assert_eq!(common_ends("", "x"), (0, 0));
    }
}
