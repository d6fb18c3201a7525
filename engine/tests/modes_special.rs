//! Rigid-body and unstable modes, non-classical damping, and errors. Sources: free–free two
//! masses have ω = 0 and ω² = k (m1 + m2)/(m1 m2) (standard vibration texts, from memory); a
//! negative stiffness gives a real root pair ±√(−k/m) (same source); for light damping the
//! roots of mode j are −Dⱼⱼ/2 ± iωj to first order in D = Φᵀ C Φ (first-order perturbation,
//! from memory).

use nalgebra::{Complex, DMatrix};
use sprung_engine::assemble::Matrices;
use sprung_engine::eigen::{self, EigenError};
use sprung_engine::model::DofKind;
use sprung_engine::modes::{
    DampedMethod, DampingKind, ModalConfig, ModalError, ModeRegime, analyze,
};

fn mats(m: &[f64], c: &[f64], k: &[f64]) -> Matrices {
    let n = m.len();
    Matrices::from_dense(
        DMatrix::from_diagonal(&m.to_vec().into()),
        DMatrix::from_row_slice(n, n, c),
        DMatrix::from_row_slice(n, n, k),
        vec![DofKind::Translational; n],
    )
}

fn both() -> [ModalConfig; 2] {
    [
        ModalConfig::default(),
        ModalConfig {
            method: DampedMethod::StateSpace,
            ..ModalConfig::default()
        },
    ]
}

#[test]
fn free_free_two_masses_have_one_rigid_body_mode() {
    let (m1, m2, k) = (3.0_f64, 5.0_f64, 12_000.0_f64);
    let w = (k * (m1 + m2) / (m1 * m2)).sqrt();
    for c in [0.0, 40.0] {
        let model = mats(&[m1, m2], &[c, -c, -c, c], &[k, -k, -k, k]);
        for config in both() {
            let r = analyze(&model, &config).unwrap();
            assert_eq!(r.modes[0].regime, ModeRegime::RigidBody, "c = {c}");
            assert_eq!(r.modes[0].natural_frequency, 0.0);
            assert_eq!(r.modes[0].damping_ratio, None);
            // The rigid shape moves both masses together.
            assert!((r.modes[0].shape_unit()[0] - r.modes[0].shape_unit()[1]).abs() < 1e-12);
            assert_ne!(r.modes[1].regime, ModeRegime::RigidBody);
            assert!((r.modes[1].natural_frequency - w).abs() < 1e-10 * w);
            let expected = if c == 0.0 {
                ModeRegime::Undamped
            } else {
                ModeRegime::Underdamped
            };
            assert_eq!(r.modes[1].regime, expected);
        }
    }
}

#[test]
fn a_free_mass_with_only_a_damper_is_rigid_body() {
    let model = mats(&[2.0], &[10.0], &[0.0]);
    for config in both() {
        let r = analyze(&model, &config).unwrap();
        assert_eq!(r.modes[0].regime, ModeRegime::RigidBody);
    }
    // A negative damper on a free mass makes its moving root +c/m: unstable.
    let model = mats(&[2.0], &[-10.0], &[0.0]);
    let r = analyze(&model, &ModalConfig::default()).unwrap();
    assert_eq!(r.modes[0].regime, ModeRegime::Unstable);
}

