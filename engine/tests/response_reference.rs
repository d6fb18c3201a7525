//! Cross-check against a reference library: every fixture in tests/reference/response/ was
//! written by tests/reference/response_reference.py with numpy 2.1.3 and scipy 1.14.1:
//! the state-space resolvent C (iωI − A)⁻¹ B by scipy.linalg.solve, scipy.signal.freqresp (1-2
//! coordinates), scipy.signal.step, scipy.signal.impulse and scipy.signal.lsim of the same
//! matrices. We compute the frequency response as the second-order solve
//! (K − ω²M + iωC)⁻¹ F and the time response by our own matrix exponential, and compare at
//! 1e-8 (frequency) and 1e-6 (time) relative to the reference's magnitude.

use std::path::PathBuf;

use nalgebra::{DMatrix, DVector};
use serde_json::Value;
use sprung_engine::assemble::Matrices;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{ModalConfig, analyze};
use sprung_engine::response::{Excitation, harmonic};
use sprung_engine::time_response::{Loading, TimeConfig, simulate};

fn fixtures() -> Vec<(String, Value)> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/reference/response");
    let mut out = Vec::new();
    for entry in std::fs::read_dir(&dir).expect("fixture folder") {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "json") {
            let text = std::fs::read_to_string(&path).unwrap();
            let name = path.file_name().unwrap().to_string_lossy().into_owned();
            out.push((name, serde_json::from_str(&text).unwrap()));
        }
    }
    out.sort_by(|a, b| a.0.cmp(&b.0));
    out
}

fn matrix(v: &Value) -> DMatrix<f64> {
    let rows = v.as_array().unwrap();
    let n = rows.len();
    DMatrix::from_fn(n, n, |i, j| rows[i][j].as_f64().unwrap())
}

fn floats(v: &Value) -> Vec<f64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

fn mats(fx: &Value) -> Matrices {
    let m = matrix(&fx["M"]);
    let n = m.nrows();
    Matrices::from_dense(
        m,
        matrix(&fx["C"]),
        matrix(&fx["K"]),
        vec![DofKind::Translational; n],
    )
}

/// The worst |computed − reference| / max(|reference|, 1e-3 × the largest |reference| of that
/// coordinate over all frequencies); the floor keeps antiresonance dips, where the reference
/// itself has few significant digits, from dominating.
fn worst_frequency_gap(fx: &Value, key: &str) -> f64 {
    let mats = mats(fx);
    let n = mats.dofs();
    let input = fx["input"].as_u64().unwrap() as usize;
    let omegas = floats(&fx["omegas"]);
    let table = fx[key].as_array().unwrap();
    let re = |i: usize, d: usize| {
        let z = &table[i][d];
        nalgebra::Complex::new(z[0].as_f64().unwrap(), z[1].as_f64().unwrap())
    };
    let mut worst = 0.0_f64;
    for d in 0..n {
        let scale = (0..omegas.len())
            .map(|i| re(i, d).norm())
            .fold(0.0, f64::max);
        for (i, &w) in omegas.iter().enumerate() {
            let h = harmonic(&mats, &[], Excitation::Load { dof: input }, 1.0, w).unwrap();
            let want = re(i, d);
            let gap = (h.x[d] - want).norm() / want.norm().max(1e-3 * scale);
            worst = worst.max(gap);
        }
    }
    worst
}

#[test]
fn frequency_response_matches_the_state_space_resolvent() {
    let all = fixtures();
    assert_eq!(all.len(), 10);
    let mut worst = 0.0_f64;
    let mut signal_checked = 0;
    for (name, fx) in &all {
        let gap = worst_frequency_gap(fx, "frequency");
        assert!(gap <= 1e-8, "{name}: frequency response off by {gap:e}");
        worst = worst.max(gap);
        if !fx["signal_freqresp"].is_null() {
            // scipy.signal.freqresp goes through zeros, poles and gain: accurate to about
            // 1e-7 on two coordinates (the script's docstring says why it is not used above).
            let gap = worst_frequency_gap(fx, "signal_freqresp");
            assert!(gap <= 1e-6, "{name}: scipy.signal.freqresp off by {gap:e}");
            signal_checked += 1;
        }
    }
    assert!(signal_checked >= 2);
    eprintln!("worst frequency-response gap {worst:e}");
}

/// The worst |computed − reference| over the series, relative to the largest |reference| of
/// that coordinate.
fn worst_time_gap(fx: &Value, key: &str, loading: &Loading) -> f64 {
    let mats = mats(fx);
    let n = mats.dofs();
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let tr = simulate(&mats, loading, &modal, &TimeConfig::default()).unwrap();
    let times = floats(&fx["times"]);
    let rows = fx[key].as_array().unwrap();
    let mut worst = 0.0_f64;
    let states: Vec<DVector<f64>> = times.iter().map(|t| tr.state_at(*t).unwrap()).collect();
    for d in 0..n {
        let want: Vec<f64> = rows.iter().map(|r| r[d].as_f64().unwrap()).collect();
        let scale = want.iter().fold(0.0_f64, |a, x| a.max(x.abs()));
        for (z, w) in states.iter().zip(&want) {
            worst = worst.max((z[d] - w).abs() / scale);
        }
    }
    worst
}

#[test]
fn time_response_matches_scipy_signal() {
    let mut worst = 0.0_f64;
    for (name, fx) in fixtures() {
        let m = matrix(&fx["M"]);
        let n = m.nrows();
        let input = fx["input"].as_u64().unwrap() as usize;
        let unit = DVector::from_fn(n, |i, _| if i == input { 1.0 } else { 0.0 });
        let zero = DVector::zeros(n);
        let step = Loading {
            force: unit.clone(),
            x0: zero.clone(),
            v0: zero.clone(),
            has_step: true,
        };
        let impulse = Loading {
            force: zero.clone(),
            x0: zero.clone(),
            v0: m.clone().cholesky().unwrap().solve(&unit),
            has_step: false,
        };
        let initial = Loading {
            force: zero,
            x0: DVector::from_vec(floats(&fx["x0"])),
            v0: DVector::from_vec(floats(&fx["v0"])),
            has_step: false,
        };
        for (key, loading) in [("step", step), ("impulse", impulse), ("initial", initial)] {
            let gap = worst_time_gap(&fx, key, &loading);
            assert!(gap <= 1e-6, "{name}: {key} response off by {gap:e}");
            worst = worst.max(gap);
        }
    }
    eprintln!("worst time-response gap {worst:e}");
}
