//! Every example of the repository, opened in the server: hints on every system, and hover,
//! completion and definition at every few characters answer without an error.

mod common;

use common::Client;
use serde_json::json;

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn every_example_answers_everywhere() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples");
    let mut files: Vec<_> = std::fs::read_dir(&dir)
        .expect("examples folder")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "sprung"))
        .collect();
    files.sort();
    assert!(files.len() >= 3, "{files:?}");
    let mut c = Client::utf16().await;
    let (mut asked, mut hovers) = (0, 0);
    for path in files {
        let text = std::fs::read_to_string(&path).expect("read example");
        let uri = format!("file://{}", path.display());
        c.open(&uri, &text).await;
        let hints = c.hints(&uri).await;
        let labels: Vec<&str> = hints
            .as_array()
            .expect("hints")
            .iter()
            .filter_map(|h| h["label"].as_str())
            .collect();
        assert!(
            labels.iter().any(|l| l.contains(" Hz ")),
            "{}: a mode summary: {labels:?}",
            path.display()
        );
        for (line, l) in text.lines().enumerate() {
            let width = l.encode_utf16().count() as u32;
            for col in (0..=width).step_by(3) {
                let p = json!({ "textDocument": { "uri": uri }, "position": { "line": line, "character": col } });
                for m in [
                    "textDocument/hover",
                    "textDocument/completion",
                    "textDocument/definition",
                ] {
                    let answer = c.request(m, p.clone()).await;
                    assert!(
                        answer.is_ok(),
                        "{} {line}:{col} {m}: {answer:?}",
                        path.display()
                    );
                    asked += 1;
                    if m == "textDocument/hover" && answer.is_ok_and(|a| !a.is_null()) {
                        hovers += 1;
                    }
                }
            }
        }
    }
    eprintln!("{asked} requests, {hovers} hovers with content");
    assert!(
        asked > 3000 && hovers > 100,
        "{asked} requests, {hovers} hovers"
    );
}

#[tokio::test]
async fn centrifuge_hints_render() {
    let path =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples/centrifuge.sprung");
    let text = std::fs::read_to_string(&path).expect("read example");
    let mut c = Client::utf16().await;
    c.open("file:///c.sprung", &text).await;
    let hints = c.hints("file:///c.sprung").await;
    let mut out = String::new();
    for h in hints.as_array().unwrap() {
        out.push_str(&format!(
            "{}:{} {}\n",
            h["position"]["line"],
            h["position"]["character"],
            h["label"].as_str().unwrap()
        ));
    }
    common::expect_file("hints_centrifuge", &out);
}
