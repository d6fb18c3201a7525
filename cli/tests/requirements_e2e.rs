//! End to end: a design change that breaks a requirement fails the build, with a message a
//! reviewer understands without opening the file; `sprung modes` prints the contract.
//! Closed forms for one mass (common practice): f = √(k/m)/2π, ζ = c/(2√(km)).

mod common;

use common::{code, json, scratch, sprung, stdout, write};

/// A door closer: 25 kg leaf, 900 N/m closer spring. With c = 2√(km) = 300 N·s/m it is
/// critically damped; a cheaper damper of 60% of that makes it underdamped (ζ = 0.6).
fn door(damper: &str) -> String {
    format!(
        "system door \"Self-closing door\" {{\n  mass leaf = 25 kg\n  spring closer between leaf and ground = 900 N/m\n  damper check between leaf and ground = {damper}\n  require regime is not underdamped\n  require frequency of mode 1 in 0.9 Hz .. 1 Hz\n}}\n"
    )
}

#[test]
fn a_design_that_becomes_underdamped_fails_check() {
    let dir = scratch("underdamped");
    let good = dir.join("good.sprung");
    let bad = dir.join("bad.sprung");
    write(&good, door("2 * sqrt(closer * leaf)"));
    write(&bad, door("0.6 * 2 * sqrt(closer * leaf)"));

    let out = sprung(["check".as_ref(), good.as_os_str()]);
    assert_eq!(code(&out), 0, "{}", stdout(&out));

    let out = sprung(["check".as_ref(), bad.as_os_str()]);
    assert_eq!(code(&out), 1);
    let text = stdout(&out);
    assert!(text.contains("SP501"), "{text}");
    assert!(
        text.contains("regime of mode 1: underdamped, not underdamped required; at nominal values"),
        "{text}"
    );
    assert!(
        text.contains("bad.sprung:5:3"),
        "the failure is on the require line:\n{text}"
    );
    assert!(
        text.contains("Caution: results hold for linear lumped models only"),
        "{text}"
    );

    let out = sprung([
        "check".as_ref(),
        bad.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(code(&out), 1);
    let report = json(&out);
    assert_eq!(report["passed"], false);
    let reqs = &report["files"][0]["systems"][0]["requirements"];
    assert_eq!(reqs[0]["line"], 5);
    assert_eq!(reqs[0]["text"], "regime is not underdamped");
    assert_eq!(reqs[0]["passed"], false);
    assert_eq!(reqs[0]["status"], "failed");
    assert!(reqs[0]["worst_corner"].is_null());
    // f = √(900/25)/2π = 6/2π = 0.95493 Hz, reported in hertz; the nearer bound is 1 Hz (0.045 Hz away, against 0.055 Hz).
    assert_eq!(reqs[1]["passed"], true);
    let f = reqs[1]["value"].as_f64().expect("a number");
    assert!((f - 6.0 / std::f64::consts::TAU).abs() < 1e-12, "{f}");
    assert!((reqs[1]["limit"].as_f64().expect("a number") - 1.0).abs() < 1e-12);
    let d = report["files"][0]["diagnostics"].as_array().expect("list");
    assert!(
        d.iter()
            .any(|d| d["code"] == "SP501" && d["line"] == 5 && d["column"] == 3)
    );
}

#[test]
fn a_toleranced_design_fails_at_its_worst_corner() {
    let dir = scratch("corner");
    let file = dir.join("mount.sprung");
    // ζ = 0.05 nominal; mass +10% and stiffness +5% give 0.05/√(1.155) = 0.04652 < 0.049.
    write(
        &file,
        "system mount {\n  mass m = 10 kg ± 10%\n  spring k between m and ground = 40 kN/m ± 5%\n  damper c between m and ground = 0.05 * 2 * sqrt(40 kN/m * 10 kg)\n  require damping >= 0.049\n}\n",
    );
    let out = sprung([
        "check".as_ref(),
        file.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(code(&out), 1);
    let req = &json(&out)["files"][0]["systems"][0]["requirements"][0];
    assert_eq!(req["worst_corner"]["m"], "high");
    assert_eq!(req["worst_corner"]["k"], "high");
    let v = req["value"].as_f64().expect("a number");
    assert!((v - 0.05 / (1.1f64 * 1.05).sqrt()).abs() < 1e-12, "{v}");
}

#[test]
fn modes_json_follows_the_contract() {
    let dir = scratch("modes");
    let file = dir.join("door.sprung");
    write(&file, door("0.6 * 2 * sqrt(closer * leaf)"));
    let out = sprung([
        "modes".as_ref(),
        file.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    assert_eq!(code(&out), 0);
    let report = json(&out);
    let sys = &report["systems"][0];
    assert_eq!(sys["name"], "door");
    assert_eq!(sys["dofs"][0]["name"], "leaf");
    assert_eq!(sys["dofs"][0]["kind"], "translational");
    let mode = &sys["modes"][0];
    assert_eq!(mode["index"], 1);
    assert_eq!(mode["regime"], "underdamped");
    let fnat = mode["natural_frequency_hz"].as_f64().expect("number");
    assert!((fnat - 6.0 / std::f64::consts::TAU).abs() < 1e-12);
    // ωd = ωn √(1 − ζ²) = 6 · 0.8 rad/s.
    let fd = mode["damped_frequency_hz"].as_f64().expect("number");
    assert!((fd - 4.8 / std::f64::consts::TAU).abs() < 1e-12);
    assert!((mode["damping_ratio"].as_f64().expect("number") - 0.6).abs() < 1e-12);
    assert_eq!(mode["shape"], serde_json::json!([1.0]));

    // Critically damped: no damped frequency.
    write(&file, door("2 * sqrt(closer * leaf)"));
    let out = sprung([
        "modes".as_ref(),
        file.as_os_str(),
        "--format".as_ref(),
        "json".as_ref(),
    ]);
    let mode = &json(&out)["systems"][0]["modes"][0];
    assert_eq!(mode["regime"], "critically_damped");
    assert!(mode["damped_frequency_hz"].is_null());

    // The table names the regime in words.
    let out = sprung(["modes".as_ref(), file.as_os_str()]);
    assert!(
        stdout(&out).contains("critically damped"),
        "{}",
        stdout(&out)
    );
}

#[test]
fn modes_of_an_unknown_system_is_a_usage_error() {
    let dir = scratch("modes-unknown");
    let file = dir.join("door.sprung");
    write(&file, door("300 N*s/m"));
    let out = sprung([
        "modes".as_ref(),
        file.as_os_str(),
        "--system".as_ref(),
        "window".as_ref(),
    ]);
    assert_eq!(code(&out), 2);
}
