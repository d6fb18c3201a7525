//! Steady-state harmonic response of M ẍ + C ẋ + K x = f (language.md §4, §5).
//!
//! # Method
//!
//! At an angular frequency ω (rad/s) every coordinate moves as Re(X e^{iωt}) with
//! X(ω) = (K − ω²M + iωC)⁻¹ F, solved as one complex LU with partial pivoting (nalgebra).
//!
//! - A `force` or `torque` drive puts its amplitude on its target coordinate: F = A eᵢ.
//! - A `motion` of ground moves the ground end of every grounded element of the kind it
//!   moves (translational for m, m/s, m/s²; rotational for rad). Its amplitude is turned into a
//!   ground displacement Y at ω: Y = A (displacement, rotation), Y = V/(iω) (velocity),
//!   Y = −A/ω² (acceleration). The load is F = (K_g + iωC_g) Y, where K_g, C_g hold the
//!   grounded springs and dampers of that kind (diagonal).
//! - The result holds the absolute motion X of every coordinate, the relative motion X − Y
//!   (Y on the coordinates of the moved kind, 0 on the others), and the force each grounded
//!   spring or damper puts on the ground: k(Xᵢ − Y) or iωc(Xᵢ − Y) (Y = 0 for a force drive
//!   and for elements of the other kind). The total force into ground sums the grounded
//!   elements of the drive's kind (the driven coordinate's kind for a force or torque).
//!
//! **Singularity.** The solve is of the symmetrically scaled matrix S D S with
//! S = diag(1/√(|Kᵢᵢ| + ω²Mᵢᵢ + ω|Cᵢᵢ|)), so that its pivots compare with 1 whatever the units
//! and however different the masses. When the smallest pivot of the LU (partial pivoting) is
//! below [`PIVOT_FLAG`], the undamped modes K φ = ω² M φ (mass-normalised) are computed and
//! every mode r that no damper moves (‖C φᵣ‖ ≤ 1e-9 · 2ωᵣ‖M φᵣ‖) and whose ωᵣ² is within
//! 1e-6 of ω² is taken out of the solve: such a mode is decoupled from every other (C φᵣ = 0
//! and φⱼᵀ K φᵣ = φⱼᵀ M φᵣ = 0), so its modal coordinate is exactly qᵣ = φᵣᵀF / (ωᵣ² − ω²) and
//! the rest solves D' X' = F − M φᵣ (φᵣᵀF), with D' = D + ωᵣ² (M φᵣ)(M φᵣ)ᵀ, which is
//! regular and gives the X' with no φᵣ content. Exactly at ωᵣ (|ωᵣ² − ω²| ≤ 1e-9 ωᵣ²) the
//! response is finite only when F does not excite the mode (|φᵣᵀF| ≤ 1e-9 ‖φᵣ‖‖F‖, the cosine
//! of the angle between them): then qᵣ = 0, the limit of the response as ω → ωᵣ (an unexcited
//! undamped mode stays at rest in the steady state); otherwise the response is infinite and
//! the result is [`ResponseError::Singular`]. A matrix still near-singular after that (a
//! negative damper, say) is also `Singular`, never a huge number.
//!
//! **Transmissibility** (§5): force drive: |total force into ground| / |applied amplitude|;
//! motion drive: |X_A| / |Y| for a coordinate A, which may be left out only when exactly one
//! coordinate is of the moved kind. **Amplitude of A**: |X_A| summed over the harmonic drives
//! (a conservative bound: drives at different frequencies do not add in phase at all times),
//! a band drive contributing its peak over the band. **Separation** from a drive: min over the
//! non-rigid modes and over the drive's frequencies of |ωn − ω| / ω, in closed form (for a band
//! [a, b]: 0 when ωn is inside, (a − ωn)/a below, (ωn − b)/b above).
//!
//! **Bands** ([`peak_over_band`]): 200 log-spaced points plus the band ends and every
//! resonance hint (each natural frequency ωn and damped resonance ωn√(1−2ζ²)) inside the
//! band; every local maximum of that augmented grid is refined by golden-section search over
//! its two neighbours to a relative width of 1e-10 in ω. A resonance of ζ = 0.001 is 0.2% wide
//! while the grid steps are about 2% apart: the hints are what catch it.

use nalgebra::{DMatrix, DVector};
use nalgebra_sparse::CscMatrix;
use sprung_syntax::ast::{DriveKind, ElementKind};

use crate::assemble::Matrices;
use crate::eigen::Complex64;
use crate::formula::{Evaluator, FormulaId};
use crate::model::{DofKind, DriveForm, End, Model, MotionKind, SystemModel};
use crate::modes::{ModalError, ModalResult, ModeRegime};

