//! The in-process test client: drives the service directly, collects what the server sends,
//! and compares outputs with `.expected` files (rewritten when `UPDATE_EXPECT=1`).

#![allow(dead_code)]

use std::future::Future;
use std::path::PathBuf;
use std::time::Duration;

use futures::StreamExt;
use serde_json::{Value, json};
use sprung_lsp::ServerConfig;
use tokio::sync::mpsc;
use tower::{Service, ServiceExt};
use tower_lsp_server::LspService;
use tower_lsp_server::jsonrpc::Request;

pub const TIMEOUT: Duration = Duration::from_secs(20);

pub async fn within<T>(what: &str, f: impl Future<Output = T>) -> T {
    match tokio::time::timeout(TIMEOUT, f).await {
        Ok(v) => v,
        Err(_) => panic!("timed out waiting for {what}"),
    }
}

pub struct Client {
    pub service: LspService<sprung_lsp::Server>,
    notifications: mpsc::UnboundedReceiver<(String, Value)>,
    next_id: i64,
}

impl Client {
    /// A server initialized with the given client capabilities.
    pub async fn start(capabilities: Value) -> (Client, Value) {
        Client::start_with(capabilities, ServerConfig::default()).await
    }

    pub async fn start_with(capabilities: Value, config: ServerConfig) -> (Client, Value) {
        let (service, socket) = sprung_lsp::service(config);
        let (tx, rx) = mpsc::unbounded_channel();
        tokio::spawn(async move {
            let mut socket = socket;
            while let Some(req) = socket.next().await {
                let (method, _id, params) = req.into_parts();
                let _ = tx.send((method.to_string(), params.unwrap_or(Value::Null)));
            }
        });
        let mut c = Client {
            service,
            notifications: rx,
            next_id: 0,
        };
        let init = c
            .request(
                "initialize",
                json!({ "processId": null, "rootUri": null, "capabilities": capabilities }),
            )
            .await
            .expect("initialize answers");
        c.notify("initialized", json!({})).await;
        (c, init)
    }

    /// A UTF-16 client that offers nothing in particular.
    pub async fn utf16() -> Client {
        Client::start(json!({})).await.0
    }

    /// Sends a request now; the returned future gives its result (or the error object).
    pub fn send(
        &mut self,
        method: &str,
        params: Value,
    ) -> impl Future<Output = Result<Value, Value>> + use<> {
        self.next_id += 1;
        let req = Request::build(method.to_string())
            .id(self.next_id)
            .params(params)
            .finish();
        let fut = self.service.call(req);
        async move {
            let resp = fut
                .await
                .expect("the service is running")
                .expect("a request gets a response");
            let (_, body) = resp.into_parts();
            body.map_err(|e| serde_json::to_value(e).unwrap_or(Value::Null))
        }
    }

    pub async fn request(&mut self, method: &str, params: Value) -> Result<Value, Value> {
        within(method, async {
            self.service.ready().await.expect("ready");
            self.send(method, params).await
        })
        .await
    }

    pub async fn notify(&mut self, method: &str, params: Value) {
        let req = Request::build(method.to_string()).params(params).finish();
        within(method, async {
            let svc = self.service.ready().await.expect("ready");
            let resp = svc.call(req).await.expect("the service is running");
            assert!(resp.is_none(), "a notification gets no response");
        })
        .await;
    }

    pub async fn open(&mut self, uri: &str, text: &str) {
        self.notify(
            "textDocument/didOpen",
            json!({ "textDocument": { "uri": uri, "languageId": "sprung", "version": 1, "text": text } }),
        )
        .await;
    }

    pub async fn change(&mut self, uri: &str, version: i32, changes: Value) {
        self.notify(
            "textDocument/didChange",
            json!({ "textDocument": { "uri": uri, "version": version }, "contentChanges": changes }),
        )
        .await;
    }

    /// The next `publishDiagnostics` for `uri`.
    pub async fn diagnostics(&mut self, uri: &str) -> Value {
        within("publishDiagnostics", async {
            loop {
                let (method, params) = self.notifications.recv().await.expect("server alive");
                if method == "textDocument/publishDiagnostics" && params["uri"] == uri {
                    return params;
                }
            }
        })
        .await
    }

    /// The next message the server sends (a notification or a request), as method and params.
    pub async fn next_message(&mut self) -> (String, Value) {
        self.notifications.recv().await.expect("server alive")
    }

    /// Whether a `publishDiagnostics` for `uri` arrives within `wait`.
    pub async fn diagnostics_within(&mut self, uri: &str, wait: Duration) -> Option<Value> {
        tokio::time::timeout(wait, self.diagnostics(uri)).await.ok()
    }

    pub async fn at(&mut self, method: &str, uri: &str, pos: (u32, u32)) -> Value {
        self.request(
            method,
            json!({ "textDocument": { "uri": uri }, "position": { "line": pos.0, "character": pos.1 } }),
        )
        .await
        .expect("no error")
    }

    pub async fn whole(&mut self, method: &str, uri: &str) -> Value {
        self.request(method, json!({ "textDocument": { "uri": uri } }))
            .await
            .expect("no error")
    }

    pub async fn hints(&mut self, uri: &str) -> Value {
        self.request(
            "textDocument/inlayHint",
            json!({ "textDocument": { "uri": uri }, "range": {
                "start": { "line": 0, "character": 0 }, "end": { "line": 100000, "character": 0 } } }),
        )
        .await
        .expect("no error")
    }

    pub fn server(&self) -> &sprung_lsp::Server {
        self.service.inner()
    }
}

/// Splits a fixture at its `$0` marker: the text without it and the marker's UTF-16 position.
pub fn cursor(fixture: &str) -> (String, (u32, u32)) {
    let at = fixture.find("$0").expect("fixture has a $0 cursor");
    let text = format!("{}{}", &fixture[..at], &fixture[at + 2..]);
    let before = &fixture[..at];
    let line = before.matches('\n').count() as u32;
    let col = before
        .rsplit('\n')
        .next()
        .unwrap_or("")
        .encode_utf16()
        .count() as u32;
    (text, (line, col))
}

/// Compares `actual` with `tests/expected/NAME.expected`; `UPDATE_EXPECT=1` rewrites it.
pub fn expect_file(name: &str, actual: &str) {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/expected")
        .join(format!("{name}.expected"));
    if std::env::var_os("UPDATE_EXPECT").is_some() {
        std::fs::write(&path, actual).expect("write expected file");
        return;
    }
    let expected = std::fs::read_to_string(&path)
        .unwrap_or_else(|_| panic!("missing {}; run with UPDATE_EXPECT=1", path.display()));
    assert_eq!(
        expected.replace("\r\n", "\n"),
        actual,
        "{name}: output differs from {} (UPDATE_EXPECT=1 rewrites it)",
        path.display()
    );
}

/// `line:col` of a protocol position object.
pub fn pos(v: &Value) -> String {
    format!("{}:{}", v["line"], v["character"])
}

pub fn range(v: &Value) -> String {
    format!("{}-{}", pos(&v["start"]), pos(&v["end"]))
}

/// The measurement document of `latency.rs` and `memory.rs`: a chain of `n` masses of 2 kg
/// joined by 50 kN/m springs, the first to ground, 3 N·s/m to ground on every mass (so the
/// damping is classical), and one damping requirement.
pub fn chain(n: usize) -> String {
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
