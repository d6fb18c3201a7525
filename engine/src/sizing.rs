//! Sizing one damper so that a failed damping or regime requirement passes at the worst corner
//! of the tolerance box (language.md §5).
//!
//! The damper's value expression is replaced by a plain value c (its own `± ...` tolerance
//! kept), and c is searched for: a log-spaced scan outwards from the present value finds the
//! nearest value that passes, then bisection on the verdict narrows the boundary between that
//! value and its failing neighbour, and the result is rounded (3 significant figures, more only
//! when the passing range is narrower) away from the boundary into the passing side and checked
//! once more at every corner. The verdict is the engine's own requirement evaluation, so what
//! the search accepts is what the analysis will say of the edited file. For one mass and a
//! lower bound ζ ≥ z this reproduces c = 2 z √(k m) − (the other dampers) at the worst corner.
//!
//! The work is bounded: every candidate costs a modal analysis per corner, so a system whose
//! corners times the search's evaluations exceed [`SizingConfig::max_work`] is refused rather
//! than searched. Everything here is deterministic.

use nalgebra_sparse::{CooMatrix, CscMatrix, SparseEntry, SparseEntryMut};

use crate::eigen::entry_of;
use sprung_syntax::Span;
use sprung_syntax::ast::{self, ElementKind, ExprKind, Regime, StatementKind, Subject};

use crate::Checked;
use crate::assemble::{Assembler, Limits, Matrices};
use crate::corners::{self, Corner};
use crate::formula::Node;
use crate::model::{End, Limit, Model, Requirement, SystemModel};
use crate::modes::{self, ModalConfig};
use crate::requirements::{self, ModeSummary, Status, Verdict};
use crate::units;

/// Settings of the damper search.
#[derive(Clone, Debug)]
pub struct SizingConfig {
    pub modal: ModalConfig,
    /// The largest estimated work (rough floating-point operations) a search may take; about
    /// a few hundred milliseconds at the default.
    pub max_work: f64,
}

impl Default for SizingConfig {
    fn default() -> Self {
        SizingConfig {
            modal: ModalConfig::default(),
            max_work: 3e8,
        }
    }
}

/// A damper value that makes the requirement pass, and how to write it.
#[derive(Clone, Debug, PartialEq)]
pub struct DamperSize {
    /// The value in [`DamperSize::unit`], as written in [`DamperSize::text`].
    pub amount: f64,
    /// The value in SI (N·s/m or N·m·s/rad), exactly as the checker will read the text.
    pub si: f64,
    /// The unit the value is written in: the damper's own when its value is a literal, else
    /// `N*s/m` or `N*m*s/rad`.
    pub unit: String,
    /// Where to write: the number of a literal (its unit stays) or the whole value expression
    /// (its tolerance stays).
    pub span: Span,
    /// The text that replaces [`DamperSize::span`].
    pub text: String,
    /// Whether the system has tolerance corners (so "worst corner" means something).
    pub toleranced: bool,
    /// The requirement's verdict with the new value, at its worst corner.
    pub verdict: Verdict,
}

#[derive(Clone, Debug, PartialEq)]
pub enum SizingError {
    /// The indices do not name a damper and a damping or regime requirement of one system.
    NotSizable,
    /// The system has errors or nothing to analyze.
    NotAnalyzed,
    /// The search would take more than the budget.
    TooMuchWork { work: f64, budget: f64 },
    /// No value in the searched range (six decades around the system's critical damping)
    /// meets the requirement: the damper cannot reach the mode, or other dampers already
    /// exceed an upper bound.
    NoValue,
}

impl std::fmt::Display for SizingError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SizingError::NotSizable => {
                f.write_str("not a damper and a damping or regime requirement of one system")
            }
            SizingError::NotAnalyzed => f.write_str("the system is not analyzed"),
            SizingError::TooMuchWork { work, budget } => write!(
                f,
                "sizing would take about {work:.0e} operations, more than the budget of {budget:.0e}"
            ),
            SizingError::NoValue => f.write_str("no damper value meets the requirement"),
        }
    }
}

impl std::error::Error for SizingError {}

