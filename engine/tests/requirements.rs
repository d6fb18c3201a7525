//! Requirement verdicts at the worst corner of the tolerance box. Closed forms for one mass
//! (common practice): ω0 = √(k/m), ζ = c / (2√(km)).

use sprung_engine::analysis::{Config, analyze};
use sprung_engine::check;
use sprung_engine::requirements::Status;

fn run(text: &str) -> (sprung_engine::Checked, sprung_engine::analysis::Analysis) {
    let c = check(text);
    assert!(!c.has_errors(), "{:#?}", c.diagnostics);
    let a = analyze(&c, &Config::default());
    (c, a)
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// ζ = 0.05 at nominal: c = 0.05 · 2 · √(40 kN/m · 10 kg).
const ONE_MASS: &str = "system mount {
  mass m = 10 kg ± 10%
  spring k between m and ground = 40 kN/m ± 5%
  damper c between m and ground = 0.05 * 2 * sqrt(40 kN/m * 10 kg)
  require damping >= 0.049
  require frequency of mode 1 in 9 Hz .. 11 Hz
}";

#[test]
fn passes_at_nominal_but_fails_at_the_worst_corner_which_is_named() {
    let (_, a) = run(ONE_MASS);
    let v = &a.systems[0].verdicts[0];
    assert_eq!(v.status, Status::Failed);
    // Heaviest mass and stiffest spring give the least damping ratio: 0.05/√(1.1·1.05).
    let expected = 0.05 / (1.1f64 * 1.05).sqrt();
    assert!(
        rel(v.value.expect("value"), expected) < 1e-12,
        "{:?}",
        v.value
    );
    assert_eq!(v.limit, Some(0.049));
    let corner = v.worst_corner.as_ref().expect("a corner, not nominal");
    assert_eq!(corner.describe(), "m +10%, k +5%");
    let failed: Vec<_> = a.diagnostics.iter().filter(|d| d.code == "SP501").collect();
    assert_eq!(failed.len(), 1);
    assert!(
        failed[0]
            .message
            .starts_with("damping of mode 1: 0.04652 < 0.049 required (margin -0.002"),
        "{}",
        failed[0].message
    );
    assert!(
        failed[0].message.ends_with("worst at m +10%, k +5%"),
        "{}",
        failed[0].message
    );
}

#[test]
fn frequency_range_is_searched_over_the_corners() {
    let (_, a) = run(ONE_MASS);
    let v = &a.systems[0].verdicts[1];
    assert_eq!(v.status, Status::Passed, "{}", v.message);
    // The value nearest a bound: lightest mass, stiffest spring, f = √(1.05·40e3/(0.9·10))/2π.
    let f = (1.05f64 * 40e3 / 9.0).sqrt() / std::f64::consts::TAU;
    assert!(rel(v.value.expect("value") / std::f64::consts::TAU, f) < 1e-12);
    assert!(rel(v.limit.expect("limit") / std::f64::consts::TAU, 11.0) < 1e-12);
}

#[test]
fn regimes_including_exact_critical_damping() {
    let text = "system door {
  mass leaf = 25 kg
  spring closer between leaf and ground = 900 N/m
  damper check between leaf and ground = 2 * sqrt(closer * leaf)
  require regime is critically damped
  require regime is not underdamped
  require damping in 0.999999 .. 1.000001
}";
    let (_, a) = run(text);
    for v in &a.systems[0].verdicts {
        assert_eq!(v.status, Status::Passed, "{}", v.message);
    }
    let under = "system door {
  mass leaf = 25 kg
  spring closer between leaf and ground = 900 N/m
  damper check between leaf and ground = 0.3 * 2 * sqrt(closer * leaf)
  require regime is not underdamped
}";
    let (_, a) = run(under);
    let v = &a.systems[0].verdicts[0];
    assert_eq!(v.status, Status::Failed);
    assert_eq!(
        v.message,
        "regime of mode 1: underdamped, not underdamped required; at nominal values"
    );
}

#[test]
fn is_not_underdamped_fails_for_undamped_modes_too() {
    let text = "system bare {\n mass m = 1 kg\n spring k between m and ground = 1 kN/m\n require regime is not underdamped\n}";
    let (_, a) = run(text);
    assert_eq!(a.systems[0].verdicts[0].status, Status::Failed);
}

