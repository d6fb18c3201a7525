//! Drives in the editor: the engine's drive summaries (`sprung_engine::drive_report`, computed
//! once per snapshot) as a short inlay hint at the end of each `force`/`torque`/`motion` line
//! and as a Markdown hover. Only wording and units here; every number comes from the engine.

use sprung_engine::drive_report::{
    DriveReport, DriveResponse, HarmonicReport, Skipped, TransientReport,
};
use sprung_engine::model::{DofKind, Drive, SystemModel};
use sprung_engine::modes::ModalResult;
use sprung_engine::response::{ResponseError, Separation};
use sprung_syntax::Span;
use sprung_syntax::ast::DriveKind;

use crate::display::{degrees, hz, load, motion, num, percent, quantity};
use crate::snapshot::Snapshot;
use sprung_engine::dim::Dim;

/// The hover table lists this many coordinates, the largest first; the rest are counted.
pub const TABLE_DOFS: usize = 12;

/// The drive whose name is at `name_span`, its system and its summary.
pub fn report_at(snap: &Snapshot, name_span: Span) -> Option<(&SystemModel, &Drive, &DriveReport)> {
    let model = &snap.checked.model;
    for (si, sys) in model.systems.iter().enumerate() {
        if let Some(di) = sys.drives.iter().position(|d| d.name_span == name_span) {
            let rep = snap.drives.get(si)?.iter().find(|r| r.drive == di)?;
            return Some((sys, &sys.drives[di], rep));
        }
    }
    None
}

fn is_rot(sys: &SystemModel, dof: usize) -> bool {
    sys.dofs
        .get(dof)
        .is_some_and(|d| d.kind == DofKind::Rotational)
}

fn dof_name(sys: &SystemModel, dof: usize) -> &str {
    sys.dofs.get(dof).map_or("?", |d| d.name.as_str())
}

/// `x` for a mass, `θ` for an inertia.
fn symbol(sys: &SystemModel, dof: usize) -> &'static str {
    if is_rot(sys, dof) { "θ" } else { "x" }
}

/// `23% from f2`; `f1 inside the band`; `at f2` when the drive is on the mode (to the
/// figures shown).
fn separation_words(s: &Separation, band: bool) -> String {
    if s.value == 0.0 && band {
        format!("f{} inside the band", s.mode)
    } else if s.value < 5e-4 {
        format!("at f{}", s.mode)
    } else {
        format!("{} from f{}", percent(s.value), s.mode)
    }
}

/// The hint label and its tooltip (Markdown); `None` when nothing is worth a hint.
pub fn hint(
    sys: &SystemModel,
    drive: &Drive,
    rep: &DriveReport,
    modal: Option<&ModalResult>,
) -> Option<(String, String)> {
    match &rep.result {
        Ok(DriveResponse::Harmonic(h)) => Some((
            harmonic_label(sys, drive, h),
            markdown(sys, drive, rep, modal),
        )),
        Ok(DriveResponse::Transient(t)) => Some((
            transient_label(sys, drive, t),
            markdown(sys, drive, rep, modal),
        )),
        Err(Skipped::Failed(ResponseError::Singular { .. })) => Some((
            "unbounded: undamped resonance".to_string(),
            markdown(sys, drive, rep, modal),
        )),
        Err(Skipped::Failed(_)) => {
            Some(("no response".to_string(), markdown(sys, drive, rep, modal)))
        }
        Err(Skipped::OverBudget { .. }) => None,
    }
}

fn harmonic_label(sys: &SystemModel, drive: &Drive, h: &HarmonicReport) -> String {
    let x = h.response.x.get(h.dof).map_or(f64::NAN, |z| z.norm());
    let amount = motion(x, is_rot(sys, h.dof));
    let mut label = match drive.kind {
        DriveKind::Motion => format!("{} |{}| {amount}", dof_name(sys, h.dof), symbol(sys, h.dof)),
        _ => format!("|{}| {amount}", symbol(sys, h.dof)),
    };
    if h.band.is_some() {
        label = format!("peak {label} at {}", hz(h.omega));
    }
    if drive.kind == DriveKind::Motion {
        label.push_str(&format!(", T {}", num(h.transmissibility)));
    }
    if let Some(s) = h.nearest() {
        label.push_str(&format!(" · {}", separation_words(s, h.band.is_some())));
    }
    label
}