/// Every way a response computation can fail; never a panic.
#[derive(Clone, Debug, PartialEq)]
pub enum ResponseError {
    /// The matrices, inputs or coordinates do not fit together (a malformed model).
    Shape,
    /// A value is infinite or not a number.
    NonFinite,
    /// K − ω²M + iωC is singular at this ω (an undamped resonance hit exactly).
    Singular { omega: f64 },
    /// The quantity needs a harmonic drive (`at F` or `at F1 .. F2`), and this one is a step
    /// or an impulse.
    NotHarmonic,
    /// The system has no harmonic drive at all (`amplitude of A` needs one).
    NoHarmonicDrive,
    /// The system has no step, impulse or initial condition (a time response needs one).
    NoTransient,
    /// A motion drive's transmissibility needs `to A`: more than one coordinate moves.
    NeedsTarget,
    /// The named coordinate is not of the kind the drive moves (or does not exist).
    WrongKind { dof: usize },
    /// A band whose ends are not 0 < lo < hi, or a frequency that is not positive.
    BadBand { lo: f64, hi: f64 },
    /// A rigid-body mode: no static equilibrium, no final value, no sag.
    RigidBody,
    /// A mode grows in time (negative stiffness or damping).
    Unstable,
    /// Every mode is rigid: nothing to separate a drive from.
    NoElasticMode,
    /// The modal analysis failed.
    Modal(ModalError),
    /// `sag` needs `gravity`.
    NoGravity,
    /// The response has not settled within the simulated window (an undamped mode, or a band
    /// too narrow for the window).
    NeverSettles,
    /// Overshoot is relative to a final value, and this one is zero.
    ZeroFinal,
    /// A step in ground velocity or acceleration has no final position.
    UnboundedStep { drive: usize },
    /// The system is larger than the time-response limit.
    TooLarge { dofs: usize, limit: usize },
}

impl std::fmt::Display for ResponseError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        use ResponseError as E;
        match self {
            E::Shape => f.write_str("the matrices and inputs do not fit together"),
            E::NonFinite => f.write_str("a value is infinite or not a number"),
            E::Singular { omega } => write!(
                f,
                "the dynamic stiffness is singular at {} Hz (an undamped resonance)",
                omega / std::f64::consts::TAU
            ),
            E::NotHarmonic => {
                f.write_str("the drive is a step or an impulse, not a harmonic drive")
            }
            E::NoHarmonicDrive => f.write_str("the system has no harmonic drive"),
            E::NoTransient => {
                f.write_str("the system has no step or impulse drive and no initial condition")
            }
            E::NeedsTarget => {
                f.write_str("more than one coordinate moves with the ground; name one with `to`")
            }
            E::WrongKind { .. } => {
                f.write_str("the coordinate is not of the kind that the drive moves")
            }
            E::BadBand { lo, hi } => write!(
                f,
                "the frequency band {} Hz .. {} Hz is empty or not positive",
                lo / std::f64::consts::TAU,
                hi / std::f64::consts::TAU
            ),
            E::RigidBody => {
                f.write_str("the system has a rigid-body mode, so it has no static equilibrium")
            }
            E::Unstable => f.write_str("the system is unstable: a mode grows in time"),
            E::NoElasticMode => f.write_str("every mode is a rigid-body mode"),
            E::Modal(e) => e.fmt(f),
            E::NoGravity => f.write_str("the system has no `gravity`"),
            E::NeverSettles => {
                f.write_str("the response does not settle within the simulated time")
            }
            E::ZeroFinal => f.write_str("the final value is zero, so overshoot is undefined"),
            E::UnboundedStep { .. } => {
                f.write_str("a step in ground velocity or acceleration has no final position")
            }
            E::TooLarge { dofs, limit } => write!(
                f,
                "the system has {dofs} degrees of freedom, more than the time-response limit of {limit}"
            ),
        }
    }
}

impl std::error::Error for ResponseError {}

impl From<ModalError> for ResponseError {
    fn from(e: ModalError) -> Self {
        ResponseError::Modal(e)
    }
}

/// Spring or damper.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LinkKind {
    Spring,
    Damper,
}

/// A spring or damper with one end on ground: the path by which force reaches the floor.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GroundLink {
    /// Index into [`SystemModel::elements`].
    pub element: usize,
    /// The coordinate at the other end.
    pub dof: usize,
    pub kind: LinkKind,
    /// Translational or rotational (the kind of `dof`).
    pub dof_kind: DofKind,
    /// N/m, N·m/rad, N·s/m or N·m·s/rad.
    pub value: f64,
}

/// Where a drive acts.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Excitation {
    /// A force or torque on one coordinate.
    Load { dof: usize },
    /// The ground moves under every grounded element of `kind`.
    Base { kind: DofKind, motion: MotionKind },
}

/// How a drive varies in time; frequencies in rad/s.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Waveform {
    Harmonic { omega: f64 },
    Band { lo: f64, hi: f64 },
    Step,
    Impulse,
}

/// One drive evaluated at a corner: SI amplitude (N, N·m, m, m/s, m/s², rad; N·s for an
/// impulse).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DriveInput {
    pub excitation: Excitation,
    pub amplitude: f64,
    pub waveform: Waveform,
}

/// An `initial` statement evaluated: displacement (m or rad) and velocity.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct InitialState {
    pub dof: usize,
    pub displacement: f64,
    pub velocity: f64,
}

/// Everything besides M, C, K that the response needs, at one corner.
#[derive(Clone, Debug, PartialEq)]
pub struct Inputs {
    pub ground: Vec<GroundLink>,
    /// In [`SystemModel::drives`] order.
    pub drives: Vec<DriveInput>,
    pub initials: Vec<InitialState>,
    /// m/s², along the translational coordinates.
    pub gravity: Option<f64>,
}

/// Evaluates the drives, initial conditions, gravity and grounded elements of one system at
/// any corner (the counterpart of [`crate::assemble::Assembler`]).
pub struct InputEvaluator<'m> {
    sys: &'m SystemModel,
    evaluator: Evaluator<'m>,
}

