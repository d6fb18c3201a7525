//! The examples' modes against hand calculation (closed form for one mass, common practice:
//! ωn = √(k/m), ζ = c / (2√(km))).

use sprung_engine::analysis::{Config, analyze};
use sprung_engine::modes::ModeRegime;

fn analyzed(name: &str) -> (sprung_engine::Checked, sprung_engine::analysis::Analysis) {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../examples")
        .join(name);
    let text = std::fs::read_to_string(&path).expect("example exists");
    let checked = sprung_engine::check(&text);
    assert!(!checked.has_errors(), "{name}: {:#?}", checked.diagnostics);
    let analysis = analyze(&checked, &Config::default());
    (checked, analysis)
}

#[test]
fn fan_skid_matches_the_hand_calculation() {
    // By hand from the file: four isolators of 65 kN/m under 420 kg, snubbers at ζ = 0.05.
    let (_, a) = analyzed("fan-skid.sprung");
    let modes = &a.systems[0].modes.as_ref().expect("analyzed").modes;
    assert_eq!(modes.len(), 1);
    let omega = (4.0f64 * 65_000.0 / 420.0).sqrt();
    assert!((modes[0].natural_frequency - omega).abs() / omega < 1e-12);
    // 3.96 Hz, as the file's header comment says.
    assert!((modes[0].natural_frequency_hz - 3.96).abs() < 0.005);
    assert!((modes[0].damping_ratio.expect("damped") - 0.05).abs() < 1e-12);
    assert_eq!(modes[0].regime, ModeRegime::Underdamped);
    // ωd = ωn √(1 − ζ²).
    let wd = omega * (1.0f64 - 0.0025).sqrt();
    assert!((modes[0].damped_frequency.expect("oscillates") - wd).abs() / wd < 1e-12);
}

#[test]
fn every_one_mass_example_follows_the_closed_form() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples");
    let mut one_mass = 0;
    for entry in std::fs::read_dir(dir).expect("examples") {
        let path = entry.expect("entry").path();
        let name = path
            .file_name()
            .and_then(|n| n.to_str())
            .unwrap_or_default()
            .to_string();
        if !name.ends_with(".sprung") {
            continue;
        }
        let (c, a) = analyzed(&name);
        for (sys, sa) in c.model.systems.iter().zip(&a.systems) {
            if sys.dofs.len() != 1
                || sys.elements.iter().any(|e| {
                    e.a != sprung_engine::model::End::Ground
                        && e.b != sprung_engine::model::End::Ground
                })
            {
                continue;
            }
            one_mass += 1;
            let m = sys.dofs[0].value.nominal;
            let sum = |kind| -> f64 {
                sys.elements
                    .iter()
                    .filter(|e| e.kind == kind)
                    .map(|e| e.value.nominal)
                    .sum()
            };
            let k = sum(sprung_syntax::ast::ElementKind::Spring);
            let cdamp = sum(sprung_syntax::ast::ElementKind::Damper);
            let mode = &sa.modes.as_ref().expect("analyzed").modes[0];
            let w0 = (k / m).sqrt();
            let gamma = cdamp / (2.0 * m);
            assert!((mode.natural_frequency - w0).abs() / w0 < 1e-12, "{name}");
            assert!(
                (mode.damping_ratio.expect("damped") - gamma / w0).abs() < 1e-12,
                "{name}"
            );
            let regime = if gamma < w0 {
                ModeRegime::Underdamped
            } else {
                ModeRegime::Overdamped
            };
            assert_eq!(mode.regime, regime, "{name}: γ = {gamma}, ω0 = {w0}");
        }
    }
    assert!(
        one_mass >= 2,
        "expected at least two one-mass examples, found {one_mass}"
    );
}
