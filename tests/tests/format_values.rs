//! The formatter changes layout only: every example and every fixture that parses checks to
//! the same model after formatting — the same SI values bit for bit, the same tolerance
//! bounds, the same requirements and the same diagnostics (codes and messages; positions move
//! with the layout). The reference is the engine's reading of the original text, so this
//! holds the formatter to the checker rather than to itself.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use sprung_engine::check;
use sprung_syntax::{FormatConfig, format};
use sprung_tests::fixtures;

fn examples() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples");
    let mut v: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("examples/ exists")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|e| e == "sprung"))
        .collect();
    v.sort();
    v
}

/// The checked model of a text with every span left out: names, kinds, the nominal SI value
/// and formula of every quantity, tolerance bounds, requirements, and the diagnostics.
fn model_values(text: &str) -> String {
    let checked = check(text);
    let m = &checked.model;
    let mut out = String::new();
    for p in &m.params {
        let _ = writeln!(out, "param {} {:?} {} {}", p.name, p.kind, p.low, p.high);
    }
    for s in &m.systems {
        let _ = writeln!(out, "system {} {:?} {:?}", s.name, s.title, s.doc);
        for l in &s.lets {
            let _ = writeln!(out, "  let {} {:?} {:?}", l.name, l.value, l.doc);
        }
        for d in &s.dofs {
            let _ = writeln!(
                out,
                "  dof {} {:?} {:?} {:?}",
                d.name, d.kind, d.value, d.doc
            );
        }
        for e in &s.elements {
            let _ = writeln!(
                out,
                "  element {} {:?} {:?} {:?} {:?} {}",
                e.name, e.kind, e.a, e.b, e.value, e.rotational
            );
        }
        for d in &s.drives {
            let _ = writeln!(
                out,
                "  drive {} {:?} {:?} {:?} {:?}",
                d.name, d.kind, d.target, d.motion, d.form
            );
        }
        for i in &s.initials {
            let _ = writeln!(
                out,
                "  initial {} {:?} {:?}",
                i.dof, i.displacement, i.velocity
            );
        }
        let _ = writeln!(out, "  gravity {:?}", s.gravity);
        for r in &s.requirements {
            let _ = writeln!(
                out,
                "  require {} {:?} {:?} {:?} {:?} {:?}",
                r.subject.word(),
                r.mode,
                r.drive,
                r.dof,
                r.within,
                r.limit
            );
        }
    }
    for d in &checked.diagnostics {
        let _ = writeln!(out, "diagnostic {} {}", d.code, d.message);
    }
    out
}

#[test]
fn formatting_keeps_every_checked_value() {
    let files: Vec<PathBuf> = examples()
        .into_iter()
        .chain(fixtures("ok"))
        .chain(fixtures("err"))
        .collect();
    let mut compared = 0;
    for path in &files {
        let text = std::fs::read_to_string(path).expect("readable");
        // Fixtures with syntax errors are refused by the formatter (tested in grammar/).
        let Ok(formatted) = format(&text, &FormatConfig::default()) else {
            continue;
        };
        let before = model_values(&text);
        assert!(
            !before.contains(".."),
            "{}: a span slipped into the comparison:\n{before}",
            path.display()
        );
        assert_eq!(
            before,
            model_values(&formatted),
            "{}: formatting changed the checked model",
            path.display()
        );
        compared += 1;
    }
    // Five examples, six ok fixtures and the error fixtures without syntax errors.
    assert!(compared >= 20, "only {compared} files compared");
}
