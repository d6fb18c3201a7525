//! Protocol behaviour: encoding negotiation, UTF-16 and CRLF positions, version checks, bad
//! edits, closed and unknown documents, republishing only on change, shutdown and exit.

mod common;

use std::time::Duration;

use common::{Client, pos, range};
use serde_json::{Value, json};
use tower::{Service, ServiceExt};
use tower_lsp_server::jsonrpc::Request;

const URI: &str = "file:///work/rig.sprung";

const RIG: &str = "system rig {\n  mass m = 10 kg\n  spring k between m and ground = 40 kN/m\n}\n";

fn edit(line: u32, from: u32, to: u32, text: &str) -> Value {
    json!({ "range": { "start": { "line": line, "character": from }, "end": { "line": line, "character": to } }, "text": text })
}

#[tokio::test]
async fn position_encoding_is_negotiated() {
    let (_, init) =
        Client::start(json!({ "general": { "positionEncodings": ["utf-8", "utf-16"] } })).await;
    assert_eq!(init["capabilities"]["positionEncoding"], "utf-8");
    let (_, init) = Client::start(json!({ "general": { "positionEncodings": ["utf-16"] } })).await;
    assert_eq!(init["capabilities"]["positionEncoding"], "utf-16");
    // No `general` at all (older clients): UTF-16.
    let (_, init) = Client::start(json!({ "textDocument": {} })).await;
    assert_eq!(init["capabilities"]["positionEncoding"], "utf-16");
}

/// CRLF line ends, a character outside the BMP in a comment, and `µ` (one UTF-16 unit, two
/// UTF-8 bytes) twice before a name on the same line.
const WIDE: &str = "# rig 😀 on a bench\r\nsystem rig {\r\n  mass m = 10 kg\r\n  spring k between m and ground = 40 kN/m\r\n  spring k2 between m and ground = 3 µm / 1 µm * k\r\n}\r\n";

#[tokio::test]
async fn utf16_and_crlf_positions() {
    let mut c = Client::utf16().await;
    c.open(URI, WIDE).await;
    // `k` at the end of line 4: 47 UTF-16 units in (48 chars less... counted by hand: each µ is
    // one unit).
    let line4 = WIDE.split("\r\n").nth(4).unwrap();
    let k_utf16 = line4[..line4.rfind('k').unwrap()].encode_utf16().count() as u32;
    assert_eq!(k_utf16, 49);
    let def = c.at("textDocument/definition", URI, (4, k_utf16)).await;
    assert_eq!(range(&def["range"]), "3:9-3:10");
    // The value hint sits at the end of the line (before the CRLF), in UTF-16 units.
    let hints = c.hints(URI).await;
    let h = hints
        .as_array()
        .unwrap()
        .iter()
        .find(|h| h["position"]["line"] == 4)
        .expect("a hint on the k2 line");
    assert_eq!(
        pos(&h["position"]),
        format!("4:{}", line4.encode_utf16().count())
    );
    // 3 µm / 1 µm · 40 kN/m = 120 kN/m.
    assert_eq!(h["label"], "= 120 kN/m");
    // The mode summary on line 1: two springs to ground, 160 kN/m on 10 kg:
    // √(160000/10) = 126.5 rad/s = 20.1 Hz (closed form).
    let top = hints
        .as_array()
        .unwrap()
        .iter()
        .find(|h| h["position"]["line"] == 1)
        .unwrap();
    assert!(
        top["label"]
            .as_str()
            .unwrap()
            .starts_with("20.1 Hz ζ0 undamped"),
        "{top}"
    );
}

#[tokio::test]
async fn utf8_clients_get_byte_columns() {
    let (mut c, _) = Client::start(json!({ "general": { "positionEncodings": ["utf-8"] } })).await;
    c.open(URI, WIDE).await;
    let line4 = WIDE.split("\r\n").nth(4).unwrap();
    let k_bytes = line4.rfind('k').unwrap() as u32;
    assert_eq!(k_bytes, 51);
    let def = c.at("textDocument/definition", URI, (4, k_bytes)).await;
    assert_eq!(range(&def["range"]), "3:9-3:10");
    // An edit in UTF-8 columns: replace `3` (after `= `) with `5`.
    let three = line4.find("3 µm").unwrap() as u32;
    c.change(URI, 2, json!([edit(4, three, three + 1, "5")]))
        .await;
    assert_eq!(
        c.server().document_text(&URI.parse().unwrap()).unwrap(),
        WIDE.replace("= 3 µm", "= 5 µm")
    );
}

#[tokio::test]
async fn out_of_order_versions_drop_the_document() {
    let mut c = Client::utf16().await;
    c.open(URI, RIG).await;
    assert_eq!(c.diagnostics(URI).await["version"], 1);
    c.change(URI, 3, json!([edit(2, 34, 36, "90")])).await;
    // √(90000/10) = 94.87 rad/s = 15.1 Hz: version 3 is what the server holds.
    let hints = c.hints(URI).await;
    assert!(
        hints[0]["label"].as_str().unwrap().starts_with("15.1 Hz"),
        "{hints}"
    );
    // Version 2 after 3: the server cannot know what the client holds.
    c.change(URI, 2, json!([edit(2, 34, 36, "50")])).await;
    let d = c.diagnostics(URI).await;
    assert_eq!(d["diagnostics"], json!([]));
    assert_eq!(d["version"], Value::Null);
    assert_eq!(c.server().document_text(&URI.parse().unwrap()), None);
    assert_eq!(c.at("textDocument/hover", URI, (1, 7)).await, Value::Null);
    // A whole text brings it back.
    c.change(URI, 4, json!([{ "text": RIG }])).await;
    assert_eq!(c.diagnostics(URI).await["version"], 4);
    assert_eq!(
        c.server().document_text(&URI.parse().unwrap()).unwrap(),
        RIG
    );
    assert!(c.at("textDocument/hover", URI, (1, 7)).await.is_object());
}

