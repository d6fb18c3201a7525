//! Requirement verdicts at the worst corner of the tolerance box (language.md §5).
//!
//! Each requirement is measured at nominal and at every corner; the margin says by how much it
//! holds (positive) or fails (negative) in the subject's own SI unit; the worst margin over the
//! corners (and, for every-mode requirements, over the modes) decides the verdict and names the
//! corner. Limits may themselves use toleranced values: they are re-evaluated at each corner.

use serde::Serialize;
use sprung_syntax::ast::{CmpOp, Regime, Subject};

use crate::corners::Corner;
use crate::formula::{Evaluator, FormulaId, Formulas};
use crate::model::{Limit, Quantity, Requirement};
use crate::modes::ModeRegime;

/// A regime as a person writes it (`critically damped`).
pub fn regime_words(r: ModeRegime) -> &'static str {
    match r {
        ModeRegime::CriticallyDamped => "critically damped",
        ModeRegime::RigidBody => "rigid body",
        other => other.as_str(),
    }
}

/// Whether `is [not] REGIME` holds for a mode. `is not underdamped` fails for undamped modes
/// too: a mode with ζ = 0 still oscillates (language.md §5).
pub fn regime_matches(found: ModeRegime, regime: Regime, not: bool) -> bool {
    let is = match regime {
        Regime::Undamped => found == ModeRegime::Undamped,
        Regime::Underdamped => found == ModeRegime::Underdamped,
        Regime::CriticallyDamped => found == ModeRegime::CriticallyDamped,
        Regime::Overdamped => found == ModeRegime::Overdamped,
    };
    if !not {
        return is;
    }
    if regime == Regime::Underdamped {
        !matches!(found, ModeRegime::Underdamped | ModeRegime::Undamped)
    } else {
        !is
    }
}

/// What the modal analysis reports of one mode, as requirements need it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ModeSummary {
    /// rad/s.
    pub natural_frequency: f64,
    pub damping_ratio: f64,
    pub regime: ModeRegime,
}

#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Status {
    Passed,
    Failed,
    /// Not measured: the reason says why (a subject this version does not evaluate yet, a
    /// failed analysis, too many corners).
    NotEvaluated(String),
}

/// The outcome of one requirement.
#[derive(Clone, Debug, PartialEq)]
pub struct Verdict {
    pub status: Status,
    /// The measured value at the worst point, SI (rad/s for frequencies; use
    /// [`Verdict::value_for_report`] for the contract's hertz).
    pub value: Option<f64>,
    /// The limit the value was closest to breaking, SI.
    pub limit: Option<f64>,
    /// Positive when the requirement holds, in the subject's SI unit.
    pub margin: Option<f64>,
    /// The corner where the margin was smallest; `None` at nominal.
    pub worst_corner: Option<Corner>,
    /// The worst mode, 1-based, for modal subjects.
    pub mode: Option<u32>,
    /// The regime found at the worst point, for `regime` requirements.
    pub regime: Option<ModeRegime>,
    /// A sentence a reviewer understands without opening the file.
    pub message: String,
}

impl Verdict {
    pub fn passed(&self) -> bool {
        self.status == Status::Passed
    }
}

/// Whether a subject is evaluated from the modes alone.
pub fn is_modal(subject: &Subject) -> bool {
    matches!(
        subject,
        Subject::Damping { .. } | Subject::Frequency { .. } | Subject::Regime { .. }
    )
}

/// A value measured at one corner, with the margin against the limit at that corner.
#[derive(Clone, Copy, Debug)]
struct Point {
    value: f64,
    limit: f64,
    /// The bounds of an `in` or `outside` range at this corner.
    range: Option<(f64, f64)>,
    margin: f64,
    mode: Option<u32>,
    regime: Option<ModeRegime>,
}

/// The margin of `value` against a limit, and the limit it is closest to.
fn margin(limit: &Limit, value: f64, eval: &dyn Fn(&Quantity) -> f64) -> (f64, f64) {
    match limit {
        Limit::Compare { op, rhs } => {
            let l = eval(rhs);
            let m = match op {
                CmpOp::Lt | CmpOp::Le => l - value,
                CmpOp::Gt | CmpOp::Ge => value - l,
            };
            (m, l)
        }
        Limit::In { lo, hi } => {
            let (lo, hi) = (eval(lo), eval(hi));
            if value - lo < hi - value {
                (value - lo, lo)
            } else {
                (hi - value, hi)
            }
        }
        Limit::Outside { lo, hi } => {
            let (lo, hi) = (eval(lo), eval(hi));
            if lo - value > value - hi {
                (lo - value, lo)
            } else {
                (value - hi, hi)
            }
        }
        Limit::Is { .. } => (0.0, 0.0),
    }
}

/// Whether a margin passes: strict comparisons and `outside` need a positive margin.
fn holds(limit: &Limit, m: f64) -> bool {
    match limit {
        Limit::Compare {
            op: CmpOp::Lt | CmpOp::Gt,
            ..
        }
        | Limit::Outside { .. } => m > 0.0,
        _ => m >= 0.0,
    }
}

