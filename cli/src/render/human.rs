//! Terminal rendering with miette: fancy (unicode, colour) on a terminal with `NO_COLOR`
//! unset, otherwise plain ASCII without colour codes. Both show the source snippet, the
//! labels and the help line, under a `[file:line:column]` header.

use std::fmt::{self, Display};
use std::io::{self, IsTerminal, Write};
use std::sync::Arc;

use miette::{GraphicalReportHandler, GraphicalTheme, LabeledSpan, NamedSource, SourceCode};
use sprung_engine::{Diagnostic, Severity};
use sprung_syntax::{LineIndex, Span};

use super::{Position, clamp};

/// How reports are drawn.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Style {
    /// Unicode box drawing and ANSI colours.
    Fancy,
    /// ASCII only, no escape codes: for pipes, files, CI logs and tests.
    Plain,
}

impl Style {
    /// As [`Style::detect`], for reports written to stderr.
    pub fn detect_stderr() -> Style {
        Style::for_stream(io::stderr().is_terminal())
    }

    /// Fancy when stdout (where `check` writes its reports) is a terminal and `NO_COLOR` is
    /// unset or empty (no-color.org).
    pub fn detect() -> Style {
        Style::for_stream(io::stdout().is_terminal())
    }

    fn for_stream(is_terminal: bool) -> Style {
        let no_color = std::env::var_os("NO_COLOR").is_some_and(|v| !v.is_empty());
        if is_terminal && !no_color {
            Style::Fancy
        } else {
            Style::Plain
        }
    }
}

/// Width messages and help lines are wrapped at. Source lines are never wrapped.
const WIDTH: usize = 100;

pub struct HumanRenderer {
    handler: GraphicalReportHandler,
}

impl HumanRenderer {
    pub fn new(style: Style) -> HumanRenderer {
        let theme = match style {
            Style::Fancy => GraphicalTheme::unicode(),
            Style::Plain => GraphicalTheme::none(),
        };
        let handler = GraphicalReportHandler::new_themed(theme)
            .with_width(WIDTH)
            .with_links(false)
            // The header position is ours (columns in characters, as in the JSON output);
            // miette would count bytes.
            .without_primary_span_start();
        HumanRenderer { handler }
    }

    /// Writes one report per diagnostic of one file.
    pub fn render_file(
        &self,
        out: &mut impl Write,
        path: &str,
        text: &str,
        diagnostics: &[Diagnostic],
    ) -> io::Result<()> {
        if diagnostics.is_empty() {
            return Ok(());
        }
        let index = LineIndex::new(text);
        let shared: Arc<str> = Arc::from(text);
        for diagnostic in diagnostics {
            let report = Report::new(diagnostic, path, text, &index, Arc::clone(&shared));
            let mut rendered = String::new();
            // miette pads underlines with a format width, which panics past 65,535 columns;
            // a snippet of a line that long would not help anyone read it either.
            if report.touches_long_line(text)
                || self.handler.render_report(&mut rendered, &report).is_err()
            {
                // miette could not draw the snippet; the message and position still matter.
                rendered = report.one_line();
            }
            writeln!(out, "{}", rendered.trim_end())?;
            writeln!(out)?;
        }
        Ok(())
    }
}

/// Lines longer than this (in bytes) get the one-line report instead of a snippet.
const MAX_SNIPPET_LINE: usize = 2_000;

/// The adapter miette renders: one engine diagnostic with its file as a named source. The
/// source is named `path:line:column` so the snippet header carries the position.
#[derive(Debug)]
struct Report<'a> {
    diagnostic: &'a Diagnostic,
    location: String,
    primary: Span,
    labels: Vec<(Span, &'a str)>,
    source: NamedSource<Arc<str>>,
}

impl<'a> Report<'a> {
    fn new(
        diagnostic: &'a Diagnostic,
        path: &str,
        text: &str,
        index: &LineIndex,
        shared: Arc<str>,
    ) -> Report<'a> {
        let primary = clamp(text, diagnostic.span);
        let at = Position::of(text, index, primary.start);
        let location = format!("{path}:{}:{}", at.line, at.column);
        let labels = diagnostic
            .labels
            .iter()
            .map(|label| (clamp(text, label.span), label.message.as_str()))
            .collect();
        Report {
            diagnostic,
            source: NamedSource::new(&location, shared),
            location,
            primary,
            labels,
        }
    }

    /// Whether a span of the report lies on a line longer than a snippet can show.
    fn touches_long_line(&self, text: &str) -> bool {
        std::iter::once(self.primary)
            .chain(self.labels.iter().map(|(s, _)| *s))
            .any(|span| {
                let start = text[..span.start].rfind('\n').map_or(0, |i| i + 1);
                let end = text[span.end..]
                    .find('\n')
                    .map_or(text.len(), |i| span.end + i);
                text[start..end]
                    .split('\n')
                    .any(|line| line.len() > MAX_SNIPPET_LINE)
            })
    }

    /// The fallback when no snippet can be drawn.
    fn one_line(&self) -> String {
        let d = self.diagnostic;
        let mut line = format!(
            "{}[{}]: {} at {}",
            d.severity.as_str(),
            d.code,
            d.message,
            self.location
        );
        if let Some(help) = &d.help {
            line.push_str(&format!("\n  help: {help}"));
        }
        line
    }
}

