//! Features over the in-process service: fixtures with `$0` cursors, outputs compared with
//! `tests/expected/*.expected` (UPDATE_EXPECT=1 rewrites them), and the physics numbers checked
//! against hand computations.

mod common;

use common::{Client, cursor, expect_file, pos, range};
use serde_json::{Value, json};

const URI: &str = "file:///work/pad.sprung";

/// One mass on one spring and one damper. Hand computation (closed form, standard vibration
/// texts, from memory): ω0 = √(k/m) = √(40000/10) = 63.246 rad/s, f = ω0/2π = 10.066 Hz;
/// c = 0.1·2·√(k·m) = 0.2·632.46 = 126.49 N·s/m, so ζ = c/(2√(km)) = 0.1 and
/// γ = c/(2m) = 6.3246 1/s.
const PAD: &str = "## A compressor foot on one rubber pad.
system pad \"Compressor foot\" {
  mass m = 10 kg
  spring k between m and ground = 40 kN/m
  ## Loss of the rubber: 10% of critical.
  damper c between m and ground = 0.1 * 2 * sqrt(k * m)
  require damping >= 0.05
  require frequency of mode 1 >= 12 Hz
}
";

async fn pad() -> Client {
    let mut c = Client::utf16().await;
    c.open(URI, PAD).await;
    c
}

fn render_hints(hints: &Value) -> String {
    let mut out = String::new();
    for h in hints.as_array().expect("hints array") {
        out.push_str(&format!(
            "{} {}\n",
            pos(&h["position"]),
            h["label"].as_str().unwrap_or("?")
        ));
    }
    out
}

fn markdown(hover: &Value) -> String {
    hover["contents"]["value"]
        .as_str()
        .unwrap_or("<none>")
        .to_string()
}

#[tokio::test]
async fn diagnostics_carry_failed_requirements_and_the_version() {
    let mut c = pad().await;
    let d = c.diagnostics(URI).await;
    assert_eq!(d["version"], 1);
    let diags = d["diagnostics"].as_array().unwrap();
    let failed: Vec<&Value> = diags.iter().filter(|d| d["severity"] == 1).collect();
    assert_eq!(failed.len(), 1, "{diags:#?}");
    // The frequency requirement is on line 7 (0-based).
    assert_eq!(failed[0]["range"]["start"]["line"], 7);
    assert_eq!(failed[0]["source"], "sprung");
}

#[tokio::test]
async fn hints_on_a_one_mass_system() {
    let mut c = pad().await;
    let hints = c.hints(URI).await;
    let text = render_hints(&hints);
    // Values from the hand computation above, to three figures.
    assert!(text.contains("10.1 Hz ζ0.1 underdamped"), "{text}");
    assert!(text.contains("ω0 63.2 rad/s γ 6.32 1/s"), "{text}");
    assert!(text.contains("= 126 N·s/m"), "{text}");
    assert!(text.contains("✓ ζ 0.1"), "{text}");
    assert!(text.contains("✗ 10.1 Hz (mode 1)"), "{text}");
    // Literal values get no hint.
    assert!(!text.contains("= 10 kg"), "{text}");
    expect_file("hints_pad", &text);
    // Tooltips hold the detail: the damper in SI.
    let damper = hints
        .as_array()
        .unwrap()
        .iter()
        .find(|h| h["label"] == "= 126 N·s/m")
        .unwrap();
    let tip = damper["tooltip"]["value"].as_str().unwrap();
    assert!(tip.contains("126.5 N·s/m"), "{tip}");
}

#[tokio::test]
async fn hints_only_in_the_asked_range() {
    let mut c = pad().await;
    let hints = c
        .request(
            "textDocument/inlayHint",
            json!({ "textDocument": { "uri": URI }, "range": {
                "start": { "line": 5, "character": 0 }, "end": { "line": 6, "character": 0 } } }),
        )
        .await
        .unwrap();
    assert_eq!(render_hints(&hints), "5:55 = 126 N·s/m\n");
}

#[tokio::test]
async fn hover_on_system_shows_the_mode_table() {
    let mut c = pad().await;
    let h = c.at("textDocument/hover", URI, (1, 8)).await;
    let md = markdown(&h);
    assert!(md.contains("| 1 | 10.07 Hz (63.25 rad/s) | 0.1 |"), "{md}");
    assert!(md.contains("A compressor foot on one rubber pad."), "{md}");
    expect_file("hover_system", &md);
}