impl<'m> InputEvaluator<'m> {
    pub fn new(model: &'m Model, sys: &'m SystemModel) -> Result<Self, ResponseError> {
        let mut roots: Vec<FormulaId> = sys.elements.iter().map(|e| e.value.formula).collect();
        for d in &sys.drives {
            match &d.form {
                DriveForm::Harmonic {
                    amplitude,
                    frequency,
                } => roots.extend([amplitude.formula, frequency.formula]),
                DriveForm::Band {
                    amplitude,
                    from,
                    to,
                } => roots.extend([amplitude.formula, from.formula, to.formula]),
                DriveForm::Step { amplitude } | DriveForm::Impulse { amplitude } => {
                    roots.push(amplitude.formula)
                }
            }
        }
        for i in &sys.initials {
            roots.push(i.displacement.formula);
            roots.extend(i.velocity.map(|v| v.formula));
        }
        roots.extend(sys.gravity.map(|g| g.formula));
        if roots.iter().any(|id| id.index() >= model.formulas.len()) {
            return Err(ResponseError::Shape);
        }
        Ok(InputEvaluator {
            sys,
            evaluator: Evaluator::new(&model.formulas, &roots),
        })
    }

    /// The inputs at `deviations` (indexed like [`Model::params`]; empty = nominal).
    pub fn evaluate(&mut self, deviations: &[f64]) -> Result<Inputs, ResponseError> {
        self.evaluator.run(deviations);
        let ev = &self.evaluator;
        let n = self.sys.dofs.len();
        let finite = |x: f64| {
            if x.is_finite() {
                Ok(x)
            } else {
                Err(ResponseError::NonFinite)
            }
        };
        let mut ground = Vec::new();
        for (index, e) in self.sys.elements.iter().enumerate() {
            let dof = match (e.a, e.b) {
                (End::Dof(i), End::Ground) | (End::Ground, End::Dof(i)) => i,
                _ => continue,
            };
            let Some(d) = self.sys.dofs.get(dof) else {
                return Err(ResponseError::Shape);
            };
            ground.push(GroundLink {
                element: index,
                dof,
                kind: match e.kind {
                    ElementKind::Spring => LinkKind::Spring,
                    ElementKind::Damper => LinkKind::Damper,
                },
                dof_kind: d.kind,
                value: finite(ev.get(e.value.formula))?,
            });
        }
        let mut drives = Vec::with_capacity(self.sys.drives.len());
        for d in &self.sys.drives {
            let excitation = match (d.kind, d.target, d.motion) {
                (DriveKind::Motion, _, Some(motion)) => Excitation::Base {
                    kind: if motion == MotionKind::Rotation {
                        DofKind::Rotational
                    } else {
                        DofKind::Translational
                    },
                    motion,
                },
                (_, Some(dof), _) if dof < n => Excitation::Load { dof },
                _ => return Err(ResponseError::Shape),
            };
            let (amplitude, waveform) = match &d.form {
                DriveForm::Harmonic {
                    amplitude,
                    frequency,
                } => (
                    ev.get(amplitude.formula),
                    Waveform::Harmonic {
                        omega: finite(ev.get(frequency.formula))?,
                    },
                ),
                DriveForm::Band {
                    amplitude,
                    from,
                    to,
                } => (
                    ev.get(amplitude.formula),
                    Waveform::Band {
                        lo: finite(ev.get(from.formula))?,
                        hi: finite(ev.get(to.formula))?,
                    },
                ),
                DriveForm::Step { amplitude } => (ev.get(amplitude.formula), Waveform::Step),
                DriveForm::Impulse { amplitude } => (ev.get(amplitude.formula), Waveform::Impulse),
            };
            drives.push(DriveInput {
                excitation,
                amplitude: finite(amplitude)?,
                waveform,
            });
        }
        let mut initials = Vec::with_capacity(self.sys.initials.len());
        for i in &self.sys.initials {
            if i.dof >= n {
                return Err(ResponseError::Shape);
            }
            initials.push(InitialState {
                dof: i.dof,
                displacement: finite(ev.get(i.displacement.formula))?,
                velocity: match i.velocity {
                    Some(v) => finite(ev.get(v.formula))?,
                    None => 0.0,
                },
            });
        }
        let gravity = match self.sys.gravity {
            Some(g) => Some(finite(ev.get(g.formula))?),
            None => None,
        };
        Ok(Inputs {
            ground,
            drives,
            initials,
            gravity,
        })
    }
}

/// The steady-state response at one frequency.
#[derive(Clone, Debug, PartialEq)]
pub struct Harmonic {
    /// rad/s.
    pub omega: f64,
    /// The complex input: the applied force or torque F, or the ground displacement Y.
    pub input: Complex64,
    /// Absolute complex amplitude of every coordinate (m or rad); phase relative to the drive.
    pub x: DVector<Complex64>,
    /// X − Y (Y on the coordinates the ground motion moves, 0 elsewhere).
    pub relative: DVector<Complex64>,
    /// The force (or torque) each grounded element puts on the ground, in `ground` order.
    pub link_forces: Vec<Complex64>,
    /// The sum of `link_forces` over the elements of the drive's kind.
    pub ground_force: Complex64,
}

