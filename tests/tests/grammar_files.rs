//! The formal grammar stays true to the parser: every example and every fixture that is meant
//! to be valid parses with no error, and the grammar file names every keyword, statement and
//! requirement subject the parser accepts.

use std::path::{Path, PathBuf};

use sprung_syntax::lexer::{CONTEXTUAL_WORDS, KEYWORDS};
use sprung_syntax::parse;
use sprung_tests::fixtures;

fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..")
}

fn examples() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(repo().join("examples"))
        .expect("examples/ exists")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|e| e == "sprung"))
        .collect();
    v.sort();
    v
}

#[test]
fn every_example_and_ok_fixture_parses_cleanly() {
    let files: Vec<PathBuf> = examples().into_iter().chain(fixtures("ok")).collect();
    assert!(
        files.len() >= 9,
        "expected the examples and ok fixtures, found {files:?}"
    );
    for f in files {
        let text = std::fs::read_to_string(&f).expect("readable");
        let p = parse(&text);
        assert!(p.errors.is_empty(), "{}: {:?}", f.display(), p.errors);
        assert!(
            !p.file.items.is_empty(),
            "{} parsed to nothing",
            f.display()
        );
    }
}

#[test]
fn the_grammar_file_names_every_keyword_and_subject() {
    let ebnf = std::fs::read_to_string(repo().join("grammar/sprung.ebnf")).expect("grammar file");
    for kw in KEYWORDS {
        assert!(
            ebnf.contains(&format!("'{kw}'")),
            "keyword `{kw}` missing from sprung.ebnf"
        );
    }
    for word in CONTEXTUAL_WORDS {
        assert!(
            ebnf.contains(&format!("'{word}'")),
            "word `{word}` missing from sprung.ebnf"
        );
    }
}