#[tokio::test]
async fn hover_on_spring_gives_share_and_sensitivity() {
    let mut c = pad().await;
    // On the use of `k` inside the damper's value.
    let (_, at) = cursor(
        "## A compressor foot on one rubber pad.
system pad \"Compressor foot\" {
  mass m = 10 kg
  spring k between m and ground = 40 kN/m
  ## Loss of the rubber: 10% of critical.
  damper c between m and ground = 0.1 * 2 * sqrt($0k * m)",
    );
    let md = markdown(&c.at("textDocument/hover", URI, at).await);
    // One spring stores all the strain energy; ωn ∝ √k, so +10% moves it by √1.1 − 1 = +4.88%.
    assert!(md.contains("| 1 | 10.07 Hz | 100% | +4.88% |"), "{md}");
    assert!(md.contains("40 kN/m (40000 N/m in SI"), "{md}");
    expect_file("hover_spring", &md);
}

#[tokio::test]
async fn hover_on_mass_and_damper() {
    let mut c = pad().await;
    let md = markdown(&c.at("textDocument/hover", URI, (2, 7)).await);
    // All kinetic energy is in the one mass; ωn ∝ 1/√m: 1/√1.1 − 1 = −4.65%.
    assert!(md.contains("| 1 | 10.07 Hz | 100% | -4.65% |"), "{md}");
    let md = markdown(&c.at("textDocument/hover", URI, (5, 10)).await);
    assert!(md.contains("Loss of the rubber: 10% of critical."), "{md}");
    // ωn = √(k/m) does not depend on c: a +10% damper leaves it where it is.
    assert!(md.contains("| 1 | 10.07 Hz | 100% | +0% |"), "{md}");
}

#[tokio::test]
async fn hover_on_units_and_requirements() {
    let mut c = pad().await;
    // `kN` in `40 kN/m`: 1 kN = 1000 N (SI prefix kilo).
    let md = markdown(&c.at("textDocument/hover", URI, (3, 37)).await);
    assert!(md.starts_with("**kN** — kilonewton"), "{md}");
    assert!(md.contains("1 kN = 1000 N"), "{md}");
    assert!(md.contains("`kN/m` = 1000 N/m"), "{md}");
    // The failing frequency requirement: 10.07 Hz against 12 Hz.
    let md = markdown(&c.at("textDocument/hover", URI, (7, 5)).await);
    assert!(md.contains("**fails**"), "{md}");
    assert!(md.contains("- value: 10.1 Hz (mode 1)"), "{md}");
    assert!(md.contains("- limit: 12 Hz"), "{md}");
    assert!(md.contains("- worst corner: nominal"), "{md}");
    expect_file("hover_requirement", &md);
}

#[tokio::test]
async fn tolerance_ranges_in_hover() {
    let mut c = Client::utf16().await;
    let text = "system s {\n  let feet = 4 * 18 kN/m ± 15%\n  mass m = 6 kg\n  spring r between m and ground = feet\n}\n";
    c.open(URI, text).await;
    let md = markdown(&c.at("textDocument/hover", URI, (1, 7)).await);
    // 72 kN/m ± 15%: 61.2 … 82.8 kN/m.
    assert!(md.contains("72 kN/m"), "{md}");
    assert!(md.contains("61.2 kN/m … 82.8 kN/m"), "{md}");
}

fn labels(v: &Value) -> Vec<String> {
    v.as_array()
        .map(|a| {
            a.iter()
                .map(|i| i["label"].as_str().unwrap_or("").to_string())
                .collect()
        })
        .unwrap_or_default()
}

async fn complete(fixture: &str) -> Vec<String> {
    let (text, at) = cursor(fixture);
    let mut c = Client::utf16().await;
    c.open(URI, &text).await;
    labels(&c.at("textDocument/completion", URI, at).await)
}