/// Grid points per decade of the scan, and the scan's range around the critical damping scale.
const PER_DECADE: f64 = 12.0;
const BELOW: f64 = 1e-4;
const ABOVE: f64 = 1e2;
/// The bisection stops when the bracket is this narrow (relative).
const NARROW: f64 = 1e-10;
/// Evaluations at every corner a search takes, about: a candidate that fails stops at its
/// first failing corner (usually the one that failed before), so the scan's 73 points and the
/// failing half of the bisection's 35 halvings cost little; the passing half, the roundings
/// and a band's second side are what count.
const EVALUATIONS: f64 = 80.0;

/// How the damper's value keeps its own tolerance once written as a plain value.
#[derive(Clone, Copy, Debug)]
enum Own {
    None,
    Relative(usize),
    Absolute(usize),
}

/// Finds a value for damper `damper` (index into the system's elements) that makes requirement
/// `requirement` (index into its requirements) of system `system` pass at every corner.
pub fn size_damper(
    checked: &Checked,
    system: usize,
    requirement: usize,
    damper: usize,
    config: &SizingConfig,
) -> Result<DamperSize, SizingError> {
    let model = &checked.model;
    let sys = model.systems.get(system).ok_or(SizingError::NotSizable)?;
    let req = sys
        .requirements
        .get(requirement)
        .ok_or(SizingError::NotSizable)?;
    let el = sys.elements.get(damper).ok_or(SizingError::NotSizable)?;
    if el.kind != ElementKind::Damper
        || !matches!(
            req.subject,
            Subject::Damping { .. } | Subject::Regime { .. }
        )
    {
        return Err(SizingError::NotSizable);
    }
    if sys.has_errors || sys.dofs.is_empty() {
        return Err(SizingError::NotAnalyzed);
    }
    let value = damper_value(&checked.parse.file, el.name_span).ok_or(SizingError::NotSizable)?;
    let own = match (&value.tolerance, model.formulas.node(el.value.formula)) {
        (Some(_), Node::Relative { param, .. }) => Own::Relative(*param),
        (Some(_), Node::Absolute { param, .. }) => Own::Absolute(*param),
        _ => Own::None,
    };
    let writing = Writing::of(value, el.rotational);

    // The corners that matter: those of the masses, springs, other dampers, the damper's own
    // tolerance and the requirement's limit. Drives do not move the modes.
    let mut roots: Vec<_> = sys.dofs.iter().map(|d| d.value.formula).collect();
    for (i, e) in sys.elements.iter().enumerate() {
        if i != damper {
            roots.push(e.value.formula);
        }
    }
    roots.extend(limit_formulas(&req.limit));
    let mut params: Vec<usize> = model.formulas.params_of(&roots).into_iter().collect();
    if let Own::Relative(p) | Own::Absolute(p) = own
        && !params.contains(&p)
    {
        params.push(p);
        params.sort_unstable();
    }
    let mut boxed = sys.clone();
    boxed.params = params;
    if !corners::within_limit(&boxed) {
        return Err(SizingError::TooMuchWork {
            work: f64::INFINITY,
            budget: config.max_work,
        });
    }
    let count = corners::count(&boxed);
    let n = sys.dofs.len() as f64;
    // An eigendecomposition of the 2n-square state matrix, plus a fixed cost per call that
    // dominates for small systems (measured: about 10 µs per corner for three masses).
    let work = EVALUATIONS * count as f64 * (10.0 * (2.0 * n).powi(3) + 1.5e4);
    if work > config.max_work {
        return Err(SizingError::TooMuchWork {
            work,
            budget: config.max_work,
        });
    }
    // Corners over the old parameter box too: the old value's own dependencies are gone once
    // it is written as a plain value, and corners that differ only there repeat each other.
    let corner_list: Vec<Corner> = corners::corners(model, &boxed).collect();
    let assembler =
        Assembler::new(model, sys, Limits::default()).map_err(|_| SizingError::NotAnalyzed)?;
    let old: Vec<f64> = corner_list
        .iter()
        .map(|c| model.formulas.eval(el.value.formula, &c.deviations))
        .collect();
    let mut search = Search {
        model,
        sys,
        damper,
        own,
        old,
        corners: corner_list,
        assembler,
        modal: config.modal,
        first: 0,
    };
    let nominal = search
        .assembler
        .assemble(&vec![0.0; model.params.len()])
        .map_err(|_| SizingError::NotAnalyzed)?;
    let (lo, hi) = bracket(&nominal).ok_or(SizingError::NoValue)?;
    let present = el.value.nominal;

    // A band (`in 0.2 .. 0.25`, `is critically damped`: |ζ − 1| ≤ ε) may pass only over a
    // range the scan steps over. Then the band's two sides are searched apart: where the
    // modes stop being too lightly damped (or, from above, too heavily), the band begins.
    let mut tries = vec![req.clone()];
    for side in band_sides(req) {
        let mut r = req.clone();
        r.limit = side;
        tries.push(r);
    }
    let mut result = Err(SizingError::NoValue);
    for r in &tries {
        if let Some((fail, pass)) = search.boundary(r, present, lo, hi) {
            result = finish(&mut search, req, fail, pass, &writing, count);
            if result.is_ok() {
                break;
            }
        }
    }
    result
}

