//! End-to-end tests of the `sprung` binary: commands, exit statuses, the JSON contract and
//! the handling of unreadable input. They live in the binary's own crate because only there
//! does Cargo hand tests the path of the built binary (`CARGO_BIN_EXE_sprung`).

mod common;

use common::{code, json, models_in, repo, scratch, sprung, stderr, stdout, write};
use serde_json::Value;

#[test]
fn check_examples_passes() {
    let examples = repo().join("examples");
    let count = models_in(&examples).len();
    assert!(count >= 4, "expected at least four examples, found {count}");
    let out = sprung(["check".as_ref(), examples.as_os_str()]);
    assert_eq!(
        code(&out),
        0,
        "stdout:\n{}\nstderr:\n{}",
        stdout(&out),
        stderr(&out)
    );
    let text = stdout(&out);
    assert!(
        text.contains("0 errors") && text.contains(&format!("in {count} files")),
        "summary line missing or wrong:\n{text}"
    );
}

#[test]
fn json_output_follows_the_contract() {
    let examples = repo().join("examples");
    let expected_files = models_in(&examples);
    let out = sprung([
        "check".as_ref(),
        examples.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(code(&out), 0, "stderr:\n{}", stderr(&out));
    let report = json(&out);
    assert_eq!(report["passed"], Value::Bool(true));
    let files = report["files"].as_array().cloned().unwrap_or_default();
    assert_eq!(files.len(), expected_files.len());
    for (file, path) in files.iter().zip(&expected_files) {
        // Files come in sorted order, named as the folder argument spells them.
        assert_eq!(
            file["file"].as_str(),
            Some(path.display().to_string().as_str())
        );
        let diagnostics = file["diagnostics"].as_array();
        assert!(diagnostics.is_some(), "diagnostics must be a list: {file}");
        for d in diagnostics.into_iter().flatten() {
            assert!(d["code"].is_string() && d["message"].is_string(), "{d}");
            assert!(
                matches!(d["severity"].as_str(), Some("error" | "warning" | "info")),
                "{d}"
            );
            for key in ["line", "column", "end_line", "end_column"] {
                assert!(d[key].as_u64().is_some_and(|n| n >= 1), "{key} in {d}");
            }
            assert!(d["help"].is_null() || d["help"].is_string(), "{d}");
        }
        let systems = file["systems"].as_array();
        assert!(systems.is_some(), "systems must be a list: {file}");
        for s in systems.into_iter().flatten() {
            assert!(s["name"].is_string(), "{s}");
            assert!(s["requirements"].is_array(), "{s}");
        }
    }
}

#[test]
fn folders_expand_recursively_in_sorted_order() {
    let dir = scratch("sorted");
    let model = "system s {\n  mass m = 1 kg\n  spring k between m and ground = 1 kN/m\n}\n";
    for name in [
        "b.sprung",
        "a/z.sprung",
        "a.sprung",
        "a/c/d.sprung",
        "notes.txt",
    ] {
        write(&dir.join(name), model);
    }
    let out = sprung([
        "check".as_ref(),
        dir.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(code(&out), 0, "stderr:\n{}", stderr(&out));
    let names: Vec<String> = json(&out)["files"]
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|f| f["file"].as_str())
        .map(|f| {
            f.strip_prefix(&dir.display().to_string())
                .unwrap_or(f)
                .to_owned()
        })
        .collect();
    assert_eq!(
        names,
        ["/a/c/d.sprung", "/a/z.sprung", "/a.sprung", "/b.sprung"]
    );
    // Naming the same file twice checks it once.
    let file = dir.join("b.sprung");
    let twice = sprung(["check".as_ref(), file.as_os_str(), file.as_os_str()]);
    assert!(stdout(&twice).contains("in 1 file"), "{}", stdout(&twice));
}

#[test]
fn version_and_help() {
    let out = sprung(["--version"]);
    assert_eq!(code(&out), 0);
    assert_eq!(
        stdout(&out).trim(),
        format!("sprung {}", env!("CARGO_PKG_VERSION"))
    );

    let out = sprung(["--help"]);
    assert_eq!(code(&out), 0);
    let help = stdout(&out);
    assert!(help.contains("check") && help.contains("explain"), "{help}");

    let out = sprung(["check", "--help"]);
    assert_eq!(code(&out), 0);
    assert!(stdout(&out).contains("--format"), "{}", stdout(&out));
}

#[test]
fn usage_errors_exit_2() {
    for args in [
        vec!["check"],
        vec!["check", "x.sprung", "--format", "yaml"],
        vec!["frobnicate"],
        vec!["explain"],
    ] {
        let out = sprung(&args);
        assert_eq!(code(&out), 2, "{args:?}: {}", stderr(&out));
        assert!(!stderr(&out).is_empty(), "{args:?} must say what is wrong");
    }
}

#[test]
fn missing_file_exits_2_with_a_message() {
    let missing = scratch("missing").join("nowhere.sprung");
    let out = sprung(["check".as_ref(), missing.as_os_str()]);
    assert_eq!(code(&out), 2);
    let err = stderr(&out);
    assert!(
        err.contains("nowhere.sprung") && err.contains("no such file"),
        "{err}"
    );
    assert!(
        stdout(&out).is_empty(),
        "nothing is checked: {}",
        stdout(&out)
    );
}

#[test]
fn folder_without_models_exits_2() {
    let dir = scratch("no-models");
    write(&dir.join("readme.txt"), "not a model");
    let out = sprung(["check".as_ref(), dir.as_os_str()]);
    assert_eq!(code(&out), 2);
    let err = stderr(&out);
    assert!(err.contains("no `.sprung` files"), "{err}");
}

#[test]
fn invalid_utf8_is_located_without_a_panic() {
    let dir = scratch("not-utf8");
    let file = dir.join("latin1.sprung");
    // "µ" in Latin-1 is the single byte 0xB5, never valid UTF-8 on its own.
    write(&file, b"system s {\n  mass m = 3 kg # 3 \xb5m\n}\n");
    for format in ["human", "json"] {
        let out = sprung([
            "check".as_ref(),
            file.as_os_str(),
            "--format".as_ref(),
            format.as_ref(),
        ]);
        assert_eq!(code(&out), 2, "{format}");
        let err = stderr(&out);
        assert!(err.contains("latin1.sprung"), "{err}");
        assert!(err.contains("not valid UTF-8"), "{err}");
        assert!(
            err.contains("byte offset 31") && err.contains("line 2, column 21"),
            "{err}"
        );
        assert!(!err.contains("panicked"), "{err}");
    }
    // The JSON still parses, and says the run did not pass.
    let out = sprung([
        "check".as_ref(),
        file.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(json(&out)["passed"], Value::Bool(false));
}

#[test]
fn oversized_file_is_refused_unread() {
    let dir = scratch("too-large");
    let file = dir.join("huge.sprung");
    let created = std::fs::File::create(&file).and_then(|f| f.set_len(8 * 1024 * 1024 + 1));
    assert!(created.is_ok(), "{created:?}");
    let out = sprung(["check".as_ref(), file.as_os_str()]);
    assert_eq!(code(&out), 2);
    let err = stderr(&out);
    assert!(
        err.contains("huge.sprung") && err.contains("8 MiB") && err.contains("SP106"),
        "{err}"
    );
}

#[test]
fn unreadable_file_does_not_stop_the_others() {
    let dir = scratch("mixed");
    let good = dir.join("good.sprung");
    write(
        &good,
        "system s {\n  mass m = 1 kg\n  spring k between m and ground = 1 kN/m\n}\n",
    );
    let bad = dir.join("bad.sprung");
    write(&bad, b"\xff\xfe");
    let out = sprung([
        "check".as_ref(),
        bad.as_os_str(),
        good.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(code(&out), 2);
    let report = json(&out);
    assert_eq!(report["passed"], Value::Bool(false));
    let files = report["files"].as_array().cloned().unwrap_or_default();
    assert_eq!(files.len(), 1);
    assert_eq!(
        files[0]["file"].as_str(),
        Some(good.display().to_string().as_str())
    );
}

#[test]
fn empty_file_is_checked_not_refused() {
    let dir = scratch("empty");
    let file = dir.join("empty.sprung");
    write(&file, "");
    let out = sprung(["check".as_ref(), file.as_os_str()]);
    // Nothing to check is a warning (SP105), never an error or an I/O failure.
    assert_eq!(code(&out), 0, "{}{}", stdout(&out), stderr(&out));
    assert!(stdout(&out).contains("0 errors") && stdout(&out).contains("in 1 file"));
}

#[test]
fn explain_prints_title_severity_and_explanation() {
    let Some(info) = sprung_engine::diagnostics::lookup("SP301") else {
        panic!("SP301 must be in the catalogue");
    };
    for spelling in ["SP301", "sp301"] {
        let out = sprung(["explain", spelling]);
        assert_eq!(code(&out), 0);
        let text = stdout(&out);
        assert!(
            text.starts_with(&format!("SP301: {}", info.title)),
            "{text}"
        );
        assert!(text.contains("severity: error"), "{text}");
        // The explanation is wrapped; compare it word by word.
        let words = |s: &str| s.split_whitespace().collect::<Vec<_>>().join(" ");
        assert!(words(&text).contains(&words(info.explanation)), "{text}");
    }
}

#[test]
fn explain_list_names_every_code() {
    let out = sprung(["explain", "--list"]);
    assert_eq!(code(&out), 0);
    let text = stdout(&out);
    let catalogue = sprung_engine::diagnostics::CATALOGUE;
    assert_eq!(text.lines().count(), catalogue.len());
    for (line, info) in text.lines().zip(catalogue) {
        assert!(
            line.starts_with(info.code) && line.ends_with(info.title),
            "{line}"
        );
    }
}

#[test]
fn explain_unknown_code_exits_2_and_points_to_the_list() {
    let out = sprung(["explain", "SP999"]);
    assert_eq!(code(&out), 2);
    let err = stderr(&out);
    assert!(
        err.contains("SP999") && err.contains("sprung explain --list"),
        "{err}"
    );
    assert!(stdout(&out).is_empty());
}
