//! One mass on a spring and a damper against the closed forms of standard vibration texts
//! (from memory), with r = ω/ωn, ωn = √(k/m), ζ = c/(2√(km)):
//! - transmissibility (force to ground, and base motion to mass)
//!   √((1+(2ζr)²)/((1−r²)²+(2ζr)²)), exactly 1 at r = √2 for every ζ;
//! - steady-state amplitude (F/k)/√((1−r²)²+(2ζr)²), peak 1/(2ζ√(1−ζ²)) × F/k at
//!   r = √(1−2ζ²);
//! - step overshoot exp(−πζ/√(1−ζ²));
//! - 2% settling time below and close to the envelope bound −ln(0.02√(1−ζ²))/(ζωn)
//!   (and near 4/(ζωn), a rule of thumb);
//! - impulse response x(t) = J/(mωd) e^{−ζωn t} sin ωd t;
//! - static sag δ = mg/k and the sag rule f = (1/2π)√(g/δ) (common practice: about 15.76/√δ
//!   Hz with δ in mm).

use std::f64::consts::{PI, TAU};

use nalgebra::{DMatrix, DVector};
use sprung_engine::assemble::Matrices;
use sprung_engine::model::{DofKind, MotionKind};
use sprung_engine::modes::{ModalConfig, analyze};
use sprung_engine::response::{
    DriveInput, Excitation, GroundLink, LinkKind, ResponseError, Waveform, amplitude,
    peak_over_band, resonance_hints, separation, transmissibility, transmissibility_at,
};
use sprung_engine::statics::sag;
use sprung_engine::time_response::{Loading, TimeConfig, simulate};

const M: f64 = 12.0;
const K: f64 = 48_000.0;

fn wn() -> f64 {
    (K / M).sqrt()
}

fn one_mass(zeta: f64) -> (Matrices, Vec<GroundLink>) {
    let c = zeta * 2.0 * (K * M).sqrt();
    let one = |x: f64| DMatrix::from_element(1, 1, x);
    let mats = Matrices::from_dense(one(M), one(c), one(K), vec![DofKind::Translational]);
    let ground = vec![
        GroundLink {
            element: 0,
            dof: 0,
            kind: LinkKind::Spring,
            dof_kind: DofKind::Translational,
            value: K,
        },
        GroundLink {
            element: 1,
            dof: 0,
            kind: LinkKind::Damper,
            dof_kind: DofKind::Translational,
            value: c,
        },
    ];
    (mats, ground)
}

fn closed_transmissibility(r: f64, z: f64) -> f64 {
    ((1.0 + (2.0 * z * r).powi(2)) / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2))).sqrt()
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

const ZETAS: [f64; 6] = [0.001, 0.01, 0.05, 0.1, 0.3, 0.7];

#[test]
fn transmissibility_matches_the_closed_form_for_force_and_base_motion() {
    for z in ZETAS {
        let (mats, ground) = one_mass(z);
        for i in 0..60 {
            let r = 0.05 * 1.1_f64.powi(i);
            let w = r * wn();
            let want = closed_transmissibility(r, z);
            let force =
                transmissibility_at(&mats, &ground, Excitation::Load { dof: 0 }, None, w).unwrap();
            assert!(
                rel(force, want) < 1e-10,
                "force ζ={z} r={r}: {force} vs {want}"
            );
            for motion in [
                MotionKind::Displacement,
                MotionKind::Velocity,
                MotionKind::Acceleration,
            ] {
                let base = Excitation::Base {
                    kind: DofKind::Translational,
                    motion,
                };
                let t = transmissibility_at(&mats, &ground, base, None, w).unwrap();
                assert!(
                    rel(t, want) < 1e-10,
                    "{motion:?} ζ={z} r={r}: {t} vs {want}"
                );
            }
        }
        // Exactly 1 at r = √2, whatever the damping.
        let w = 2f64.sqrt() * wn();
        let t = transmissibility_at(&mats, &ground, Excitation::Load { dof: 0 }, None, w).unwrap();
        assert!((t - 1.0).abs() < 1e-12, "ζ={z}: {t}");
    }
}

#[test]
fn steady_state_amplitude_and_its_peak_over_a_band() {
    let f0 = 150.0;
    for z in ZETAS {
        let (mats, ground) = one_mass(z);
        let modal = analyze(&mats, &ModalConfig::default()).unwrap();
        for i in 0..40 {
            let r = 0.1 * 1.1_f64.powi(i);
            let drive = DriveInput {
                excitation: Excitation::Load { dof: 0 },
                amplitude: f0,
                waveform: Waveform::Harmonic { omega: r * wn() },
            };
            let a = amplitude(&mats, &ground, &[drive], 0, &modal).unwrap();
            let want = (f0 / K) / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
            assert!(rel(a, want) < 1e-10, "ζ={z} r={r}: {a} vs {want}");
        }
        if z < 0.5 {
            // A band that holds the resonance reports the resonant peak, not a grid value.
            let drive = DriveInput {
                excitation: Excitation::Load { dof: 0 },
                amplitude: f0,
                waveform: Waveform::Band {
                    lo: 0.37 * wn(),
                    hi: 2.9 * wn(),
                },
            };
            let peak = (f0 / K) / (2.0 * z * (1.0 - z * z).sqrt());
            let a = amplitude(&mats, &ground, &[drive], 0, &modal).unwrap();
            assert!(rel(a, peak) < 1e-9, "ζ={z}: band peak {a} vs {peak}");
        }
    }
}

