//! The checker: syntax tree in, unit-checked model in SI plus diagnostics out.
//!
//! Staged cheapest first: parse errors, then names (order-independent, cycles reported whole),
//! then units and dimensions, then element and topology checks, then model warnings. A bad
//! statement costs only itself: everything else is still resolved and checked.

mod expr;
mod resolve;

use std::collections::HashMap;

use sprung_syntax::ast::{self, ElementKind, ExprKind, NodeKind, NodeRef, StatementKind, Subject};
use sprung_syntax::{Parse, ParseErrorKind, Span, parse};

use crate::diagnostics::{Code, Diagnostic};
use crate::dim::Dim;
use crate::formula::{Formulas, Node};
use crate::model::{
    Dof, DofKind, Drive, DriveForm, Element, End, GlobalLet, Initial, LetValue, Limit, Model,
    MotionKind, Param, Quantity, Requirement, SystemModel,
};
pub use expr::FUNCTIONS;
use expr::{Compiler, Names, Resolved};

/// Files larger than this are refused before lexing.
pub const MAX_FILE_BYTES: usize = 8 * 1024 * 1024;

/// The result of checking one file's text.
#[derive(Debug)]
pub struct Checked {
    pub parse: Parse,
    pub model: Model,
    /// Parse, name, unit and model diagnostics, in source order.
    pub diagnostics: Vec<Diagnostic>,
}

impl Checked {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.iter().any(Diagnostic::is_error)
    }
}

/// Parses and checks `text`.
pub fn check(text: &str) -> Checked {
    if text.len() > MAX_FILE_BYTES {
        let d = Diagnostic::new(
            Code::FileTooLarge,
            Span::at(0),
            format!(
                "the file is {} bytes; the limit is {MAX_FILE_BYTES} bytes",
                text.len()
            ),
        );
        return Checked {
            parse: Parse::default(),
            model: Model::default(),
            diagnostics: vec![d],
        };
    }
    let parse = parse(text);
    let mut diagnostics: Vec<Diagnostic> = parse.errors.iter().map(parse_diagnostic).collect();
    let model = Checker {
        text,
        parse_errors: parse.errors.iter().map(|e| e.span).collect(),
        formulas: Formulas::default(),
        params: Vec::new(),
        diags: &mut diagnostics,
    }
    .file(&parse.file);
    diagnostics.sort_by_key(|d| (d.span.start, d.span.end));
    Checked {
        parse,
        model,
        diagnostics,
    }
}

fn parse_diagnostic(e: &sprung_syntax::ParseError) -> Diagnostic {
    let code = match e.kind {
        ParseErrorKind::Lex => Code::Lex,
        ParseErrorKind::Syntax => Code::Syntax,
        ParseErrorKind::UnclosedBlock => Code::UnclosedSystem,
        ParseErrorKind::TooDeep => Code::TooDeep,
    };
    let d = Diagnostic::new(code, e.span, e.message.clone());
    match &e.help {
        Some(h) => d.with_help(h.clone()),
        None => d,
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum What {
    Let,
    Mass,
    Inertia,
    Spring,
    Damper,
    Drive,
}

impl What {
    fn noun(self) -> &'static str {
        match self {
            What::Let => "a `let` value",
            What::Mass => "a mass",
            What::Inertia => "an inertia",
            What::Spring => "a spring",
            What::Damper => "a damper",
            What::Drive => "a drive",
        }
    }
}

#[derive(Clone, Copy, Debug)]
enum State {
    Pending,
    Done(Quantity),
    Poisoned,
}

struct Def<'a> {
    name: &'a str,
    name_span: Span,
    what: What,
    value: Option<&'a ast::Value>,
    state: State,
}

fn resolve_in(defs: &[Def<'_>], map: &HashMap<&str, usize>, name: &str) -> Option<Resolved> {
    let def = &defs[*map.get(name)?];
    Some(match (def.what, def.state) {
        (What::Drive, _) => Resolved::NotAValue("a drive"),
        (_, State::Done(q)) => Resolved::Value(q),
        (_, State::Poisoned | State::Pending) => Resolved::Poisoned,
    })
}

struct Scope<'s, 'a> {
    local: Option<(&'s [Def<'a>], &'s HashMap<&'a str, usize>)>,
    global: (&'s [Def<'a>], &'s HashMap<&'a str, usize>),
}

impl Names for Scope<'_, '_> {
    fn resolve(&self, name: &str) -> Resolved {
        if let Some((defs, map)) = self.local
            && let Some(r) = resolve_in(defs, map, name)
        {
            return r;
        }
        resolve_in(self.global.0, self.global.1, name).unwrap_or(Resolved::Unknown)
    }

    fn candidates(&self) -> Vec<&str> {
        let mut out: Vec<&str> = self.global.0.iter().map(|d| d.name).collect();
        if let Some((defs, _)) = self.local {
            out.extend(
                defs.iter()
                    .filter(|d| d.what != What::Drive)
                    .map(|d| d.name),
            );
        }
        out
    }
}

/// Names used by an expression that are defined in `map`.
fn collect_deps(e: &ast::Expr, map: &HashMap<&str, usize>, out: &mut Vec<usize>) {
    match &e.kind {
        ExprKind::Name(id) => {
            if let Some(&i) = map.get(id.name.as_str()) {
                out.push(i);
            }
        }
        ExprKind::Neg(x) | ExprKind::Paren(x) => collect_deps(x, map, out),
        ExprKind::Binary { lhs, rhs, .. } => {
            collect_deps(lhs, map, out);
            collect_deps(rhs, map, out);
        }
        ExprKind::Call { args, .. } => args.iter().for_each(|a| collect_deps(a, map, out)),
        ExprKind::Number { .. } | ExprKind::Error => {}
    }
}

fn value_deps(v: &ast::Value, map: &HashMap<&str, usize>) -> Vec<usize> {
    let mut out = Vec::new();
    collect_deps(&v.expr, map, &mut out);
    if let Some(t) = &v.tolerance {
        collect_deps(t, map, &mut out);
    }
    out.sort_unstable();
    out.dedup();
    out
}

fn list_names(names: &[&str]) -> String {
    let quoted: Vec<String> = names.iter().map(|n| format!("`{n}`")).collect();
    match quoted.len() {
        0 => String::new(),
        1 => quoted[0].clone(),
        n => format!("{} and {}", quoted[..n - 1].join(", "), quoted[n - 1]),
    }
}

