//! The chumsky grammar of one item or statement (language.md §2, §3, §5).
//!
//! The splitter in [`super`] hands each statement's significant tokens here as a slice, so a
//! parser never sees more than one statement and a failure never spills into the next one.
//! Labels are written as the tail of a sentence ("`=` after the mass name") because
//! [`super::errors`] builds messages as "expected LABEL, found TOKEN".

use chumsky::input::MappedInput;
use chumsky::pratt::{infix, left, prefix, right};
use chumsky::prelude::*;

use crate::ast::{
    BinaryOp, CmpOp, Comparison, Drive, ElementKind, Expr, ExprKind, Ident, Let, ModeRef, NodeKind,
    NodeRef, Regime, Requirement, StatementKind, StrLit, Subject, Use, Value,
};
use crate::lexer::Token;
use crate::span::Span;

/// A significant token with its chumsky span.
pub(super) type Tok<'s> = (Token<'s>, SimpleSpan);
/// The input every statement parser reads: a slice of tokens split into token and span.
pub(super) type In<'t, 's> = MappedInput<'t, Token<'s>, SimpleSpan, &'t [Tok<'s>]>;
pub(super) type Error<'t, 's> = Rich<'t, Token<'s>>;
type Ex<'t, 's> = extra::Err<Error<'t, 's>>;
pub(super) type P<'t, 's, O> = Boxed<'t, 't, In<'t, 's>, O, Ex<'t, 's>>;

pub(super) fn span(s: SimpleSpan) -> Span {
    Span::new(s.start, s.end)
}

/// The parsers for the three kinds of slice the splitter produces.
pub(super) struct Grammar<'t, 's> {
    /// `let NAME = VALUE` (top level and inside a system).
    pub let_item: P<'t, 's, Let>,
    /// `use "path"`
    pub use_item: P<'t, 's, Use>,
    /// `system NAME ["Title"]`, the part before `{`.
    pub header: P<'t, 's, (Ident, Option<StrLit>)>,
    /// Every statement of a system body.
    pub statement: P<'t, 's, StatementKind>,
}

impl<'t, 's: 't> Grammar<'t, 's> {
    pub(super) fn new() -> Self {
        let expr = expr();
        let value = value(expr.clone());
        let let_item = let_item(value.clone());
        let statement = statement(expr, value, let_item.clone());
        Grammar {
            let_item: let_item.then_ignore(end()).boxed(),
            use_item: use_item().then_ignore(end()).boxed(),
            header: header().then_ignore(end()).boxed(),
            statement: statement.then_ignore(end()).boxed(),
        }
    }
}

fn kw<'t, 's: 't>(tok: Token<'s>, label: &'static str) -> P<'t, 's, SimpleSpan> {
    just(tok).map_with(|_, e| e.span()).labelled(label).boxed()
}

fn ident<'t, 's: 't>(label: &'static str) -> P<'t, 's, Ident> {
    select! { Token::Ident(s) => s }
        .map_with(|s, e| Ident {
            name: s.to_string(),
            span: span(e.span()),
        })
        .labelled(label)
        .boxed()
}

/// A contextual word: an identifier with this exact spelling.
fn word<'t, 's: 't>(w: &'static str, label: &'static str) -> P<'t, 's, SimpleSpan> {
    any()
        .filter(move |t: &Token<'s>| matches!(t, Token::Ident(s) if *s == w))
        .map_with(|_, e| e.span())
        .labelled(label)
        .boxed()
}

fn node_ref<'t, 's: 't>(label: &'static str) -> P<'t, 's, NodeRef> {
    choice((
        just(Token::Ground).map_with(|_, e| NodeRef::Ground(span(e.span()))),
        select! { Token::Ident(s) => s }.map_with(|s, e| {
            NodeRef::Name(Ident {
                name: s.to_string(),
                span: span(e.span()),
            })
        }),
    ))
    .labelled(label)
    .boxed()
}

fn string<'t, 's: 't>(label: &'static str) -> P<'t, 's, StrLit> {
    select! { Token::Str(s) => s }
        .map_with(|s, e| StrLit {
            value: unescape(s),
            span: span(e.span()),
        })
        .labelled(label)
        .boxed()
}

