//! Property tests: `parse` never panics, on arbitrary text and on one-character mutations of
//! a realistic model, and every span it returns lies inside the text on character boundaries.

use proptest::prelude::*;
use sprung_syntax::ast::{
    Comparison, Drive, Expr, ExprKind, Item, NodeRef, Statement, StatementKind, Subject, Value,
};
use sprung_syntax::{Span, parse};

/// The complete file of language.md §8.
const MODEL: &str = r#"## Bench-top centrifuge on a sprung base plate.
let rotor_speed = 3000 rpm

system centrifuge "Centrifuge on rubber feet" {
  let feet = 4 * 18 kN/m ± 15%
  mass head = 6.2 kg
  mass base = 3.4 kg
  spring column between head and base = 650 kN/m
  spring rubber between base and ground = feet
  damper rubber_loss between base and ground = 0.08 * 2 * sqrt(feet * (head + base))
  damper column_loss between head and base = 40 N*s/m
  force unbalance on head = 0.4 g*mm * rotor_speed^2 at 2400 rpm .. rotor_speed
  gravity = 1 gn

  require separation from unbalance >= 25%
  require transmissibility of unbalance <= 0.2
  require damping >= 0.02
  require sag of base <= 5 mm
}
"#;

fn expr_spans(e: &Expr, out: &mut Vec<Span>) {
    out.push(e.span);
    match &e.kind {
        ExprKind::Number { unit, .. } => {
            if let Some(u) = unit {
                out.push(u.span);
                for t in &u.terms {
                    out.push(t.atom_span);
                    out.extend(t.exponent_span);
                }
            }
        }
        ExprKind::Name(i) => out.push(i.span),
        ExprKind::Neg(x) | ExprKind::Paren(x) => expr_spans(x, out),
        ExprKind::Binary { lhs, rhs, .. } => {
            expr_spans(lhs, out);
            expr_spans(rhs, out);
        }
        ExprKind::Call { func, args } => {
            out.push(func.span);
            for a in args {
                expr_spans(a, out);
            }
        }
        ExprKind::Error => {}
    }
}

fn value_spans(v: &Value, out: &mut Vec<Span>) {
    out.push(v.span);
    expr_spans(&v.expr, out);
    if let Some(t) = &v.tolerance {
        expr_spans(t, out);
    }
}

fn node_span(n: &NodeRef, out: &mut Vec<Span>) {
    out.push(n.span());
}

fn statement_spans(st: &Statement, out: &mut Vec<Span>) {
    out.push(st.span);
    out.extend(st.doc.as_ref().map(|d| d.span));
    match &st.kind {
        StatementKind::Let(l) => {
            out.push(l.span);
            out.push(l.name.span);
            value_spans(&l.value, out);
        }
        StatementKind::Node { name, value, .. } => {
            out.push(name.span);
            value_spans(value, out);
        }
        StatementKind::Element {
            name, a, b, value, ..
        } => {
            out.push(name.span);
            node_span(a, out);
            node_span(b, out);
            value_spans(value, out);
        }
        StatementKind::Drive {
            name,
            target,
            drive,
            ..
        } => {
            out.push(name.span);
            node_span(target, out);
            match drive {
                Drive::Harmonic {
                    amplitude,
                    frequency,
                } => {
                    value_spans(amplitude, out);
                    value_spans(frequency, out);
                }
                Drive::Band {
                    amplitude,
                    from,
                    to,
                } => {
                    value_spans(amplitude, out);
                    expr_spans(from, out);
                    expr_spans(to, out);
                }
                Drive::Step(v) | Drive::Impulse(v) => value_spans(v, out),
            }
        }
        StatementKind::Initial {
            target,
            displacement,
            velocity,
        } => {
            node_span(target, out);
            value_spans(displacement, out);
            if let Some(v) = velocity {
                value_spans(v, out);
            }
        }
        StatementKind::Gravity { value } => value_spans(value, out),
        StatementKind::Require(r) => {
            out.push(r.span);
            match &r.subject {
                Subject::Damping { mode }
                | Subject::Frequency { mode }
                | Subject::Regime { mode } => {
                    out.extend(mode.as_ref().map(|m| m.span));
                }
                Subject::Separation { drive } => out.push(drive.span),
                Subject::Transmissibility { drive, to } => {
                    out.push(drive.span);
                    out.extend(to.as_ref().map(NodeRef::span));
                }
                Subject::Amplitude { of } | Subject::Overshoot { of } | Subject::Sag { of } => {
                    node_span(of, out);
                }
                Subject::Settling { of, within } => {
                    node_span(of, out);
                    if let Some(w) = within {
                        expr_spans(w, out);
                    }
                }
            }
            match &r.comparison {
                Comparison::Compare { rhs, .. } => expr_spans(rhs, out),
                Comparison::In { lo, hi } | Comparison::Outside { lo, hi } => {
                    expr_spans(lo, out);
                    expr_spans(hi, out);
                }
                Comparison::Is { regime_span, .. } => out.push(*regime_span),
            }
        }
    }
}