/// Evaluates one modal requirement over the given corners; `modes_at` gives the modes at each
/// corner (or why it could not). Rigid-body modes are excepted from every-mode requirements.
pub fn evaluate_modal(
    formulas: &Formulas,
    req: &Requirement,
    corners: &[(Corner, Result<Vec<ModeSummary>, String>)],
) -> Verdict {
    let roots: Vec<FormulaId> = limit_formulas(&req.limit);
    let mut ev = Evaluator::new(formulas, &roots);
    let mut worst: Option<(Point, &Corner)> = None;
    for (corner, modes) in corners {
        let modes = match modes {
            Ok(m) => m,
            Err(why) => {
                return not_evaluated(format!(
                    "the modal analysis failed at {}: {why}",
                    corner.describe()
                ));
            }
        };
        ev.run(&corner.deviations);
        let eval = |q: &Quantity| ev.get(q.formula);
        let chosen: Vec<(u32, &ModeSummary)> = match req.mode {
            Some(n) => match modes.get(n as usize - 1) {
                Some(m) => vec![(n, m)],
                None => return not_evaluated(format!("mode {n} does not exist")),
            },
            None => modes
                .iter()
                .enumerate()
                .filter(|(_, m)| m.regime != ModeRegime::RigidBody)
                .map(|(i, m)| (i as u32 + 1, m))
                .collect(),
        };
        for (index, mode) in chosen {
            let point = match (&req.subject, &req.limit) {
                (_, Limit::Is { not, regime }) => {
                    let ok = regime_matches(mode.regime, *regime, *not);
                    Point {
                        value: 0.0,
                        limit: 0.0,
                        range: None,
                        margin: if ok { 1.0 } else { -1.0 },
                        mode: Some(index),
                        regime: Some(mode.regime),
                    }
                }
                (Subject::Frequency { .. }, limit) => {
                    let (m, l) = margin(limit, mode.natural_frequency, &eval);
                    Point {
                        value: mode.natural_frequency,
                        limit: l,
                        range: range_of(limit, &eval),
                        margin: m,
                        mode: Some(index),
                        regime: None,
                    }
                }
                (_, limit) => {
                    let (m, l) = margin(limit, mode.damping_ratio, &eval);
                    Point {
                        value: mode.damping_ratio,
                        limit: l,
                        range: range_of(limit, &eval),
                        margin: m,
                        mode: Some(index),
                        regime: None,
                    }
                }
            };
            // Strictly smaller margins win, so the first (nominal, lowest mode) is kept on ties.
            if worst.as_ref().is_none_or(|(w, _)| worse(&point, w)) {
                worst = Some((point, corner));
            }
        }
    }
    finish(req, worst, "the system has only rigid-body modes")
}

/// Evaluates one driven-response requirement (`separation`, `transmissibility`, `amplitude`,
/// `settling`, `overshoot`, `sag`) from its value at each corner (SI; or why it could not be
/// measured there).
pub fn evaluate_response(
    formulas: &Formulas,
    req: &Requirement,
    corners: &[(Corner, Result<f64, String>)],
) -> Verdict {
    let roots: Vec<FormulaId> = limit_formulas(&req.limit);
    let mut ev = Evaluator::new(formulas, &roots);
    let mut worst: Option<(Point, &Corner)> = None;
    for (corner, value) in corners {
        let value = match value {
            Ok(v) => *v,
            Err(why) => {
                let at = if corner.is_nominal() {
                    "nominal values".to_string()
                } else {
                    corner.describe()
                };
                return not_evaluated(format!("could not be computed at {at}: {why}"));
            }
        };
        ev.run(&corner.deviations);
        let eval = |q: &Quantity| ev.get(q.formula);
        let (m, l) = margin(&req.limit, value, &eval);
        let point = Point {
            value,
            limit: l,
            range: range_of(&req.limit, &eval),
            margin: m,
            mode: None,
            regime: None,
        };
        if worst.as_ref().is_none_or(|(w, _)| worse(&point, w)) {
            worst = Some((point, corner));
        }
    }
    finish(req, worst, "nothing to evaluate")
}

/// Whether `p` is worse than the worst so far. Margins equal to rounding (a value that follows
/// its tolerance exactly, such as a damping ratio computed from the stiffness it damps) keep
/// the earlier point, so nominal is named rather than an arbitrary corner.
fn worse(p: &Point, w: &Point) -> bool {
    let scale = p
        .value
        .abs()
        .max(p.limit.abs())
        .max(w.value.abs())
        .max(1e-300);
    p.margin < w.margin - 1e-12 * scale
}