fn check_matrices(mats: &Matrices) -> Result<usize, ResponseError> {
    let n = mats.dofs();
    let square = |a: &CscMatrix<f64>| (a.nrows(), a.ncols()) == (n, n);
    if !square(&mats.m) || !square(&mats.c) || !square(&mats.k) || mats.dof_kinds.len() != n {
        return Err(ResponseError::Shape);
    }
    if [&mats.m, &mats.c, &mats.k]
        .iter()
        .any(|a| a.values().iter().any(|x| !x.is_finite()))
    {
        return Err(ResponseError::NonFinite);
    }
    Ok(n)
}

/// The coordinate kind an excitation acts on.
pub fn excitation_kind(mats: &Matrices, excitation: Excitation) -> Result<DofKind, ResponseError> {
    match excitation {
        Excitation::Load { dof } => mats.dof_kinds.get(dof).copied().ok_or(ResponseError::Shape),
        Excitation::Base { kind, .. } => Ok(kind),
    }
}

/// The steady-state response to one drive of amplitude `amplitude` (SI) at ω (rad/s, > 0).
pub fn harmonic(
    mats: &Matrices,
    ground: &[GroundLink],
    excitation: Excitation,
    amplitude: f64,
    omega: f64,
) -> Result<Harmonic, ResponseError> {
    let n = check_matrices(mats)?;
    if !(omega > 0.0 && omega.is_finite()) {
        return Err(ResponseError::BadBand {
            lo: omega,
            hi: omega,
        });
    }
    if !amplitude.is_finite() {
        return Err(ResponseError::NonFinite);
    }
    if ground.iter().any(|g| g.dof >= n) {
        return Err(ResponseError::Shape);
    }
    let kind = excitation_kind(mats, excitation)?;
    let iw = Complex64::new(0.0, omega);
    let (input, y, f) = match excitation {
        Excitation::Load { dof } => {
            let mut f = DVector::from_element(n, Complex64::new(0.0, 0.0));
            f[dof] = Complex64::new(amplitude, 0.0);
            (f[dof], Complex64::new(0.0, 0.0), f)
        }
        Excitation::Base { motion, .. } => {
            let y = match motion {
                MotionKind::Displacement | MotionKind::Rotation => Complex64::new(amplitude, 0.0),
                MotionKind::Velocity => Complex64::new(amplitude, 0.0) / iw,
                MotionKind::Acceleration => Complex64::new(-amplitude / (omega * omega), 0.0),
            };
            let mut f = DVector::from_element(n, Complex64::new(0.0, 0.0));
            for g in ground.iter().filter(|g| g.dof_kind == kind) {
                f[g.dof] += link_admittance(g, iw) * y;
            }
            (y, y, f)
        }
    };
    let x = solve_dynamic(mats, omega, &f)?;
    let moved = |i: usize| match excitation {
        Excitation::Base { .. } if mats.dof_kinds[i] == kind => y,
        _ => Complex64::new(0.0, 0.0),
    };
    let relative = DVector::from_fn(n, |i, _| x[i] - moved(i));
    let link_forces: Vec<Complex64> = ground
        .iter()
        .map(|g| link_admittance(g, iw) * relative[g.dof])
        .collect();
    let ground_force = ground
        .iter()
        .zip(&link_forces)
        .filter(|(g, _)| g.dof_kind == kind)
        .map(|(_, f)| *f)
        .sum();
    Ok(Harmonic {
        omega,
        input,
        x,
        relative,
        link_forces,
        ground_force,
    })
}

/// Below this smallest pivot of the scaled dynamic stiffness (relative to its largest entry,
/// about 1) the solve looks for undamped modes at the drive frequency.
pub const PIVOT_FLAG: f64 = 1e-8;
/// Below this smallest pivot a solve with no undamped mode to take out is singular.
const PIVOT_SINGULAR: f64 = 1e-13;
/// An undamped mode is taken out of the solve when |ωᵣ² − ω²| ≤ this × ωᵣ².
const NEAR_MODE: f64 = 1e-6;
/// At |ωᵣ² − ω²| ≤ this × ωᵣ² the drive is exactly at the mode.
const AT_MODE: f64 = 1e-9;
/// A mode is undamped when ‖C φ‖ ≤ this × 2ω‖M φ‖ (ζ below about this).
const UNDAMPED: f64 = 1e-9;
/// A load does not excite a mode when |φᵀF| ≤ this × ‖φ‖‖F‖.
const ORTHOGONAL: f64 = 1e-9;