#[tokio::test]
async fn completion_by_context() {
    let nodes =
        complete("system s {\n  mass a = 1 kg\n  mass b = 2 kg\n  spring k between $0\n}\n").await;
    assert_eq!(nodes, ["a", "b", "ground"]);

    let units =
        complete("system s {\n  mass a = 1 kg\n  spring k between a and ground = 40 $0\n}\n").await;
    assert!(units.contains(&"kN/m".to_string()), "{units:?}");
    assert!(
        !units.contains(&"kg".to_string()),
        "only stiffness units: {units:?}"
    );

    let units = complete("system s {\n  mass a = 1$0\n}\n").await;
    assert_eq!(units[0], "kg");
    assert!(!units.contains(&"N/m".to_string()), "{units:?}");

    let regimes = complete("system s {\n  mass a = 1 kg\n  require regime is $0\n}\n").await;
    assert_eq!(
        regimes,
        [
            "undamped",
            "underdamped",
            "critically damped",
            "overdamped",
            "not"
        ]
    );

    let kws = complete("system s {\n  mass a = 1 kg\n  $0\n}\n").await;
    assert!(
        kws.contains(&"spring".to_string()) && !kws.contains(&"system".to_string()),
        "{kws:?}"
    );
    let top = complete("$0\n").await;
    assert_eq!(top, ["let", "system", "use"]);

    let names = complete(
        "let g0 = 2\nsystem s {\n  mass a = 1 kg\n  spring k between a and ground = 3 * $0\n}\n",
    )
    .await;
    assert!(
        names.contains(&"a".to_string()) && names.contains(&"g0".to_string()),
        "{names:?}"
    );
    assert!(
        names.contains(&"sqrt".to_string()) && names.contains(&"pi".to_string()),
        "{names:?}"
    );

    let drives = complete("system s {\n  mass a = 1 kg\n  force f on a = 1 N at 3 Hz\n  require separation from $0\n}\n").await;
    assert_eq!(drives, ["f"]);

    let compound =
        complete("system s {\n  mass a = 1 kg\n  damper d between a and ground = 40 N*$0\n}\n")
            .await;
    assert!(compound.contains(&"s".to_string()), "{compound:?}");
}

#[tokio::test]
async fn navigation_definition_references_highlight() {
    let mut c = pad().await;
    // `k` used in the damper value → its definition on line 3.
    let def = c.at("textDocument/definition", URI, (5, 49)).await;
    assert_eq!(range(&def["range"]), "3:9-3:10");
    let refs = c
        .request(
            "textDocument/references",
            json!({ "textDocument": { "uri": URI }, "position": { "line": 2, "character": 7 },
                    "context": { "includeDeclaration": true } }),
        )
        .await
        .unwrap();
    let got: Vec<String> = refs
        .as_array()
        .unwrap()
        .iter()
        .map(|l| range(&l["range"]))
        .collect();
    // `m`: defined on line 2, used as an end of k and c and inside c's value.
    assert_eq!(got, ["2:7-2:8", "3:19-3:20", "5:19-5:20", "5:53-5:54"]);
    let hl = c.at("textDocument/documentHighlight", URI, (3, 19)).await;
    assert_eq!(hl.as_array().unwrap().len(), 4);
    // A keyword has no definition.
    assert_eq!(
        c.at("textDocument/definition", URI, (2, 3)).await,
        Value::Null
    );
}

#[tokio::test]
async fn rename_refuses_keywords_and_units() {
    let mut c = pad().await;
    let prep = c.at("textDocument/prepareRename", URI, (2, 7)).await;
    assert_eq!(prep["placeholder"], "m");
    // On the keyword `spring` and on the unit `kg`: nothing to rename.
    assert_eq!(
        c.at("textDocument/prepareRename", URI, (3, 3)).await,
        Value::Null
    );
    assert_eq!(
        c.at("textDocument/prepareRename", URI, (2, 14)).await,
        Value::Null
    );
    let edit = c
        .request(
            "textDocument/rename",
            json!({ "textDocument": { "uri": URI }, "position": { "line": 2, "character": 7 }, "newName": "body" }),
        )
        .await
        .unwrap();
    let edits = edit["changes"][URI].as_array().unwrap();
    assert_eq!(edits.len(), 4);
    assert!(edits.iter().all(|e| e["newText"] == "body"));
    let refused = c
        .request(
            "textDocument/rename",
            json!({ "textDocument": { "uri": URI }, "position": { "line": 2, "character": 7 }, "newName": "spring" }),
        )
        .await;
    assert!(refused.is_err(), "{refused:?}");
    let clash = c
        .request(
            "textDocument/rename",
            json!({ "textDocument": { "uri": URI }, "position": { "line": 2, "character": 7 }, "newName": "k" }),
        )
        .await;
    assert!(clash.is_err(), "{clash:?}");
}

