//! What each drive does to its system at nominal values, for the editor's hints and hovers:
//! the steady-state response of every coordinate at the drive's frequency (at the peak of a
//! band), the force into ground, the separation from each mode; or, for a step or an impulse,
//! the peak, overshoot and settling time of the driven coordinate.
//!
//! Bounded in work: each system has a budget ([`Limits::work`], in rough floating-point
//! operations), spent drive by drive in file order; a drive whose estimate does not fit is
//! [`Skipped::OverBudget`] instead of slowing the editor. `sprung response` has no such limit.
//!
//! **The coordinate a summary is about**: the target of a `force` or `torque`. For a `motion`
//! of ground: the coordinate a `transmissibility of D to A` or an `amplitude of A`
//! requirement names (the engineer said what matters), else the coordinate of the moved kind
//! that moves most (for a band, the largest |X| of any such coordinate over the band).

use crate::analysis::Analysis;
use crate::assemble::{self, Matrices};
use crate::model::{DofKind, Model, SystemModel};
use crate::modes::ModalResult;
use crate::response::{
    self, BandExtreme, DriveInput, Excitation, GroundLink, Harmonic, InputEvaluator, Inputs,
    ResponseError, Separation, Waveform,
};
use crate::time_response::{self, Peak, TimeConfig};
use sprung_syntax::ast::Subject;

/// How much work the drive summaries of one system may take.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Limits {
    /// Rough floating-point operations per system (default 4e8: well under a second).
    pub work: f64,
}

impl Default for Limits {
    fn default() -> Self {
        Limits { work: 4e8 }
    }
}

/// One drive's summary (or why there is none).
#[derive(Clone, Debug)]
pub struct DriveReport {
    /// Index into [`SystemModel::drives`].
    pub drive: usize,
    pub result: Result<DriveResponse, Skipped>,
}

#[derive(Clone, Debug, PartialEq)]
pub enum Skipped {
    /// The estimated work is over what is left of the system's budget.
    OverBudget { dofs: usize },
    /// The response could not be computed (an undamped resonance hit, a rigid-body mode...).
    Failed(ResponseError),
}

impl std::fmt::Display for Skipped {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Skipped::OverBudget { dofs } => write!(
                f,
                "not computed in the editor: the system has {dofs} degrees of freedom; `sprung response` computes it"
            ),
            Skipped::Failed(e) => e.fmt(f),
        }
    }
}

#[derive(Clone, Debug)]
pub enum DriveResponse {
    Harmonic(HarmonicReport),
    Transient(TransientReport),
}

#[derive(Clone, Debug)]
pub struct HarmonicReport {
    /// The coordinate the summary is about (module documentation).
    pub dof: usize,
    /// Where the response is reported (rad/s): the drive frequency, or where |X_dof| peaks
    /// over the band.
    pub omega: f64,
    /// The band searched (rad/s), for an `at F1 .. F2` drive.
    pub band: Option<(f64, f64)>,
    /// The whole response at `omega` under the drive's amplitude.
    pub response: Harmonic,
    /// Force drive: |force into ground| / |F|; ground motion: |X_dof| / |Y|.
    pub transmissibility: f64,
    /// The separation from each non-rigid mode, in mode order.
    pub separations: Vec<Separation>,
}

impl HarmonicReport {
    /// The mode closest to the drive (smallest separation).
    pub fn nearest(&self) -> Option<&Separation> {
        self.separations
            .iter()
            .reduce(|best, s| if s.value < best.value { s } else { best })
    }
}

#[derive(Clone, Debug)]
pub struct TransientReport {
    /// The coordinate the summary is about (module documentation).
    pub dof: usize,
    pub step: bool,
    /// The final (static) value of every coordinate (m or rad): 0 after an impulse.
    pub final_values: Vec<f64>,
    /// The largest |x| of `dof` and when.
    pub peak: Peak,
    /// (peak − final) / final, under a step.
    pub overshoot: Option<Result<f64, ResponseError>>,
    /// Time to stay within 2% (of the final value; of the peak after an impulse).
    pub settling: Result<f64, ResponseError>,
    /// The simulated window (s).
    pub duration: f64,
}

