//! The syntax tree. Every node carries its byte span. Trees may be incomplete: a statement that
//! did not parse is left out of its system and reported as a [`crate::ParseError`]; an expression
//! part that did not parse is an [`ExprKind::Error`], so the rest of the statement survives.

use crate::span::Span;

/// A whole `.sprung` file.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct File {
    pub items: Vec<Item>,
    /// Every comment in the file, in order, doc comments included.
    pub comments: Vec<Comment>,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Comment {
    pub span: Span,
    /// `##` doc comment rather than `#`.
    pub doc: bool,
    /// The text after the `#` or `##`, untrimmed.
    pub text: String,
}

/// Doc comment lines (`##`) directly above an item or statement, joined with newlines.
#[derive(Clone, Debug, PartialEq)]
pub struct Doc {
    pub text: String,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Ident {
    pub name: String,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct StrLit {
    /// The unescaped contents.
    pub value: String,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum Item {
    Let(Let),
    Use(Use),
    System(System),
}

impl Item {
    pub fn span(&self) -> Span {
        match self {
            Item::Let(l) => l.span,
            Item::Use(u) => u.span,
            Item::System(s) => s.span,
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub struct Let {
    pub name: Ident,
    pub value: Value,
    pub doc: Option<Doc>,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Use {
    pub path: StrLit,
    pub doc: Option<Doc>,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct System {
    pub name: Ident,
    pub title: Option<StrLit>,
    pub statements: Vec<Statement>,
    pub doc: Option<Doc>,
    /// From the `system` keyword to the closing brace (or to where the body was cut off).
    pub span: Span,
    /// The `{ ... }` body, when the opening brace was found.
    pub body_span: Option<Span>,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Statement {
    pub kind: StatementKind,
    pub doc: Option<Doc>,
    pub span: Span,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum NodeKind {
    /// `mass`: translational, kg.
    Mass,
    /// `inertia`: rotational, kg·m².
    Inertia,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum ElementKind {
    Spring,
    Damper,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum DriveKind {
    /// `force NAME on A`
    Force,
    /// `torque NAME on A`
    Torque,
    /// `motion NAME of ground`
    Motion,
}

#[derive(Clone, Debug, PartialEq)]
pub enum StatementKind {
    Let(Let),
    Node {
        kind: NodeKind,
        name: Ident,
        value: Value,
    },
    Element {
        kind: ElementKind,
        name: Ident,
        a: NodeRef,
        b: NodeRef,
        value: Value,
    },
    Drive {
        kind: DriveKind,
        name: Ident,
        target: NodeRef,
        drive: Drive,
    },
    Initial {
        target: NodeRef,
        displacement: Value,
        velocity: Option<Value>,
    },
    Gravity {
        value: Value,
    },
    Require(Requirement),
}

/// An end of an element or the target of a drive: a node of the system, or `ground`.
#[derive(Clone, Debug, PartialEq)]
pub enum NodeRef {
    Ground(Span),
    Name(Ident),
}

impl NodeRef {
    pub fn span(&self) -> Span {
        match self {
            NodeRef::Ground(s) => *s,
            NodeRef::Name(i) => i.span,
        }
    }
}

/// `EXPR [± EXPR]`
#[derive(Clone, Debug, PartialEq)]
pub struct Value {
    pub expr: Expr,
    pub tolerance: Option<Expr>,
    pub span: Span,
}

impl File {
    /// Every top-level expression of the file: values, tolerances, drive parts, limits.
    pub fn top_exprs(&self) -> Vec<&Expr> {
        let mut out = Vec::new();
        for item in &self.items {
            match item {
                Item::Let(l) => l.value.push_exprs(&mut out),
                Item::System(s) => {
                    for st in &s.statements {
                        st.kind.push_exprs(&mut out);
                    }
                }
                Item::Use(_) => {}
            }
        }
        out
    }
}

impl Value {
    /// Pushes the value's expression and its tolerance's onto `out`.
    pub fn push_exprs<'a>(&'a self, out: &mut Vec<&'a Expr>) {
        out.push(&self.expr);
        out.extend(self.tolerance.as_ref());
    }
}

impl StatementKind {
    /// Pushes the top-level expressions of the statement (values with their tolerances, drive
    /// parts, requirement limits) onto `out`, in source order.
    pub fn push_exprs<'a>(&'a self, out: &mut Vec<&'a Expr>) {
        match self {
            StatementKind::Let(l) => l.value.push_exprs(out),
            StatementKind::Node { value, .. }
            | StatementKind::Element { value, .. }
            | StatementKind::Gravity { value } => value.push_exprs(out),
            StatementKind::Drive { drive, .. } => match drive {
                Drive::Harmonic {
                    amplitude,
                    frequency,
                } => {
                    amplitude.push_exprs(out);
                    frequency.push_exprs(out);
                }
                Drive::Band {
                    amplitude,
                    from,
                    to,
                } => {
                    amplitude.push_exprs(out);
                    out.push(from);
                    out.push(to);
                }
                Drive::Step(v) | Drive::Impulse(v) => v.push_exprs(out),
            },
            StatementKind::Initial {
                displacement,
                velocity,
                ..
            } => {
                displacement.push_exprs(out);
                if let Some(v) = velocity {
                    v.push_exprs(out);
                }
            }
            StatementKind::Require(r) => {
                if let Subject::Settling {
                    within: Some(w), ..
                } = &r.subject
                {
                    out.push(w);
                }
                match &r.comparison {
                    Comparison::Compare { rhs, .. } => out.push(rhs),
                    Comparison::In { lo, hi } | Comparison::Outside { lo, hi } => {
                        out.push(lo);
                        out.push(hi);
                    }
                    Comparison::Is { .. } => {}
                }
            }
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum Drive {
    /// `VALUE at VALUE`
    Harmonic { amplitude: Value, frequency: Value },
    /// `VALUE at EXPR .. EXPR`: a band of running speeds.
    Band {
        amplitude: Value,
        from: Expr,
        to: Expr,
    },
    /// `step VALUE`
    Step(Value),
    /// `impulse VALUE`
    Impulse(Value),
}

#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
    pub span: Span,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinaryOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
}

#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    /// A number literal with its optional unit and `%`.
    Number {
        value: f64,
        text: String,
        unit: Option<UnitExpr>,
        percent: bool,
    },
    Name(Ident),
    Neg(Box<Expr>),
    Binary {
        op: BinaryOp,
        lhs: Box<Expr>,
        rhs: Box<Expr>,
    },
    Call {
        func: Ident,
        args: Vec<Expr>,
    },
    Paren(Box<Expr>),
    /// A part that did not parse; its error is already reported.
    Error,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum UnitOp {
    Mul,
    Div,
}

/// A unit written tight after a number: `N*s/m`, `kg*m^2`, `s^-1`.
#[derive(Clone, Debug, PartialEq)]
pub struct UnitExpr {
    pub span: Span,
    /// The first term's `op` is always `Mul`.
    pub terms: Vec<UnitTerm>,
}

#[derive(Clone, Debug, PartialEq)]
pub struct UnitTerm {
    pub op: UnitOp,
    pub atom: String,
    pub atom_span: Span,
    pub exponent: i32,
    pub exponent_span: Option<Span>,
}

impl UnitExpr {
    /// The unit as the formatter writes it (`*` for products).
    pub fn text(&self) -> String {
        let mut out = String::new();
        for (i, term) in self.terms.iter().enumerate() {
            if i > 0 {
                out.push(match term.op {
                    UnitOp::Mul => '*',
                    UnitOp::Div => '/',
                });
            }
            out.push_str(&term.atom);
            if term.exponent != 1 {
                out.push('^');
                out.push_str(&term.exponent.to_string());
            }
        }
        out
    }
}

#[derive(Clone, Debug, PartialEq)]
pub struct Requirement {
    pub subject: Subject,
    pub comparison: Comparison,
    pub span: Span,
}

/// `mode N`: a bare positive integer.
#[derive(Clone, Debug, PartialEq)]
pub struct ModeRef {
    pub index: u32,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum Subject {
    Damping { mode: Option<ModeRef> },
    Frequency { mode: Option<ModeRef> },
    Regime { mode: Option<ModeRef> },
    Separation { drive: Ident },
    Transmissibility { drive: Ident, to: Option<NodeRef> },
    Amplitude { of: NodeRef },
    Settling { of: NodeRef, within: Option<Expr> },
    Overshoot { of: NodeRef },
    Sag { of: NodeRef },
}

impl Subject {
    /// The subject word as written.
    pub fn word(&self) -> &'static str {
        match self {
            Subject::Damping { .. } => "damping",
            Subject::Frequency { .. } => "frequency",
            Subject::Regime { .. } => "regime",
            Subject::Separation { .. } => "separation",
            Subject::Transmissibility { .. } => "transmissibility",
            Subject::Amplitude { .. } => "amplitude",
            Subject::Settling { .. } => "settling",
            Subject::Overshoot { .. } => "overshoot",
            Subject::Sag { .. } => "sag",
        }
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CmpOp {
    Lt,
    Le,
    Gt,
    Ge,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Regime {
    Undamped,
    Underdamped,
    CriticallyDamped,
    Overdamped,
}

impl Regime {
    pub fn words(self) -> &'static str {
        match self {
            Regime::Undamped => "undamped",
            Regime::Underdamped => "underdamped",
            Regime::CriticallyDamped => "critically damped",
            Regime::Overdamped => "overdamped",
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum Comparison {
    Compare {
        op: CmpOp,
        rhs: Expr,
    },
    In {
        lo: Expr,
        hi: Expr,
    },
    Outside {
        lo: Expr,
        hi: Expr,
    },
    Is {
        not: bool,
        regime: Regime,
        regime_span: Span,
    },
}
