//! `sprung-engine`: everything between the syntax tree and the results.
//!
//! Owns the unit registry and dimensional analysis ([`units`], [`dim`]), name resolution and
//! expression evaluation with tolerances ([`check`], [`formula`]), the checked model
//! ([`model`]) and diagnostics as plain data ([`diagnostics`]). It must not print, read files
//! beyond the text it is given, or depend on tokio or the LSP.

pub mod analysis;
pub mod assemble;
pub mod check;
pub mod corners;
pub mod diagnostics;
pub mod dim;
pub mod drive_report;
pub mod eigen;
pub mod fixes;
pub mod formula;
pub mod model;
pub mod modes;
pub mod requirements;
pub mod response;
pub mod sizing;
pub mod statics;
pub mod suggest;
pub mod sweep;
pub mod time_response;
pub mod units;

pub use check::{Checked, check};
pub use diagnostics::{Code, Diagnostic, ExpectedUnit, Label, Severity};
