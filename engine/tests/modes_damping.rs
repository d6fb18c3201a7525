//! Damped modes. Sources: classical (Rayleigh) damping C = αM + βK leaves the undamped shapes
//! uncoupled, with per-mode ζj = α/(2ωj) + βωj/2 (standard vibration texts, from memory);
//! modal damping C = M Φ diag(2ζjωj) Φᵀ M gives each mode exactly ζj (same source).

use nalgebra::{DMatrix, SymmetricEigen};
use sprung_engine::assemble::Matrices;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{DampedMethod, DampingKind, ModalConfig, ModeRegime, analyze};

/// A small seeded generator (64-bit LCG, Knuth's MMIX constants), uniform in [0, 1).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
    fn log_uniform(&mut self, lo: f64, hi: f64) -> f64 {
        (lo.ln() + (hi.ln() - lo.ln()) * self.next()).exp()
    }
    fn below(&mut self, n: usize) -> usize {
        ((self.next() * n as f64) as usize).min(n - 1)
    }
}

/// Springs as (a, b, k) with `None` for ground.
type Links = Vec<(Option<usize>, Option<usize>, f64)>;

fn stamp(n: usize, links: &Links) -> DMatrix<f64> {
    let mut k = DMatrix::zeros(n, n);
    for &(a, b, v) in links {
        match (a, b) {
            (Some(i), Some(j)) => {
                k[(i, i)] += v;
                k[(j, j)] += v;
                k[(i, j)] -= v;
                k[(j, i)] -= v;
            }
            (Some(i), None) | (None, Some(i)) => k[(i, i)] += v,
            (None, None) => {}
        }
    }
    k
}

/// A random connected model of n masses: a random tree plus a few extra springs, one spring
/// to ground at least.
fn random_model(rng: &mut Lcg, n: usize) -> (Vec<f64>, Links) {
    let masses: Vec<f64> = (0..n).map(|_| rng.log_uniform(0.2, 50.0)).collect();
    let mut links: Links = vec![(Some(0), None, rng.log_uniform(1e3, 1e6))];
    for i in 1..n {
        links.push((Some(i), Some(rng.below(i)), rng.log_uniform(1e3, 1e6)));
    }
    for _ in 0..rng.below(n + 1) {
        let (a, b) = (rng.below(n), rng.below(n + 1));
        if b == n {
            links.push((Some(a), None, rng.log_uniform(1e3, 1e6)));
        } else if a != b {
            links.push((Some(a), Some(b), rng.log_uniform(1e3, 1e6)));
        }
    }
    (masses, links)
}

/// Undamped ω, ascending, by nalgebra's symmetric solver on M^-½ K M^-½ (independent of faer).
fn omegas(masses: &[f64], k: &DMatrix<f64>) -> Vec<f64> {
    let n = masses.len();
    let a = DMatrix::from_fn(n, n, |i, j| k[(i, j)] / (masses[i] * masses[j]).sqrt());
    let mut w: Vec<f64> = SymmetricEigen::new(a)
        .eigenvalues
        .iter()
        .map(|x| x.sqrt())
        .collect();
    w.sort_by(f64::total_cmp);
    w
}

/// The model with Rayleigh damping, realised as elements: a damper α mᵢ from every mass to
/// ground and a damper β k beside every spring.
fn rayleigh(masses: &[f64], links: &Links, alpha: f64, beta: f64) -> Matrices {
    let n = masses.len();
    let mut dampers: Links = links.iter().map(|&(a, b, k)| (a, b, beta * k)).collect();
    dampers.extend((0..n).map(|i| (Some(i), None, alpha * masses[i])));
    Matrices::from_dense(
        DMatrix::from_diagonal(&masses.to_vec().into()),
        stamp(n, &dampers),
        stamp(n, links),
        vec![DofKind::Translational; n],
    )
}

fn state_space() -> ModalConfig {
    ModalConfig {
        method: DampedMethod::StateSpace,
        ..ModalConfig::default()
    }
}

#[test]
fn rayleigh_damping_ratios_are_exact() {
    let mut rng = Lcg(7);
    for _ in 0..40 {
        let n = 1 + rng.below(8);
        let (masses, links) = random_model(&mut rng, n);
        let mats0 = rayleigh(&masses, &links, 0.0, 0.0);
        let w = omegas(&masses, &mats0.dense_k());
        let alpha = rng.next() * w[0];
        let beta = rng.next() / w[n - 1];
        let mats = rayleigh(&masses, &links, alpha, beta);
        for config in [ModalConfig::default(), state_space()] {
            let r = analyze(&mats, &config).unwrap();
            if config.method == DampedMethod::Auto {
                assert_eq!(r.damping, DampingKind::Classical);
            }
            for (mode, &wj) in r.modes.iter().zip(&w) {
                let exact = alpha / (2.0 * wj) + beta * wj / 2.0;
                let zeta = mode.damping_ratio.unwrap();
                assert!(
                    (zeta - exact).abs() <= 1e-9 * exact,
                    "{:?}: ζ = {zeta}, expected {exact}",
                    config.method
                );
                assert!((mode.natural_frequency - wj).abs() <= 1e-9 * wj);
            }
        }
    }
}

