//! The analysis stage: for every system that checked without errors, the modes at nominal and
//! the requirement verdicts at the worst corner of the tolerance box. Pure: the same checked
//! file always gives the same analysis, so the CLI and the language server share it.

use sprung_syntax::ast::ElementKind;

use crate::Checked;
use std::borrow::Cow;

use crate::assemble::{AssembleError, Assembler, Limits, Matrices};
use crate::corners::{self, Corner};
use crate::diagnostics::{Code, Diagnostic};
use crate::model::{End, Model, SystemModel};
use crate::modes::{self, ModalConfig, ModalResult, ModeRegime};
use crate::requirements::{self, ModeSummary, Status, Verdict};
use crate::response::{self, InputEvaluator, Waveform};
use crate::statics;
use crate::time_response::{self, TimeConfig};
use sprung_syntax::ast::Subject;

/// Settings of the analysis stage.
#[derive(Clone, Debug, Default)]
pub struct Config {
    pub modal: ModalConfig,
    pub limits: Limits,
}

/// The analysis of one system (parallel to [`Model::systems`]).
#[derive(Clone, Debug)]
pub struct SystemAnalysis {
    /// The modes at nominal values; `None` when the system has errors or could not be solved.
    pub modes: Option<ModalResult>,
    /// One verdict per requirement, in the order of [`SystemModel::requirements`].
    pub verdicts: Vec<Verdict>,
}

#[derive(Clone, Debug, Default)]
pub struct Analysis {
    pub systems: Vec<SystemAnalysis>,
    /// Failed requirements, not-yet-evaluated subjects, analysis failures, model warnings that
    /// need the modes. Kept apart from the checker's diagnostics; see [`Analysis::all_diagnostics`].
    pub diagnostics: Vec<Diagnostic>,
}

impl Analysis {
    /// The checker's and the analysis's diagnostics together, in source order.
    pub fn all_diagnostics(&self, checked: &Checked) -> Vec<Diagnostic> {
        let mut all: Vec<Diagnostic> = checked
            .diagnostics
            .iter()
            .chain(&self.diagnostics)
            .cloned()
            .collect();
        all.sort_by_key(|d| (d.span.start, d.span.end));
        all
    }

    /// Whether everything passed: no error from the checker or the analysis.
    pub fn passed(&self, checked: &Checked) -> bool {
        !checked.has_errors() && !self.diagnostics.iter().any(Diagnostic::is_error)
    }
}

/// Analyzes every system of a checked file.
pub fn analyze(checked: &Checked, config: &Config) -> Analysis {
    let mut diagnostics = Vec::new();
    let systems = checked
        .model
        .systems
        .iter()
        .map(|sys| analyze_system(&checked.model, sys, config, &mut diagnostics))
        .collect();
    diagnostics.sort_by_key(|d| (d.span.start, d.span.end));
    Analysis {
        systems,
        diagnostics,
    }
}

