//! Names in a file: every definition and every use, resolved the way the checker resolves them
//! (a system's own names first, then the file's top-level lets; order does not matter). Built
//! from the syntax tree alone, so navigation keeps working in a file with unit errors.

use std::collections::HashMap;

use sprung_syntax::Span;
use sprung_syntax::ast::{
    self, Comparison, Drive, DriveKind, ElementKind, Expr, ExprKind, Item, NodeKind, NodeRef,
    StatementKind, Subject, Value,
};

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum DefKind {
    System,
    Let,
    Mass,
    Inertia,
    Spring,
    Damper,
    Force,
    Torque,
    Motion,
}

impl DefKind {
    pub fn word(self) -> &'static str {
        match self {
            DefKind::System => "system",
            DefKind::Let => "let",
            DefKind::Mass => "mass",
            DefKind::Inertia => "inertia",
            DefKind::Spring => "spring",
            DefKind::Damper => "damper",
            DefKind::Force => "force",
            DefKind::Torque => "torque",
            DefKind::Motion => "motion",
        }
    }

    pub fn is_node(self) -> bool {
        matches!(self, DefKind::Mass | DefKind::Inertia)
    }

    pub fn is_drive(self) -> bool {
        matches!(self, DefKind::Force | DefKind::Torque | DefKind::Motion)
    }
}

#[derive(Clone, Debug)]
pub struct Def {
    pub name: String,
    pub name_span: Span,
    /// The whole item or statement.
    pub span: Span,
    pub kind: DefKind,
    /// The index of the system (in file order of `system` items) it belongs to; `None` for a
    /// top-level let or a system itself.
    pub system: Option<usize>,
    pub doc: Option<String>,
}

#[derive(Clone, Copy, Debug)]
pub struct Ref {
    pub span: Span,
    pub def: usize,
}

/// What is under a cursor.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Target {
    /// A definition's name (index into [`Index::defs`]).
    Def(usize),
    /// A use of a definition.
    Ref(usize),
}

#[derive(Clone, Debug, Default)]
pub struct Index {
    pub defs: Vec<Def>,
    /// Sorted by span start.
    pub refs: Vec<Ref>,
    /// The syntax systems, in file order, with the span of their name (to match model systems).
    pub systems: Vec<Span>,
}

impl Index {
    pub fn build(file: &ast::File) -> Index {
        let mut ix = Index::default();
        let mut globals: HashMap<String, usize> = HashMap::new();
        for item in &file.items {
            if let Item::Let(l) = item {
                let id = ix.push_def(&l.name, l.span, DefKind::Let, None, l.doc.as_ref());
                globals.entry(l.name.name.clone()).or_insert(id);
            }
        }
        for item in &file.items {
            match item {
                Item::Let(l) => {
                    let scope = Scope {
                        local: None,
                        globals: &globals,
                    };
                    ix.value(&scope, &l.value);
                }
                Item::System(sys) => ix.system(sys, &globals),
                Item::Use(_) => {}
            }
        }
        ix.refs.sort_by_key(|r| r.span.start);
        ix
    }

    fn push_def(
        &mut self,
        name: &ast::Ident,
        span: Span,
        kind: DefKind,
        system: Option<usize>,
        doc: Option<&ast::Doc>,
    ) -> usize {
        self.defs.push(Def {
            name: name.name.clone(),
            name_span: name.span,
            span,
            kind,
            system,
            doc: doc.map(|d| d.text.clone()),
        });
        self.defs.len() - 1
    }

    fn system(&mut self, sys: &ast::System, globals: &HashMap<String, usize>) {
        let si = self.systems.len();
        self.systems.push(sys.name.span);
        self.push_def(&sys.name, sys.span, DefKind::System, None, sys.doc.as_ref());
        let mut local: HashMap<String, usize> = HashMap::new();
        for st in &sys.statements {
            let (name, kind) = match &st.kind {
                StatementKind::Let(l) => (&l.name, DefKind::Let),
                StatementKind::Node { kind, name, .. } => (
                    name,
                    match kind {
                        NodeKind::Mass => DefKind::Mass,
                        NodeKind::Inertia => DefKind::Inertia,
                    },
                ),
                StatementKind::Element { kind, name, .. } => (
                    name,
                    match kind {
                        ElementKind::Spring => DefKind::Spring,
                        ElementKind::Damper => DefKind::Damper,
                    },
                ),
                StatementKind::Drive { kind, name, .. } => (
                    name,
                    match kind {
                        DriveKind::Force => DefKind::Force,
                        DriveKind::Torque => DefKind::Torque,
                        DriveKind::Motion => DefKind::Motion,
                    },
                ),
                _ => continue,
            };
            let doc = st.doc.as_ref().or(match &st.kind {
                StatementKind::Let(l) => l.doc.as_ref(),
                _ => None,
            });
            let id = self.push_def(name, st.span, kind, Some(si), doc);
            local.entry(name.name.clone()).or_insert(id);
        }
        let scope = Scope {
            local: Some(&local),
            globals,
        };
        for st in &sys.statements {
            match &st.kind {
                StatementKind::Let(l) => self.value(&scope, &l.value),
                StatementKind::Node { value, .. } | StatementKind::Gravity { value } => {
                    self.value(&scope, value)
                }
                StatementKind::Element { a, b, value, .. } => {
                    self.node(&scope, a);
                    self.node(&scope, b);
                    self.value(&scope, value);
                }
                StatementKind::Drive { target, drive, .. } => {
                    self.node(&scope, target);
                    match drive {
                        Drive::Harmonic {
                            amplitude,
                            frequency,
                        } => {
                            self.value(&scope, amplitude);
                            self.value(&scope, frequency);
                        }
                        Drive::Band {
                            amplitude,
                            from,
                            to,
                        } => {
                            self.value(&scope, amplitude);
                            self.expr(&scope, from);
                            self.expr(&scope, to);
                        }
                        Drive::Step(v) | Drive::Impulse(v) => self.value(&scope, v),
                    }
                }
                StatementKind::Initial {
                    target,
                    displacement,
                    velocity,
                } => {
                    self.node(&scope, target);
                    self.value(&scope, displacement);
                    if let Some(v) = velocity {
                        self.value(&scope, v);
                    }
                }
                StatementKind::Require(req) => {
                    match &req.subject {
                        Subject::Separation { drive } => self.ident(&scope, drive),
                        Subject::Transmissibility { drive, to } => {
                            self.ident(&scope, drive);
                            if let Some(to) = to {
                                self.node(&scope, to);
                            }
                        }
                        Subject::Amplitude { of }
                        | Subject::Overshoot { of }
                        | Subject::Sag { of } => self.node(&scope, of),
                        Subject::Settling { of, within } => {
                            self.node(&scope, of);
                            if let Some(w) = within {
                                self.expr(&scope, w);
                            }
                        }
                        Subject::Damping { .. }
                        | Subject::Frequency { .. }
                        | Subject::Regime { .. } => {}
                    }
                    match &req.comparison {
                        Comparison::Compare { rhs, .. } => self.expr(&scope, rhs),
                        Comparison::In { lo, hi } | Comparison::Outside { lo, hi } => {
                            self.expr(&scope, lo);
                            self.expr(&scope, hi);
                        }
                        Comparison::Is { .. } => {}
                    }
                }
            }
        }
    }