/// The settling band of the summaries (2%, as `settling of A` by default).
pub const SETTLING_BAND: f64 = 0.02;

/// The drive summaries of every system, parallel to [`Model::systems`] (empty for a system
/// that was not analyzed).
pub fn reports(model: &Model, analysis: &Analysis, limits: &Limits) -> Vec<Vec<DriveReport>> {
    model
        .systems
        .iter()
        .enumerate()
        .map(|(i, sys)| {
            let modal = analysis.systems.get(i).and_then(|a| a.modes.as_ref());
            match modal {
                Some(modal) if !sys.has_errors && !sys.drives.is_empty() => {
                    system_reports(model, sys, modal, limits)
                }
                _ => Vec::new(),
            }
        })
        .collect()
}

/// The drive summaries of one analyzed system.
pub fn system_reports(
    model: &Model,
    sys: &SystemModel,
    modal: &ModalResult,
    limits: &Limits,
) -> Vec<DriveReport> {
    let n = sys.dofs.len();
    let fail_all = |e: ResponseError| {
        (0..sys.drives.len())
            .map(|drive| DriveReport {
                drive,
                result: Err(Skipped::Failed(e.clone())),
            })
            .collect()
    };
    let mats = match assemble::assemble(model, sys, &[]) {
        Ok(m) => m,
        Err(_) => return fail_all(ResponseError::Shape),
    };
    let inputs = match InputEvaluator::new(model, sys).and_then(|mut ev| ev.evaluate(&[])) {
        Ok(i) => i,
        Err(e) => return fail_all(e),
    };
    let mut left = limits.work;
    (0..sys.drives.len())
        .map(|drive| {
            let result = match inputs.drives.get(drive) {
                None => Err(Skipped::Failed(ResponseError::Shape)),
                Some(d) => {
                    let cost = estimate(n, d, modal);
                    if cost > left {
                        Err(Skipped::OverBudget { dofs: n })
                    } else {
                        left -= cost;
                        one(sys, &mats, &inputs, drive, d, modal).map_err(Skipped::Failed)
                    }
                }
            };
            DriveReport { drive, result }
        })
        .collect()
}

/// Rough operations of one summary: a complex LU is about 8n³/3 real multiply-adds (counted
/// as 8n³ with the scaling and the solve); a band search takes a few hundred of them; a
/// transient two matrix exponentials of the 2n state matrix and a matrix-vector product of
/// it per sample and per fine step (`time_response`: up to 200,000 samples, 20 peaks of 2,000
/// fine steps and the settling search).
fn estimate(n: usize, d: &DriveInput, modal: &ModalResult) -> f64 {
    let n = n as f64;
    let solve = 8.0 * n.powi(3);
    match d.waveform {
        Waveform::Harmonic { .. } => 2.0 * solve,
        Waveform::Band { .. } => {
            (response::BAND_GRID_POINTS as f64 + 60.0 * (modal.modes.len() as f64 + 2.0)) * solve
        }
        Waveform::Step | Waveform::Impulse => {
            let s = 2.0 * n;
            let samples = TimeConfig::default().max_samples as f64;
            60.0 * s.powi(3) + (samples + 45_000.0) * s * s
        }
    }
}

fn one(
    sys: &SystemModel,
    mats: &Matrices,
    inputs: &Inputs,
    index: usize,
    drive: &DriveInput,
    modal: &ModalResult,
) -> Result<DriveResponse, ResponseError> {
    let kind = response::excitation_kind(mats, drive.excitation)?;
    let named = named_dof(sys, index, mats, kind);
    match drive.waveform {
        Waveform::Harmonic { .. } | Waveform::Band { .. } => {
            harmonic_report(mats, &inputs.ground, drive, modal, kind, named)
                .map(DriveResponse::Harmonic)
        }
        Waveform::Step | Waveform::Impulse => {
            transient_report(mats, inputs, drive, modal, kind, named).map(DriveResponse::Transient)
        }
    }
}

