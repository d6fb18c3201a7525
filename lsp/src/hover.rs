//! Hovers: a system's mode table; a value's SI figure, tolerance range, the modes it matters
//! most to and how much a +10% change moves them; a top-level let's value, tolerance and the
//! systems that use it; a drive's response (`drives.rs`); a unit's meaning and factor; a
//! requirement's verdict; doc comments.
//!
//! The sensitivities are the engine's own numbers: the model is copied with one value scaled by
//! 1.1 and assembled and solved again by `assemble` and `modes`. The energy shares are
//! bookkeeping over the engine's mass-normalised shapes (φᵀMφ = 1, φᵀKφ = ω²).

use sprung_engine::assemble;
use sprung_engine::dim::Dim;
use sprung_engine::formula::{FormulaId, Node};
use sprung_engine::model::{End, Model, Requirement, SystemModel, ToleranceKind};
use sprung_engine::modes::{self, ModalConfig, ModalResult, ModeRegime};
use sprung_engine::requirements::{Status, Verdict, regime_words};
use sprung_engine::units;
use sprung_syntax::ast::{ElementKind, ExprKind, Item, UnitExpr};
use tower_lsp_server::ls_types::{Hover, HoverContents, MarkupContent, MarkupKind, Position};

use crate::display::{self, hz, num, percent, quantity, sig_figs};
use crate::drives;
use crate::hints;
use crate::snapshot::Snapshot;
use crate::symbols::DefKind;

/// Sensitivities are computed for systems up to this size (each needs one more solve).
pub const SENSITIVITY_MAX_DOFS: usize = 200;
/// Tolerance ranges are searched exhaustively up to this many parameters.
const RANGE_MAX_PARAMS: usize = 8;

pub fn hover(snap: &Snapshot, pos: Position) -> Option<Hover> {
    let offset = snap.offset(pos);
    let (markdown, span) = if let Some((u, span)) = unit_at(snap, offset) {
        (unit_markdown(u, offset)?, span)
    } else if let Some(t) = snap.symbols.at(offset) {
        let def = &snap.symbols.defs[snap.symbols.def_of(t)];
        let span = match t {
            crate::symbols::Target::Def(_) => def.name_span,
            crate::symbols::Target::Ref(r) => snap.symbols.refs[r].span,
        };
        (def_markdown(snap, snap.symbols.def_of(t))?, span)
    } else {
        let (req, v) = requirement_at(snap, offset)?;
        (verdict_markdown(req, v), req.span)
    };
    Some(Hover {
        contents: HoverContents::Markup(MarkupContent {
            kind: MarkupKind::Markdown,
            value: markdown,
        }),
        range: Some(snap.range(span)),
    })
}

/// The unit expression whose atom covers `offset`.
fn unit_at(snap: &Snapshot, offset: usize) -> Option<(&UnitExpr, sprung_syntax::Span)> {
    let mut found = None;
    visit_numbers(&snap.checked.parse.file, &mut |u: &UnitExpr| {
        for t in &u.terms {
            if t.atom_span.start <= offset && offset < t.atom_span.end.max(t.atom_span.start + 1) {
                found = Some((u, t.atom_span));
            }
        }
    });
    found
}

/// Calls `f` on every unit written after a number in the file.
pub fn visit_numbers<'a>(file: &'a sprung_syntax::ast::File, f: &mut dyn FnMut(&'a UnitExpr)) {
    let mut exprs: Vec<&sprung_syntax::ast::Expr> = Vec::new();
    for item in &file.items {
        match item {
            Item::Let(l) => l.value.push_exprs(&mut exprs),
            Item::System(s) => {
                for st in &s.statements {
                    st.kind.push_exprs(&mut exprs);
                }
            }
            Item::Use(_) => {}
        }
    }
    while let Some(e) = exprs.pop() {
        match &e.kind {
            ExprKind::Number { unit: Some(u), .. } => f(u),
            ExprKind::Neg(a) | ExprKind::Paren(a) => exprs.push(a),
            ExprKind::Binary { lhs, rhs, .. } => {
                exprs.push(lhs);
                exprs.push(rhs);
            }
            ExprKind::Call { args, .. } => exprs.extend(args.iter()),
            _ => {}
        }
    }
}

