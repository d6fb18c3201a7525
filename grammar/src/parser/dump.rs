//! A readable text form of a parse, for snapshot tests of this crate and of others.
//!
//! One line per item or statement, expressions as S-expressions, every node followed by its
//! byte span as `@start..end`; then the errors, then the comments. The form is stable: change
//! it only together with the snapshots.

use std::fmt::Write as _;

use crate::ast::{
    BinaryOp, CmpOp, Comparison, Doc, Drive, DriveKind, ElementKind, Expr, ExprKind, Ident, Item,
    Let, ModeRef, NodeKind, NodeRef, Statement, StatementKind, StrLit, Subject, Value,
};
use crate::parser::{Parse, ParseErrorKind};
use crate::span::Span;

/// Renders a parse (tree, errors and comments) as text.
pub fn dump(parse: &Parse) -> String {
    let mut out = String::new();
    for item in &parse.file.items {
        match item {
            Item::Let(l) => {
                doc(&mut out, "", &l.doc);
                let_line(&mut out, "", l);
            }
            Item::Use(u) => {
                doc(&mut out, "", &u.doc);
                let _ = writeln!(out, "(use {} {})", string(&u.path), at(u.span));
            }
            Item::System(s) => {
                doc(&mut out, "", &s.doc);
                let _ = write!(out, "(system {}", ident(&s.name));
                if let Some(t) = &s.title {
                    let _ = write!(out, " {}", string(t));
                }
                let body = s.body_span.map_or("none".to_string(), at);
                let _ = writeln!(out, " {} body={body}", at(s.span));
                for st in &s.statements {
                    statement(&mut out, st);
                }
                out.push_str(")\n");
            }
        }
    }
    if !parse.errors.is_empty() {
        out.push_str("errors:\n");
        for e in &parse.errors {
            let kind = match e.kind {
                ParseErrorKind::Lex => "lex",
                ParseErrorKind::Syntax => "syntax",
                ParseErrorKind::UnclosedBlock => "unclosed",
                ParseErrorKind::TooDeep => "too-deep",
            };
            let _ = writeln!(out, "  {kind} {}: {}", at(e.span), e.message);
            if let Some(h) = &e.help {
                let _ = writeln!(out, "    help: {h}");
            }
        }
    }
    if !parse.file.comments.is_empty() {
        out.push_str("comments:\n");
        for c in &parse.file.comments {
            let mark = if c.doc { "##" } else { "#" };
            let _ = writeln!(out, "  {mark}{:?} {}", c.text, at(c.span));
        }
    }
    out
}

fn at(span: Span) -> String {
    format!("@{}..{}", span.start, span.end)
}

fn ident(i: &Ident) -> String {
    format!("{} {}", i.name, at(i.span))
}

fn string(s: &StrLit) -> String {
    format!("{:?} {}", s.value, at(s.span))
}

fn doc(out: &mut String, indent: &str, d: &Option<Doc>) {
    if let Some(d) = d {
        let _ = writeln!(out, "{indent}(doc {:?} {})", d.text, at(d.span));
    }
}

fn let_line(out: &mut String, indent: &str, l: &Let) {
    let _ = writeln!(
        out,
        "{indent}(let {} {} {})",
        ident(&l.name),
        value(&l.value),
        at(l.span)
    );
}

fn node(n: &NodeRef) -> String {
    match n {
        NodeRef::Ground(s) => format!("ground {}", at(*s)),
        NodeRef::Name(i) => ident(i),
    }
}

fn mode(m: &Option<ModeRef>) -> String {
    m.as_ref().map_or(String::new(), |m| {
        format!(" (mode {} {})", m.index, at(m.span))
    })
}