#[test]
fn rigid_body_modes_are_excepted_with_a_warning() {
    let text = "system float {
  mass a = 1 kg
  mass b = 1 kg
  spring k between a and b = 1 kN/m
  damper c between a and b = 20 N*s/m
  require damping >= 0.1
}";
    let c = check(text);
    let a = analyze(&c, &Config::default());
    let v = &a.systems[0].verdicts[0];
    // The elastic mode: reduced mass 0.5 kg, ζ = c / (2 √(k μ)) = 20 / (2 √500).
    assert!(
        rel(v.value.expect("value"), 20.0 / (2.0 * 500f64.sqrt())) < 1e-9,
        "{v:?}"
    );
    assert_eq!(v.mode, Some(2));
    assert!(
        a.diagnostics.iter().any(|d| d.code == "SP506"),
        "{:#?}",
        a.diagnostics
    );
}

#[test]
fn driven_subjects_follow_the_one_mass_closed_forms() {
    // One mass (standard vibration texts, from memory): 100 kg on 250 kN/m, ζ = 0.1.
    // ωn = 50 rad/s; a force at 15 Hz gives r = 30π/50 = 1.885; T = √((1+(2ζr)²)/((1−r²)²+(2ζr)²));
    // separation |fn − fd|/fd; static sag δ = m g / k; step overshoot exp(−πζ/√(1−ζ²)).
    let text = "system s {
  mass m = 100 kg
  spring k between m and ground = 250 kN/m
  damper c between m and ground = 0.1 * 2 * sqrt(k * m)
  force f on m = 40 N at 15 Hz
  force lift on m = step 500 N
  gravity = 1 gn
  require separation from f >= 20%
  require transmissibility of f <= 0.5
  require amplitude of m <= 1 mm
  require sag of m <= 5 mm
  require overshoot of m <= 80%
  require settling of m <= 2 s
}";
    let (_, a) = run(text);
    let v = &a.systems[0].verdicts;
    for x in v {
        assert_eq!(x.status, Status::Passed, "{}", x.message);
    }
    let wn = 50.0f64;
    let z = 0.1f64;
    let w = 15.0 * std::f64::consts::TAU;
    let r = w / wn;
    let d = ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
    let fnat = wn / std::f64::consts::TAU;
    assert!(rel(v[0].value.expect("separation"), (fnat - 15.0).abs() / 15.0) < 1e-12);
    let t = (1.0 + (2.0 * z * r).powi(2)).sqrt() / d;
    assert!(rel(v[1].value.expect("transmissibility"), t) < 1e-9);
    assert!(rel(v[2].value.expect("amplitude"), 40.0 / 250e3 / d) < 1e-9);
    assert!(rel(v[3].value.expect("sag"), 100.0 * 9.80665 / 250e3) < 1e-12);
    let overshoot = (-std::f64::consts::PI * z / (1.0 - z * z).sqrt()).exp();
    assert!(rel(v[4].value.expect("overshoot"), overshoot) < 1e-6);
    // 2% settling near the envelope bound −ln(0.02√(1−ζ²))/(ζωn) (standard texts, from memory),
    // never later than it.
    let bound = -(0.02 * (1.0 - z * z).sqrt()).ln() / (z * wn);
    let settle = v[5].value.expect("settling");
    assert!(
        settle <= bound * (1.0 + 1e-9)
            && settle > bound - std::f64::consts::PI / (wn * (1.0 - z * z).sqrt()),
        "{settle} vs {bound}"
    );
}

#[test]
fn a_driven_requirement_fails_at_its_worst_corner() {
    // Sag δ = m g / k: the softest spring sags most, 100 kg × gn / (0.9 × 250 kN/m) = 4.3585 mm.
    let text = "system s {\n mass m = 100 kg\n spring k between m and ground = 250 kN/m ± 10%\n gravity = 1 gn\n require sag of m <= 4.2 mm\n}";
    let (_, a) = run(text);
    let v = &a.systems[0].verdicts[0];
    assert_eq!(v.status, Status::Failed);
    assert!(rel(v.value.expect("sag"), 100.0 * 9.80665 / 225e3) < 1e-12);
    assert_eq!(
        v.worst_corner.as_ref().map(|c| c.describe()).as_deref(),
        Some("k -10%")
    );
    assert!(
        a.diagnostics
            .iter()
            .any(|d| d.code == "SP501" && d.message.starts_with("sag: 4.359 mm > 4.2 mm required")),
        "{:#?}",
        a.diagnostics
    );
}

