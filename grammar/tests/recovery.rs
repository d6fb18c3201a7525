//! Recovery promises stated as plain assertions (the fixtures show the full trees).

use sprung_syntax::ast::Item;
use sprung_syntax::{ParseErrorKind, parse};

fn systems(p: &sprung_syntax::Parse) -> Vec<(&str, usize)> {
    p.file
        .items
        .iter()
        .filter_map(|i| match i {
            Item::System(s) => Some((s.name.name.as_str(), s.statements.len())),
            _ => None,
        })
        .collect()
}

#[test]
fn two_broken_statements_in_two_systems_give_two_errors() {
    let text = "system a {\n mass m = 1 kg\n spring s between m ground = 1 kN/m\n}\n\
                system b {\n mass n = 1 kg\n damper d between n and = 3\n}\n\
                system c {\n mass p = 1 kg\n spring k between p and ground = 2 kN/m\n}\n";
    let p = parse(text);
    let kinds: Vec<_> = p.errors.iter().map(|e| e.kind).collect();
    assert_eq!(kinds, [ParseErrorKind::Syntax, ParseErrorKind::Syntax]);
    assert_eq!(systems(&p), [("a", 1), ("b", 1), ("c", 2)]);
}

#[test]
fn a_missing_brace_keeps_the_statements_and_the_next_system() {
    let p = parse("system a {\n mass m = 1 kg\nsystem b { mass n = 1 kg }");
    let kinds: Vec<_> = p.errors.iter().map(|e| e.kind).collect();
    assert_eq!(kinds, [ParseErrorKind::UnclosedBlock]);
    // The error sits on the header `system a {`.
    assert_eq!(p.errors[0].span.start, 0);
    assert_eq!(p.errors[0].span.end, 10);
    assert_eq!(systems(&p), [("a", 1), ("b", 1)]);
}

#[test]
fn missing_and_names_what_was_found_and_helps() {
    let p = parse("system s { spring k between a b = 1 kN/m }");
    assert_eq!(p.errors.len(), 1);
    let e = &p.errors[0];
    assert_eq!(
        e.message,
        "expected `and` between the two ends, found name `b`"
    );
    assert_eq!(
        &"system s { spring k between a b = 1 kN/m }"[e.span.range()],
        "b"
    );
    assert_eq!(
        e.help.as_deref(),
        Some("the form is `spring NAME between A and B = VALUE`")
    );
}

#[test]
fn mass_message_follows_the_house_style() {
    let p = parse("system s { mass m 5 kg }");
    assert_eq!(p.errors.len(), 1);
    assert_eq!(
        p.errors[0].message,
        "expected `=` after the mass name, found number `5`"
    );
}

#[test]
fn an_unterminated_string_is_one_lex_error() {
    let p = parse("system s \"title {\n mass m = 1 kg\n}\n");
    let kinds: Vec<_> = p.errors.iter().map(|e| e.kind).collect();
    assert_eq!(kinds, [ParseErrorKind::Lex]);
    assert_eq!(systems(&p), [("s", 1)]);
}

#[test]
fn doc_lines_join_with_newlines() {
    let p = parse("## One.\n## Two.\nlet a = 1\n");
    let Some(Item::Let(l)) = p.file.items.first() else {
        panic!("no let");
    };
    assert_eq!(l.doc.as_ref().map(|d| d.text.as_str()), Some("One.\nTwo."));
    assert_eq!(p.file.comments.len(), 2);
    assert!(p.file.comments.iter().all(|c| c.doc));
}
