//! Inlay hints: a mode summary on each system header (with ω0 and γ for a one-mass system),
//! the evaluated value of every let (top-level ones too) and element written as an expression,
//! the response to each drive (`drives.rs`), and the measured value and verdict on each
//! requirement line. Short labels; the detail is in the tooltips.

use sprung_engine::dim::Dim;
use sprung_engine::model::Requirement;
use sprung_engine::modes::{ModalResult, ModeRegime};
use sprung_engine::requirements::{Status, Verdict, regime_words};
use sprung_syntax::Span;
use sprung_syntax::ast::{ExprKind, Item, StatementKind, Subject, Value};
use tower_lsp_server::ls_types::{
    InlayHint, InlayHintLabel, InlayHintTooltip, MarkupContent, MarkupKind, Range,
};

use crate::display::{self, hz, num, percent, quantity};
use crate::drives;
use crate::hover;
use crate::snapshot::Snapshot;

/// How many modes the header summary lists before it gives a count.
pub const SUMMARY_MODES: usize = 3;

pub fn inlay_hints(snap: &Snapshot, range: Range) -> Vec<InlayHint> {
    let mut out = Vec::new();
    for item in &snap.checked.parse.file.items {
        if let Item::Let(l) = item
            && let Some(g) = snap
                .checked
                .model
                .globals
                .iter()
                .find(|g| g.name_span == l.name.span)
        {
            value_hint(
                snap,
                &mut out,
                &l.value,
                g.value.nominal,
                g.value.dim,
                false,
                g.value.formula,
            );
        }
    }
    for view in snap.systems() {
        let Some(model) = view.model else { continue };
        if let Some(modal) = view.analysis.and_then(|a| a.modes.as_ref()) {
            let at = snap.line_end(view.syntax.name.span.end);
            out.push(hint(
                snap,
                at,
                summary(modal),
                Some(hover::mode_table(model, modal)),
            ));
        }
        for st in &view.syntax.statements {
            match &st.kind {
                StatementKind::Let(l) => {
                    if let Some(lv) = model.lets.iter().find(|x| x.name_span == l.name.span) {
                        value_hint(
                            snap,
                            &mut out,
                            &l.value,
                            lv.value.nominal,
                            lv.value.dim,
                            false,
                            lv.value.formula,
                        );
                    }
                }
                StatementKind::Node { name, value, .. } => {
                    if let Some(d) = model.dofs.iter().find(|x| x.name_span == name.span) {
                        value_hint(
                            snap,
                            &mut out,
                            value,
                            d.value.nominal,
                            d.value.dim,
                            false,
                            d.value.formula,
                        );
                    }
                }
                StatementKind::Element { name, value, .. } => {
                    if let Some(e) = model.elements.iter().find(|x| x.name_span == name.span) {
                        value_hint(
                            snap,
                            &mut out,
                            value,
                            e.value.nominal,
                            e.value.dim,
                            e.rotational,
                            e.value.formula,
                        );
                    }
                }
                StatementKind::Drive { name, .. } => {
                    if let Some((sys, drive, rep)) = drives::report_at(snap, name.span)
                        && let Some((label, tip)) = drives::hint(
                            sys,
                            drive,
                            rep,
                            view.analysis.and_then(|a| a.modes.as_ref()),
                        )
                    {
                        out.push(hint(snap, snap.line_end(st.span.end), label, Some(tip)));
                    }
                }
                StatementKind::Require(_) => {
                    if let (Some(i), Some(a)) = (
                        model.requirements.iter().position(|r| r.span == st.span),
                        view.analysis,
                    ) && let Some(v) = a.verdicts.get(i)
                        && let Some((label, tip)) = verdict_hint(&model.requirements[i], v)
                    {
                        out.push(hint(snap, snap.line_end(st.span.end), label, Some(tip)));
                    }
                }
                _ => {}
            }
        }
    }
    out.retain(|h| h.position >= range.start && h.position <= range.end);
    out
}

fn hint(snap: &Snapshot, offset: usize, label: String, tooltip: Option<String>) -> InlayHint {
    InlayHint {
        position: snap.position(offset),
        label: InlayHintLabel::String(label),
        kind: None,
        text_edits: None,
        tooltip: tooltip.map(|t| {
            InlayHintTooltip::MarkupContent(MarkupContent {
                kind: MarkupKind::Markdown,
                value: t,
            })
        }),
        padding_left: Some(true),
        padding_right: None,
        data: None,
    }
}