/// The two one-sided limits a band is made of (none for a one-sided limit).
fn band_sides(req: &Requirement) -> Vec<Limit> {
    match &req.limit {
        Limit::In { lo, hi } => vec![
            Limit::Compare {
                op: ast::CmpOp::Ge,
                rhs: *lo,
            },
            Limit::Compare {
                op: ast::CmpOp::Le,
                rhs: *hi,
            },
        ],
        Limit::Is {
            not: false,
            regime: Regime::CriticallyDamped,
        } => vec![
            Limit::Is {
                not: true,
                regime: Regime::Underdamped,
            },
            Limit::Is {
                not: true,
                regime: Regime::Overdamped,
            },
        ],
        _ => Vec::new(),
    }
}

/// Rounds the passing end of a boundary away from it (3 figures, more when the passing range
/// is narrower) and checks the written value at every corner.
fn finish(
    search: &mut Search<'_>,
    req: &Requirement,
    fail: f64,
    pass: f64,
    writing: &Writing,
    count: u64,
) -> Result<DamperSize, SizingError> {
    let up = pass > fail;
    for digits in 3..=12 {
        let margin = if digits <= 4 { 2e-3 } else { 0.0 };
        let target = pass * if up { 1.0 + margin } else { 1.0 - margin } / writing.factor;
        let Some(text) = round_text(target, digits, up) else {
            continue;
        };
        let Ok(amount) = text.parse::<f64>() else {
            continue;
        };
        // Exactly what the checker computes from the written text.
        let si = amount * writing.factor;
        let verdict = search.verdict(req, si);
        if verdict.status == Status::Passed {
            let replacement = if writing.literal {
                text.clone()
            } else {
                format!("{text} {}", writing.unit)
            };
            return Ok(DamperSize {
                amount,
                si,
                unit: writing.unit.clone(),
                span: writing.span,
                text: replacement,
                toleranced: count > 1,
                verdict,
            });
        }
    }
    Err(SizingError::NoValue)
}

/// The syntax of the damper's value, found by its name's span.
fn damper_value(file: &ast::File, name_span: Span) -> Option<&ast::Value> {
    file.items.iter().find_map(|item| match item {
        ast::Item::System(s) => s.statements.iter().find_map(|st| match &st.kind {
            StatementKind::Element { name, value, .. } if name.span == name_span => Some(value),
            _ => None,
        }),
        _ => None,
    })
}

/// How the new value is written.
struct Writing {
    unit: String,
    /// SI per unit.
    factor: f64,
    span: Span,
    /// Whether only the number of a literal is replaced (its unit kept).
    literal: bool,
}

impl Writing {
    fn of(value: &ast::Value, rotational: bool) -> Writing {
        if let ExprKind::Number {
            text,
            unit: Some(u),
            percent: false,
            ..
        } = &value.expr.kind
            && let Ok(atom) = units::eval_unit(u)
        {
            let start = value.expr.span.start;
            return Writing {
                unit: u.text(),
                factor: atom.factor,
                span: Span::new(start, start + text.len()),
                literal: true,
            };
        }
        Writing {
            unit: if rotational { "N*m*s/rad" } else { "N*s/m" }.to_string(),
            factor: 1.0,
            span: value.expr.span,
            literal: false,
        }
    }
}

/// The range searched: from 10⁻⁴ of the smallest to 10² times the largest critical damping
/// 2√(K_ii M_ii) of a single coordinate held by its own diagonal stiffness.
fn bracket(m: &Matrices) -> Option<(f64, f64)> {
    let scales: Vec<f64> = (0..m.dofs())
        .map(|i| 2.0 * (entry_of(&m.k, i, i) * entry_of(&m.m, i, i)).sqrt())
        .filter(|c| c.is_finite() && *c > 0.0)
        .collect();
    let lo = scales.iter().copied().fold(f64::INFINITY, f64::min) * BELOW;
    let hi = scales.iter().copied().fold(0.0, f64::max) * ABOVE;
    (lo.is_finite() && hi.is_finite() && lo > 0.0 && lo < hi).then_some((lo, hi))
}

