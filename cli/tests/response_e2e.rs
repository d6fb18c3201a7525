//! End to end: `sprung response` and `sprung simulate` against one-mass closed forms
//! (standard vibration texts, from memory): |X| = (F/k)/√((1−r²)²+(2ζr)²), and a step load
//! settles to F/k.

mod common;

use common::{code, json, scratch, sprung, stdout, write};

const MODEL: &str = "system s {
  mass m = 100 kg
  spring k between m and ground = 250 kN/m
  damper c between m and ground = 0.1 * 2 * sqrt(k * m)
  force f on m = 40 N at 15 Hz
  force lift on m = step 500 N
}
";

#[test]
fn response_csv_matches_the_closed_form() {
    let file = scratch("response").join("s.sprung");
    write(&file, MODEL);
    let out = sprung([
        "response",
        file.to_str().expect("utf-8 path"),
        "--at",
        "m",
        "--from",
        "15",
        "--to",
        "30",
        "--points",
        "2",
    ]);
    assert_eq!(code(&out), 0);
    let text = stdout(&out);
    let rows: Vec<&str> = text.lines().filter(|l| !l.starts_with('#')).collect();
    assert_eq!(rows[0], "frequency_hz,amplitude,phase_deg");
    let first: Vec<f64> = rows[1]
        .split(',')
        .map(|x| x.parse().expect("number"))
        .collect();
    let (wn, z) = (50.0f64, 0.1f64);
    let r = 15.0 * std::f64::consts::TAU / wn;
    let expected = 40.0 / 250e3 / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
    assert!((first[0] - 15.0).abs() < 1e-9);
    assert!(
        ((first[1] - expected) / expected).abs() < 1e-9,
        "{} vs {expected}",
        first[1]
    );
    // Above resonance the response lags by more than 90 degrees.
    assert!(first[2] < -90.0 && first[2] > -180.0, "{}", first[2]);
}

#[test]
fn simulate_json_settles_to_the_static_deflection() {
    let file = scratch("simulate").join("s.sprung");
    write(&file, MODEL);
    let out = sprung([
        "simulate",
        file.to_str().expect("utf-8 path"),
        "--at",
        "m",
        "--for",
        "3",
        "--format",
        "json",
    ]);
    assert_eq!(code(&out), 0);
    let report = json(&out);
    let h = report["history"].as_array().expect("history");
    assert_eq!(h[0]["displacement"], 0.0);
    let last = h.last().expect("samples");
    assert!((last["time_s"].as_f64().expect("t") - 3.0).abs() < 1e-9);
    // ζωn = 5 /s, so after 3 s the envelope is e^-15 of the step: F/k = 2 mm.
    let x = last["displacement"].as_f64().expect("x");
    assert!((x - 0.002).abs() < 1e-8, "{x}");
}

#[test]
fn unknown_node_is_a_usage_error() {
    let file = scratch("response-node").join("s.sprung");
    write(&file, MODEL);
    let out = sprung([
        "response",
        file.to_str().expect("utf-8 path"),
        "--at",
        "nothing",
    ]);
    assert_eq!(code(&out), 2);
}