fn unit_markdown(u: &UnitExpr, offset: usize) -> Option<String> {
    let term = u
        .terms
        .iter()
        .find(|t| t.atom_span.start <= offset && offset <= t.atom_span.end)?;
    let Some(info) = units::describe_atom(&term.atom) else {
        return Some(format!("`{}`: not a known unit", term.atom));
    };
    let mut md = format!(
        "**{}** — {}\n\n1 {} = {} {} ({})\n\nsource: {}",
        term.atom,
        info.meaning,
        term.atom,
        sig_figs(info.factor, 10),
        display::pretty_unit(&info.dim.si_unit()),
        info.dim.describe(),
        info.source
    );
    if let Some(p) = info.prefix {
        md.push_str(&format!(
            "; prefix {} ({}) = 10^{}",
            p.symbol, p.name, p.exponent
        ));
    }
    if u.terms.len() > 1
        && let Ok(whole) = units::eval_unit(u)
    {
        md.push_str(&format!(
            "\n\n`{}` = {} {}",
            u.text(),
            sig_figs(whole.factor, 10),
            display::pretty_unit(&whole.dim.si_unit())
        ));
    }
    Some(md)
}

fn requirement_at(snap: &Snapshot, offset: usize) -> Option<(&Requirement, &Verdict)> {
    for view in snap.systems() {
        let (Some(model), Some(a)) = (view.model, view.analysis) else {
            continue;
        };
        for (i, r) in model.requirements.iter().enumerate() {
            if r.span.contains(offset) {
                return Some((r, a.verdicts.get(i)?));
            }
        }
    }
    None
}

/// A requirement's verdict: value, limit, margin, worst corner.
pub fn verdict_markdown(req: &Requirement, v: &Verdict) -> String {
    let status = match &v.status {
        Status::Passed => "passes".to_string(),
        Status::Failed => "**fails**".to_string(),
        Status::NotEvaluated(why) => format!("not evaluated: {why}"),
    };
    let mut md = format!("`require {}` — {status}\n", req.text);
    if let Some(m) = hints::measured(req, v) {
        md.push_str(&format!("\n- value: {m}"));
    }
    if let Some(mode) = v.mode {
        md.push_str(&format!(" (mode {mode})"));
    }
    if let Some(l) = v.limit {
        md.push_str(&format!(
            "\n- limit: {}",
            hints::format_subject(&req.subject, l)
        ));
    }
    if let Some(m) = v.margin {
        let m = match req.subject {
            sprung_syntax::ast::Subject::Frequency { .. } => hz(m),
            _ => sig_figs(m, 3),
        };
        md.push_str(&format!("\n- margin: {m}"));
    }
    let corner = v
        .worst_corner
        .as_ref()
        .map_or("nominal".to_string(), |c| c.describe());
    if !matches!(v.status, Status::NotEvaluated(_)) {
        md.push_str(&format!("\n- worst corner: {corner}"));
    }
    md.push_str(&format!("\n\n{}", v.message));
    md
}

/// The lowest and highest value of a formula over the corners of its own tolerances.
pub fn tolerance_range(model: &Model, id: FormulaId) -> Option<(f64, f64)> {
    let params: Vec<usize> = model.formulas.params_of(&[id]).into_iter().collect();
    if params.is_empty() || params.len() > RANGE_MAX_PARAMS {
        return None;
    }
    let mut dev = vec![0.0; model.params.len()];
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    for mask in 0u32..(1 << params.len()) {
        for (bit, &p) in params.iter().enumerate() {
            let param = model.params.get(p)?;
            dev[p] = if mask & (1 << bit) != 0 {
                param.high
            } else {
                param.low
            };
        }
        let x = model.formulas.eval(id, &dev);
        lo = lo.min(x);
        hi = hi.max(x);
    }
    Some((lo, hi))
}

/// The most rows a mode table shows; the rest are counted.
pub const TABLE_MODES: usize = 12;
/// Shapes list every coordinate up to this many; beyond, the largest few.
const SHAPE_ENTRIES: usize = 6;