fn statement(out: &mut String, st: &Statement) {
    const IND: &str = "  ";
    doc(out, IND, &st.doc);
    let sp = at(st.span);
    let line = match &st.kind {
        StatementKind::Let(l) => {
            let_line(out, IND, l);
            return;
        }
        StatementKind::Node {
            kind,
            name,
            value: v,
        } => {
            let word = match kind {
                NodeKind::Mass => "mass",
                NodeKind::Inertia => "inertia",
            };
            format!("({word} {} {} {sp})", ident(name), value(v))
        }
        StatementKind::Element {
            kind,
            name,
            a,
            b,
            value: v,
        } => {
            let word = match kind {
                ElementKind::Spring => "spring",
                ElementKind::Damper => "damper",
            };
            format!(
                "({word} {} (between {}) (and {}) {} {sp})",
                ident(name),
                node(a),
                node(b),
                value(v)
            )
        }
        StatementKind::Drive {
            kind,
            name,
            target,
            drive: d,
        } => {
            let (word, rel) = match kind {
                DriveKind::Force => ("force", "on"),
                DriveKind::Torque => ("torque", "on"),
                DriveKind::Motion => ("motion", "of"),
            };
            format!(
                "({word} {} ({rel} {}) {} {sp})",
                ident(name),
                node(target),
                drive(d)
            )
        }
        StatementKind::Initial {
            target,
            displacement,
            velocity,
        } => {
            let vel = velocity
                .as_ref()
                .map_or(String::new(), |v| format!(" {}", value(v)));
            format!(
                "(initial {} {}{vel} {sp})",
                node(target),
                value(displacement)
            )
        }
        StatementKind::Gravity { value: v } => format!("(gravity {} {sp})", value(v)),
        StatementKind::Require(r) => {
            let subject = match &r.subject {
                Subject::Damping { mode: m } => format!("damping{}", mode(m)),
                Subject::Frequency { mode: m } => format!("frequency{}", mode(m)),
                Subject::Regime { mode: m } => format!("regime{}", mode(m)),
                Subject::Separation { drive } => format!("separation (from {})", ident(drive)),
                Subject::Transmissibility { drive, to } => {
                    let to = to
                        .as_ref()
                        .map_or(String::new(), |t| format!(" (to {})", node(t)));
                    format!("transmissibility (of {}){to}", ident(drive))
                }
                Subject::Amplitude { of } => format!("amplitude (of {})", node(of)),
                Subject::Settling { of, within } => {
                    let within = within
                        .as_ref()
                        .map_or(String::new(), |w| format!(" (within {})", expr(w)));
                    format!("settling (of {}){within}", node(of))
                }
                Subject::Overshoot { of } => format!("overshoot (of {})", node(of)),
                Subject::Sag { of } => format!("sag (of {})", node(of)),
            };
            let cmp = match &r.comparison {
                Comparison::Compare { op, rhs } => {
                    let op = match op {
                        CmpOp::Lt => "<",
                        CmpOp::Le => "<=",
                        CmpOp::Gt => ">",
                        CmpOp::Ge => ">=",
                    };
                    format!("({op} {})", expr(rhs))
                }
                Comparison::In { lo, hi } => format!("(in {} {})", expr(lo), expr(hi)),
                Comparison::Outside { lo, hi } => {
                    format!("(outside {} {})", expr(lo), expr(hi))
                }
                Comparison::Is {
                    not,
                    regime,
                    regime_span,
                } => {
                    let not = if *not { "not " } else { "" };
                    format!("(is {not}{:?} {})", regime.words(), at(*regime_span))
                }
            };
            if r.span == st.span {
                format!("(require ({subject}) {cmp} {sp})")
            } else {
                format!(
                    "(require ({subject}) {cmp} {sp} requirement={})",
                    at(r.span)
                )
            }
        }
    };
    let _ = writeln!(out, "{IND}{line}");
}

fn drive(d: &Drive) -> String {
    match d {
        Drive::Harmonic {
            amplitude,
            frequency,
        } => format!("(harmonic {} (at {}))", value(amplitude), value(frequency)),
        Drive::Band {
            amplitude,
            from,
            to,
        } => format!(
            "(band {} (at {} .. {}))",
            value(amplitude),
            expr(from),
            expr(to)
        ),
        Drive::Step(v) => format!("(step {})", value(v)),
        Drive::Impulse(v) => format!("(impulse {})", value(v)),
    }
}

fn value(v: &Value) -> String {
    match &v.tolerance {
        None => format!("(value {} {})", expr(&v.expr), at(v.span)),
        Some(t) => format!(
            "(value {} (\u{b1} {}) {})",
            expr(&v.expr),
            expr(t),
            at(v.span)
        ),
    }
}

/// An expression as an S-expression. Trees are at most [`super::MAX_EXPR_DEPTH`] deep, so
/// recursion is safe here.
pub(super) fn expr(e: &Expr) -> String {
    let sp = at(e.span);
    match &e.kind {
        ExprKind::Number {
            value,
            text,
            unit,
            percent,
        } => {
            let mut s = format!("(num {text}");
            if text.parse::<f64>().ok() != Some(*value) {
                let _ = write!(s, "={value}");
            }
            if let Some(u) = unit {
                let _ = write!(s, " [{} {}]", u.text(), at(u.span));
            }
            if *percent {
                s.push_str(" %");
            }
            let _ = write!(s, " {sp})");
            s
        }
        ExprKind::Name(i) => format!("(name {})", ident(i)),
        ExprKind::Neg(inner) => format!("(neg {} {sp})", expr(inner)),
        ExprKind::Binary { op, lhs, rhs } => {
            let op = match op {
                BinaryOp::Add => "+",
                BinaryOp::Sub => "-",
                BinaryOp::Mul => "*",
                BinaryOp::Div => "/",
                BinaryOp::Pow => "^",
            };
            format!("({op} {} {} {sp})", expr(lhs), expr(rhs))
        }
        ExprKind::Call { func, args } => {
            let mut s = format!("(call {}", ident(func));
            for a in args {
                let _ = write!(s, " {}", expr(a));
            }
            let _ = write!(s, " {sp})");
            s
        }
        ExprKind::Paren(inner) => format!("(paren {} {sp})", expr(inner)),
        ExprKind::Error => format!("(error {sp})"),
    }
}
