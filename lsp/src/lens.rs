//! Code lens over each system: its mode count and lowest natural frequency. Fully resolved
//! when sent; the command is a title only (an empty command id), so there is nothing the
//! client would be asked to run.

use sprung_engine::modes::ModeRegime;
use tower_lsp_server::ls_types::{CodeLens, Command};

use crate::display::hz;
use crate::snapshot::Snapshot;

pub fn code_lenses(snap: &Snapshot) -> Vec<CodeLens> {
    snap.systems()
        .filter_map(|view| {
            let title = match view.analysis.and_then(|a| a.modes.as_ref()) {
                Some(modal) => {
                    let n = modal.modes.len();
                    let lowest = modal
                        .modes
                        .iter()
                        .find(|m| m.regime != ModeRegime::RigidBody)
                        .map_or("only rigid-body modes".to_string(), |m| {
                            format!("lowest {}", hz(m.natural_frequency))
                        });
                    format!("{n} mode{} · {lowest}", if n == 1 { "" } else { "s" })
                }
                None if view.model.is_some_and(|m| m.has_errors) => {
                    "not analyzed: the system has errors".to_string()
                }
                None => return None,
            };
            Some(CodeLens {
                range: snap.range(view.syntax.name.span),
                command: Some(Command {
                    title,
                    command: String::new(),
                    arguments: None,
                }),
                data: None,
            })
        })
        .collect()
}
