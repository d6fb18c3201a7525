//! The analysis stage: for every system that checked without errors, the modes at nominal and
//! the requirement verdicts at the worst corner of the tolerance box. Pure: the same checked
//! file always gives the same analysis, so the CLI and the language server share it.

use sprung_syntax::ast::ElementKind;

use crate::Checked;
use crate::assemble::{AssembleError, Assembler, Limits};
use crate::corners::{self, Corner};
use crate::diagnostics::{Code, Diagnostic};
use crate::model::{End, Model, SystemModel};
use crate::modes::{self, ModalConfig, ModalResult, ModeRegime};
use crate::requirements::{self, ModeSummary, Status, Verdict};

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
    let solve = |asm: &mut Assembler<'_>, corner: &Corner| -> Result<ModalResult, String> {
        let mats = asm
            .assemble(&corner.deviations)
            .map_err(|e| e.to_string())?;
        modes::analyze(&mats, &config.modal).map_err(|e| e.to_string())
    };
    let nominal_corner = Corner {
        deviations: vec![0.0; model.params.len()],
        ends: Vec::new(),
    };
    let nominal = match solve(&mut assembler, &nominal_corner) {
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

    let modal: Vec<usize> = (0..sys.requirements.len())
        .filter(|&i| requirements::is_modal(&sys.requirements[i].subject))
        .collect();
    let mut verdicts: Vec<Option<Verdict>> = vec![None; sys.requirements.len()];
    if !modal.is_empty() {
        if !corners::within_limit(sys) {
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
            for &i in &modal {
                verdicts[i] = Some(requirements::not_evaluated(
                    "too many tolerance corners".into(),
                ));
            }
        } else {
            let mut points: Vec<(Corner, Result<Vec<ModeSummary>, String>)> = Vec::new();
            for corner in corners::corners(model, sys) {
                let modes = if corner.is_nominal() {
                    Ok(summaries(&nominal))
                } else {
                    solve(&mut assembler, &corner).map(|r| summaries(&r))
                };
                points.push((corner, modes));
            }
            let rigid: Vec<usize> = nominal
                .modes
                .iter()
                .enumerate()
                .filter(|(_, m)| m.regime == ModeRegime::RigidBody)
                .map(|(i, _)| i + 1)
                .collect();
            for &i in &modal {
                let req = &sys.requirements[i];
                let v = requirements::evaluate_modal(&model.formulas, req, &points);
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
                if let Status::NotEvaluated(why) = &v.status {
                    diags.push(Diagnostic::new(
                        Code::NotYetEvaluated,
                        req.span,
                        format!("not evaluated: {why}"),
                    ));
                }
                verdicts[i] = Some(v);
            }
        }
    }
    let verdicts: Vec<Verdict> = verdicts
        .into_iter()
        .enumerate()
        .map(|(i, v)| {
            v.unwrap_or_else(|| {
                let req = &sys.requirements[i];
                let word = req.subject.word();
                let why = format!("`{word}` requirements are not evaluated yet by this version");
                diags.push(Diagnostic::new(
                    Code::NotYetEvaluated,
                    req.span,
                    why.clone(),
                ));
                requirements::not_evaluated(why)
            })
        })
        .collect();
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

/// Warns about dampers across which no undamped mode has any relative motion.
fn dampers_not_felt(sys: &SystemModel, result: &ModalResult, diags: &mut Vec<Diagnostic>) {
    let elastic: Vec<_> = result
        .modes
        .iter()
        .filter(|m| m.regime != ModeRegime::RigidBody)
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
        let felt = elastic.iter().any(|m| {
            let rel = at(&m.shape_unit, el.a) - at(&m.shape_unit, el.b);
            rel.abs() > 1e-6
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
