//! Renderers: engine results to terminal text ([`human`]), to the JSON contract ([`json`]) or
//! to SVG plots ([`plot`]).
//! Byte spans become lines and columns only here.

/// Printed under every report (README, "Caution").
pub const CAUTION: &str = "Caution: results hold for linear lumped models only; verify them by test, and defer to local codes and licensed engineers.";

pub mod human;
pub mod json;
pub mod modes;
pub mod plot;

use sprung_engine::{Diagnostic, Severity};
use sprung_syntax::{Encoding, LineIndex, Span};

/// A 1-based line and column, the column counted in Unicode characters (README, "Columns").
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Position {
    pub line: u32,
    pub column: u32,
}

impl Position {
    pub fn of(text: &str, index: &LineIndex, offset: usize) -> Position {
        let lc = index.line_col(text, offset, Encoding::Chars);
        Position {
            line: lc.line + 1,
            column: lc.col + 1,
        }
    }
}

/// A span moved inside `text` and onto character boundaries, so no renderer can be handed
/// an offset it cannot slice at.
pub fn clamp(text: &str, span: Span) -> Span {
    let fit = |mut offset: usize| {
        offset = offset.min(text.len());
        while !text.is_char_boundary(offset) {
            offset -= 1;
        }
        offset
    };
    let start = fit(span.start);
    Span::new(start, fit(span.end).max(start))
}

/// Counts of diagnostics over a whole run, for the closing summary line.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Tally {
    pub errors: usize,
    pub warnings: usize,
    pub infos: usize,
    pub files: usize,
    pub unreadable: usize,
}

impl Tally {
    pub fn add(&mut self, diagnostics: &[Diagnostic]) {
        self.files += 1;
        for d in diagnostics {
            match d.severity {
                Severity::Error => self.errors += 1,
                Severity::Warning => self.warnings += 1,
                Severity::Info => self.infos += 1,
            }
        }
    }

    /// `2 errors, 1 warning in 3 files`.
    pub fn summary(&self) -> String {
        let mut parts = vec![
            plural(self.errors, "error", "errors"),
            plural(self.warnings, "warning", "warnings"),
        ];
        if self.infos > 0 {
            parts.push(plural(self.infos, "note", "notes"));
        }
        let mut line = format!(
            "{} in {}",
            parts.join(", "),
            plural(self.files, "file", "files")
        );
        if self.unreadable > 0 {
            line.push_str(&format!(
                "; {} not read",
                plural(self.unreadable, "file", "files")
            ));
        }
        line
    }
}

fn plural(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn summary_counts_and_pluralises() {
        let tally = Tally {
            errors: 2,
            warnings: 1,
            infos: 0,
            files: 3,
            unreadable: 0,
        };
        assert_eq!(tally.summary(), "2 errors, 1 warning in 3 files");
        let one = Tally {
            files: 1,
            unreadable: 1,
            ..Tally::default()
        };
        assert_eq!(
            one.summary(),
            "0 errors, 0 warnings in 1 file; 1 file not read"
        );
    }

    #[test]
    fn positions_count_characters_from_one() {
        let text = "µµ x\nab";
        let index = LineIndex::new(text);
        let x = text.find('x').unwrap_or(0);
        assert_eq!(
            Position::of(text, &index, x),
            Position { line: 1, column: 4 }
        );
        assert_eq!(
            Position::of(text, &index, text.len()),
            Position { line: 2, column: 3 }
        );
        // Inside a multi-byte character: clamped to its start.
        assert_eq!(clamp(text, Span::new(1, 99)), Span::new(0, text.len()));
    }
}
