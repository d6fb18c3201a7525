//! Quick fixes read from the engine's diagnostics: the did-you-mean of an unknown name, unit or
//! function, and `lb` → `lbm` / `lbf`. The engine gives its suggestion as help text
//! (``did you mean `kN`?``), so this module reads the backticked words out of it; it offers a
//! fix only when the diagnostic's span is exactly one word, so an edit can never spill over.

use std::collections::HashMap;

use sprung_engine::Diagnostic;
use tower_lsp_server::ls_types::{
    CodeAction, CodeActionKind, CodeActionOrCommand, Range, TextEdit, Uri, WorkspaceEdit,
};

use crate::diagnostics;
use crate::snapshot::Snapshot;

/// The replacements a diagnostic's help offers.
fn suggestions(d: &Diagnostic) -> Vec<String> {
    let Some(help) = &d.help else {
        return Vec::new();
    };
    let quoted = |s: &str| -> Vec<String> {
        s.split('`')
            .enumerate()
            .filter(|(i, _)| i % 2 == 1)
            .map(|(_, w)| w.to_string())
            .collect()
    };
    if help.starts_with("did you mean `") {
        quoted(help).into_iter().take(1).collect()
    } else if d.code == sprung_engine::Code::AmbiguousPound.info().code {
        quoted(help)
    } else {
        Vec::new()
    }
}

fn is_word(s: &str) -> bool {
    !s.is_empty() && s.chars().all(|c| c.is_alphanumeric() || c == '_')
}

pub fn code_actions(snap: &Snapshot, uri: &Uri, range: Range) -> Vec<CodeActionOrCommand> {
    let (lo, hi) = (snap.offset(range.start), snap.offset(range.end));
    let engine = snap.analysis.all_diagnostics(&snap.checked);
    let protocol = diagnostics::to_lsp(snap, uri);
    let mut out = Vec::new();
    for (d, lsp) in engine.iter().zip(protocol) {
        if d.span.end < lo || d.span.start > hi {
            continue;
        }
        let Some(written) = snap.text.get(d.span.range()) else {
            continue;
        };
        if !is_word(written) {
            continue;
        }
        let options = suggestions(d);
        let single = options.len() == 1;
        for s in options
            .into_iter()
            .filter(|s| s != written && is_replacement(s))
        {
            let edit = TextEdit::new(snap.range(d.span), s.clone());
            out.push(CodeActionOrCommand::CodeAction(CodeAction {
                title: format!("Replace `{written}` with `{s}`"),
                kind: Some(CodeActionKind::QUICKFIX),
                diagnostics: Some(vec![lsp.clone()]),
                edit: Some(WorkspaceEdit {
                    changes: Some(HashMap::from([(uri.clone(), vec![edit])])),
                    ..WorkspaceEdit::default()
                }),
                is_preferred: Some(single),
                ..CodeAction::default()
            }));
        }
    }
    out
}

/// A suggestion is inserted as written: a name, an atom or a short unit product (`N*s`).
fn is_replacement(s: &str) -> bool {
    !s.is_empty()
        && s.chars()
            .all(|c| c.is_alphanumeric() || "_*/^-".contains(c))
}
