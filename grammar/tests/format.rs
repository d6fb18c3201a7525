//! The formatter: data-driven fixtures (`tests/format/*.sprung` formatted must equal the
//! sibling `.expected`; `UPDATE_EXPECT=1` rewrites them), idempotence and preservation of
//! comments and tokens on every example, ok fixture and parse fixture of the repository,
//! range formatting, and a property test over mutated examples.
//!
//! The meaning checks here are independent of the formatter's own check: they compare the
//! lexer's token sequence before and after (with `·` and `*`, `+-` and `±` being one token
//! each), and the comment texts in order.

use std::fs;
use std::path::{Path, PathBuf};

use proptest::prelude::*;
use sprung_syntax::lexer::{Token, lex};
use sprung_syntax::{FormatConfig, FormatError, LineEnding, LineIndex, Span, format, format_range};

fn cfg() -> FormatConfig {
    FormatConfig::default()
}

fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .parent()
        .map_or_else(|| PathBuf::from("."), Path::to_path_buf)
}

fn sprung_files(dir: &Path) -> Vec<PathBuf> {
    let mut paths: Vec<PathBuf> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("cannot list {}: {e}", dir.display()))
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "sprung"))
        .collect();
    paths.sort();
    paths
}

fn read(path: &Path) -> String {
    fs::read_to_string(path).unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()))
}

/// What a fixture's formatting gives: the text, or the refusal with its 1-based position.
fn outcome(text: &str) -> String {
    match format(text, &cfg()) {
        Ok(out) => out,
        Err(err) => {
            let at = LineIndex::new(text).line_col(
                text,
                err.span().start,
                sprung_syntax::Encoding::Chars,
            );
            format!("refused at {}:{}: {err}\n", at.line + 1, at.col + 1)
        }
    }
}

#[test]
fn fixtures_match_expected_output() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/format");
    let update = std::env::var_os("UPDATE_EXPECT").is_some_and(|v| v == "1");
    let paths = sprung_files(&dir);
    assert!(paths.len() >= 8, "expected at least 8 fixtures");
    let mut failures = Vec::new();
    for path in &paths {
        let actual = outcome(&read(path));
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
        failures.is_empty(),
        "{} fixture(s) differ (rerun with UPDATE_EXPECT=1 to accept):\n{}",
        failures.len(),
        failures.join("\n")
    );
}

/// The significant tokens as the parser sees them, with the spellings that are one token
/// (`·`/`*`, `+-`/`±`) made one.
fn token_kinds(text: &str) -> Vec<String> {
    lex(text)
        .tokens
        .iter()
        .filter(|(t, _)| !matches!(t, Token::Comment(_)))
        .map(|(t, _)| match t {
            Token::Dot => "`*`".to_string(),
            Token::Unit(u) => format!("unit({})", u.text()),
            other => other.describe(),
        })
        .collect()
}

fn comment_texts(text: &str) -> Vec<String> {
    lex(text)
        .tokens
        .iter()
        .filter_map(|(t, _)| match t {
            Token::Comment(c) => Some(c.trim_end().to_string()),
            _ => None,
        })
        .collect()
}

/// Every file of the repository that parses cleanly: examples, ok fixtures, parse fixtures
/// without errors, and this suite's fixtures.
fn corpus() -> Vec<(PathBuf, String)> {
    let root = repo();
    let mut out = Vec::new();
    for dir in [
        root.join("examples"),
        root.join("tests/fixtures/ok"),
        root.join("grammar/tests/parse"),
        root.join("grammar/tests/format"),
    ] {
        for path in sprung_files(&dir) {
            let text = read(&path);
            if sprung_syntax::parse(&text).errors.is_empty() {
                out.push((path, text));
            }
        }
    }
    out
}

