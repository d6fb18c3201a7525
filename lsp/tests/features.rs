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
    // A top-level let: its doc shows (its value too, see top_level_lets_have_hints_and_hovers).
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

/// Every code action over `range` (`(line, col)` pairs, UTF-16), as the whole answer.
async fn actions_in(c: &mut Client, from: (u32, u32), to: (u32, u32)) -> Vec<Value> {
    let a = c
        .request(
            "textDocument/codeAction",
            json!({ "textDocument": { "uri": URI }, "range": {
                "start": { "line": from.0, "character": from.1 },
                "end": { "line": to.0, "character": to.1 } },
                "context": { "diagnostics": [] } }),
        )
        .await
        .unwrap();
    a.as_array().cloned().unwrap_or_default()
}

/// The byte offset of a protocol position in `text` (UTF-16 columns).
fn byte_offset(text: &str, p: &Value) -> usize {
    let (line, col) = (
        p["line"].as_u64().unwrap(),
        p["character"].as_u64().unwrap(),
    );
    let start: usize = text
        .split_inclusive('\n')
        .take(line as usize)
        .map(str::len)
        .sum();
    let mut units = 0u64;
    for (i, ch) in text[start..].char_indices() {
        if units >= col || ch == '\n' {
            return start + i;
        }
        units += ch.len_utf16() as u64;
    }
    text.len()
}