/// The mode table of a system (Markdown).
pub fn mode_table(sys: &SystemModel, modal: &ModalResult) -> String {
    let mut md = String::from(
        "| mode | fn | ζ | fd | Q | regime | shape |\n|---|---|---|---|---|---|---|\n",
    );
    for m in modal.modes.iter().take(TABLE_MODES) {
        let mut entries: Vec<(usize, f64)> = m.shape_unit().into_iter().enumerate().collect();
        let many = entries.len() > SHAPE_ENTRIES;
        if many {
            entries.sort_by(|a, b| b.1.abs().total_cmp(&a.1.abs()));
            entries.truncate(3);
        }
        let mut shape: Vec<String> = entries
            .iter()
            .filter_map(|(i, x)| Some(format!("{} {}", sys.dofs.get(*i)?.name, sig_figs(*x, 3))))
            .collect();
        if many {
            shape.push("…".to_string());
        }
        md.push_str(&format!(
            "| {} | {} ({} rad/s) | {} | {} | {} | {} | {} |\n",
            m.index,
            hz4(m.natural_frequency),
            sig_figs(m.natural_frequency, 4),
            m.damping_ratio.map_or("—".into(), num),
            m.damped_frequency.map_or("—".into(), hz4),
            m.quality_factor.map_or("—".into(), num),
            regime_words(m.regime),
            shape.join(", ")
        ));
    }
    if modal.modes.len() > TABLE_MODES {
        md.push_str(&format!(
            "\n… and {} more modes (`sprung modes` lists them all)\n",
            modal.modes.len() - TABLE_MODES
        ));
    }
    md.push_str(
        "\nfn natural frequency, ζ damping ratio, fd damped frequency, Q quality factor; \
         shapes scaled so the largest entry is 1.\n\n",
    );
    let regimes: Vec<ModeRegime> = {
        let mut r: Vec<ModeRegime> = modal.modes.iter().map(|m| m.regime).collect();
        r.dedup();
        r
    };
    for r in regimes {
        md.push_str(&format!("- *{}*: {}\n", regime_words(r), explain_regime(r)));
    }
    md
}

/// An angular frequency in hertz, four figures (hovers have room for them).
fn hz4(rad_per_s: f64) -> String {
    format!("{} Hz", sig_figs(rad_per_s / std::f64::consts::TAU, 4))
}

fn explain_regime(r: ModeRegime) -> &'static str {
    match r {
        ModeRegime::Undamped => "no damper moves in this mode (ζ = 0); it rings forever",
        ModeRegime::Underdamped => "0 < ζ < 1: it oscillates while the motion decays",
        ModeRegime::CriticallyDamped => "ζ = 1: the fastest return without overshoot",
        ModeRegime::Overdamped => "ζ > 1: it creeps back without oscillating",
        ModeRegime::RigidBody => "no stiffness path to ground: it moves without restoring force",
        ModeRegime::Unstable => "a root with positive real part: the motion grows",
    }
}

