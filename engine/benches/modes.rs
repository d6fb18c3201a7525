//! Modal benchmarks from matrices (end-to-end from text comes with the checker): undamped modes
//! (generalized symmetric K φ = ω² M φ with shapes), damped roots (eigenvalues and vectors of the
//! 2n × 2n state matrix), and the whole modal analysis, for chains and pseudo-random models of
//! n = 10, 100, 500, 1000. tests/reference/bench_scipy.py builds the same matrices (same
//! formulas, same generator) and times scipy on them.
//!
//! Run: `cargo bench -p sprung-engine --bench modes` (add a filter such as `undamped/` or
//! `/100` after `--`). `latency_document/` is the language server's latency document
//! (lsp/tests/latency.rs) from text.

use std::time::Duration;

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use nalgebra::DMatrix;
use sprung_engine::assemble::Matrices;
use sprung_engine::eigen;
use sprung_engine::model::DofKind;
use sprung_engine::modes::{ModalConfig, analyze};

const SIZES: [usize; 4] = [10, 100, 500, 1000];

fn stamp(mat: &mut DMatrix<f64>, a: usize, b: Option<usize>, v: f64) {
    mat[(a, a)] += v;
    if let Some(b) = b {
        mat[(b, b)] += v;
        mat[(a, b)] -= v;
        mat[(b, a)] -= v;
    }
}

/// Fixed–free chain: 2 kg masses, 50 kN/m springs, one 80 N·s/m damper from the free end to
/// ground (non-proportional damping, so the state-matrix path is taken).
fn chain(n: usize) -> Matrices {
    let mut k = DMatrix::zeros(n, n);
    let mut c = DMatrix::zeros(n, n);
    stamp(&mut k, 0, None, 5e4);
    for i in 1..n {
        stamp(&mut k, i, Some(i - 1), 5e4);
    }
    stamp(&mut c, n - 1, None, 80.0);
    Matrices::from_dense(
        DMatrix::from_diagonal_element(n, n, 2.0),
        c,
        k,
        vec![DofKind::Translational; n],
    )
}

/// The generator shared with bench_scipy.py: 64-bit LCG, uniform in [0, 1).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// A random tree of springs rooted at ground plus n/2 extra springs, dampers on every third
/// spring. Masses 1–10 kg, springs 1e4–1e5 N/m, dampers 1–20 N·s/m.
fn random(n: usize) -> Matrices {
    let mut rng = Lcg(n as u64);
    let mut m = DMatrix::zeros(n, n);
    let mut k = DMatrix::zeros(n, n);
    let mut c = DMatrix::zeros(n, n);
    for i in 0..n {
        m[(i, i)] = 1.0 + 9.0 * rng.next();
    }
    let mut links: Vec<(usize, Option<usize>)> = vec![(0, None)];
    for i in 1..n {
        links.push((i, Some((rng.next() * i as f64) as usize)));
    }
    for _ in 0..n / 2 {
        let a = (rng.next() * n as f64) as usize;
        let b = (rng.next() * n as f64) as usize;
        if a != b {
            links.push((a, Some(b)));
        }
    }
    for (s, &(a, b)) in links.iter().enumerate() {
        stamp(&mut k, a, b, 1e4 + 9e4 * rng.next());
        if s % 3 == 0 {
            stamp(&mut c, a, b, 1.0 + 19.0 * rng.next());
        }
    }
    Matrices::from_dense(m, c, k, vec![DofKind::Translational; n])
}