/// X = (K − ω²M + iωC)⁻¹ F, with undamped modes at ω taken out (module documentation).
fn solve_dynamic(
    mats: &Matrices,
    omega: f64,
    f: &DVector<Complex64>,
) -> Result<DVector<Complex64>, ResponseError> {
    let n = mats.dofs();
    if n == 0 {
        return Ok(DVector::from_element(0, Complex64::new(0.0, 0.0)));
    }
    let w2 = omega * omega;
    // The harmonic solve is a dense LU: M, C and K are made dense for it.
    let (m, c, k) = (mats.dense_m(), mats.dense_c(), mats.dense_k());
    let dynamic = DMatrix::from_fn(n, n, |i, j| {
        Complex64::new(k[(i, j)] - w2 * m[(i, j)], omega * c[(i, j)])
    });
    let scale: Vec<f64> = (0..n)
        .map(|i| {
            let d = k[(i, i)].abs() + w2 * m[(i, i)].abs() + omega * c[(i, i)].abs();
            let s = 1.0 / d.sqrt();
            if s.is_finite() { s } else { 1.0 }
        })
        .collect();
    let (x, pivot) = scaled_solve(&dynamic, &scale, f);
    if pivot > PIVOT_FLAG {
        return x.ok_or(ResponseError::Singular { omega });
    }
    let und = crate::eigen::generalized_symmetric_sparse(&mats.k, &mats.m)
        .map_err(|e| ResponseError::Modal(e.into()))?;
    let f_norm = f.norm();
    let mut deflated = dynamic;
    let mut rest = f.clone();
    let mut modal_part = DVector::from_element(n, Complex64::new(0.0, 0.0));
    let mut any = false;
    for (r, &w2r) in und.omega2.iter().enumerate() {
        if w2r.is_nan() || w2r <= 0.0 || (w2r - w2).abs() > NEAR_MODE * w2r {
            continue;
        }
        let phi = und.shapes.column(r).into_owned();
        let m_phi = &m * &phi;
        if (&c * &phi).norm() > UNDAMPED * 2.0 * w2r.sqrt() * m_phi.norm() {
            continue;
        }
        any = true;
        let mut load: Complex64 = phi.iter().zip(f.iter()).map(|(p, x)| *x * *p).sum();
        if load.norm() <= ORTHOGONAL * phi.norm() * f_norm {
            load = Complex64::new(0.0, 0.0);
        }
        let detuning = w2r - w2;
        if detuning.abs() <= AT_MODE * w2r {
            if load.norm() > 0.0 {
                return Err(ResponseError::Singular { omega });
            }
        } else {
            let q = load / detuning;
            for i in 0..n {
                modal_part[i] += q * phi[i];
            }
        }
        for i in 0..n {
            rest[i] -= load * m_phi[i];
            for j in 0..n {
                deflated[(i, j)] += Complex64::new(w2r * m_phi[i] * m_phi[j], 0.0);
            }
        }
    }
    let threshold = if any { PIVOT_FLAG } else { PIVOT_SINGULAR };
    let (x, pivot) = if any {
        scaled_solve(&deflated, &scale, &rest)
    } else {
        (x, pivot)
    };
    match x {
        Some(x) if pivot > threshold => Ok(x + modal_part),
        _ => Err(ResponseError::Singular { omega }),
    }
}

/// Solves A X = F as (S A S) Y = S F, X = S Y, and returns the smallest pivot of the scaled
/// LU relative to the scaled matrix's largest entry (0 when singular or not finite).
fn scaled_solve(
    a: &DMatrix<Complex64>,
    scale: &[f64],
    f: &DVector<Complex64>,
) -> (Option<DVector<Complex64>>, f64) {
    let n = a.nrows();
    let scaled = DMatrix::from_fn(n, n, |i, j| a[(i, j)] * (scale[i] * scale[j]));
    let largest = scaled.iter().fold(0.0_f64, |m, z| m.max(z.norm()));
    let lu = scaled.lu();
    let u = lu.u();
    let smallest = (0..n).fold(f64::INFINITY, |m, i| m.min(u[(i, i)].norm()));
    let pivot = if largest > 0.0 && smallest.is_finite() {
        smallest / largest
    } else {
        0.0
    };
    let rhs = DVector::from_fn(n, |i, _| f[i] * scale[i]);
    let x = lu
        .solve(&rhs)
        .map(|y| DVector::from_fn(n, |i, _| y[i] * scale[i]))
        .filter(|x| x.iter().all(|z| z.re.is_finite() && z.im.is_finite()));
    (x, if pivot.is_nan() { 0.0 } else { pivot })
}

/// k or iωc.
fn link_admittance(g: &GroundLink, iw: Complex64) -> Complex64 {
    match g.kind {
        LinkKind::Spring => Complex64::new(g.value, 0.0),
        LinkKind::Damper => iw * g.value,
    }
}

/// The transmissibility of one drive at ω: force drive |ground force| / |F|; motion drive
/// |X_A| / |Y|.
pub fn transmissibility_at(
    mats: &Matrices,
    ground: &[GroundLink],
    excitation: Excitation,
    to: Option<usize>,
    omega: f64,
) -> Result<f64, ResponseError> {
    let target = match excitation {
        Excitation::Load { .. } => None,
        Excitation::Base { kind, .. } => Some(base_target(mats, kind, to)?),
    };
    // Transmissibility is a ratio: a unit amplitude gives it directly.
    let h = harmonic(mats, ground, excitation, 1.0, omega)?;
    let denom = h.input.norm();
    if denom == 0.0 {
        return Err(ResponseError::NonFinite);
    }
    Ok(match target {
        None => h.ground_force.norm() / denom,
        Some(a) => h.x[a].norm() / denom,
    })
}

/// The coordinate whose motion a base-motion transmissibility reports.
fn base_target(mats: &Matrices, kind: DofKind, to: Option<usize>) -> Result<usize, ResponseError> {
    match to {
        Some(a) => match mats.dof_kinds.get(a) {
            Some(k) if *k == kind => Ok(a),
            _ => Err(ResponseError::WrongKind { dof: a }),
        },
        None => {
            let mut of_kind = (0..mats.dofs()).filter(|&i| mats.dof_kinds[i] == kind);
            match (of_kind.next(), of_kind.next()) {
                (Some(a), None) => Ok(a),
                (None, _) => Err(ResponseError::WrongKind { dof: 0 }),
                (Some(_), Some(_)) => Err(ResponseError::NeedsTarget),
            }
        }
    }
}

/// The largest (or smallest) value over a band and where it is.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BandExtreme {
    /// rad/s.
    pub omega: f64,
    pub value: f64,
}