/// The coordinate a requirement names for a ground-motion drive; the target of a load.
fn named_dof(sys: &SystemModel, drive: usize, mats: &Matrices, kind: DofKind) -> Option<usize> {
    if let Some(target) = sys.drives.get(drive).and_then(|d| d.target) {
        return Some(target);
    }
    let of_kind = |i: &usize| mats.dof_kinds.get(*i) == Some(&kind);
    let by = |f: &dyn Fn(&crate::model::Requirement) -> bool| {
        sys.requirements
            .iter()
            .filter(|r| f(r))
            .find_map(|r| r.dof.filter(of_kind))
    };
    by(&|r| matches!(r.subject, Subject::Transmissibility { .. }) && r.drive == Some(drive))
        .or_else(|| by(&|r| matches!(r.subject, Subject::Amplitude { .. })))
        .or_else(|| {
            by(&|r| {
                matches!(
                    r.subject,
                    Subject::Settling { .. } | Subject::Overshoot { .. }
                )
            })
        })
}

/// The largest |X| among the coordinates of `kind` (and which).
fn largest(h: &Harmonic, mats: &Matrices, kind: DofKind) -> Option<(usize, f64)> {
    (0..h.x.len())
        .filter(|&i| mats.dof_kinds.get(i) == Some(&kind))
        .map(|i| (i, h.x[i].norm()))
        // The first of equal amplitudes (to rounding), so a symmetric model picks the same
        // coordinate on every machine.
        .reduce(|a, b| if b.1 > a.1 * (1.0 + 1e-9) { b } else { a })
}

fn harmonic_report(
    mats: &Matrices,
    ground: &[GroundLink],
    drive: &DriveInput,
    modal: &ModalResult,
    kind: DofKind,
    named: Option<usize>,
) -> Result<HarmonicReport, ResponseError> {
    let at = |w: f64| response::harmonic(mats, ground, drive.excitation, drive.amplitude, w);
    let pick = |h: &Harmonic| -> Result<(usize, f64), ResponseError> {
        match named {
            Some(i) => Ok((i, h.x.get(i).ok_or(ResponseError::Shape)?.norm())),
            None => largest(h, mats, kind).ok_or(ResponseError::WrongKind { dof: 0 }),
        }
    };
    let (omega, band) = match drive.waveform {
        Waveform::Harmonic { omega } => (omega, None),
        Waveform::Band { lo, hi } => {
            let hints = response::resonance_hints(modal);
            let BandExtreme { omega, .. } =
                response::peak_over_band(|w| Ok(pick(&at(w)?)?.1), lo, hi, &hints)?;
            (omega, Some((lo, hi)))
        }
        Waveform::Step | Waveform::Impulse => return Err(ResponseError::NotHarmonic),
    };
    let h = at(omega)?;
    let (dof, x) = pick(&h)?;
    let denom = h.input.norm();
    let transmissibility = if denom == 0.0 {
        0.0
    } else {
        match drive.excitation {
            Excitation::Load { .. } => h.ground_force.norm() / denom,
            Excitation::Base { .. } => x / denom,
        }
    };
    Ok(HarmonicReport {
        dof,
        omega,
        band,
        response: h,
        transmissibility,
        separations: response::separations(drive, modal)?,
    })
}

