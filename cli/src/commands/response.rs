//! `sprung response` (a frequency sweep) and `sprung simulate` (a time history), as CSV,
//! JSON or an SVG plot, to stdout or `--output FILE`. The numbers come from the engine's
//! `sweep` module; a long run shows a progress bar on stderr when stderr is a terminal.

use std::fs::File;
use std::io::{self, BufWriter, IsTerminal, Write};
use std::path::Path;
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use sprung_engine::Checked;
use sprung_engine::model::SystemModel;
use sprung_engine::sweep::{self, SweepRequest, TimeRequest};

use crate::args::{DataFormat, ResponseArgs, SimulateArgs};
use crate::files;
use crate::render::CAUTION;
use crate::render::plot::{self, Quantity, ResponsePlot, TimePlot};

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
    let request = SweepRequest {
        drive,
        dof,
        range_hz: args.from.zip(args.to),
        points: args.points,
        transmitted: args.transmitted,
    };
    let mut bar = LazyBar::new("sweeping", "frequencies");
    let result = sweep::frequency_sweep(&checked.model, sys, &request, &mut |done, total| {
        bar.update(done, total)
    });
    bar.finish();
    let sweep = match result {
        Ok(s) => s,
        Err(why) => {
            report_error(&format!("`{shown}`: {why}"));
            return Ok(Status::Failed);
        }
    };
    let quantity = if args.transmitted {
        "transmissibility"
    } else {
        "amplitude"
    };
    let svg = match args.format {
        DataFormat::Svg => {
            let motion = sys
                .drives
                .iter()
                .find(|d| d.name == sweep.drive)
                .is_some_and(|d| d.target.is_none());
            let quantity = match (args.transmitted, motion) {
                (false, _) => Quantity::Amplitude,
                (true, false) => Quantity::ForceTransmissibility,
                (true, true) => Quantity::MotionTransmissibility,
            };
            let drawn = plot::response_svg(&ResponsePlot {
                file: &shown,
                system: &sys.name,
                system_title: sys.title.as_deref(),
                at: &args.at,
                kind: sys.dofs[dof].kind,
                quantity,
                scale: args.scale,
                sweep: &sweep,
            });
            match drawn {
                Ok(svg) => Some(svg),
                Err(why) => {
                    report_error(&format!("`{shown}`: {why}"));
                    return Ok(Status::Failed);
                }
            }
        }
        _ => None,
    };
    let Some(mut out) = open_output(args.output.as_deref()) else {
        return Ok(Status::Usage);
    };
    match args.format {
        DataFormat::Svg => out.write_all(svg.unwrap_or_default().as_bytes())?,
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
    if let Some(p) = args.within
        && !(p > 0.0 && p < 100.0)
    {
        report_error(&format!(
            "--within is a percentage between 0 and 100, found {p}"
        ));
        return Ok(Status::Usage);
    }
    let request = TimeRequest {
        dof,
        duration: args.duration,
        measures: args.format != DataFormat::Csv,
        within: args.within.map(|p| p / 100.0),
    };
    let mut bar = LazyBar::new("simulating", "steps");
    let result = sweep::time_history(&checked.model, sys, &request, &mut |done, total| {
        bar.update(done, total)
    });
    bar.finish();
    let history = match result {
        Ok(h) => h,
        Err(why) => {
            report_error(&format!("`{shown}`: {why}"));
            return Ok(Status::Failed);
        }
    };
    let svg = match args.format {
        DataFormat::Svg => {
            let drawn = plot::time_svg(&TimePlot {
                file: &shown,
                system: &sys.name,
                system_title: sys.title.as_deref(),
                at: &args.at,
                kind: sys.dofs[dof].kind,
                history: &history,
            });
            match drawn {
                Ok(svg) => Some(svg),
                Err(why) => {
                    report_error(&format!("`{shown}`: {why}"));
                    return Ok(Status::Failed);
                }
            }
        }
        _ => None,
    };
    let Some(mut out) = open_output(args.output.as_deref()) else {
        return Ok(Status::Usage);
    };
    match args.format {
        DataFormat::Svg => out.write_all(svg.unwrap_or_default().as_bytes())?,
        DataFormat::Csv => {
            writeln!(out, "# {CAUTION}")?;
            writeln!(out, "time_s,displacement")?;
            for p in &history.points {
                writeln!(out, "{},{}", p.time_s, p.displacement)?;
            }
        }
        DataFormat::Json => {
            let report = serde_json::json!({
                "file": shown,
                "system": sys.name,
                "at": args.at,
                "history": history.points,
                "measures": history.measures,
                "caution": CAUTION,
            });
            serde_json::to_writer_pretty(&mut out, &report).map_err(io::Error::other)?;
            writeln!(out)?;
        }
    }
    out.flush()?;
    Ok(Status::Passed)
}

/// Stdout, or the `--output` file (created or truncated); `None` after reporting a file that
/// cannot be created.
fn open_output(path: Option<&Path>) -> Option<BufWriter<Box<dyn Write>>> {
    let sink: Box<dyn Write> = match path {
        None => Box::new(io::stdout().lock()),
        Some(path) => match File::create(path) {
            Ok(file) => Box::new(file),
            Err(err) => {
                report_error(&format!("cannot write `{}`: {err}", path.display()));
                return None;
            }
        },
    };
    Some(BufWriter::new(sink))
}

/// How long a run goes before it earns a progress bar: shorter work finishes before a bar
/// would be read.
const BAR_AFTER: Duration = Duration::from_millis(300);

/// A progress bar on stderr that exists only when stderr is a terminal and the work has
/// already run for [`BAR_AFTER`] without being nearly done. Off a terminal (pipes, files,
/// tests) nothing is ever created, so nothing is written.
struct LazyBar {
    terminal: bool,
    started: Instant,
    verb: &'static str,
    noun: &'static str,
    bar: Option<ProgressBar>,
}

impl LazyBar {
    fn new(verb: &'static str, noun: &'static str) -> LazyBar {
        LazyBar {
            terminal: io::stderr().is_terminal(),
            started: Instant::now(),
            verb,
            noun,
            bar: None,
        }
    }

    fn update(&mut self, done: usize, total: usize) {
        if !self.terminal {
            return;
        }
        if self.bar.is_none() && done < total && self.started.elapsed() >= BAR_AFTER {
            let bar =
                ProgressBar::with_draw_target(Some(total as u64), ProgressDrawTarget::stderr());
            let template = format!(
                "{} {{bar:40}} {{pos}}/{{len}} {} ({{eta}} left)",
                self.verb, self.noun
            );
            if let Ok(style) = ProgressStyle::with_template(&template) {
                bar.set_style(style);
            }
            self.bar = Some(bar);
        }
        if let Some(bar) = &self.bar {
            bar.set_position(done as u64);
        }
    }

    /// Clears the bar (if one was drawn) so the terminal shows only the results.
    fn finish(&mut self) {
        if let Some(bar) = self.bar.take() {
            bar.finish_and_clear();
        }
    }
}
