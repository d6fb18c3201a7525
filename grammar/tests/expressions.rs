//! Precedence, units against operators, and the position rules for `in` and `mode N`
//! (language.md §3 and §5).

use sprung_syntax::ast::{BinaryOp, Comparison, Expr, ExprKind, Item, StatementKind, Subject};
use sprung_syntax::parse;

/// An expression as an S-expression without spans; units in brackets.
fn sexpr(e: &Expr) -> String {
    match &e.kind {
        ExprKind::Number {
            value,
            unit,
            percent,
            ..
        } => {
            let mut s = value.to_string();
            if let Some(u) = unit {
                s.push_str(&format!("[{}]", u.text()));
            }
            if *percent {
                s.push('%');
            }
            s
        }
        ExprKind::Name(i) => i.name.clone(),
        ExprKind::Neg(x) => format!("(neg {})", sexpr(x)),
        ExprKind::Binary { op, lhs, rhs } => {
            let op = match op {
                BinaryOp::Add => "+",
                BinaryOp::Sub => "-",
                BinaryOp::Mul => "*",
                BinaryOp::Div => "/",
                BinaryOp::Pow => "^",
            };
            format!("({op} {} {})", sexpr(lhs), sexpr(rhs))
        }
        ExprKind::Call { func, args } => {
            let args: Vec<String> = args.iter().map(sexpr).collect();
            format!("({} {})", func.name, args.join(" "))
        }
        ExprKind::Paren(x) => sexpr(x),
        ExprKind::Error => "<error>".to_string(),
    }
}

/// Parses `let x = TEXT` and returns the value's expression.
fn expr(text: &str) -> String {
    let p = parse(&format!("let x = {text}"));
    assert!(p.errors.is_empty(), "{text}: {:?}", p.errors);
    match p.file.items.as_slice() {
        [Item::Let(l)] => sexpr(&l.value.expr),
        other => panic!("{text}: expected one let, got {other:?}"),
    }
}

#[test]
fn power_binds_tighter_than_unary_minus() {
    // language.md §3: `^` (right-assoc) > unary `-` > `* / ·` > `+ -`.
    assert_eq!(expr("-2^2"), "(neg (^ 2 2))");
    assert_eq!(expr("-x^2"), "(neg (^ x 2))");
    assert_eq!(expr("2^-1"), "(^ 2 (neg 1))");
    assert_eq!(expr("-a * b"), "(* (neg a) b)");
}

#[test]
fn associativity() {
    assert_eq!(expr("a - b - c"), "(- (- a b) c)");
    assert_eq!(expr("a / b / c"), "(/ (/ a b) c)");
    assert_eq!(expr("2^3^2"), "(^ 2 (^ 3 2))");
    assert_eq!(expr("1 + 2 * 3"), "(+ 1 (* 2 3))");
    assert_eq!(expr("(1 + 2) * 3"), "(* (+ 1 2) 3)");
    assert_eq!(expr("a · b / c"), "(/ (* a b) c)");
}

#[test]
fn spaces_end_a_unit() {
    assert_eq!(expr("2 kg * m"), "(* 2[kg] m)");
    assert_eq!(expr("2 kg*m"), "2[kg*m]");
    assert_eq!(expr("900 N*s/m"), "900[N*s/m]");
    assert_eq!(expr("9.81 m/s^2"), "9.81[m/s^2]");
    assert_eq!(expr("4 * 18 kN/m"), "(* 4 18[kN/m])");
    assert_eq!(expr("25%"), "25%");
    assert_eq!(expr("1_000.5"), "1000.5");
    assert_eq!(expr(".5 mm"), "0.5[mm]");
    assert_eq!(expr("max(1, 2, 3)"), "(max 1 2 3)");
}

fn requirement(statement: &str) -> (Subject, Comparison) {
    let p = parse(&format!("system s {{ {statement} }}"));
    assert!(p.errors.is_empty(), "{statement}: {:?}", p.errors);
    let Some(Item::System(s)) = p.file.items.first() else {
        panic!("{statement}: no system");
    };
    match s.statements.as_slice() {
        [st] => match &st.kind {
            StatementKind::Require(r) => (r.subject.clone(), r.comparison.clone()),
            other => panic!("{statement}: not a requirement: {other:?}"),
        },
        other => panic!("{statement}: expected one statement, got {other:?}"),
    }
}

#[test]
fn mode_number_takes_no_unit_so_in_is_the_range() {
    let (subject, cmp) = requirement("require frequency of mode 1 in 5 Hz .. 8 Hz");
    let Subject::Frequency { mode: Some(mode) } = subject else {
        panic!("subject {subject:?}");
    };
    assert_eq!(mode.index, 1);
    let Comparison::In { lo, hi } = cmp else {
        panic!("comparison {cmp:?}");
    };
    assert_eq!((sexpr(&lo), sexpr(&hi)), ("5[Hz]".into(), "8[Hz]".into()));
}

#[test]
fn inch_after_a_number_and_range_keyword_before_one() {
    let (subject, cmp) = requirement("require sag of base in 1 in .. 2 in");
    assert!(matches!(subject, Subject::Sag { .. }));
    let Comparison::In { lo, hi } = cmp else {
        panic!("comparison {cmp:?}");
    };
    assert_eq!((sexpr(&lo), sexpr(&hi)), ("1[in]".into(), "2[in]".into()));
    assert_eq!(expr("400 lbf/in"), "400[lbf/in]");
}

#[test]
fn regime_words() {
    let (_, cmp) = requirement("require regime of mode 2 is not critically damped");
    let Comparison::Is { not, regime, .. } = cmp else {
        panic!("comparison {cmp:?}");
    };
    assert!(not);
    assert_eq!(regime.words(), "critically damped");
}