#[tokio::test]
async fn outline_folding_and_tokens() {
    let mut c = pad().await;
    let syms = c.whole("textDocument/documentSymbol", URI).await;
    let mut out = String::new();
    for s in syms.as_array().unwrap() {
        out.push_str(&format!(
            "{} {} {}\n",
            s["name"].as_str().unwrap(),
            s["detail"].as_str().unwrap(),
            range(&s["selectionRange"])
        ));
        for ch in s["children"].as_array().into_iter().flatten() {
            out.push_str(&format!(
                "  {} {} {}\n",
                ch["name"].as_str().unwrap(),
                ch["detail"].as_str().unwrap(),
                range(&ch["selectionRange"])
            ));
        }
    }
    expect_file("symbols_pad", &out);
    assert!(out.contains("  c damper 5:9-5:10"), "{out}");

    let folds = c.whole("textDocument/foldingRange", URI).await;
    assert_eq!(folds[0]["startLine"], 1);
    assert_eq!(folds[0]["endLine"], 7);

    let toks = c.whole("textDocument/semanticTokens/full", URI).await;
    let data: Vec<u64> = toks["data"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_u64().unwrap())
        .collect();
    let text = decode_tokens(PAD, &data);
    expect_file("tokens_pad", &text);
    assert!(text.contains("3:9 k spring declaration"), "{text}");
    assert!(text.contains("3:37 kN/m unit"), "{text}");
}

/// Decodes semantic tokens against the (ASCII) text: `line:col text type [declaration]`.
fn decode_tokens(text: &str, data: &[u64]) -> String {
    const TYPES: &[&str] = &[
        "keyword",
        "number",
        "comment",
        "string",
        "namespace",
        "variable",
        "mass",
        "spring",
        "damper",
        "drive",
        "unit",
        "function",
        "operator",
    ];
    let lines: Vec<&str> = text.lines().collect();
    let (mut line, mut col) = (0u64, 0u64);
    let mut out = String::new();
    for t in data.chunks(5) {
        if t[0] > 0 {
            line += t[0];
            col = t[1];
        } else {
            col += t[1];
        }
        let l = lines.get(line as usize).copied().unwrap_or("");
        let word: String = l.chars().skip(col as usize).take(t[2] as usize).collect();
        let decl = if t[4] & 1 != 0 { " declaration" } else { "" };
        out.push_str(&format!(
            "{line}:{col} {word} {}{decl}\n",
            TYPES[t[3] as usize]
        ));
    }
    out
}

#[tokio::test]
async fn selection_ranges_grow_outwards() {
    let mut c = pad().await;
    // On `k` inside `sqrt(k * m)` on line 5.
    let sel = c
        .request(
            "textDocument/selectionRange",
            json!({ "textDocument": { "uri": URI }, "positions": [ { "line": 5, "character": 49 } ] }),
        )
        .await
        .unwrap();
    let mut out = Vec::new();
    let mut at = &sel[0];
    while at.is_object() {
        out.push(range(&at["range"]));
        at = &at["parent"];
    }
    assert_eq!(
        out,
        [
            "5:49-5:50", // k
            "5:49-5:54", // k * m
            "5:44-5:55", // sqrt(k * m)
            "5:34-5:55", // the whole value
            "5:2-5:55",  // the statement
            "1:29-8:1",  // the body
            "1:0-8:1",   // the system
            "0:0-9:0",   // the file
        ]
    );
}

#[tokio::test]
async fn workspace_symbols_over_open_files() {
    let mut c = pad().await;
    c.open(
        "file:///work/other.sprung",
        "let k_base = 3 kN/m\nsystem other {\n  mass kk = 1 kg\n}\n",
    )
    .await;
    c.hints("file:///work/other.sprung").await; // both analyzed
    c.hints(URI).await;
    let syms = c
        .request("workspace/symbol", json!({ "query": "K" }))
        .await
        .unwrap();
    let mut names: Vec<String> = syms
        .as_array()
        .unwrap()
        .iter()
        .map(|s| {
            format!(
                "{} in {}",
                s["name"].as_str().unwrap(),
                s["containerName"].as_str().unwrap_or("-")
            )
        })
        .collect();
    names.sort();
    assert_eq!(names, ["k in pad", "k_base in -", "kk in other"]);
}

