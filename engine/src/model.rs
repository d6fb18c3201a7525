//! The checked model: every value in SI, every name resolved, every dimension verified.
//!
//! Values are kept as nodes of a [`Formulas`] arena rather than as plain numbers, so that any
//! value can be re-evaluated at a corner of the tolerance box (language.md §5): a toleranced
//! value is a formula of its own deviation parameter, and a value computed from it follows it.

use sprung_syntax::Span;
use sprung_syntax::ast::{CmpOp, DriveKind, ElementKind, Regime, Subject};

use crate::dim::Dim;
use crate::formula::{FormulaId, Formulas};

/// A whole checked file.
#[derive(Clone, Debug, Default)]
pub struct Model {
    pub formulas: Formulas,
    /// The tolerance parameters of the whole file (top-level and system ones).
    pub params: Vec<Param>,
    /// The top-level lets that checked, in file order (language.md §2: visible in every
    /// system). Each is evaluated once, at file level: it can depend only on other top-level
    /// lets.
    pub globals: Vec<GlobalLet>,
    pub systems: Vec<SystemModel>,
}

/// A top-level `let` as checked, for hovers and hints.
#[derive(Clone, Debug)]
pub struct GlobalLet {
    pub name: String,
    pub name_span: Span,
    /// The whole item.
    pub span: Span,
    /// In SI, with its dimension.
    pub value: Quantity,
    /// Its own tolerance (`± 15%`), as an index into [`Model::params`].
    pub param: Option<usize>,
    /// The systems (indices into [`Model::systems`]) whose values depend on it, directly or
    /// through other lets.
    pub used_by: Vec<usize>,
    pub doc: Option<String>,
}

/// One toleranced value: a deviation that is 0 at nominal and `low`/`high` at the corners.
#[derive(Clone, Debug)]
pub struct Param {
    /// The `let` or element the tolerance belongs to (`feet`, `rubber`).
    pub name: String,
    /// The span of the `± ...` part.
    pub span: Span,
    pub kind: ToleranceKind,
    /// The deviation at the low and high ends: for a relative tolerance of 15%, −0.15 and
    /// 0.15; for an absolute one, the SI amount.
    pub low: f64,
    pub high: f64,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ToleranceKind {
    /// value × (1 + d)
    Relative,
    /// value + d
    Absolute,
}

/// A value as the model holds it: the formula node, its dimension and its nominal SI value.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Quantity {
    pub formula: FormulaId,
    pub dim: Dim,
    pub nominal: f64,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum DofKind {
    Translational,
    Rotational,
}

/// A mass or inertia: one degree of freedom.
#[derive(Clone, Debug)]
pub struct Dof {
    pub name: String,
    pub name_span: Span,
    pub span: Span,
    pub kind: DofKind,
    /// kg or kg·m².
    pub value: Quantity,
    pub doc: Option<String>,
}

/// An end of an element: a degree of freedom (index into [`SystemModel::dofs`]) or ground.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum End {
    Ground,
    Dof(usize),
}

#[derive(Clone, Debug)]
pub struct Element {
    pub kind: ElementKind,
    pub name: String,
    pub name_span: Span,
    pub span: Span,
    pub a: End,
    pub b: End,
    /// Whether both ends are rotational.
    pub rotational: bool,
    /// N/m, N·m/rad, N·s/m or N·m·s/rad.
    pub value: Quantity,
    pub doc: Option<String>,
}

#[derive(Clone, Debug)]
pub enum DriveForm {
    Harmonic {
        amplitude: Quantity,
        frequency: Quantity,
    },
    /// A band of running speeds, searched over its whole range (not a pair of corners).
    Band {
        amplitude: Quantity,
        from: Quantity,
        to: Quantity,
    },
    Step {
        amplitude: Quantity,
    },
    Impulse {
        amplitude: Quantity,
    },
}

/// What a `motion` amplitude is, read from its dimension.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MotionKind {
    Displacement,
    Velocity,
    Acceleration,
    /// A dimensionless amplitude: rotation of the ground in rad.
    Rotation,
}

#[derive(Clone, Debug)]
pub struct Drive {
    pub kind: DriveKind,
    pub name: String,
    pub name_span: Span,
    pub span: Span,
    /// The driven dof; `None` for a `motion` of ground.
    pub target: Option<usize>,
    pub motion: Option<MotionKind>,
    pub form: DriveForm,
    pub doc: Option<String>,
}

#[derive(Clone, Debug)]
pub struct Initial {
    pub dof: usize,
    pub span: Span,
    pub displacement: Quantity,
    pub velocity: Option<Quantity>,
}

/// A `let` as checked, for hovers and hints.
#[derive(Clone, Debug)]
pub struct LetValue {
    pub name: String,
    pub name_span: Span,
    pub span: Span,
    pub value: Quantity,
    pub doc: Option<String>,
}

#[derive(Clone, Debug)]
pub enum Limit {
    Compare { op: CmpOp, rhs: Quantity },
    In { lo: Quantity, hi: Quantity },
    Outside { lo: Quantity, hi: Quantity },
    Is { not: bool, regime: Regime },
}

/// A requirement with its names resolved and its limits unit-checked.
#[derive(Clone, Debug)]
pub struct Requirement {
    pub span: Span,
    /// The statement as written, whitespace collapsed (`damping >= 0.02`).
    pub text: String,
    pub subject: Subject,
    /// `of mode N`, 1-based.
    pub mode: Option<u32>,
    /// The drive a `separation` or `transmissibility` names (index into `drives`).
    pub drive: Option<usize>,
    /// The dof an `amplitude`, `settling`, `overshoot`, `sag` or `transmissibility ... to` names.
    pub dof: Option<usize>,
    /// `settling ... within P%` as a fraction (default 0.02).
    pub within: Option<Quantity>,
    pub limit: Limit,
}

#[derive(Clone, Debug)]
pub struct SystemModel {
    pub name: String,
    pub name_span: Span,
    pub title: Option<String>,
    pub span: Span,
    pub doc: Option<String>,
    pub lets: Vec<LetValue>,
    pub dofs: Vec<Dof>,
    pub elements: Vec<Element>,
    pub drives: Vec<Drive>,
    pub initials: Vec<Initial>,
    /// An acceleration (m/s²), applied to the translational coordinates.
    pub gravity: Option<Quantity>,
    pub requirements: Vec<Requirement>,
    /// The tolerance parameters that any value of this system depends on (indices into
    /// [`Model::params`]): the axes of this system's tolerance box.
    pub params: Vec<usize>,
    /// Whether the system had errors; an erroneous system is not analyzed.
    pub has_errors: bool,
}
