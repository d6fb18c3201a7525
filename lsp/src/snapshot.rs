//! One analysed version of a document: the text it was computed from and everything the
//! engine found in it. Immutable once built and shared by `Arc`, so every request answers from
//! a consistent view (positions are converted against the snapshot's own text).

use sprung_engine::Checked;
use sprung_engine::analysis::{self, Analysis, Config};
use sprung_engine::drive_report::{self, DriveReport};
use sprung_engine::model::SystemModel;
use sprung_syntax::{Encoding, LineIndex, Span};
use tower_lsp_server::ls_types::{Position, Range};

use crate::document;
use crate::symbols::Index;

#[derive(Debug)]
pub struct Snapshot {
    pub version: i32,
    /// The store's change counter when the text was taken (unique per document).
    pub generation: u64,
    pub text: String,
    pub index: LineIndex,
    pub checked: Checked,
    pub analysis: Analysis,
    /// What each drive does, per system (parallel to the model's systems), for hints and hovers.
    pub drives: Vec<Vec<DriveReport>>,
    pub symbols: Index,
    pub encoding: Encoding,
}

impl Snapshot {
    /// Checks and analyzes a text. Pure and possibly slow: call it off the async runtime.
    pub fn compute(text: String, version: i32, generation: u64, encoding: Encoding) -> Snapshot {
        // The engine does not panic by design; if it ever does, the snapshot still exists (with
        // what could be computed), so requests never wait for a result that will not come.
        let checked =
            std::panic::catch_unwind(|| sprung_engine::check(&text)).unwrap_or_else(|_| Checked {
                parse: sprung_syntax::Parse::default(),
                model: Default::default(),
                diagnostics: Vec::new(),
            });
        let analysis = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            analysis::analyze(&checked, &Config::default())
        }))
        .unwrap_or_default();
        let drives = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            drive_report::reports(&checked.model, &analysis, &drive_report::Limits::default())
        }))
        .unwrap_or_default();
        let symbols = Index::build(&checked.parse.file);
        let index = LineIndex::new(&text);
        Snapshot {
            version,
            generation,
            text,
            index,
            checked,
            analysis,
            drives,
            symbols,
            encoding,
        }
    }

    pub fn offset(&self, pos: Position) -> usize {
        document::offset(&self.text, &self.index, pos, self.encoding)
    }

    pub fn position(&self, offset: usize) -> Position {
        document::position(&self.text, &self.index, offset, self.encoding)
    }

    pub fn range(&self, span: Span) -> Range {
        document::range(&self.text, &self.index, span, self.encoding)
    }

    /// The model system whose name is at `name_span`, with its analysis.
    pub fn model_system(
        &self,
        name_span: Span,
    ) -> Option<(&SystemModel, Option<&analysis::SystemAnalysis>)> {
        let i = self
            .checked
            .model
            .systems
            .iter()
            .position(|s| s.name_span == name_span)?;
        Some((&self.checked.model.systems[i], self.analysis.systems.get(i)))
    }

    /// The byte offset of the end of the line containing `offset` (before any `\r\n`).
    pub fn line_end(&self, offset: usize) -> usize {
        let offset = offset.min(self.text.len());
        let rest = self.text.get(offset..).unwrap_or("");
        let end = offset + rest.find('\n').unwrap_or(rest.len());
        if end > offset && self.text.as_bytes().get(end - 1) == Some(&b'\r') {
            end - 1
        } else {
            end
        }
    }
}

/// A syntax system with its checked model and analysis, when the checker produced one.
pub struct SystemView<'s> {
    pub syntax: &'s sprung_syntax::ast::System,
    pub model: Option<&'s SystemModel>,
    pub analysis: Option<&'s analysis::SystemAnalysis>,
}

impl Snapshot {
    pub fn systems(&self) -> impl Iterator<Item = SystemView<'_>> {
        self.checked
            .parse
            .file
            .items
            .iter()
            .filter_map(|item| match item {
                sprung_syntax::ast::Item::System(sys) => {
                    let (model, analysis) = match self.model_system(sys.name.span) {
                        Some((m, a)) => (Some(m), a),
                        None => (None, None),
                    };
                    Some(SystemView {
                        syntax: sys,
                        model,
                        analysis,
                    })
                }
                _ => None,
            })
    }
}
