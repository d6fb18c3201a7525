//! The machine-readable output of `sprung check --format json` (language.md §7). The keys
//! here are a stable contract: more may be added, none renamed. Lines and columns are 1-based;
//! columns count Unicode characters. `end_line`/`end_column` give the position just past the
//! end of the span.

use std::collections::BTreeMap;

use serde::Serialize;
use sprung_engine::Diagnostic;
use sprung_engine::analysis::SystemAnalysis;
use sprung_engine::model::SystemModel;
use sprung_engine::requirements::Status;
use sprung_syntax::LineIndex;
use sprung_syntax::ast::Subject;

use super::{Position, clamp};

#[derive(Debug, Serialize)]
pub struct CheckJson {
    /// No error in any file (failed requirements are errors) and every file was read.
    pub passed: bool,
    pub files: Vec<FileJson>,
    /// The caution every report carries (an added key; the contract allows more keys).
    pub caution: &'static str,
}

#[derive(Debug, Serialize)]
pub struct FileJson {
    pub file: String,
    pub diagnostics: Vec<DiagnosticJson>,
    pub systems: Vec<SystemJson>,
}

#[derive(Debug, Serialize)]
pub struct DiagnosticJson {
    pub code: &'static str,
    /// `error`, `warning` or `info`.
    pub severity: &'static str,
    pub message: String,
    pub line: u32,
    pub column: u32,
    pub end_line: u32,
    pub end_column: u32,
    pub help: Option<String>,
}

#[derive(Debug, Serialize)]
pub struct SystemJson {
    pub name: String,
    pub requirements: Vec<RequirementJson>,
}

/// One evaluated requirement. `value` and `limit` are plain SI numbers (hertz for
/// frequencies, fractions for ratios); `worst_corner` is `null` at nominal, otherwise it maps
/// each toleranced value's name to the end it was taken at (`"low"` or `"high"`).
#[derive(Debug, Serialize)]
pub struct RequirementJson {
    pub line: u32,
    pub text: String,
    pub passed: bool,
    pub value: Option<f64>,
    pub limit: Option<f64>,
    pub worst_corner: Option<BTreeMap<String, String>>,
    /// `passed`, `failed` or `not_evaluated` (an added key: `passed` alone cannot tell a
    /// requirement that failed from one this version does not evaluate yet).
    pub status: &'static str,
    /// The verdict in words, as the diagnostics show it.
    pub message: String,
}

impl FileJson {
    pub fn new(
        path: &str,
        text: &str,
        diagnostics: &[Diagnostic],
        systems: &[SystemModel],
        analyses: &[SystemAnalysis],
    ) -> Self {
        let index = LineIndex::new(text);
        FileJson {
            file: path.to_owned(),
            diagnostics: diagnostics
                .iter()
                .map(|d| DiagnosticJson::new(text, &index, d))
                .collect(),
            systems: systems
                .iter()
                .zip(analyses)
                .map(|(s, a)| SystemJson {
                    name: s.name.clone(),
                    requirements: requirements_of(text, &index, s, a),
                })
                .collect(),
        }
    }
}

impl DiagnosticJson {
    fn new(text: &str, index: &LineIndex, d: &Diagnostic) -> Self {
        let span = clamp(text, d.span);
        let start = Position::of(text, index, span.start);
        let end = Position::of(text, index, span.end);
        DiagnosticJson {
            code: d.code,
            severity: d.severity.as_str(),
            message: d.message.clone(),
            line: start.line,
            column: start.column,
            end_line: end.line,
            end_column: end.column,
            help: d.help.clone(),
        }
    }
}

/// One entry per requirement. Values and limits are SI, but frequencies are in hertz
/// (language.md §7); the engine holds them in rad/s.
fn requirements_of(
    text: &str,
    index: &LineIndex,
    system: &SystemModel,
    analysis: &SystemAnalysis,
) -> Vec<RequirementJson> {
    system
        .requirements
        .iter()
        .zip(&analysis.verdicts)
        .map(|(req, v)| {
            let hertz = matches!(req.subject, Subject::Frequency { .. });
            let show = |x: f64| if hertz { x / std::f64::consts::TAU } else { x };
            RequirementJson {
                line: Position::of(text, index, req.span.start).line,
                text: req.text.clone(),
                passed: v.passed(),
                value: v.value.map(show),
                limit: v.limit.map(show),
                worst_corner: v.worst_corner.as_ref().map(|c| {
                    c.ends
                        .iter()
                        .map(|e| {
                            (
                                e.name.clone(),
                                if e.high { "high" } else { "low" }.to_owned(),
                            )
                        })
                        .collect()
                }),
                status: match v.status {
                    Status::Passed => "passed",
                    Status::Failed => "failed",
                    Status::NotEvaluated(_) => "not_evaluated",
                },
                message: v.message.clone(),
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use sprung_engine::diagnostics::Code;
    use sprung_syntax::Span;

    #[test]
    fn diagnostic_keys_and_positions() {
        let text = "system s {\n  mass m = 3 lb\n}\n";
        let at = text.find("lb").unwrap_or(0);
        let d = Diagnostic::new(
            Code::AmbiguousPound,
            Span::new(at, at + 2),
            "`lb` is ambiguous",
        )
        .with_help("write `lbm` or `lbf`");
        let file = FileJson::new("s.sprung", text, &[d], &[], &[]);
        let value = serde_json::to_value(&file).unwrap_or_default();
        let d = &value["diagnostics"][0];
        assert_eq!(d["code"], "SP302");
        assert_eq!(d["severity"], "error");
        assert_eq!(d["line"], 2);
        assert_eq!(d["column"], 14);
        assert_eq!(d["end_line"], 2);
        assert_eq!(d["end_column"], 16);
        assert_eq!(d["help"], "write `lbm` or `lbf`");
        assert_eq!(value["file"], "s.sprung");
        assert!(value["systems"].as_array().is_some_and(Vec::is_empty));
    }

    #[test]
    fn requirement_keys_follow_the_contract() {
        let nominal = RequirementJson {
            line: 12,
            text: "damping >= 0.02".to_owned(),
            passed: true,
            value: Some(0.061),
            limit: Some(0.02),
            worst_corner: None,
            status: "passed",
            message: String::new(),
        };
        let value = serde_json::to_value(&nominal).unwrap_or_default();
        let mut keys: Vec<&str> = value
            .as_object()
            .map(|o| o.keys().map(String::as_str).collect())
            .unwrap_or_default();
        keys.sort_unstable();
        assert_eq!(
            keys,
            [
                "limit",
                "line",
                "message",
                "passed",
                "status",
                "text",
                "value",
                "worst_corner"
            ]
        );
        assert!(value["worst_corner"].is_null());
    }
}
