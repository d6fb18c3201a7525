//! The checker never panics and always returns, on arbitrary text and on random mutations of a
//! realistic model. (Run time is bounded by the size of the input; speed is measured in benches,
//! not asserted here.)

use proptest::prelude::*;
use sprung_engine::analysis::{Config, analyze};
use sprung_engine::check;

const MODEL: &str = r#"## Fan skid on four spring isolators.
let fan_speed = 1480 rpm
let k_iso = 4 * 35 kN/m ± 10%
system skid "Fan skid" {
  mass frame = 420 kg
  mass motor = 3.5 kg ± 0.2 kg
  inertia rotor = 0.4 kg*m^2
  inertia hub = 0.1 kg*m^2
  spring isolators between frame and ground = k_iso
  spring mount between motor and frame = 2 MN/m
  spring shaft between rotor and hub = 8 kN*m/rad
  spring base between hub and ground = 1 kN*m/rad
  damper loss between frame and ground = 0.05 * 2 * sqrt(k_iso * frame)
  damper twist between rotor and ground = 2 N*m*s/rad
  force unbalance on frame = 12 N at fan_speed
  force sweep on motor = 3 N at 10 Hz .. fan_speed
  torque pulse on rotor = step 30 N*m
  force settle on frame = step 200 N
  force knock on frame = impulse 4 N*s
  motion quake of ground = 0.1 gn at 8 Hz
  initial frame = 1 mm, 0 m/s
  gravity = 1 gn
  require frequency of mode 1 in 3 Hz .. 8 Hz
  require separation from unbalance >= 20%
  require transmissibility of quake to motor <= 0.3
  require amplitude of frame < 0.5 mm
  require settling of frame within 5% <= 2 s
  require overshoot of frame <= 30%
  require sag of frame <= 12 mm
  require regime of mode 1 is not underdamped
  require damping >= 0.02
}
"#;

#[test]
fn the_mutation_base_model_is_clean() {
    let c = check(MODEL);
    let errors: Vec<_> = c.diagnostics.iter().filter(|d| d.is_error()).collect();
    assert!(errors.is_empty(), "{errors:#?}");
    // Every requirement of the base model is measured, so the mutations exercise every path.
    let a = analyze(&c, &Config::default());
    for v in &a.systems[0].verdicts {
        assert!(
            !matches!(
                v.status,
                sprung_engine::requirements::Status::NotEvaluated(_)
            ),
            "{}",
            v.message
        );
    }
    assert_eq!(c.model.systems[0].requirements.len(), 9);
}

#[derive(Debug, Clone)]
enum Edit {
    Insert(usize, char),
    Delete(usize, usize),
    Replace(usize, char),
}

fn apply(text: &str, edits: &[Edit]) -> String {
    let mut chars: Vec<char> = text.chars().collect();
    for e in edits {
        match *e {
            Edit::Insert(i, c) => {
                let i = i % (chars.len() + 1);
                chars.insert(i, c);
            }
            Edit::Delete(i, n) if !chars.is_empty() => {
                let i = i % chars.len();
                let end = (i + n).min(chars.len());
                chars.drain(i..end);
            }
            Edit::Replace(i, c) if !chars.is_empty() => {
                let i = i % chars.len();
                chars[i] = c;
            }
            _ => {}
        }
    }
    chars.into_iter().collect()
}

fn interesting_char() -> impl Strategy<Value = char> {
    prop_oneof![
        Just('('),
        Just(')'),
        Just('{'),
        Just('}'),
        Just('^'),
        Just('-'),
        Just('*'),
        Just('/'),
        Just('%'),
        Just('±'),
        Just('.'),
        Just('0'),
        Just('9'),
        Just(' '),
        Just('\n'),
        Just('#'),
        Just('"'),
        Just('µ'),
        Just('e'),
        Just('k'),
        Just('m'),
        Just('='),
        Just(','),
        any::<char>(),
    ]
}

fn edit() -> impl Strategy<Value = Edit> {
    prop_oneof![
        (any::<usize>(), interesting_char()).prop_map(|(i, c)| Edit::Insert(i, c)),
        (any::<usize>(), 1usize..12).prop_map(|(i, n)| Edit::Delete(i, n)),
        (any::<usize>(), interesting_char()).prop_map(|(i, c)| Edit::Replace(i, c)),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

    #[test]
    fn mutated_models_never_panic(edits in proptest::collection::vec(edit(), 1..8)) {
        let text = apply(MODEL, &edits);
        let c = check(&text);
        // The analysis of whatever survived must not panic either.
        let a = analyze(&c, &Config::default());
        for d in &a.diagnostics {
            prop_assert!(d.span.end <= text.len() && d.span.start <= d.span.end);
        }
        for d in &c.diagnostics {
            prop_assert!(d.span.end <= text.len() && d.span.start <= d.span.end);
            prop_assert!(text.is_char_boundary(d.span.start) && text.is_char_boundary(d.span.end));
        }
    }

    #[test]
    fn arbitrary_text_never_panics(text in "\\PC{0,400}") {
        let _ = check(&text);
    }

    #[test]
    fn token_soup_never_panics(words in proptest::collection::vec(prop_oneof![
        Just("system"), Just("s"), Just("{"), Just("}"), Just("mass"), Just("m"), Just("="),
        Just("1"), Just("kg"), Just("spring"), Just("between"), Just("and"), Just("ground"),
        Just("N/m"), Just("require"), Just("damping"), Just("of"), Just("mode"), Just(">="),
        Just("in"), Just(".."), Just("let"), Just("x"), Just("("), Just(")"), Just("^"),
        Just("-"), Just("±"), Just("10%"), Just("at"), Just("Hz"), Just("force"), Just("on"),
        Just("step"), Just("impulse"), Just("is"), Just("not"), Just("underdamped"),
    ], 0..60)) {
        let text = words.join(" ");
        let _ = check(&text);
    }
}
