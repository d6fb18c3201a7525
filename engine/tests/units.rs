//! The unit registry against published conversion factors, exact definitions and the language's
//! own rules (language.md §3).

use std::f64::consts::PI;

use proptest::prelude::*;
use sprung_engine::dim::Dim;
use sprung_engine::units::{
    Atom, UnitError, UnitInfo, describe_atom, eval_unit, lookup_atom, units, units_with_dim,
};
use sprung_syntax::Span;
use sprung_syntax::ast::{UnitExpr, UnitOp, UnitTerm};
use sprung_syntax::lexer::{Token, lex};

fn atom(s: &str) -> Atom {
    match lookup_atom(s) {
        Ok(a) => a,
        Err(e) => panic!("`{s}` should be a unit: {e:?}"),
    }
}

fn factor(s: &str) -> f64 {
    atom(s).factor
}

/// Lexes `1 UNIT` and returns the unit expression the lexer attached to the number.
fn parse_unit(text: &str) -> UnitExpr {
    let src = format!("1 {text}");
    let lexed = lex(&src);
    assert!(lexed.errors.is_empty(), "{text}: {:?}", lexed.errors);
    match lexed.tokens.as_slice() {
        [(Token::Number(_), _), (Token::Unit(u), _)] => (**u).clone(),
        other => panic!("`{text}` did not lex as one unit: {other:?}"),
    }
}