#[tokio::test]
async fn hover_shows_doc_comments_where_no_value_is_known() {
    let mut c = Client::utf16().await;
    let text = "## Top speed of the drum.\nlet top = 3200 rpm\nsystem s {\n  ## The drum.\n  mass drum = 3 N\n}\n";
    c.open(URI, text).await;
    // A top-level let: the engine keeps no value for it, the doc still shows.
    let md = markdown(&c.at("textDocument/hover", URI, (1, 5)).await);
    assert!(md.contains("Top speed of the drum."), "{md}");
    // A mass with a unit error: no value, but its doc and statement.
    let md = markdown(&c.at("textDocument/hover", URI, (4, 8)).await);
    assert!(
        md.contains("The drum.") && md.contains("mass drum = 3 N"),
        "{md}"
    );
}

#[tokio::test]
async fn code_lens_over_each_system() {
    let mut c = pad().await;
    let lenses = c.whole("textDocument/codeLens", URI).await;
    let l = &lenses[0];
    assert_eq!(range(&l["range"]), "1:7-1:10");
    // One mode at 10.07 Hz (hand computation at the top of this file).
    assert_eq!(l["command"]["title"], "1 mode · lowest 10.1 Hz");
}

async fn actions(c: &mut Client, line: u32) -> Vec<(String, String)> {
    let a = c
        .request(
            "textDocument/codeAction",
            json!({ "textDocument": { "uri": URI }, "range": {
                "start": { "line": line, "character": 0 }, "end": { "line": line, "character": 200 } },
                "context": { "diagnostics": [] } }),
        )
        .await
        .unwrap();
    a.as_array()
        .unwrap()
        .iter()
        .map(|x| {
            let e = &x["edit"]["changes"][URI][0];
            (
                x["title"].as_str().unwrap().to_string(),
                format!("{} {}", range(&e["range"]), e["newText"].as_str().unwrap()),
            )
        })
        .collect()
}

#[tokio::test]
async fn quick_fixes_for_pounds_units_and_names() {
    let mut c = Client::utf16().await;
    let text = "system s {\n  mass m = 20 lb\n  spring k between m and ground = 40 kn/m\n  damper d between m and ground = 0.1 * sqrt(k * mm)\n}\n";
    c.open(URI, text).await;
    assert_eq!(
        actions(&mut c, 1).await,
        [
            (
                "Replace `lb` with `lbm`".to_string(),
                "1:14-1:16 lbm".to_string()
            ),
            (
                "Replace `lb` with `lbf`".to_string(),
                "1:14-1:16 lbf".to_string()
            ),
        ]
    );
    assert_eq!(
        actions(&mut c, 2).await,
        [(
            "Replace `kn` with `kN`".to_string(),
            "2:37-2:39 kN".to_string()
        )]
    );
    assert_eq!(
        actions(&mut c, 3).await,
        [(
            "Replace `mm` with `m`".to_string(),
            "3:49-3:51 m".to_string()
        )]
    );
}

// ---- formatting ----

/// A fan skid written in a hurry: two statements on one line, loose spacing, `+-`, a `·`,
/// and multi-byte characters (`µ`, `±`) before the changes so UTF-16 positions matter.
const MESSY_SKID: &str = "## Fan skid, µ-sized tolerances ± everywhere.
system skid {
  mass frame = 420 kg ± 5%   # welded base
  spring isolators between frame and ground=4*65 kN/m+-10%
  damper snubbers between frame and ground = 2·0.05*sqrt(isolators*frame)  force hum on frame = 180 N at 1180 rpm
}
";

