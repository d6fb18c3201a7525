//! Code actions:
//!
//! - quick fixes read from the engine's diagnostics: the did-you-mean of an unknown name, unit
//!   or function, and `lb` → `lbm` / `lbf` (the engine gives its suggestion as help text,
//!   ``did you mean `kN`?``, so the backticked words are read out of it; a fix is offered only
//!   when the diagnostic's span is exactly one word, so an edit can never spill over);
//! - "Add unit": a bare number where the diagnostic carries the unit its place expects
//!   ([`sprung_engine::ExpectedUnit`]); the unit is the one the file already writes most for
//!   that dimension ([`sprung_engine::fixes::unit_to_add`]), and the fix is offered only when
//!   the edited text checks without that diagnostic;
//! - "Set damper": for a failed damping or regime requirement, one action per damper of the
//!   system, sized by [`sprung_engine::sizing::size_damper`] at the worst tolerance corner;
//! - "Extract into `let`": a literal with a unit (or a selected expression) written two or
//!   more times in one system becomes a `let` at the top of the system body.

use std::collections::{HashMap, HashSet};

use sprung_engine::sizing::{self, SizingConfig};
use sprung_engine::{Code, Diagnostic};
use sprung_syntax::Span;
use sprung_syntax::ast::{
    self, CmpOp, ElementKind, Expr, ExprKind, Item, NodeKind, Regime, StatementKind, Subject,
};
use tower_lsp_server::ls_types::{
    self as lsp, CodeAction, CodeActionKind, CodeActionOrCommand, Range, TextEdit, Uri,
    WorkspaceEdit,
};

use crate::diagnostics;
use crate::snapshot::Snapshot;

/// The work all damper sizings of one request may take together (see
/// [`SizingConfig::max_work`]): shared between the dampers offered.
const SIZING_BUDGET: f64 = 3e8;

/// The code actions over `range`; `only` is the request's `context.only`: when given, just the
/// actions of those kinds or their sub-kinds (`refactor` admits `refactor.extract`), and the
/// work of the others (a damper sizing, say) is not done.
pub fn code_actions(
    snap: &Snapshot,
    uri: &Uri,
    range: Range,
    only: Option<&[CodeActionKind]>,
) -> Vec<CodeActionOrCommand> {
    let wanted = |kind: &CodeActionKind| {
        only.is_none_or(|only| {
            only.iter().any(|o| {
                let (o, k) = (o.as_str(), kind.as_str());
                k == o || k.strip_prefix(o).is_some_and(|rest| rest.starts_with('.'))
            })
        })
    };
    let (lo, hi) = (snap.offset(range.start), snap.offset(range.end));
    let mut out = Vec::new();
    if wanted(&CodeActionKind::QUICKFIX) {
        let engine = snap.analysis.all_diagnostics(&snap.checked);
        let protocol = diagnostics::to_lsp(snap, uri);
        for (d, lsp) in engine.iter().zip(protocol) {
            if d.span.end < lo || d.span.start > hi {
                continue;
            }
            replacements(snap, uri, d, &lsp, &mut out);
            add_unit(snap, uri, d, &lsp, &mut out);
            size_dampers(snap, uri, d, &lsp, &mut out);
        }
    }
    if wanted(&CodeActionKind::REFACTOR_EXTRACT) {
        extract_let(snap, uri, lo, hi, &mut out);
    }
    out
}

fn action(
    title: String,
    kind: CodeActionKind,
    diagnostic: Option<&lsp::Diagnostic>,
    uri: &Uri,
    edits: Vec<TextEdit>,
    preferred: bool,
) -> CodeActionOrCommand {
    CodeActionOrCommand::CodeAction(CodeAction {
        title,
        kind: Some(kind),
        diagnostics: diagnostic.map(|d| vec![d.clone()]),
        edit: Some(WorkspaceEdit {
            changes: Some(HashMap::from([(uri.clone(), edits)])),
            ..WorkspaceEdit::default()
        }),
        is_preferred: Some(preferred),
        ..CodeAction::default()
    })
}

