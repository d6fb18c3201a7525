//! The tolerance box of a system: nominal first, then every corner (each toleranced value at its
//! low or high end). Values computed from a toleranced value follow it through the formula arena
//! and add no corners of their own.

use crate::model::{Model, SystemModel, ToleranceKind};
use crate::requirements::sig;

/// Past this many corners the analyzer reports a diagnostic instead of guessing (language.md §5).
pub const MAX_CORNERS: u64 = 1 << 16;

/// One end of one toleranced value.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct CornerEnd {
    /// The parameter's index in [`Model::params`].
    pub param: usize,
    pub name: String,
    pub high: bool,
    /// How the end reads in a message: `feet -15%` for a relative tolerance, `motor high` for
    /// an absolute one.
    pub label: String,
}

/// A point of the tolerance box: the deviation of every parameter of the model (zero for the
/// parameters this system does not depend on).
#[derive(Clone, Debug, PartialEq)]
pub struct Corner {
    pub deviations: Vec<f64>,
    /// Empty at nominal.
    pub ends: Vec<CornerEnd>,
}

impl Corner {
    pub fn is_nominal(&self) -> bool {
        self.ends.is_empty()
    }

    /// `feet low, motor high`; `nominal` when no value is at an end.
    pub fn describe(&self) -> String {
        if self.ends.is_empty() {
            return "nominal".to_string();
        }
        let parts: Vec<&str> = self.ends.iter().map(|e| e.label.as_str()).collect();
        parts.join(", ")
    }
}

/// How many points [`corners`] yields: nominal plus 2^p corners.
pub fn count(sys: &SystemModel) -> u64 {
    if sys.params.is_empty() {
        1
    } else {
        1 + (1u64 << sys.params.len().min(63))
    }
}

/// Whether the box is small enough to search exhaustively.
pub fn within_limit(sys: &SystemModel) -> bool {
    sys.params.len() <= 16
}

/// Nominal, then every corner in a fixed order (bit i of the corner number set = parameter i
/// high). Call only when [`within_limit`] holds; beyond it this yields nominal alone.
pub fn corners<'m>(model: &'m Model, sys: &'m SystemModel) -> impl Iterator<Item = Corner> + 'm {
    let p = if within_limit(sys) {
        sys.params.len()
    } else {
        0
    };
    let total: u64 = if p == 0 { 0 } else { 1u64 << p };
    let nominal = Corner {
        deviations: vec![0.0; model.params.len()],
        ends: Vec::new(),
    };
    std::iter::once(nominal).chain((0..total).map(move |bits| {
        let mut deviations = vec![0.0; model.params.len()];
        let mut ends = Vec::with_capacity(p);
        for (i, &param) in sys.params.iter().enumerate() {
            let high = bits >> i & 1 == 1;
            let pr = &model.params[param];
            deviations[param] = if high { pr.high } else { pr.low };
            let label = match pr.kind {
                ToleranceKind::Relative => {
                    let pct = (if high { pr.high } else { pr.low }) * 100.0;
                    let sign = if pct >= 0.0 { "+" } else { "-" };
                    format!("{} {sign}{}%", pr.name, sig(pct.abs()))
                }
                ToleranceKind::Absolute => {
                    format!("{} {}", pr.name, if high { "high" } else { "low" })
                }
            };
            ends.push(CornerEnd {
                param,
                name: pr.name.clone(),
                high,
                label,
            });
        }
        Corner { deviations, ends }
    }))
}
