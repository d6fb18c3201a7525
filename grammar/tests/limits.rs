//! Depth and size limits: deep input gives one diagnostic, never a stack overflow, and long
//! flat input stays fast. Each check runs on a thread with a 2 MiB stack, the size of a test
//! thread, so a recursion per token would really overflow.

use std::time::{Duration, Instant};

use sprung_syntax::{MAX_NESTING, Parse, ParseErrorKind, parse};

fn on_small_stack(text: String) -> Parse {
    std::thread::Builder::new()
        .stack_size(2 << 20)
        .spawn(move || parse(&text))
        .expect("spawn")
        .join()
        .expect("parse must not panic or overflow")
}

fn kinds(p: &Parse) -> Vec<ParseErrorKind> {
    p.errors.iter().map(|e| e.kind).collect()
}

#[test]
fn twenty_thousand_parentheses_give_one_too_deep_error() {
    let n = 20_000;
    let text = format!("let a = {}1{}", "(".repeat(n), ")".repeat(n));
    let p = on_small_stack(text.clone());
    assert_eq!(kinds(&p), [ParseErrorKind::TooDeep]);
    assert_eq!(p.errors[0].span.start, 0);
    assert_eq!(p.errors[0].span.end, text.len());
    assert!(p.file.items.is_empty());
}

#[test]
fn unclosed_parentheses_minus_runs_and_power_chains_are_too_deep() {
    for text in [
        format!("let a = {}1", "(".repeat(20_000)),
        format!("let a = {}1", "-".repeat(20_000)),
        format!("let a = 2{}", "^2".repeat(20_000)),
    ] {
        let p = on_small_stack(text);
        assert_eq!(kinds(&p), [ParseErrorKind::TooDeep]);
    }
}

#[test]
fn nesting_at_the_limit_parses() {
    let n = MAX_NESTING;
    let p = on_small_stack(format!("let a = {}1{}", "(".repeat(n), ")".repeat(n)));
    assert!(p.errors.is_empty(), "{:?}", p.errors);
    let p = on_small_stack(format!(
        "let a = {}1{}",
        "(".repeat(n + 1),
        ")".repeat(n + 1)
    ));
    assert_eq!(kinds(&p), [ParseErrorKind::TooDeep]);
}

#[test]
fn a_too_deep_statement_does_not_hide_its_neighbours() {
    let text = format!(
        "system s {{\n mass m = 1 kg\n let deep = {}1{}\n mass n = 2 kg\n}}",
        "(".repeat(5_000),
        ")".repeat(5_000)
    );
    let p = on_small_stack(text);
    assert_eq!(kinds(&p), [ParseErrorKind::TooDeep]);
    let Some(sprung_syntax::ast::Item::System(s)) = p.file.items.first() else {
        panic!("no system");
    };
    assert_eq!(s.statements.len(), 2);
}

#[test]
fn a_hundred_thousand_term_sum_is_refused_quickly_without_overflow() {
    let text = format!("let a = 1{}", " + 1".repeat(100_000));
    let start = Instant::now();
    let p = on_small_stack(text);
    assert!(
        start.elapsed() < Duration::from_secs(20),
        "{:?}",
        start.elapsed()
    );
    assert_eq!(kinds(&p), [ParseErrorKind::TooDeep]);
}

#[test]
fn a_long_but_allowed_sum_parses_iteratively() {
    // 500 terms: within MAX_EXPR_DEPTH, folded left by the Pratt loop.
    let text = format!("let a = 1{}", " + 1".repeat(500));
    let p = on_small_stack(text);
    assert!(p.errors.is_empty(), "{:?}", p.errors);
}

#[test]
fn a_hundred_thousand_statements_parse() {
    let mut text = String::from("system big {\n");
    for i in 0..100_000 {
        text.push_str(&format!("  mass m{i} = 1 kg\n"));
    }
    text.push('}');
    let start = Instant::now();
    let p = on_small_stack(text);
    assert!(
        start.elapsed() < Duration::from_secs(30),
        "{:?}",
        start.elapsed()
    );
    assert!(p.errors.is_empty());
    let Some(sprung_syntax::ast::Item::System(s)) = p.file.items.first() else {
        panic!("no system");
    };
    assert_eq!(s.statements.len(), 100_000);
}

#[test]
fn a_hundred_thousand_arguments_parse_in_linear_time() {
    let text = format!("let a = max(1{})", ", 1".repeat(100_000));
    let start = Instant::now();
    let p = on_small_stack(text);
    assert!(
        start.elapsed() < Duration::from_secs(20),
        "{:?}",
        start.elapsed()
    );
    assert!(p.errors.is_empty(), "{:?}", p.errors.first());
    let Some(sprung_syntax::ast::Item::Let(l)) = p.file.items.first() else {
        panic!("no let");
    };
    let sprung_syntax::ast::ExprKind::Call { args, .. } = &l.value.expr.kind else {
        panic!("not a call");
    };
    assert_eq!(args.len(), 100_001);
}
