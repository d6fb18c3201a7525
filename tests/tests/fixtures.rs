//! Data-driven fixture tests. Adding a case is adding a file:
//! - `tests/fixtures/ok/*.sprung` must check without any error (warnings are allowed);
//! - `tests/fixtures/err/*.sprung` must have errors, listed exactly in the sibling
//!   `.expected` file as `LINE:COL SEVERITY CODE MESSAGE` lines sorted by position.
//!
//! `UPDATE_EXPECT=1 cargo test -p sprung-tests --test fixtures` writes missing or changed
//! `.expected` files; review the diff before committing it.

use std::path::Path;

use sprung_engine::check;
use sprung_engine::diagnostics::lookup;
use sprung_tests::{expected_text, fixtures, updating};

fn read(path: &Path) -> String {
    match std::fs::read_to_string(path) {
        Ok(text) => text,
        Err(err) => panic!("cannot read {}: {err}", path.display()),
    }
}

#[test]
fn ok_fixtures_check_without_errors() {
    let files = fixtures("ok");
    assert!(
        files.len() >= 6,
        "expected the ok fixtures, found {}",
        files.len()
    );
    let mut failures = Vec::new();
    for file in &files {
        let text = read(file);
        let checked = check(&text);
        let errors: Vec<_> = checked
            .diagnostics
            .iter()
            .filter(|d| d.is_error())
            .cloned()
            .collect();
        if !errors.is_empty() {
            failures.push(format!(
                "{}:\n{}",
                file.display(),
                expected_text(&text, &errors)
            ));
        }
    }
    assert!(
        failures.is_empty(),
        "ok fixtures with errors:\n{}",
        failures.join("\n")
    );
}

#[test]
fn err_fixtures_match_their_expected_diagnostics() {
    let files = fixtures("err");
    assert!(
        files.len() >= 10,
        "expected the err fixtures, found {}",
        files.len()
    );
    let update = updating();
    let mut failures = Vec::new();
    for file in &files {
        let text = read(file);
        let checked = check(&text);
        let actual = expected_text(&text, &checked.diagnostics);
        let expected_path = file.with_extension("expected");
        let shown = file.display();

        if !checked.has_errors() {
            // Never record an error fixture that has no error: that would bless a bug.
            failures.push(format!(
                "{shown}: no error reported; an err fixture needs one"
            ));
            continue;
        }
        for d in &checked.diagnostics {
            if lookup(d.code).is_none() {
                failures.push(format!("{shown}: code {} is not in the catalogue", d.code));
            }
        }
        match std::fs::read_to_string(&expected_path) {
            Ok(expected) if expected == actual => {}
            result if update => {
                if let Err(err) = std::fs::write(&expected_path, &actual) {
                    failures.push(format!("{}: cannot write: {err}", expected_path.display()));
                } else if result.is_ok() {
                    eprintln!("updated {}", expected_path.display());
                } else {
                    eprintln!("created {}", expected_path.display());
                }
            }
            Ok(expected) => failures.push(format!(
                "{shown}: diagnostics differ from {}\n--- expected\n{expected}--- actual\n{actual}\
                 (if the change is right: UPDATE_EXPECT=1 cargo test -p sprung-tests --test fixtures)",
                expected_path.display()
            )),
            Err(_) => failures.push(format!(
                "{shown}: missing {}; create it with \
                 `UPDATE_EXPECT=1 cargo test -p sprung-tests --test fixtures` and review it.\n\
                 It would hold:\n{actual}",
                expected_path.display()
            )),
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n\n"));
}
