//! Engine diagnostics (checker and analysis, failed requirements included) as protocol
//! diagnostics: code, severity, range, message with its help line, labels as related
//! information.

use sprung_engine::Severity;
use tower_lsp_server::ls_types::{
    Diagnostic, DiagnosticRelatedInformation, DiagnosticSeverity, Location, NumberOrString, Uri,
};

use crate::snapshot::Snapshot;

pub fn to_lsp(snap: &Snapshot, uri: &Uri) -> Vec<Diagnostic> {
    snap.analysis
        .all_diagnostics(&snap.checked)
        .into_iter()
        .map(|d| {
            let mut message = d.message.clone();
            if let Some(help) = &d.help {
                message.push_str("\nhelp: ");
                message.push_str(help);
            }
            let related: Vec<DiagnosticRelatedInformation> = d
                .labels
                .iter()
                .map(|l| DiagnosticRelatedInformation {
                    location: Location::new(uri.clone(), snap.range(l.span)),
                    message: l.message.clone(),
                })
                .collect();
            Diagnostic {
                range: snap.range(d.span),
                severity: Some(match d.severity {
                    Severity::Error => DiagnosticSeverity::ERROR,
                    Severity::Warning => DiagnosticSeverity::WARNING,
                    Severity::Info => DiagnosticSeverity::INFORMATION,
                }),
                code: Some(NumberOrString::String(d.code.to_string())),
                source: Some("sprung".to_string()),
                message,
                related_information: (!related.is_empty()).then_some(related),
                ..Diagnostic::default()
            }
        })
        .collect()
}