fn transient_label(sys: &SystemModel, drive: &Drive, t: &TransientReport) -> String {
    let rot = is_rot(sys, t.dof);
    let mut parts = Vec::new();
    let who = if drive.kind == DriveKind::Motion {
        format!("{} ", dof_name(sys, t.dof))
    } else {
        String::new()
    };
    parts.push(format!(
        "{who}peak {} at {}",
        motion(t.peak.value, rot),
        quantity(t.peak.time, Dim::TIME, false)
    ));
    if let Some(Ok(o)) = &t.overshoot {
        parts.push(format!("overshoot {}", percent(*o)));
    }
    parts.push(match &t.settling {
        Ok(s) => format!("settles {}", quantity(*s, Dim::TIME, false)),
        Err(ResponseError::NeverSettles) => "never settles".to_string(),
        Err(_) => "settling unknown".to_string(),
    });
    parts.join(" · ")
}

/// The whole summary as Markdown (hover and tooltip).
pub fn markdown(
    sys: &SystemModel,
    drive: &Drive,
    rep: &DriveReport,
    modal: Option<&ModalResult>,
) -> String {
    match &rep.result {
        Ok(DriveResponse::Harmonic(h)) => harmonic_markdown(sys, drive, h, modal),
        Ok(DriveResponse::Transient(t)) => transient_markdown(sys, t),
        Err(Skipped::Failed(ResponseError::Singular { omega })) => format!(
            "**no steady state**: the drive meets an undamped mode at {} and excites it, so the \
             amplitude grows without bound. Add damping that this mode feels, or move the \
             drive frequency.",
            hz(*omega)
        ),
        Err(e) => format!("no response computed: {e}"),
    }
}

