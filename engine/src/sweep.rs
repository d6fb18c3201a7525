//! Response curves for plotting and export: a frequency sweep of one coordinate under one
//! harmonic drive, and the time history of one coordinate under the transient loads. Both at
//! nominal values; the numbers come from [`crate::response`] and [`crate::time_response`].

use std::f64::consts::TAU;

use crate::assemble::{Assembler, Limits};
use crate::model::{DriveForm, Model, SystemModel};
use crate::modes::{self, ModalConfig, ModalResult};
use crate::response::{self, InputEvaluator, Inputs, Waveform};
use crate::time_response::{self, TimeConfig};

/// Most points a sweep may ask for.
pub const MAX_POINTS: usize = 100_000;

#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct SweepPoint {
    pub frequency_hz: f64,
    /// |X| of the coordinate (m or rad), or the transmissibility with `transmitted`.
    pub magnitude: f64,
    /// Phase of the response relative to the drive, degrees.
    pub phase_deg: f64,
}

#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct Sweep {
    pub drive: String,
    pub points: Vec<SweepPoint>,
    /// The natural frequencies (Hz) to mark on a plot.
    pub natural_frequencies_hz: Vec<f64>,
    /// The drive's band (Hz), or its single frequency twice.
    pub drive_band_hz: Option<(f64, f64)>,
}

#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct TimePoint {
    pub time_s: f64,
    pub displacement: f64,
}

struct Nominal<'m> {
    mats: crate::assemble::Matrices,
    modal: ModalResult,
    inputs: Inputs,
    sys: &'m SystemModel,
}

fn nominal<'m>(model: &'m Model, sys: &'m SystemModel) -> Result<Nominal<'m>, String> {
    if sys.has_errors {
        return Err(format!(
            "system `{}` has errors; run `sprung check` for them",
            sys.name
        ));
    }
    let dev = vec![0.0; model.params.len()];
    let mats = Assembler::new(model, sys, Limits::default())
        .and_then(|mut a| a.assemble(&dev))
        .map_err(|e| e.to_string())?;
    let modal = modes::analyze(&mats, &ModalConfig::default()).map_err(|e| e.to_string())?;
    let inputs = InputEvaluator::new(model, sys)
        .and_then(|mut e| e.evaluate(&dev))
        .map_err(|e| e.to_string())?;
    Ok(Nominal {
        mats,
        modal,
        inputs,
        sys,
    })
}

/// The amplitude and phase of coordinate `dof` under drive `drive` (by index; the first
/// harmonic drive when `None`), from `from_hz` to `to_hz` on a log grid of `points` points.
/// Without a range, the sweep runs from a third of the lowest natural frequency (or the
/// band's lower end) to three times the highest (or the band's upper end).
pub fn frequency_sweep(
    model: &Model,
    sys: &SystemModel,
    drive: Option<usize>,
    dof: usize,
    range_hz: Option<(f64, f64)>,
    points: usize,
    transmitted: bool,
) -> Result<Sweep, String> {
    let n = nominal(model, sys)?;
    let index = match drive {
        Some(i) => i,
        None => n
            .sys
            .drives
            .iter()
            .position(|d| matches!(d.form, DriveForm::Harmonic { .. } | DriveForm::Band { .. }))
            .ok_or_else(|| format!("system `{}` has no harmonic drive", sys.name))?,
    };
    let input = *n.inputs.drives.get(index).ok_or("no such drive")?;
    let band = match input.waveform {
        Waveform::Harmonic { omega } => (omega, omega),
        Waveform::Band { lo, hi } => (lo, hi),
        _ => {
            return Err(format!(
                "`{}` is not a harmonic drive",
                sys.drives[index].name
            ));
        }
    };
    let elastic: Vec<f64> = n
        .modal
        .modes
        .iter()
        .map(|m| m.natural_frequency)
        .filter(|w| *w > 0.0)
        .collect();
    let (lo, hi) = match range_hz {
        Some((a, b)) => (a * TAU, b * TAU),
        None => {
            let fmin = elastic.iter().copied().fold(band.0, f64::min);
            let fmax = elastic.iter().copied().fold(band.1, f64::max);
            (fmin / 3.0, fmax * 3.0)
        }
    };
    if !(lo > 0.0 && hi > lo && lo.is_finite() && hi.is_finite()) {
        return Err(format!(
            "the sweep needs 0 < from < to, found {} Hz .. {} Hz",
            lo / TAU,
            hi / TAU
        ));
    }
    if !(2..=MAX_POINTS).contains(&points) {
        return Err(format!(
            "the number of points must be between 2 and {MAX_POINTS}"
        ));
    }
    let mut out = Vec::with_capacity(points);
    for k in 0..points {
        let omega = lo * (hi / lo).powf(k as f64 / (points - 1) as f64);
        let h = response::harmonic(
            &n.mats,
            &n.inputs.ground,
            input.excitation,
            input.amplitude,
            omega,
        )
        .map_err(|e| e.to_string())?;
        let (value, phase) = if transmitted {
            let t = match input.excitation {
                response::Excitation::Load { .. } => h.ground_force / h.input,
                response::Excitation::Base { .. } => {
                    h.x.get(dof).copied().ok_or("no such coordinate")? / h.input
                }
            };
            (t.norm(), t.arg())
        } else {
            let x = h.x.get(dof).copied().ok_or("no such coordinate")?;
            (x.norm(), (x / h.input).arg())
        };
        out.push(SweepPoint {
            frequency_hz: omega / TAU,
            magnitude: value,
            phase_deg: phase.to_degrees(),
        });
    }
    Ok(Sweep {
        drive: sys.drives[index].name.clone(),
        points: out,
        natural_frequencies_hz: elastic.iter().map(|w| w / TAU).collect(),
        drive_band_hz: Some((band.0 / TAU, band.1 / TAU)),
    })
}

/// The displacement of coordinate `dof` under every step and impulse drive and initial
/// condition, over `duration` seconds.
pub fn time_history(
    model: &Model,
    sys: &SystemModel,
    dof: usize,
    duration: f64,
) -> Result<Vec<TimePoint>, String> {
    if !(duration > 0.0 && duration.is_finite()) {
        return Err(format!("the duration must be positive, found {duration} s"));
    }
    let n = nominal(model, sys)?;
    let loading = time_response::loading(&n.mats, &n.inputs).map_err(|e| e.to_string())?;
    let config = TimeConfig {
        duration: Some(duration),
        ..TimeConfig::default()
    };
    let t =
        time_response::simulate(&n.mats, &loading, &n.modal, &config).map_err(|e| e.to_string())?;
    let x = t.displacement(dof).map_err(|e| e.to_string())?;
    Ok(t.times
        .iter()
        .zip(x)
        .map(|(&time_s, displacement)| TimePoint {
            time_s,
            displacement,
        })
        .collect())
}