/// Every span of a parse: tree, docs, comments and errors.
fn all_spans(text: &str) -> Vec<Span> {
    let p = parse(text);
    let mut out = Vec::new();
    for item in &p.file.items {
        out.push(item.span());
        match item {
            Item::Let(l) => {
                out.push(l.name.span);
                out.extend(l.doc.as_ref().map(|d| d.span));
                value_spans(&l.value, &mut out);
            }
            Item::Use(u) => {
                out.push(u.path.span);
                out.extend(u.doc.as_ref().map(|d| d.span));
            }
            Item::System(s) => {
                out.push(s.name.span);
                out.extend(s.title.as_ref().map(|t| t.span));
                out.extend(s.doc.as_ref().map(|d| d.span));
                out.extend(s.body_span);
                for st in &s.statements {
                    statement_spans(st, &mut out);
                }
            }
        }
    }
    out.extend(p.file.comments.iter().map(|c| c.span));
    out.extend(p.errors.iter().map(|e| e.span));
    out
}

fn check_spans(text: &str) -> Result<(), TestCaseError> {
    for span in all_spans(text) {
        prop_assert!(span.start <= span.end, "{span:?} is reversed");
        prop_assert!(span.end <= text.len(), "{span:?} ends past {}", text.len());
        prop_assert!(
            text.is_char_boundary(span.start),
            "{span:?} starts mid-character"
        );
        prop_assert!(
            text.is_char_boundary(span.end),
            "{span:?} ends mid-character"
        );
    }
    Ok(())
}

#[derive(Clone, Debug)]
enum Edit {
    Insert(usize, char),
    Delete(usize),
    Replace(usize, char),
}

/// Characters that matter to the lexer, plus some that do not.
fn interesting_char() -> impl Strategy<Value = char> {
    prop_oneof![
        prop::sample::select(vec![
            '{', '}', '(', ')', '"', '#', '=', '+', '-', '*', '/', '^', '%', '.', ',', '<', '>',
            '±', '·', 'µ', 'μ', '\\', '\n', ' ', '0', '9', 'e', '_', 'a',
        ]),
        any::<char>(),
    ]
}

fn edit() -> impl Strategy<Value = Edit> {
    prop_oneof![
        (any::<usize>(), interesting_char()).prop_map(|(i, c)| Edit::Insert(i, c)),
        any::<usize>().prop_map(Edit::Delete),
        (any::<usize>(), interesting_char()).prop_map(|(i, c)| Edit::Replace(i, c)),
    ]
}

fn apply(text: &str, edits: &[Edit]) -> String {
    let mut chars: Vec<char> = text.chars().collect();
    for e in edits {
        match *e {
            Edit::Insert(i, c) => {
                let i = i % (chars.len() + 1);
                chars.insert(i, c);
            }
            Edit::Delete(i) if !chars.is_empty() => {
                let i = i % chars.len();
                chars.remove(i);
            }
            Edit::Replace(i, c) if !chars.is_empty() => {
                let i = i % chars.len();
                chars[i] = c;
            }
            _ => {}
        }
    }
    chars.into_iter().collect()
}

#[test]
fn the_language_md_model_parses_without_errors() {
    let p = parse(MODEL);
    assert!(p.errors.is_empty(), "{:?}", p.errors);
    assert_eq!(p.file.items.len(), 2);
    let Item::System(s) = &p.file.items[1] else {
        panic!("second item is not the system");
    };
    assert_eq!(s.statements.len(), 13);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(512))]

    #[test]
    fn arbitrary_text_never_panics(text in ".{0,200}") {
        check_spans(&text)?;
    }

    #[test]
    fn token_soup_never_panics(
        words in prop::collection::vec(prop::sample::select(vec![
            "let", "system", "mass", "spring", "between", "and", "ground", "require", "of",
            "mode", "in", "..", "at", "step", "{", "}", "(", ")", "=", "1", "2.5", "kg", "N*s/m",
            "^", "-", "+", "*", "±", "%", "\"t\"", "##d\n", "#c\n", "\n", "is", "not",
            "critically", "damped", "damping", "sag", "x",
        ]), 0..60),
    ) {
        check_spans(&words.join(" "))?;
    }

    #[test]
    fn mutated_model_never_panics(edits in prop::collection::vec(edit(), 1..6)) {
        check_spans(&apply(MODEL, &edits))?;
    }
}
