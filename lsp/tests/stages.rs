//! The two analysis stages seen from a client: the checker's diagnostics and the features that
//! need no physics do not wait for the analysis; inlay hints answer early and are refreshed
//! when the client supports it; semantic-token deltas rebuild exactly the full token set.
//! The analysis is slowed down on purpose (`ServerConfig::analysis_delay`) so the order is
//! deterministic, not a race.

mod common;

use std::time::Duration;

use common::{Client, TIMEOUT, within};
use serde_json::{Value, json};
use sprung_lsp::ServerConfig;

const URI: &str = "file:///work/stages.sprung";

/// One mass on a spring and a damper (ζ = 0.1, f = 10.07 Hz; see features.rs for the hand
/// computation), and a second system with a unit error.
const PAD: &str = "system pad {
  mass m = 10 kg
  spring k between m and ground = 40 kN/m
  damper c between m and ground = 0.1 * 2 * sqrt(k * m)
}
system broken {
  mass b = 1 kg
  let wrong = 3 kg + 2 m
}
";

fn slow(delay: Duration) -> ServerConfig {
    ServerConfig {
        analysis_delay: delay,
        hint_patience: Duration::from_millis(10),
        ..ServerConfig::default()
    }
}

fn labels(hints: &Value) -> Vec<String> {
    hints
        .as_array()
        .expect("hints array")
        .iter()
        .map(|h| h["label"].as_str().unwrap_or("?").to_string())
        .collect()
}

#[tokio::test]
async fn checker_diagnostics_and_completion_do_not_wait_for_the_analysis() {
    // Longer than every wait of the test client: anything that waited for it would time out.
    let (mut c, _) = Client::start_with(json!({}), slow(TIMEOUT * 3)).await;
    c.open(URI, PAD).await;
    let d = c.diagnostics(URI).await;
    let unit_error: Vec<&Value> = d["diagnostics"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|d| d["code"] == "SP303")
        .collect();
    assert_eq!(unit_error.len(), 1, "{d:#}");
    assert_eq!(unit_error[0]["range"]["start"]["line"], 7);
    let completion = c
        .at("textDocument/completion", URI, (3, 35))
        .await
        .to_string();
    // Units of the dimension expected there: the checker's knowledge, no analysis needed.
    assert!(completion.contains("\"N*s/m\""), "{completion}");
    let tokens = c.whole("textDocument/semanticTokens/full", URI).await;
    assert!(tokens["data"].as_array().is_some_and(|d| !d.is_empty()));
}

#[tokio::test]
async fn hints_answer_before_the_analysis_and_are_refreshed_after_it() {
    let caps = json!({ "workspace": { "inlayHint": { "refreshSupport": true } } });
    let (mut c, _) = Client::start_with(caps, slow(Duration::from_millis(800))).await;
    c.open(URI, PAD).await;
    let early = labels(&c.hints(URI).await);
    // The checker already knows the damper's value (0.2·√(40000·10) = 126.5 N·s/m)...
    assert!(early.iter().any(|l| l == "= 126 N·s/m"), "{early:?}");
    // ...but not the modes yet.
    assert!(!early.iter().any(|l| l.contains("Hz")), "{early:?}");
    let refresh = within("inlayHint/refresh", async {
        loop {
            let (method, _) = c.next_message().await;
            if method == "workspace/inlayHint/refresh" {
                return method;
            }
        }
    })
    .await;
    assert_eq!(refresh, "workspace/inlayHint/refresh");
    let late = labels(&c.hints(URI).await);
    assert!(
        late.iter().any(|l| l.contains("10.1 Hz ζ0.1 underdamped")),
        "{late:?}"
    );
}

#[tokio::test]
async fn without_refresh_support_hints_wait_for_the_analysis() {
    let (mut c, _) = Client::start_with(json!({}), slow(Duration::from_millis(300))).await;
    c.open(URI, PAD).await;
    let hints = labels(&c.hints(URI).await);
    assert!(
        hints.iter().any(|l| l.contains("10.1 Hz ζ0.1 underdamped")),
        "{hints:?}"
    );
}

/// Applies `semanticTokens/full/delta` edits to a flat token array, as a client does.
fn apply(old: &[Value], edits: &[Value]) -> Vec<Value> {
    let mut data = old.to_vec();
    let mut edits = edits.to_vec();
    // Edits are given against the old array; apply from the back so offsets stay valid.
    edits.sort_by_key(|e| std::cmp::Reverse(e["start"].as_u64()));
    for e in edits {
        let start = e["start"].as_u64().unwrap() as usize;
        let n = e["deleteCount"].as_u64().unwrap() as usize;
        let new = e["data"].as_array().cloned().unwrap_or_default();
        data.splice(start..start + n, new);
    }
    data
}

#[tokio::test]
async fn token_deltas_rebuild_the_full_set() {
    let mut c = Client::utf16().await;
    c.open(URI, PAD).await;
    let first = c.whole("textDocument/semanticTokens/full", URI).await;
    let id = first["resultId"].as_str().expect("a result id").to_string();
    let mut data = first["data"].as_array().unwrap().clone();
    let mut id = id;
    // Insert a line in the middle, rename a mass, then delete the bad line.
    let edits = [
        ((2, 0), (2, 0), "  mass extra = 1 kg\n"),
        ((1, 7), (1, 8), "head"),
        ((5, 0), (6, 0), ""),
    ];
    for (version, (from, to, text)) in edits.into_iter().enumerate() {
        c.change(
            URI,
            2 + version as i32,
            json!([{ "range": { "start": { "line": from.0, "character": from.1 },
                                "end": { "line": to.0, "character": to.1 } }, "text": text }]),
        )
        .await;
        let delta = c
            .request(
                "textDocument/semanticTokens/full/delta",
                json!({ "textDocument": { "uri": URI }, "previousResultId": id }),
            )
            .await
            .expect("no error");
        let edits = delta["edits"].as_array().expect("a delta, not a full set");
        data = apply(&data, edits);
        id = delta["resultId"].as_str().unwrap().to_string();
        let full = c.whole("textDocument/semanticTokens/full", URI).await;
        assert_eq!(
            &data,
            full["data"].as_array().unwrap(),
            "after edit {version}"
        );
        id = full["resultId"].as_str().map(str::to_string).unwrap_or(id);
    }
    // An unknown previous result gets the whole set.
    let fallback = c
        .request(
            "textDocument/semanticTokens/full/delta",
            json!({ "textDocument": { "uri": URI }, "previousResultId": "no such id" }),
        )
        .await
        .expect("no error");
    assert_eq!(fallback["data"].as_array().map(Vec::len), Some(data.len()));
}