#[test]
fn a_band_catches_a_resonance_of_zeta_0_001() {
    let z = 0.001;
    let (mats, ground) = one_mass(z);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let f0 = 1.0;
    let f = |w: f64| {
        Ok(
            sprung_engine::response::harmonic(&mats, &ground, Excitation::Load { dof: 0 }, f0, w)?
                .x[0]
                .norm(),
        )
    };
    let want_value = (f0 / K) / (2.0 * z * (1.0 - z * z).sqrt());
    let want_omega = wn() * (1.0 - 2.0 * z * z).sqrt();
    for hints in [resonance_hints(&modal), vec![]] {
        let p = peak_over_band(f, 0.5 * wn(), 1.7 * wn(), &hints).unwrap();
        assert!(
            rel(p.value, want_value) < 1e-9,
            "{} vs {want_value}",
            p.value
        );
        assert!(
            rel(p.omega, want_omega) < 1e-6,
            "{} vs {want_omega}",
            p.omega
        );
    }
    // The plain 200-point grid alone would be far off: its best point is below half the peak.
    let (lo, hi) = (0.5 * wn(), 1.7 * wn());
    let grid_best = (0..200)
        .map(|i| lo * ((hi / lo).ln() * i as f64 / 199.0).exp())
        .map(|w| f(w).unwrap())
        .fold(0.0, f64::max);
    assert!(grid_best < 0.5 * want_value, "{grid_best} vs {want_value}");
}

#[test]
fn band_transmissibility_and_separation() {
    let z = 0.05;
    let (mats, ground) = one_mass(z);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    // Well above resonance the transmissibility falls with r: its band peak is at the low end.
    let drive = DriveInput {
        excitation: Excitation::Load { dof: 0 },
        amplitude: 1.0,
        waveform: Waveform::Band {
            lo: 3.0 * wn(),
            hi: 5.0 * wn(),
        },
    };
    let t = transmissibility(&mats, &ground, &drive, None, &modal).unwrap();
    assert!(rel(t.value, closed_transmissibility(3.0, z)) < 1e-10);
    assert!(rel(t.omega, 3.0 * wn()) < 1e-12);
    // Separation: |fn − fd| / fd (language.md §5).
    let s = separation(&drive, &modal).unwrap();
    assert!(rel(s.value, (3.0 * wn() - wn()) / (3.0 * wn())) < 1e-12);
    let at = |omega: f64| DriveInput {
        waveform: Waveform::Harmonic { omega },
        ..drive
    };
    assert!(rel(separation(&at(0.8 * wn()), &modal).unwrap().value, 0.25) < 1e-12);
    let inside = DriveInput {
        waveform: Waveform::Band {
            lo: 0.5 * wn(),
            hi: 2.0 * wn(),
        },
        ..drive
    };
    assert_eq!(separation(&inside, &modal).unwrap().value, 0.0);
    let step = DriveInput {
        waveform: Waveform::Step,
        ..drive
    };
    assert_eq!(
        transmissibility(&mats, &ground, &step, None, &modal).err(),
        Some(ResponseError::NotHarmonic)
    );
}

fn step_loading(f0: f64) -> Loading {
    Loading {
        force: DVector::from_element(1, f0),
        x0: DVector::zeros(1),
        v0: DVector::zeros(1),
        has_step: true,
    }
}

#[test]
fn step_overshoot_and_settling_time() {
    for z in [0.01, 0.05, 0.1, 0.2, 0.5, 0.8] {
        let (mats, _) = one_mass(z);
        let modal = analyze(&mats, &ModalConfig::default()).unwrap();
        let tr = simulate(&mats, &step_loading(300.0), &modal, &TimeConfig::default()).unwrap();
        assert!(rel(tr.final_value(0).unwrap(), 300.0 / K) < 1e-12);
        let os = tr.overshoot(0).unwrap();
        let want = (-PI * z / (1.0 - z * z).sqrt()).exp();
        assert!(rel(os, want) < 1e-6, "ζ={z}: overshoot {os} vs {want}");
        let ts = tr.settling_time(0, 0.02).unwrap();
        let wd = wn() * (1.0 - z * z).sqrt();
        let envelope = -(0.02 * (1.0 - z * z).sqrt()).ln() / (z * wn());
        // The response touches its envelope at most once per half damped period.
        assert!(
            ts <= envelope * (1.0 + 1e-9) && ts >= envelope - PI / wd,
            "ζ={z}: settling {ts} vs envelope {envelope}"
        );
        if z <= 0.1 {
            // Rule of thumb: 4/(ζωn).
            let thumb = 4.0 / (z * wn());
            assert!(rel(ts, thumb) < 0.15, "ζ={z}: {ts} vs {thumb}");
        }
    }
}

