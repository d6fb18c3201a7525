//! Memory of the language server holding and analyzing a 1,000-degree-of-freedom document (the
//! chain of lsp/tests/latency.rs). Measurements, not asserting tests: ignored by default, they
//! print their figures. Run each alone, since both look at the whole process:
//!
//! ```text
//! cargo test -p sprung-lsp --release --test memory -- --ignored --nocapture --exact heap_at_1000_dof
//! cargo test -p sprung-lsp --release --test memory -- --ignored --nocapture --exact resident_at_1000_dof
//! ```
//!
//! `heap_at_1000_dof` counts the heap with dhat's global allocator (every allocation of this
//! test process, the in-process server included): the peak of live heap bytes and what stays
//! live. `resident_at_1000_dof` runs the same server session without dhat's profiler (its
//! allocator then only passes calls through) and prints the process's peak resident set
//! (VmHWM in /proc/self/status): that also counts the test binary's code, thread stacks and the
//! allocator's own bookkeeping, and not the pages of a zeroed allocation that are never
//! written.

mod common;

use common::{Client, chain};
use serde_json::json;

#[global_allocator]
static ALLOC: dhat::Alloc = dhat::Alloc;

fn mib(bytes: usize) -> String {
    format!("{:.1} MiB", bytes as f64 / (1024.0 * 1024.0))
}

/// A line of /proc/self/status in MiB (`VmHWM`, `VmRSS`); `None` where there is no such file.
fn status_kib(key: &str) -> Option<String> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with(key))?;
    let kib: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(format!("{:.1} MiB", kib / 1024.0))
}

#[test]
#[ignore = "a measurement; run alone with --ignored --nocapture --exact"]
fn heap_at_1000_dof() {
    let _profiler = dhat::Profiler::builder().testing().build();
    let n = 1000;
    let text = chain(n);
    let base = dhat::HeapStats::get();

    // 1. One snapshot computed alone: its peak while checking and analyzing, and what it keeps.
    let snap =
        sprung_lsp::snapshot::Snapshot::compute(text.clone(), 1, 1, sprung_syntax::Encoding::Utf16);
    let after = dhat::HeapStats::get();
    let held_snapshot = after.curr_bytes - base.curr_bytes;
    let peak_snapshot = after.max_bytes - base.curr_bytes;
    let modes = snap.analysis.systems[0]
        .modes
        .as_ref()
        .map_or(0, |m| m.modes.len());
    drop(snap);
    eprintln!(
        "{n} dof, one snapshot: peak {} while computed, {} held ({modes} modes; their shapes alone are {n} × {n} × 8 bytes = {})",
        mib(peak_snapshot),
        mib(held_snapshot),
        mib(n * n * 8)
    );

    // 2. The server: open, diagnostics, hints, then an edit and its re-analysis (while the old
    //    snapshot is still held).
    let before_server = dhat::HeapStats::get().curr_bytes;
    let held_server = server_session(&text, || dhat::HeapStats::get().curr_bytes - before_server);
    let end = dhat::HeapStats::get();
    eprintln!(
        "{n} dof, server (open, hints, one edit, hints): peak heap {} (whole test process), {} held by the server after the edit",
        mib(end.max_bytes),
        mib(held_server)
    );
}

#[test]
#[ignore = "a measurement; run alone with --ignored --nocapture --exact"]
fn resident_at_1000_dof() {
    let text = chain(1000);
    let before = status_kib("VmHWM:").unwrap_or_else(|| "unknown".into());
    let during = server_session(&text, || {
        status_kib("VmRSS:").unwrap_or_else(|| "unknown".into())
    });
    eprintln!(
        "1000 dof, server (open, hints, one edit, hints): process peak resident {} (before the server started: {before}), resident with the document open {during}",
        status_kib("VmHWM:").unwrap_or_else(|| "unknown".into()),
    );
}

/// Opens the document in an in-process server, waits for its diagnostics and hints, edits the
/// requirement's limit (so that the diagnostics change), waits again, and returns `measure()`
/// taken while the server still holds the document.
fn server_session<T>(text: &str, measure: impl FnOnce() -> T) -> T {
    let n = 1000;
    let runtime = tokio::runtime::Builder::new_multi_thread()
        .worker_threads(2)
        .enable_all()
        .build()
        .unwrap();
    runtime.block_on(async {
        let uri = "file:///chain1000.sprung";
        let mut c = Client::utf16().await;
        c.open(uri, text).await;
        c.diagnostics(uri).await;
        assert!(c.hints(uri).await.is_array());
        let line = (1 + 3 * n) as u32;
        c.change(
            uri,
            2,
            json!([{ "range": { "start": { "line": line, "character": 22 }, "end": { "line": line, "character": 99 } }, "text": "0.9" }]),
        )
        .await;
        assert!(c.hints(uri).await.is_array());
        c.diagnostics(uri).await;
        let value = measure();
        drop(c);
        value
    })
}
