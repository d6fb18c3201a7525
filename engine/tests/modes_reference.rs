//! Cross-check against a reference library: every fixture in tests/reference/modal/ was written
//! by tests/reference/modal_reference.py with scipy.linalg.eigh (undamped ω²) and
//! scipy.linalg.eig (state-matrix eigenvalues), numpy 2.1.3 and scipy 1.14.1. We recompute both
//! from the same SI matrices and compare at 1e-9 relative, eigenvalues as multisets matched
//! nearest-first.

use std::path::PathBuf;

use nalgebra::{Complex, DMatrix};
use serde_json::Value;
use sprung_engine::assemble::Matrices;
use sprung_engine::eigen;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{ModalConfig, analyze};

fn fixtures() -> Vec<(String, Value)> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/reference/modal");
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

/// Matches every expected value to the nearest unused computed one; returns the worst
/// relative distance.
fn worst_multiset_gap(expected: &[Complex<f64>], computed: &[Complex<f64>]) -> f64 {
    assert_eq!(expected.len(), computed.len());
    let mut pool = computed.to_vec();
    let mut worst = 0.0_f64;
    for z in expected {
        let (at, dist) = pool
            .iter()
            .enumerate()
            .map(|(i, w)| (i, (w - z).norm()))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .unwrap();
        worst = worst.max(dist / z.norm());
        pool.swap_remove(at);
    }
    worst
}

#[test]
fn eigenvalues_match_scipy() {
    let all = fixtures();
    assert!(
        all.len() >= 20,
        "expected at least 20 fixtures, found {}",
        all.len()
    );
    let (mut worst_w2, mut worst_raw, mut worst_modal) = (0.0_f64, 0.0_f64, 0.0_f64);
    for (name, fx) in all {
        let (m, c, k) = (matrix(&fx["M"]), matrix(&fx["C"]), matrix(&fx["K"]));
        let n = m.nrows();
        assert_eq!(fx["dofs"].as_u64(), Some(n as u64));

        let omega2: Vec<f64> = fx["omega2"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_f64().unwrap())
            .collect();
        let und = eigen::generalized_symmetric(&k, &m).unwrap();
        for (a, b) in und.omega2.iter().zip(&omega2) {
            let gap = (a - b).abs() / b.abs();
            worst_w2 = worst_w2.max(gap);
            assert!(gap <= 1e-9, "{name}: ω² {a} vs {b}");
        }

        let lam: Vec<Complex<f64>> = fx["state_eigenvalues"]
            .as_array()
            .unwrap()
            .iter()
            .map(|z| Complex::new(z[0].as_f64().unwrap(), z[1].as_f64().unwrap()))
            .collect();
        // The raw state matrix through the eigen module...
        let raw = eigen::state_space(&m, &c, &k).unwrap().values;
        let gap = worst_multiset_gap(&lam, &raw);
        worst_raw = worst_raw.max(gap);
        assert!(
            gap <= 1e-9,
            "{name}: state-space eigenvalues off by {gap:e}"
        );
        // ...and the roots the modal analysis assigns to its modes.
        let mats = Matrices::from_dense(m, c, k, vec![DofKind::Translational; n]);
        let r = analyze(&mats, &ModalConfig::default()).unwrap();
        let gap = worst_multiset_gap(&lam, &r.roots());
        worst_modal = worst_modal.max(gap);
        assert!(gap <= 1e-9, "{name}: modal roots off by {gap:e}");
    }
    eprintln!(
        "worst relative gaps to scipy: ω² {worst_w2:e}, state matrix {worst_raw:e}, modal roots {worst_modal:e}"
    );
}

/// The same fixtures from their `.sprung` text (written in random units: t, g, lbm, kg; N/m,
/// kN/m, lbf/in, N/mm; N*s/m, kN*s/m, lbf*s/in): the checker and the assembler must rebuild
/// the SI matrices that scipy was given (unit factors from NIST SP 811, so 1e-12 relative),
/// and the modal analysis of the checked model must give scipy's eigenvalues.
#[test]
fn the_sprung_texts_assemble_to_the_reference_matrices() {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/reference/modal");
    let mut checked_files = 0;
    for (name, v) in fixtures() {
        let sprung = dir.join(name.replace(".json", ".sprung"));
        let text = std::fs::read_to_string(&sprung).expect("each fixture has its model text");
        let checked = sprung_engine::check(&text);
        assert!(!checked.has_errors(), "{name}: {:#?}", checked.diagnostics);
        let sys = &checked.model.systems[0];
        let mats = sprung_engine::assemble::assemble(&checked.model, sys, &[]).expect("assembles");
        for (key, got) in [
            ("M", mats.dense_m()),
            ("C", mats.dense_c()),
            ("K", mats.dense_k()),
        ] {
            let want = matrix(&v[key]);
            // An undamped fixture has C = 0: then the gap is absolute.
            let scale = if want.amax() > 0.0 { want.amax() } else { 1.0 };
            let gap = (&got - &want).amax() / scale;
            assert!(gap < 1e-12, "{name} {key}: relative gap {gap:e}");
        }
        let result = analyze(&mats, &ModalConfig::default()).expect("modes");
        let expected: Vec<Complex<f64>> = v["state_eigenvalues"]
            .as_array()
            .unwrap()
            .iter()
            .map(|z| Complex::new(z[0].as_f64().unwrap(), z[1].as_f64().unwrap()))
            .collect();
        let gap = worst_multiset_gap(&expected, &result.roots());
        assert!(gap < 1e-9, "{name}: eigenvalue gap {gap:e}");
        checked_files += 1;
    }
    assert!(checked_files >= 20);
}