struct Checker<'t, 'd> {
    text: &'t str,
    /// Where the parser dropped text: a system with a dropped statement gets no model
    /// warnings, which would only describe the hole.
    parse_errors: Vec<Span>,
    formulas: Formulas,
    params: Vec<Param>,
    diags: &'d mut Vec<Diagnostic>,
}

impl<'t> Checker<'t, '_> {
    fn compiler(&mut self) -> Compiler<'_> {
        Compiler {
            formulas: &mut self.formulas,
            params: &mut self.params,
            diags: self.diags,
        }
    }

    fn error(&mut self, d: Diagnostic) {
        self.diags.push(d);
    }

    fn placeholder(&mut self, dim: Dim) -> Quantity {
        Quantity {
            formula: self.formulas.push(Node::Const(f64::NAN)),
            dim,
            nominal: f64::NAN,
        }
    }

    fn file(mut self, file: &ast::File) -> Model {
        // Top-level lets: one scope for the whole file.
        let mut globals: Vec<Def<'_>> = Vec::new();
        let mut global_map: HashMap<&str, usize> = HashMap::new();
        for item in &file.items {
            match item {
                ast::Item::Let(l) => {
                    self.define(
                        &mut globals,
                        &mut global_map,
                        &l.name,
                        What::Let,
                        Some(&l.value),
                    );
                }
                ast::Item::Use(u) => self.error(Diagnostic::new(
                    Code::UnusedUse,
                    u.span,
                    format!(
                        "`use \"{}\"` is not supported yet; its names are not imported",
                        u.path.value
                    ),
                )),
                ast::Item::System(_) => {}
            }
        }
        self.resolve_defs(&mut globals, &global_map, None);

        let mut systems = Vec::new();
        let mut system_names: HashMap<&str, Span> = HashMap::new();
        let mut any_system = false;
        for item in &file.items {
            if let ast::Item::System(sys) = item {
                any_system = true;
                if let Some(first) = system_names.insert(sys.name.name.as_str(), sys.name.span) {
                    self.error(
                        Diagnostic::new(
                            Code::DuplicateSystem,
                            sys.name.span,
                            format!(
                                "a system named `{}` is already defined in this file",
                                sys.name.name
                            ),
                        )
                        .with_label(first, "first defined here"),
                    );
                }
                systems.push(self.system(sys, &globals, &global_map));
            }
        }
        if !any_system && !self.diags.iter().any(Diagnostic::is_error) {
            self.error(
                Diagnostic::new(
                    Code::EmptyFile,
                    Span::at(0),
                    "this file defines no system, so there is nothing to analyze",
                )
                .with_help("add `system NAME { mass ... }`"),
            );
        }
        let globals = self.global_lets(file, &globals, &systems);
        Model {
            formulas: self.formulas,
            params: self.params,
            globals,
            systems,
        }
    }

    /// The top-level lets that checked, with their own tolerance and the systems that use them.
    fn global_lets(
        &self,
        file: &ast::File,
        defs: &[Def<'_>],
        systems: &[SystemModel],
    ) -> Vec<GlobalLet> {
        let uses: Vec<Vec<bool>> = systems
            .iter()
            .map(|sm| {
                let mut used = vec![false; self.formulas.len()];
                for id in self.formulas.closure(&system_formulas(sm)) {
                    used[id.index()] = true;
                }
                used
            })
            .collect();
        let mut out = Vec::new();
        for item in &file.items {
            let ast::Item::Let(l) = item else { continue };
            // A duplicate name has no def of its own; the first definition keeps it.
            let Some(def) = defs.iter().find(|d| d.name_span == l.name.span) else {
                continue;
            };
            let State::Done(value) = def.state else {
                continue;
            };
            let param = self
                .params
                .iter()
                .position(|p| p.name == l.name.name && l.span.contains(p.span.start));
            let used_by = (0..systems.len())
                .filter(|&s| uses[s].get(value.formula.index()) == Some(&true))
                .collect();
            out.push(GlobalLet {
                name: l.name.name.clone(),
                name_span: l.name.span,
                span: l.span,
                value,
                param,
                used_by,
                doc: l.doc.as_ref().map(|d| d.text.clone()),
            });
        }
        out
    }

    fn define<'a>(
        &mut self,
        defs: &mut Vec<Def<'a>>,
        map: &mut HashMap<&'a str, usize>,
        name: &'a ast::Ident,
        what: What,
        value: Option<&'a ast::Value>,
    ) -> Option<usize> {
        if let Some(&first) = map.get(name.name.as_str()) {
            let prev = &defs[first];
            self.error(
                Diagnostic::new(
                    Code::DuplicateName,
                    name.span,
                    format!(
                        "`{}` is already defined in this scope, as {}",
                        name.name,
                        prev.what.noun()
                    ),
                )
                .with_label(prev.name_span, "first defined here"),
            );
            return None;
        }
        map.insert(name.name.as_str(), defs.len());
        defs.push(Def {
            name: &name.name,
            name_span: name.span,
            what,
            value,
            state: State::Pending,
        });
        Some(defs.len() - 1)
    }

    /// Orders `defs` by dependency, reports cycles, and compiles each value.
    fn resolve_defs<'a>(
        &mut self,
        defs: &mut [Def<'a>],
        map: &HashMap<&'a str, usize>,
        global: Option<(&[Def<'a>], &HashMap<&'a str, usize>)>,
    ) {
        let deps: Vec<Vec<usize>> = defs
            .iter()
            .map(|d| d.value.map_or(Vec::new(), |v| value_deps(v, map)))
            .collect();
        let order = resolve::order(&deps);
        for cycle in &order.cycles {
            let names: Vec<&str> = cycle.iter().map(|&i| defs[i].name).collect();
            let first = &defs[cycle[0]];
            let message = if cycle.len() == 1 {
                format!("`{}` is defined in terms of itself", first.name)
            } else {
                format!("{} depend on each other in a cycle", list_names(&names))
            };
            let mut d = Diagnostic::new(Code::Cycle, first.name_span, message)
                .with_help("give one of them a value that does not depend on the others");
            for &i in &cycle[1..] {
                d = d.with_label(
                    defs[i].name_span,
                    format!("`{}` is part of the cycle", defs[i].name),
                );
            }
            self.error(d);
            for &i in cycle {
                defs[i].state = State::Poisoned;
            }
        }
        for i in order.order {
            let Some(value) = defs[i].value else { continue };
            let name = defs[i].name;
            let q = {
                let scope = match global {
                    Some(g) => Scope {
                        local: Some((&*defs, map)),
                        global: g,
                    },
                    None => Scope {
                        local: None,
                        global: (&*defs, map),
                    },
                };
                self.compiler().value(value, name, &scope)
            };
            defs[i].state = match q {
                Some(q) => State::Done(q),
                None => State::Poisoned,
            };
        }
    }

    fn system(
        &mut self,
        sys: &ast::System,
        globals: &[Def<'_>],
        global_map: &HashMap<&str, usize>,
    ) -> SystemModel {
        let errors_before = self.diags.iter().filter(|d| d.is_error()).count();
        let mut defs: Vec<Def<'_>> = Vec::new();
        let mut map: HashMap<&str, usize> = HashMap::new();
        // Which def each statement defines.
        let mut def_of: Vec<Option<usize>> = Vec::with_capacity(sys.statements.len());
        for st in &sys.statements {
            let d = match &st.kind {
                StatementKind::Let(l) => {
                    self.define(&mut defs, &mut map, &l.name, What::Let, Some(&l.value))
                }
                StatementKind::Node { kind, name, value } => {
                    let what = if *kind == NodeKind::Mass {
                        What::Mass
                    } else {
                        What::Inertia
                    };
                    self.define(&mut defs, &mut map, name, what, Some(value))
                }
                StatementKind::Element {
                    kind, name, value, ..
                } => {
                    let what = if *kind == ElementKind::Spring {
                        What::Spring
                    } else {
                        What::Damper
                    };
                    self.define(&mut defs, &mut map, name, what, Some(value))
                }
                StatementKind::Drive { name, .. } => {
                    self.define(&mut defs, &mut map, name, What::Drive, None)
                }
                _ => None,
            };
            def_of.push(d);
        }
        self.resolve_defs(&mut defs, &map, Some((globals, global_map)));
        let mut failed = false;

        let value_of = |defs: &[Def<'_>], i: Option<usize>| match i.map(|i| defs[i].state) {
            Some(State::Done(q)) => Some(q),
            _ => None,
        };

        // Degrees of freedom, in statement order.
        let mut dofs: Vec<Dof> = Vec::new();
        let mut dof_index: HashMap<&str, usize> = HashMap::new();
        let mut lets = Vec::new();
        for (st, &di) in sys.statements.iter().zip(&def_of) {
            match &st.kind {
                StatementKind::Node { kind, name, value } => {
                    let (dof_kind, dim) = match kind {
                        NodeKind::Mass => (DofKind::Translational, Dim::MASS),
                        NodeKind::Inertia => (DofKind::Rotational, Dim::INERTIA),
                    };
                    let q = value_of(&defs, di);
                    let q = match q {
                        Some(q)
                            if self.expect_dim(q, &[dim], value.expr.span, kind_word(*kind)) =>
                        {
                            self.positive(q, value.span, kind_word(*kind), &name.name);
                            q
                        }
                        _ => {
                            failed = true;
                            self.placeholder(dim)
                        }
                    };
                    if di.is_some() {
                        dof_index.insert(name.name.as_str(), dofs.len());
                        dofs.push(Dof {
                            name: name.name.clone(),
                            name_span: name.span,
                            span: st.span,
                            kind: dof_kind,
                            value: q,
                            doc: st.doc.as_ref().map(|d| d.text.clone()),
                        });
                    }
                }
                StatementKind::Let(l) => match value_of(&defs, di) {
                    Some(q) => lets.push(LetValue {
                        name: l.name.name.clone(),
                        name_span: l.name.span,
                        span: st.span,
                        value: q,
                        doc: st.doc.as_ref().map(|d| d.text.clone()),
                    }),
                    None => failed |= di.is_some(),
                },
                _ => {}
            }
        }

        let mut sm = SystemModel {
            name: sys.name.name.clone(),
            name_span: sys.name.span,
            title: sys.title.as_ref().map(|t| t.value.clone()),
            span: sys.span,
            doc: sys.doc.as_ref().map(|d| d.text.clone()),
            lets,
            dofs,
            elements: Vec::new(),
            drives: Vec::new(),
            initials: Vec::new(),
            gravity: None,
            requirements: Vec::new(),
            params: Vec::new(),
            has_errors: false,
        };

        let mut gravity_span: Option<Span> = None;
        // Every element whose ends resolved, even if its value did not: the topology checks
        // need the whole graph, and are skipped when an end is broken (they would only cascade).
        let mut edges: Vec<(ElementKind, End, End)> = Vec::new();
        let mut topology_complete = !self
            .parse_errors
            .iter()
            .any(|e| sys.span.start <= e.start && e.start < sys.span.end.max(sys.span.start + 1));
        let mut initial_seen: HashMap<usize, Span> = HashMap::new();
        for (st, &di) in sys.statements.iter().zip(&def_of) {
            let scope = Scope {
                local: Some((&defs, &map)),
                global: (globals, global_map),
            };
            match &st.kind {
                StatementKind::Element {
                    kind,
                    name,
                    a,
                    b,
                    value,
                } => {
                    let ea = self.end(a, &sm, &dof_index);
                    let eb = self.end(b, &sm, &dof_index);
                    let (Some(ea), Some(eb)) = (ea, eb) else {
                        failed = true;
                        topology_complete = false;
                        continue;
                    };
                    if ea == End::Ground && eb == End::Ground {
                        self.error(Diagnostic::new(
                            Code::GroundToGround,
                            a.span().cover(b.span()),
                            format!(
                                "`{}` connects ground to ground, so it acts on nothing",
                                name.name
                            ),
                        ));
                        failed = true;
                        topology_complete = false;
                        continue;
                    }
                    if ea == eb {
                        self.error(Diagnostic::new(
                            Code::SelfLoop,
                            a.span().cover(b.span()),
                            format!(
                                "`{}` connects `{}` to itself, so it acts on nothing",
                                name.name,
                                node_name(a)
                            ),
                        ));
                        failed = true;
                        topology_complete = false;
                        continue;
                    }
                    let kinds: Vec<DofKind> = [ea, eb]
                        .iter()
                        .filter_map(|e| match e {
                            End::Dof(i) => Some(sm.dofs[*i].kind),
                            End::Ground => None,
                        })
                        .collect();
                    if kinds.len() == 2 && kinds[0] != kinds[1] {
                        self.error(
                            Diagnostic::new(
                                Code::MixedKinds,
                                a.span().cover(b.span()),
                                format!(
                                    "`{}` joins {} `{}` and {} `{}`: both ends must be of one kind",
                                    name.name,
                                    kind_noun(kinds[0]),
                                    node_name(a),
                                    kind_noun(kinds[1]),
                                    node_name(b)
                                ),
                            )
                            .with_help("connect masses to masses and inertias to inertias"),
                        );
                        failed = true;
                        topology_complete = false;
                        continue;
                    }
                    edges.push((*kind, ea, eb));
                    let rotational = kinds[0] == DofKind::Rotational;
                    let (dim, word) = match (kind, rotational) {
                        (ElementKind::Spring, false) => (Dim::STIFFNESS, "a translational spring"),
                        (ElementKind::Spring, true) => {
                            (Dim::ROTATIONAL_STIFFNESS, "a torsional spring")
                        }
                        (ElementKind::Damper, false) => (Dim::DAMPING, "a translational damper"),
                        (ElementKind::Damper, true) => {
                            (Dim::ROTATIONAL_DAMPING, "a torsional damper")
                        }
                    };
                    let Some(q) = value_of(&defs, di) else {
                        failed = true;
                        continue;
                    };
                    if !self.expect_dim_named(q, dim, value.expr.span, word, rotational) {
                        failed = true;
                        continue;
                    }
                    let what = if *kind == ElementKind::Spring {
                        "stiffness"
                    } else {
                        "damping coefficient"
                    };
                    self.positive(q, value.span, what, &name.name);
                    sm.elements.push(Element {
                        kind: *kind,
                        name: name.name.clone(),
                        name_span: name.span,
                        span: st.span,
                        a: ea,
                        b: eb,
                        rotational,
                        value: q,
                        doc: st.doc.as_ref().map(|d| d.text.clone()),
                    });
                }
                StatementKind::Drive {
                    kind,
                    name,
                    target,
                    drive,
                } => match self.drive(*kind, name, target, drive, st, &sm, &dof_index, &scope) {
                    Some(d) => sm.drives.push(d),
                    None => failed = true,
                },
                StatementKind::Initial {
                    target,
                    displacement,
                    velocity,
                } => {
                    let i = match self.end(target, &sm, &dof_index) {
                        Some(End::Dof(i)) => i,
                        Some(End::Ground) => {
                            self.error(Diagnostic::new(
                                Code::WrongTarget,
                                target.span(),
                                "ground cannot have an initial condition; name a mass or inertia",
                            ));
                            failed = true;
                            continue;
                        }
                        None => {
                            failed = true;
                            continue;
                        }
                    };
                    if let Some(first) = initial_seen.insert(i, st.span) {
                        self.error(
                            Diagnostic::new(
                                Code::DuplicateInitial,
                                st.span,
                                format!("`{}` already has an initial condition", sm.dofs[i].name),
                            )
                            .with_label(first, "first given here"),
                        );
                        failed = true;
                        continue;
                    }
                    let rot = sm.dofs[i].kind == DofKind::Rotational;
                    let owner = format!("initial {}", sm.dofs[i].name);
                    let (xd, vd) = if rot {
                        (
                            (Dim::NONE, "an angle (rad)", "rad"),
                            (Dim::FREQUENCY, "an angular velocity (rad/s)", "rad/s"),
                        )
                    } else {
                        (
                            (Dim::LENGTH, "a displacement (m)", "m"),
                            (Dim::VELOCITY, "a velocity (m/s)", "m/s"),
                        )
                    };
                    let x = self.compiler().value(displacement, &owner, &scope);
                    let x = x.filter(|q| {
                        self.expect_dim_as(*q, xd.0, displacement.expr.span, xd.1, xd.2)
                    });
                    let v = velocity.as_ref().map(|v| {
                        let q = self.compiler().value(v, &owner, &scope);
                        q.filter(|q| self.expect_dim_as(*q, vd.0, v.expr.span, vd.1, vd.2))
                    });
                    match (x, v) {
                        (Some(x), None) => sm.initials.push(Initial {
                            dof: i,
                            span: st.span,
                            displacement: x,
                            velocity: None,
                        }),
                        (Some(x), Some(Some(v))) => sm.initials.push(Initial {
                            dof: i,
                            span: st.span,
                            displacement: x,
                            velocity: Some(v),
                        }),
                        _ => failed = true,
                    }
                }
                StatementKind::Gravity { value } => {
                    if let Some(first) = gravity_span.replace(st.span) {
                        self.error(
                            Diagnostic::new(
                                Code::DuplicateGravity,
                                st.span,
                                "this system already states its gravity",
                            )
                            .with_label(first, "first given here"),
                        );
                        failed = true;
                        continue;
                    }
                    let q = self.compiler().value(value, "gravity", &scope);
                    match q.filter(|q| {
                        self.expect_dim_as(
                            *q,
                            Dim::ACCELERATION,
                            value.expr.span,
                            "an acceleration (m/s^2)",
                            "m/s^2",
                        )
                    }) {
                        Some(q) => sm.gravity = Some(q),
                        None => failed = true,
                    }
                }
                StatementKind::Require(_) | StatementKind::Let(_) | StatementKind::Node { .. } => {}
            }
        }
        // Requirements last: they may name drives and need gravity known.
        for st in &sys.statements {
            if let StatementKind::Require(req) = &st.kind {
                let scope = Scope {
                    local: Some((&defs, &map)),
                    global: (globals, global_map),
                };
                match self.requirement(req, &sm, &dof_index, &scope) {
                    Some(r) => sm.requirements.push(r),
                    None => failed = true,
                }
            }
        }

        if topology_complete {
            self.topology(&sm, &edges);
        }
        let roots: Vec<_> = sm
            .dofs
            .iter()
            .map(|d| d.value.formula)
            .chain(sm.elements.iter().map(|e| e.value.formula))
            .chain(sm.gravity.iter().map(|g| g.formula))
            .chain(sm.drives.iter().flat_map(|d| drive_formulas(&d.form)))
            .chain(sm.initials.iter().flat_map(|i| {
                std::iter::once(i.displacement.formula).chain(i.velocity.map(|v| v.formula))
            }))
            .collect();
        sm.params = self.formulas.params_of(&roots).into_iter().collect();
        let errors_after = self.diags.iter().filter(|d| d.is_error()).count();
        sm.has_errors = failed || errors_after > errors_before;
        sm
    }

    /// Resolves an element end or drive target.
    fn end(
        &mut self,
        r: &NodeRef,
        sm: &SystemModel,
        dof_index: &HashMap<&str, usize>,
    ) -> Option<End> {
        match r {
            NodeRef::Ground(_) => Some(End::Ground),
            NodeRef::Name(id) => {
                if let Some(&i) = dof_index.get(id.name.as_str()) {
                    return Some(End::Dof(i));
                }
                let mut d = Diagnostic::new(
                    Code::UnknownNode,
                    id.span,
                    format!(
                        "`{}` is not a mass or inertia of system `{}`",
                        id.name, sm.name
                    ),
                );
                let names = sm.dofs.iter().map(|d| d.name.as_str()).chain(["ground"]);
                if let Some(s) = crate::suggest::did_you_mean(&id.name, names) {
                    d = d.with_help(format!("did you mean `{s}`?"));
                } else if sm.dofs.is_empty() {
                    d = d.with_help(
                        "declare it first: `mass NAME = VALUE` or `inertia NAME = VALUE`",
                    );
                }
                self.error(d);
                None
            }
        }
    }

    #[allow(clippy::too_many_arguments)]
    fn drive(
        &mut self,
        kind: ast::DriveKind,
        name: &ast::Ident,
        target: &NodeRef,
        drive: &ast::Drive,
        st: &ast::Statement,
        sm: &SystemModel,
        dof_index: &HashMap<&str, usize>,
        scope: &dyn Names,
    ) -> Option<Drive> {
        use ast::DriveKind as K;
        let end = self.end(target, sm, dof_index)?;
        let target_dof = match (kind, end) {
            (K::Motion, End::Ground) => None,
            (K::Motion, End::Dof(_)) => {
                self.error(Diagnostic::new(
                    Code::WrongTarget,
                    target.span(),
                    "a `motion` is always of `ground`",
                ));
                return None;
            }
            (K::Force | K::Torque, End::Ground) => {
                self.error(
                    Diagnostic::new(
                        Code::WrongTarget,
                        target.span(),
                        format!(
                            "a `{}` acts on a mass or inertia, not on ground",
                            drive_word(kind)
                        ),
                    )
                    .with_help("to shake the ground, use `motion NAME of ground = ...`"),
                );
                return None;
            }
            (K::Force, End::Dof(i)) | (K::Torque, End::Dof(i)) => {
                let want = if kind == K::Force {
                    DofKind::Translational
                } else {
                    DofKind::Rotational
                };
                if sm.dofs[i].kind != want {
                    let (wrong, right) = if kind == K::Force {
                        ("an inertia", "use `torque` on an inertia")
                    } else {
                        ("a mass", "use `force` on a mass")
                    };
                    self.error(
                        Diagnostic::new(
                            Code::WrongTarget,
                            target.span(),
                            format!(
                                "a `{}` cannot act on `{}`, which is {wrong}",
                                drive_word(kind),
                                sm.dofs[i].name
                            ),
                        )
                        .with_help(right),
                    );
                    return None;
                }
                Some(i)
            }
        };
        let amp_owner = format!("{} amplitude", name.name);
        let impulse = matches!(drive, ast::Drive::Impulse(_));
        let amp_value = match drive {
            ast::Drive::Harmonic { amplitude, .. } | ast::Drive::Band { amplitude, .. } => {
                amplitude
            }
            ast::Drive::Step(v) | ast::Drive::Impulse(v) => v,
        };
        let amp = self.compiler().value(amp_value, &amp_owner, scope);
        let amp_span = amp_value.expr.span;
        let mut motion = None;
        let amp = match (kind, impulse) {
            (K::Force, false) => amp.filter(|q| self.expect_dim_as(*q, Dim::FORCE, amp_span, "a force (N)", "N")),
            (K::Force, true) => amp.filter(|q| self.expect_dim_as(*q, Dim::IMPULSE, amp_span, "an impulse (N*s)", "N*s")),
            (K::Torque, false) => amp.filter(|q| self.expect_dim_as(*q, Dim::TORQUE, amp_span, "a torque (N*m)", "N*m")),
            (K::Torque, true) => {
                amp.filter(|q| self.expect_dim_as(*q, Dim::ANGULAR_IMPULSE, amp_span, "an angular impulse (N*m*s)", "N*m*s"))
            }
            (K::Motion, true) => {
                self.error(
                    Diagnostic::new(Code::WrongQuantity, st.span, "a ground motion cannot be an impulse")
                        .with_help("use `step` for a sudden ground displacement, or an impulse `force` on a mass"),
                );
                None
            }
            (K::Motion, false) => amp.and_then(|q| {
                motion = match q.dim {
                    Dim::LENGTH => Some(MotionKind::Displacement),
                    Dim::VELOCITY => Some(MotionKind::Velocity),
                    Dim::ACCELERATION => Some(MotionKind::Acceleration),
                    Dim::NONE => Some(MotionKind::Rotation),
                    _ => None,
                };
                if motion.is_none() {
                    self.error(Diagnostic::new(
                        Code::WrongQuantity,
                        amp_span,
                        format!(
                            "expected a ground displacement (m), velocity (m/s), acceleration (m/s^2) or rotation (rad), found {}",
                            q.dim.describe()
                        ),
                    ));
                    return None;
                }
                Some(q)
            }),
        };
        let form = match drive {
            ast::Drive::Harmonic { frequency, .. } => {
                let f =
                    self.compiler()
                        .value(frequency, &format!("{} frequency", name.name), scope);
                let f = f.filter(|q| {
                    self.expect_dim_as(
                        *q,
                        Dim::FREQUENCY,
                        frequency.expr.span,
                        "a frequency (Hz, rpm or 1/s)",
                        "Hz",
                    )
                });
                if let Some(f) = f
                    && f.nominal <= 0.0
                {
                    self.error(Diagnostic::new(
                        Code::NonPositive,
                        frequency.span,
                        format!("the drive frequency of `{}` is {} Hz; a harmonic drive needs a positive frequency", name.name, f.nominal / std::f64::consts::TAU),
                    ));
                }
                DriveForm::Harmonic {
                    amplitude: amp?,
                    frequency: f?,
                }
            }
            ast::Drive::Band { from, to, .. } => {
                let lo = self.compiler().expr(from, scope);
                let hi = self.compiler().expr(to, scope);
                let lo = lo.filter(|q| {
                    self.expect_dim_as(
                        *q,
                        Dim::FREQUENCY,
                        from.span,
                        "a frequency (Hz, rpm or 1/s)",
                        "Hz",
                    )
                });
                let hi = hi.filter(|q| {
                    self.expect_dim_as(
                        *q,
                        Dim::FREQUENCY,
                        to.span,
                        "a frequency (Hz, rpm or 1/s)",
                        "Hz",
                    )
                });
                let (lo, hi) = (lo?, hi?);
                if !(lo.nominal > 0.0 && lo.nominal < hi.nominal) {
                    self.error(Diagnostic::new(
                        Code::EmptyBand,
                        from.span.cover(to.span),
                        format!(
                            "the band runs from {:.4} Hz to {:.4} Hz; it needs a positive lower end below the upper end",
                            lo.nominal / std::f64::consts::TAU,
                            hi.nominal / std::f64::consts::TAU
                        ),
                    ));
                    return None;
                }
                DriveForm::Band {
                    amplitude: amp?,
                    from: lo,
                    to: hi,
                }
            }
            ast::Drive::Step(_) => DriveForm::Step { amplitude: amp? },
            ast::Drive::Impulse(_) => DriveForm::Impulse { amplitude: amp? },
        };
        Some(Drive {
            kind,
            name: name.name.clone(),
            name_span: name.span,
            span: st.span,
            target: target_dof,
            motion,
            form,
            doc: st.doc.as_ref().map(|d| d.text.clone()),
        })
    }

    fn requirement(
        &mut self,
        req: &ast::Requirement,
        sm: &SystemModel,
        dof_index: &HashMap<&str, usize>,
        scope: &dyn Names,
    ) -> Option<Requirement> {
        let written =
            &self.text[req.span.start.min(self.text.len())..req.span.end.min(self.text.len())];
        let text = collapse(written.strip_prefix("require").unwrap_or(written));
        let mut mode = None;
        let mut drive = None;
        let mut dof = None;
        let mut within = None;
        let find_drive = |this: &mut Self, id: &ast::Ident| -> Option<usize> {
            match sm.drives.iter().position(|d| d.name == id.name) {
                Some(i) => Some(i),
                None => {
                    let mut d = Diagnostic::new(
                        Code::UnknownDrive,
                        id.span,
                        format!("`{}` is not a drive of system `{}`", id.name, sm.name),
                    );
                    if let Some(s) = crate::suggest::did_you_mean(
                        &id.name,
                        sm.drives.iter().map(|d| d.name.as_str()),
                    ) {
                        d = d.with_help(format!("did you mean `{s}`?"));
                    }
                    this.error(d);
                    None
                }
            }
        };
        let harmonic_only = |this: &mut Self, i: usize, word: &str, span: Span| -> bool {
            let ok = matches!(
                sm.drives[i].form,
                DriveForm::Harmonic { .. } | DriveForm::Band { .. }
            );
            if !ok {
                this.error(Diagnostic::new(
                    Code::RequirementForm,
                    span,
                    format!("`{word}` needs a harmonic drive (`... at FREQUENCY`), but `{}` is a step or impulse", sm.drives[i].name),
                ));
            }
            ok
        };
        let dof_of = |this: &mut Self, r: &NodeRef| -> Option<usize> {
            match this.end(r, sm, dof_index)? {
                End::Dof(i) => Some(i),
                End::Ground => {
                    this.error(Diagnostic::new(
                        Code::WrongTarget,
                        r.span(),
                        "name a mass or inertia here, not ground",
                    ));
                    None
                }
            }
        };
        let amount_dim = |i: usize| match sm.dofs[i].kind {
            DofKind::Translational => (Dim::LENGTH, "a length (m)"),
            DofKind::Rotational => (Dim::NONE, "an angle (rad)"),
        };
        let (dim, dim_word): (Option<Dim>, &str) = match &req.subject {
            Subject::Damping { mode: m }
            | Subject::Frequency { mode: m }
            | Subject::Regime { mode: m } => {
                if let Some(m) = m {
                    if m.index == 0 || m.index as usize > sm.dofs.len() {
                        self.error(Diagnostic::new(
                            Code::ModeOutOfRange,
                            m.span,
                            format!(
                                "system `{}` has {} mode{}; there is no mode {}",
                                sm.name,
                                sm.dofs.len(),
                                if sm.dofs.len() == 1 { "" } else { "s" },
                                m.index
                            ),
                        ));
                        return None;
                    }
                    mode = Some(m.index);
                }
                match req.subject {
                    Subject::Damping { .. } => {
                        (Some(Dim::NONE), "a damping ratio (a plain number or %)")
                    }
                    Subject::Frequency { .. } => {
                        (Some(Dim::FREQUENCY), "a frequency (Hz, rpm or 1/s)")
                    }
                    _ => (None, ""),
                }
            }
            Subject::Separation { drive: d } => {
                let i = find_drive(self, d)?;
                if !harmonic_only(self, i, "separation", d.span) {
                    return None;
                }
                drive = Some(i);
                (Some(Dim::NONE), "a ratio (a plain number or %)")
            }
            Subject::Transmissibility { drive: d, to } => {
                let i = find_drive(self, d)?;
                if !harmonic_only(self, i, "transmissibility", d.span) {
                    return None;
                }
                drive = Some(i);
                if let Some(to) = to {
                    dof = Some(dof_of(self, to)?);
                }
                (Some(Dim::NONE), "a ratio (a plain number or %)")
            }
            Subject::Amplitude { of } | Subject::Overshoot { of } => {
                let i = dof_of(self, of)?;
                dof = Some(i);
                if matches!(req.subject, Subject::Overshoot { .. }) {
                    (Some(Dim::NONE), "a ratio (a plain number or %)")
                } else {
                    let (d, w) = amount_dim(i);
                    (Some(d), w)
                }
            }
            Subject::Settling { of, within: w } => {
                dof = Some(dof_of(self, of)?);
                if let Some(w) = w {
                    let q = self.compiler().expr(w, scope)?;
                    if !self.expect_dim_as(q, Dim::NONE, w.span, "a percentage", "%") {
                        return None;
                    }
                    if !(q.nominal > 0.0 && q.nominal < 1.0) {
                        self.error(Diagnostic::new(
                            Code::RequirementForm,
                            w.span,
                            format!(
                                "a settling band must lie between 0% and 100%, found {}%",
                                q.nominal * 100.0
                            ),
                        ));
                        return None;
                    }
                    within = Some(q);
                }
                (Some(Dim::TIME), "a time (s)")
            }
            Subject::Sag { of } => {
                let i = dof_of(self, of)?;
                dof = Some(i);
                if sm.dofs[i].kind == DofKind::Rotational {
                    self.error(Diagnostic::new(
                        Code::RequirementForm,
                        of.span(),
                        format!(
                            "`{}` is an inertia; sag under gravity applies to masses",
                            sm.dofs[i].name
                        ),
                    ));
                    return None;
                }
                if sm.gravity.is_none() {
                    self.error(
                        Diagnostic::new(
                            Code::RequirementForm,
                            req.span,
                            format!("`sag` needs gravity, but system `{}` states none", sm.name),
                        )
                        .with_help("add `gravity = 1 gn` to the system"),
                    );
                    return None;
                }
                (Some(Dim::LENGTH), "a length (m)")
            }
        };
        let subject_word = req.subject.word();
        let limit = match (&req.comparison, dim) {
            (ast::Comparison::Is { not, regime, .. }, None) => Limit::Is {
                not: *not,
                regime: *regime,
            },
            (ast::Comparison::Is { regime_span, .. }, Some(_)) => {
                self.error(
                    Diagnostic::new(
                        Code::RequirementForm,
                        *regime_span,
                        format!("`{subject_word}` is a number; only `regime` compares with `is`"),
                    )
                    .with_help(format!("write `require regime is ...`, or compare `{subject_word}` with `<`, `>=`, `in` or `outside`")),
                );
                return None;
            }
            (_, None) => {
                self.error(
                    Diagnostic::new(
                        Code::RequirementForm,
                        req.span,
                        "a `regime` compares only with `is [not] REGIME`",
                    )
                    .with_help("for example `require regime is not underdamped`"),
                );
                return None;
            }
            (ast::Comparison::Compare { op, rhs }, Some(dim)) => {
                let q = self.limit(rhs, dim, dim_word, subject_word, scope)?;
                Limit::Compare { op: *op, rhs: q }
            }
            (ast::Comparison::In { lo, hi } | ast::Comparison::Outside { lo, hi }, Some(dim)) => {
                let l = self.limit(lo, dim, dim_word, subject_word, scope);
                let h = self.limit(hi, dim, dim_word, subject_word, scope);
                let (l, h) = (l?, h?);
                if l.nominal > h.nominal {
                    self.error(Diagnostic::new(
                        Code::RequirementForm,
                        lo.span.cover(hi.span),
                        "the range is reversed: write the lower bound first",
                    ));
                    return None;
                }
                if matches!(req.comparison, ast::Comparison::In { .. }) {
                    Limit::In { lo: l, hi: h }
                } else {
                    Limit::Outside { lo: l, hi: h }
                }
            }
        };
        Some(Requirement {
            span: req.span,
            text,
            subject: req.subject.clone(),
            mode,
            drive,
            dof,
            within,
            limit,
        })
    }

    fn limit(
        &mut self,
        e: &ast::Expr,
        dim: Dim,
        dim_word: &str,
        subject: &str,
        scope: &dyn Names,
    ) -> Option<Quantity> {
        let q = self.compiler().expr(e, scope)?;
        if q.dim != dim {
            let mut d = Diagnostic::new(
                Code::RequirementUnit,
                e.span,
                format!(
                    "`{subject}` is compared with {dim_word}, but this limit is {}",
                    q.dim.describe()
                ),
            );
            if let Some(unit) = si_spelling(dim) {
                d = d.with_expected_unit(dim, unit);
            }
            self.error(d);
            return None;
        }
        Some(q)
    }

    /// Model warnings from the connectivity of springs and dampers.
    fn topology(&mut self, sm: &SystemModel, edges: &[(ElementKind, End, End)]) {
        if sm.dofs.is_empty() {
            self.error(Diagnostic::new(
                Code::NoMasses,
                sm.name_span,
                format!(
                    "system `{}` has no mass or inertia, so it has nothing to analyze",
                    sm.name
                ),
            ));
            return;
        }
        let n = sm.dofs.len();
        let mut has_spring = vec![false; n];
        // Union-find over springs; index n is ground.
        let mut parent: Vec<usize> = (0..=n).collect();
        fn find(p: &mut [usize], mut x: usize) -> usize {
            while p[x] != x {
                p[x] = p[p[x]];
                x = p[x];
            }
            x
        }
        let idx = |e: End| match e {
            End::Ground => n,
            End::Dof(i) => i,
        };
        let mut touches_ground = false;
        for &(kind, a, b) in edges {
            touches_ground |= a == End::Ground || b == End::Ground;
            if kind != ElementKind::Spring {
                continue;
            }
            for e in [a, b] {
                if let End::Dof(i) = e {
                    has_spring[i] = true;
                }
            }
            let (ra, rb) = (find(&mut parent, idx(a)), find(&mut parent, idx(b)));
            parent[ra] = rb;
        }
        for (i, dof) in sm.dofs.iter().enumerate() {
            if !has_spring[i] {
                let noun = if dof.kind == DofKind::Translational {
                    "mass"
                } else {
                    "inertia"
                };
                self.error(
                    Diagnostic::new(
                        Code::MassWithoutSpring,
                        dof.name_span,
                        format!(
                            "{noun} `{}` has no spring attached, so nothing holds it in place",
                            dof.name
                        ),
                    )
                    .with_help(format!(
                        "connect it: `spring NAME between {} and ground = ...`",
                        dof.name
                    )),
                );
            }
        }
        if !touches_ground {
            self.error(Diagnostic::new(
                Code::NoGround,
                sm.name_span,
                format!("no spring or damper of system `{}` reaches ground, so the whole system floats freely", sm.name),
            ));
            return;
        }
        let ground = find(&mut parent, n);
        let mut groups: HashMap<usize, Vec<usize>> = HashMap::new();
        for (i, &sprung) in has_spring.iter().enumerate() {
            let r = find(&mut parent, i);
            if r != ground && sprung {
                groups.entry(r).or_default().push(i);
            }
        }
        let mut groups: Vec<Vec<usize>> = groups.into_values().collect();
        groups.sort();
        for g in groups {
            let names: Vec<&str> = g.iter().map(|&i| sm.dofs[i].name.as_str()).collect();
            let first = &sm.dofs[g[0]];
            self.error(Diagnostic::new(
                Code::NotGrounded,
                first.name_span,
                format!(
                    "{} {} no spring path to ground, so {} can move freely",
                    list_names(&names),
                    if g.len() == 1 { "has" } else { "have" },
                    if g.len() == 1 { "it" } else { "they" }
                ),
            ));
        }
    }

    fn expect_dim(&mut self, q: Quantity, dims: &[Dim], span: Span, what: &str) -> bool {
        if dims.contains(&q.dim) {
            return true;
        }
        let mut d = Diagnostic::new(
            Code::WrongQuantity,
            span,
            format!(
                "expected {} for {what}, found {}",
                dims[0].describe(),
                q.dim.describe()
            ),
        );
        if let Some(unit) = si_spelling(dims[0]) {
            d = d.with_expected_unit(dims[0], unit);
        }
        self.error(d);
        false
    }

    /// `unit` is the SI spelling to suggest for the place (carried as data on the diagnostic).
    fn expect_dim_as(
        &mut self,
        q: Quantity,
        dim: Dim,
        span: Span,
        expected: &str,
        unit: &'static str,
    ) -> bool {
        if q.dim == dim {
            return true;
        }
        let mut d = Diagnostic::new(
            Code::WrongQuantity,
            span,
            format!("expected {expected}, found {}", q.dim.describe()),
        );
        if !dim.is_none() {
            d = d.with_expected_unit(dim, unit);
        }
        self.error(d);
        false
    }

    fn expect_dim_named(
        &mut self,
        q: Quantity,
        dim: Dim,
        span: Span,
        word: &str,
        rotational: bool,
    ) -> bool {
        if q.dim == dim {
            return true;
        }
        let unit = match (dim, rotational) {
            (Dim::STIFFNESS, _) => "N/m",
            (Dim::ROTATIONAL_STIFFNESS, _) => "N*m/rad",
            (Dim::DAMPING, _) => "N*s/m",
            _ => "N*m*s/rad",
        };
        let kind = if dim == Dim::STIFFNESS || dim == Dim::ROTATIONAL_STIFFNESS {
            "a stiffness"
        } else {
            "a damping coefficient"
        };
        let mut d = Diagnostic::new(
            Code::WrongQuantity,
            span,
            format!(
                "expected {kind} ({unit}) for {word}, found {}",
                q.dim.describe()
            ),
        )
        .with_expected_unit(dim, unit);
        let other_kind = if rotational {
            Dim::new(dim.m, dim.l - 2, dim.t)
        } else {
            Dim::new(dim.m, dim.l + 2, dim.t)
        };
        if q.dim == other_kind {
            let hint = if rotational {
                "its ends are inertias, so it needs a torsional value"
            } else {
                "its ends are masses, so it needs a translational value"
            };
            d = d.with_help(hint);
        }
        self.error(d);
        false
    }

    fn positive(&mut self, q: Quantity, span: Span, what: &str, name: &str) {
        if q.nominal > 0.0 {
            return;
        }
        let consequence = if q.nominal < 0.0 && matches!(what, "stiffness" | "damping coefficient")
        {
            "; a negative value makes the model unstable"
        } else {
            ""
        };
        self.error(Diagnostic::new(
            Code::NonPositive,
            span,
            format!(
                "the {what} of `{name}` is {}{consequence}; only a positive value makes sense",
                q.nominal
            ),
        ));
    }
}

/// The SI unit to suggest where a value of `dim` is expected and the place says no more
/// (frequencies in Hz); `None` for a plain number.
fn si_spelling(dim: Dim) -> Option<&'static str> {
    Some(match dim {
        Dim::MASS => "kg",
        Dim::INERTIA => "kg*m^2",
        Dim::LENGTH => "m",
        Dim::TIME => "s",
        Dim::FREQUENCY => "Hz",
        _ => return None,
    })
}

