//! Edge cases of the time response: critical damping (a defective state matrix, where an
//! eigenvector expansion fails and the matrix exponential does not), overdamping, a chain of
//! many masses, and arbitrary input that must give a value or an error, never a panic.
//! Closed forms (standard vibration texts, from memory): at ζ = 1,
//! x(t) = (F/k)(1 − e^{−ωn t}(1 + ωn t)); overdamped with real roots s₁, s₂,
//! x(t) = (F/k)(1 − (s₂ e^{s₁t} − s₁ e^{s₂t})/(s₂ − s₁)).

use nalgebra::{DMatrix, DVector};
use proptest::prelude::*;
use sprung_engine::assemble::Matrices;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{ModalConfig, analyze};
use sprung_engine::response::{Excitation, harmonic, peak_over_band, resonance_hints};
use sprung_engine::time_response::{Loading, TimeConfig, simulate};

fn one(m: f64, c: f64, k: f64) -> Matrices {
    let s = |x: f64| DMatrix::from_element(1, 1, x);
    Matrices::from_dense(s(m), s(c), s(k), vec![DofKind::Translational])
}

fn step(n: usize, at: usize, f: f64) -> Loading {
    let mut force = DVector::zeros(n);
    force[at] = f;
    Loading {
        force,
        x0: DVector::zeros(n),
        v0: DVector::zeros(n),
        has_step: true,
    }
}

#[test]
fn critically_damped_step() {
    let (m, k) = (2.0_f64, 800.0_f64);
    let w: f64 = (k / m).sqrt();
    let mats = one(m, 2.0 * (k * m).sqrt(), k);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let tr = simulate(&mats, &step(1, 0, 5.0), &modal, &TimeConfig::default()).unwrap();
    let x = |t: f64| 5.0 / k * (1.0 - (-w * t).exp() * (1.0 + w * t));
    for t in [0.0, 0.01, 0.05, 0.1, 0.3, 0.9] {
        let got = tr.state_at(t).unwrap()[0];
        assert!(
            (got - x(t)).abs() < 1e-12 * 5.0 / k,
            "t={t}: {got} vs {}",
            x(t)
        );
    }
    assert_eq!(tr.overshoot(0).unwrap(), 0.0);
    // Settling: (1 + ωt) e^{−ωt} = 0.02, solved by bisection here.
    let (mut lo, mut hi) = (1.0_f64, 20.0_f64);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if (1.0 + mid) * (-mid).exp() > 0.02 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let want = lo / w;
    let ts = tr.settling_time(0, 0.02).unwrap();
    assert!(((ts - want) / want).abs() < 1e-4, "{ts} vs {want}");
}

#[test]
fn overdamped_step() {
    let (m, c, k) = (1.0_f64, 60.0_f64, 400.0_f64);
    let disc = (c * c - 4.0 * m * k).sqrt();
    let (s1, s2) = ((-c + disc) / (2.0 * m), (-c - disc) / (2.0 * m));
    let mats = one(m, c, k);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let tr = simulate(&mats, &step(1, 0, 1.0), &modal, &TimeConfig::default()).unwrap();
    let x = |t: f64| 1.0 / k * (1.0 - (s2 * (s1 * t).exp() - s1 * (s2 * t).exp()) / (s2 - s1));
    for t in [0.01, 0.1, 0.5, 2.0] {
        let got = tr.state_at(t).unwrap()[0];
        assert!((got - x(t)).abs() < 1e-12 / k, "t={t}: {got} vs {}", x(t));
    }
    assert_eq!(tr.overshoot(0).unwrap(), 0.0);
    // The window covers the slow root: the 2% settling time is well inside it.
    let ts = tr.settling_time(0, 0.02).unwrap();
    assert!((x(ts) * k - 0.98).abs() < 1e-6, "{}", x(ts) * k);
}

/// Springs ground–0 and i–(i+1); a damper to ground on every mass.
fn chain(n: usize) -> Matrices {
    let (m, k, c) = (2.0, 5e4, 8.0);
    let mut kk = DMatrix::zeros(n, n);
    kk[(0, 0)] += k;
    for i in 0..n - 1 {
        kk[(i, i)] += k;
        kk[(i + 1, i + 1)] += k;
        kk[(i, i + 1)] -= k;
        kk[(i + 1, i)] -= k;
    }
    Matrices::from_dense(
        DMatrix::from_diagonal_element(n, n, m),
        DMatrix::from_diagonal_element(n, n, c),
        kk,
        vec![DofKind::Translational; n],
    )
}

#[test]
fn a_chain_of_forty_masses() {
    let n = 40;
    let mats = chain(n);
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let start = std::time::Instant::now();
    let tr = simulate(&mats, &step(n, n - 1, 10.0), &modal, &TimeConfig::default()).unwrap();
    // A static check: every spring carries the 10 N, so the end moves n × 10 / k.
    assert!((tr.final_value(n - 1).unwrap() - n as f64 * 10.0 / 5e4).abs() < 1e-12);
    let os = tr.overshoot(n - 1).unwrap();
    assert!(os > 0.0 && os < 1.0, "{os}");
    let ts = tr.settling_time(n - 1, 0.02).unwrap();
    assert!(ts > 0.0 && ts < tr.duration());
    // The band peak is at least the response at every natural frequency in the band.
    let f = |w: f64| Ok(harmonic(&mats, &[], Excitation::Load { dof: 0 }, 1.0, w)?.x[n - 1].norm());
    let hints = resonance_hints(&modal);
    let (lo, hi) = (1.0, 400.0);
    let peak = peak_over_band(f, lo, hi, &hints).unwrap();
    for &h in hints.iter().filter(|h| **h >= lo && **h <= hi) {
        assert!(peak.value >= f(h).unwrap());
    }
    assert!(start.elapsed().as_secs() < 60, "{:?}", start.elapsed());
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]
    #[test]
    fn arbitrary_systems_give_a_value_or_an_error(
        n in 1usize..4,
        entries in prop::collection::vec(prop_oneof![
            Just(0.0), Just(-1.0), Just(f64::NAN), Just(1e300), -1e4..1e4f64, 0.0..1e6f64
        ], 27),
        w in prop_oneof![Just(0.0), Just(f64::INFINITY), 0.01..1e4f64],
    ) {
        let take = |o: usize| DMatrix::from_fn(n, n, |i, j| entries[o + i * n + j]);
        let mats = Matrices::from_dense(
            DMatrix::from_fn(n, n, |i, j| if i == j { entries[i].abs() } else { 0.0 }),
            take(9),
            take(18),
            vec![DofKind::Translational; n],
        );
        let _ = harmonic(&mats, &[], Excitation::Load { dof: 0 }, 1.0, w);
        let _ = harmonic(&mats, &[], Excitation::Load { dof: 7 }, 1.0, 1.0);
        if let Ok(modal) = analyze(&mats, &ModalConfig::default()) {
            let config = TimeConfig { max_samples: 5000, ..TimeConfig::default() };
            if let Ok(tr) = simulate(&mats, &step(n, 0, 1.0), &modal, &config) {
                let _ = tr.overshoot(0);
                let _ = tr.settling_time(0, 0.02);
                let _ = tr.peak_displacement(n);
                let _ = tr.state_at(-1.0);
                let _ = tr.state_at(1e9);
            }
        }
    }
}
