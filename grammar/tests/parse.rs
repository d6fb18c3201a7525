//! Data-driven parser tests: every `tests/parse/*.sprung` file is parsed and dumped with
//! [`sprung_syntax::parser::dump`]; the text must equal the sibling `.expected` file.
//! Run with `UPDATE_EXPECT=1` to write the expected files after checking the differences.

use std::fs;
use std::path::Path;

#[test]
fn fixtures_match_expected_dumps() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/parse");
    let update = std::env::var_os("UPDATE_EXPECT").is_some_and(|v| v == "1");
    let mut paths: Vec<_> = fs::read_dir(&dir)
        .expect("tests/parse exists")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "sprung"))
        .collect();
    paths.sort();
    let mut failures = Vec::new();
    for path in &paths {
        let text = fs::read_to_string(path).expect("fixture is UTF-8");
        let actual = sprung_syntax::parser::dump(&sprung_syntax::parse(&text));
        let expected_path = path.with_extension("expected");
        if update {
            fs::write(&expected_path, &actual).expect("write expected file");
            continue;
        }
        let expected = fs::read_to_string(&expected_path).unwrap_or_default();
        if expected != actual {
            failures.push(format!(
                "--- {} ---\nexpected:\n{expected}\nactual:\n{actual}",
                path.display()
            ));
        }
    }
    assert!(
        paths.len() >= 15,
        "expected at least 15 fixtures, found {}",
        paths.len()
    );
    assert!(
        failures.is_empty(),
        "{} fixture(s) differ (rerun with UPDATE_EXPECT=1 to accept):\n{}",
        failures.len(),
        failures.join("\n")
    );
}
