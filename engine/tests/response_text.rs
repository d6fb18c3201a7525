//! The response of models written as .sprung text, through the checker, the assembler and the
//! input evaluator, against one-mass closed forms (standard vibration texts, from memory):
//! r = ω/ωn, transmissibility √((1+(2ζr)²)/((1−r²)²+(2ζr)²)), amplitude
//! (F/k)/√((1−r²)²+(2ζr)²), sag mg/k, step overshoot exp(−πζ/√(1−ζ²)), and
//! x(t) = (F/k)(1 − e^{−ζωn t}(cos ωd t + ζωn/ωd sin ωd t)) for a step,
//! J/(mωd) e^{−ζωn t} sin ωd t for an impulse.

use std::f64::consts::TAU;

use sprung_engine::assemble::{Assembler, Limits, Matrices};
use sprung_engine::check;
use sprung_engine::model::Model;
use sprung_engine::modes::{ModalConfig, ModalResult, analyze};
use sprung_engine::response::{
    Excitation, InputEvaluator, Inputs, ResponseError, Waveform, amplitude, harmonic, separation,
    transmissibility,
};
use sprung_engine::statics::sag;
use sprung_engine::time_response::{TimeConfig, loading, simulate};

struct Setup {
    mats: Matrices,
    inputs: Inputs,
    modal: ModalResult,
}

fn setup_at(text: &str, deviations: &[f64]) -> (Setup, Model) {
    let c = check(text);
    assert!(!c.has_errors(), "{:#?}", c.diagnostics);
    let model = c.model;
    let sys = &model.systems[0];
    let mats = Assembler::new(&model, sys, Limits::default())
        .unwrap()
        .assemble(deviations)
        .unwrap();
    let inputs = InputEvaluator::new(&model, sys)
        .unwrap()
        .evaluate(deviations)
        .unwrap();
    let modal = analyze(&mats, &ModalConfig::default()).unwrap();
    let setup = Setup {
        mats,
        inputs,
        modal,
    };
    (setup, model.clone())
}

fn setup(text: &str) -> Setup {
    setup_at(text, &[]).0
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

fn closed_t(r: f64, z: f64) -> f64 {
    ((1.0 + (2.0 * z * r).powi(2)) / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2))).sqrt()
}

fn closed_amp(r: f64, z: f64) -> f64 {
    1.0 / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt()
}

const SKID: &str = "
let fan_speed = 1180 rpm
system skid {
  let isolator = 65 kN/m ± 10%
  mass frame = 420 kg
  spring isolators between frame and ground = 4 * isolator
  damper snubbers between frame and ground = 2 * 0.05 * sqrt(isolators * frame)
  force unbalance on frame = 180 N at fan_speed
  force sweep on frame = 50 N at 2 Hz .. 30 Hz
  gravity = 1 gn
}";

#[test]
fn fan_skid_force_drives() {
    let s = setup(SKID);
    let (m, k, z): (f64, f64, f64) = (420.0, 4.0 * 65e3, 0.05);
    let wn = (k / m).sqrt();
    let w = 1180.0 * TAU / 60.0;
    let r = w / wn;
    let unbalance = &s.inputs.drives[0];
    let Waveform::Harmonic { omega } = unbalance.waveform else {
        panic!("{:?}", unbalance.waveform)
    };
    assert!(rel(omega, w) < 1e-15);
    let t = transmissibility(&s.mats, &s.inputs.ground, unbalance, None, &s.modal).unwrap();
    assert!(rel(t.value, closed_t(r, z)) < 1e-10, "{}", t.value);
    // Two harmonic drives: the amplitude adds the band's resonant peak (ζ = 0.05).
    let a = amplitude(&s.mats, &s.inputs.ground, &s.inputs.drives, 0, &s.modal).unwrap();
    let want = 180.0 / k * closed_amp(r, z) + 50.0 / k / (2.0 * z * (1.0 - z * z).sqrt());
    assert!(rel(a, want) < 1e-9, "{a} vs {want}");
    // The force into ground is the sum over the spring and the damper.
    let h = harmonic(&s.mats, &s.inputs.ground, unbalance.excitation, 180.0, w).unwrap();
    assert_eq!(h.link_forces.len(), 2);
    let sum = h.link_forces[0] + h.link_forces[1];
    assert!((sum - h.ground_force).norm() < 1e-12 * sum.norm());
    assert!(rel(h.ground_force.norm(), 180.0 * closed_t(r, z)) < 1e-10);
    let sep = separation(unbalance, &s.modal).unwrap();
    assert!(rel(sep.value, (w - wn) / w) < 1e-12);
    assert_eq!(
        separation(&s.inputs.drives[1], &s.modal).unwrap().value,
        0.0
    );
    let g = s.inputs.gravity.unwrap();
    assert_eq!(g, 9.80665);
    assert!(rel(sag(&s.mats, g).unwrap()[0], m * g / k) < 1e-12);
}