/// The transmissibility of a drive: at its frequency, or the peak over its band.
pub fn transmissibility(
    mats: &Matrices,
    ground: &[GroundLink],
    drive: &DriveInput,
    to: Option<usize>,
    modal: &ModalResult,
) -> Result<BandExtreme, ResponseError> {
    let f = |w: f64| transmissibility_at(mats, ground, drive.excitation, to, w);
    over_waveform(drive, f, modal)
}

/// Evaluates `f` at a harmonic drive's frequency or its peak over the band.
fn over_waveform(
    drive: &DriveInput,
    mut f: impl FnMut(f64) -> Result<f64, ResponseError>,
    modal: &ModalResult,
) -> Result<BandExtreme, ResponseError> {
    match drive.waveform {
        Waveform::Harmonic { omega } => Ok(BandExtreme {
            omega,
            value: f(omega)?,
        }),
        Waveform::Band { lo, hi } => peak_over_band(f, lo, hi, &resonance_hints(modal)),
        Waveform::Step | Waveform::Impulse => Err(ResponseError::NotHarmonic),
    }
}

/// The steady-state displacement amplitude |X_A| of coordinate `dof` under one harmonic drive
/// (its peak over a band).
pub fn amplitude_under(
    mats: &Matrices,
    ground: &[GroundLink],
    drive: &DriveInput,
    dof: usize,
    modal: &ModalResult,
) -> Result<BandExtreme, ResponseError> {
    if dof >= mats.dofs() {
        return Err(ResponseError::Shape);
    }
    let f =
        |w: f64| Ok(harmonic(mats, ground, drive.excitation, drive.amplitude, w)?.x[dof].norm());
    over_waveform(drive, f, modal)
}

/// `amplitude of A`: |X_A| summed over every harmonic drive, a band drive contributing its peak.
pub fn amplitude(
    mats: &Matrices,
    ground: &[GroundLink],
    drives: &[DriveInput],
    dof: usize,
    modal: &ModalResult,
) -> Result<f64, ResponseError> {
    let mut total = 0.0;
    let mut any = false;
    for d in drives {
        if matches!(
            d.waveform,
            Waveform::Harmonic { .. } | Waveform::Band { .. }
        ) {
            any = true;
            total += amplitude_under(mats, ground, d, dof, modal)?.value;
        }
    }
    if any {
        Ok(total)
    } else {
        Err(ResponseError::NoHarmonicDrive)
    }
}

/// The worst separation of a drive from the modes.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Separation {
    /// min |ωn − ω| / ω.
    pub value: f64,
    /// 1-based index of the closest mode.
    pub mode: usize,
    /// The drive frequency (rad/s) where the minimum is reached.
    pub omega: f64,
}

/// `separation from DRIVE`: min over the non-rigid modes and over the drive's frequencies of
/// |ωn − ω| / ω (closed form over a band).
pub fn separation(drive: &DriveInput, modal: &ModalResult) -> Result<Separation, ResponseError> {
    separations(drive, modal)?
        .into_iter()
        .reduce(|best, s| if s.value < best.value { s } else { best })
        .ok_or(ResponseError::NoElasticMode)
}

/// The separation of a drive from each non-rigid mode, in mode order: |ωn − ω| / ω at the
/// drive's frequency, or over its band [a, b] 0 when ωn is inside, (a − ωn)/a below and
/// (ωn − b)/b above.
pub fn separations(
    drive: &DriveInput,
    modal: &ModalResult,
) -> Result<Vec<Separation>, ResponseError> {
    let (lo, hi) = match drive.waveform {
        Waveform::Harmonic { omega } => (omega, omega),
        Waveform::Band { lo, hi } => (lo, hi),
        Waveform::Step | Waveform::Impulse => {
            return Err(ResponseError::NotHarmonic);
        }
    };
    if !(lo > 0.0 && lo <= hi && hi.is_finite()) {
        return Err(ResponseError::BadBand { lo, hi });
    }
    Ok(modal
        .modes
        .iter()
        .filter(|mode| mode.regime != ModeRegime::RigidBody)
        .map(|mode| {
            let wn = mode.natural_frequency;
            let (value, omega) = if wn < lo {
                ((lo - wn) / lo, lo)
            } else if wn > hi {
                ((wn - hi) / hi, hi)
            } else {
                (0.0, wn)
            };
            Separation {
                value,
                mode: mode.index,
                omega,
            }
        })
        .collect())
}

/// The frequencies (rad/s) near which a response peak can hide: each natural frequency ωn and,
/// for 0 < ζ < 1/√2, the damped resonance ωn√(1−2ζ²) of displacement under a force.
pub fn resonance_hints(modal: &ModalResult) -> Vec<f64> {
    let mut out = Vec::new();
    for m in &modal.modes {
        let wn = m.natural_frequency;
        if !(wn > 0.0 && wn.is_finite()) {
            continue;
        }
        out.push(wn);
        if let Some(z) = m.damping_ratio
            && z > 0.0
            && 2.0 * z * z < 1.0
        {
            out.push(wn * (1.0 - 2.0 * z * z).sqrt());
        }
        if let Some(wd) = m.damped_frequency
            && wd > 0.0
        {
            out.push(wd);
        }
    }
    out
}

/// Grid points of the band search (besides ends and hints).
pub const BAND_GRID_POINTS: usize = 200;
/// Relative width in ω to which a peak is refined.
pub const BAND_TOLERANCE: f64 = 1e-10;