// ---- did-you-mean and `lb` ---------------------------------------------------------------

/// The replacements a diagnostic's help offers.
fn suggestions(d: &Diagnostic) -> Vec<String> {
    let Some(help) = &d.help else {
        return Vec::new();
    };
    let quoted = |s: &str| -> Vec<String> {
        s.split('`')
            .enumerate()
            .filter(|(i, _)| i % 2 == 1)
            .map(|(_, w)| w.to_string())
            .collect()
    };
    if help.starts_with("did you mean `") {
        quoted(help).into_iter().take(1).collect()
    } else if d.code == Code::AmbiguousPound.info().code {
        quoted(help)
    } else {
        Vec::new()
    }
}

fn is_word(s: &str) -> bool {
    !s.is_empty() && s.chars().all(|c| c.is_alphanumeric() || c == '_')
}

/// A suggestion is inserted as written: a name, an atom or a short unit product (`N*s`).
fn is_replacement(s: &str) -> bool {
    !s.is_empty()
        && s.chars()
            .all(|c| c.is_alphanumeric() || "_*/^-".contains(c))
}

fn replacements(
    snap: &Snapshot,
    uri: &Uri,
    d: &Diagnostic,
    lsp: &lsp::Diagnostic,
    out: &mut Vec<CodeActionOrCommand>,
) {
    let Some(written) = snap.text.get(d.span.range()) else {
        return;
    };
    if !is_word(written) {
        return;
    }
    let options = suggestions(d);
    let single = options.len() == 1;
    for s in options
        .into_iter()
        .filter(|s| s != written && is_replacement(s))
    {
        let edit = TextEdit::new(snap.range(d.span), s.clone());
        out.push(action(
            format!("Replace `{written}` with `{s}`"),
            CodeActionKind::QUICKFIX,
            Some(lsp),
            uri,
            vec![edit],
            single,
        ));
    }
}

// ---- add the expected unit to a bare number ----------------------------------------------

/// `e` and all its sub-expressions, outermost first.
fn subexprs(e: &Expr) -> Vec<&Expr> {
    let mut out = Vec::new();
    let mut stack = vec![e];
    while let Some(e) = stack.pop() {
        out.push(e);
        match &e.kind {
            ExprKind::Neg(a) | ExprKind::Paren(a) => stack.push(a),
            ExprKind::Binary { lhs, rhs, .. } => {
                stack.push(rhs);
                stack.push(lhs);
            }
            ExprKind::Call { args, .. } => stack.extend(args.iter().rev()),
            ExprKind::Number { .. } | ExprKind::Name(_) | ExprKind::Error => {}
        }
    }
    out
}

/// The number literal without a unit or `%` that makes up the whole of `e` (through
/// parentheses and a minus sign): only then is a missing unit what is wrong. In `2 * k` the
/// `2` is a scale factor and gets no unit.
fn bare_number(e: &Expr) -> Option<&Expr> {
    match &e.kind {
        ExprKind::Paren(a) | ExprKind::Neg(a) => bare_number(a),
        ExprKind::Number {
            unit: None,
            percent: false,
            ..
        } => Some(e),
        _ => None,
    }
}