fn def_markdown(snap: &Snapshot, def: usize) -> Option<String> {
    let d = &snap.symbols.defs[def];
    let mut md = String::new();
    let model = &snap.checked.model;
    let view = match d.system {
        Some(s) => snap.systems().nth(s),
        None if d.kind == DefKind::System => {
            snap.systems().find(|v| v.syntax.name.span == d.name_span)
        }
        None => None,
    };
    let statement_text = snap.text.get(d.span.range()).unwrap_or("").trim();
    let head = statement_text
        .lines()
        .next()
        .unwrap_or("")
        .trim_end_matches('{')
        .trim();
    md.push_str(&format!("```sprung\n{head}\n```\n"));
    if let Some(doc) = &d.doc {
        md.push_str(&format!("\n{}\n", doc.trim()));
    }
    let sys = view.as_ref().and_then(|v| v.model);
    let analysis = view.as_ref().and_then(|v| v.analysis);
    // Values are added when the checker produced them; the header and doc always show.
    let mut details = || -> Option<()> {
        match d.kind {
            DefKind::System => {
                if let (Some(sys), Some(modal)) = (sys, analysis.and_then(|a| a.modes.as_ref())) {
                    md.push('\n');
                    md.push_str(&mode_table(sys, modal));
                } else if sys.is_some_and(|s| s.has_errors) {
                    md.push_str("\nnot analyzed: the system has errors");
                }
            }
            DefKind::Let if d.system.is_none() => {
                global_lines(&mut md, model, d.name_span)?;
            }
            DefKind::Let => {
                let lv = sys.and_then(|s| s.lets.iter().find(|l| l.name_span == d.name_span))?;
                value_lines(
                    &mut md,
                    model,
                    lv.value.formula,
                    lv.value.nominal,
                    lv.value.dim,
                    false,
                );
            }
            DefKind::Mass | DefKind::Inertia => {
                let sys = sys?;
                let i = sys.dofs.iter().position(|x| x.name_span == d.name_span)?;
                let q = sys.dofs[i].value;
                value_lines(&mut md, model, q.formula, q.nominal, q.dim, false);
                if let Some(modal) = analysis.and_then(|a| a.modes.as_ref()) {
                    let shares: Vec<f64> = modal
                        .modes
                        .iter()
                        .map(|m| q.nominal * m.shape.get(i).copied().unwrap_or(0.0).powi(2))
                        .collect();
                    influence(&mut md, model, sys, modal, &shares, "kinetic energy", |m| {
                        scaled_dof(m, sys, i)
                    });
                }
            }
            DefKind::Spring | DefKind::Damper => {
                let sys = sys?;
                let i = sys
                    .elements
                    .iter()
                    .position(|x| x.name_span == d.name_span)?;
                let el = &sys.elements[i];
                value_lines(
                    &mut md,
                    model,
                    el.value.formula,
                    el.value.nominal,
                    el.value.dim,
                    el.rotational,
                );
                if let Some(modal) = analysis.and_then(|a| a.modes.as_ref()) {
                    let rel = |m: &modes::Mode, a: End, b: End| {
                        let at = |e: End| match e {
                            End::Ground => 0.0,
                            End::Dof(k) => m.shape.get(k).copied().unwrap_or(0.0),
                        };
                        at(a) - at(b)
                    };
                    let shares: Vec<f64> = modal
                        .modes
                        .iter()
                        .map(|m| {
                            let own = el.value.nominal * rel(m, el.a, el.b).powi(2);
                            let total: f64 = match el.kind {
                                // φᵀKφ = ω² for a mass-normalised shape.
                                ElementKind::Spring => m.omega2,
                                ElementKind::Damper => sys
                                    .elements
                                    .iter()
                                    .filter(|e| e.kind == ElementKind::Damper)
                                    .map(|e| e.value.nominal * rel(m, e.a, e.b).powi(2))
                                    .sum(),
                            };
                            if total > 0.0 { own / total } else { 0.0 }
                        })
                        .collect();
                    let what = match el.kind {
                        ElementKind::Spring => "strain energy",
                        ElementKind::Damper => "dissipation",
                    };
                    influence(&mut md, model, sys, modal, &shares, what, |m| {
                        scaled_element(m, sys, i)
                    });
                }
            }
            DefKind::Force | DefKind::Torque | DefKind::Motion => {
                match drives::report_at(snap, d.name_span) {
                    Some((sys, drive, rep)) => {
                        md.push('\n');
                        md.push_str(&drives::markdown(
                            sys,
                            drive,
                            rep,
                            analysis.and_then(|a| a.modes.as_ref()),
                        ));
                    }
                    None => md.push_str(
                        "\nnot analyzed: `sprung response` evaluates it once the system checks",
                    ),
                }
            }
        }
        Some(())
    };
    let _ = details();
    Some(md)
}

/// A top-level let: its value, its own tolerance and the systems that use it.
fn global_lines(md: &mut String, model: &Model, name_span: sprung_syntax::Span) -> Option<()> {
    let g = model.globals.iter().find(|g| g.name_span == name_span)?;
    let q = g.value;
    value_lines(md, model, q.formula, q.nominal, q.dim, false);
    if let Some(p) = g.param.and_then(|p| model.params.get(p)) {
        let tol = match p.kind {
            ToleranceKind::Relative => {
                format!("{} … +{} (relative)", percent(p.low), percent(p.high))
            }
            ToleranceKind::Absolute => format!(
                "{} … +{} (absolute)",
                quantity(p.low, q.dim, false),
                quantity(p.high, q.dim, false)
            ),
        };
        md.push_str(&format!("\n- tolerance: {tol}"));
    }
    let users: Vec<String> = g
        .used_by
        .iter()
        .filter_map(|&s| model.systems.get(s))
        .map(|s| format!("`{}`", s.name))
        .collect();
    if users.is_empty() {
        md.push_str("\n- used by no system");
    } else {
        md.push_str(&format!(
            "\n- used by system{} {}",
            if users.len() == 1 { "" } else { "s" },
            users.join(", ")
        ));
    }
    Some(())
}