fn summaries(result: &ModalResult) -> Vec<ModeSummary> {
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

fn analyze_system(
    model: &Model,
    sys: &SystemModel,
    config: &Config,
    diags: &mut Vec<Diagnostic>,
) -> SystemAnalysis {
    let all_not = |why: &str| {
        sys.requirements
            .iter()
            .map(|_| requirements::not_evaluated(why.to_string()))
            .collect()
    };
    if sys.has_errors || sys.dofs.is_empty() {
        let why = if sys.has_errors {
            "the system has errors, so it is not analyzed"
        } else {
            "the system has no degree of freedom"
        };
        return SystemAnalysis {
            modes: None,
            verdicts: all_not(why),
        };
    }
    let mut assembler = match Assembler::new(model, sys, config.limits) {
        Ok(a) => a,
        Err(e) => {
            let code = match e {
                AssembleError::TooManyDofs { .. } => Code::TooManyDofs,
                _ => Code::AnalysisFailed,
            };
            diags.push(Diagnostic::new(
                code,
                sys.name_span,
                format!("system `{}`: {e}", sys.name),
            ));
            return SystemAnalysis {
                modes: None,
                verdicts: all_not("the system was not analyzed"),
            };
        }
    };
    let nominal = assembler
        .assemble(&vec![0.0; model.params.len()])
        .map_err(|e| e.to_string())
        .and_then(|mats| {
            let modal = modes::analyze(&mats, &config.modal).map_err(|e| e.to_string())?;
            Ok((mats, modal))
        });
    let (nominal_mats, nominal) = match nominal {
        Ok(r) => r,
        Err(why) => {
            diags.push(Diagnostic::new(
                Code::AnalysisFailed,
                sys.name_span,
                format!(
                    "the modes of system `{}` could not be computed: {why}",
                    sys.name
                ),
            ));
            return SystemAnalysis {
                modes: None,
                verdicts: all_not("the modal analysis failed"),
            };
        }
    };
    dampers_not_felt(sys, &nominal, diags);

    let verdicts = if sys.requirements.is_empty() {
        Vec::new()
    } else if !corners::within_limit(sys) {
        diags.push(Diagnostic::new(
            Code::TooManyCorners,
            sys.name_span,
            format!(
                "system `{}` depends on {} toleranced values, a box of 2^{} corners; the limit is 2^16, so its requirements are not evaluated",
                sys.name,
                sys.params.len(),
                sys.params.len()
            ),
        ));
        all_not("too many tolerance corners")
    } else if let Some(work) = search_work(sys).filter(|w| *w > WORK_BUDGET) {
        diags.push(Diagnostic::new(
            Code::TooManyCorners,
            sys.name_span,
            format!(
                "searching {} corners of system `{}` ({} degrees of freedom{}) would take about {:.0e} operations, more than the analyzer's budget of {WORK_BUDGET:.0e}; its requirements are not evaluated",
                corners::count(sys),
                sys.name,
                sys.dofs.len(),
                if needs_transient(sys) { ", with transient requirements" } else { "" },
                work
            ),
        ).with_help("fix some toleranced values, or merge tolerances that move together into one `let`"));
        all_not("the tolerance search is over the work budget")
    } else {
        evaluate_requirements(
            model,
            sys,
            config,
            &mut assembler,
            (&nominal_mats, &nominal),
            diags,
        )
    };
    drop(nominal_mats);
    for (req, v) in sys.requirements.iter().zip(&verdicts) {
        if v.status == Status::Failed {
            diags.push(Diagnostic::new(
                Code::RequirementFailed,
                req.span,
                v.message.clone(),
            ));
        }
    }
    SystemAnalysis {
        modes: Some(nominal),
        verdicts,
    }
}

/// A bound on the work of a corner search, in rough floating-point operations, so that no
/// input makes the analysis (or the language server) run for minutes: some seconds here.
pub const WORK_BUDGET: f64 = 5e9;

fn needs_transient(sys: &SystemModel) -> bool {
    sys.requirements.iter().any(|r| {
        matches!(
            r.subject,
            Subject::Settling { .. } | Subject::Overshoot { .. }
        )
    })
}

/// The estimated work of evaluating the system's requirements at every corner: an
/// eigendecomposition of the 2n-square state matrix per corner other than nominal (about
/// 10 (2n)^3; the nominal modes are computed before the search, whatever its size), and for a
/// transient requirement, at every point nominal included, a simulation of up to a few
/// thousand steps of a 2n-square propagation. A system without tolerances (nominal alone) and
/// without transient requirements costs nothing more.
fn search_work(sys: &SystemModel) -> Option<f64> {
    let n = sys.dofs.len() as f64;
    let modal = 10.0 * (2.0 * n).powi(3);
    let transient = if needs_transient(sys) {
        4000.0 * (2.0 * n).powi(2) * 2.0 * n
    } else {
        0.0
    };
    let points = corners::count(sys) as f64;
    Some((points - 1.0) * modal + points * transient)
}

/// What one corner gives every requirement: the modes for the modal subjects, the measured
/// value (or why it could not be measured) for each driven-response requirement.
struct CornerResult {
    modes: Result<Vec<ModeSummary>, String>,
    values: Vec<Option<Result<f64, String>>>,
}

fn evaluate_requirements(
    model: &Model,
    sys: &SystemModel,
    config: &Config,
    assembler: &mut Assembler<'_>,
    (nominal_mats, nominal): (&Matrices, &ModalResult),
    diags: &mut Vec<Diagnostic>,
) -> Vec<Verdict> {
    let needs_response = sys
        .requirements
        .iter()
        .any(|r| !requirements::is_modal(&r.subject));
    let needs_time = sys.requirements.iter().any(|r| {
        matches!(
            r.subject,
            Subject::Settling { .. } | Subject::Overshoot { .. }
        )
    });
    let mut inputs = if needs_response {
        Some(InputEvaluator::new(model, sys).map_err(|e| e.to_string()))
    } else {
        None
    };
    let mut points: Vec<(Corner, CornerResult)> = Vec::new();
    for corner in corners::corners(model, sys) {
        // The nominal point was solved already: borrow its matrices and modes.
        let (mats, modal) = if corner.is_nominal() {
            (Ok(Cow::Borrowed(nominal_mats)), Ok(Cow::Borrowed(nominal)))
        } else {
            let mats = assembler
                .assemble(&corner.deviations)
                .map_err(|e| e.to_string());
            let modal = match &mats {
                Ok(m) => modes::analyze(m, &config.modal)
                    .map(Cow::Owned)
                    .map_err(|e| e.to_string()),
                Err(e) => Err(e.clone()),
            };
            (mats.map(Cow::Owned), modal)
        };
        let modes = modal.as_deref().map(summaries).map_err(Clone::clone);
        let values = match (&mut inputs, mats.as_deref(), modal.as_deref()) {
            (None, _, _) => vec![None; sys.requirements.len()],
            (Some(Err(e)), _, _) => sys
                .requirements
                .iter()
                .map(|r| (!requirements::is_modal(&r.subject)).then(|| Err(e.clone())))
                .collect(),
            (Some(Ok(ev)), Ok(mats), Ok(modal)) => match ev.evaluate(&corner.deviations) {
                Ok(inp) => measure_all(sys, mats, modal, &inp, needs_time),
                Err(e) => sys
                    .requirements
                    .iter()
                    .map(|r| (!requirements::is_modal(&r.subject)).then(|| Err(e.to_string())))
                    .collect(),
            },
            (Some(Ok(_)), Err(e), _) | (Some(Ok(_)), _, Err(e)) => sys
                .requirements
                .iter()
                .map(|r| (!requirements::is_modal(&r.subject)).then(|| Err(e.clone())))
                .collect(),
        };
        points.push((corner, CornerResult { modes, values }));
    }
    let rigid: Vec<usize> = nominal
        .modes
        .iter()
        .enumerate()
        .filter(|(_, m)| m.regime == ModeRegime::RigidBody)
        .map(|(i, _)| i + 1)
        .collect();
    let mut verdicts = Vec::with_capacity(sys.requirements.len());
    for (i, req) in sys.requirements.iter().enumerate() {
        let v = if requirements::is_modal(&req.subject) {
            let modal_points: Vec<(Corner, Result<Vec<ModeSummary>, String>)> = points
                .iter()
                .map(|(c, r)| (c.clone(), r.modes.clone()))
                .collect();
            if req.mode.is_none() && !rigid.is_empty() {
                let list: Vec<String> = rigid.iter().map(|m| m.to_string()).collect();
                diags.push(Diagnostic::new(
                    Code::RigidExcepted,
                    req.span,
                    format!(
                        "rigid-body mode{} {} excepted from this requirement",
                        if rigid.len() == 1 { "" } else { "s" },
                        list.join(", ")
                    ),
                ));
            }
            requirements::evaluate_modal(&model.formulas, req, &modal_points)
        } else {
            let values: Vec<(Corner, Result<f64, String>)> = points
                .iter()
                .map(|(c, r)| {
                    let v = r.values[i]
                        .clone()
                        .unwrap_or_else(|| Err("not measured".to_string()));
                    (c.clone(), v)
                })
                .collect();
            requirements::evaluate_response(&model.formulas, req, &values)
        };
        if let Status::NotEvaluated(why) = &v.status {
            diags.push(Diagnostic::new(
                Code::NotYetEvaluated,
                req.span,
                format!("not evaluated: {why}"),
            ));
        }
        verdicts.push(v);
    }
    verdicts
}

/// The driven-response value of every non-modal requirement at one corner.
fn measure_all(
    sys: &SystemModel,
    mats: &crate::assemble::Matrices,
    modal: &ModalResult,
    inputs: &response::Inputs,
    needs_time: bool,
) -> Vec<Option<Result<f64, String>>> {
    let run = |inputs: &response::Inputs| {
        time_response::loading(mats, inputs)
            .and_then(|l| time_response::simulate(mats, &l, modal, &TimeConfig::default()))
    };
    let wants =
        |f: fn(&Subject) -> bool| needs_time && sys.requirements.iter().any(|r| f(&r.subject));
    // Settling is judged under every transient load (steps, impulses, initial conditions);
    // overshoot under the step drives alone (language.md §5).
    let transient = wants(|s| matches!(s, Subject::Settling { .. })).then(|| run(inputs));
    let steps_only = wants(|s| matches!(s, Subject::Overshoot { .. })).then(|| {
        let steps = response::Inputs {
            drives: inputs
                .drives
                .iter()
                .filter(|d| d.waveform == Waveform::Step)
                .cloned()
                .collect(),
            initials: Vec::new(),
            ..inputs.clone()
        };
        run(&steps)
    });
    let err = |e: response::ResponseError| e.to_string();
    sys.requirements
        .iter()
        .map(|req| {
            let dof = req.dof.unwrap_or(0);
            let drive = req.drive.and_then(|d| inputs.drives.get(d));
            Some(
                match (
                    &req.subject,
                    drive,
                    if matches!(req.subject, Subject::Overshoot { .. }) {
                        &steps_only
                    } else {
                        &transient
                    },
                ) {
                    (s, _, _) if requirements::is_modal(s) => return None,
                    (Subject::Separation { .. }, Some(d), _) => {
                        response::separation(d, modal).map(|s| s.value).map_err(err)
                    }
                    (Subject::Transmissibility { .. }, Some(d), _) => {
                        response::transmissibility(mats, &inputs.ground, d, req.dof, modal)
                            .map(|b| b.value)
                            .map_err(err)
                    }
                    (Subject::Amplitude { .. }, _, _) => {
                        response::amplitude(mats, &inputs.ground, &inputs.drives, dof, modal)
                            .map_err(err)
                    }
                    (Subject::Sag { .. }, _, _) => match inputs.gravity {
                        Some(g) => statics::sag(mats, g).map_err(err).and_then(|x| {
                            x.get(dof)
                                .copied()
                                .ok_or_else(|| "no such coordinate".to_string())
                        }),
                        None => Err("the system states no gravity".to_string()),
                    },
                    (Subject::Settling { .. }, _, Some(t)) => {
                        let within = req.within.map_or(0.02, |q| q.nominal);
                        t.as_ref()
                            .map_err(|e| e.to_string())
                            .and_then(|t| t.settling_time(dof, within).map_err(err))
                    }
                    (Subject::Overshoot { .. }, _, Some(t)) => {
                        t.as_ref().map_err(|e| e.to_string()).and_then(|t| {
                            if t.has_step {
                                t.overshoot(dof).map_err(err)
                            } else {
                                Err("`overshoot` needs a `step` drive, and this system has none"
                                    .to_string())
                            }
                        })
                    }
                    _ => Err("the requirement's drive or response is missing".to_string()),
                },
            )
        })
        .collect()
}

/// Warns about dampers across which no undamped mode has any relative motion.
fn dampers_not_felt(sys: &SystemModel, result: &ModalResult, diags: &mut Vec<Diagnostic>) {
    // Each elastic mode with the largest magnitude of its shape (relative motion is judged on
    // the shape scaled to a largest entry of 1).
    let elastic: Vec<_> = result
        .modes
        .iter()
        .filter(|m| m.regime != ModeRegime::RigidBody)
        .map(|m| (m, m.shape.iter().fold(0.0_f64, |a, x| a.max(x.abs()))))
        .filter(|&(_, peak)| peak > 0.0)
        .collect();
    if elastic.is_empty() {
        return;
    }
    for el in sys
        .elements
        .iter()
        .filter(|e| e.kind == ElementKind::Damper)
    {
        let at = |shape: &[f64], e: End| match e {
            End::Ground => 0.0,
            End::Dof(i) => shape.get(i).copied().unwrap_or(0.0),
        };
        let felt = elastic.iter().any(|(m, peak)| {
            let rel = at(m.shape.as_slice(), el.a) - at(m.shape.as_slice(), el.b);
            rel.abs() > 1e-6 * peak
        });
        if !felt {
            diags.push(Diagnostic::new(
                Code::DamperNotFelt,
                el.name_span,
                format!("no mode moves the two ends of damper `{}` relative to each other, so it damps no mode", el.name),
            ));
        }
    }
}