#[test]
fn negative_stiffness_or_damping_is_unstable() {
    // One mass on a negative spring: roots ±√(k/m).
    let r = analyze(&mats(&[4.0], &[0.0], &[-100.0]), &ModalConfig::default()).unwrap();
    let mode = &r.modes[0];
    assert_eq!(mode.regime, ModeRegime::Unstable);
    assert!((mode.roots[0].re.abs() - 5.0).abs() < 1e-12);
    assert_eq!(mode.damped_frequency, None);
    // Two masses, ground –(+1000)– m1 –(−1500)– m2: K indefinite, exactly one unstable mode.
    let k = [1000.0 - 1500.0, 1500.0, 1500.0, -1500.0];
    for c in [0.0, 5.0] {
        for config in both() {
            let r = analyze(&mats(&[1.0, 1.0], &[c, 0.0, 0.0, 0.0], &k), &config).unwrap();
            let unstable = r.modes.iter().filter(|m| m.regime == ModeRegime::Unstable);
            assert_eq!(unstable.count(), 1, "{:?}", r.modes);
            assert!(r.modes[0].omega2 < 0.0);
            assert_eq!(r.modes[0].regime, ModeRegime::Unstable);
        }
    }
    // A negative damper on a sprung mass: a growing oscillation, Re λ > 0.
    let r = analyze(&mats(&[1.0], &[-2.0], &[100.0]), &ModalConfig::default()).unwrap();
    assert_eq!(r.modes[0].regime, ModeRegime::Unstable);
    assert!((r.modes[0].damped_frequency.unwrap() - 99f64.sqrt()).abs() < 1e-12);
}

#[test]
fn non_classical_damping_pairs_each_mode_with_its_own_roots() {
    // A three-mass chain with one light damper on the last mass only: not proportional.
    let m = [1.0, 2.0, 1.5];
    let k = [
        3000.0, -1000.0, 0.0, -1000.0, 1800.0, -800.0, 0.0, -800.0, 800.0,
    ];
    let c = [0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.3];
    let model = mats(&m, &c, &k);
    let r = analyze(&model, &ModalConfig::default()).unwrap();
    assert_eq!(r.damping, DampingKind::NonClassical);
    let und = eigen::generalized_symmetric(&model.dense_k(), &model.dense_m()).unwrap();
    let d = und.shapes.transpose() * model.dense_c() * &und.shapes;
    for (j, mode) in r.modes.iter().enumerate() {
        assert_eq!(mode.regime, ModeRegime::Underdamped);
        let w = und.omega2[j].sqrt();
        let first_order = Complex::new(-d[(j, j)] / 2.0, w);
        let upper = mode.roots.iter().find(|z| z.im > 0.0).unwrap();
        // Second-order error: D² / (frequency gap) is below 1e-3 here.
        assert!(
            (upper - first_order).norm() < 1e-3,
            "mode {}: {upper}",
            j + 1
        );
        assert!(mode.assignment_mac > 0.99);
    }
    // The assigned roots are exactly the roots of the raw state matrix, as a multiset.
    let raw = eigen::state_space(&model.dense_m(), &model.dense_c(), &model.dense_k())
        .unwrap()
        .values;
    let mut mine = r.roots();
    assert_eq!(mine.len(), raw.len());
    for z in raw {
        let (at, dist) = mine
            .iter()
            .enumerate()
            .map(|(i, w)| (i, (w - z).norm()))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .unwrap();
        assert!(dist <= 1e-10 * z.norm(), "{z}");
        mine.swap_remove(at);
    }
}

#[test]
fn empty_and_malformed_inputs_are_errors_not_panics() {
    let empty = mats(&[], &[], &[]);
    assert!(
        analyze(&empty, &ModalConfig::default())
            .unwrap()
            .modes
            .is_empty()
    );
    let bad = mats(&[1.0], &[0.0], &[f64::NAN]);
    assert_eq!(
        analyze(&bad, &ModalConfig::default()).err(),
        Some(ModalError::Eigen(EigenError::NonFinite))
    );
    let zero_mass = mats(&[1.0, 0.0], &[0.0; 4], &[1.0, 0.0, 0.0, 1.0]);
    assert_eq!(
        analyze(&zero_mass, &ModalConfig::default()).err(),
        Some(ModalError::Eigen(EigenError::NotPositiveDefinite {
            index: 1
        }))
    );
    let mut wrong = mats(&[1.0, 1.0], &[0.0; 4], &[1.0, 0.0, 0.0, 1.0]);
    wrong.c = nalgebra_sparse::CscMatrix::zeros(1, 1);
    assert!(analyze(&wrong, &ModalConfig::default()).is_err());
}