/// The maximum of `f` over [lo, hi] (rad/s): a log-spaced grid of [`BAND_GRID_POINTS`] points,
/// plus the band ends and every `hints` frequency inside the band, and a golden-section
/// refinement of every local maximum of that grid between its neighbours to a relative width
/// of [`BAND_TOLERANCE`]. `lo == hi` evaluates one frequency.
pub fn peak_over_band(
    mut f: impl FnMut(f64) -> Result<f64, ResponseError>,
    lo: f64,
    hi: f64,
    hints: &[f64],
) -> Result<BandExtreme, ResponseError> {
    if !(lo > 0.0 && lo <= hi && hi.is_finite()) {
        return Err(ResponseError::BadBand { lo, hi });
    }
    let mut eval = |w: f64| -> Result<f64, ResponseError> {
        let v = f(w)?;
        if v.is_nan() {
            Err(ResponseError::NonFinite)
        } else {
            Ok(v)
        }
    };
    if lo == hi {
        return Ok(BandExtreme {
            omega: lo,
            value: eval(lo)?,
        });
    }
    let ratio = (hi / lo).ln();
    let mut grid: Vec<f64> = (0..BAND_GRID_POINTS)
        .map(|i| lo * (ratio * i as f64 / (BAND_GRID_POINTS - 1) as f64).exp())
        .collect();
    grid.push(lo);
    grid.push(hi);
    grid.extend(hints.iter().copied().filter(|h| *h >= lo && *h <= hi));
    grid.sort_by(f64::total_cmp);
    grid.dedup();
    let values: Vec<f64> = grid.iter().map(|&w| eval(w)).collect::<Result<_, _>>()?;
    let mut best = BandExtreme {
        omega: grid[0],
        value: values[0],
    };
    for (w, v) in grid.iter().zip(&values) {
        if *v > best.value {
            best = BandExtreme {
                omega: *w,
                value: *v,
            };
        }
    }
    let last = grid.len() - 1;
    for i in 0..=last {
        let left = if i == 0 {
            f64::NEG_INFINITY
        } else {
            values[i - 1]
        };
        let right = if i == last {
            f64::NEG_INFINITY
        } else {
            values[i + 1]
        };
        if values[i] < left || values[i] < right {
            continue;
        }
        let a = grid[i.saturating_sub(1)];
        let b = grid[(i + 1).min(last)];
        if b <= a {
            continue;
        }
        let found = golden_max(&mut eval, a, b, grid[i], values[i])?;
        if found.value > best.value {
            best = found;
        }
    }
    Ok(best)
}

/// The minimum of `f` over [lo, hi], found as for [`peak_over_band`].
pub fn min_over_band(
    mut f: impl FnMut(f64) -> Result<f64, ResponseError>,
    lo: f64,
    hi: f64,
    hints: &[f64],
) -> Result<BandExtreme, ResponseError> {
    let peak = peak_over_band(|w| f(w).map(|v| -v), lo, hi, hints)?;
    Ok(BandExtreme {
        omega: peak.omega,
        value: -peak.value,
    })
}