#[test]
fn impulse_peak_and_settling_relative_to_the_peak() {
    let z = 0.05;
    let j = 2.5;
    let (mats, _) = one_mass(z);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let loading = Loading {
        force: DVector::zeros(1),
        x0: DVector::zeros(1),
        v0: DVector::from_element(1, j / M),
        has_step: false,
    };
    let tr = simulate(&mats, &loading, &modal, &TimeConfig::default()).unwrap();
    let wd = wn() * (1.0 - z * z).sqrt();
    // dx/dt = 0 where tan(ωd t) = ωd / (ζωn).
    let tp = (wd / (z * wn())).atan() / wd;
    let x = |t: f64| j / (M * wd) * (-z * wn() * t).exp() * (wd * t).sin();
    let p = tr.peak_displacement(0).unwrap();
    assert!(rel(p.value, x(tp)) < 1e-9, "{} vs {}", p.value, x(tp));
    assert!(rel(p.time, tp) < 1e-3, "{} vs {tp}", p.time);
    for t in [0.0, 0.013, 0.1, 0.37] {
        let got = tr.state_at(t).unwrap()[0];
        assert!(
            (got - x(t)).abs() < 1e-12 * x(tp),
            "t={t}: {got} vs {}",
            x(t)
        );
    }
    assert_eq!(tr.overshoot(0).err(), Some(ResponseError::ZeroFinal));
    // Final value 0: the band is 2% of the peak, so the envelope bound is
    // ln(peak envelope / (0.02 peak)) / (ζωn) with envelope J/(mωd) e^{−ζωn t}.
    let ts = tr.settling_time(0, 0.02).unwrap();
    let bound = ((j / (M * wd)) / (0.02 * x(tp))).ln() / (z * wn());
    assert!(
        ts <= bound * (1.0 + 1e-9) && ts >= bound - PI / wd,
        "{ts} vs {bound}"
    );
}

#[test]
fn static_sag_and_the_sag_rule() {
    let g = 9.80665;
    for k in [5e3, 4.8e4, 2e6] {
        let one = |x: f64| DMatrix::from_element(1, 1, x);
        let mats = Matrices::from_dense(one(M), one(0.0), one(k), vec![DofKind::Translational]);
        let delta = sag(&mats, g).unwrap()[0];
        assert!(rel(delta, M * g / k) < 1e-12);
        let modal = analyze(&mats, &ModalConfig::default()).unwrap();
        let f = modal.modes[0].natural_frequency_hz;
        assert!(rel(f, (g / delta).sqrt() / TAU) < 1e-12);
        // Common practice: f ≈ 15.76 / √(δ in mm) Hz.
        assert!(rel(f, 15.76 / (delta * 1e3).sqrt()) < 1e-3);
    }
}

#[test]
fn rigid_unstable_and_unbounded_cases_are_errors() {
    let free = Matrices::from_dense(
        DMatrix::from_element(1, 1, 1.0),
        DMatrix::from_element(1, 1, 0.0),
        DMatrix::from_element(1, 1, 0.0),
        vec![DofKind::Translational],
    );
    assert_eq!(sag(&free, 9.81).err(), Some(ResponseError::RigidBody));
    let modal = analyze(&free, &ModalConfig::default()).unwrap();
    assert_eq!(
        simulate(&free, &step_loading(1.0), &modal, &TimeConfig::default()).err(),
        Some(ResponseError::RigidBody)
    );
    let negative = Matrices::from_dense(
        free.dense_m(),
        free.dense_c(),
        DMatrix::from_element(1, 1, -100.0),
        free.dof_kinds.clone(),
    );
    let modal = analyze(&negative, &ModalConfig::default()).unwrap();
    assert_eq!(
        simulate(
            &negative,
            &step_loading(1.0),
            &modal,
            &TimeConfig::default()
        )
        .err(),
        Some(ResponseError::Unstable)
    );
    assert_eq!(sag(&negative, 9.81).err(), Some(ResponseError::Unstable));
    // An undamped mass never settles, but its overshoot is exactly 1 (peak twice the final).
    let undamped = Matrices::from_dense(
        free.dense_m(),
        free.dense_c(),
        DMatrix::from_element(1, 1, 100.0),
        free.dof_kinds,
    );
    let modal = analyze(&undamped, &ModalConfig::default()).unwrap();
    let tr = simulate(
        &undamped,
        &step_loading(1.0),
        &modal,
        &TimeConfig::default(),
    )
    .unwrap();
    assert!(rel(tr.overshoot(0).unwrap(), 1.0) < 1e-9);
    assert_eq!(
        tr.settling_time(0, 0.02).err(),
        Some(ResponseError::NeverSettles)
    );
}
