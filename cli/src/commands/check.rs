//! `sprung check PATHS... [--format human|json]`.

use std::io::{self, BufWriter, Write};

use crate::args::{CheckArgs, Format};
use crate::files;
use crate::render::CAUTION;
use crate::render::Tally;
use crate::render::human::{HumanRenderer, Style};
use crate::render::json::{CheckJson, FileJson};
use sprung_engine::analysis::{Config, analyze};

use super::{Status, report_error};

pub fn run(args: &CheckArgs) -> io::Result<Status> {
    let paths = match files::expand(&args.paths) {
        Ok(paths) => paths,
        Err(err) => {
            report_error(&err.to_string());
            return Ok(Status::Usage);
        }
    };

    let stdout = io::stdout();
    let mut out = BufWriter::new(stdout.lock());
    let human = (args.format == Format::Human).then(|| HumanRenderer::new(Style::detect()));
    let mut json_files = Vec::new();
    let mut tally = Tally::default();

    for path in &paths {
        let shown = path.display().to_string();
        let text = match files::read_model(path) {
            Ok(text) => text,
            Err(err) => {
                report_error(&format!("`{shown}`: {err}"));
                tally.unreadable += 1;
                continue;
            }
        };
        let checked = sprung_engine::check(&text);
        let analysis = analyze(&checked, &Config::default());
        let diagnostics = analysis.all_diagnostics(&checked);
        tally.add(&diagnostics);
        match &human {
            Some(renderer) => renderer.render_file(&mut out, &shown, &text, &diagnostics)?,
            None => json_files.push(FileJson::new(
                &shown,
                &text,
                &diagnostics,
                &checked.model.systems,
                &analysis.systems,
            )),
        }
    }

    let status = if tally.unreadable > 0 {
        Status::Usage
    } else if tally.errors > 0 {
        Status::Failed
    } else {
        Status::Passed
    };

    if human.is_some() {
        writeln!(out, "{}", tally.summary())?;
        writeln!(out, "{CAUTION}")?;
    } else {
        let report = CheckJson {
            passed: status == Status::Passed,
            files: json_files,
            caution: CAUTION,
        };
        serde_json::to_writer_pretty(&mut out, &report).map_err(io::Error::other)?;
        writeln!(out)?;
    }
    out.flush()?;
    Ok(status)
}