fn transient_report(
    mats: &Matrices,
    inputs: &Inputs,
    drive: &DriveInput,
    modal: &ModalResult,
    kind: DofKind,
    named: Option<usize>,
) -> Result<TransientReport, ResponseError> {
    let alone = Inputs {
        drives: vec![*drive],
        initials: Vec::new(),
        ..inputs.clone()
    };
    let loading = time_response::loading(mats, &alone)?;
    let t = time_response::simulate(mats, &loading, modal, &TimeConfig::default())?;
    let n = mats.dofs();
    let dof = match named {
        Some(i) => i,
        None => (0..n)
            .filter(|&i| mats.dof_kinds.get(i) == Some(&kind))
            .map(|i| {
                let big = t
                    .displacement(i)
                    .map(|x| x.iter().fold(0.0_f64, |m, v| m.max(v.abs())))
                    .unwrap_or(0.0);
                (i, big)
            })
            .reduce(|a, b| if b.1 > a.1 * (1.0 + 1e-9) { b } else { a })
            .map(|(i, _)| i)
            .ok_or(ResponseError::WrongKind { dof: 0 })?,
    };
    let step = drive.waveform == Waveform::Step;
    Ok(TransientReport {
        dof,
        step,
        final_values: (0..n).map(|i| t.final_value(i)).collect::<Result<_, _>>()?,
        peak: t.peak_displacement(dof)?,
        overshoot: step.then(|| t.overshoot(dof)),
        settling: t.settling_time(dof, SETTLING_BAND),
        duration: t.duration(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::{self, Config};

    fn chain(n: usize, drive: &str) -> String {
        let mut t = String::from("system chain {\n");
        for i in 0..n {
            t.push_str(&format!("  mass m{i} = 1 kg\n"));
            let prev = if i == 0 {
                "ground".to_string()
            } else {
                format!("m{}", i - 1)
            };
            t.push_str(&format!("  spring k{i} between m{i} and {prev} = 1 kN/m\n"));
            t.push_str(&format!(
                "  damper c{i} between m{i} and {prev} = 2 N*s/m\n"
            ));
        }
        t.push_str(&format!("  force f on m{} = {drive}\n}}\n", n - 1));
        t
    }

    fn first(text: &str, limits: &Limits) -> DriveReport {
        let checked = crate::check(text);
        assert!(!checked.has_errors(), "{:?}", checked.diagnostics);
        let a = analysis::analyze(&checked, &Config::default());
        reports(&checked.model, &a, limits)[0][0].clone()
    }

    #[test]
    fn the_work_budget_skips_what_would_slow_the_editor() {
        // A 100-mass chain: one solve is cheap, a band search of hundreds of solves is not.
        let at = first(&chain(100, "1 N at 3 Hz"), &Limits::default());
        assert!(
            matches!(at.result, Ok(DriveResponse::Harmonic(_))),
            "{at:?}"
        );
        let band = first(&chain(100, "1 N at 1 Hz .. 5 Hz"), &Limits::default());
        assert_eq!(band.result.unwrap_err(), Skipped::OverBudget { dofs: 100 });
        let none = first(&chain(2, "1 N at 3 Hz"), &Limits { work: 0.0 });
        assert_eq!(none.result.unwrap_err(), Skipped::OverBudget { dofs: 2 });
    }

    #[test]
    fn one_mass_at_its_drive_frequency_is_the_closed_form() {
        // X = (F/k)/√((1 − r²)² + (2ζr)²) (standard vibration texts, from memory), with
        // m = 1 kg, k = 1 kN/m, c = 2 N·s/m: ωn = 31.62 rad/s, ζ = c/(2√(km)) = 0.03162.
        let rep = first(&chain(1, "1 N at 4 Hz"), &Limits::default());
        let Ok(DriveResponse::Harmonic(h)) = rep.result else {
            panic!("{rep:?}")
        };
        let wn = 1000f64.sqrt();
        let z = 2.0 / (2.0 * wn);
        let r = 4.0 * std::f64::consts::TAU / wn;
        let x = 1e-3 / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
        assert!((h.response.x[0].norm() - x).abs() < 1e-12 * x);
        assert_eq!(h.dof, 0);
        // |fn − f| / f = |5.033 − 4| / 4.
        let s = h.nearest().unwrap();
        assert!((s.value - (wn / std::f64::consts::TAU - 4.0).abs() / 4.0).abs() < 1e-12);
    }
}