/// `text` with one action's edits applied (they never overlap; applied back to front).
fn apply(text: &str, action: &Value) -> String {
    let mut edits: Vec<(usize, usize, String)> = action["edit"]["changes"][URI]
        .as_array()
        .unwrap()
        .iter()
        .map(|e| {
            (
                byte_offset(text, &e["range"]["start"]),
                byte_offset(text, &e["range"]["end"]),
                e["newText"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    edits.sort_by_key(|e| std::cmp::Reverse(e.0));
    let mut out = text.to_string();
    for (a, b, t) in edits {
        out.replace_range(a..b, &t);
    }
    out
}

/// One line per action (title and kind), then one per edit (range and new text, `\n` shown).
fn render_actions(actions: &[Value]) -> String {
    let mut out = String::new();
    for a in actions {
        out.push_str(&format!(
            "{} [{}]\n",
            a["title"].as_str().unwrap_or("?"),
            a["kind"].as_str().unwrap_or("?")
        ));
        for e in a["edit"]["changes"][URI].as_array().into_iter().flatten() {
            out.push_str(&format!(
                "  {} {:?}\n",
                range(&e["range"]),
                e["newText"].as_str().unwrap_or("")
            ));
        }
    }
    out
}

/// Checks and analyzes a text with the engine, as the server does.
fn analyzed(text: &str) -> (sprung_engine::Checked, sprung_engine::analysis::Analysis) {
    let checked = sprung_engine::check(text);
    let analysis = sprung_engine::analysis::analyze(&checked, &Default::default());
    (checked, analysis)
}

const BARE: &str = "system skid {
  mass motor = 2 lbm
  mass frame = 3 lbm
  mass pump = 40
  spring k between motor and ground = 5000
  spring k2 between frame and ground = 40 kN/m
  spring k3 between pump and ground = 40 kN/m
  damper d between pump and ground = 3 * 2
  require frequency of mode 1 > 5
}
system drive {
  inertia rotor = (0.5)
  spring shaft between rotor and ground = -300
  force f on rotor = 1 N at 3 Hz
}
";

#[tokio::test]
async fn add_the_expected_unit_to_a_bare_number() {
    let mut c = Client::utf16().await;
    c.open(URI, BARE).await;
    let mut all = Vec::new();
    let mut out = String::new();
    for line in 0..14 {
        let got: Vec<Value> = actions_in(&mut c, (line, 0), (line, 200))
            .await
            .into_iter()
            .filter(|a| a["title"].as_str().unwrap_or("").starts_with("Add unit"))
            .collect();
        if !got.is_empty() {
            out.push_str(&format!("line {line}\n{}", render_actions(&got)));
        }
        all.extend(got);
    }
    expect_file("actions_add_unit", &out);
    // The file's own unit wins (`lbm`, `kN/m`); a frequency gets `Hz`; `3 * 2` (a scale
    // factor times a number) gets nothing; a torsional spring gets `N*m/rad`, not `N*m`.
    assert!(out.contains("Add unit `lbm`"), "{out}");
    assert!(out.contains("Add unit `kN/m`"), "{out}");
    assert!(out.contains("Add unit `Hz`"), "{out}");
    assert!(out.contains("Add unit `kg*m^2`"), "{out}");
    assert!(out.contains("Add unit `N*m/rad`"), "{out}");
    assert!(!out.contains("line 7"), "{out}");
    // Applying each fix removes its diagnostic: only the damper's error is left.
    let mut text = BARE.to_string();
    for a in all.iter().rev() {
        text = apply(&text, a);
    }
    assert!(text.contains("mass pump = 40 lbm"), "{text}");
    assert!(text.contains("rotor = (0.5 kg*m^2)"), "{text}");
    assert!(text.contains("= -300 N*m/rad"), "{text}");
    let (checked, _) = analyzed(&text);
    let errors: Vec<_> = checked
        .diagnostics
        .iter()
        .filter(|d| d.is_error())
        .collect();
    assert_eq!(errors.len(), 2, "{errors:#?}");
    assert!(
        errors[0].message.contains("translational damper"),
        "{errors:#?}"
    );
    // The torque on an inertia is the other error, untouched.
    assert!(errors[1].message.contains("cannot act on"), "{errors:#?}");
}

/// A fan skid on rubber mounts: a mass, springs and dampers all toleranced. Hand computation
/// (closed form for one mass, common practice: ζ = c / (2√(k m))): the worst corner for
/// `damping >= 0.05` is the heaviest skid on the stiffest mounts, m = 126 kg, k = 207 kN/m,
/// so c_critical = 2√(207000 · 126) = 10214.1 N·s/m and 5% of it is 510.71 N·s/m. `pad`
/// follows the corner (1% of critical, 102.14 N·s/m); `loss` is at its low end (−10%).
/// Sizing `loss`: 0.9 c + 102.14 ≥ 510.71, c ≥ 453.97 → 455 after the margin and rounding
/// up. Sizing `pad` (written as a plain value, so it no longer follows the corner):
/// 180 + c ≥ 510.71, c ≥ 330.71 → 332.
const FAN: &str = "## Fan skid on four rubber mounts.
system fan \"Fan skid\" {
  mass skid = 120 kg ± 5%
  spring mounts between skid and ground = 4 * 45 kN/m ± 15%
  damper loss between skid and ground = 200 N*s/m ± 10%
  damper pad between skid and ground = 0.01 * 2 * sqrt(mounts * skid)
  require damping >= 0.05
  require regime is not underdamped
}
system twins {
  mass a = 1 kg
  mass b = 1 kg
  spring ka between a and ground = 1 kN/m
  spring kb between b and ground = 1 kN/m
  spring kc between a and b = 500 N/m
  damper across between a and b = 1 N*s/m
  damper below between a and ground = 1 N*s/m
  require damping of mode 1 >= 0.05
}
";

#[tokio::test]
async fn size_a_damper_for_a_failed_damping_requirement() {
    let mut c = Client::utf16().await;
    c.open(URI, FAN).await;
    let damping = actions_in(&mut c, (6, 0), (6, 200)).await;
    let regime = actions_in(&mut c, (7, 0), (7, 200)).await;
    let twins = actions_in(&mut c, (17, 0), (17, 200)).await;
    let out = format!(
        "damping\n{}regime\n{}twins\n{}",
        render_actions(&damping),
        render_actions(&regime),
        render_actions(&twins)
    );
    expect_file("actions_size_damper", &out);
    let titles: Vec<&str> = damping
        .iter()
        .map(|a| a["title"].as_str().unwrap())
        .collect();
    assert_eq!(
        titles,
        [
            "Set damper `loss` to 455 N*s/m (ζ ≥ 0.05 at worst corner)",
            "Set damper `pad` to 332 N*s/m (ζ ≥ 0.05 at worst corner)",
        ]
    );
    // Each edit makes the requirement pass in the real analysis; `loss` keeps its ± 10%.
    for a in &damping {
        let text = apply(FAN, a);
        let (checked, analysis) = analyzed(&text);
        assert!(!checked.has_errors(), "{text}");
        assert!(analysis.systems[0].verdicts[0].passed(), "{text}");
    }
    assert!(apply(FAN, &damping[0]).contains("= 455 N*s/m ± 10%"));
    assert!(apply(FAN, &damping[1]).contains("and ground = 332 N*s/m\n"));
    // Not underdamped needs ζ ≥ 1 at the worst corner: far more, and it passes too.
    assert_eq!(regime.len(), 2, "{regime:#?}");
    for a in &regime {
        let (_, analysis) = analyzed(&apply(FAN, a));
        assert!(analysis.systems[0].verdicts[1].passed());
    }
    // Mode 1 of the twins moves both masses together: `across` cannot reach it, `below` can.
    // Hand computation (modal damping of a mass-normalised shape [1, 1]/√2, ω² = 1000):
    // ζ = (c/2) / (2√1000), so c = 0.05 · 4√1000 = 6.325 N·s/m if the damping were
    // classical; `across` couples the modes a little, so the engine needs slightly more.
    let titles: Vec<&str> = twins.iter().map(|a| a["title"].as_str().unwrap()).collect();
    assert_eq!(titles.len(), 1, "{titles:?}");
    assert!(
        titles[0].starts_with("Set damper `below` to "),
        "{titles:?}"
    );
    let value: f64 = titles[0]
        .trim_start_matches("Set damper `below` to ")
        .split(' ')
        .next()
        .unwrap()
        .parse()
        .unwrap();
    assert!((6.325..6.40).contains(&value), "{value}");
    let (_, analysis) = analyzed(&apply(FAN, &twins[0]));
    assert!(analysis.systems[1].verdicts[0].passed());
}

const REPEATED: &str = "let stiffness = 3 kN/m
system centrifuge {
  ## The head.
  mass head = 6.2 kg
  mass base = 3.4 kg
  spring column between head and base = 50 kN/m
  spring feet between base and ground = 50000 N/m ± 15%
  damper a1 between head and base = 0.02 * 2 * sqrt(column * head)
  damper a2 between base and ground = 0.03 * 2 * sqrt(column * head) + 1 N*s/m
  force f on head = 50 N at 30 Hz
  require frequency of mode 1 > 5 Hz
}
";

/// The SI value of every mass, element and requirement limit of the first system.
fn si_values(text: &str) -> Vec<(String, f64)> {
    let (checked, _) = analyzed(text);
    assert!(!checked.has_errors(), "{:#?}", checked.diagnostics);
    let sys = &checked.model.systems[0];
    sys.dofs
        .iter()
        .map(|d| (d.name.clone(), d.value.nominal))
        .chain(
            sys.elements
                .iter()
                .map(|e| (e.name.clone(), e.value.nominal)),
        )
        .collect()
}

#[tokio::test]
async fn extract_a_repeated_value_into_a_let() {
    let mut c = Client::utf16().await;
    c.open(URI, REPEATED).await;
    // On `50 kN/m`: `50000 N/m` is the same SI value, so both go; `stiffness` is taken.
    let on_literal: Vec<Value> = actions_in(&mut c, (5, 42), (5, 42))
        .await
        .into_iter()
        .filter(|a| a["kind"] == "refactor.extract")
        .collect();
    // A selection of `sqrt(column * head)`, written twice.
    let on_selection: Vec<Value> = actions_in(&mut c, (7, 47), (7, 66))
        .await
        .into_iter()
        .filter(|a| a["kind"] == "refactor.extract")
        .collect();
    // `50 N` is written once: nothing to extract.
    let once = actions_in(&mut c, (9, 21), (9, 21)).await;
    let out = format!(
        "literal\n{}selection\n{}",
        render_actions(&on_literal),
        render_actions(&on_selection)
    );
    expect_file("actions_extract_let", &out);
    assert_eq!(on_literal.len(), 1, "{out}");
    assert_eq!(
        on_literal[0]["title"],
        "Extract `50 kN/m` into `let stiffness_2`"
    );
    assert_eq!(on_selection.len(), 1, "{out}");
    assert_eq!(
        on_selection[0]["title"],
        "Extract `sqrt(column * head)` into `let shared`"
    );
    assert!(
        once.iter().all(|a| a["kind"] != "refactor.extract"),
        "{once:#?}"
    );
    // The edited texts check with the same SI values (the engine run again on them).
    let before = si_values(REPEATED);
    for a in [&on_literal[0], &on_selection[0]] {
        let text = apply(REPEATED, a);
        assert_eq!(si_values(&text), before, "{text}");
    }
    let text = apply(REPEATED, &on_literal[0]);
    assert!(
        text.contains("system centrifuge {\n  let stiffness_2 = 50 kN/m\n  ## The head.\n"),
        "{text}"
    );
    assert!(
        text.contains("feet between base and ground = stiffness_2 ± 15%"),
        "{text}"
    );
}

#[tokio::test]
async fn top_level_lets_have_hints_and_hovers() {
    let mut c = Client::utf16().await;
    let text = "## Four rubber feet.\nlet feet = 4 * 18 kN/m ± 15%\nlet speed = 1450 rpm\nsystem a {\n  mass m = 9.6 kg\n  spring s between m and ground = feet\n}\nsystem b {\n  mass m = 2 kg\n  spring s between m and ground = 10 kN/m\n  damper d between m and ground = 20 N*s/m\n  force f on m = 1 N at speed\n}\n";
    c.open(URI, text).await;
    let hints = render_hints(&c.hints(URI).await);
    // 4 × 18 kN/m = 72 kN/m, written as an expression; `speed` is a literal and gets none.
    assert!(hints.contains("1:28 = 72 kN/m\n"), "{hints}");
    assert!(!hints.starts_with("2:"), "{hints}");
    let on_def = markdown(&c.at("textDocument/hover", URI, (1, 5)).await);
    // 72 kN/m ± 15%: 61.2 … 82.8 kN/m.
    assert!(on_def.contains("72 kN/m (72000 N/m in SI"), "{on_def}");
    assert!(on_def.contains("61.2 kN/m … 82.8 kN/m"), "{on_def}");
    assert!(
        on_def.contains("tolerance: -15% … +15% (relative)"),
        "{on_def}"
    );
    assert!(on_def.contains("used by system `a`"), "{on_def}");
    assert!(on_def.contains("Four rubber feet."), "{on_def}");
    expect_file("hover_global_let", &on_def);
    // On its use inside system a: the same hover.
    let on_use = markdown(&c.at("textDocument/hover", URI, (5, 35)).await);
    assert_eq!(on_use, on_def);
    // 1450 rpm = 1450/60 Hz = 24.17 Hz = 151.8 rad/s (rpm = rev/min, rev = 2π rad).
    let speed = markdown(&c.at("textDocument/hover", URI, (2, 5)).await);
    assert!(speed.contains("24.2 Hz (151.8"), "{speed}");
    assert!(speed.contains("used by system `b`"), "{speed}");
}

/// The first number in a label after `prefix`.
fn number_after(label: &str, prefix: &str) -> f64 {
    let rest = &label[label
        .find(prefix)
        .unwrap_or_else(|| panic!("{prefix} in {label}"))
        + prefix.len()..];
    let end = rest
        .find(|c: char| !(c.is_ascii_digit() || c == '.' || c == '-' || c == 'e'))
        .unwrap_or(rest.len());
    rest[..end]
        .parse()
        .unwrap_or_else(|_| panic!("a number in {rest}"))
}

#[tokio::test]
async fn a_harmonic_force_hint_matches_the_one_mass_closed_form() {
    let mut c = Client::utf16().await;
    // m = 10 kg, k = 40 kN/m, ζ = 0.1 (as in PAD), F = 100 N at 8 Hz.
    let text = "system pad {\n  mass m = 10 kg\n  spring k between m and ground = 40 kN/m\n  damper c between m and ground = 0.1 * 2 * sqrt(k * m)\n  force hum on m = 100 N at 8 Hz\n}\n";
    c.open(URI, text).await;
    let hints = c.hints(URI).await;
    let hint = hints
        .as_array()
        .unwrap()
        .iter()
        .find(|h| h["position"]["line"] == 4)
        .expect("a hint on the drive line");
    let label = hint["label"].as_str().unwrap();
    // Closed form (standard vibration texts, from memory):
    // X = (F/k) / √((1 − r²)² + (2ζr)²), r = ω/ωn, ωn = √(k/m).
    let (m, k, z, f) = (10.0_f64, 40_000.0_f64, 0.1_f64, 100.0_f64);
    let wn = (k / m).sqrt();
    let r = 8.0 * std::f64::consts::TAU / wn;
    let x = (f / k) / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
    let shown = number_after(label, "|x| ") * 1e-3; // the label is in mm
    assert!((shown - x).abs() <= 0.005 * x, "{label}: closed form {x} m");
    assert!(label.ends_with(" mm · 25.8% from f1"), "{label}");
    // (fn − f)/f = (10.066 − 8)/8 = 25.8%.
    let md = markdown(&c.at("textDocument/hover", URI, (4, 9)).await);
    // Force into ground through k and c: T = √(1 + (2ζr)²) / √((1 − r²)² + (2ζr)²).
    let t = (1.0 + (2.0 * z * r).powi(2)).sqrt()
        / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
    let shown_t = number_after(&md, "transmissibility (force into ground / applied): ");
    assert!((shown_t - t).abs() <= 0.005 * t, "{md}: closed form {t}");
    // The displacement lags the force by atan2(2ζr, 1 − r²) = 23.3°.
    let lag = (2.0 * z * r).atan2(1.0 - r * r).to_degrees();
    assert!(
        md.contains(&format!(
            "| m | {} mm | -{lag:.1}° |",
            sprung_lsp::display::num(x * 1e3)
        )),
        "{md}"
    );
}

const SKID: &str = "## A fan skid on four mounts.
let run = 1450 rpm
system skid \"Fan skid\" {
  mass frame = 120 kg
  spring mounts between frame and ground = 4 * 60 kN/m
  damper loss between frame and ground = 0.05 * 2 * sqrt(mounts * frame)
  force unbalance on frame = 30 N at run
  force sweep on frame = 30 N at 600 rpm .. run
  motion floor of ground = 0.1 mm at 20 Hz
  ## A crate set down on the skid.
  force bump on frame = step 2 kN
  force knock on frame = impulse 5 N*s
}
";

#[tokio::test]
async fn drive_hints_and_hovers() {
    let mut c = Client::utf16().await;
    c.open(URI, SKID).await;
    let hints = render_hints(&c.hints(URI).await);
    expect_file("hints_drives", &hints);
    // ωn = √(240 kN/m / 120 kg) = 44.72 rad/s = 7.118 Hz, ζ = 0.05 (closed form, from memory).
    // The band 10 Hz … 24.2 Hz lies above fn; the nearest end is 10 Hz: (10 − 7.118)/10 = 28.8%.
    assert!(hints.contains("7.12 Hz ζ0.05"), "{hints}");
    assert!(
        hints.contains("peak |x| ") && hints.contains("at 10 Hz · 28.8% from f1"),
        "{hints}"
    );
    // The unbalance at 1450 rpm = 151.8 rad/s, r = 3.395: X = (F/k)/√((1 − r²)² + (2ζr)²)
    // = 0.125 mm / 10.53 = 11.9 µm; (24.17 − 7.118)/24.17 = 70.5% above f1.
    assert!(
        hints.contains("6:40 |x| 11.9 µm · 70.5% from f1"),
        "{hints}"
    );
    // The band's peak at its lower end, r = 1.405: 0.125 mm / 0.9841 = 127 µm.
    assert!(hints.contains("7:47 peak |x| 127 µm at 10 Hz"), "{hints}");
    // Base motion: |X|/|Y| = √(1 + (2ζr)²) / √((1 − r²)² + (2ζr)²) at r = 20/7.118 = 2.810:
    // 1.0387 / 6.9004 = 0.151, so |X| = 0.0151 mm = 15.1 µm.
    assert!(hints.contains("frame |x| 15.1 µm, T 0.151"), "{hints}");
    // Step: overshoot exp(−πζ/√(1 − ζ²)) = 85.4% at ζ = 0.05, peak (1 + 0.8545) F/k =
    // 1.8545 × 8.333 mm = 15.5 mm at t = π/ωd = π/(44.72 √(1 − 0.0025)) = 70.3 ms.
    assert!(
        hints.contains("peak 15.5 mm at 70.3 ms · overshoot 85.4%"),
        "{hints}"
    );
    // Impulse: x = (J/(m ωd)) e^{−ζωn t} sin(ωd t), J/(m ωd) = 5/(120 × 44.66) = 0.9329 mm;
    // the peak at tan(ωd t) = √(1 − ζ²)/ζ, ωd t = 1.5208, t = 34.0 ms:
    // 0.9329 mm × e^{−0.0761} × 0.99875 = 0.863 mm.
    assert!(hints.contains("peak 863 µm at 34 ms"), "{hints}");

    let band = markdown(&c.at("textDocument/hover", URI, (7, 9)).await);
    assert!(
        band.contains("where |frame| peaks over the band 10 Hz … 24.2 Hz"),
        "{band}"
    );
    expect_file("hover_drive_band", &band);
    let step = markdown(&c.at("textDocument/hover", URI, (10, 9)).await);
    assert!(step.contains("A crate set down on the skid."), "{step}");
    // Final value F/k = 2000 / 240000 = 8.33 mm.
    assert!(step.contains("- final value: 8.33 mm"), "{step}");
    expect_file("hover_drive_step", &step);
}

#[tokio::test]
async fn an_unexcited_undamped_mode_at_the_drive_frequency_gives_a_finite_hint() {
    let mut c = Client::utf16().await;
    // Two equal masses on equal springs to ground, coupled by kc, no damper. The floor moves
    // both outer springs alike, so it cannot excite the antisymmetric mode at
    // ω2 = √((k + 2kc)/m); driven right there, both masses move together and
    // X/Y = k/(k − mω2²) = −k/(2kc) = −12/10 (closed form, from memory): |X| = 1.2 mm.
    // At ω1 = √(k/m) the in-phase mode is excited and undamped: no steady state.
    let text = "system pair {\n  mass a = 3 kg\n  mass b = 3 kg\n  spring ka between a and ground = 12 kN/m\n  spring kb between b and ground = 12 kN/m\n  spring kc between a and b = 5 kN/m\n  motion quiet of ground = 1 mm at sqrt((ka + 2 * kc) / a)\n  motion loud of ground = 1 mm at sqrt(ka / a)\n}\n";
    c.open(URI, text).await;
    let hints = render_hints(&c.hints(URI).await);
    assert!(
        hints.contains("6:58 a |x| 1.2 mm, T 1.2 · at f2"),
        "{hints}"
    );
    assert!(
        hints.contains("7:46 unbounded: undamped resonance"),
        "{hints}"
    );
    let md = markdown(&c.at("textDocument/hover", URI, (7, 10)).await);
    assert!(md.contains("**no steady state**"), "{md}");
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

/// The kinds of the code actions from `(line, from)` to `(line, to)` with `context.only` set
/// to `only`.
async fn action_kinds_only(
    c: &mut Client,
    (line, from, to): (u32, u32, u32),
    only: Value,
) -> Vec<String> {
    let a = c
        .request(
            "textDocument/codeAction",
            json!({ "textDocument": { "uri": URI }, "range": {
                "start": { "line": line, "character": from }, "end": { "line": line, "character": to } },
                "context": { "diagnostics": [], "only": only } }),
        )
        .await
        .unwrap();
    a.as_array()
        .unwrap()
        .iter()
        .map(|x| x["kind"].as_str().unwrap().to_string())
        .collect()
}

#[tokio::test]
async fn code_actions_honour_context_only() {
    let mut c = Client::utf16().await;
    c.open(URI, REPEATED).await;
    // On the repeated `50 kN/m` of line 5 (an extraction): every kind asked for, then each alone.
    let all = actions_in(&mut c, (5, 42), (5, 42)).await;
    assert!(
        all.iter().any(|a| a["kind"] == "refactor.extract"),
        "{all:#?}"
    );
    assert_eq!(
        action_kinds_only(&mut c, (5, 42, 42), json!(["refactor"])).await,
        ["refactor.extract"]
    );
    assert_eq!(
        action_kinds_only(&mut c, (5, 42, 42), json!(["refactor.extract"])).await,
        ["refactor.extract"]
    );
    // `refactor.ex` is not a parent kind of `refactor.extract`.
    assert!(
        action_kinds_only(&mut c, (5, 42, 42), json!(["refactor.ex"]))
            .await
            .is_empty()
    );
    assert!(
        action_kinds_only(&mut c, (5, 42, 42), json!(["quickfix"]))
            .await
            .is_empty()
    );
    // A unit typo: its quick fixes, and nothing when only refactors are asked for.
    let text = "system s {\n  mass m = 20 lb\n  spring k between m and ground = 40 kN/m\n}\n";
    c.change(URI, 2, json!([{ "text": text }])).await;
    assert_eq!(
        action_kinds_only(&mut c, (1, 0, 200), json!(["quickfix"])).await,
        ["quickfix", "quickfix"]
    );
    assert!(
        action_kinds_only(&mut c, (1, 0, 200), json!(["refactor"]))
            .await
            .is_empty()
    );
}