#[test]
fn corners_move_the_drive_and_the_stiffness() {
    let (s, model) = setup_at(SKID, &[0.1]);
    assert_eq!(model.params.len(), 1);
    let (m, k, z): (f64, f64, f64) = (420.0, 1.1 * 4.0 * 65e3, 0.05);
    let r = (1180.0 * TAU / 60.0) / (k / m).sqrt();
    let t = transmissibility(
        &s.mats,
        &s.inputs.ground,
        &s.inputs.drives[0],
        None,
        &s.modal,
    )
    .unwrap();
    assert!(rel(t.value, closed_t(r, z)) < 1e-10);
}

#[test]
fn floor_acceleration_moves_a_mass_through_its_mount() {
    let s = setup(
        "system rack {
          mass body = 55 kg
          spring feet between body and ground = 160 kN/m
          damper loss between body and ground = 0.05 * 2 * sqrt(feet * body)
          motion floor of ground = 0.05 gn at 30 Hz
        }",
    );
    let (m, k, z): (f64, f64, f64) = (55.0, 160e3, 0.05);
    let w = 30.0 * TAU;
    let r = w / (k / m).sqrt();
    let floor = &s.inputs.drives[0];
    assert!(matches!(floor.excitation, Excitation::Base { .. }));
    let t = transmissibility(&s.mats, &s.inputs.ground, floor, None, &s.modal).unwrap();
    assert!(rel(t.value, closed_t(r, z)) < 1e-10);
    // Ground displacement amplitude A/ω²: the body moves T times that.
    let y = 0.05 * 9.80665 / (w * w);
    let a = amplitude(&s.mats, &s.inputs.ground, &s.inputs.drives, 0, &s.modal).unwrap();
    assert!(rel(a, closed_t(r, z) * y) < 1e-10);
}

#[test]
fn ground_rotation_moves_only_rotational_coordinates() {
    let s = setup(
        "system bench {
          inertia wheel = 0.2 kg*m^2
          mass sled = 4 kg
          spring shaft between wheel and ground = 800 N*m
          damper drag between wheel and ground = 0.4 N*m*s
          spring rail between sled and ground = 9 kN/m
          motion rock of ground = 0.002 at 7 Hz
          torque pulse on wheel = 1.5 N*m at 3 Hz
          gravity = 9.81 m/s^2
        }",
    );
    let (j, k, c): (f64, f64, f64) = (0.2, 800.0, 0.4);
    let wn = (k / j).sqrt();
    let z = c / (2.0 * (k * j).sqrt());
    let rock = &s.inputs.drives[0];
    let w = 7.0 * TAU;
    let h = harmonic(
        &s.mats,
        &s.inputs.ground,
        rock.excitation,
        rock.amplitude,
        w,
    )
    .unwrap();
    assert!(rel(h.x[0].norm(), 0.002 * closed_t(w / wn, z)) < 1e-10);
    assert_eq!(h.x[1].norm(), 0.0);
    // Relative motion of the wheel is X − Y; the sled's is its own (zero) motion.
    assert!((h.relative[0] - (h.x[0] - 0.002)).norm() < 1e-15);
    // The torque drive: amplitude of the wheel, in rad.
    let torque = s.inputs.drives[1];
    let a = amplitude(&s.mats, &s.inputs.ground, &[torque], 0, &s.modal).unwrap();
    assert!(rel(a, 1.5 / k * closed_amp(3.0 * TAU / wn, z)) < 1e-10);
    // Transmissibility to a coordinate the rotation does not move is an error.
    assert_eq!(
        transmissibility(&s.mats, &s.inputs.ground, rock, Some(1), &s.modal).err(),
        Some(ResponseError::WrongKind { dof: 1 })
    );
    // Gravity loads the sled, not the wheel.
    let x = sag(&s.mats, 9.81).unwrap();
    assert_eq!(x[0], 0.0);
    assert!(rel(x[1], 4.0 * 9.81 / 9e3) < 1e-12);
}