/// `x` rounded to `digits` significant figures, up or down, as number text the lexer reads.
fn round_text(x: f64, digits: i32, up: bool) -> Option<String> {
    if !(x.is_finite() && x > 0.0) {
        return None;
    }
    let mag = x.log10().floor() as i32;
    let decimals = digits - 1 - mag;
    let scale = 10f64.powi(decimals);
    let scaled = x * scale;
    // Guard against 412.0000000001 rounding up to 413.
    let near = scaled.round();
    let r = if (scaled - near).abs() <= 1e-9 * scaled {
        near
    } else if up {
        scaled.ceil()
    } else {
        scaled.floor()
    };
    if r <= 0.0 {
        return None;
    }
    if (-4..=9).contains(&mag) {
        let d = decimals.max(0) as usize;
        let value = r / scale;
        let s = format!("{value:.d$}");
        let s = if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        };
        Some(s)
    } else {
        // Mantissa with `digits` figures and a decimal exponent: `1.25e-7`.
        let mantissa = r / 10f64.powi(digits - 1);
        let d = (digits - 1).max(0) as usize;
        let m = format!("{mantissa:.d$}");
        let m = if m.contains('.') {
            m.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            m
        };
        Some(format!("{m}e{mag}"))
    }
}

fn limit_formulas(limit: &Limit) -> Vec<crate::formula::FormulaId> {
    match limit {
        Limit::Compare { rhs, .. } => vec![rhs.formula],
        Limit::In { lo, hi } | Limit::Outside { lo, hi } => vec![lo.formula, hi.formula],
        Limit::Is { .. } => vec![],
    }
}

fn summaries(result: &modes::ModalResult) -> Vec<ModeSummary> {
    result
        .modes
        .iter()
        .map(|m| ModeSummary {
            natural_frequency: m.natural_frequency,
            damping_ratio: m.damping_ratio.unwrap_or(f64::NAN),
            regime: m.regime,
        })
        .collect()
}

struct Search<'m> {
    model: &'m Model,
    sys: &'m SystemModel,
    damper: usize,
    own: Own,
    /// The damper's present value at each corner, taken out of C before the new one goes in.
    old: Vec<f64>,
    corners: Vec<Corner>,
    assembler: Assembler<'m>,
    modal: ModalConfig,
    /// The corner that failed last: tried first next time, since it usually fails again.
    first: usize,
}

