//! Tuned mass absorber on a one-mass main system, Den Hartog's optimum (from memory): with mass
//! ratio μ = m/M, tuning f = ωa/Ωn = 1/(1+μ) and damping c/c_c = √(3μ/(8(1+μ)³)) where
//! c_c = 2mΩn, the main mass's response curve passes nearly horizontally through its two fixed
//! points, both of height √(1 + 2/μ) × F/K, so its two peaks are nearly equal in height and
//! close to that value.

use nalgebra::DMatrix;
use sprung_engine::assemble::Matrices;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{ModalConfig, analyze};
use sprung_engine::response::{
    Excitation, harmonic, min_over_band, peak_over_band, resonance_hints,
};

const MAIN: f64 = 100.0;
const OMEGA: f64 = std::f64::consts::TAU * 10.0;

fn absorber(mu: f64) -> Matrices {
    absorber_tuned(mu, 1.0 / (1.0 + mu))
}

fn absorber_tuned(mu: f64, f: f64) -> Matrices {
    let k_main = MAIN * OMEGA * OMEGA;
    let m = mu * MAIN;
    let ka = m * (f * OMEGA).powi(2);
    let ca = (3.0 * mu / (8.0 * (1.0 + mu).powi(3))).sqrt() * 2.0 * m * OMEGA;
    Matrices::from_dense(
        DMatrix::from_row_slice(2, 2, &[MAIN, 0.0, 0.0, m]),
        DMatrix::from_row_slice(2, 2, &[ca, -ca, -ca, ca]),
        DMatrix::from_row_slice(2, 2, &[k_main + ka, -ka, -ka, ka]),
        vec![DofKind::Translational; 2],
    )
}

#[test]
fn den_hartog_optimum_gives_two_nearly_equal_peaks() {
    for mu in [0.05, 0.1, 0.2] {
        let mats = absorber(mu);
        let modal = analyze(&mats, &ModalConfig::default()).unwrap();
        let hints = resonance_hints(&modal);
        let k_main = MAIN * OMEGA * OMEGA;
        // |X_main| / (F/K) under a unit force on the main mass.
        let gain = |w: f64| {
            Ok(harmonic(&mats, &[], Excitation::Load { dof: 0 }, 1.0, w)?.x[0].norm() * k_main)
        };
        let (w1, w2) = (
            modal.modes[0].natural_frequency,
            modal.modes[1].natural_frequency,
        );
        let valley = min_over_band(gain, w1, w2, &hints).unwrap();
        let low = peak_over_band(gain, 0.5 * OMEGA, valley.omega, &hints).unwrap();
        let high = peak_over_band(gain, valley.omega, 1.5 * OMEGA, &hints).unwrap();
        let fixed_point = (1.0 + 2.0 / mu).sqrt();
        let spread = (low.value - high.value).abs() / low.value.max(high.value);
        eprintln!(
            "μ={mu}: peaks {:.4} at {:.4} and {:.4} at {:.4}, valley {:.4}, fixed points {fixed_point:.4}, spread {spread:.4}",
            low.value,
            low.omega / OMEGA,
            high.value,
            high.omega / OMEGA,
            valley.value
        );
        assert!(
            spread < 0.005,
            "μ={mu}: peaks {} and {}",
            low.value,
            high.value
        );
        for p in [low.value, high.value] {
            assert!(
                (p - fixed_point).abs() / fixed_point < 0.01,
                "μ={mu}: peak {p} vs fixed points {fixed_point}"
            );
        }
        // The valley is a real dip between the two peaks.
        assert!(valley.value < 0.9 * low.value.min(high.value));
        assert!(low.omega < valley.omega && valley.omega < high.omega);
    }
}

#[test]
fn a_detuned_absorber_has_unequal_peaks() {
    // Tuned to the main frequency (f = 1) instead of 1/(1+μ): the peaks part by far more.
    let mu = 0.1;
    let mats = absorber_tuned(mu, 1.0);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let hints = resonance_hints(&modal);
    let gain = |w: f64| Ok(harmonic(&mats, &[], Excitation::Load { dof: 0 }, 1.0, w)?.x[0].norm());
    let (w1, w2) = (
        modal.modes[0].natural_frequency,
        modal.modes[1].natural_frequency,
    );
    let valley = min_over_band(gain, w1, w2, &hints).unwrap();
    let low = peak_over_band(gain, 0.5 * OMEGA, valley.omega, &hints).unwrap();
    let high = peak_over_band(gain, valley.omega, 1.5 * OMEGA, &hints).unwrap();
    let spread = (low.value - high.value).abs() / low.value.max(high.value);
    assert!(spread > 0.1, "spread {spread}");
}