/// The contents of a string token without its quotes, with `\"` and `\\` resolved. Other
/// backslash pairs are kept as written.
fn unescape(token: &str) -> String {
    let inner = token
        .strip_prefix('"')
        .and_then(|t| t.strip_suffix('"'))
        .unwrap_or(token);
    let mut out = String::with_capacity(inner.len());
    let mut chars = inner.chars();
    while let Some(c) = chars.next() {
        if c == '\\' {
            match chars.next() {
                Some(n @ ('"' | '\\')) => out.push(n),
                Some(n) => {
                    out.push('\\');
                    out.push(n);
                }
                None => out.push('\\'),
            }
        } else {
            out.push(c);
        }
    }
    out
}

fn number_value(text: &str) -> f64 {
    let cleaned: String = text.chars().filter(|c| *c != '_').collect();
    cleaned.parse::<f64>().unwrap_or(f64::NAN)
}

fn binary(op: BinaryOp, lhs: Expr, rhs: Expr, s: SimpleSpan) -> Expr {
    Expr {
        kind: ExprKind::Binary {
            op,
            lhs: Box::new(lhs),
            rhs: Box::new(rhs),
        },
        span: span(s),
    }
}

/// EXPR: `^` (right) > unary `-` > `* / ·` > `+ -`.
fn expr<'t, 's: 't>() -> P<'t, 's, Expr> {
    recursive(|expr| {
        let number = select! { Token::Number(s) => s }
            .then(select! { Token::Unit(u) => u }.or_not())
            .then(just(Token::Percent).or_not())
            .map_with(|((text, unit), percent), e| Expr {
                kind: ExprKind::Number {
                    value: number_value(text),
                    text: text.to_string(),
                    unit: unit.map(|u| *u),
                    percent: percent.is_some(),
                },
                span: span(e.span()),
            });
        let name = select! { Token::Ident(s) => s }.map_with(|s, e| Ident {
            name: s.to_string(),
            span: span(e.span()),
        });
        let call = name
            .then(
                expr.clone()
                    .separated_by(just(Token::Comma))
                    .collect::<Vec<_>>()
                    .then_ignore(
                        just(Token::RParen).labelled("`,` or `)` to close the argument list"),
                    )
                    .delimited_by(just(Token::LParen), empty()),
            )
            .map_with(|(func, args), e| Expr {
                kind: ExprKind::Call { func, args },
                span: span(e.span()),
            });
        let paren = expr
            .then_ignore(just(Token::RParen).labelled("`)` to close the parenthesis"))
            .delimited_by(just(Token::LParen), empty())
            .map_with(|inner, e| Expr {
                kind: ExprKind::Paren(Box::new(inner)),
                span: span(e.span()),
            });
        let atom = choice((
            number,
            call,
            name.map(|n| {
                let span = n.span;
                Expr {
                    kind: ExprKind::Name(n),
                    span,
                }
            }),
            paren,
        ))
        .labelled("a value (a number, a name or `(`)");

        let mul_op = select! {
            Token::Star => BinaryOp::Mul,
            Token::Dot => BinaryOp::Mul,
            Token::Slash => BinaryOp::Div,
        };
        let add_op = select! {
            Token::Plus => BinaryOp::Add,
            Token::Minus => BinaryOp::Sub,
        };
        atom.pratt((
            infix(right(4), just(Token::Caret), |l, _, r, e| {
                binary(BinaryOp::Pow, l, r, e.span())
            }),
            prefix(3, just(Token::Minus), |_, rhs, e| Expr {
                kind: ExprKind::Neg(Box::new(rhs)),
                span: span(e.span()),
            }),
            infix(left(2), mul_op, |l, op, r, e| binary(op, l, r, e.span())),
            infix(left(1), add_op, |l, op, r, e| binary(op, l, r, e.span())),
        ))
        .labelled("a value (a number, a name or `(`)")
    })
    .boxed()
}

/// VALUE := EXPR [± EXPR]
fn value<'t, 's: 't>(expr: P<'t, 's, Expr>) -> P<'t, 's, Value> {
    expr.clone()
        .then(
            just(Token::PlusMinus)
                .ignore_then(expr.labelled("a tolerance after `\u{b1}`"))
                .or_not(),
        )
        .map_with(|(expr, tolerance), e| Value {
            expr,
            tolerance,
            span: span(e.span()),
        })
        .boxed()
}

fn let_item<'t, 's: 't>(value: P<'t, 's, Value>) -> P<'t, 's, Let> {
    just(Token::Let)
        .ignore_then(ident("a name after `let`"))
        .then_ignore(kw(Token::Eq, "`=` after the name"))
        .then(value.labelled("a value after `=`"))
        .map_with(|(name, value), e| Let {
            name,
            value,
            doc: None,
            span: span(e.span()),
        })
        .boxed()
}

