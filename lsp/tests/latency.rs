//! Latency from `didChange` to published diagnostics and to an inlay-hint answer, for chains of
//! 10, 100 and 1,000 masses, as p50/p95 over repeated edits. A measurement, not a timed test:
//! it is ignored by default and prints its figures (`cargo test -p sprung-lsp --release
//! --test latency -- --ignored --nocapture`).

mod common;

use std::time::{Duration, Instant};

use common::{Client, chain};
use serde_json::json;

fn pct(v: &mut [Duration], p: f64) -> Duration {
    v.sort();
    v[((v.len() as f64 - 1.0) * p).round() as usize]
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
#[ignore = "a measurement; run with --ignored --nocapture"]
async fn latency_by_size() {
    for (n, edits) in [(10usize, 60), (100, 40), (1000, 8)] {
        let uri = format!("file:///chain{n}.sprung");
        let text = chain(n);
        let mut c = Client::utf16().await;
        c.open(&uri, &text).await;
        c.diagnostics(&uri).await;
        let mut to_diag = Vec::new();
        let mut to_hints = Vec::new();
        // Alternate the first mass between 2 kg and 3 kg: the diagnostics stay empty, so time
        // them with a value that changes them: a damping requirement that flips.
        for e in 0..edits {
            let value = if e % 2 == 0 { "0.9" } else { "0.0001" };
            let line = (1 + 3 * n) as u32;
            let version = 2 + e;
            let t = Instant::now();
            c.change(
                &uri,
                version,
                json!([{ "range": { "start": { "line": line, "character": 22 }, "end": { "line": line, "character": 99 } }, "text": value }]),
            )
            .await;
            let hints = c.hints(&uri).await;
            to_hints.push(t.elapsed());
            assert!(hints.is_array());
            let _ = c.diagnostics(&uri).await;
            to_diag.push(t.elapsed());
        }
        eprintln!(
            "{n:>5} dof: diagnostics p50 {:?} p95 {:?}; hints p50 {:?} p95 {:?}",
            pct(&mut to_diag, 0.5),
            pct(&mut to_diag, 0.95),
            pct(&mut to_hints, 0.5),
            pct(&mut to_hints, 0.95)
        );
    }
}

/// The first stage alone: a unit error toggled in a small second system while the chain is
/// re-analyzed on every edit. Times `didChange` to the first `publishDiagnostics`, which comes
/// from the checker's stage, before the chain's analysis is done.
#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
#[ignore = "a measurement; run with --ignored --nocapture"]
async fn checker_diagnostics_latency_by_size() {
    for (n, edits) in [(10usize, 60), (100, 40), (1000, 16)] {
        let uri = format!("file:///unit{n}.sprung");
        let mut text = chain(n);
        text.push_str("system spare {\n  mass b = 1 kg\n  let wrong = 3 kg + 2 kg\n}\n");
        let line = text.lines().count() as u32 - 2;
        let mut c = Client::utf16().await;
        c.open(&uri, &text).await;
        c.diagnostics(&uri).await;
        let mut times = Vec::new();
        for e in 0..edits {
            let unit = if e % 2 == 0 { "m " } else { "kg" };
            let t = Instant::now();
            c.change(
                &uri,
                2 + e,
                json!([{ "range": { "start": { "line": line, "character": 23 }, "end": { "line": line, "character": 25 } }, "text": unit }]),
            )
            .await;
            let d = c.diagnostics(&uri).await;
            times.push(t.elapsed());
            let has_error = d["diagnostics"]
                .as_array()
                .is_some_and(|a| a.iter().any(|d| d["code"] == "SP303"));
            assert_eq!(has_error, e % 2 == 0, "{d}");
            // Let the chain's analysis finish so the next edit starts from a quiet server.
            c.hints(&uri).await;
        }
        eprintln!(
            "{n:>5} dof: checker diagnostics p50 {:?} p95 {:?}",
            pct(&mut times, 0.5),
            pct(&mut times, 0.95)
        );
    }
}

#[test]
#[ignore = "a measurement; run with --ignored --nocapture"]
fn where_the_time_goes_at_1000_dof() {
    use sprung_lsp::snapshot::Snapshot;
    let text = chain(1000);
    let t = Instant::now();
    let checked = sprung_engine::check(&text);
    let t_check = t.elapsed();
    let t = Instant::now();
    let _ = sprung_engine::analysis::analyze(&checked, &Default::default());
    let t_analyze = t.elapsed();
    let t = Instant::now();
    let snap = Snapshot::compute(text, 1, 1, sprung_syntax::Encoding::Utf16);
    let t_snapshot = t.elapsed();
    let t = Instant::now();
    let all = tower_lsp_server::ls_types::Range::new(
        tower_lsp_server::ls_types::Position::new(0, 0),
        tower_lsp_server::ls_types::Position::new(99999, 0),
    );
    let hints = sprung_lsp::hints::inlay_hints(&snap, all);
    let t_hints = t.elapsed();
    let t = Instant::now();
    let uri: tower_lsp_server::ls_types::Uri = "file:///x".parse().unwrap();
    let _ = sprung_lsp::diagnostics::to_lsp(&snap, &uri);
    let t_diag = t.elapsed();
    eprintln!(
        "check {t_check:?} analyze {t_analyze:?} (the whole snapshot {t_snapshot:?}) hints {t_hints:?} ({}) diagnostics {t_diag:?}",
        hints.len()
    );
}