fn value_lines(md: &mut String, model: &Model, id: FormulaId, nominal: f64, dim: Dim, rot: bool) {
    md.push_str(&format!(
        "\n- value: {} ({} in SI; {})",
        quantity(nominal, dim, rot),
        display::si(nominal, dim),
        dim.describe()
    ));
    if let Some((lo, hi)) = tolerance_range(model, id) {
        md.push_str(&format!(
            "\n- over its tolerances: {} … {}",
            quantity(lo, dim, rot),
            quantity(hi, dim, rot)
        ));
    }
}

/// Lists the modes a value matters most to, with the frequency change a +10% change brings.
fn influence(
    md: &mut String,
    model: &Model,
    sys: &SystemModel,
    modal: &ModalResult,
    shares: &[f64],
    what: &str,
    scaled: impl Fn(&mut Model) -> Option<()>,
) {
    let mut order: Vec<usize> = (0..shares.len())
        .filter(|&j| shares[j] > 0.01 && modal.modes[j].regime != ModeRegime::RigidBody)
        .collect();
    order.sort_by(|&a, &b| shares[b].total_cmp(&shares[a]));
    order.truncate(3);
    if order.is_empty() {
        md.push_str(&format!("\n\nno mode has a noticeable share of its {what}"));
        return;
    }
    let perturbed = sensitivity(model, sys, &scaled);
    md.push_str(&format!(
        "\n\n| mode | fn | share of {what} | +10% moves fn by |\n|---|---|---|---|\n"
    ));
    for j in order {
        let m = &modal.modes[j];
        let moved = perturbed
            .as_ref()
            .and_then(|p| p.modes.get(j))
            .filter(|_| m.natural_frequency > 0.0)
            .map(|p| {
                let r = p.natural_frequency / m.natural_frequency - 1.0;
                format!("{}{}", if r >= 0.0 { "+" } else { "" }, percent(r))
            })
            .unwrap_or_else(|| "—".to_string());
        md.push_str(&format!(
            "| {} | {} | {} | {} |\n",
            m.index,
            hz4(m.natural_frequency),
            percent(shares[j]),
            moved
        ));
    }
}

/// The modes of the system with one value scaled, solved by the engine.
fn sensitivity(
    model: &Model,
    sys: &SystemModel,
    scaled: &dyn Fn(&mut Model) -> Option<()>,
) -> Option<ModalResult> {
    if sys.dofs.len() > SENSITIVITY_MAX_DOFS {
        return None;
    }
    let mut copy = model.clone();
    scaled(&mut copy)?;
    let si = copy
        .systems
        .iter()
        .position(|s| s.name_span == sys.name_span)?;
    let mats = assemble::assemble(&copy, &copy.systems[si], &[]).ok()?;
    modes::analyze(&mats, &ModalConfig::default()).ok()
}

fn times_1_1(model: &mut Model, id: FormulaId) -> FormulaId {
    let k = model.formulas.constant(1.1);
    model.formulas.push(Node::Mul(id, k))
}

fn scaled_element(model: &mut Model, sys: &SystemModel, i: usize) -> Option<()> {
    let si = model
        .systems
        .iter()
        .position(|s| s.name_span == sys.name_span)?;
    let old = model.systems[si].elements.get(i)?.value.formula;
    let new = times_1_1(model, old);
    model.systems[si].elements[i].value.formula = new;
    Some(())
}

fn scaled_dof(model: &mut Model, sys: &SystemModel, i: usize) -> Option<()> {
    let si = model
        .systems
        .iter()
        .position(|s| s.name_span == sys.name_span)?;
    let old = model.systems[si].dofs.get(i)?.value.formula;
    let new = times_1_1(model, old);
    model.systems[si].dofs[i].value.formula = new;
    Some(())
}
