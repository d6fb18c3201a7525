//! Soak: thousands of seeded random incremental edits (inserts, deletes, replacements, a few
//! invalid ranges) while hover, hint, completion and token requests fly. The server never dies,
//! answers every request, and its text always equals the text this test holds.

mod common;

use common::{Client, within};
use serde_json::{Value, json};

const URI: &str = "file:///work/soak.sprung";
const EDITS: usize = 2500;

const START: &str = "## Fan skid.\r\nlet speed = 1450 rpm\nsystem skid {\n  mass fan = 120 kg\n  mass frame = 80 kg\n  spring mount between frame and ground = 4 * 90 kN/m ± 10%\n  spring shaft between fan and frame = 2 MN/m\n  damper loss between frame and ground = 0.05 * 2 * sqrt(mount * frame)\n  force unbalance on fan = 5 N at speed\n  require damping >= 0.02\n}\n";

const SNIPPETS: &[&str] = &[
    "mass ",
    "spring ",
    " between ",
    " and ground",
    " = ",
    "1",
    "2.5",
    " kN/m",
    " kg",
    "*",
    "/",
    "(",
    ")",
    "{",
    "}",
    "\n",
    "\r\n",
    "µ",
    "😀",
    "é",
    "# c",
    "## d\n",
    "require damping >= 0.1\n",
    "sqrt(",
    "fan",
    " ± 5%",
    "\"",
    "..",
    "x",
    " ",
];

/// Byte offset → (line, UTF-16 column), written independently of the server's line index.
fn to_pos(text: &str, offset: usize) -> (u32, u32) {
    let before = &text[..offset];
    let line = before.matches('\n').count() as u32;
    let start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, text[start..offset].encode_utf16().count() as u32)
}

/// A random char boundary that does not split a `\r\n`.
fn boundary(rng: &mut fastrand::Rng, text: &str) -> usize {
    let mut at = rng.usize(0..=text.len());
    while !text.is_char_boundary(at) {
        at -= 1;
    }
    if at > 0 && text.as_bytes()[at - 1] == b'\r' && text.as_bytes().get(at) == Some(&b'\n') {
        at -= 1;
    }
    at
}

fn change(a: (u32, u32), b: (u32, u32), text: &str) -> Value {
    json!([{ "range": { "start": { "line": a.0, "character": a.1 }, "end": { "line": b.0, "character": b.1 } }, "text": text }])
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn random_edits_while_requests_fly() {
    let mut rng = fastrand::Rng::with_seed(0x5eed_0004);
    let mut c = Client::utf16().await;
    let uri: tower_lsp_server::ls_types::Uri = URI.parse().unwrap();
    let mut text = START.to_string();
    let mut version = 1;
    c.open(URI, &text).await;
    let mut pending = Vec::new();
    let mut drops = 0;
    for n in 0..EDITS {
        version += 1;
        let roll = rng.u32(0..100);
        if roll < 2 && !text.is_empty() {
            // Reversed range: the server must drop the document; we reopen it.
            let a = boundary(&mut rng, &text);
            let b = boundary(&mut rng, &text);
            if a != b {
                let (lo, hi) = (a.min(b), a.max(b));
                c.change(
                    URI,
                    version,
                    change(to_pos(&text, hi), to_pos(&text, lo), ""),
                )
                .await;
                assert_eq!(c.server().document_text(&uri), None, "edit {n}");
                drops += 1;
                version += 1;
                c.notify(
                    "textDocument/didOpen",
                    json!({ "textDocument": { "uri": URI, "languageId": "sprung", "version": version, "text": text } }),
                )
                .await;
                continue;
            }
        }
        if roll < 4 {
            // Past the end of the text: clamps to the end.
            let snippet = SNIPPETS[rng.usize(..SNIPPETS.len())];
            let far = (to_pos(&text, text.len()).0 + 5, 3);
            c.change(URI, version, change(far, far, snippet)).await;
            text.push_str(snippet);
        } else {
            let a = boundary(&mut rng, &text);
            let b = if rng.bool() {
                a
            } else {
                boundary(&mut rng, &text)
            };
            let (lo, hi) = (a.min(b), a.max(b));
            let hi = if hi - lo > 40 { lo } else { hi };
            let hi = {
                let mut h = hi;
                while !text.is_char_boundary(h) {
                    h -= 1;
                }
                h.max(lo)
            };
            let insert = if rng.u32(0..3) == 0 {
                ""
            } else {
                SNIPPETS[rng.usize(..SNIPPETS.len())]
            };
            c.change(
                URI,
                version,
                change(to_pos(&text, lo), to_pos(&text, hi), insert),
            )
            .await;
            text.replace_range(lo..hi, insert);
        }
        if n % 7 == 0 {
            let at = boundary(&mut rng, &text);
            let (line, col) = to_pos(&text, at);
            let p = json!({ "textDocument": { "uri": URI }, "position": { "line": line, "character": col } });
            let method = [
                "textDocument/hover",
                "textDocument/completion",
                "textDocument/definition",
            ][n % 3];
            pending.push(tokio::spawn(c.send(method, p)));
            pending.push(tokio::spawn(c.send(
                "textDocument/inlayHint",
                json!({ "textDocument": { "uri": URI }, "range": { "start": { "line": 0, "character": 0 }, "end": { "line": 9999, "character": 0 } } }),
            )));
            if n % 21 == 0 {
                pending.push(tokio::spawn(c.send(
                    "textDocument/semanticTokens/full",
                    json!({ "textDocument": { "uri": URI } }),
                )));
            }
        }
        if n % 100 == 99 {
            // Let some analyses finish, so answers come from many intermediate texts.
            tokio::time::sleep(std::time::Duration::from_millis(25)).await;
        }
        if n % 50 == 0 {
            assert_eq!(
                c.server().document_text(&uri).as_deref(),
                Some(text.as_str()),
                "edit {n}"
            );
        }
    }
    assert!(drops > 0, "the seed exercises invalid ranges");
    assert_eq!(
        c.server().document_text(&uri).as_deref(),
        Some(text.as_str())
    );
    let asked = pending.len();
    let mut answered = 0;
    for p in pending {
        let answer = within("a request during the soak", p)
            .await
            .expect("request task");
        match answer {
            Ok(Value::Null) => {}
            Ok(_) => answered += 1,
            Err(e) => panic!("every request answers without an error: {e}"),
        }
    }
    assert!(asked > 600);
    // Hints and tokens answer with content on an open document; requests still waiting when a
    // bad edit dropped the document answer null, as they should.
    assert!(
        answered >= 100,
        "{answered} of {asked} answered with content"
    );
    // And the server still works normally afterwards.
    let final_snap = within("final analysis", c.server().analyzed(&uri))
        .await
        .expect("snapshot");
    assert_eq!(final_snap.text, text);
}
