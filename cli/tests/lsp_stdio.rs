//! End to end over stdio: `sprung lsp` is started as a process, a document is opened and edited
//! incrementally, diagnostics and inlay hints are read, and the server shuts down and exits.
//! Every read has a deadline and the child is killed on failure, so the test cannot hang.

use std::io::{BufRead, BufReader, Write};
use std::process::{Child, ChildStdin, Command, Stdio};
use std::sync::mpsc::{self, Receiver};
use std::time::{Duration, Instant};

use serde_json::{Value, json};

const TIMEOUT: Duration = Duration::from_secs(30);
const URI: &str = "file:///work/stand.sprung";

/// 10 kg on 40 kN/m: √(40000/10) = 63.25 rad/s = 10.07 Hz; edited to 90 kN/m:
/// √(90000/10) = 94.87 rad/s = 15.10 Hz (closed form, standard vibration texts, from memory).
const TEXT: &str = "system stand {\n  mass m = 10 kg\n  spring k between m and ground = 40 kN/m\n  require frequency >= 12 Hz\n}\n";

struct Server {
    child: Child,
    stdin: ChildStdin,
    messages: Receiver<Value>,
}

impl Drop for Server {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

fn read_message(reader: &mut impl BufRead) -> Option<Value> {
    let mut length = None;
    loop {
        let mut line = String::new();
        if reader.read_line(&mut line).ok()? == 0 {
            return None;
        }
        let line = line.trim_end();
        if line.is_empty() {
            break;
        }
        if let Some(v) = line.strip_prefix("Content-Length:") {
            length = v.trim().parse::<usize>().ok();
        }
    }
    let mut body = vec![0; length?];
    reader.read_exact(&mut body).ok()?;
    serde_json::from_slice(&body).ok()
}

impl Server {
    fn start() -> Server {
        let mut child = Command::new(env!("CARGO_BIN_EXE_sprung"))
            .arg("lsp")
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .expect("start sprung lsp");
        let stdin = child.stdin.take().expect("stdin");
        let stdout = child.stdout.take().expect("stdout");
        let (tx, rx) = mpsc::channel();
        std::thread::spawn(move || {
            let mut reader = BufReader::new(stdout);
            while let Some(m) = read_message(&mut reader) {
                if tx.send(m).is_err() {
                    break;
                }
            }
        });
        Server {
            child,
            stdin,
            messages: rx,
        }
    }

    fn send(&mut self, message: Value) {
        let body = message.to_string();
        write!(self.stdin, "Content-Length: {}\r\n\r\n{body}", body.len()).expect("write");
        self.stdin.flush().expect("flush");
    }

    /// The next message that satisfies `pred`, within the deadline.
    fn wait_for(&mut self, what: &str, pred: impl Fn(&Value) -> bool) -> Value {
        let deadline = Instant::now() + TIMEOUT;
        loop {
            let left = deadline.saturating_duration_since(Instant::now());
            match self.messages.recv_timeout(left) {
                Ok(m) if pred(&m) => return m,
                Ok(_) => {}
                Err(_) => panic!("timed out waiting for {what}"),
            }
        }
    }

    fn request(&mut self, id: i64, method: &str, params: Value) -> Value {
        self.send(json!({ "jsonrpc": "2.0", "id": id, "method": method, "params": params }));
        self.wait_for(method, |m| m["id"] == id && m.get("method").is_none())
    }

    fn notify(&mut self, method: &str, params: Value) {
        self.send(json!({ "jsonrpc": "2.0", "method": method, "params": params }));
    }

    fn diagnostics(&mut self, version: i64) -> Value {
        self.wait_for("publishDiagnostics", |m| {
            m["method"] == "textDocument/publishDiagnostics" && m["params"]["version"] == version
        })
    }
}

#[test]
fn open_edit_read_hints_and_shut_down() {
    let mut s = Server::start();
    let init = s.request(
        1,
        "initialize",
        json!({ "processId": null, "rootUri": null, "capabilities": {} }),
    );
    assert_eq!(init["result"]["capabilities"]["positionEncoding"], "utf-16");
    s.notify("initialized", json!({}));
    s.notify(
        "textDocument/didOpen",
        json!({ "textDocument": { "uri": URI, "languageId": "sprung", "version": 1, "text": TEXT } }),
    );
    // 10.07 Hz < 12 Hz: the requirement fails on line 3.
    let d = s.diagnostics(1);
    let diags = d["params"]["diagnostics"]
        .as_array()
        .expect("diagnostics")
        .clone();
    assert!(
        diags
            .iter()
            .any(|d| d["severity"] == 1 && d["range"]["start"]["line"] == 3),
        "{diags:#?}"
    );

    // Incremental edit: `40` → `90` on line 2, columns 34..36.
    s.notify(
        "textDocument/didChange",
        json!({ "textDocument": { "uri": URI, "version": 2 }, "contentChanges": [
            { "range": { "start": { "line": 2, "character": 34 }, "end": { "line": 2, "character": 36 } }, "text": "90" } ] }),
    );
    // 15.10 Hz ≥ 12 Hz: no more errors.
    let d = s.diagnostics(2);
    let errors = d["params"]["diagnostics"]
        .as_array()
        .expect("diagnostics")
        .iter()
        .filter(|d| d["severity"] == 1)
        .count();
    assert_eq!(errors, 0, "{d:#}");

    let hints = s.request(
        2,
        "textDocument/inlayHint",
        json!({ "textDocument": { "uri": URI }, "range": { "start": { "line": 0, "character": 0 }, "end": { "line": 10, "character": 0 } } }),
    );
    let labels: Vec<&str> = hints["result"]
        .as_array()
        .expect("hints")
        .iter()
        .filter_map(|h| h["label"].as_str())
        .collect();
    assert!(
        labels.iter().any(|l| l.starts_with("15.1 Hz ζ0 undamped")),
        "{labels:?}"
    );
    assert!(
        labels.iter().any(|l| l.starts_with("✓ 15.1 Hz")),
        "{labels:?}"
    );

    let down = s.request(3, "shutdown", Value::Null);
    assert_eq!(down["result"], Value::Null);
    assert!(down.get("error").is_none());
    s.notify("exit", Value::Null);
    let deadline = Instant::now() + TIMEOUT;
    loop {
        match s.child.try_wait().expect("wait") {
            Some(status) => {
                assert!(status.success(), "exit status {status}");
                break;
            }
            None if Instant::now() > deadline => panic!("sprung lsp did not exit"),
            None => std::thread::sleep(Duration::from_millis(20)),
        }
    }
}