#[test]
fn every_clean_file_formats_idempotently_and_reads_the_same() {
    let corpus = corpus();
    // Five examples and six ok fixtures at least, plus the parse fixtures that are clean.
    assert!(corpus.len() >= 20, "only {} files", corpus.len());
    for (path, text) in &corpus {
        let once =
            format(text, &cfg()).unwrap_or_else(|e| panic!("{}: refused: {e}", path.display()));
        let twice = format(&once, &cfg())
            .unwrap_or_else(|e| panic!("{}: second pass refused: {e}", path.display()));
        assert_eq!(once, twice, "{}: not idempotent", path.display());
        assert_eq!(
            token_kinds(text),
            token_kinds(&once),
            "{}: the tokens changed",
            path.display()
        );
        assert_eq!(
            comment_texts(text),
            comment_texts(&once),
            "{}: the comments changed",
            path.display()
        );
        assert!(
            sprung_syntax::parse(&once).errors.is_empty(),
            "{}",
            path.display()
        );
        if !once.is_empty() {
            assert!(
                once.ends_with('\n') && !once.ends_with("\n\n"),
                "{}",
                path.display()
            );
        }
    }
}

#[test]
fn the_examples_are_already_formatted() {
    // The demo models are written in the canonical layout; formatting must not touch them.
    for path in sprung_files(&repo().join("examples")) {
        let text = read(&path);
        assert_eq!(
            format(&text, &cfg()).as_deref(),
            Ok(text.as_str()),
            "{}",
            path.display()
        );
    }
}

#[test]
fn a_file_with_a_syntax_error_is_refused_with_its_location() {
    let text = "system s {\n  mass m = 1 kg\n  spring k between m = 1 kN/m\n}\n";
    match format(text, &cfg()) {
        Err(FormatError::Syntax(errors)) => {
            assert_eq!(errors.len(), 1);
            let at = text.find("= 1 kN").unwrap_or(0);
            assert_eq!(errors[0].span.start, at);
        }
        other => panic!("expected a refusal, got {other:?}"),
    }
    // An unclosed body and a stray character are refused too.
    assert!(format("system s {\n  mass m = 1 kg\n", &cfg()).is_err());
    assert!(format("let a = 1 $\n", &cfg()).is_err());
}

#[test]
fn line_endings_are_kept_or_chosen() {
    let crlf = "let a=1\r\n# note  \r\nsystem s { mass m = 1 kg }\r\n";
    let out = format(crlf, &cfg()).unwrap_or_default();
    assert_eq!(
        out,
        "let a = 1\r\n# note\r\nsystem s {\r\n  mass m = 1 kg\r\n}\r\n"
    );
    assert_eq!(format(&out, &cfg()).as_deref(), Ok(out.as_str()));
    let lf = FormatConfig {
        line_ending: LineEnding::Lf,
    };
    assert_eq!(
        format(crlf, &lf).unwrap_or_default(),
        out.replace("\r\n", "\n")
    );
    let to_crlf = FormatConfig {
        line_ending: LineEnding::CrLf,
    };
    assert_eq!(
        format("let a = 1\n", &to_crlf).as_deref(),
        Ok("let a = 1\r\n")
    );
}

const PUMP: &str = "let speed = 1450  rpm
system pump {
  inertia motor=0.12 kg*m^2
  inertia pump = 0.4 kg*m^2   # trailing
  spring shaft between motor and pump=12 kN*m/rad
}
let after   = 2
";

fn apply(text: &str, edits: &[(Span, String)]) -> String {
    let mut out = text.to_string();
    for (span, new) in edits.iter().rev() {
        out.replace_range(span.range(), new);
    }
    out
}