/// Golden-section search for a maximum of `f` in [a, b] (log-frequency coordinate), starting
/// from a known point `(w0, v0)` that is returned if nothing better is found.
fn golden_max(
    f: &mut impl FnMut(f64) -> Result<f64, ResponseError>,
    a: f64,
    b: f64,
    w0: f64,
    v0: f64,
) -> Result<BandExtreme, ResponseError> {
    const INV_PHI: f64 = 0.618_033_988_749_894_8;
    let (mut a, mut b) = (a.ln(), b.ln());
    let mut best = BandExtreme {
        omega: w0,
        value: v0,
    };
    let mut c = b - INV_PHI * (b - a);
    let mut d = a + INV_PHI * (b - a);
    let mut fc = f(c.exp())?;
    let mut fd = f(d.exp())?;
    // ln-width 1e-10 is a relative width of 1e-10 in ω; 200 iterations is far more than the
    // ~50 that any band of the search needs, and bounds the loop whatever f does.
    for _ in 0..200 {
        if b - a <= BAND_TOLERANCE {
            break;
        }
        if fc >= fd {
            b = d;
            d = c;
            fd = fc;
            c = b - INV_PHI * (b - a);
            fc = f(c.exp())?;
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + INV_PHI * (b - a);
            fd = f(d.exp())?;
        }
    }
    for (x, v) in [(c, fc), (d, fd)] {
        if v > best.value {
            best = BandExtreme {
                omega: x.exp(),
                value: v,
            };
        }
    }
    Ok(best)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Two equal masses m, each on a spring k to ground, joined by a coupling spring kc, no
    /// damping. Modes (closed form, standard vibration texts, from memory): in phase [1, 1] at
    /// ω₁² = k/m, antisymmetric [1, −1] at ω₂² = (k + 2kc)/m.
    fn symmetric_pair(m: f64, k: f64, kc: f64) -> (Matrices, Vec<GroundLink>) {
        let mats = Matrices::from_dense(
            DMatrix::from_row_slice(2, 2, &[m, 0.0, 0.0, m]),
            DMatrix::zeros(2, 2),
            DMatrix::from_row_slice(2, 2, &[k + kc, -kc, -kc, k + kc]),
            vec![DofKind::Translational; 2],
        );
        let link = |element, dof| GroundLink {
            element,
            dof,
            kind: LinkKind::Spring,
            dof_kind: DofKind::Translational,
            value: k,
        };
        (mats, vec![link(0, 0), link(1, 1)])
    }

    const BASE: Excitation = Excitation::Base {
        kind: DofKind::Translational,
        motion: MotionKind::Displacement,
    };

    #[test]
    fn symmetric_drive_at_the_antisymmetric_mode_is_finite() {
        let (m, k, kc) = (3.0, 12_000.0, 5_000.0);
        let (mats, ground) = symmetric_pair(m, k, kc);
        // The ground moves both outer springs alike: F = kY [1, 1], orthogonal to [1, −1].
        // Both masses then move together as one, and the coupling spring never stretches:
        // m ẍ + k x = k y, so X/Y = k / (k − mω²), at ω² = (k + 2kc)/m equal to −k/(2kc).
        let omega = ((k + 2.0 * kc) / m).sqrt();
        let y = 0.002;
        let h = harmonic(&mats, &ground, BASE, y, omega).unwrap();
        let expected = -k / (2.0 * kc) * y;
        for i in 0..2 {
            assert!(
                (h.x[i].re - expected).abs() < 1e-9 * expected.abs() && h.x[i].im.abs() < 1e-12,
                "x{i} = {} (expected {expected})",
                h.x[i]
            );
        }
        // The same value just beside the mode, where the plain solve is well conditioned: the
        // response is continuous through the unexcited mode.
        let near = harmonic(&mats, &ground, BASE, y, omega * (1.0 + 1e-5)).unwrap();
        assert!((near.x[0].re - expected).abs() < 1e-3 * expected.abs());
        // Force into ground: each outer spring carries k(X − Y).
        let into_ground = 2.0 * k * (expected - y);
        assert!((h.ground_force.re - into_ground).abs() < 1e-9 * into_ground.abs());
    }

    #[test]
    fn a_load_that_excites_the_undamped_mode_at_its_frequency_is_singular() {
        let (m, k, kc) = (3.0, 12_000.0, 5_000.0);
        let (mats, ground) = symmetric_pair(m, k, kc);
        let omega = ((k + 2.0 * kc) / m).sqrt();
        // A force on one mass excites both modes; at ω₂ the response is unbounded.
        let load = Excitation::Load { dof: 0 };
        assert_eq!(
            harmonic(&mats, &ground, load, 10.0, omega),
            Err(ResponseError::Singular { omega })
        );
        // So is the in-phase mode under the symmetric ground motion.
        let w1 = (k / m).sqrt();
        assert_eq!(
            harmonic(&mats, &ground, BASE, 0.001, w1),
            Err(ResponseError::Singular { omega: w1 })
        );
    }

    #[test]
    fn close_to_an_excited_undamped_mode_the_value_is_the_closed_form() {
        // One mass, no damper: X = (F/k) / (1 − r²) (closed form, standard vibration texts,
        // from memory), exact even a hair away from resonance, where the plain LU pivot is tiny.
        let mats = Matrices::from_dense(
            DMatrix::from_element(1, 1, 2.0),
            DMatrix::zeros(1, 1),
            DMatrix::from_element(1, 1, 800.0),
            vec![DofKind::Translational],
        );
        let wn = 20.0_f64;
        for r in [1.0 + 1e-7, 1.0 - 3e-8, 0.5, 2.0] {
            let h = harmonic(&mats, &[], Excitation::Load { dof: 0 }, 5.0, wn * r).unwrap();
            let expected = 5.0 / 800.0 / (1.0 - r * r);
            assert!(
                (h.x[0].re - expected).abs() < 1e-6 * expected.abs(),
                "r = {r}: {} vs {expected}",
                h.x[0].re
            );
        }
        assert!(harmonic(&mats, &[], Excitation::Load { dof: 0 }, 5.0, wn).is_err());
    }

    #[test]
    fn a_damped_pair_at_the_same_frequency_is_solved_as_before() {
        // With a damper on each mass both modes are damped: nothing is taken out, and the
        // response at ω₂ under a force on one mass is the plain solve. In modal coordinates
        // (mass-normalised φ = [1, ±1]/√(2m), proportional damping c/m):
        // X = Σ φ φᵀF / (ωⱼ² − ω² + iω c/m).
        let (m, k, kc, c) = (3.0, 12_000.0, 5_000.0, 4.0);
        let (mut mats, ground) = symmetric_pair(m, k, kc);
        mats.c = CscMatrix::from(&DMatrix::from_row_slice(2, 2, &[c, 0.0, 0.0, c]));
        let omega = ((k + 2.0 * kc) / m).sqrt();
        let h = harmonic(&mats, &ground, Excitation::Load { dof: 0 }, 10.0, omega).unwrap();
        let iw = Complex64::new(0.0, omega * c / m);
        let w2 = omega * omega;
        let q1 = Complex64::new(10.0 / (2.0 * m), 0.0) / (Complex64::new(k / m - w2, 0.0) + iw);
        let q2 = Complex64::new(10.0 / (2.0 * m), 0.0)
            / (Complex64::new((k + 2.0 * kc) / m - w2, 0.0) + iw);
        let x0 = q1 + q2;
        let x1 = q1 - q2;
        assert!((h.x[0] - x0).norm() < 1e-12 * x0.norm());
        assert!((h.x[1] - x1).norm() < 1e-12 * x1.norm());
    }
}