fn harmonic_markdown(
    sys: &SystemModel,
    drive: &Drive,
    h: &HarmonicReport,
    modal: Option<&ModalResult>,
) -> String {
    let r = &h.response;
    let mut md = String::new();
    match h.band {
        Some((lo, hi)) => md.push_str(&format!(
            "**steady state at {}** ({:.1} rad/s), where |{}| peaks over the band {} … {}\n",
            hz(h.omega),
            h.omega,
            dof_name(sys, h.dof),
            hz(lo),
            hz(hi)
        )),
        None => md.push_str(&format!(
            "**steady state at {}** ({:.1} rad/s)\n",
            hz(h.omega),
            h.omega
        )),
    }
    let base = matches!(drive.kind, DriveKind::Motion);
    let reference = match drive.kind {
        DriveKind::Force => "the applied force",
        DriveKind::Torque => "the applied torque",
        DriveKind::Motion => "the ground displacement",
    };
    md.push_str(&format!(
        "\n| coordinate | amplitude | phase |{}\n|---|---|---|{}\n",
        if base { " X/Y |" } else { "" },
        if base { "---|" } else { "" }
    ));
    let mut order: Vec<usize> = (0..r.x.len()).collect();
    order.sort_by(|&a, &b| r.x[b].norm().total_cmp(&r.x[a].norm()));
    // The coordinate the summary is about always shows, first.
    order.retain(|&i| i != h.dof);
    order.insert(0, h.dof);
    let input = r.input;
    for &i in order.iter().take(TABLE_DOFS) {
        let x = r.x[i];
        let phase = if input.norm() > 0.0 {
            (x / input).arg()
        } else {
            0.0
        };
        md.push_str(&format!(
            "| {} | {} | {} |",
            dof_name(sys, i),
            motion(x.norm(), is_rot(sys, i)),
            degrees(phase)
        ));
        if base {
            let ratio = if input.norm() > 0.0 {
                x.norm() / input.norm()
            } else {
                f64::NAN
            };
            md.push_str(&format!(" {} |", num(ratio)));
        }
        md.push('\n');
    }
    if order.len() > TABLE_DOFS {
        md.push_str(&format!(
            "\n… and {} more coordinates\n",
            order.len() - TABLE_DOFS
        ));
    }
    md.push_str(&format!(
        "\nphase relative to {reference}; a lag is negative.\n"
    ));
    // The summary's coordinate is of the kind the drive acts on.
    let rot = is_rot(sys, h.dof);
    md.push_str(&format!(
        "\n- force into ground: {} ({})",
        load(r.ground_force.norm(), rot),
        degrees(if input.norm() > 0.0 {
            (r.ground_force / input).arg()
        } else {
            0.0
        })
    ));
    match drive.kind {
        DriveKind::Motion => md.push_str(&format!(
            "\n- transmissibility |X|/|Y| of {}: {}",
            dof_name(sys, h.dof),
            num(h.transmissibility)
        )),
        _ => md.push_str(&format!(
            "\n- transmissibility (force into ground / applied): {}",
            num(h.transmissibility)
        )),
    }
    if !h.separations.is_empty() {
        md.push_str("\n\n| mode | fn | separation |\n|---|---|---|\n");
        let nearest = h.nearest().map(|s| s.mode);
        for s in &h.separations {
            let wn = modal
                .and_then(|m| m.modes.iter().find(|x| x.index == s.mode))
                .map_or("—".to_string(), |m| hz(m.natural_frequency));
            let mark = if nearest == Some(s.mode) {
                " (nearest)"
            } else {
                ""
            };
            let value = if s.value == 0.0 && h.band.is_some() {
                "inside the band".to_string()
            } else if s.value < 5e-4 {
                "on the mode".to_string()
            } else {
                percent(s.value)
            };
            md.push_str(&format!("| {} | {wn} | {value}{mark} |\n", s.mode));
        }
        md.push_str(
            "\nseparation |fn − f| / f from the drive frequency (the nearest end of a band).\n",
        );
    }
    md
}

fn transient_markdown(sys: &SystemModel, t: &TransientReport) -> String {
    let rot = is_rot(sys, t.dof);
    let what = if t.step { "step" } else { "impulse" };
    let name = dof_name(sys, t.dof);
    let mut md = format!(
        "**{what} response of {name}**, this drive alone, from rest\n\n- peak |{}|: {} at {}",
        symbol(sys, t.dof),
        motion(t.peak.value, rot),
        quantity(t.peak.time, Dim::TIME, false)
    );
    if let Some(f) = t.final_values.get(t.dof) {
        md.push_str(&format!("\n- final value: {}", motion(*f, rot)));
    }
    match &t.overshoot {
        Some(Ok(o)) => md.push_str(&format!("\n- overshoot: {}", percent(*o))),
        Some(Err(e)) => md.push_str(&format!("\n- overshoot: {e}")),
        None => {}
    }
    let band = if t.step {
        "of its final value"
    } else {
        "of its peak"
    };
    match &t.settling {
        Ok(s) => md.push_str(&format!(
            "\n- settling time (within 2% {band}): {}",
            quantity(*s, Dim::TIME, false)
        )),
        Err(e) => md.push_str(&format!("\n- settling: {e}")),
    }
    md.push_str(&format!(
        "\n- simulated over {}",
        quantity(t.duration, Dim::TIME, false)
    ));
    if t.step && t.final_values.len() > 1 {
        md.push_str("\n\n| coordinate | final value |\n|---|---|\n");
        for (i, f) in t.final_values.iter().enumerate().take(TABLE_DOFS) {
            md.push_str(&format!(
                "| {} | {} |\n",
                dof_name(sys, i),
                motion(*f, is_rot(sys, i))
            ));
        }
    }
    md
}