#[test]
fn a_motion_transmissibility_to_one_of_several_masses_needs_to() {
    let s = setup(
        "system two {
          mass a = 10 kg
          mass b = 2 kg
          spring k1 between a and ground = 50 kN/m
          spring k2 between a and b = 20 kN/m
          damper c1 between a and ground = 100 N*s/m
          motion shake of ground = 1 mm at 9 Hz
        }",
    );
    let shake = &s.inputs.drives[0];
    assert_eq!(
        transmissibility(&s.mats, &s.inputs.ground, shake, None, &s.modal).err(),
        Some(ResponseError::NeedsTarget)
    );
    let to_b = transmissibility(&s.mats, &s.inputs.ground, shake, Some(1), &s.modal).unwrap();
    let h = harmonic(&s.mats, &s.inputs.ground, shake.excitation, 1e-3, 9.0 * TAU).unwrap();
    assert!(rel(to_b.value, h.x[1].norm() / 1e-3) < 1e-12);
}

#[test]
fn step_and_impulse_drives_superpose() {
    let text = "system seat {
      mass body = 95 kg
      spring coil between body and ground = 18 kN/m
      damper shock between body and ground = 785 N*s/m
      force load on body = step 150 N
      force kerb on body = impulse 20 N*s
    }";
    let s = setup(text);
    let (m, k, c): (f64, f64, f64) = (95.0, 18e3, 785.0);
    let wn = (k / m).sqrt();
    let z = c / (2.0 * (k * m).sqrt());
    let wd = wn * (1.0 - z * z).sqrt();
    let ld = loading(&s.mats, &s.inputs).unwrap();
    assert!(ld.has_step);
    let tr = simulate(&s.mats, &ld, &s.modal, &TimeConfig::default()).unwrap();
    let x = |t: f64| {
        let e = (-z * wn * t).exp();
        150.0 / k * (1.0 - e * ((wd * t).cos() + z * wn / wd * (wd * t).sin()))
            + 20.0 / (m * wd) * e * (wd * t).sin()
    };
    for t in [0.0, 0.05, 0.2, 0.61, 1.7] {
        let got = tr.state_at(t).unwrap()[0];
        assert!(
            (got - x(t)).abs() < 1e-10 * 150.0 / k,
            "t={t}: {got} vs {}",
            x(t)
        );
    }
    assert!(rel(tr.final_value(0).unwrap(), 150.0 / k) < 1e-12);
    // The step alone: the classic overshoot.
    let step_only = setup(&text.replace("force kerb on body = impulse 20 N*s", ""));
    let ld = loading(&step_only.mats, &step_only.inputs).unwrap();
    let tr = simulate(
        &step_only.mats,
        &ld,
        &step_only.modal,
        &TimeConfig::default(),
    )
    .unwrap();
    let want = (-std::f64::consts::PI * z / (1.0 - z * z).sqrt()).exp();
    assert!(rel(tr.overshoot(0).unwrap(), want) < 1e-6);
}

#[test]
fn ground_displacement_step_and_initial_conditions() {
    let text = "system table {
      mass top = 30 kg
      spring legs between top and ground = 120 kN/m
      damper pads between top and ground = 300 N*s/m
      motion settle of ground = step 2 mm
      initial top = 1 mm, 0.05 m/s
    }";
    let s = setup(text);
    let ld = loading(&s.mats, &s.inputs).unwrap();
    let (m, c) = (30.0, 300.0);
    // The spring carries k·Y for t > 0; the damper's ẏ = Y δ(t) is an impulse c·Y.
    assert!(rel(ld.force[0], 120e3 * 2e-3) < 1e-12);
    assert!(rel(ld.v0[0], 0.05 + c * 2e-3 / m) < 1e-12);
    assert!(rel(ld.x0[0], 1e-3) < 1e-12);
    let tr = simulate(&s.mats, &ld, &s.modal, &TimeConfig::default()).unwrap();
    assert!(rel(tr.final_value(0).unwrap(), 2e-3) < 1e-12);
    let ts = tr.settling_time(0, 0.02).unwrap();
    assert!(ts > 0.0 && ts < tr.duration());
    // A step in ground velocity has no final position.
    let s = setup(&text.replace("step 2 mm", "step 2 mm/s"));
    assert_eq!(
        loading(&s.mats, &s.inputs).err(),
        Some(ResponseError::UnboundedStep { drive: 0 })
    );
}