fn add_unit(
    snap: &Snapshot,
    uri: &Uri,
    d: &Diagnostic,
    lsp: &lsp::Diagnostic,
    out: &mut Vec<CodeActionOrCommand>,
) {
    let Some(expected) = d.expected_unit else {
        return;
    };
    let file = &snap.checked.parse.file;
    let Some(whole) = file
        .top_exprs()
        .into_iter()
        .flat_map(subexprs)
        .find(|e| e.span == d.span)
    else {
        return;
    };
    let Some(number) = bare_number(whole) else {
        return;
    };
    let unit = sprung_engine::fixes::unit_to_add(file, expected);
    let at = number.span.end;
    let (Some(before), Some(after)) = (snap.text.get(..at), snap.text.get(at..)) else {
        return;
    };
    // Offer it only if the engine agrees: the edited text no longer has this diagnostic.
    let edited = format!("{before} {unit}{after}");
    let checked = sprung_engine::check(&edited);
    if checked
        .diagnostics
        .iter()
        .any(|x| x.code == d.code && x.span.start == d.span.start)
    {
        return;
    }
    let edit = TextEdit::new(snap.range(Span::at(at)), format!(" {unit}"));
    out.push(action(
        format!("Add unit `{unit}`"),
        CodeActionKind::QUICKFIX,
        Some(lsp),
        uri,
        vec![edit],
        true,
    ));
}

// ---- size a damper for a failed damping or regime requirement ----------------------------

fn op_word(op: CmpOp) -> &'static str {
    match op {
        CmpOp::Lt => "<",
        CmpOp::Le => "≤",
        CmpOp::Gt => ">",
        CmpOp::Ge => "≥",
    }
}

/// What the requirement asks, shortly: `ζ ≥ 0.05`, `ζ of mode 2 in 0.05 .. 0.2`,
/// `not underdamped`.
fn condition(req: &sprung_engine::model::Requirement) -> String {
    use sprung_engine::model::Limit;
    let num = |q: &sprung_engine::model::Quantity| sprung_engine::requirements::sig(q.nominal);
    let mode = req
        .mode
        .map(|m| format!(" of mode {m}"))
        .unwrap_or_default();
    match &req.limit {
        Limit::Compare { op, rhs } => format!("ζ{mode} {} {}", op_word(*op), num(rhs)),
        Limit::In { lo, hi } => format!("ζ{mode} in {} .. {}", num(lo), num(hi)),
        Limit::Outside { lo, hi } => format!("ζ{mode} outside {} .. {}", num(lo), num(hi)),
        Limit::Is { not, regime } => {
            let what = format!("{}{}", if *not { "not " } else { "" }, regime.words());
            match req.mode {
                Some(m) => format!("mode {m} {what}"),
                None => what,
            }
        }
    }
}

fn size_dampers(
    snap: &Snapshot,
    uri: &Uri,
    d: &Diagnostic,
    lsp: &lsp::Diagnostic,
    out: &mut Vec<CodeActionOrCommand>,
) {
    use sprung_engine::model::Limit;
    if d.code != Code::RequirementFailed.info().code {
        return;
    }
    for (si, sys) in snap.checked.model.systems.iter().enumerate() {
        let Some(ri) = sys.requirements.iter().position(|r| r.span == d.span) else {
            continue;
        };
        let req = &sys.requirements[ri];
        let sizable = match (&req.subject, &req.limit) {
            // Undamped means no damper at all: nothing to size.
            (
                Subject::Regime { .. },
                Limit::Is {
                    not: false,
                    regime: Regime::Undamped,
                },
            ) => false,
            (Subject::Damping { .. } | Subject::Regime { .. }, _) => true,
            _ => false,
        };
        if !sizable {
            return;
        }
        let dampers: Vec<usize> = sys
            .elements
            .iter()
            .enumerate()
            .filter(|(_, e)| e.kind == ElementKind::Damper)
            .map(|(i, _)| i)
            .collect();
        let config = SizingConfig {
            max_work: SIZING_BUDGET / dampers.len().max(1) as f64,
            ..SizingConfig::default()
        };
        for i in dampers {
            let Ok(size) = sizing::size_damper(&snap.checked, si, ri, i, &config) else {
                continue;
            };
            let at = if size.toleranced {
                " at worst corner"
            } else {
                ""
            };
            let title = format!(
                "Set damper `{}` to {} {} ({}{at})",
                sys.elements[i].name,
                sprung_engine::requirements::sig(size.amount),
                size.unit,
                condition(req)
            );
            let edit = TextEdit::new(snap.range(size.span), size.text);
            out.push(action(
                title,
                CodeActionKind::QUICKFIX,
                Some(lsp),
                uri,
                vec![edit],
                false,
            ));
        }
        return;
    }
}