fn use_item<'t, 's: 't>() -> P<'t, 's, Use> {
    just(Token::Use)
        .ignore_then(string("a quoted path after `use`"))
        .map_with(|path, e| Use {
            path,
            doc: None,
            span: span(e.span()),
        })
        .boxed()
}

fn header<'t, 's: 't>() -> P<'t, 's, (Ident, Option<StrLit>)> {
    just(Token::System)
        .ignore_then(ident("a name after `system`"))
        .then(string("a quoted title or `{`").or_not())
        .boxed()
}

/// DRIVE := VALUE at VALUE | VALUE at EXPR .. EXPR | step VALUE | impulse VALUE
fn drive<'t, 's: 't>(expr: P<'t, 's, Expr>, value: P<'t, 's, Value>) -> P<'t, 's, Drive> {
    let step = just(Token::Step)
        .ignore_then(value.clone().labelled("a value after `step`"))
        .map(Drive::Step);
    let impulse = just(Token::Impulse)
        .ignore_then(value.clone().labelled("a value after `impulse`"))
        .map(Drive::Impulse);
    enum Tail {
        Band(Expr),
        Tolerance(Option<Expr>),
    }
    let harmonic = value
        .then_ignore(kw(Token::At, "`at` and a frequency after the amplitude"))
        .then(expr.clone().labelled("a frequency after `at`"))
        .then(choice((
            just(Token::DotDot)
                .ignore_then(
                    expr.clone()
                        .labelled("the upper end of the band after `..`"),
                )
                .map(Tail::Band),
            just(Token::PlusMinus)
                .ignore_then(expr.labelled("a tolerance after `\u{b1}`"))
                .or_not()
                .map(Tail::Tolerance),
        )))
        .map(|((amplitude, first), tail)| match tail {
            Tail::Band(to) => Drive::Band {
                amplitude,
                from: first,
                to,
            },
            Tail::Tolerance(tolerance) => {
                let end = tolerance.as_ref().map_or(first.span, |t| t.span);
                let span = first.span.cover(end);
                Drive::Harmonic {
                    amplitude,
                    frequency: Value {
                        expr: first,
                        tolerance,
                        span,
                    },
                }
            }
        });
    choice((step, impulse, harmonic))
        .labelled("a drive (`AMPLITUDE at FREQUENCY`, `step VALUE` or `impulse VALUE`)")
        .boxed()
}

