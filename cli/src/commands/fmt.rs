//! `sprung fmt [--check] PATHS...`: the formatter of `sprung_syntax::format` over files.
//!
//! Files are rewritten in place only when their text changes; with `--check` nothing is
//! written and each file that would change is listed with a unified diff. A file with syntax
//! errors is reported the way `check` reports them (to stderr) and left untouched. `-` reads
//! standard input and writes the formatted text to standard output.

use std::fs;
use std::io::{self, BufWriter, Read, Write};
use std::path::Path;
use std::time::Duration;

use sprung_engine::{Code, Diagnostic};
use sprung_syntax::{FormatConfig, FormatError, format};

use crate::args::FmtArgs;
use crate::files::{self, MAX_FILE_BYTES};
use crate::render::human::{HumanRenderer, Style};

use super::{Status, report_error};

/// Lines of context around each change in a `--check` diff.
const DIFF_CONTEXT: usize = 2;

/// How long a `--check` diff may search for the smallest set of changed lines.
const DIFF_TIMEOUT: Duration = Duration::from_millis(500);

#[derive(Default)]
struct Counts {
    changed: usize,
    unchanged: usize,
    refused: usize,
    unreadable: usize,
}

pub fn run(args: &FmtArgs) -> io::Result<Status> {
    if args.paths.iter().any(|p| p.as_os_str() == "-") {
        if args.paths.len() > 1 {
            report_error("`-` (standard input) cannot be mixed with other paths");
            return Ok(Status::Usage);
        }
        return stdin(args.check);
    }
    let paths = match files::expand(&args.paths) {
        Ok(paths) => paths,
        Err(err) => {
            report_error(&err.to_string());
            return Ok(Status::Usage);
        }
    };

    let stdout = io::stdout();
    let mut out = BufWriter::new(stdout.lock());
    let renderer = HumanRenderer::new(Style::detect_stderr());
    let mut counts = Counts::default();
    for path in &paths {
        let shown = path.display().to_string();
        let text = match files::read_model(path) {
            Ok(text) => text,
            Err(err) => {
                report_error(&format!("`{shown}`: {err}"));
                counts.unreadable += 1;
                continue;
            }
        };
        let formatted = match format(&text, &FormatConfig::default()) {
            Ok(formatted) => formatted,
            Err(err) => {
                out.flush()?;
                refuse(&renderer, &shown, &text, &err)?;
                counts.refused += 1;
                continue;
            }
        };
        if formatted == text {
            counts.unchanged += 1;
            continue;
        }
        if args.check {
            writeln!(out, "would format {shown}")?;
            write_diff(&mut out, &shown, &text, &formatted)?;
            counts.changed += 1;
        } else {
            match write_in_place(path, &formatted) {
                Ok(()) => {
                    writeln!(out, "formatted {shown}")?;
                    counts.changed += 1;
                }
                Err(err) => {
                    report_error(&format!("`{shown}`: cannot write it: {err}"));
                    counts.unreadable += 1;
                }
            }
        }
    }
    writeln!(out, "{}", summary(&counts, args.check))?;
    out.flush()?;

    Ok(if counts.unreadable > 0 {
        Status::Usage
    } else if counts.refused > 0 || (args.check && counts.changed > 0) {
        Status::Failed
    } else {
        Status::Passed
    })
}

/// `2 files formatted, 3 already formatted; 1 not formatted (syntax errors)`.
fn summary(c: &Counts, check: bool) -> String {
    let files = |n: usize| if n == 1 { "file" } else { "files" };
    let verb = if check {
        "would be formatted"
    } else {
        "formatted"
    };
    let mut line = format!(
        "{} {} {verb}, {} already formatted",
        c.changed,
        files(c.changed),
        c.unchanged
    );
    if c.refused > 0 {
        line.push_str(&format!(
            "; {} {} not formatted (syntax errors)",
            c.refused,
            files(c.refused)
        ));
    }
    if c.unreadable > 0 {
        line.push_str(&format!(
            "; {} {} not read or written",
            c.unreadable,
            files(c.unreadable)
        ));
    }
    line
}

/// Reports why a file was not formatted: its syntax errors as `check` shows them.
fn refuse(renderer: &HumanRenderer, shown: &str, text: &str, err: &FormatError) -> io::Result<()> {
    let diagnostics: Vec<Diagnostic> = match err {
        // The engine turns parse errors into its catalogued diagnostics (codes and help).
        FormatError::Syntax(_) => sprung_engine::check(text)
            .diagnostics
            .into_iter()
            .filter(|d| {
                [Code::Lex, Code::Syntax, Code::UnclosedSystem, Code::TooDeep]
                    .iter()
                    .any(|c| c.info().code == d.code)
            })
            .collect(),
        FormatError::Unsafe { .. } => Vec::new(),
    };
    let stderr = io::stderr();
    let mut err_out = stderr.lock();
    if diagnostics.is_empty() {
        report_error(&format!("`{shown}`: {err}; left as it is"));
        return Ok(());
    }
    renderer.render_file(&mut err_out, shown, text, &diagnostics)?;
    writeln!(
        err_out,
        "error: `{shown}` was not formatted: fix its syntax errors first"
    )?;
    Ok(())
}

fn write_diff(out: &mut impl Write, shown: &str, old: &str, new: &str) -> io::Result<()> {
    // A deadline keeps a huge file from a long exact search: past it the diff is coarser
    // (larger hunks), never wrong.
    let diff = similar::TextDiff::configure()
        .timeout(DIFF_TIMEOUT)
        .diff_lines(old, new);
    let unified = diff
        .unified_diff()
        .context_radius(DIFF_CONTEXT)
        .header(shown, &format!("{shown} (formatted)"))
        .to_string();
    out.write_all(unified.as_bytes())?;
    if !unified.ends_with('\n') {
        writeln!(out)?;
    }
    Ok(())
}

/// Writes the new text through the path (a symbolic link stays a link to the same file).
fn write_in_place(path: &Path, text: &str) -> io::Result<()> {
    fs::write(path, text)
}

/// `sprung fmt -`: standard input to standard output (`--check`: the diff, and status 1 when
/// the text would change).
fn stdin(check: bool) -> io::Result<Status> {
    let mut bytes = Vec::new();
    if let Err(err) = io::stdin()
        .lock()
        .take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
    {
        report_error(&format!("cannot read standard input: {err}"));
        return Ok(Status::Usage);
    }
    if bytes.len() as u64 > MAX_FILE_BYTES {
        report_error(&format!(
            "standard input is over the limit of 8 MiB ({MAX_FILE_BYTES} bytes) [SP106]"
        ));
        return Ok(Status::Usage);
    }
    let Ok(text) = String::from_utf8(bytes) else {
        report_error("standard input is not valid UTF-8 text");
        return Ok(Status::Usage);
    };
    let shown = "<stdin>";
    let formatted = match format(&text, &FormatConfig::default()) {
        Ok(formatted) => formatted,
        Err(err) => {
            refuse(
                &HumanRenderer::new(Style::detect_stderr()),
                shown,
                &text,
                &err,
            )?;
            return Ok(Status::Failed);
        }
    };
    let stdout = io::stdout();
    let mut out = stdout.lock();
    if check {
        if formatted == text {
            return Ok(Status::Passed);
        }
        write_diff(&mut out, shown, &text, &formatted)?;
        out.flush()?;
        return Ok(Status::Failed);
    }
    out.write_all(formatted.as_bytes())?;
    out.flush()?;
    Ok(Status::Passed)
}