fn bench(c: &mut Criterion) {
    for (family, build) in [
        ("chain", chain as fn(usize) -> Matrices),
        ("random", random),
    ] {
        let mut group = c.benchmark_group(format!("undamped/{family}"));
        group
            .sample_size(10)
            .warm_up_time(Duration::from_millis(500));
        for n in SIZES {
            let mats = build(n);
            group.bench_with_input(BenchmarkId::from_parameter(n), &mats, |b, m| {
                b.iter(|| eigen::generalized_symmetric_sparse(&m.k, &m.m).unwrap())
            });
        }
        group.finish();

        let mut group = c.benchmark_group(format!("state_matrix/{family}"));
        group
            .sample_size(10)
            .warm_up_time(Duration::from_millis(500));
        for n in SIZES {
            let mats = build(n);
            group.bench_with_input(BenchmarkId::from_parameter(n), &mats, |b, m| {
                let (mm, cc, kk) = (m.dense_m(), m.dense_c(), m.dense_k());
                b.iter(|| eigen::state_space(&mm, &cc, &kk).unwrap())
            });
        }
        group.finish();

        let mut group = c.benchmark_group(format!("analyze/{family}"));
        group
            .sample_size(10)
            .warm_up_time(Duration::from_millis(500));
        for n in SIZES {
            let mats = build(n);
            group.bench_with_input(BenchmarkId::from_parameter(n), &mats, |b, m| {
                b.iter(|| analyze(m, &ModalConfig::default()).unwrap())
            });
        }
        group.finish();
    }
}

/// A uniform chain written as model text: n masses of 2 kg on springs of 50 kN/m, each with a
/// damper, fixed to ground at one end, and one modal requirement.
fn chain_text(n: usize) -> String {
    let mut t = String::from(
        "system chain {\n  require damping >= 0.001\n  spring s0 between m1 and ground = 50 kN/m\n",
    );
    for i in 1..=n {
        t.push_str(&format!("  mass m{i} = 2 kg\n"));
        if i > 1 {
            t.push_str(&format!(
                "  spring s{i} between m{i} and m{} = 50 kN/m\n",
                i - 1
            ));
        }
        t.push_str(&format!(
            "  damper d{i} between m{i} and ground = 3 N*s/m\n"
        ));
    }
    t.push_str("}\n");
    t
}

/// End to end from text: parse, check, assemble, undamped and damped modes, requirements.
fn bench_from_text(c: &mut Criterion) {
    let mut group = c.benchmark_group("from_text/chain");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500));
    for n in SIZES {
        let text = chain_text(n);
        group.bench_with_input(BenchmarkId::from_parameter(n), &text, |b, t| {
            b.iter(|| {
                let checked = sprung_engine::check(t);
                sprung_engine::analysis::analyze(
                    &checked,
                    &sprung_engine::analysis::Config::default(),
                )
            })
        });
    }
    group.finish();
}

/// The language server's latency document (lsp/tests/latency.rs, the same text): n masses of
/// 2 kg in a chain of 50 kN/m springs, the first to ground, 3 N·s/m from every mass to ground
/// (classical damping), one damping requirement; declarations grouped by kind.
fn latency_text(n: usize) -> String {
    let mut s = String::from("system chain {\n");
    for i in 0..n {
        s.push_str(&format!("  mass m{i} = 2 kg\n"));
    }
    s.push_str("  spring s0 between m0 and ground = 50 kN/m\n");
    for i in 1..n {
        s.push_str(&format!(
            "  spring s{i} between m{} and m{i} = 50 kN/m\n",
            i - 1
        ));
    }
    for i in 0..n {
        s.push_str(&format!(
            "  damper d{i} between m{i} and ground = 3 N*s/m\n"
        ));
    }
    s.push_str("  require damping >= 0.0001\n}\n");
    s
}

/// The latency document at 100 and 1,000 masses: the checker alone, the analysis alone (of an
/// already checked file), and the undamped modes alone (from its assembled matrices).
fn bench_latency_document(c: &mut Criterion) {
    let mut group = c.benchmark_group("latency_document");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500));
    for n in [100, 1000] {
        let text = latency_text(n);
        let checked = sprung_engine::check(&text);
        let mats =
            sprung_engine::assemble::assemble(&checked.model, &checked.model.systems[0], &[])
                .expect("the latency document assembles");
        group.bench_with_input(BenchmarkId::new("check", n), &text, |b, t| {
            b.iter(|| sprung_engine::check(t))
        });
        group.bench_with_input(BenchmarkId::new("analyze", n), &checked, |b, c| {
            b.iter(|| {
                sprung_engine::analysis::analyze(c, &sprung_engine::analysis::Config::default())
            })
        });
        group.bench_with_input(BenchmarkId::new("undamped", n), &mats, |b, m| {
            b.iter(|| eigen::generalized_symmetric_sparse(&m.k, &m.m).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench, bench_from_text, bench_latency_document);
criterion_main!(benches);