fn finish(req: &Requirement, worst: Option<(Point, &Corner)>, empty: &str) -> Verdict {
    let Some((point, corner)) = worst else {
        return not_evaluated(empty.to_string());
    };
    let passed = match req.limit {
        Limit::Is { .. } => point.margin > 0.0,
        _ => holds(&req.limit, point.margin),
    };
    let worst_corner = (!corner.is_nominal()).then(|| corner.clone());
    let message = describe(req, &point, passed, worst_corner.as_ref());
    Verdict {
        status: if passed {
            Status::Passed
        } else {
            Status::Failed
        },
        value: (!matches!(req.limit, Limit::Is { .. })).then_some(point.value),
        limit: (!matches!(req.limit, Limit::Is { .. })).then_some(point.limit),
        margin: (!matches!(req.limit, Limit::Is { .. })).then_some(point.margin),
        worst_corner,
        mode: point.mode,
        regime: point.regime,
        message,
    }
}

pub fn not_evaluated(reason: String) -> Verdict {
    Verdict {
        status: Status::NotEvaluated(reason.clone()),
        value: None,
        limit: None,
        margin: None,
        worst_corner: None,
        mode: None,
        regime: None,
        message: reason,
    }
}

fn limit_formulas(limit: &Limit) -> Vec<FormulaId> {
    match limit {
        Limit::Compare { rhs, .. } => vec![rhs.formula],
        Limit::In { lo, hi } | Limit::Outside { lo, hi } => vec![lo.formula, hi.formula],
        Limit::Is { .. } => vec![],
    }
}

/// A number with four significant figures, without trailing noise.
pub fn sig(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let mag = x.abs().log10().floor() as i32;
    if !(-3..6).contains(&mag) {
        return format!("{x:.3e}");
    }
    let decimals = (3 - mag).max(0) as usize;
    let s = format!("{x:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

fn range_of(limit: &Limit, eval: &dyn Fn(&Quantity) -> f64) -> Option<(f64, f64)> {
    match limit {
        Limit::In { lo, hi } | Limit::Outside { lo, hi } => Some((eval(lo), eval(hi))),
        _ => None,
    }
}

fn describe(req: &Requirement, p: &Point, passed: bool, corner: Option<&Corner>) -> String {
    let mode = p.mode.map(|m| format!(" of mode {m}")).unwrap_or_default();
    let at = corner.map_or_else(
        || "at nominal values".to_string(),
        |c| format!("worst at {}", c.describe()),
    );
    if let Limit::Is { not, regime } = req.limit {
        let found = p.regime.map_or("unknown", regime_words);
        let want = format!("{}{}", if not { "not " } else { "" }, regime.words());
        let verdict = if passed { "as required" } else { "required" };
        return format!("regime{mode}: {found}, {want} {verdict}; {at}");
    }
    let show = |v: f64| show_value(req, v);
    let word = req.subject.word();
    let relation = match &req.limit {
        Limit::Compare { op, .. } => {
            let actual = if passed {
                match op {
                    CmpOp::Lt => "<",
                    CmpOp::Le => "<=",
                    CmpOp::Gt => ">",
                    CmpOp::Ge => ">=",
                }
            } else {
                match op {
                    CmpOp::Lt | CmpOp::Le => {
                        if p.value == p.limit {
                            "="
                        } else {
                            ">"
                        }
                    }
                    CmpOp::Gt | CmpOp::Ge => {
                        if p.value == p.limit {
                            "="
                        } else {
                            "<"
                        }
                    }
                }
            };
            format!("{} {actual} {} required", show(p.value), show(p.limit))
        }
        Limit::In { .. } | Limit::Outside { .. } => {
            let (lo, hi) = p.range.unwrap_or((p.limit, p.limit));
            let inside = matches!(req.limit, Limit::In { .. }) == passed;
            let place = if inside { "inside" } else { "outside" };
            let want = if matches!(req.limit, Limit::In { .. }) {
                "in"
            } else {
                "outside"
            };
            format!(
                "{} {place} {} .. {}, {want} required",
                show(p.value),
                show(lo),
                show(hi)
            )
        }
        Limit::Is { .. } => String::new(),
    };
    let margin = show(p.margin);
    format!("{word}{mode}: {relation} (margin {margin}); {at}")
}

/// A value of the requirement's subject in the unit a reader expects: hertz for frequencies,
/// millimetres for lengths, seconds for times, plain ratios otherwise (SI inside).
fn show_value(req: &Requirement, v: f64) -> String {
    let dim = match &req.limit {
        Limit::Compare { rhs, .. } => Some(rhs.dim),
        Limit::In { lo, .. } | Limit::Outside { lo, .. } => Some(lo.dim),
        Limit::Is { .. } => None,
    };
    match (&req.subject, dim) {
        (Subject::Frequency { .. }, _) => format!("{} Hz", sig(v / std::f64::consts::TAU)),
        (_, Some(crate::dim::Dim::LENGTH)) => format!("{} mm", sig(v * 1000.0)),
        (_, Some(crate::dim::Dim::TIME)) => format!("{} s", sig(v)),
        (Subject::Amplitude { .. }, _) => format!("{} rad", sig(v)),
        _ => sig(v),
    }
}