    fn value(&mut self, scope: &Scope<'_>, v: &Value) {
        self.expr(scope, &v.expr);
        if let Some(t) = &v.tolerance {
            self.expr(scope, t);
        }
    }

    fn node(&mut self, scope: &Scope<'_>, n: &NodeRef) {
        if let NodeRef::Name(id) = n {
            self.ident(scope, id);
        }
    }

    fn ident(&mut self, scope: &Scope<'_>, id: &ast::Ident) {
        if let Some(def) = scope.resolve(&id.name) {
            self.refs.push(Ref { span: id.span, def });
        }
    }

    fn expr(&mut self, scope: &Scope<'_>, e: &Expr) {
        // The parser bounds expression depth (MAX_EXPR_DEPTH), so an explicit stack is only
        // about not caring; it also keeps this walk cheap.
        let mut stack = vec![e];
        while let Some(e) = stack.pop() {
            match &e.kind {
                ExprKind::Name(id) => self.ident(scope, id),
                ExprKind::Neg(a) | ExprKind::Paren(a) => stack.push(a),
                ExprKind::Binary { lhs, rhs, .. } => {
                    stack.push(lhs);
                    stack.push(rhs);
                }
                ExprKind::Call { args, .. } => stack.extend(args.iter()),
                ExprKind::Number { .. } | ExprKind::Error => {}
            }
        }
    }

    /// The definition or use whose name covers `offset` (touching either end counts).
    pub fn at(&self, offset: usize) -> Option<Target> {
        if let Some(i) = self
            .refs
            .iter()
            .position(|r| r.span.start <= offset && offset <= r.span.end)
        {
            return Some(Target::Ref(i));
        }
        self.defs
            .iter()
            .position(|d| d.name_span.start <= offset && offset <= d.name_span.end)
            .map(Target::Def)
    }

    /// The definition a target names.
    pub fn def_of(&self, t: Target) -> usize {
        match t {
            Target::Def(d) => d,
            Target::Ref(r) => self.refs[r].def,
        }
    }

    /// Every use of a definition, in file order.
    pub fn uses(&self, def: usize) -> impl Iterator<Item = &Ref> {
        self.refs.iter().filter(move |r| r.def == def)
    }

    /// The system (index into [`Index::systems`]) whose span contains `offset`.
    pub fn system_at(&self, offset: usize) -> Option<usize> {
        self.defs
            .iter()
            .filter(|d| d.kind == DefKind::System && d.span.start <= offset && offset <= d.span.end)
            .filter_map(|d| self.systems.iter().position(|s| *s == d.name_span))
            .next()
    }

    /// The names visible inside a system (its own first, then top-level lets not shadowed).
    pub fn visible(&self, system: Option<usize>) -> Vec<&Def> {
        let mut out: Vec<&Def> = Vec::new();
        if let Some(s) = system {
            out.extend(self.defs.iter().filter(|d| d.system == Some(s)));
        }
        for d in self
            .defs
            .iter()
            .filter(|d| d.kind == DefKind::Let && d.system.is_none())
        {
            if !out.iter().any(|o| o.name == d.name) {
                out.push(d);
            }
        }
        out
    }
}

struct Scope<'a> {
    local: Option<&'a HashMap<String, usize>>,
    globals: &'a HashMap<String, usize>,
}

impl Scope<'_> {
    fn resolve(&self, name: &str) -> Option<usize> {
        self.local
            .and_then(|l| l.get(name))
            .or_else(|| self.globals.get(name))
            .copied()
    }
}