#[test]
fn range_formats_only_the_touched_statements() {
    let at = PUMP.find("pump = 0.4").unwrap_or(0);
    let edits = format_range(PUMP, Span::new(at, at + 3), &cfg()).unwrap_or_default();
    assert_eq!(edits.len(), 1);
    let line = PUMP.find("  inertia pump").unwrap_or(0);
    assert_eq!(edits[0].0.start, line);
    assert_eq!(edits[0].1, "  inertia pump = 0.4 kg*m^2 # trailing");
    let after = apply(PUMP, &edits);
    // The other lines are untouched.
    assert!(after.contains("inertia motor=0.12 kg*m^2"), "{after}");
    assert!(after.contains("let speed = 1450  rpm"), "{after}");
    // Formatted already: no edit.
    let again = format_range(&after, Span::new(line + 3, line + 5), &cfg());
    assert_eq!(again, Ok(Vec::new()));
}

#[test]
fn range_on_a_header_or_at_top_level_takes_whole_items() {
    let at = PUMP.find("system").unwrap_or(0);
    let edits = format_range(PUMP, Span::at(at + 2), &cfg()).unwrap_or_default();
    let after = apply(PUMP, &edits);
    assert!(after.contains("  inertia motor = 0.12 kg*m^2\n"), "{after}");
    assert!(after.contains("let speed = 1450  rpm"), "{after}");
    assert!(after.contains("let after   = 2"), "{after}");
    // The whole text as the range is the whole format, up to the final newline.
    let edits = format_range(PUMP, Span::new(0, PUMP.len()), &cfg()).unwrap_or_default();
    assert_eq!(
        apply(PUMP, &edits),
        format(PUMP, &cfg()).unwrap_or_default()
    );
    // A range in blank space touches nothing.
    let text = "let a=1\n\n\nlet b=2\n";
    assert_eq!(format_range(text, Span::at(8), &cfg()), Ok(Vec::new()));
    // Two statements on one line are formatted together.
    let text = "system s {\n  mass a=1 kg mass b=2 kg\n}\n";
    let at = text.find("b=2").unwrap_or(0);
    let edits = format_range(text, Span::at(at), &cfg()).unwrap_or_default();
    assert_eq!(
        apply(text, &edits),
        "system s {\n  mass a = 1 kg\n  mass b = 2 kg\n}\n"
    );
}

#[test]
fn range_refuses_a_file_with_syntax_errors() {
    let text = "let a = 1\nlet b = \n";
    assert!(matches!(
        format_range(text, Span::at(0), &cfg()),
        Err(FormatError::Syntax(_))
    ));
}

#[test]
fn long_lines_and_long_runs_of_comments_format() {
    // 20,000 statements on one line, and 20,000 comment lines in a row: both are laid out in
    // one pass (a layout that looked back along the line, or ahead over the comments, for each
    // token would not finish here).
    let mut one_line = String::from("system wide {");
    for i in 0..20_000 {
        one_line.push_str(&format!(" mass m{i} = 1 kg"));
    }
    one_line.push_str(" }");
    let out = format(&one_line, &cfg()).unwrap_or_default();
    assert_eq!(out.lines().count(), 20_002);
    assert!(out.contains("\n  mass m19999 = 1 kg\n}\n"));
    // The range takes the whole line, so the whole system; only the file's final newline,
    // which is not part of any line's content, is left to `format`.
    let edits = format_range(&one_line, Span::at(20), &cfg()).unwrap_or_default();
    assert!(
        apply(&one_line, &edits) + "\n" == out,
        "range and whole format differ"
    );

    let mut comments = String::from("system notes {\n  mass m = 1 kg\n");
    for i in 0..20_000 {
        comments.push_str(&format!("# note {i}\n"));
    }
    comments.push_str("}\n");
    let out = format(&comments, &cfg()).unwrap_or_default();
    assert!(
        out.contains("\n  # note 0\n"),
        "comments inside a body are indented"
    );
    assert_eq!(format(&out, &cfg()).as_deref(), Ok(out.as_str()));
}

