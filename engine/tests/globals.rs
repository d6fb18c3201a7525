//! Top-level lets in the checked model: evaluated once at file level, in SI, with their own
//! tolerance and the systems that use them. Values by hand calculation.

use sprung_engine::check;
use sprung_engine::dim::Dim;
use sprung_engine::model::{GlobalLet, ToleranceKind};

const TEXT: &str = "## Four rubber feet.
let feet = 4 * 18 kN/m ± 15%
let machine = 6.2 kg + 3.4 kg
## 8% of critical for the machine on its feet.
let loss = 0.08 * 2 * sqrt(feet * machine)
let speed = 1450 rpm
let spare = 2 * feet

system centrifuge {
  mass m = machine
  spring rubber between m and ground = feet
  damper rubber_loss between m and ground = loss
}

system fan {
  let feet = 30 kN/m
  mass m = 12 kg
  spring mount between m and ground = feet
  force unbalance on m = 2 N at speed
}
";

fn global<'m>(globals: &'m [GlobalLet], name: &str) -> &'m GlobalLet {
    globals
        .iter()
        .find(|g| g.name == name)
        .unwrap_or_else(|| panic!("no global `{name}`"))
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-12 * b.abs()
}

#[test]
fn top_level_lets_are_kept_with_values_tolerances_and_users() {
    let checked = check(TEXT);
    assert!(!checked.has_errors(), "{:#?}", checked.diagnostics);
    let g = &checked.model.globals;
    assert_eq!(g.len(), 5);

    // 4 × 18 kN/m = 72,000 N/m, ± 15% relative, its own tolerance.
    let feet = global(g, "feet");
    assert!(close(feet.value.nominal, 72_000.0));
    assert_eq!(feet.value.dim, Dim::STIFFNESS);
    let p = &checked.model.params[feet.param.expect("feet has a tolerance")];
    assert_eq!(p.kind, ToleranceKind::Relative);
    assert!(close(p.low, -0.15) && close(p.high, 0.15));
    assert_eq!(
        feet.doc.as_deref().map(str::trim),
        Some("Four rubber feet.")
    );
    // The fan shadows `feet` with its own let, so only the centrifuge uses the top-level one.
    assert_eq!(feet.used_by, [0]);

    // 6.2 kg + 3.4 kg = 9.6 kg.
    let machine = global(g, "machine");
    assert!(close(machine.value.nominal, 9.6));
    assert_eq!(machine.value.dim, Dim::MASS);

    // 0.16 × √(72,000 N/m × 9.6 kg) = 0.16 × √691,200 = 0.16 × 831.3844 = 133.0215 N·s/m.
    let loss = global(g, "loss");
    assert!(close(loss.value.nominal, 0.16 * 691_200f64.sqrt()));
    assert!((loss.value.nominal - 133.0215).abs() < 1e-4);
    assert_eq!(loss.value.dim, Dim::DAMPING);
    // Computed from a toleranced value, it follows it but has no tolerance of its own.
    assert_eq!(loss.param, None);
    assert_eq!(loss.used_by, [0]);

    // 1450 rpm = 1450 × 2π / 60 rad/s = 151.8436 rad/s (rpm = rev/min, rev = 2π rad).
    let speed = global(g, "speed");
    assert!(close(
        speed.value.nominal,
        1450.0 * std::f64::consts::TAU / 60.0
    ));
    assert_eq!(speed.used_by, [1]);

    // Used by nobody.
    let spare = global(g, "spare");
    assert!(close(spare.value.nominal, 144_000.0));
    assert!(spare.used_by.is_empty());
}

#[test]
fn a_bad_top_level_let_is_left_out_and_the_rest_kept() {
    let checked = check(
        "let a = 3 kgs\nlet b = 2 * c\nlet c = 5 N\nsystem s {\n  mass m = 1 kg\n  spring k between m and ground = 1 kN/m\n}\n",
    );
    assert!(checked.has_errors());
    let names: Vec<&str> = checked
        .model
        .globals
        .iter()
        .map(|g| g.name.as_str())
        .collect();
    // Order of definition does not matter: `b` uses `c` defined after it.
    assert_eq!(names, ["b", "c"]);
    assert!(close(checked.model.globals[0].value.nominal, 10.0));
}