impl Search<'_> {
    /// The modes at one corner with the damper at `c` (SI, before its own tolerance).
    fn modes_at(&mut self, c: f64, index: usize) -> Result<Vec<ModeSummary>, String> {
        let corner = &self.corners[index];
        let mut mats = self
            .assembler
            .assemble(&corner.deviations)
            .map_err(|e| e.to_string())?;
        let el = &self.sys.elements[self.damper];
        let old = self.old[index];
        let dev = |p: usize| corner.deviations.get(p).copied().unwrap_or(0.0);
        let new = match self.own {
            Own::None => c,
            Own::Relative(p) => c * (1.0 + dev(p)),
            Own::Absolute(p) => c + dev(p),
        };
        stamp(&mut mats.c, el.a, el.b, new - old);
        modes::analyze(&mats, &self.modal)
            .map(|r| summaries(&r))
            .map_err(|e| e.to_string())
    }

    /// Whether `req` passes at every corner with the damper at `c`; stops at the first
    /// corner that fails.
    fn passes(&mut self, req: &Requirement, c: f64) -> bool {
        let n = self.corners.len();
        let order: Vec<usize> = std::iter::once(self.first)
            .chain((0..n).filter(|&i| i != self.first))
            .collect();
        for i in order {
            let modes = self.modes_at(c, i);
            let one = [(self.corners[i].clone(), modes)];
            if !requirements::evaluate_modal(&self.model.formulas, req, &one).passed() {
                self.first = i;
                return false;
            }
        }
        true
    }

    /// The verdict over every corner with the damper at `c`.
    fn verdict(&mut self, req: &Requirement, c: f64) -> Verdict {
        let points: Vec<(Corner, Result<Vec<ModeSummary>, String>)> = (0..self.corners.len())
            .map(|i| (self.corners[i].clone(), self.modes_at(c, i)))
            .collect();
        requirements::evaluate_modal(&self.model.formulas, req, &points)
    }

    /// A failing and a passing value a hair apart: the passing value nearest the present one
    /// (on a log scale), and the boundary found by bisection between it and its failing
    /// neighbour. `None` when nothing in `[lo, hi]` passes.
    fn boundary(
        &mut self,
        req: &Requirement,
        present: f64,
        lo: f64,
        hi: f64,
    ) -> Option<(f64, f64)> {
        let start = if present > 0.0 && present.is_finite() {
            present.clamp(lo, hi)
        } else {
            lo
        };
        if self.passes(req, start) {
            // Nothing to do at this value; the caller's verdict said otherwise, so the edit
            // would not change anything useful.
            return None;
        }
        // Capped: a system whose coordinates differ by hundreds of decades still scans a
        // bounded grid (coarser then).
        let steps = ((hi / lo).log10() * PER_DECADE).ceil().clamp(1.0, 600.0) as i32;
        let per_decade = f64::from(steps) / (hi / lo).log10();
        let grid: Vec<f64> = (0..=steps)
            .map(|i| lo * 10f64.powf(f64::from(i) / per_decade))
            .collect();
        let mut order: Vec<usize> = (0..grid.len()).collect();
        let distance = |c: f64| (c / start).ln().abs();
        order.sort_by(|&a, &b| {
            distance(grid[a])
                .total_cmp(&distance(grid[b]))
                .then(a.cmp(&b))
        });
        let pass_at = order.into_iter().find(|&i| self.passes(req, grid[i]))?;
        let p = grid[pass_at];
        // Every grid point nearer the start failed, so the neighbour towards it did too.
        let q = if p > start {
            grid[..pass_at]
                .iter()
                .copied()
                .rfind(|&g| g > start)
                .unwrap_or(start)
        } else {
            grid[pass_at + 1..]
                .iter()
                .copied()
                .find(|&g| g < start)
                .unwrap_or(start)
        };
        let (mut fail, mut pass) = (q, p);
        // The geometric mean through logarithms cannot overflow; the cap is a guard only
        // (from one scan step to NARROW takes about 35 halvings).
        for _ in 0..100 {
            if (pass.ln() - fail.ln()).abs() <= NARROW {
                break;
            }
            let mid = ((fail.ln() + pass.ln()) / 2.0).exp();
            if self.passes(req, mid) {
                pass = mid;
            } else {
                fail = mid;
            }
        }
        Some((fail, pass))
    }
}