fn statement<'t, 's: 't>(
    expr: P<'t, 's, Expr>,
    value: P<'t, 's, Value>,
    let_item: P<'t, 's, Let>,
) -> P<'t, 's, StatementKind> {
    let node = |tok: Token<'s>, kind: NodeKind, name: &'static str, eq: &'static str| {
        just(tok)
            .ignore_then(ident(name))
            .then_ignore(kw(Token::Eq, eq))
            .then(value.clone().labelled("a value after `=`"))
            .map(move |(name, value)| StatementKind::Node { kind, name, value })
    };
    let mass = node(
        Token::Mass,
        NodeKind::Mass,
        "a name after `mass`",
        "`=` after the mass name",
    );
    let inertia = node(
        Token::Inertia,
        NodeKind::Inertia,
        "a name after `inertia`",
        "`=` after the inertia name",
    );

    let element = |tok: Token<'s>, kind: ElementKind, labels: [&'static str; 3]| {
        just(tok)
            .ignore_then(ident(labels[0]))
            .then_ignore(kw(Token::Between, labels[1]))
            .then(node_ref(
                "the first end after `between` (a mass, an inertia or `ground`)",
            ))
            .then_ignore(kw(Token::And, "`and` between the two ends"))
            .then(node_ref(
                "the second end after `and` (a mass, an inertia or `ground`)",
            ))
            .then_ignore(kw(Token::Eq, labels[2]))
            .then(value.clone().labelled("a value after `=`"))
            .map(move |(((name, a), b), value)| StatementKind::Element {
                kind,
                name,
                a,
                b,
                value,
            })
    };
    let spring = element(
        Token::Spring,
        ElementKind::Spring,
        [
            "a name after `spring`",
            "`between` after the spring name",
            "`=` after the spring's ends",
        ],
    );
    let damper = element(
        Token::Damper,
        ElementKind::Damper,
        [
            "a name after `damper`",
            "`between` after the damper name",
            "`=` after the damper's ends",
        ],
    );

    let drive = drive(expr.clone(), value.clone());
    let load = |tok: Token<'s>, kind, labels: [&'static str; 3]| {
        just(tok)
            .ignore_then(ident(labels[0]))
            .then_ignore(kw(Token::On, labels[1]))
            .then(node_ref(labels[2]))
            .then_ignore(kw(Token::Eq, "`=` after the target"))
            .then(drive.clone())
            .map(move |((name, target), drive)| StatementKind::Drive {
                kind,
                name,
                target,
                drive,
            })
    };
    let force = load(
        Token::Force,
        crate::ast::DriveKind::Force,
        [
            "a name after `force`",
            "`on` after the force name",
            "the mass the force acts on",
        ],
    );
    let torque = load(
        Token::Torque,
        crate::ast::DriveKind::Torque,
        [
            "a name after `torque`",
            "`on` after the torque name",
            "the inertia the torque acts on",
        ],
    );
    let motion_target = choice((
        just(Token::Ground).map_with(|_, e| NodeRef::Ground(span(e.span()))),
        any()
            .filter(|t: &Token<'s>| !matches!(t, Token::Eq))
            .validate(|t: Token<'s>, e, emitter| {
                emitter.emit(Rich::custom(
                    e.span(),
                    format!("a motion is always of ground, found {}", t.describe()),
                ));
                NodeRef::Ground(span(e.span()))
            }),
    ))
    .labelled("`ground` after `of`");
    let motion = just(Token::Motion)
        .ignore_then(ident("a name after `motion`"))
        .then_ignore(kw(Token::Of, "`of ground` after the motion name"))
        .then(motion_target)
        .then_ignore(kw(Token::Eq, "`=` after `ground`"))
        .then(drive)
        .map(|((name, target), drive)| StatementKind::Drive {
            kind: crate::ast::DriveKind::Motion,
            name,
            target,
            drive,
        });

    let initial = just(Token::Initial)
        .ignore_then(node_ref("the mass or inertia after `initial`"))
        .then_ignore(kw(Token::Eq, "`=` after the name"))
        .then(value.clone().labelled("a displacement after `=`"))
        .then(
            just(Token::Comma)
                .ignore_then(value.clone().labelled("a velocity after `,`"))
                .or_not(),
        )
        .map(
            |((target, displacement), velocity)| StatementKind::Initial {
                target,
                displacement,
                velocity,
            },
        );

    let gravity = just(Token::Gravity)
        .ignore_then(kw(Token::Eq, "`=` after `gravity`"))
        .ignore_then(value.labelled("a value after `=`"))
        .map(|value| StatementKind::Gravity { value });

    let require = just(Token::Require)
        .ignore_then(subject(expr.clone()))
        .then(comparison(expr))
        .map_with(|(subject, comparison), e| {
            StatementKind::Require(Requirement {
                subject,
                comparison,
                span: span(e.span()),
            })
        });

    choice((
        let_item.map(StatementKind::Let),
        mass,
        inertia,
        spring,
        damper,
        force,
        torque,
        motion,
        initial,
        gravity,
        require,
    ))
    .boxed()
}

/// `mode N` with N a bare positive integer.
fn mode_ref<'t, 's: 't>() -> P<'t, 's, ModeRef> {
    kw(Token::Mode, "`mode` and a mode number after `of`")
        .ignore_then(select! { Token::Number(s) => s }.labelled("a mode number after `mode`"))
        .validate(|text: &str, e, emitter| {
            let digits_only = text.chars().all(|c| c.is_ascii_digit() || c == '_');
            let cleaned: String = text.chars().filter(|c| *c != '_').collect();
            let index = if digits_only {
                cleaned.parse::<u32>().ok().filter(|n| *n >= 1)
            } else {
                None
            };
            match index {
                Some(index) => ModeRef {
                    index,
                    span: span(e.span()),
                },
                None => {
                    emitter.emit(Rich::custom(
                        e.span(),
                        format!("a mode number is a whole number from 1 up, found number `{text}`"),
                    ));
                    ModeRef {
                        index: 1,
                        span: span(e.span()),
                    }
                }
            }
        })
        .boxed()
}

