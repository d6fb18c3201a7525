//! `sprung response` (a frequency sweep) and `sprung simulate` (a time history), as CSV or
//! JSON. The numbers come from the engine's `sweep` module.

use std::io::{self, BufWriter, Write};
use std::path::Path;

use sprung_engine::Checked;
use sprung_engine::model::SystemModel;
use sprung_engine::sweep;

use crate::args::{DataFormat, ResponseArgs, SimulateArgs};
use crate::files;
use crate::render::CAUTION;

use super::{Status, report_error};

/// Reads and checks the file, and finds the system and the node; reports and returns the
/// status to exit with when something is missing.
fn load(file: &Path, system: Option<&str>) -> Result<(String, Checked), Status> {
    let shown = file.display().to_string();
    let text = files::read_model(file).map_err(|err| {
        report_error(&format!("`{shown}`: {err}"));
        Status::Usage
    })?;
    let checked = sprung_engine::check(&text);
    if checked.has_errors() {
        report_error(&format!(
            "`{shown}` has errors; run `sprung check {shown}` to see them"
        ));
        return Err(Status::Failed);
    }
    if let Some(name) = system
        && !checked.model.systems.iter().any(|s| s.name == name)
    {
        report_error(&format!("`{shown}` has no system named `{name}`"));
        return Err(Status::Usage);
    }
    if system.is_none() && checked.model.systems.len() != 1 {
        report_error(&format!(
            "`{shown}` has {} systems; name one with --system",
            checked.model.systems.len()
        ));
        return Err(Status::Usage);
    }
    Ok((shown, checked))
}

fn pick<'c>(checked: &'c Checked, system: Option<&str>) -> &'c SystemModel {
    let systems = &checked.model.systems;
    system
        .and_then(|n| systems.iter().find(|s| s.name == n))
        .unwrap_or(&systems[0])
}

fn node(sys: &SystemModel, at: &str) -> Result<usize, Status> {
    sys.dofs.iter().position(|d| d.name == at).ok_or_else(|| {
        let names: Vec<&str> = sys.dofs.iter().map(|d| d.name.as_str()).collect();
        report_error(&format!(
            "system `{}` has no mass or inertia `{at}`; it has {}",
            sys.name,
            names.join(", ")
        ));
        Status::Usage
    })
}

pub fn run_response(args: &ResponseArgs) -> io::Result<Status> {
    let (shown, checked) = match load(&args.file, args.system.as_deref()) {
        Ok(x) => x,
        Err(status) => return Ok(status),
    };
    let sys = pick(&checked, args.system.as_deref());
    let dof = match node(sys, &args.at) {
        Ok(d) => d,
        Err(status) => return Ok(status),
    };
    let drive = match &args.drive {
        None => None,
        Some(name) => match sys.drives.iter().position(|d| &d.name == name) {
            Some(i) => Some(i),
            None => {
                report_error(&format!("system `{}` has no drive `{name}`", sys.name));
                return Ok(Status::Usage);
            }
        },
    };
    let range = args.from.zip(args.to);
    let result = sweep::frequency_sweep(
        &checked.model,
        sys,
        drive,
        dof,
        range,
        args.points,
        args.transmitted,
    );
    let sweep = match result {
        Ok(s) => s,
        Err(why) => {
            report_error(&format!("`{shown}`: {why}"));
            return Ok(Status::Failed);
        }
    };
    let mut out = BufWriter::new(io::stdout().lock());
    let quantity = if args.transmitted {
        "transmissibility"
    } else {
        "amplitude"
    };
    match args.format {
        DataFormat::Csv => {
            writeln!(out, "# {CAUTION}")?;
            writeln!(out, "frequency_hz,{quantity},phase_deg")?;
            for p in &sweep.points {
                writeln!(out, "{},{},{}", p.frequency_hz, p.magnitude, p.phase_deg)?;
            }
        }
        DataFormat::Json => {
            let report = serde_json::json!({
                "file": shown,
                "system": sys.name,
                "at": args.at,
                "quantity": quantity,
                "sweep": sweep,
                "caution": CAUTION,
            });
            serde_json::to_writer_pretty(&mut out, &report).map_err(io::Error::other)?;
            writeln!(out)?;
        }
    }
    out.flush()?;
    Ok(Status::Passed)
}

pub fn run_simulate(args: &SimulateArgs) -> io::Result<Status> {
    let (shown, checked) = match load(&args.file, args.system.as_deref()) {
        Ok(x) => x,
        Err(status) => return Ok(status),
    };
    let sys = pick(&checked, args.system.as_deref());
    let dof = match node(sys, &args.at) {
        Ok(d) => d,
        Err(status) => return Ok(status),
    };
    let history = match sweep::time_history(&checked.model, sys, dof, args.duration) {
        Ok(h) => h,
        Err(why) => {
            report_error(&format!("`{shown}`: {why}"));
            return Ok(Status::Failed);
        }
    };
    let mut out = BufWriter::new(io::stdout().lock());
    match args.format {
        DataFormat::Csv => {
            writeln!(out, "# {CAUTION}")?;
            writeln!(out, "time_s,displacement")?;
            for p in &history {
                writeln!(out, "{},{}", p.time_s, p.displacement)?;
            }
        }
        DataFormat::Json => {
            let report = serde_json::json!({
                "file": shown,
                "system": sys.name,
                "at": args.at,
                "history": history,
                "caution": CAUTION,
            });
            serde_json::to_writer_pretty(&mut out, &report).map_err(io::Error::other)?;
            writeln!(out)?;
        }
    }
    out.flush()?;
    Ok(Status::Passed)
}