/// Pieces a mutation may insert: the tokens and spacings the formatter has rules for.
const PIECES: &[&str] = &[
    " ",
    "\n",
    "\n\n",
    "\r\n",
    "\t",
    "# c\n",
    "## d\n",
    "(",
    ")",
    "-",
    "*",
    "·",
    "/",
    "^",
    "%",
    "±",
    "+-",
    "..",
    ",",
    "=",
    "kg",
    "in",
    "m",
    "2",
    ".5",
    "1e-3",
    "mode 1",
    "{",
    "}",
    "system q {",
    "mass z = 1 kg",
    "let y = 2",
    "require damping >= 1%",
    "\"t\"",
    "\u{FEFF}",
    "µm",
    "*m",
    " at ",
    "sqrt(",
    "0 ",
];

fn mutate(text: &str, edits: &[(usize, usize, usize)]) -> String {
    let mut out = text.to_string();
    for &(pos, cut, piece) in edits {
        let mut at = pos % (out.len() + 1);
        while !out.is_char_boundary(at) {
            at -= 1;
        }
        let mut end = (at + cut % 4).min(out.len());
        while !out.is_char_boundary(end) {
            end += 1;
        }
        out.replace_range(at..end, PIECES[piece % PIECES.len()]);
    }
    out
}

fn examples() -> Vec<String> {
    sprung_files(&repo().join("examples"))
        .iter()
        .chain(sprung_files(&repo().join("tests/fixtures/ok")).iter())
        .map(|p| read(p))
        .collect()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 1000, ..ProptestConfig::default() })]

    /// Whenever a mutated example formats, formatting again changes nothing, the tokens and
    /// comments are the same, and range formatting never panics either.
    #[test]
    fn mutated_examples_format_idempotently(
        which in 0usize..64,
        edits in proptest::collection::vec((0usize..100_000, 0usize..8, 0usize..64), 1..6),
        range in (0usize..100_000, 0usize..200),
    ) {
        let sources = examples();
        let text = mutate(&sources[which % sources.len()], &edits);
        let result = format(&text, &cfg());
        // The formatter's own meaning check must never be what stops it.
        prop_assert!(
            !matches!(result, Err(FormatError::Unsafe { .. })),
            "{:?} on {:?}", result, text
        );
        if let Ok(once) = result {
            prop_assert_eq!(format(&once, &cfg()), Ok(once.clone()));
            prop_assert_eq!(token_kinds(&text), token_kinds(&once));
            prop_assert_eq!(comment_texts(&text), comment_texts(&once));
        }
        let start = range.0 % (text.len() + 1);
        let span = Span::new(start, (start + range.1).min(text.len()));
        let ranged = format_range(&text, span, &cfg());
        prop_assert!(
            !matches!(ranged, Err(FormatError::Unsafe { .. })),
            "{:?} on {:?} at {:?}", ranged, text, span
        );
        if let Ok(edits) = ranged {
            let after = apply(&text, &edits);
            prop_assert!(sprung_syntax::parse(&after).errors.is_empty());
            prop_assert_eq!(comment_texts(&text), comment_texts(&after));
        }
    }

    /// Spaces and tabs added between tokens never change the result: the layout depends on
    /// the tokens, not on how they were spaced (line breaks do count, for blank lines and
    /// for comments on lines of their own).
    #[test]
    fn spacing_between_tokens_does_not_change_the_result(
        which in 0usize..64,
        picks in proptest::collection::vec((0usize..10_000, any::<bool>()), 1..40),
    ) {
        let sources = examples();
        let text = &sources[which % sources.len()];
        let mut bounds: Vec<usize> = lex(text).tokens.iter().map(|(_, s)| s.start).collect();
        bounds.sort_unstable();
        let mut inserts: Vec<(usize, &str)> = picks
            .iter()
            .map(|&(k, tab)| (bounds[k % bounds.len()], if tab { "\t" } else { "  " }))
            .collect();
        inserts.sort_unstable();
        let mut spaced = text.clone();
        for &(at, blank) in inserts.iter().rev() {
            spaced.insert_str(at, blank);
        }
        prop_assert_eq!(format(&spaced, &cfg()), format(text, &cfg()));
    }
}
