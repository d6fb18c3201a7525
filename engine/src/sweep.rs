//! Response curves for plotting and export: a frequency sweep of one coordinate under one
//! harmonic drive, and the time history of one coordinate under the transient loads. Both at
//! nominal values; the numbers come from [`crate::response`] and [`crate::time_response`].
//!
//! Both take a progress callback `(done, total)` so a caller can show how far a long run has
//! got; the engine knows nothing of terminals, and a caller that does not care passes
//! `&mut |_, _| {}`.

use std::f64::consts::TAU;

use sprung_syntax::ast::Subject;

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

/// What [`frequency_sweep`] sweeps.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SweepRequest {
    /// The harmonic drive, by index into the system's drives; the first harmonic one when
    /// `None`.
    pub drive: Option<usize>,
    /// The coordinate whose response is swept (index into the system's dofs).
    pub dof: usize,
    /// The sweep's ends (Hz); chosen from the modes and the drive's band when `None`.
    pub range_hz: Option<(f64, f64)>,
    /// Log-spaced frequencies, 2 ..= [`MAX_POINTS`].
    pub points: usize,
    /// Transmissibility instead of the coordinate's amplitude.
    pub transmitted: bool,
}

/// Called as `(done, total)` while a sweep or a simulation runs.
pub type Progress<'p> = &'p mut dyn FnMut(usize, usize);

#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct TimePoint {
    pub time_s: f64,
    pub displacement: f64,
}

/// What [`time_history`] simulates and measures.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TimeRequest {
    /// The coordinate reported (index into the system's dofs).
    pub dof: usize,
    /// The simulated window (s).
    pub duration: f64,
    /// Also find the final value, the peak and the settling time (costs a fine search over
    /// the window; a plain export can leave it out).
    pub measures: bool,
    /// The settling band as a fraction (0.02 for 2%); when `None`, the tightest
    /// `settling of A within P%` requirement on this coordinate, else 2%.
    pub within: Option<f64>,
}

/// The time history of one coordinate, with its measures when asked for.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct TimeHistory {
    pub points: Vec<TimePoint>,
    pub measures: Option<TimeMeasures>,
}

/// The marks of a time-history plot, from [`crate::time_response::Transient`].
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct TimeMeasures {
    /// The static value the response settles to (m or rad).
    pub final_value: f64,
    /// The largest |x|, with its sign, and when it happens.
    pub peak: TimePoint,
    pub settling: Settling,
}

/// The settling band and when the response stays inside it.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct Settling {
    /// The band as a fraction (0.02 for 2%).
    pub within: f64,
    /// Where `within` came from.
    pub source: WithinSource,
    /// Half the band's width (m or rad): `within` × |final value|, or × the peak |x| when
    /// the final value is zero (the rule of [`crate::time_response::Transient::settling_time`]).
    pub half_width: f64,
    /// Whether the band is relative to the peak |x| (a zero final value) rather than the
    /// final value.
    pub of_peak: bool,
    /// The settling time (s); `None` when the response is still outside the band near the
    /// end of the window.
    pub time_s: Option<f64>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum WithinSource {
    /// Given by the caller.
    Given,
    /// The tightest `settling of A within P%` requirement on the coordinate.
    Requirement,
    /// The default 2%.
    Default,
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

/// The amplitude and phase of one coordinate under one harmonic drive, on a log grid (see
/// [`SweepRequest`]). Without a range, the sweep runs from a third of the lowest natural
/// frequency (or the band's lower end) to three times the highest (or the band's upper end).
/// `progress` is called after each frequency with `(done, points)`.
pub fn frequency_sweep(
    model: &Model,
    sys: &SystemModel,
    request: &SweepRequest,
    progress: Progress<'_>,
) -> Result<Sweep, String> {
    let SweepRequest {
        drive,
        dof,
        range_hz,
        points,
        transmitted,
    } = *request;
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
        progress(k + 1, points);
    }
    Ok(Sweep {
        drive: sys.drives[index].name.clone(),
        points: out,
        natural_frequencies_hz: elastic.iter().map(|w| w / TAU).collect(),
        drive_band_hz: Some((band.0 / TAU, band.1 / TAU)),
    })
}

/// Steps [`time_history`] reports through its progress callback: the model and its modes,
/// the simulation, the peak, the settling time.
pub const TIME_STEPS: usize = 4;