impl Display for Report<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.diagnostic.message)
    }
}

impl std::error::Error for Report<'_> {}

impl miette::Diagnostic for Report<'_> {
    fn code<'b>(&'b self) -> Option<Box<dyn Display + 'b>> {
        Some(Box::new(self.diagnostic.code))
    }

    fn severity(&self) -> Option<miette::Severity> {
        Some(match self.diagnostic.severity {
            Severity::Error => miette::Severity::Error,
            Severity::Warning => miette::Severity::Warning,
            Severity::Info => miette::Severity::Advice,
        })
    }

    fn help<'b>(&'b self) -> Option<Box<dyn Display + 'b>> {
        self.diagnostic
            .help
            .as_ref()
            .map(|h| Box::new(h) as Box<dyn Display + 'b>)
    }

    fn source_code(&self) -> Option<&dyn SourceCode> {
        Some(&self.source)
    }

    fn labels(&self) -> Option<Box<dyn Iterator<Item = LabeledSpan> + '_>> {
        let primary = LabeledSpan::new_primary_with_span(None, self.primary.range());
        let secondary = self.labels.iter().map(|(span, message)| {
            LabeledSpan::new_with_span(Some((*message).to_owned()), span.range())
        });
        Some(Box::new(std::iter::once(primary).chain(secondary)))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use sprung_engine::diagnostics::Code;

    fn render(style: Style, text: &str, diagnostic: Diagnostic) -> String {
        let mut out = Vec::new();
        let result =
            HumanRenderer::new(style).render_file(&mut out, "rack.sprung", text, &[diagnostic]);
        assert!(result.is_ok());
        String::from_utf8_lossy(&out).into_owned()
    }

    #[test]
    fn plain_report_has_position_snippet_label_and_help() {
        let text = "system rack {\n  mass shelf = 12 kgs\n}\n";
        let start = text.find("kgs").unwrap_or(0);
        let first = text.find("system").unwrap_or(0);
        let diagnostic = Diagnostic::new(
            Code::UnknownUnit,
            Span::new(start, start + 3),
            "unknown unit `kgs`",
        )
        .with_help("did you mean `kg`?")
        .with_label(Span::new(first, first + 6), "in this system");
        let out = render(Style::Plain, text, diagnostic);
        assert!(out.contains("[rack.sprung:2:19]"), "{out}");
        assert!(out.contains("SP301"), "{out}");
        assert!(out.contains("unknown unit `kgs`"), "{out}");
        assert!(out.contains("mass shelf = 12 kgs"), "{out}");
        assert!(out.contains("in this system"), "{out}");
        assert!(out.contains("did you mean `kg`?"), "{out}");
        assert!(out.is_ascii(), "plain output must be ASCII: {out}");
        assert!(
            !out.contains('\u{1b}'),
            "plain output has escape codes: {out}"
        );
    }

    #[test]
    fn an_error_far_along_a_very_long_line_gets_the_one_line_report() {
        let mut text = "let a = 1 ".repeat(10_000);
        let start = text.len();
        text.push_str("zz\n");
        let diagnostic = Diagnostic::new(Code::UnknownUnit, Span::new(start, start + 2), "far");
        for style in [Style::Plain, Style::Fancy] {
            let out = render(style, &text, diagnostic.clone());
            assert!(out.contains("far at rack.sprung:1:100001"), "{out}");
        }
    }

    #[test]
    fn columns_count_characters_and_bad_spans_do_not_panic() {
        let text = "let µ_gain = 3 zz\n";
        let start = text.find("zz").unwrap_or(0);
        let diagnostic = Diagnostic::new(Code::UnknownUnit, Span::new(start, start + 2), "x");
        assert!(render(Style::Plain, text, diagnostic).contains("[rack.sprung:1:16]"));
        let wild = Diagnostic::new(Code::Syntax, Span::new(10_000, 20_000), "past the end");
        assert!(render(Style::Fancy, text, wild).contains("past the end"));
        let empty = Diagnostic::new(Code::EmptyFile, Span::at(0), "nothing to check");
        assert!(render(Style::Plain, "", empty).contains("nothing to check"));
    }
}
