//! `sprung modes FILE [--system NAME] [--format table|json|markdown]`.

use std::io::{self, BufWriter, Write};

use sprung_engine::analysis::{Config, analyze};

use crate::args::{ModesArgs, ModesFormat};
use crate::files;
use crate::render::human::{HumanRenderer, Style};
use crate::render::modes::{ModesJson, markdown, table};

use super::{Status, report_error};

pub fn run(args: &ModesArgs) -> io::Result<Status> {
    let shown = args.file.display().to_string();
    let text = match files::read_model(&args.file) {
        Ok(text) => text,
        Err(err) => {
            report_error(&format!("`{shown}`: {err}"));
            return Ok(Status::Usage);
        }
    };
    let checked = sprung_engine::check(&text);
    if let Some(name) = &args.system
        && !checked.model.systems.iter().any(|s| &s.name == name)
    {
        let known: Vec<&str> = checked
            .model
            .systems
            .iter()
            .map(|s| s.name.as_str())
            .collect();
        report_error(&format!(
            "`{shown}` has no system named `{name}`; its systems are: {}",
            if known.is_empty() {
                "none".to_string()
            } else {
                known.join(", ")
            }
        ));
        return Ok(Status::Usage);
    }
    let analysis = analyze(&checked, &Config::default());
    let diagnostics = analysis.all_diagnostics(&checked);
    let errors: Vec<_> = diagnostics
        .iter()
        .filter(|d| d.is_error())
        .cloned()
        .collect();
    // Model errors go to stderr so that stdout stays the table or the JSON.
    if !errors.is_empty() && args.format != ModesFormat::Json {
        let renderer = HumanRenderer::new(Style::detect_stderr());
        renderer.render_file(&mut io::stderr().lock(), &shown, &text, &errors)?;
    }
    let report = ModesJson::new(&shown, &text, &checked, &analysis, args.system.as_deref());
    let mut out = BufWriter::new(io::stdout().lock());
    match args.format {
        ModesFormat::Json => {
            serde_json::to_writer_pretty(&mut out, &report).map_err(io::Error::other)?;
            writeln!(out)?;
        }
        ModesFormat::Table => write!(out, "{}", table(&report))?,
        ModesFormat::Markdown => write!(out, "{}", markdown(&report))?,
    }
    out.flush()?;
    // Model errors (not failed requirements: `check` judges those) make the result partial.
    let model_errors = checked.diagnostics.iter().any(|d| d.is_error())
        || analysis
            .diagnostics
            .iter()
            .any(|d| d.is_error() && d.code != "SP501");
    Ok(if model_errors {
        Status::Failed
    } else {
        Status::Passed
    })
}