/// Applies protocol edits (UTF-16 positions) to a text.
fn apply_edits(text: &str, edits: &Value) -> String {
    let offset = |p: &Value| -> usize {
        let line = p["line"].as_u64().unwrap_or(0) as usize;
        let character = p["character"].as_u64().unwrap_or(0) as usize;
        let start: usize = text.split_inclusive('\n').take(line).map(str::len).sum();
        let mut units = 0;
        for (i, ch) in text[start..].char_indices() {
            if units >= character || ch == '\n' {
                return start + i;
            }
            units += ch.len_utf16();
        }
        text.len()
    };
    let mut spans: Vec<(usize, usize, String)> = edits
        .as_array()
        .expect("an array of edits")
        .iter()
        .map(|e| {
            (
                offset(&e["range"]["start"]),
                offset(&e["range"]["end"]),
                e["newText"].as_str().unwrap_or("").to_string(),
            )
        })
        .collect();
    spans.sort_by_key(|s| std::cmp::Reverse(s.0));
    let mut out = text.to_string();
    for (start, end, new) in spans {
        out.replace_range(start..end, &new);
    }
    out
}

fn render_edits(edits: &Value) -> String {
    let mut out = String::new();
    for e in edits.as_array().expect("an array of edits") {
        out.push_str(&format!(
            "{} {:?}\n",
            range(&e["range"]),
            e["newText"].as_str().unwrap_or("?")
        ));
    }
    out
}

async fn format_request(c: &mut Client, uri: &str) -> Value {
    c.request(
        "textDocument/formatting",
        json!({ "textDocument": { "uri": uri }, "options": { "tabSize": 8, "insertSpaces": false } }),
    )
    .await
    .expect("no error")
}

#[tokio::test]
async fn formatting_gives_one_minimal_edit_that_yields_the_canonical_text() {
    let (mut c, init) = Client::start(json!({})).await;
    assert_eq!(init["capabilities"]["documentFormattingProvider"], true);
    assert_eq!(
        init["capabilities"]["documentRangeFormattingProvider"],
        true
    );
    c.open(URI, MESSY_SKID).await;
    let edits = format_request(&mut c, URI).await;
    assert_eq!(edits.as_array().map(Vec::len), Some(1), "{edits}");
    let canonical = sprung_syntax::format(MESSY_SKID, &sprung_syntax::FormatConfig::default())
        .expect("the fixture parses");
    assert_eq!(apply_edits(MESSY_SKID, &edits), canonical);
    // The edit starts at the first change: the second of the three spaces before `# welded
    // base`, column 2 + 24 + 1 = 27 in UTF-16 units (`±` is one unit, two bytes), and the
    // untouched end (`  force hum ...` and `}`) is left out of it.
    let rendered = render_edits(&edits);
    assert!(rendered.starts_with("2:27-4:73 "), "{rendered}");
    expect_file("formatting_skid", &rendered);
}

#[tokio::test]
async fn formatting_a_formatted_document_gives_no_edits_and_a_broken_one_none() {
    let mut c = pad().await;
    // PAD is written in the canonical layout.
    assert_eq!(format_request(&mut c, URI).await, json!([]));
    let broken = "file:///work/broken.sprung";
    c.open(
        broken,
        "system s {\n  mass m = 1 kg\n  spring k between m = 1 kN/m\n}\n",
    )
    .await;
    assert_eq!(format_request(&mut c, broken).await, Value::Null);
}

#[tokio::test]
async fn range_formatting_touches_only_the_selected_statement() {
    let mut c = Client::utf16().await;
    c.open(URI, MESSY_SKID).await;
    // A cursor-wide range on the spring (line 3).
    let edits = c
        .request(
            "textDocument/rangeFormatting",
            json!({ "textDocument": { "uri": URI },
                    "range": { "start": { "line": 3, "character": 10 }, "end": { "line": 3, "character": 10 } },
                    "options": { "tabSize": 2, "insertSpaces": true } }),
        )
        .await
        .expect("no error");
    let after = apply_edits(MESSY_SKID, &edits);
    assert!(
        after.contains("\n  spring isolators between frame and ground = 4 * 65 kN/m ± 10%\n"),
        "{after}"
    );
    // The lines around it are as they were.
    assert!(
        after.contains("mass frame = 420 kg ± 5%   # welded base"),
        "{after}"
    );
    assert!(
        after.contains("2·0.05*sqrt(isolators*frame)  force hum"),
        "{after}"
    );
    // Minimal: from `=` (column 43) to the `+-` (columns 53-55); `10%` is kept as it was.
    assert_eq!(render_edits(&edits), "3:43-3:55 \" = 4 * 65 kN/m ± \"\n");
}
