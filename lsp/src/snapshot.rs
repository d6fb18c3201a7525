//! One version of a document: the text, the checker's result and (once it is done) the
//! engine's analysis. Immutable once built and shared by `Arc`, so every request answers from
//! a consistent view (positions are converted against the snapshot's own text).
//!
//! Two stages, cheapest first: a [`Base`] (parse, names, units: milliseconds even for large
//! models) and then the analysis (eigenvalues, responses, tolerance corners: possibly much
//! slower). The server publishes the checker's diagnostics from the first stage, so a unit
//! error shows within a keystroke, and features that need no physics (completion, navigation,
//! tokens, formatting) answer from it without waiting for the second.

use std::ops::Deref;
use std::sync::Arc;

use sprung_engine::Checked;
use sprung_engine::analysis::{self, Analysis, Config};
use sprung_engine::drive_report::{self, DriveReport};
use sprung_engine::model::SystemModel;
use sprung_syntax::{Encoding, LineIndex, Span};
use tower_lsp_server::ls_types::{Position, Range};

use crate::document;
use crate::symbols::Index;

/// The first stage: the text and everything the checker found in it.
#[derive(Debug)]
pub struct Base {
    pub version: i32,
    /// The store's change counter when the text was taken (unique per document).
    pub generation: u64,
    pub text: String,
    pub index: LineIndex,
    pub checked: Checked,
    pub symbols: Index,
    pub encoding: Encoding,
}

/// A [`Base`] with its analysis, or with an empty analysis while that is still running
/// (`analyzed` false). Dereferences to the base.
#[derive(Debug)]
pub struct Snapshot {
    base: Arc<Base>,
    pub analysis: Analysis,
    /// What each drive does, per system (parallel to the model's systems), for hints and
    /// hovers; empty in the first stage.
    pub drives: Vec<Vec<DriveReport>>,
    /// Whether `analysis` is the analysis of this text (false in the first stage).
    pub analyzed: bool,
}

impl Deref for Snapshot {
    type Target = Base;
    fn deref(&self) -> &Base {
        &self.base
    }
}

impl Base {
    /// Parses and checks a text. Pure and fast: call it off the async runtime all the same.
    pub fn compute(text: String, version: i32, generation: u64, encoding: Encoding) -> Base {
        // The engine does not panic by design; if it ever does, the snapshot still exists (with
        // what could be computed), so requests never wait for a result that will not come.
        let checked =
            std::panic::catch_unwind(|| sprung_engine::check(&text)).unwrap_or_else(|_| Checked {
                parse: sprung_syntax::Parse::default(),
                model: Default::default(),
                diagnostics: Vec::new(),
            });
        let symbols = Index::build(&checked.parse.file);
        let index = LineIndex::new(&text);
        Base {
            version,
            generation,
            text,
            index,
            checked,
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

impl Snapshot {
    /// Checks and analyzes a text in one go (for tests and benchmarks; the server runs the two
    /// stages separately).
    pub fn compute(text: String, version: i32, generation: u64, encoding: Encoding) -> Snapshot {
        Snapshot::analyze(Arc::new(Base::compute(text, version, generation, encoding)))
    }

    /// The first stage alone, with an empty analysis.
    pub fn checked_only(base: Arc<Base>) -> Snapshot {
        Snapshot {
            base,
            analysis: Analysis::default(),
            drives: Vec::new(),
            analyzed: false,
        }
    }

    /// The second stage: analyzes a checked base. Pure and possibly slow.
    pub fn analyze(base: Arc<Base>) -> Snapshot {
        let analysis = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            analysis::analyze(&base.checked, &Config::default())
        }))
        .unwrap_or_default();
        let drives = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            drive_report::reports(
                &base.checked.model,
                &analysis,
                &drive_report::Limits::default(),
            )
        }))
        .unwrap_or_default();
        Snapshot {
            base,
            analysis,
            drives,
            analyzed: true,
        }
    }

    /// The base this snapshot was built on (shared with the other stage).
    pub fn base(&self) -> &Arc<Base> {
        &self.base
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