// ---- extract a repeated value into a `let` -----------------------------------------------

/// What makes two occurrences the same: a literal's SI value and dimension, or an
/// expression's text with its whitespace collapsed.
#[derive(Clone, Debug, PartialEq)]
enum Key {
    Literal(f64, sprung_engine::dim::Dim),
    Text(String),
}

fn literal_key(e: &Expr) -> Option<Key> {
    let ExprKind::Number {
        value,
        unit: Some(u),
        percent,
        ..
    } = &e.kind
    else {
        return None;
    };
    let atom = sprung_engine::units::eval_unit(u).ok()?;
    let v = value * atom.factor * if *percent { 0.01 } else { 1.0 };
    v.is_finite().then_some(Key::Literal(v, atom.dim))
}

fn same(a: &Key, b: &Key) -> bool {
    match (a, b) {
        (Key::Literal(x, dx), Key::Literal(y, dy)) => {
            dx == dy && (x == y || (x - y).abs() <= 1e-12 * x.abs().max(y.abs()))
        }
        (Key::Text(x), Key::Text(y)) => x == y,
        _ => false,
    }
}

fn collapse(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// A name for the new `let`: from the element or node whose whole value the first occurrence
/// is, else from the literal's dimension.
fn base_name(st: &StatementKind, first: &Expr, key: &Key) -> &'static str {
    use sprung_engine::dim::Dim;
    let whole = match st {
        StatementKind::Element { value, .. } | StatementKind::Node { value, .. } => {
            value.expr.span == first.span
        }
        _ => false,
    };
    match st {
        _ if !whole => {}
        StatementKind::Element {
            kind: ElementKind::Spring,
            ..
        } => return "stiffness",
        StatementKind::Element {
            kind: ElementKind::Damper,
            ..
        } => return "damping",
        StatementKind::Node {
            kind: NodeKind::Mass,
            ..
        } => return "mass_value",
        StatementKind::Node {
            kind: NodeKind::Inertia,
            ..
        } => return "inertia_value",
        _ => {}
    }
    match key {
        Key::Literal(_, d) => match *d {
            Dim::STIFFNESS => "stiffness",
            Dim::DAMPING | Dim::ROTATIONAL_DAMPING => "damping",
            Dim::MASS => "mass_value",
            Dim::INERTIA => "inertia_value",
            Dim::FREQUENCY => "frequency",
            Dim::FORCE => "force_amplitude",
            Dim::TORQUE => "torque_amplitude",
            Dim::LENGTH => "length",
            Dim::TIME => "duration",
            Dim::VELOCITY => "speed",
            Dim::ACCELERATION => "acceleration",
            Dim::NONE => "ratio",
            _ => "value",
        },
        Key::Text(_) => "shared",
    }
}

/// Every name a new `let` in `sys` could collide with: the system's own, the file's
/// top-level `let`s, keywords, functions, `pi`.
fn taken_names<'a>(file: &'a ast::File, sys: &'a ast::System) -> HashSet<&'a str> {
    let mut names: HashSet<&str> = sprung_syntax::lexer::KEYWORDS.iter().copied().collect();
    names.extend(sprung_engine::check::FUNCTIONS.iter().copied());
    names.insert("pi");
    for item in &file.items {
        if let Item::Let(l) = item {
            names.insert(&l.name.name);
        }
    }
    for st in &sys.statements {
        match &st.kind {
            StatementKind::Let(l) => {
                names.insert(&l.name.name);
            }
            StatementKind::Node { name, .. }
            | StatementKind::Element { name, .. }
            | StatementKind::Drive { name, .. } => {
                names.insert(&name.name);
            }
            _ => {}
        }
    }
    names
}

