//! Uniform chains of N equal masses m and springs k. Source: the standard closed form for the
//! discrete chain (from memory): fixed–fixed ωj = 2√(k/m)·sin(jπ/(2(N+1))) with shape
//! xᵢ ∝ sin(i j π/(N+1)); fixed–free ωj = 2√(k/m)·sin((2j−1)π/(2(2N+1))).

use nalgebra::DMatrix;
use sprung_engine::assemble::Matrices;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{ModalConfig, ModeRegime, analyze};

/// A chain ground – m – m – … – m, with a spring to ground at the far end too when `fixed_end`.
fn chain(n: usize, m: f64, k: f64, fixed_end: bool) -> Matrices {
    let mut kk = DMatrix::zeros(n, n);
    kk[(0, 0)] += k;
    for i in 0..n - 1 {
        kk[(i, i)] += k;
        kk[(i + 1, i + 1)] += k;
        kk[(i, i + 1)] -= k;
        kk[(i + 1, i)] -= k;
    }
    if fixed_end {
        kk[(n - 1, n - 1)] += k;
    }
    Matrices::from_dense(
        DMatrix::from_diagonal_element(n, n, m),
        DMatrix::zeros(n, n),
        kk,
        vec![DofKind::Translational; n],
    )
}

#[test]
fn fixed_fixed_chains_match_the_closed_form() {
    let (m, k) = (1.7_f64, 2300.0_f64);
    let pi = std::f64::consts::PI;
    for n in 1..=50 {
        let r = analyze(&chain(n, m, k, true), &ModalConfig::default()).unwrap();
        assert_eq!(r.modes.len(), n);
        for (j0, mode) in r.modes.iter().enumerate() {
            let j = (j0 + 1) as f64;
            let exact = 2.0 * (k / m).sqrt() * (j * pi / (2.0 * (n as f64 + 1.0))).sin();
            let err = (mode.natural_frequency - exact).abs() / exact;
            assert!(
                err < 1e-10,
                "N = {n}, mode {j}: {} vs {exact}",
                mode.natural_frequency
            );
            assert_eq!(mode.regime, ModeRegime::Undamped);
            // Shape ∝ sin(i j π/(N+1)), compared after unit scaling (sign fixed by the max).
            let s: Vec<f64> = (1..=n)
                .map(|i| (i as f64 * j * pi / (n as f64 + 1.0)).sin())
                .collect();
            // The engine signs by the first entry of largest magnitude (to rounding).
            let big = s.iter().fold(0.0_f64, |a, &x| a.max(x.abs()));
            let peak = *s.iter().find(|x| x.abs() >= big * (1.0 - 1e-9)).unwrap();
            for (a, b) in mode.shape_unit().iter().zip(&s) {
                assert!((a - b / peak).abs() < 1e-8, "N = {n}, mode {j}");
            }
        }
    }
}

#[test]
fn fixed_free_chains_match_the_closed_form() {
    let (m, k) = (0.35_f64, 91_000.0_f64);
    let pi = std::f64::consts::PI;
    for n in 1..=50 {
        let r = analyze(&chain(n, m, k, false), &ModalConfig::default()).unwrap();
        for (j0, mode) in r.modes.iter().enumerate() {
            let j = (j0 + 1) as f64;
            let exact = 2.0
                * (k / m).sqrt()
                * ((2.0 * j - 1.0) * pi / (2.0 * (2.0 * n as f64 + 1.0))).sin();
            let err = (mode.natural_frequency - exact).abs() / exact;
            assert!(
                err < 1e-10,
                "N = {n}, mode {j}: {} vs {exact}",
                mode.natural_frequency
            );
            // Mass normalisation: m Σ φᵢ² = 1.
            let norm: f64 = mode.shape.iter().map(|x| m * x * x).sum();
            assert!((norm - 1.0).abs() < 1e-12);
        }
    }
}