#[test]
fn first_mode_overdamped_second_underdamped() {
    // Two 1 kg masses, ground –(1000 N/m)– m1 –(1000 N/m)– m2, mass-proportional damping:
    // ζj = α/(2ωj) falls with frequency.
    let masses = [1.0, 1.0];
    let links: Links = vec![(Some(0), None, 1000.0), (Some(0), Some(1), 1000.0)];
    let w = omegas(&masses, &stamp(2, &links));
    assert!(w[1] > 2.0 * w[0]);
    let alpha = 3.0 * w[0]; // ζ1 = 1.5, ζ2 = 1.5 ω1/ω2 < 0.75
    let mats = rayleigh(&masses, &links, alpha, 0.0);
    for config in [ModalConfig::default(), state_space()] {
        let r = analyze(&mats, &config).unwrap();
        assert_eq!(r.modes[0].regime, ModeRegime::Overdamped);
        assert_eq!(r.modes[1].regime, ModeRegime::Underdamped);
        assert!((r.modes[0].damping_ratio.unwrap() - 1.5).abs() < 1e-9);
        let z2 = alpha / (2.0 * w[1]);
        assert!((r.modes[1].damping_ratio.unwrap() - z2).abs() < 1e-9 * z2);
        // The overdamped mode holds two real roots, the other a conjugate pair.
        assert!(
            r.modes[0]
                .roots
                .iter()
                .all(|z| z.im == 0.0 || z.im.abs() < 1e-7 * z.norm())
        );
        assert!(r.modes[1].roots[0].im.abs() > 0.5 * w[1]);
    }
}

#[test]
fn two_hundred_random_models_with_one_exactly_critical_mode() {
    let mut rng = Lcg(2024);
    for case in 0..200 {
        let n = 1 + rng.below(8);
        let (masses, links) = random_model(&mut rng, n);
        let w = omegas(&masses, &stamp(n, &links));
        let j = rng.below(n);
        // ζj = α/(2ωj) + βωj/2 = 1 with α, β ≥ 0.
        let beta = rng.next() * 2.0 / w[j];
        let alpha = w[j] * (2.0 - beta * w[j]);
        let mats = rayleigh(&masses, &links, alpha, beta);
        for config in [ModalConfig::default(), state_space()] {
            let r = analyze(&mats, &config).unwrap();
            let mode = &r.modes[j];
            assert_eq!(
                mode.regime,
                ModeRegime::CriticallyDamped,
                "case {case}, n = {n}, mode {}, {:?}: {mode:?}",
                j + 1,
                config.method
            );
            let gap = (w[j] - mode.natural_frequency).abs() / w[j];
            assert!(gap < 1e-9, "case {case}");
        }
    }
}

#[test]
fn modal_damping_is_assigned_by_shape_not_by_size() {
    // Mode 1 heavily overdamped (ζ = 10: a slow root near −ω1/20 and a fast one near −20 ω1),
    // mode 2 lightly damped (ζ = 0.01: −0.01 ω2 ± i ω2). Sorting roots by size would mix them.
    let masses = [2.0_f64, 1.0];
    let links: Links = vec![(Some(0), None, 4000.0), (Some(0), Some(1), 3000.0)];
    let k = stamp(2, &links);
    let m = DMatrix::from_diagonal(&masses.to_vec().into());
    let mhalf = DMatrix::from_fn(2, 2, |i, j| k[(i, j)] / (masses[i] * masses[j]).sqrt());
    let eig = SymmetricEigen::new(mhalf);
    let mut idx = [0, 1];
    idx.sort_by(|&a, &b| eig.eigenvalues[a].total_cmp(&eig.eigenvalues[b]));
    let zetas = [10.0, 0.01];
    let mut c = DMatrix::zeros(2, 2);
    for (p, &col) in idx.iter().enumerate() {
        let wj = eig.eigenvalues[col].sqrt();
        // φ = M^-½ u, so M φ = M^½ u.
        let mphi = DMatrix::from_fn(2, 1, |i, _| masses[i].sqrt() * eig.eigenvectors[(i, col)]);
        c += &mphi * mphi.transpose() * (2.0 * zetas[p] * wj);
    }
    let mats = Matrices::from_dense(m, c, k, vec![DofKind::Translational; 2]);
    let r = analyze(&mats, &state_space()).unwrap();
    assert_eq!(r.modes[0].regime, ModeRegime::Overdamped);
    assert_eq!(r.modes[1].regime, ModeRegime::Underdamped);
    assert!((r.modes[0].damping_ratio.unwrap() - 10.0).abs() < 1e-9);
    assert!((r.modes[1].damping_ratio.unwrap() - 0.01).abs() < 1e-11);
    assert!(r.modes.iter().all(|m| m.assignment_mac > 0.999));
}