fn unit(text: &str) -> Atom {
    match eval_unit(&parse_unit(text)) {
        Ok(a) => a,
        Err(e) => panic!("`{text}` should evaluate: {e:?}"),
    }
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// `value` agrees with a factor printed to the digits shown in `printed`, within half a unit of
/// its last printed digit.
fn agrees_with_printed(value: f64, printed: &str) {
    let p: f64 = printed.parse().unwrap_or(f64::NAN);
    let digits_after_point = printed.split('.').nth(1).map_or(0, str::len);
    let half_ulp = 0.5 * 10f64.powi(-(digits_after_point as i32));
    assert!(
        (value - p).abs() <= half_ulp,
        "{value} does not round to the printed {printed}"
    );
}

// --- Published factors: NIST SP 811 (2008 edition), appendix B.8 (factors in alphabetical
// --- order; the same values reappear in B.9 by kind of quantity).

#[test]
fn nist_sp811_b8_printed_factors() {
    // NIST SP 811 appendix B.8: pound-force (lbf) -> newton, 4.448 222 E+00.
    agrees_with_printed(factor("lbf"), "4.448222");
    // NIST SP 811 appendix B.8: pound (avoirdupois) (lb) -> kilogram, 4.535 924 E-01.
    agrees_with_printed(factor("lbm"), "0.4535924");
    // NIST SP 811 appendix B.8: slug -> kilogram, 1.459 390 E+01.
    agrees_with_printed(factor("slug"), "14.59390");
    // NIST SP 811 appendix B.8: kip (1 kip = 1000 lbf) -> newton, 4.448 222 E+03.
    agrees_with_printed(factor("kip"), "4448.222");
    // NIST SP 811 appendix B.8: ounce (avoirdupois) -> kilogram, 2.834 952 E-02.
    agrees_with_printed(factor("oz"), "0.02834952");
    // NIST SP 811 appendix B.8 (from memory): degree (angle) -> radian, 1.745 329 E-02.
    agrees_with_printed(factor("deg"), "0.01745329");
    // NIST SP 811 appendix B.8 (from memory): revolution per minute -> rad/s, 1.047 198 E-01.
    agrees_with_printed(factor("rpm"), "0.1047198");
    // The relative form of the same checks, NIST's 7 significant figures.
    assert!(rel(factor("lbf"), 4.448222) < 1e-6);
    assert!(rel(factor("slug"), 14.59390) < 1e-6);
    assert!(rel(factor("kip"), 4448.222) < 1e-6);
    assert!(rel(factor("oz"), 0.02834952) < 1e-6);
}

#[test]
fn exact_by_definition_factors() {
    // NIST SP 811 appendix B.8, exact (bold) entries; international yard and pound (1959);
    // standard gravity (3rd CGPM, 1901).
    assert_eq!(factor("in"), 0.0254);
    assert_eq!(factor("ft"), 0.3048);
    assert_eq!(factor("lbm"), 0.45359237);
    assert_eq!(factor("kgf"), 9.80665);
    assert_eq!(factor("gn"), 9.80665);
    assert_eq!(atom("gn").dim, Dim::ACCELERATION);
    assert_eq!(atom("kgf").dim, Dim::FORCE);
    // lbf = lbm × gn = 4.4482216152605 N exactly; the float product agrees to rounding.
    assert_eq!(factor("lbf"), 4.4482216152605);
    assert!(rel(factor("lbf"), 0.45359237 * 9.80665) < 1e-15);
    assert!(rel(factor("kip"), 4448.2216152605) < 1e-15);
    // oz = lbm / 16 = 0.028349523125 kg (avoirdupois ounce, exact).
    assert_eq!(factor("oz"), 0.028349523125);
    // Accepted for use with the SI (SI Brochure): tonne, minute, hour.
    assert_eq!(factor("t"), 1000.0);
    assert_eq!(factor("min"), 60.0);
    assert_eq!(factor("h"), 3600.0);
    assert_eq!(factor("cm"), 0.01);
    // slug = lbf·s²/ft, derived from the exact values above (≈ 14.593 902 937 kg).
    assert!(rel(factor("slug"), 4.4482216152605 / 0.3048) < 1e-15);
    assert!((factor("slug") - 14.593902937).abs() < 1e-9);
}

// --- Round trips through parsed unit expressions (exact definitions, as above).

#[test]
fn round_trips() {
    // 1 kip = 1000 lbf (definition of the kip).
    assert!(rel(unit("kip").factor / unit("lbf").factor, 1000.0) < 1e-15);
    // 12 in = 1 ft (international inch and foot).
    assert!(rel(12.0 * unit("in").factor / unit("ft").factor, 1.0) < 1e-15);
    // 1 slug = 1 lbf·s²/ft (definition of the slug).
    let slug = unit("slug");
    let lbf_s2_ft = unit("lbf*s^2/ft");
    assert_eq!(lbf_s2_ft.dim, Dim::MASS);
    assert!(rel(slug.factor, lbf_s2_ft.factor) < 1e-15);
    // 16 oz = 1 lbm (avoirdupois).
    assert!(rel(16.0 * unit("oz").factor, unit("lbm").factor) < 1e-15);
    // 1 kgf = 1 kg·gn.
    assert!(rel(unit("kgf").factor, unit("kg*gn").factor) < 1e-15);
    assert_eq!(unit("kg*gn").dim, Dim::FORCE);
    // value × factor / factor comes back.
    for text in ["lbf/in", "kN*m/rad", "N*s/mm", "slug*ft^2", "rpm", "cpm"] {
        let a = unit(text);
        let v = 123.456;
        assert!(rel(v * a.factor / a.factor, v) < 1e-15, "{text}");
    }
    // 1 lbf/in in N/m: 4.4482216152605 / 0.0254 = 175.126835... N/m (exact definitions).
    let k = unit("lbf/in");
    assert_eq!(k.dim, Dim::STIFFNESS);
    assert!(rel(k.factor, 175.126_835_246_476) < 1e-12);
}

// --- Angles and cyclic frequency (language.md §3: cycle = rev = 2π rad, Hz = cycle/s).

#[test]
fn frequency_and_angle() {
    // 10 Hz = 2π·10 rad/s = 62.83185307 1/s.
    assert!((10.0 * unit("Hz").factor - 62.83185307).abs() < 1e-8);
    assert_eq!(atom("Hz").dim, Dim::FREQUENCY);
    assert_eq!(atom("Hz").dim, Dim::new(0, 0, -1));
    // 60 rpm = 1 Hz.
    assert!(rel(60.0 * factor("rpm"), factor("Hz")) < 1e-15);
    // 1 cpm = 1/60 Hz.
    assert!(rel(factor("cpm"), factor("Hz") / 60.0) < 1e-15);
    // 1 rev = 1 cycle = 2π rad; 180 deg = π rad.
    assert!(rel(factor("rev"), 2.0 * PI * factor("rad")) < 1e-15);
    assert_eq!(factor("cycle"), factor("rev"));
    assert!(rel(180.0 * factor("deg"), PI) < 1e-15);
    // The radian is dimensionless (SI), and so is every angle.
    for a in ["rad", "deg", "rev", "cycle", "mrad"] {
        assert_eq!(atom(a).dim, Dim::NONE, "{a}");
    }
    // rad/s and Hz share a dimension; cycle/s is the hertz.
    assert_eq!(unit("rad/s").dim, unit("Hz").dim);
    assert!(rel(unit("cycle/s").factor, unit("Hz").factor) < 1e-15);
    assert!(rel(unit("rev/min").factor, unit("rpm").factor) < 1e-15);
    assert_eq!(unit("rpm").dim, Dim::FREQUENCY);
}

// --- SI prefixes (SI Brochure: n 10^-9, µ 10^-6, m 10^-3, k 10^3, M 10^6, G 10^9).

#[test]
fn prefixes() {
    assert_eq!(
        atom("kN"),
        Atom {
            factor: 1e3,
            dim: Dim::FORCE
        }
    );
    assert_eq!(
        atom("MN"),
        Atom {
            factor: 1e6,
            dim: Dim::FORCE
        }
    );
    assert_eq!(
        atom("mm"),
        Atom {
            factor: 1e-3,
            dim: Dim::LENGTH
        }
    );
    assert_eq!(
        atom("ms"),
        Atom {
            factor: 1e-3,
            dim: Dim::TIME
        }
    );
    assert_eq!(atom("GW").factor, 1e9);
    assert_eq!(atom("GW").dim, Dim::new(1, 2, -3));
    assert_eq!(atom("mrad").factor, 1e-3);
    assert!(rel(factor("kHz"), 2.0 * PI * 1e3) < 1e-15);
    assert_eq!(atom("kHz").dim, Dim::FREQUENCY);
    assert!(rel(factor("nm"), 1e-9) < 1e-15);
    assert_eq!(atom("kJ").dim, Dim::TORQUE);
    // Micro in three spellings: µ U+00B5, μ U+03BC, ASCII u.
    let micro_sign = atom("\u{00B5}m");
    let greek_mu = atom("\u{03BC}m");
    let ascii_u = atom("um");
    assert_eq!(micro_sign, greek_mu);
    assert_eq!(micro_sign, ascii_u);
    assert!(rel(ascii_u.factor, 1e-6) < 1e-15);
    assert_eq!(ascii_u.dim, Dim::LENGTH);
    // The micro sign also reaches the registry through the lexer.
    assert_eq!(unit("\u{00B5}m"), ascii_u);
    assert_eq!(unit("\u{03BC}s").factor, unit("us").factor);
    // The kilogram is k + g; the megagram is the tonne; the milligram 10^-6 kg.
    assert_eq!(
        atom("kg"),
        Atom {
            factor: 1.0,
            dim: Dim::MASS
        }
    );
    assert_eq!(factor("Mg"), factor("t"));
    assert!(rel(factor("mg"), 1e-6) < 1e-15);
    // Exact table entries win: `min` is the minute, not a milli-inch; `cm` is in the table.
    assert_eq!(factor("min"), 60.0);
    assert_eq!(factor("cm"), 0.01);
    // Prefixes only go on the SI symbols marked * in language.md.
    for bad in [
        "kft", "kin", "mlbf", "kkg", "mkg", "kcm", "Mmin", "krpm", "kt", "mgn",
    ] {
        assert!(
            matches!(lookup_atom(bad), Err(UnitError::Unknown { .. })),
            "{bad} should be refused"
        );
    }
    // Units are case-sensitive: `KN` is not the kilonewton.
    assert!(lookup_atom("KN").is_err());
}

// --- Errors and did-you-mean (language.md §3 and §6; suggestions are the project's own).

fn suggestion(s: &str) -> Option<String> {
    match lookup_atom(s) {
        Err(UnitError::Unknown { atom, suggestion }) => {
            assert_eq!(atom, s);
            suggestion
        }
        other => panic!("`{s}` should be unknown, got {other:?}"),
    }
}

#[test]
fn pound_is_ambiguous() {
    // language.md §3: `lb` alone is ambiguous; the help offers lbm or lbf.
    assert_eq!(lookup_atom("lb"), Err(UnitError::AmbiguousPound));
    assert_eq!(lookup_atom("lbs"), Err(UnitError::AmbiguousPound));
    assert_eq!(lookup_atom("pound"), Err(UnitError::AmbiguousPound));
    assert!(lookup_atom("lbf").is_ok() && lookup_atom("lbm").is_ok());
    let expr = parse_unit("lb/in");
    assert_eq!(
        eval_unit(&expr),
        Err((expr.terms[0].atom_span, UnitError::AmbiguousPound))
    );
}

#[test]
fn did_you_mean() {
    // Wrong case (units are case-sensitive).
    assert_eq!(suggestion("kn").as_deref(), Some("kN"));
    assert_eq!(suggestion("KN").as_deref(), Some("kN"));
    assert_eq!(suggestion("hz").as_deref(), Some("Hz"));
    assert_eq!(suggestion("KHZ").as_deref(), Some("kHz"));
    assert_eq!(suggestion("Mhz").as_deref(), Some("MHz"));
    assert_eq!(suggestion("KG").as_deref(), Some("kg"));
    assert_eq!(suggestion("MS").as_deref(), Some("ms"));
    assert_eq!(suggestion("RPM").as_deref(), Some("rpm"));
    assert_eq!(suggestion("Min").as_deref(), Some("min"));
    // Names written out.
    assert_eq!(suggestion("Newton").as_deref(), Some("N"));
    assert_eq!(suggestion("newtons").as_deref(), Some("N"));
    assert_eq!(suggestion("kilonewtons").as_deref(), Some("kN"));
    assert_eq!(suggestion("millimeters").as_deref(), Some("mm"));
    assert_eq!(suggestion("inches").as_deref(), Some("in"));
    assert_eq!(suggestion("feet").as_deref(), Some("ft"));
    assert_eq!(suggestion("hertz").as_deref(), Some("Hz"));
    assert_eq!(suggestion("degrees").as_deref(), Some("deg"));
    assert_eq!(suggestion("pound_force").as_deref(), Some("lbf"));
    // Common shorthands.
    assert_eq!(suggestion("Nm").as_deref(), Some("N*m"));
    assert_eq!(suggestion("kNm").as_deref(), Some("kN*m"));
    assert_eq!(suggestion("mps").as_deref(), Some("m/s"));
    assert_eq!(suggestion("sec").as_deref(), Some("s"));
    assert_eq!(suggestion("hr").as_deref(), Some("h"));
    assert_eq!(suggestion("G").as_deref(), Some("gn"));
    assert_eq!(suggestion("gs").as_deref(), Some("gn"));
    // A plural `s`, or the second after a force.
    assert_eq!(suggestion("kgs").as_deref(), Some("kg"));
    assert_eq!(suggestion("revs").as_deref(), Some("rev"));
    assert_eq!(suggestion("Ns").as_deref(), Some("N*s"));
    assert_eq!(suggestion("kNs").as_deref(), Some("kN*s"));
    // Typos: transposed, doubled or dropped letters.
    assert_eq!(suggestion("rmp").as_deref(), Some("rpm"));
    assert_eq!(suggestion("lfb").as_deref(), Some("lbf"));
    assert_eq!(suggestion("kfg").as_deref(), Some("kgf"));
    assert_eq!(suggestion("slgu").as_deref(), Some("slug"));
    assert_eq!(suggestion("cylce").as_deref(), Some("cycle"));
    assert_eq!(suggestion("cycles").as_deref(), Some("cycle"));
    assert_eq!(suggestion("mrd").as_deref(), Some("mrad"));
    // Nothing close.
    assert_eq!(suggestion("xyzzy"), None);
    assert_eq!(suggestion("q"), None);
    assert_eq!(suggestion("foo"), None);
    assert_eq!(suggestion("kft"), None);
    // Every suggestion is itself valid unit text.
    for s in [
        "kn",
        "Newton",
        "Nm",
        "mps",
        "rmp",
        "kgs",
        "KHZ",
        "millimeters",
    ] {
        let text = suggestion(s).unwrap_or_default();
        let _ = unit(&text);
    }
}

// --- Compound units (dimension algebra; language.md §2 gives the element units).

#[test]
fn compound_units() {
    // N·s/m is a damping coefficient, kg/s.
    assert_eq!(unit("N*s/m").dim, Dim::DAMPING);
    assert_eq!(unit("N*s/m").dim, unit("kg/s").dim);
    assert_eq!(unit("kg*m^2").dim, Dim::INERTIA);
    assert_eq!(unit("m/s^2").dim, Dim::ACCELERATION);
    assert_eq!(unit("s^-1").dim, Dim::FREQUENCY);
    assert_eq!(unit("s^-1").factor, 1.0);
    // The radian is dimensionless: N·m/rad has the dimension of N·m.
    assert_eq!(unit("N*m/rad").dim, unit("N*m").dim);
    assert_eq!(unit("N*m/rad").dim, Dim::ROTATIONAL_STIFFNESS);
    assert_eq!(unit("N*m*s/rad").dim, Dim::ROTATIONAL_DAMPING);
    // Left-associative: N*s/m is (N·s)/m; m/s^2 is m/(s²); `·` multiplies like `*`.
    assert_eq!(unit("N\u{00B7}s/m"), unit("N*s/m"));
    assert_eq!(unit("m/s/s"), unit("m/s^2"));
    // Factors multiply: kN/mm = 10^6 N/m; g*mm = 10^-6 kg·m (language.md §8's unbalance).
    assert!(rel(unit("kN/mm").factor, 1e6) < 1e-15);
    assert_eq!(unit("kN/mm").dim, Dim::STIFFNESS);
    assert!(rel(unit("g*mm").factor, 1e-6) < 1e-15);
    assert_eq!(unit("g*mm").dim, Dim::new(1, 1, 0));
    // 1 J = 1 N·m; 1 W = 1 J/s.
    assert_eq!(unit("J"), unit("N*m"));
    assert_eq!(unit("W"), unit("J/s"));
    // Frequency squared, as in `0.4 g*mm * rotor_speed^2`: rpm^2 = (2π/60)² s^-2.
    assert!(rel(unit("rpm^2").factor, (2.0 * PI / 60.0).powi(2)) < 1e-15);
}

// --- eval_unit errors.

fn term(op: UnitOp, atom: &str, start: usize, exponent: i32) -> UnitTerm {
    UnitTerm {
        op,
        atom: atom.to_string(),
        atom_span: Span::new(start, start + atom.len()),
        exponent,
        exponent_span: None,
    }
}

#[test]
fn eval_unit_errors_carry_the_atom_span() {
    let expr = parse_unit("N*s/mx");
    let Err((span, UnitError::Unknown { atom, suggestion })) = eval_unit(&expr) else {
        panic!("`mx` should be unknown");
    };
    assert_eq!(atom, "mx");
    assert_eq!(span, expr.terms[2].atom_span);
    assert_eq!(&"1 N*s/mx"[span.start..span.end], "mx");
    assert!(suggestion.is_some());
}

#[test]
fn eval_unit_refuses_overflow_without_panicking() {
    // A hand-built exponent beyond what the lexer allows.
    let big = UnitExpr {
        span: Span::new(0, 4),
        terms: vec![term(UnitOp::Mul, "m", 0, 1000)],
    };
    assert_eq!(
        eval_unit(&big),
        Err((Span::new(0, 1), UnitError::ExponentTooLarge))
    );
    let min = UnitExpr {
        span: Span::new(0, 4),
        terms: vec![term(UnitOp::Mul, "rad", 0, i32::MIN)],
    };
    assert_eq!(
        eval_unit(&min).map_err(|e| e.1),
        Err(UnitError::ExponentTooLarge)
    );
    // Each exponent is allowed, but together they pass the dimension limit.
    let sum = UnitExpr {
        span: Span::new(0, 12),
        terms: vec![term(UnitOp::Mul, "m", 0, 40), term(UnitOp::Mul, "m", 6, 40)],
    };
    assert_eq!(
        eval_unit(&sum),
        Err((Span::new(6, 7), UnitError::ExponentTooLarge))
    );
    let per = UnitExpr {
        span: Span::new(0, 12),
        terms: vec![
            term(UnitOp::Mul, "s", 0, -40),
            term(UnitOp::Div, "s", 6, 40),
        ],
    };
    assert_eq!(
        eval_unit(&per).map_err(|e| e.1),
        Err(UnitError::ExponentTooLarge)
    );
    // A dimensionless factor that overflows a float: (10^9 rad)^64.
    let huge = UnitExpr {
        span: Span::new(0, 8),
        terms: vec![term(UnitOp::Mul, "Grad", 0, 64)],
    };
    assert_eq!(
        eval_unit(&huge).map_err(|e| e.1),
        Err(UnitError::FactorOutOfRange)
    );
    // Exponent zero is a plain 1.
    let zero = UnitExpr {
        span: Span::new(0, 3),
        terms: vec![term(UnitOp::Mul, "kN", 0, 0)],
    };
    assert_eq!(
        eval_unit(&zero),
        Ok(Atom {
            factor: 1.0,
            dim: Dim::NONE
        })
    );
}

// --- The table for hovers and completion.

#[test]
fn table_covers_language_md() {
    // Every unit of language.md §3's table is an entry (prefixed forms come from `g`, etc.).
    let symbols: Vec<&str> = units().iter().map(|u| u.symbol).collect();
    for s in [
        "g", "t", "lbm", "slug", "oz", "m", "cm", "in", "ft", "s", "min", "h", "N", "kgf", "lbf",
        "kip", "rad", "deg", "rev", "cycle", "Hz", "rpm", "cpm", "J", "W", "gn",
    ] {
        assert!(symbols.contains(&s), "{s} missing");
    }
    let prefixable: Vec<&str> = units()
        .iter()
        .filter(|u| u.prefixable)
        .map(|u| u.symbol)
        .collect();
    assert_eq!(prefixable, ["g", "m", "s", "N", "rad", "Hz", "J", "W"]);
    let lbf: &UnitInfo = units().iter().find(|u| u.symbol == "lbf").expect("lbf");
    assert_eq!(lbf.meaning, "pound-force");
    assert!(lbf.source.contains("NIST SP 811"));
}

#[test]
fn describe_atoms_for_hovers() {
    let kn = describe_atom("kN").expect("kN");
    assert_eq!(kn.meaning, "kilonewton");
    assert_eq!(kn.factor, 1e3);
    assert_eq!(kn.dim, Dim::FORCE);
    assert_eq!(kn.prefix.map(|p| p.name), Some("kilo"));
    assert_eq!(kn.base.symbol, "N");
    assert_eq!(
        describe_atom("kg").map(|a| a.meaning).as_deref(),
        Some("kilogram")
    );
    assert_eq!(
        describe_atom("\u{03BC}m").map(|a| a.meaning).as_deref(),
        Some("micrometre")
    );
    let lbf = describe_atom("lbf").expect("lbf");
    assert_eq!(lbf.meaning, "pound-force");
    assert!(lbf.prefix.is_none());
    assert!(lbf.source.contains("NIST SP 811"));
    assert_eq!(describe_atom("min").map(|a| a.factor), Some(60.0));
    assert_eq!(describe_atom("lb"), None);
    assert_eq!(describe_atom("kft"), None);
}

#[test]
fn completion_lists_by_dimension() {
    // Common practice: the usual stiffness spellings, metric and US customary.
    let k = units_with_dim(Dim::STIFFNESS);
    for s in ["N/m", "kN/m", "N/mm", "lbf/in"] {
        assert!(k.contains(&s), "{s}");
    }
    assert!(units_with_dim(Dim::ROTATIONAL_STIFFNESS).contains(&"N*m/rad"));
    assert!(units_with_dim(Dim::DAMPING).contains(&"N*s/m"));
    assert!(units_with_dim(Dim::FREQUENCY).contains(&"Hz"));
    assert!(units_with_dim(Dim::FREQUENCY).contains(&"rpm"));
    assert!(units_with_dim(Dim::MASS).contains(&"kg"));
    assert!(units_with_dim(Dim::NONE).contains(&"deg"));
    // Every listed spelling evaluates to the dimension it is listed under.
    for d in [
        Dim::MASS,
        Dim::INERTIA,
        Dim::STIFFNESS,
        Dim::ROTATIONAL_STIFFNESS,
        Dim::DAMPING,
        Dim::ROTATIONAL_DAMPING,
        Dim::FORCE,
        Dim::TORQUE,
        Dim::LENGTH,
        Dim::VELOCITY,
        Dim::ACCELERATION,
        Dim::FREQUENCY,
        Dim::TIME,
        Dim::NONE,
    ] {
        for s in units_with_dim(d) {
            assert_eq!(unit(s).dim, d, "{s}");
        }
    }
}

// --- No panic on any input.

proptest! {
    #[test]
    fn lookup_never_panics(s in "\\PC{0,12}") {
        let _ = lookup_atom(&s);
        let _ = describe_atom(&s);
    }

    #[test]
    fn unknown_suggestions_are_valid(s in "[A-Za-z]{1,8}") {
        if let Err(UnitError::Unknown { suggestion: Some(text), .. }) = lookup_atom(&s) {
            let expr = parse_unit(&text);
            prop_assert!(eval_unit(&expr).is_ok(), "{} -> {}", s, text);
        }
    }

    #[test]
    fn eval_never_panics(
        terms in proptest::collection::vec(
            (any::<bool>(), prop::sample::select(vec!["m", "kg", "Grad", "ng", "Hz", "lb", "zz"]),
             any::<i32>()),
            0..12,
        )
    ) {
        let terms: Vec<UnitTerm> = terms
            .into_iter()
            .map(|(div, a, e)| term(if div { UnitOp::Div } else { UnitOp::Mul }, a, 0, e))
            .collect();
        let expr = UnitExpr { span: Span::new(0, 0), terms };
        if let Ok(a) = eval_unit(&expr) {
            prop_assert!(a.factor.is_normal());
        }
    }
}
