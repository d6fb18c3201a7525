//! Ordering through the real transport: `sprung_lsp::run` over an in-memory pipe, where the
//! server runs several handlers at once. Hundreds of `didChange` notifications are written
//! without waiting; if any were applied out of order, its version check would drop the
//! document and the last request would answer null.

use std::time::Duration;

use serde_json::{Value, json};
use tokio::io::{AsyncBufReadExt, AsyncReadExt, AsyncWriteExt, BufReader};

const URI: &str = "file:///work/pipe.sprung";
const EDITS: u32 = 400;

async fn write(w: &mut (impl AsyncWriteExt + Unpin), v: Value) {
    let body = v.to_string();
    let frame = format!("Content-Length: {}\r\n\r\n{body}", body.len());
    w.write_all(frame.as_bytes()).await.expect("write");
}

async fn read(r: &mut (impl AsyncBufReadExt + Unpin)) -> Value {
    let mut len = 0usize;
    loop {
        let mut line = String::new();
        assert!(
            r.read_line(&mut line).await.expect("read") > 0,
            "server closed"
        );
        let line = line.trim_end();
        if line.is_empty() {
            break;
        }
        if let Some(v) = line.strip_prefix("Content-Length:") {
            len = v.trim().parse().expect("length");
        }
    }
    let mut body = vec![0; len];
    r.read_exact(&mut body).await.expect("body");
    serde_json::from_slice(&body).expect("json")
}

async fn response(r: &mut (impl AsyncBufReadExt + Unpin), id: i64) -> Value {
    loop {
        let m = read(r).await;
        if m["id"] == id && m.get("method").is_none() {
            return m;
        }
    }
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn notifications_written_back_to_back_apply_in_order() {
    let (client, server) = tokio::io::duplex(1 << 16);
    let (server_in, server_out) = tokio::io::split(server);
    let running = tokio::spawn(sprung_lsp::run(server_in, server_out));
    let (client_in, mut w) = tokio::io::split(client);
    let mut r = BufReader::new(client_in);
    let test = async {
        write(&mut w, json!({ "jsonrpc": "2.0", "id": 1, "method": "initialize", "params": { "capabilities": {} } })).await;
        response(&mut r, 1).await;
        write(
            &mut w,
            json!({ "jsonrpc": "2.0", "method": "initialized", "params": {} }),
        )
        .await;
        let text = "system s {\n  mass m = 1 kg\n}\n";
        write(
            &mut w,
            json!({ "jsonrpc": "2.0", "method": "textDocument/didOpen", "params": {
            "textDocument": { "uri": URI, "languageId": "sprung", "version": 1, "text": text } } }),
        )
        .await;
        // Each edit appends a comment line where the previous one ended: line 3 + n.
        let writer = async {
            for n in 0..EDITS {
                let line = 3 + n;
                write(&mut w, json!({ "jsonrpc": "2.0", "method": "textDocument/didChange", "params": {
                    "textDocument": { "uri": URI, "version": 2 + n },
                    "contentChanges": [ { "range": { "start": { "line": line, "character": 0 }, "end": { "line": line, "character": 0 } }, "text": format!("# note {n}\n") } ] } })).await;
            }
            write(
                &mut w,
                json!({ "jsonrpc": "2.0", "id": 2, "method": "textDocument/foldingRange",
                "params": { "textDocument": { "uri": URI } } }),
            )
            .await;
        };
        // Read concurrently so the pipe never fills up with diagnostics.
        let (_, folds) = tokio::join!(writer, response(&mut r, 2));
        folds
    };
    let folds = tokio::time::timeout(Duration::from_secs(60), test)
        .await
        .expect("no hang");
    let ranges = folds["result"]
        .as_array()
        .expect("the document is still open");
    let comments: Vec<&Value> = ranges.iter().filter(|f| f["kind"] == "comment").collect();
    assert_eq!(comments.len(), 1, "{folds}");
    assert_eq!(comments[0]["startLine"], 3);
    assert_eq!(comments[0]["endLine"], 3 + EDITS - 1);
    running.abort();
}
