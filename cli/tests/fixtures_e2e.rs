//! End-to-end checks of the fixtures in `tests/fixtures/` through the built binary: each
//! error fixture exits 1 and both outputs locate its first expected diagnostic. The expected
//! diagnostics come from the `.expected` files that the `sprung-tests` fixture harness
//! (`tests/tests/fixtures.rs`) writes and compares.

mod common;

use std::path::Path;

use common::{code, json, models_in, repo, scratch, sprung, stderr, stdout, write};
use serde_json::Value;

/// `LINE:COL` of the first line of an `.expected` file.
fn first_position(expected: &str) -> Option<(u64, u64)> {
    let first = expected.lines().next()?;
    let (line, rest) = first.split_once(':')?;
    let col = rest.split_whitespace().next()?;
    Some((line.parse().ok()?, col.parse().ok()?))
}

#[test]
fn err_fixtures_exit_1_and_locate_the_first_diagnostic() {
    let fixtures = models_in(&repo().join("tests/fixtures/err"));
    assert!(
        fixtures.len() >= 10,
        "expected the error fixtures, found {}",
        fixtures.len()
    );
    let mut failures = Vec::new();
    for file in &fixtures {
        let shown = file.display().to_string();
        let expected_path = file.with_extension("expected");
        let Ok(expected) = std::fs::read_to_string(&expected_path) else {
            failures.push(format!(
                "{shown}: no `.expected` file yet; create it with \
                 `UPDATE_EXPECT=1 cargo test -p sprung-tests --test fixtures`"
            ));
            continue;
        };
        let Some((line, col)) = first_position(&expected) else {
            failures.push(format!(
                "{}: no `LINE:COL` on its first line",
                expected_path.display()
            ));
            continue;
        };

        let human = sprung(["check".as_ref(), file.as_os_str()]);
        if code(&human) != 1 {
            failures.push(format!("{shown}: human run exited {}, not 1", code(&human)));
        }
        let located = format!("{shown}:{line}:{col}");
        if !stdout(&human).contains(&located) {
            failures.push(format!("{shown}: human output does not mention {located}"));
        }

        let machine = sprung([
            "check".as_ref(),
            file.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
        ]);
        if code(&machine) != 1 {
            failures.push(format!(
                "{shown}: JSON run exited {}, not 1",
                code(&machine)
            ));
        }
        let report = json(&machine);
        let found = report["files"][0]["diagnostics"]
            .as_array()
            .into_iter()
            .flatten()
            .any(|d| d["line"].as_u64() == Some(line) && d["column"].as_u64() == Some(col));
        if report["passed"] != Value::Bool(false) || !found {
            failures.push(format!(
                "{shown}: JSON has no failing diagnostic at {line}:{col}"
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn deep_nesting_is_a_diagnostic_not_a_crash() {
    let dir = scratch("deep");
    let file = dir.join("deep.sprung");
    let depth = 20_000;
    write(
        &file,
        format!(
            "system deep {{\n  mass m = {}1 kg{}\n}}\n",
            "(".repeat(depth),
            ")".repeat(depth)
        ),
    );
    let out = sprung(["check".as_ref(), file.as_os_str()]);
    // `code` fails the test if the binary died of a stack overflow.
    assert_eq!(
        code(&out),
        1,
        "stdout:\n{}\nstderr:\n{}",
        stdout(&out),
        stderr(&out)
    );
    assert!(stdout(&out).contains("SP104"), "{}", stdout(&out));
}

/// The names after `system` at the start of a line, in order.
fn system_names(text: &str) -> Vec<String> {
    text.lines()
        .filter_map(|l| l.trim_start().strip_prefix("system "))
        .filter_map(|rest| rest.split_whitespace().next())
        .map(str::to_owned)
        .collect()
}

#[test]
fn ok_fixtures_and_examples_list_every_system() {
    let mut files = models_in(&repo().join("tests/fixtures/ok"));
    files.extend(models_in(&repo().join("examples")));
    for file in &files {
        let out = sprung([
            "check".as_ref(),
            file.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
        ]);
        assert_eq!(code(&out), 0, "{}: {}", file.display(), stdout(&out));
        let names: Vec<String> = json(&out)["files"][0]["systems"]
            .as_array()
            .into_iter()
            .flatten()
            .filter_map(|s| s["name"].as_str().map(str::to_owned))
            .collect();
        let text = std::fs::read_to_string(file).unwrap_or_default();
        assert_eq!(names, system_names(&text), "{}", Path::new(file).display());
    }
}