fn extract_let(
    snap: &Snapshot,
    uri: &Uri,
    lo: usize,
    hi: usize,
    out: &mut Vec<CodeActionOrCommand>,
) {
    let file = &snap.checked.parse.file;
    let Some(sys) = file.items.iter().find_map(|item| match item {
        Item::System(s) if s.span.start <= lo && hi <= s.span.end => Some(s),
        _ => None,
    }) else {
        return;
    };
    // Every expression of the system, with the statement it is part of.
    let exprs: Vec<(&StatementKind, &Expr)> = sys
        .statements
        .iter()
        .flat_map(|st| {
            let mut tops = Vec::new();
            st.kind.push_exprs(&mut tops);
            tops.into_iter()
                .flat_map(subexprs)
                .map(move |e| (&st.kind, e))
        })
        .collect();
    let text_of = |s: Span| snap.text.get(s.range()).unwrap_or("");
    // A selection picks the expression it covers exactly (spaces trimmed); a cursor picks the
    // literal it is on.
    let selected = text_of(Span::new(lo, hi.max(lo)));
    let (target, key) = if hi > lo && !selected.trim().is_empty() {
        let start = lo + (selected.len() - selected.trim_start().len());
        let end = hi - (selected.len() - selected.trim_end().len());
        let Some((_, e)) = exprs.iter().find(|(_, e)| e.span == Span::new(start, end)) else {
            return;
        };
        let key = literal_key(e).unwrap_or_else(|| Key::Text(collapse(text_of(e.span))));
        if matches!(e.kind, ExprKind::Name(_) | ExprKind::Error) {
            return;
        }
        (*e, key)
    } else {
        let Some((e, key)) = exprs.iter().find_map(|(_, e)| {
            (e.span.start <= lo && lo <= e.span.end)
                .then(|| literal_key(e).map(|k| (*e, k)))
                .flatten()
        }) else {
            return;
        };
        (e, key)
    };
    let key_of = |e: &Expr| match key {
        Key::Literal(..) => literal_key(e),
        Key::Text(_) => {
            (!matches!(e.kind, ExprKind::Name(_))).then(|| Key::Text(collapse(text_of(e.span))))
        }
    };
    let occurrences: Vec<(&StatementKind, &Expr)> = exprs
        .iter()
        .filter(|(_, e)| key_of(e).is_some_and(|k| same(&k, &key)))
        .copied()
        .collect();
    if occurrences.len() < 2 {
        return;
    }
    let taken = taken_names(file, sys);
    let base = base_name(occurrences[0].0, occurrences[0].1, &key);
    let name = std::iter::once(base.to_string())
        .chain((2..).map(|i| format!("{base}_{i}")))
        .find(|n| !taken.contains(n.as_str()))
        .unwrap_or_else(|| base.to_string());
    let Some(first) = sys.statements.first() else {
        return;
    };
    let at = first
        .doc
        .as_ref()
        .map_or(first.span.start, |d| d.span.start);
    let line_start = snap.text[..at].rfind('\n').map_or(0, |i| i + 1);
    let indent = &snap.text[line_start..at];
    let written = collapse(text_of(target.span));
    let declaration = if indent.chars().all(|c| c == ' ' || c == '\t') {
        format!("let {name} = {written}\n{indent}")
    } else {
        format!("let {name} = {written} ")
    };
    let mut edits = vec![TextEdit::new(snap.range(Span::at(at)), declaration)];
    edits.extend(
        occurrences
            .iter()
            .map(|(_, e)| TextEdit::new(snap.range(e.span), name.clone())),
    );
    out.push(action(
        format!("Extract `{written}` into `let {name}`"),
        CodeActionKind::REFACTOR_EXTRACT,
        None,
        uri,
        edits,
        false,
    ));
}