/// Adds `value` of a two-terminal element between `a` and `b` to a damping matrix. Assembly
/// stores every stamp of every damper, even a zero one, so the entries are normally there and
/// are updated in place; a matrix without them (one built from dense data) is rebuilt with them.
fn stamp(c: &mut CscMatrix<f64>, a: End, b: End, value: f64) {
    let stamps = match (a, b) {
        (End::Dof(i), End::Dof(j)) if i != j => {
            vec![(i, i, value), (j, j, value), (i, j, -value), (j, i, -value)]
        }
        (End::Dof(i), End::Ground) | (End::Ground, End::Dof(i)) => vec![(i, i, value)],
        _ => vec![],
    };
    let stored = stamps
        .iter()
        .all(|&(i, j, _)| matches!(c.get_entry(i, j), Some(SparseEntry::NonZero(_))));
    if stored {
        for (i, j, v) in stamps {
            if let Some(SparseEntryMut::NonZero(x)) = c.get_entry_mut(i, j) {
                *x += v;
            }
        }
        return;
    }
    let mut coo = CooMatrix::new(c.nrows(), c.ncols());
    for (i, j, &v) in c.triplet_iter() {
        coo.push(i, j, v);
    }
    for (i, j, v) in stamps {
        // Ends outside the matrix are not stamped, as a dense matrix would refuse them too.
        if i < c.nrows() && j < c.ncols() {
            coo.push(i, j, v);
        }
    }
    *c = CscMatrix::from(&coo);
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::{self, Config};

    /// Sizes damper `damper` of the first system for its requirement `req`.
    fn size(text: &str, req: usize, damper: &str) -> Result<DamperSize, SizingError> {
        let checked = crate::check(text);
        assert!(!checked.has_errors(), "{:?}", checked.diagnostics);
        let sys = &checked.model.systems[0];
        let d = sys
            .elements
            .iter()
            .position(|e| e.name == damper)
            .expect("damper");
        size_damper(&checked, 0, req, d, &SizingConfig::default())
    }

    /// The text with the sizing applied.
    fn applied(text: &str, s: &DamperSize) -> String {
        format!("{}{}{}", &text[..s.span.start], s.text, &text[s.span.end..])
    }

    /// Whether every requirement of the first system passes after check and analysis.
    fn all_pass(text: &str) -> bool {
        let checked = crate::check(text);
        let a = analysis::analyze(&checked, &Config::default());
        !checked.has_errors() && a.systems[0].verdicts.iter().all(Verdict::passed)
    }

    fn one_mass(m: &str, k: &str, extra: &str, require: &str) -> String {
        format!(
            "system pad {{\n  mass m = {m}\n  spring k between m and ground = {k}\n  damper d between m and ground = 10 N*s/m\n{extra}  require {require}\n}}\n"
        )
    }

    #[test]
    fn one_mass_matches_the_closed_form() {
        // Common practice (closed form for one mass): c = 2 ζ √(k m).
        // 2 · 0.05 · √(40000 · 10) = 63.246 N·s/m.
        let text = one_mass("10 kg", "40 kN/m", "", "damping >= 0.05");
        let s = size(&text, 0, "d").unwrap();
        let exact = 2.0 * 0.05 * (40000.0f64 * 10.0).sqrt();
        assert!(s.si >= exact && s.si <= exact * 1.01, "{s:?}");
        assert_eq!(s.text, "63.4");
        assert_eq!(s.unit, "N*s/m");
        assert!(all_pass(&applied(&text, &s)));
        // Another damper already gives 20 N·s/m: only the rest is needed.
        let text = one_mass(
            "10 kg",
            "40 kN/m",
            "  damper e between m and ground = 20 N*s/m\n",
            "damping >= 0.05",
        );
        let s = size(&text, 0, "d").unwrap();
        assert!(
            s.si >= exact - 20.0 && s.si <= (exact - 20.0) * 1.01,
            "{s:?}"
        );
    }

    #[test]
    fn regimes_size_to_critical_damping() {
        // c_critical = 2 √(k m) = 2 √(40000 · 10) = 1264.911 N·s/m (closed form, common
        // practice).
        let critical = 2.0 * (40000.0f64 * 10.0).sqrt();
        let text = one_mass("10 kg", "40 kN/m", "", "regime is not underdamped");
        let s = size(&text, 0, "d").unwrap();
        assert!(s.si >= critical && s.si <= critical * 1.01, "{s:?}");
        assert!(all_pass(&applied(&text, &s)));
        let text = one_mass("10 kg", "40 kN/m", "", "regime is overdamped");
        let s = size(&text, 0, "d").unwrap();
        assert!(s.si > critical && s.si <= critical * 1.01, "{s:?}");
        // Critically damped means |ζ − 1| ≤ 1e-6: more figures are needed.
        let text = one_mass("10 kg", "40 kN/m", "", "regime is critically damped");
        let s = size(&text, 0, "d").unwrap();
        assert!((s.si / critical - 1.0).abs() < 1e-6, "{s:?}");
        assert!(all_pass(&applied(&text, &s)), "{}", applied(&text, &s));
    }

    #[test]
    fn the_worst_corner_governs() {
        // ζ = c / (2√(k m)) is smallest with k and m both high: c = 2 · 0.05 · √(48000 · 11)
        // = 72.664 N·s/m, not the nominal 63.246.
        let text = one_mass("10 kg ± 10%", "40 kN/m ± 20%", "", "damping >= 0.05");
        let s = size(&text, 0, "d").unwrap();
        let worst = 2.0 * 0.05 * (48000.0f64 * 11.0).sqrt();
        assert!(s.si >= worst && s.si <= worst * 1.01, "{s:?}");
        assert!(s.toleranced);
        let corner = s.verdict.worst_corner.as_ref().map(Corner::describe);
        assert_eq!(corner.as_deref(), Some("m +10%, k +20%"));
        // The damper's own tolerance is kept: at its low end (−10%) it must still pass, so
        // c = 72.664 / 0.9 = 80.738, and only the number is replaced.
        let text = text.replace("= 10 N*s/m", "= 10 N*s/m ± 10%");
        let s = size(&text, 0, "d").unwrap();
        assert!(s.si >= worst / 0.9 && s.si <= worst / 0.9 * 1.01, "{s:?}");
        let edited = applied(&text, &s);
        assert!(
            edited.contains(&format!("= {} N*s/m ± 10%", s.text)),
            "{edited}"
        );
        assert!(all_pass(&edited));
    }

    #[test]
    fn a_band_narrower_than_the_scan() {
        // ζ in 0.6 .. 0.7 with the spring ±10%: at k high ζ ≥ 0.6 needs
        // c ≥ 0.6 · 2√(19800 · 95) = 1645.8 N·s/m, at k low ζ ≤ 0.7 needs
        // c ≤ 0.7 · 2√(16200 · 95) = 1736.8 N·s/m (closed form, common practice): a range
        // of 5.5%, narrower than one step of the scan.
        let text = one_mass("95 kg", "18 kN/m ± 10%", "", "damping in 0.6 .. 0.7");
        let s = size(&text, 0, "d").unwrap();
        assert!((1645.8..=1736.8).contains(&s.si), "{s:?}");
        assert!(all_pass(&applied(&text, &s)));
    }

    #[test]
    fn a_two_mass_chain_against_brute_force() {
        let text = "system chain {\n  mass a = 4 kg\n  mass b = 2 kg\n  spring ka between a and ground = 30 kN/m\n  spring kb between a and b = 12 kN/m\n  damper d between b and ground = 5 N*s/m\n  require damping >= 0.04\n}\n";
        let s = size(text, 0, "d").unwrap();
        let edited = applied(text, &s);
        assert!(edited.contains(&format!("= {} N*s/m", s.text)), "{edited}");
        assert!(all_pass(&edited));
        // Brute force through the whole pipeline: the first value that passes on a 0.5%
        // geometric grid upwards from two thirds of the sized value. The sizing rounds up by
        // at most about 1.2% (0.2% margin, then 3 figures), so the two agree within that.
        let mut c = s.si / 1.5;
        let first = loop {
            let t = text.replace("= 5 N*s/m", &format!("= {c} N*s/m"));
            if all_pass(&t) {
                break c;
            }
            c *= 1.005;
            assert!(c < s.si * 1.01, "nothing passes up to the sized {}", s.si);
        };
        assert!(
            first <= s.si * 1.005 && first >= s.si / 1.0125,
            "{first} vs {}",
            s.si
        );
    }

    #[test]
    fn a_mode_the_damper_cannot_reach() {
        // Two equal masses on equal springs: in mode 1 they move together, so a damper between
        // them damps only mode 2.
        let text = "system twins {\n  mass a = 1 kg\n  mass b = 1 kg\n  spring ka between a and ground = 1 kN/m\n  spring kb between b and ground = 1 kN/m\n  spring c between a and b = 500 N/m\n  damper d between a and b = 1 N*s/m\n  require damping of mode 1 >= 0.05\n  require damping of mode 2 >= 0.05\n}\n";
        assert_eq!(size(text, 0, "d"), Err(SizingError::NoValue));
        assert!(size(text, 1, "d").is_ok());
    }

    #[test]
    fn the_work_is_bounded() {
        let text = one_mass("10 kg ± 10%", "40 kN/m ± 20%", "", "damping >= 0.05");
        let checked = crate::check(&text);
        let config = SizingConfig {
            max_work: 1e3,
            ..SizingConfig::default()
        };
        assert!(matches!(
            size_damper(&checked, 0, 0, 1, &config),
            Err(SizingError::TooMuchWork { .. })
        ));
        // Not a damper, not a damping requirement: refused.
        assert_eq!(
            size_damper(&checked, 0, 0, 0, &SizingConfig::default()),
            Err(SizingError::NotSizable)
        );
    }

    #[test]
    fn rounding_goes_the_safe_way() {
        assert_eq!(round_text(412.3, 3, true).as_deref(), Some("413"));
        assert_eq!(round_text(412.3, 3, false).as_deref(), Some("412"));
        assert_eq!(round_text(0.012341, 3, true).as_deref(), Some("0.0124"));
        assert_eq!(round_text(1264.9111, 7, true).as_deref(), Some("1264.912"));
        assert_eq!(round_text(1.234e-7, 3, true).as_deref(), Some("1.24e-7"));
    }
}
