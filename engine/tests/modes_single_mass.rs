//! One mass on a spring and a damper. Source: common practice (standard vibration texts, from
//! memory): ω0 = √(k/m), γ = c/(2m), ζ = γ/ω0; underdamped when ω0 > γ with damped frequency
//! √(ω0² − γ²), critically damped when c = 2√(km), overdamped when γ > ω0 with real roots
//! −γ ± √(γ² − ω0²).

use nalgebra::DMatrix;
use sprung_engine::assemble::Matrices;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{DampedMethod, ModalConfig, ModeRegime, analyze};

fn one_mass(m: f64, c: f64, k: f64) -> Matrices {
    let one = |x: f64| DMatrix::from_element(1, 1, x);
    Matrices::from_dense(one(m), one(c), one(k), vec![DofKind::Translational])
}

fn configs() -> [ModalConfig; 2] {
    [
        ModalConfig::default(),
        ModalConfig {
            method: DampedMethod::StateSpace,
            ..ModalConfig::default()
        },
    ]
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(f64::MIN_POSITIVE)
}

#[test]
fn undamped_underdamped_critical_overdamped() {
    let (m, k) = (2.0_f64, 800.0_f64);
    let w0 = (k / m).sqrt(); // 20 rad/s
    for config in configs() {
        // Undamped.
        let r = analyze(&one_mass(m, 0.0, k), &config).unwrap();
        let mode = &r.modes[0];
        assert_eq!(mode.regime, ModeRegime::Undamped);
        assert_eq!(mode.damping_ratio, Some(0.0));
        assert!(rel(mode.natural_frequency, w0) < 1e-14);
        assert!(rel(mode.damped_frequency.unwrap(), w0) < 1e-14);
        assert!(rel(mode.natural_frequency_hz, w0 / (2.0 * std::f64::consts::PI)) < 1e-14);
        assert_eq!(mode.quality_factor, None);
        assert_eq!(mode.shape_unit(), vec![1.0]);
        // φᵀ M φ = 1.
        assert!(rel(mode.shape[0] * m * mode.shape[0], 1.0) < 1e-14);

        // Underdamped: c = 8 N·s/m, γ = 2 /s, ζ = 0.1.
        let c = 8.0;
        let gamma = c / (2.0 * m);
        let r = analyze(&one_mass(m, c, k), &config).unwrap();
        let mode = &r.modes[0];
        assert_eq!(mode.regime, ModeRegime::Underdamped);
        assert!(rel(mode.damping_ratio.unwrap(), gamma / w0) < 1e-12);
        assert!(rel(mode.natural_frequency, w0) < 1e-12);
        let wd = (w0 * w0 - gamma * gamma).sqrt();
        assert!(rel(mode.damped_frequency.unwrap(), wd) < 1e-12);
        assert!(rel(mode.quality_factor.unwrap(), w0 / (2.0 * gamma)) < 1e-12);
        assert!(rel(mode.decay_time_constant.unwrap(), 1.0 / gamma) < 1e-12);
        let zeta = gamma / w0;
        let logdec = 2.0 * std::f64::consts::PI * zeta / (1.0 - zeta * zeta).sqrt();
        assert!(rel(mode.log_decrement.unwrap(), logdec) < 1e-12);
        for root in mode.roots {
            assert!(rel(root.re, -gamma) < 1e-12);
            assert!(rel(root.im.abs(), wd) < 1e-12);
        }

        // Critically damped: c = 2√(km) written as an expression.
        let c = 2.0 * (k * m).sqrt();
        let r = analyze(&one_mass(m, c, k), &config).unwrap();
        let mode = &r.modes[0];
        assert_eq!(mode.regime, ModeRegime::CriticallyDamped, "{mode:?}");
        assert!((mode.damping_ratio.unwrap() - 1.0).abs() < 1e-9);
        assert!(rel(mode.natural_frequency, w0) < 1e-9);
        assert_eq!(mode.damped_frequency, None);
        assert_eq!(mode.log_decrement, None);

        // Overdamped: c = 200 N·s/m, γ = 50 /s > ω0.
        let c = 200.0;
        let gamma = c / (2.0 * m);
        let r = analyze(&one_mass(m, c, k), &config).unwrap();
        let mode = &r.modes[0];
        assert_eq!(mode.regime, ModeRegime::Overdamped);
        assert!(rel(mode.damping_ratio.unwrap(), gamma / w0) < 1e-12);
        assert!(rel(mode.natural_frequency, w0) < 1e-12);
        assert_eq!(mode.damped_frequency, None);
        let mut roots = [mode.roots[0].re, mode.roots[1].re];
        roots.sort_by(f64::total_cmp);
        let s = (gamma * gamma - w0 * w0).sqrt();
        assert!(rel(roots[0], -gamma - s) < 1e-12);
        assert!(rel(roots[1], -gamma + s) < 1e-12);
    }
}

#[test]
fn critical_damping_of_many_single_masses() {
    // c = 2√(km) for masses and stiffnesses spread over many decades: always critical.
    let mut seed = 0x2545_f491_4f6c_dd1d_u64;
    let mut next = || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (seed >> 11) as f64 / (1u64 << 53) as f64
    };
    for _ in 0..500 {
        let m = 10f64.powf(-3.0 + 6.0 * next());
        let k = 10f64.powf(0.0 + 8.0 * next());
        let c = 2.0 * (k * m).sqrt();
        for config in configs() {
            let r = analyze(&one_mass(m, c, k), &config).unwrap();
            assert_eq!(
                r.modes[0].regime,
                ModeRegime::CriticallyDamped,
                "m = {m}, k = {k}: {:?}",
                r.modes[0]
            );
        }
    }
}
