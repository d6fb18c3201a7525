//! The output of `sprung modes`: the JSON contract of language.md §7, and the table and
//! Markdown views drawn from the same data.

use serde::Serialize;
use sprung_engine::Checked;
use sprung_engine::analysis::Analysis;
use sprung_engine::model::DofKind;
use sprung_engine::modes::Mode;
use sprung_engine::requirements::sig;

use super::CAUTION;

#[derive(Debug, Serialize)]
pub struct ModesJson {
    pub file: String,
    pub systems: Vec<SystemModesJson>,
    /// The caution every report carries (an added key).
    pub caution: &'static str,
}

#[derive(Debug, Serialize)]
pub struct SystemModesJson {
    pub name: String,
    /// Added key: the system's title, when it has one.
    pub title: Option<String>,
    pub dofs: Vec<DofJson>,
    /// Empty when the system has errors and was not analyzed (see `analyzed`).
    pub modes: Vec<ModeJson>,
    /// Added key: whether the modes were computed.
    pub analyzed: bool,
}

#[derive(Debug, Serialize)]
pub struct DofJson {
    pub name: String,
    /// `translational` or `rotational`.
    pub kind: DofKind,
}

#[derive(Debug, Serialize)]
pub struct ModeJson {
    pub index: usize,
    pub natural_frequency_hz: f64,
    /// `null` when the mode does not oscillate.
    pub damped_frequency_hz: Option<f64>,
    /// `null` for a rigid-body mode.
    pub damping_ratio: Option<f64>,
    /// `undamped underdamped critically_damped overdamped rigid_body unstable`.
    pub regime: &'static str,
    /// The undamped shape in `dofs` order, largest magnitude 1 and that entry positive.
    pub shape: Vec<f64>,
    /// Added keys: the same frequency in rad/s, the quality factor, the decay time constant
    /// (s) and the logarithmic decrement, each `null` where it does not apply.
    pub natural_frequency_rad_s: f64,
    pub quality_factor: Option<f64>,
    pub decay_time_constant_s: Option<f64>,
    pub log_decrement: Option<f64>,
}

impl ModeJson {
    fn new(index: usize, m: &Mode) -> ModeJson {
        ModeJson {
            index,
            natural_frequency_hz: m.natural_frequency_hz,
            damped_frequency_hz: m.damped_frequency_hz,
            damping_ratio: m.damping_ratio,
            regime: m.regime.as_str(),
            shape: m.shape_unit(),
            natural_frequency_rad_s: m.natural_frequency,
            quality_factor: m.quality_factor.filter(|q| q.is_finite()),
            decay_time_constant_s: m.decay_time_constant.filter(|t| t.is_finite()),
            log_decrement: m.log_decrement,
        }
    }
}

impl ModesJson {
    pub fn new(
        file: &str,
        _text: &str,
        checked: &Checked,
        analysis: &Analysis,
        only: Option<&str>,
    ) -> Self {
        let systems = checked
            .model
            .systems
            .iter()
            .zip(&analysis.systems)
            .filter(|(s, _)| only.is_none_or(|n| n == s.name))
            .map(|(s, a)| SystemModesJson {
                name: s.name.clone(),
                title: s.title.clone(),
                dofs: s
                    .dofs
                    .iter()
                    .map(|d| DofJson {
                        name: d.name.clone(),
                        kind: d.kind,
                    })
                    .collect(),
                modes: a
                    .modes
                    .as_ref()
                    .map(|r| {
                        r.modes
                            .iter()
                            .enumerate()
                            .map(|(i, m)| ModeJson::new(i + 1, m))
                            .collect()
                    })
                    .unwrap_or_default(),
                analyzed: a.modes.is_some(),
            })
            .collect();
        ModesJson {
            file: file.to_owned(),
            systems,
            caution: CAUTION,
        }
    }
}

fn opt(x: Option<f64>) -> String {
    x.map_or_else(|| "-".to_string(), sig)
}

fn shape(s: &[f64]) -> String {
    let parts: Vec<String> = s.iter().map(|x| format!("{x:.3}")).collect();
    format!("[{}]", parts.join(", "))
}

fn regime_words(r: &str) -> String {
    r.replace('_', " ")
}

/// A plain-text table per system.
pub fn table(report: &ModesJson) -> String {
    let mut out = String::new();
    for sys in &report.systems {
        let title = sys
            .title
            .as_ref()
            .map(|t| format!(" - {t}"))
            .unwrap_or_default();
        let dofs: Vec<&str> = sys.dofs.iter().map(|d| d.name.as_str()).collect();
        out.push_str(&format!(
            "system {}{title} ({} degrees of freedom)\n",
            sys.name,
            sys.dofs.len()
        ));
        if !sys.analyzed {
            out.push_str("  not analyzed: the system has errors (run `sprung check` for them)\n\n");
            continue;
        }
        out.push_str(&format!(
            "  {:>4}  {:>12}  {:>12}  {:>9}  {:<18}  shape ({})\n",
            "mode",
            "f_n (Hz)",
            "f_d (Hz)",
            "zeta",
            "regime",
            dofs.join(", ")
        ));
        for m in &sys.modes {
            out.push_str(&format!(
                "  {:>4}  {:>12}  {:>12}  {:>9}  {:<18}  {}\n",
                m.index,
                sig(m.natural_frequency_hz),
                opt(m.damped_frequency_hz),
                opt(m.damping_ratio),
                regime_words(m.regime),
                shape(&m.shape)
            ));
        }
        out.push('\n');
    }
    out.push_str(report.caution);
    out.push('\n');
    out
}

/// A Markdown section per system, for reports and pull requests.
pub fn markdown(report: &ModesJson) -> String {
    let mut out = format!("# Modes of `{}`\n\n", report.file);
    for sys in &report.systems {
        let title = sys
            .title
            .as_ref()
            .map(|t| format!(": {t}"))
            .unwrap_or_default();
        out.push_str(&format!("## System `{}`{title}\n\n", sys.name));
        if !sys.analyzed {
            out.push_str("Not analyzed: the system has errors.\n\n");
            continue;
        }
        let dofs: Vec<String> = sys.dofs.iter().map(|d| format!("`{}`", d.name)).collect();
        out.push_str(&format!(
            "| mode | natural frequency (Hz) | damped frequency (Hz) | damping ratio ζ | regime | shape ({}) |\n",
            dofs.join(", ")
        ));
        out.push_str("|---:|---:|---:|---:|---|---|\n");
        for m in &sys.modes {
            out.push_str(&format!(
                "| {} | {} | {} | {} | {} | {} |\n",
                m.index,
                sig(m.natural_frequency_hz),
                opt(m.damped_frequency_hz),
                opt(m.damping_ratio),
                regime_words(m.regime),
                shape(&m.shape)
            ));
        }
        out.push('\n');
    }
    out.push_str(&format!("> {}\n", report.caution));
    out
}