fn subject<'t, 's: 't>(expr: P<'t, 's, Expr>) -> P<'t, 's, Subject> {
    let of_mode = just(Token::Of).ignore_then(mode_ref()).or_not();
    let damping = word("damping", "`damping`")
        .ignore_then(of_mode.clone())
        .map(|mode| Subject::Damping { mode });
    let frequency = word("frequency", "`frequency`")
        .ignore_then(of_mode.clone())
        .map(|mode| Subject::Frequency { mode });
    let regime = word("regime", "`regime`")
        .ignore_then(of_mode)
        .map(|mode| Subject::Regime { mode });
    let separation = word("separation", "`separation`")
        .ignore_then(word("from", "`from` after `separation`"))
        .ignore_then(ident("the name of a drive after `from`"))
        .map(|drive| Subject::Separation { drive });
    let transmissibility = word("transmissibility", "`transmissibility`")
        .ignore_then(kw(Token::Of, "`of` after `transmissibility`"))
        .ignore_then(ident("the name of a drive after `of`"))
        .then(
            word("to", "`to`")
                .ignore_then(node_ref("a mass or inertia after `to`"))
                .or_not(),
        )
        .map(|(drive, to)| Subject::Transmissibility { drive, to });
    let of_node = |w: &'static str, of_label: &'static str| {
        word(w, "")
            .ignore_then(kw(Token::Of, of_label))
            .ignore_then(node_ref("a mass or inertia after `of`"))
    };
    let amplitude =
        of_node("amplitude", "`of` after `amplitude`").map(|of| Subject::Amplitude { of });
    let settling = of_node("settling", "`of` after `settling`")
        .then(
            word("within", "`within`")
                .ignore_then(expr.labelled("a band after `within` (such as `2%`)"))
                .or_not(),
        )
        .map(|(of, within)| Subject::Settling { of, within });
    let overshoot =
        of_node("overshoot", "`of` after `overshoot`").map(|of| Subject::Overshoot { of });
    let sag = of_node("sag", "`of` after `sag`").map(|of| Subject::Sag { of });
    choice((
        damping,
        frequency,
        regime,
        separation,
        transmissibility,
        amplitude,
        settling,
        overshoot,
        sag,
    ))
    .labelled(
        "a requirement subject after `require` (`damping`, `frequency`, `regime`, \
         `separation`, `transmissibility`, `amplitude`, `settling`, `overshoot` or `sag`)",
    )
    .boxed()
}

fn comparison<'t, 's: 't>(expr: P<'t, 's, Expr>) -> P<'t, 's, Comparison> {
    let op = select! {
        Token::Lt => CmpOp::Lt,
        Token::Le => CmpOp::Le,
        Token::Gt => CmpOp::Gt,
        Token::Ge => CmpOp::Ge,
    };
    let compare = op
        .then(expr.clone().labelled("a limit after the comparison"))
        .map(|(op, rhs)| Comparison::Compare { op, rhs });
    let range = |lo_label: &'static str| {
        expr.clone()
            .labelled(lo_label)
            .then_ignore(kw(Token::DotDot, "`..` between the ends of the range"))
            .then(
                expr.clone()
                    .labelled("the upper end of the range after `..`"),
            )
    };
    let inside = just(Token::In)
        .ignore_then(range("the lower end of the range after `in`"))
        .map(|(lo, hi)| Comparison::In { lo, hi });
    let outside = just(Token::Outside)
        .ignore_then(range("the lower end of the range after `outside`"))
        .map(|(lo, hi)| Comparison::Outside { lo, hi });
    let regime_word = choice((
        word("undamped", "`undamped`").to(Regime::Undamped),
        word("underdamped", "`underdamped`").to(Regime::Underdamped),
        word("overdamped", "`overdamped`").to(Regime::Overdamped),
        word("critically", "`critically`")
            .ignore_then(word("damped", "`damped` after `critically`"))
            .to(Regime::CriticallyDamped),
    ))
    .map_with(|regime, e| (regime, span(e.span())))
    .labelled("a regime (`undamped`, `underdamped`, `critically damped` or `overdamped`)");
    let is = just(Token::Is)
        .ignore_then(just(Token::Not).or_not())
        .then(regime_word)
        .map(|(not, (regime, regime_span))| Comparison::Is {
            not: not.is_some(),
            regime,
            regime_span,
        });
    choice((compare, inside, outside, is))
        .labelled("a comparison (`<`, `<=`, `>`, `>=`, `in`, `outside` or `is`)")
        .boxed()
}