/// `7.96 Hz ζ0.05 underdamped`, one per mode, the first few and a count.
pub fn summary(modal: &ModalResult) -> String {
    let mut parts: Vec<String> = modal
        .modes
        .iter()
        .take(SUMMARY_MODES)
        .map(|m| {
            let mut s = if m.regime == ModeRegime::RigidBody {
                String::new()
            } else {
                hz(m.natural_frequency)
            };
            if let Some(z) = m.damping_ratio
                && m.regime != ModeRegime::RigidBody
            {
                s.push_str(&format!(" ζ{}", num(z)));
            }
            if !s.is_empty() {
                s.push(' ');
            }
            s.push_str(regime_words(m.regime));
            s
        })
        .collect();
    if modal.modes.len() > SUMMARY_MODES {
        parts.push(format!("… {} modes", modal.modes.len()));
    }
    if let [m] = modal.modes.as_slice()
        && m.regime != ModeRegime::RigidBody
        && let Some(z) = m.damping_ratio
    {
        // One mass: ω0 = √(k/m) is the undamped frequency, γ = c/(2m) = ζ·ωn.
        parts.push(format!(
            "ω0 {} rad/s γ {} 1/s",
            num(m.undamped_frequency),
            num(z * m.natural_frequency)
        ));
    }
    parts.join(" · ")
}

fn is_literal(v: &Value) -> bool {
    let mut e = &v.expr;
    loop {
        match &e.kind {
            ExprKind::Number { .. } => return true,
            ExprKind::Neg(a) | ExprKind::Paren(a) => e = a,
            _ => return false,
        }
    }
}

#[allow(clippy::too_many_arguments)]
fn value_hint(
    snap: &Snapshot,
    out: &mut Vec<InlayHint>,
    value: &Value,
    nominal: f64,
    dim: Dim,
    rotational: bool,
    formula: sprung_engine::formula::FormulaId,
) {
    if is_literal(value) {
        return;
    }
    let label = format!("= {}", quantity(nominal, dim, rotational));
    let mut tip = format!("{}: {}", dim.describe(), display::si(nominal, dim));
    if let Some((lo, hi)) = hover::tolerance_range(&snap.checked.model, formula) {
        tip.push_str(&format!(
            "\n\nover the tolerances: {} … {}",
            quantity(lo, dim, rotational),
            quantity(hi, dim, rotational)
        ));
    }
    out.push(hint(snap, value_end(snap, value.span), label, Some(tip)));
}

fn value_end(snap: &Snapshot, span: Span) -> usize {
    // At the line's end unless a comment follows the value on the same line.
    let end = snap.line_end(span.end);
    let between = snap.text.get(span.end..end).unwrap_or("");
    if between.trim().is_empty() {
        end
    } else {
        span.end
    }
}

/// The measured value in the subject's own terms.
pub fn measured(req: &Requirement, v: &Verdict) -> Option<String> {
    if let Some(r) = v.regime {
        return Some(regime_words(r).to_string());
    }
    let x = v.value?;
    Some(format_subject(&req.subject, x))
}

pub fn format_subject(subject: &Subject, x: f64) -> String {
    match subject {
        Subject::Damping { .. } => format!("ζ {}", num(x)),
        Subject::Frequency { .. } => hz(x),
        Subject::Separation { .. } | Subject::Overshoot { .. } => percent(x),
        Subject::Transmissibility { .. } | Subject::Regime { .. } => num(x),
        Subject::Amplitude { .. } | Subject::Sag { .. } => quantity(x, Dim::LENGTH, false),
        Subject::Settling { .. } => quantity(x, Dim::TIME, false),
    }
}

fn verdict_hint(req: &Requirement, v: &Verdict) -> Option<(String, String)> {
    let mode = v.mode.map(|m| format!(" (mode {m})")).unwrap_or_default();
    let label = match &v.status {
        Status::Passed => format!("✓ {}{mode}", measured(req, v)?),
        Status::Failed => format!("✗ {}{mode}", measured(req, v)?),
        Status::NotEvaluated(_) => "not evaluated".to_string(),
    };
    Some((label, hover::verdict_markdown(req, v)))
}