#[test]
fn a_value_that_follows_its_tolerance_exactly_is_named_at_nominal() {
    // ζ = 0.05 by construction at every corner: the verdict names nominal, not a corner.
    let text = "system s {\n let k = 40 kN/m ± 10%\n mass m = 10 kg\n spring ks between m and ground = k\n damper c between m and ground = 0.05 * 2 * sqrt(k * m)\n require damping >= 0.04\n}";
    let (_, a) = run(text);
    assert!(
        a.systems[0].verdicts[0].worst_corner.is_none(),
        "{}",
        a.systems[0].verdicts[0].message
    );
}

#[test]
fn more_than_two_to_the_sixteen_corners_is_a_diagnostic() {
    let mut text = String::from("system big {\n");
    for i in 0..17 {
        text.push_str(&format!(
            " mass m{i} = 1 kg ± 1%\n spring k{i} between m{i} and ground = 1 kN/m\n"
        ));
    }
    text.push_str(" require frequency > 1 Hz\n}");
    let (_, a) = run(&text);
    assert!(
        a.diagnostics.iter().any(|d| d.code == "SP603"),
        "{:#?}",
        a.diagnostics
    );
    assert!(matches!(
        a.systems[0].verdicts[0].status,
        Status::NotEvaluated(_)
    ));
}

#[test]
fn a_damper_that_a_mode_stretches_raises_no_warning() {
    // Two equal masses on equal springs joined by a spring and a damper: the out-of-phase
    // mode stretches the damper, so it is felt.
    let felt = "system pair {\n mass a = 1 kg\n mass b = 2 kg\n spring ka between a and ground = 1 kN/m\n spring kb between b and ground = 1 kN/m\n spring ab between a and b = 1 kN/m\n damper c between a and b = 5 N*s/m\n}";
    let (_, a) = run(felt);
    assert!(a.diagnostics.is_empty(), "{:#?}", a.diagnostics);
}

#[test]
fn a_corner_search_over_the_work_budget_is_refused_not_run() {
    // 40 masses and 16 toleranced values: 65,537 eigendecompositions of an 80-square state
    // matrix would take minutes, so the analyzer says so instead.
    let mut text = String::from("system chain {\n spring s0 between m0 and ground = 1 kN/m\n");
    for i in 0..40 {
        let tol = if i < 16 { " ± 1%" } else { "" };
        text.push_str(&format!(" mass m{i} = 1 kg{tol}\n"));
        if i > 0 {
            text.push_str(&format!(
                " spring s{i} between m{i} and m{} = 1 kN/m\n",
                i - 1
            ));
        }
    }
    text.push_str(" require frequency > 0.1 Hz\n}");
    let (_, a) = run(&text);
    let d = a
        .diagnostics
        .iter()
        .find(|d| d.code == "SP603")
        .expect("budget diagnostic");
    assert!(d.message.contains("65537 corners"), "{}", d.message);
    assert!(matches!(
        a.systems[0].verdicts[0].status,
        Status::NotEvaluated(_)
    ));
    // The modes at nominal are still there.
    assert_eq!(a.systems[0].modes.as_ref().map(|m| m.modes.len()), Some(40));
}

#[test]
fn a_mass_matrix_that_is_not_positive_definite_is_a_diagnostic() {
    let text = "system s {\n mass a = 0 kg\n spring k between a and ground = 1 kN/m\n require frequency > 1 Hz\n}";
    let c = check(text);
    assert!(
        c.diagnostics.iter().any(|d| d.code == "SP405"),
        "{:#?}",
        c.diagnostics
    );
    let a = analyze(&c, &Config::default());
    let d = a
        .diagnostics
        .iter()
        .find(|d| d.code == "SP602")
        .expect("analysis failure reported");
    assert!(d.message.contains("system `s`"), "{}", d.message);
    assert!(a.systems[0].modes.is_none());
    assert!(matches!(
        a.systems[0].verdicts[0].status,
        Status::NotEvaluated(_)
    ));
}