fn kind_word(k: NodeKind) -> &'static str {
    match k {
        NodeKind::Mass => "a mass",
        NodeKind::Inertia => "an inertia",
    }
}

fn kind_noun(k: DofKind) -> &'static str {
    match k {
        DofKind::Translational => "the mass",
        DofKind::Rotational => "the inertia",
    }
}

fn node_name(r: &NodeRef) -> &str {
    match r {
        NodeRef::Ground(_) => "ground",
        NodeRef::Name(id) => &id.name,
    }
}

fn drive_word(k: ast::DriveKind) -> &'static str {
    match k {
        ast::DriveKind::Force => "force",
        ast::DriveKind::Torque => "torque",
        ast::DriveKind::Motion => "motion",
    }
}

fn drive_formulas(f: &DriveForm) -> Vec<crate::formula::FormulaId> {
    match f {
        DriveForm::Harmonic {
            amplitude,
            frequency,
        } => vec![amplitude.formula, frequency.formula],
        DriveForm::Band {
            amplitude,
            from,
            to,
        } => vec![amplitude.formula, from.formula, to.formula],
        DriveForm::Step { amplitude } | DriveForm::Impulse { amplitude } => vec![amplitude.formula],
    }
}

/// Every value a system holds: the roots of what it depends on.
fn system_formulas(sm: &SystemModel) -> Vec<crate::formula::FormulaId> {
    let mut out: Vec<_> = sm.lets.iter().map(|l| l.value.formula).collect();
    out.extend(sm.dofs.iter().map(|d| d.value.formula));
    out.extend(sm.elements.iter().map(|e| e.value.formula));
    out.extend(sm.drives.iter().flat_map(|d| drive_formulas(&d.form)));
    for i in &sm.initials {
        out.push(i.displacement.formula);
        out.extend(i.velocity.map(|v| v.formula));
    }
    out.extend(sm.gravity.map(|g| g.formula));
    for r in &sm.requirements {
        out.extend(r.within.map(|w| w.formula));
        match &r.limit {
            Limit::Compare { rhs, .. } => out.push(rhs.formula),
            Limit::In { lo, hi } | Limit::Outside { lo, hi } => {
                out.extend([lo.formula, hi.formula])
            }
            Limit::Is { .. } => {}
        }
    }
    out
}

/// The statement text with runs of whitespace collapsed to one space.
fn collapse(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}
