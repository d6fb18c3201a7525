//! `sprung-tests`: fixture tests and cross-checks of the engine against published values and
//! reference libraries. The tests live in `tests/tests/`; the fixtures in `tests/fixtures/`.
//!
//! The end-to-end tests that run the built `sprung` binary live in `cli/tests/` instead,
//! because Cargo gives a test the path of a binary (`CARGO_BIN_EXE_sprung`) only inside the
//! binary's own package. They read the same fixtures.
//!
//! This library holds what the fixture tests share: where the fixtures are and the text form
//! of expected diagnostics.

use std::path::{Path, PathBuf};

use sprung_engine::Diagnostic;
use sprung_syntax::{Encoding, LineIndex};

/// `tests/fixtures/NAME` of this repository.
pub fn fixture_dir(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fixtures")
        .join(name)
}

/// The `*.sprung` files of a fixture folder, sorted by name.
pub fn fixtures(name: &str) -> Vec<PathBuf> {
    let dir = fixture_dir(name);
    let mut found: Vec<PathBuf> = std::fs::read_dir(&dir)
        .map(|entries| {
            entries
                .filter_map(Result::ok)
                .map(|e| e.path())
                .filter(|p| p.extension().is_some_and(|e| e == "sprung"))
                .collect()
        })
        .unwrap_or_default();
    found.sort();
    found
}

/// The diagnostics as the `.expected` files hold them: one `LINE:COL SEVERITY CODE MESSAGE`
/// per line, 1-based, columns in characters, sorted by position (ties keep engine order).
pub fn expected_text(text: &str, diagnostics: &[Diagnostic]) -> String {
    let index = LineIndex::new(text);
    let mut rows: Vec<(u32, u32, String)> = diagnostics
        .iter()
        .map(|d| {
            let at = index.line_col(text, d.span.start, Encoding::Chars);
            let row = format!(
                "{}:{} {} {} {}",
                at.line + 1,
                at.col + 1,
                d.severity.as_str(),
                d.code,
                d.message.replace('\n', " ")
            );
            (at.line, at.col, row)
        })
        .collect();
    rows.sort_by_key(|(line, col, _)| (*line, *col));
    rows.into_iter().map(|(_, _, row)| row + "\n").collect()
}

/// Whether `UPDATE_EXPECT=1` asks the harness to rewrite expected files.
pub fn updating() -> bool {
    std::env::var_os("UPDATE_EXPECT").is_some_and(|v| v == "1")
}

#[cfg(test)]
mod tests {
    use super::*;
    use sprung_engine::diagnostics::Code;
    use sprung_syntax::Span;

    #[test]
    fn expected_rows_are_sorted_by_position_and_one_based() {
        let text = "system s {\n  mass m = 3 lb\n  spring k between m and floor = 1 kN/m\n}\n";
        let lb = text.find("lb").unwrap_or(0);
        let floor = text.find("floor").unwrap_or(0);
        let diagnostics = [
            Diagnostic::new(
                Code::UnknownNode,
                Span::new(floor, floor + 5),
                "no node `floor`",
            ),
            Diagnostic::new(
                Code::AmbiguousPound,
                Span::new(lb, lb + 2),
                "`lb` is\nambiguous",
            ),
        ];
        assert_eq!(
            expected_text(text, &diagnostics),
            "2:14 error SP302 `lb` is ambiguous\n3:26 error SP204 no node `floor`\n"
        );
    }
}