/// The displacement of one coordinate under every step and impulse drive and initial
/// condition, over `request.duration` seconds, with its measures when asked for.
/// `progress` is called with `(done, TIME_STEPS)` after each step.
pub fn time_history(
    model: &Model,
    sys: &SystemModel,
    request: &TimeRequest,
    progress: Progress<'_>,
) -> Result<TimeHistory, String> {
    let TimeRequest {
        dof,
        duration,
        measures,
        within,
    } = *request;
    if !(duration > 0.0 && duration.is_finite()) {
        return Err(format!("the duration must be positive, found {duration} s"));
    }
    if let Some(w) = within
        && !(w > 0.0 && w < 1.0)
    {
        return Err(format!(
            "the settling band must be between 0% and 100%, found {}%",
            w * 100.0
        ));
    }
    let n = nominal(model, sys)?;
    progress(1, TIME_STEPS);
    let loading = time_response::loading(&n.mats, &n.inputs).map_err(|e| e.to_string())?;
    let config = TimeConfig {
        duration: Some(duration),
        ..TimeConfig::default()
    };
    let t =
        time_response::simulate(&n.mats, &loading, &n.modal, &config).map_err(|e| e.to_string())?;
    let x = t.displacement(dof).map_err(|e| e.to_string())?;
    let points = t
        .times
        .iter()
        .zip(x)
        .map(|(&time_s, displacement)| TimePoint {
            time_s,
            displacement,
        })
        .collect();
    progress(2, TIME_STEPS);
    if !measures {
        progress(TIME_STEPS, TIME_STEPS);
        return Ok(TimeHistory {
            points,
            measures: None,
        });
    }
    let err = |e: response::ResponseError| e.to_string();
    let final_value = t.final_value(dof).map_err(err)?;
    let peak = t.peak_displacement(dof).map_err(err)?;
    let peak_x = t.state_at(peak.time).map_err(err)?[dof];
    progress(3, TIME_STEPS);
    let (within, source) = match within {
        Some(w) => (w, WithinSource::Given),
        None => settling_requirement(sys, dof).map_or((0.02, WithinSource::Default), |w| {
            (w, WithinSource::Requirement)
        }),
    };
    let time_s = match t.settling_time(dof, within) {
        Ok(ts) => Some(ts),
        Err(response::ResponseError::NeverSettles) => None,
        Err(e) => return Err(e.to_string()),
    };
    // The same band as `Transient::settling_time` measures against.
    let of_peak = !(final_value != 0.0 && final_value.abs() > 1e-12 * peak.value);
    let half_width = within
        * if of_peak {
            peak.value
        } else {
            final_value.abs()
        };
    progress(4, TIME_STEPS);
    Ok(TimeHistory {
        points,
        measures: Some(TimeMeasures {
            final_value,
            peak: TimePoint {
                time_s: peak.time,
                displacement: peak_x,
            },
            settling: Settling {
                within,
                source,
                half_width,
                of_peak,
                time_s,
            },
        }),
    })
}

