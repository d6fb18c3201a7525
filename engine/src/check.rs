//! Placeholder: the checker arrives in its own commit.
use sprung_syntax::{Parse, parse};

use crate::diagnostics::Diagnostic;
use crate::model::Model;

/// The result of checking one file's text.
#[derive(Debug)]
pub struct Checked {
    pub parse: Parse,
    pub model: Model,
    /// Parse, name, unit and model diagnostics, in source order.
    pub diagnostics: Vec<Diagnostic>,
}

impl Checked {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.iter().any(Diagnostic::is_error)
    }
}

/// Parses and checks `text`.
pub fn check(text: &str) -> Checked {
    let parse = parse(text);
    Checked {
        parse,
        model: Model::default(),
        diagnostics: Vec::new(),
    }
}