#[tokio::test]
async fn a_reversed_range_drops_the_document() {
    let mut c = Client::utf16().await;
    c.open(URI, RIG).await;
    c.diagnostics(URI).await;
    c.change(URI, 2, json!([edit(2, 36, 34, "")])).await;
    assert_eq!(c.diagnostics(URI).await["diagnostics"], json!([]));
    assert_eq!(c.server().document_text(&URI.parse().unwrap()), None);
    assert_eq!(c.hints(URI).await, Value::Null);
}

#[tokio::test]
async fn closed_and_unknown_documents_get_empty_answers() {
    let mut c = Client::utf16().await;
    c.open(URI, RIG).await;
    c.diagnostics(URI).await;
    c.notify(
        "textDocument/didClose",
        json!({ "textDocument": { "uri": URI } }),
    )
    .await;
    assert_eq!(c.diagnostics(URI).await["diagnostics"], json!([]));
    for uri in [URI, "file:///never/opened.sprung"] {
        assert_eq!(c.at("textDocument/hover", uri, (1, 7)).await, Value::Null);
        assert_eq!(
            c.at("textDocument/completion", uri, (1, 7)).await,
            Value::Null
        );
        assert_eq!(
            c.at("textDocument/definition", uri, (1, 7)).await,
            Value::Null
        );
        assert_eq!(c.hints(uri).await, Value::Null);
        assert_eq!(
            c.whole("textDocument/documentSymbol", uri).await,
            Value::Null
        );
        assert_eq!(
            c.whole("textDocument/semanticTokens/full", uri).await,
            Value::Null
        );
    }
    // Out-of-range positions on an open document clamp and answer.
    c.open(URI, RIG).await;
    assert_eq!(
        c.at("textDocument/hover", URI, (999, 999)).await,
        Value::Null
    );
    assert!(
        c.at("textDocument/completion", URI, (999, 999))
            .await
            .is_array()
    );
}

#[tokio::test]
async fn diagnostics_are_republished_only_when_they_change() {
    let mut c = Client::utf16().await;
    let text =
        "system rig {\n  mass m = 10 kg\n  spring k between m and ground = 40 kN\n}\n# notes\n";
    c.open(URI, text).await;
    let first = c.diagnostics(URI).await;
    assert_eq!(first["diagnostics"].as_array().unwrap().len(), 1, "{first}");
    // Typing in the trailing comment moves no diagnostic.
    c.change(URI, 2, json!([edit(4, 7, 7, " and more")])).await;
    assert!(
        c.diagnostics_within(URI, Duration::from_millis(400))
            .await
            .is_none()
    );
    // Requests still answer from the new version.
    assert!(c.hints(URI).await.is_array());
    // Fixing the unit clears the error: published with the new version.
    c.change(URI, 3, json!([edit(2, 39, 39, "/m")])).await;
    let d = c.diagnostics(URI).await;
    assert_eq!(d["version"], 3);
    assert_eq!(d["diagnostics"], json!([]));
}

#[tokio::test]
async fn a_burst_of_edits_ends_with_the_newest_result() {
    let mut c = Client::utf16().await;
    c.open(URI, RIG).await;
    // Ten edits in a row: 40 → 41 … 49 kN/m; only the newest may be shown at the end.
    for (i, v) in (41..50).enumerate() {
        c.change(URI, 2 + i as i32, json!([edit(2, 34, 36, &v.to_string())]))
            .await;
    }
    let hints = c.hints(URI).await;
    // √(49000/10) = 70 rad/s = 11.14 Hz (closed form).
    let label = hints[0]["label"].as_str().unwrap();
    assert!(label.starts_with("11.1 Hz"), "{label}");
    let mut last = Value::Null;
    while let Some(d) = c.diagnostics_within(URI, Duration::from_millis(300)).await {
        last = d;
    }
    if !last.is_null() {
        assert_eq!(last["version"], 10);
    }
}

#[tokio::test]
async fn shutdown_then_exit() {
    let mut c = Client::utf16().await;
    c.open(URI, RIG).await;
    assert_eq!(c.request("shutdown", Value::Null).await, Ok(Value::Null));
    let exit = Request::build("exit").finish();
    let svc = c.service.ready().await.expect("ready");
    let _ = svc.call(exit).await;
    assert!(c.service.ready().await.is_err(), "the service has exited");
}

#[tokio::test]
async fn a_panicking_feature_answers_an_internal_error_and_the_server_lives_on() {
    let config = sprung_lsp::ServerConfig {
        panic_in_features: true,
        ..sprung_lsp::ServerConfig::default()
    };
    let (mut c, _) = Client::start_with(json!({}), config).await;
    c.open(URI, RIG).await;
    for _ in 0..3 {
        let err = c
            .request(
                "textDocument/hover",
                json!({ "textDocument": { "uri": URI }, "position": { "line": 1, "character": 7 } }),
            )
            .await
            .expect_err("an internal error");
        assert_eq!(err["code"], -32603, "{err}");
    }
    // Edits and diagnostics still work.
    c.change(URI, 2, json!([edit(2, 34, 36, "90")])).await;
    assert_eq!(
        c.server().document_text(&URI.parse().unwrap()).unwrap(),
        RIG.replace("40 kN/m", "90 kN/m")
    );
    assert_eq!(c.diagnostics(URI).await["version"], 1);
    assert_eq!(c.request("shutdown", Value::Null).await, Ok(Value::Null));
}