/// The tightest `settling of A within P%` on coordinate `dof` (as a fraction), if any.
fn settling_requirement(sys: &SystemModel, dof: usize) -> Option<f64> {
    sys.requirements
        .iter()
        .filter(|r| matches!(r.subject, Subject::Settling { .. }) && r.dof == Some(dof))
        .map(|r| r.within.map_or(0.02, |q| q.nominal))
        .filter(|w| *w > 0.0 && w.is_finite())
        .min_by(f64::total_cmp)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// One mass: ωn = √(k/m) = 50 rad/s, ζ = 0.1, a 500 N step and a 40 N drive at 15 Hz.
    const ONE_MASS: &str = "system s {
  mass m = 100 kg
  spring k between m and ground = 250 kN/m
  damper c between m and ground = 0.1 * 2 * sqrt(k * m)
  force f on m = 40 N at 15 Hz
  force lift on m = step 500 N
  require settling of m within 5% <= 1 s
  require settling of m within 10% <= 1 s
}
";

    fn checked(text: &str) -> crate::Checked {
        let checked = crate::check(text);
        assert!(!checked.has_errors(), "{:?}", checked.diagnostics);
        checked
    }

    #[test]
    fn sweep_reports_progress_once_per_point() {
        let c = checked(ONE_MASS);
        let sys = &c.model.systems[0];
        let mut calls = Vec::new();
        let request = SweepRequest {
            drive: None,
            dof: 0,
            range_hz: Some((1.0, 100.0)),
            points: 7,
            transmitted: false,
        };
        let sweep = frequency_sweep(&c.model, sys, &request, &mut |d, t| calls.push((d, t)));
        assert_eq!(sweep.map(|s| s.points.len()), Ok(7));
        let expected: Vec<(usize, usize)> = (1..=7).map(|d| (d, 7)).collect();
        assert_eq!(calls, expected);
    }

    #[test]
    fn time_measures_match_the_one_mass_closed_forms() {
        // Standard vibration texts (from memory): a step F on m, k, ζ < 1 settles at F/k and
        // first peaks at t = π/ωd with overshoot exp(−πζ/√(1−ζ²)).
        let c = checked(ONE_MASS);
        let sys = &c.model.systems[0];
        let mut calls = Vec::new();
        let request = TimeRequest {
            dof: 0,
            duration: 3.0,
            measures: true,
            within: None,
        };
        let h = time_history(&c.model, sys, &request, &mut |d, t| calls.push((d, t)));
        let h = match h {
            Ok(h) => h,
            Err(e) => panic!("{e}"),
        };
        assert_eq!(calls, vec![(1, 4), (2, 4), (3, 4), (4, 4)]);
        let m = h.measures.expect("measures were asked for");
        let (wn, z, xf) = (50.0f64, 0.1f64, 500.0 / 250e3);
        let wd = wn * (1.0 - z * z).sqrt();
        assert!((m.final_value - xf).abs() < 1e-12, "{}", m.final_value);
        let overshoot = (-std::f64::consts::PI * z / (1.0 - z * z).sqrt()).exp();
        assert!((m.peak.time_s - std::f64::consts::PI / wd).abs() < 1e-5);
        assert!((m.peak.displacement - xf * (1.0 + overshoot)).abs() < 1e-9 * xf);
        // The tighter of the two requirements' bands.
        assert_eq!(m.settling.within, 0.05);
        assert_eq!(m.settling.source, WithinSource::Requirement);
        assert!((m.settling.half_width - 0.05 * xf).abs() < 1e-15);
        assert!(!m.settling.of_peak);
        // At the settling time the response is on the band's edge (the band we report is the
        // one the engine measured against), and the envelope e^(−ζωn t)/√(1−ζ²) bounds it.
        let ts = m.settling.time_s.expect("settles within 3 s");
        let error =
            |t: f64| (1.0 / (1.0 - z * z).sqrt()) * (-z * wn * t).exp() * (wd * t + z.acos()).sin();
        assert!((error(ts).abs() * xf - m.settling.half_width).abs() < 1e-6 * xf);
        let envelope = (0.05 * (1.0 - z * z).sqrt()).ln() / (-z * wn);
        assert!(ts <= envelope && ts > 0.8 * envelope, "{ts} vs {envelope}");
    }

    #[test]
    fn a_given_band_wins_and_plain_exports_skip_the_measures() {
        let c = checked(ONE_MASS);
        let sys = &c.model.systems[0];
        let given = TimeRequest {
            dof: 0,
            duration: 3.0,
            measures: true,
            within: Some(0.02),
        };
        let h = time_history(&c.model, sys, &given, &mut |_, _| {});
        let m = h.ok().and_then(|h| h.measures).expect("measures");
        assert_eq!(
            (m.settling.within, m.settling.source),
            (0.02, WithinSource::Given)
        );
        let plain = TimeRequest {
            measures: false,
            ..given
        };
        let h = time_history(&c.model, sys, &plain, &mut |_, _| {});
        assert_eq!(h.map(|h| h.measures.is_none()), Ok(true));
        let bad = TimeRequest {
            within: Some(1.5),
            ..given
        };
        assert!(time_history(&c.model, sys, &bad, &mut |_, _| {}).is_err());
    }

    #[test]
    fn an_impulse_settles_into_a_band_around_zero_sized_by_its_peak() {
        // Standard vibration texts (from memory): an impulse J on m, k, c gives
        // x = J/(m ωd) e^(−ζωn t) sin(ωd t), which peaks where tan(ωd t) = √(1−ζ²)/ζ.
        let c = checked(
            "system s {
  mass m = 12 kg
  spring k between m and ground = 30 kN/m
  damper c between m and ground = 60 N*s/m
  force knock on m = impulse 3 N*s
}
",
        );
        let sys = &c.model.systems[0];
        let request = TimeRequest {
            dof: 0,
            duration: 3.0,
            measures: true,
            within: None,
        };
        let h = time_history(&c.model, sys, &request, &mut |_, _| {});
        let m = h.ok().and_then(|h| h.measures).expect("measures");
        let (wn, z) = (
            (30e3f64 / 12.0).sqrt(),
            60.0 / (2.0 * (30e3f64 * 12.0).sqrt()),
        );
        let wd = wn * (1.0 - z * z).sqrt();
        let tp = ((1.0 - z * z).sqrt() / z).atan() / wd;
        let xp = 3.0 / (12.0 * wd) * (-z * wn * tp).exp() * (wd * tp).sin();
        assert_eq!(m.final_value, 0.0);
        assert!(
            (m.peak.time_s - tp).abs() < 1e-6,
            "{} vs {tp}",
            m.peak.time_s
        );
        assert!((m.peak.displacement - xp).abs() < 1e-9 * xp);
        assert!(m.settling.of_peak);
        assert!((m.settling.half_width - 0.02 * xp).abs() < 1e-9 * xp);
    }

    #[test]
    fn an_undamped_response_never_settles() {
        let c = checked(
            "system s {
  mass m = 1 kg
  spring k between m and ground = 1 kN/m
  force f on m = step 1 N
}
",
        );
        let sys = &c.model.systems[0];
        let request = TimeRequest {
            dof: 0,
            duration: 2.0,
            measures: true,
            within: None,
        };
        let h = time_history(&c.model, sys, &request, &mut |_, _| {});
        let m = h.ok().and_then(|h| h.measures).expect("measures");
        assert_eq!(m.settling.time_s, None);
        assert_eq!(m.settling.source, WithinSource::Default);
        // x = (F/k)(1 − cos ωn t) peaks at 2F/k (standard vibration texts, from memory).
        assert!((m.peak.displacement - 2e-3).abs() < 1e-9);
    }
}
