//! The checker on whole texts: values in SI, names, units, tolerances and model warnings.

use sprung_engine::check;
use sprung_engine::model::{DriveForm, End, ToleranceKind};

fn codes(text: &str) -> Vec<&'static str> {
    check(text).diagnostics.iter().map(|d| d.code).collect()
}

fn messages(text: &str) -> Vec<String> {
    check(text)
        .diagnostics
        .iter()
        .map(|d| format!("{} {}", d.code, d.message))
        .collect()
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

const CENTRIFUGE: &str = r#"
## Bench-top centrifuge on a sprung base plate.
let rotor_speed = 3000 rpm

system centrifuge "Centrifuge on rubber feet" {
  let feet = 4 * 18 kN/m ± 15%
  mass head = 6.2 kg
  mass base = 3.4 kg
  spring column between head and base = 650 kN/m
  spring rubber between base and ground = feet
  damper rubber_loss between base and ground = 0.08 * 2 * sqrt(feet * (head + base))
  damper column_loss between head and base = 40 N*s/m
  force unbalance on head = 0.4 g*mm * rotor_speed^2 at 2400 rpm .. rotor_speed
  gravity = 1 gn

  require separation from unbalance >= 25%
  require transmissibility of unbalance <= 0.2
  require damping >= 0.02
  require sag of base <= 5 mm
}
"#;

#[test]
fn design_example_checks_to_si_values() {
    let c = check(CENTRIFUGE);
    let errors: Vec<_> = c.diagnostics.iter().filter(|d| d.is_error()).collect();
    assert!(errors.is_empty(), "{errors:#?}");
    let sys = &c.model.systems[0];
    assert!(!sys.has_errors);
    assert_eq!(sys.title.as_deref(), Some("Centrifuge on rubber feet"));
    let names: Vec<_> = sys.dofs.iter().map(|d| d.name.as_str()).collect();
    assert_eq!(names, ["head", "base"]);
    assert_eq!(sys.elements.len(), 4);
    let rubber = &sys.elements[1];
    assert_eq!((rubber.a, rubber.b), (End::Dof(1), End::Ground));
    assert_eq!(rubber.value.nominal, 72_000.0);
    // 0.08 * 2 * sqrt(72 kN/m * 9.6 kg), by hand: 133.0206 N*s/m.
    let loss = &sys.elements[2];
    assert!(rel(loss.value.nominal, 0.16 * (72_000.0f64 * 9.6).sqrt()) < 1e-12);
    // The drive: 0.4 g*mm = 4e-7 kg*m times (3000 rpm = 100π rad/s)^2.
    let DriveForm::Band {
        amplitude,
        from,
        to,
    } = &sys.drives[0].form
    else {
        panic!("band expected")
    };
    let omega = 3000.0 * std::f64::consts::TAU / 60.0;
    assert!(rel(amplitude.nominal, 4e-7 * omega * omega) < 1e-12);
    assert!(rel(from.nominal, 2400.0 * std::f64::consts::TAU / 60.0) < 1e-12);
    assert!(rel(to.nominal, omega) < 1e-12);
    // Standard gravity, exact by definition.
    assert_eq!(sys.gravity.map(|g| g.nominal), Some(9.80665));
    // One tolerance parameter, named after its let, ±15% relative.
    assert_eq!(sys.params.len(), 1);
    let p = &c.model.params[sys.params[0]];
    assert_eq!(
        (p.name.as_str(), p.kind, p.low, p.high),
        ("feet", ToleranceKind::Relative, -0.15, 0.15)
    );
    // The damper follows the tolerance of `feet`: at the high corner, sqrt(1.15) times nominal.
    let high = c.model.formulas.eval(loss.value.formula, &[0.15]);
    assert!(rel(high, loss.value.nominal * 1.15f64.sqrt()) < 1e-12);
    assert_eq!(sys.requirements.len(), 4);
    assert_eq!(sys.requirements[0].text, "separation from unbalance >= 25%");
}

#[test]
fn names_resolve_regardless_of_order_and_locals_shadow() {
    let text = "let k = 1 N/m\nsystem s {\n damper d between m and ground = 0.1 * 2 * sqrt(k * m)\n spring sp between m and ground = k\n let k = 4 kN/m\n mass m = 1 kg\n}";
    let c = check(text);
    assert!(!c.has_errors(), "{:#?}", c.diagnostics);
    let sys = &c.model.systems[0];
    let sp = sys
        .elements
        .iter()
        .find(|e| e.name == "sp")
        .expect("spring");
    assert_eq!(sp.value.nominal, 4000.0);
    let d = sys.elements.iter().find(|e| e.name == "d").expect("damper");
    assert!(rel(d.value.nominal, 0.2 * 4000f64.sqrt()) < 1e-12);
}

#[test]
fn a_cycle_names_every_member_once() {
    let text = "system s {\n let a = b + 1 kg\n let b = c\n let c = a\n mass m = a\n spring k between m and ground = 1 N/m\n}";
    let c = check(text);
    let cycles: Vec<_> = c.diagnostics.iter().filter(|d| d.code == "SP203").collect();
    assert_eq!(cycles.len(), 1, "{:#?}", c.diagnostics);
    assert!(
        cycles[0].message.contains("`a`, `b` and `c`"),
        "{}",
        cycles[0].message
    );
    assert_eq!(cycles[0].labels.len(), 2);
    // `m` depends on the cycle but is not reported again.
    assert_eq!(c.diagnostics.iter().filter(|d| d.is_error()).count(), 1);
}

#[test]
fn wrong_quantities_say_found_and_expected() {
    let m = messages("system s {\n mass m = 5 N\n spring k between m and ground = 3 kg\n}");
    assert!(
        m.iter()
            .any(|x| x == "SP304 expected a mass (kg) for a mass, found a force (N)"),
        "{m:#?}"
    );
    assert!(
        m.iter().any(|x| x
            == "SP304 expected a stiffness (N/m) for a translational spring, found a mass (kg)"),
        "{m:#?}"
    );
}

#[test]
fn torsional_elements_need_torsional_units() {
    let ok = "system d {\n inertia motor = 0.05 kg*m^2\n inertia pump = 0.2 kg*m^2\n spring shaft between motor and pump = 12 kN*m/rad\n spring mount between pump and ground = 1 kN*m/rad\n damper c between pump and ground = 3 N*m*s/rad\n torque t on motor = 40 N*m at 25 Hz\n}";
    assert!(codes(ok).is_empty(), "{:?}", messages(ok));
    let bad = "system d {\n inertia motor = 0.05 kg*m^2\n spring shaft between motor and ground = 12 kN/m\n}";
    assert_eq!(codes(bad), ["SP304"]);
}

#[test]
fn adding_unlike_quantities_is_refused() {
    let c = check("system s {\n mass m = 1 kg + 2 N/m\n spring k between m and ground = 1 N/m\n}");
    let d = c
        .diagnostics
        .iter()
        .find(|d| d.code == "SP303")
        .expect("mismatch");
    assert_eq!(d.message, "cannot add a mass (kg) and a stiffness (N/m)");
    assert_eq!(d.labels.len(), 2);
}

#[test]
fn tolerances_relative_absolute_and_refused() {
    let c =
        check("system s {\n mass m = 2 kg\n spring k between m and ground = 40 kN/m ± 5 kN/m\n}");
    assert!(!c.has_errors(), "{:#?}", c.diagnostics);
    let p = &c.model.params[0];
    assert_eq!((p.kind, p.high), (ToleranceKind::Absolute, 5000.0));
    for bad in [
        "40 kN/m ± 0.1",
        "40 kN/m ± 2 kg",
        "40 kN/m ± 120%",
        "40 kN/m ± -5%",
    ] {
        let text =
            format!("system s {{\n mass m = 2 kg\n spring k between m and ground = {bad}\n}}");
        assert_eq!(codes(&text), ["SP306"], "{bad}");
    }
}

#[test]
fn topology_errors_and_warnings() {
    assert_eq!(
        codes("system s {\n mass a = 1 kg\n spring k between a and a = 1 N/m\n}")[0],
        "SP401"
    );
    assert_eq!(
        codes(
            "system s {\n mass a = 1 kg\n spring g between ground and ground = 1 N/m\n spring k between a and ground = 1 N/m\n}"
        ),
        ["SP402"]
    );
    let mixed = codes(
        "system s {\n mass a = 1 kg\n inertia r = 1 kg*m^2\n spring k between a and r = 1 N/m\n spring ka between a and ground = 1 N/m\n spring kr between r and ground = 1 N*m/rad\n}",
    );
    assert_eq!(mixed, ["SP403"]);
    let unknown =
        check("system s {\n mass head = 1 kg\n spring k between haed and ground = 1 N/m\n}");
    let d = unknown
        .diagnostics
        .iter()
        .find(|d| d.code == "SP204")
        .expect("unknown node");
    assert_eq!(d.help.as_deref(), Some("did you mean `head`?"));
    // A mass with no spring, a system that never reaches ground, a group without a path.
    assert_eq!(
        codes(
            "system s {\n mass a = 1 kg\n mass b = 1 kg\n spring k between b and ground = 1 N/m\n}"
        ),
        ["SP406"]
    );
    assert_eq!(
        codes("system s {\n mass a = 1 kg\n mass b = 1 kg\n spring k between a and b = 1 N/m\n}"),
        ["SP407"]
    );
    let group = messages(
        "system s {\n mass a = 1 kg\n mass b = 1 kg\n mass c = 1 kg\n spring k between a and b = 1 N/m\n spring g between c and ground = 1 N/m\n}",
    );
    assert_eq!(
        group,
        ["SP408 `a` and `b` have no spring path to ground, so they can move freely"]
    );
}

#[test]
fn non_positive_values_warn() {
    let m = messages("system s {\n mass a = 1 kg\n spring k between a and ground = -5 N/m\n}");
    assert_eq!(
        m,
        [
            "SP405 the stiffness of `k` is -5; a negative value makes the model unstable; only a positive value makes sense"
        ]
    );
}

#[test]
fn drives_need_the_right_quantities() {
    let head = "system s {\n mass a = 1 kg\n spring k between a and ground = 1 kN/m\n";
    assert_eq!(
        codes(&format!("{head} force f on a = 2 kg at 5 Hz\n}}")),
        ["SP304"]
    );
    assert_eq!(
        codes(&format!("{head} torque t on a = 2 N*m at 5 Hz\n}}")),
        ["SP404"]
    );
    assert_eq!(
        codes(&format!("{head} force f on a = 2 N at 30 Hz .. 10 Hz\n}}")),
        ["SP413"]
    );
    let c = check(&format!(
        "{head} motion shake of ground = 0.25 gn at 12 Hz\n force hit on a = impulse 3 N*s\n}}"
    ));
    assert!(!c.has_errors(), "{:#?}", c.diagnostics);
    let sys = &c.model.systems[0];
    assert_eq!(
        sys.drives[0].motion,
        Some(sprung_engine::model::MotionKind::Acceleration)
    );
    assert!(matches!(sys.drives[1].form, DriveForm::Impulse { .. }));
}

#[test]
fn requirements_check_their_limits_and_names() {
    let base = "system s {\n mass a = 1 kg\n spring k between a and ground = 1 kN/m\n force f on a = step 2 N\n";
    let case = |req: &str| codes(&format!("{base} require {req}\n}}"));
    assert_eq!(case("frequency > 5 kg"), ["SP502"]);
    assert_eq!(case("damping is underdamped"), ["SP503"]);
    assert_eq!(case("regime > 3"), ["SP503"]);
    assert_eq!(case("damping of mode 2 >= 0.1"), ["SP504"]);
    assert_eq!(case("separation from nothing >= 10%"), ["SP207"]);
    assert_eq!(case("transmissibility of f <= 0.2"), ["SP503"]);
    assert_eq!(case("sag of a <= 2 mm"), ["SP503"]);
    assert_eq!(case("frequency in 8 Hz .. 5 Hz"), ["SP503"]);
}

#[test]
fn a_long_chain_of_lets_does_not_exhaust_the_stack() {
    let mut text = String::from(
        "system s {\n mass m = x9999\n spring k between m and ground = 1 kN/m\n let x0 = 1 kg\n",
    );
    for i in 1..10_000 {
        text.push_str(&format!(" let x{i} = x{} + 1 g\n", i - 1));
    }
    text.push('}');
    let c = check(&text);
    assert!(!c.has_errors(), "{:?}", c.diagnostics.first());
    assert!(
        rel(
            c.model.systems[0].dofs[0].value.nominal,
            1.0 + 9999.0 * 0.001
        ) < 1e-12
    );
}
