//! The unit registry (language.md §3): the table of unit atoms, SI prefixes, did-you-mean
//! suggestions for unknown atoms, and evaluation of whole unit expressions.
//!
//! Every factor converts to SI. The radian is dimensionless, so angles (`deg`, `rev`, `cycle`)
//! and cyclic frequencies (`Hz`, `rpm`, `cpm`) carry a pure factor: `cycle = rev = 2π rad`,
//! `Hz = cycle/s = 2π/s`.
//!
//! Lookup order for an atom: an exact table entry first (`min` is the minute, `cm` the
//! centimetre), then one SI prefix on a prefixable symbol (`mm`, `kN`, `kg`, `Mg`, `µm`).

use std::f64::consts::PI;

use sprung_syntax::Span;
use sprung_syntax::ast::{UnitExpr, UnitOp};

use crate::dim::{Dim, MAX_EXPONENT};

/// Why a unit atom or unit expression could not be read.
#[derive(Clone, Debug, PartialEq)]
pub enum UnitError {
    /// Not in the table; `suggestion` is the nearest known spelling, if any is close. A
    /// suggestion is always valid unit text (an atom, or a short product such as `N*m`).
    Unknown {
        atom: String,
        suggestion: Option<String>,
    },
    /// `lb` (also `lbs`, `pound`): write `lbm` or `lbf`.
    AmbiguousPound,
    /// A unit exponent, or the combined exponent of a dimension, is beyond
    /// [`MAX_EXPONENT`](crate::dim::MAX_EXPONENT).
    ExponentTooLarge,
    /// The unit's factor to SI overflows or underflows a float (`Gm^64`).
    FactorOutOfRange,
}

/// A unit atom read from the table, prefix applied.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Atom {
    /// Multiply by this to get SI (radian = 1, cycle = 2π).
    pub factor: f64,
    pub dim: Dim,
}

/// One entry of the unit table.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct UnitInfo {
    /// The spelling in a file (`lbf`).
    pub symbol: &'static str,
    /// Multiply by this to get SI.
    pub factor: f64,
    pub dim: Dim,
    /// What the symbol names (`pound-force`); for prefixable units a single word that a prefix
    /// name can precede (`newton` → `kilonewton`).
    pub meaning: &'static str,
    /// Where the factor comes from.
    pub source: &'static str,
    /// Whether the SI prefixes apply (language.md marks these with `*`).
    pub prefixable: bool,
}

/// An SI prefix.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Prefix {
    /// `k`, `M`, `u`, `µ` (U+00B5), `μ` (U+03BC)...
    pub symbol: &'static str,
    /// `kilo`, `micro`...
    pub name: &'static str,
    /// The power of ten.
    pub exponent: i32,
}

/// A possibly prefixed atom, described for hovers.
#[derive(Clone, Debug, PartialEq)]
pub struct AtomInfo {
    /// The atom as written (`kN`).
    pub symbol: String,
    /// With the prefix name (`kilonewton`).
    pub meaning: String,
    pub factor: f64,
    pub dim: Dim,
    /// The source of the base unit's factor (SI prefixes are exact powers of ten).
    pub source: &'static str,
    /// The prefix, when the atom has one.
    pub prefix: Option<Prefix>,
    /// The table entry the atom is built on.
    pub base: &'static UnitInfo,
}

// Exact defined values.
/// International pound, kg (exact, 1959 agreement).
const LBM: f64 = 0.45359237;
/// Standard acceleration of gravity, m/s² (exact, 3rd CGPM 1901).
const GN: f64 = 9.80665;
/// International foot, m (exact).
const FT: f64 = 0.3048;
/// Pound-force, N: `LBM * GN` written as its exact decimal product.
const LBF: f64 = 4.4482216152605;
/// Watt's dimension, kg·m²/s³.
const POWER: Dim = Dim::new(1, 2, -3);

const SI: &str = "SI base unit";
const ACCEPTED: &str = "non-SI unit accepted for use with the SI, exact by definition";
const TURN: &str = "exact by definition: one turn is 2π rad (radian dimensionless, SI)";

const fn entry(
    symbol: &'static str,
    factor: f64,
    dim: Dim,
    meaning: &'static str,
    source: &'static str,
    prefixable: bool,
) -> UnitInfo {
    UnitInfo {
        symbol,
        factor,
        dim,
        meaning,
        source,
        prefixable,
    }
}

static UNITS: &[UnitInfo] = &[
    // Mass.
    entry(
        "g",
        1e-3,
        Dim::MASS,
        "gram",
        "SI: the gram is 10^-3 kg, the kilogram being the base unit",
        true,
    ),
    entry("t", 1000.0, Dim::MASS, "tonne", ACCEPTED, false),
    entry(
        "lbm",
        LBM,
        Dim::MASS,
        "pound-mass",
        "exact by definition (international pound, 0.45359237 kg); NIST SP 811 appendix B.8",
        false,
    ),
    entry(
        "slug",
        LBF / FT,
        Dim::MASS,
        "slug",
        "derived from exact values: lbf·s²/ft; NIST SP 811 appendix B.8 prints 14.59390 kg",
        false,
    ),
    entry(
        "oz",
        LBM / 16.0,
        Dim::MASS,
        "avoirdupois ounce",
        "exact by definition (lbm/16); NIST SP 811 appendix B.8",
        false,
    ),
    // Length.
    entry("m", 1.0, Dim::LENGTH, "metre", SI, true),
    entry(
        "cm",
        0.01,
        Dim::LENGTH,
        "centimetre",
        "SI prefix centi, exact",
        false,
    ),
    entry(
        "in",
        0.0254,
        Dim::LENGTH,
        "inch",
        "exact by definition (international inch); NIST SP 811 appendix B.8",
        false,
    ),
    entry(
        "ft",
        FT,
        Dim::LENGTH,
        "foot",
        "exact by definition (international foot); NIST SP 811 appendix B.8",
        false,
    ),
    // Time.
    entry("s", 1.0, Dim::TIME, "second", SI, true),
    entry("min", 60.0, Dim::TIME, "minute", ACCEPTED, false),
    entry("h", 3600.0, Dim::TIME, "hour", ACCEPTED, false),
    // Force.
    entry(
        "N",
        1.0,
        Dim::FORCE,
        "newton",
        "SI derived unit (kg·m/s²)",
        true,
    ),
    entry(
        "kgf",
        GN,
        Dim::FORCE,
        "kilogram-force",
        "exact by definition (1 kg × gn); NIST SP 811 appendix B.8",
        false,
    ),
    entry(
        "lbf",
        LBF,
        Dim::FORCE,
        "pound-force",
        "exact by definition (lbm × gn); NIST SP 811 appendix B.8 prints 4.448222 N",
        false,
    ),
    entry(
        "kip",
        1000.0 * LBF,
        Dim::FORCE,
        "kip (1000 pound-force)",
        "exact by definition (1000 lbf); NIST SP 811 appendix B.8 prints 4448.222 N",
        false,
    ),
    // Angle (dimensionless).
    entry(
        "rad",
        1.0,
        Dim::NONE,
        "radian",
        "SI coherent derived unit, dimensionless",
        true,
    ),
    entry(
        "deg",
        PI / 180.0,
        Dim::NONE,
        "degree",
        "exact by definition (π/180 rad), accepted for use with the SI",
        false,
    ),
    entry("rev", 2.0 * PI, Dim::NONE, "revolution", TURN, false),
    entry("cycle", 2.0 * PI, Dim::NONE, "cycle", TURN, false),
    // Frequency (cyclic: one cycle is 2π rad).
    entry(
        "Hz",
        2.0 * PI,
        Dim::FREQUENCY,
        "hertz",
        "cycle per second (language.md §3): 1 Hz = 2π rad/s",
        true,
    ),
    entry(
        "rpm",
        2.0 * PI / 60.0,
        Dim::FREQUENCY,
        "revolution per minute",
        "rev/min, exact by definition; NIST SP 811 appendix B.8",
        false,
    ),
    entry(
        "cpm",
        2.0 * PI / 60.0,
        Dim::FREQUENCY,
        "cycle per minute",
        "cycle/min, exact by definition",
        false,
    ),
    // Energy and power.
    entry(
        "J",
        1.0,
        Dim::TORQUE,
        "joule",
        "SI derived unit (N·m)",
        true,
    ),
    entry("W", 1.0, POWER, "watt", "SI derived unit (J/s)", true),
    // Acceleration.
    entry(
        "gn",
        GN,
        Dim::ACCELERATION,
        "standard gravity",
        "exact by definition (3rd CGPM, 1901); NIST SP 811 appendix B.8",
        false,
    ),
];

static PREFIXES: &[Prefix] = &[
    Prefix {
        symbol: "n",
        name: "nano",
        exponent: -9,
    },
    Prefix {
        symbol: "u",
        name: "micro",
        exponent: -6,
    },
    Prefix {
        symbol: "\u{00B5}",
        name: "micro",
        exponent: -6,
    },
    Prefix {
        symbol: "\u{03BC}",
        name: "micro",
        exponent: -6,
    },
    Prefix {
        symbol: "m",
        name: "milli",
        exponent: -3,
    },
    Prefix {
        symbol: "k",
        name: "kilo",
        exponent: 3,
    },
    Prefix {
        symbol: "M",
        name: "mega",
        exponent: 6,
    },
    Prefix {
        symbol: "G",
        name: "giga",
        exponent: 9,
    },
];

/// Prefixed spellings common enough to suggest and to offer in completion. Other prefixed
/// forms are valid (`Ms`, `nN`) but never suggested, so `MS` suggests `ms`, not the megasecond.
static COMMON_PREFIXED: &[&str] = &[
    "kg", "mg", "mm", "um", "km", "ms", "us", "kN", "MN", "mN", "kJ", "MJ", "kW", "MW", "mW", "GW",
    "mrad", "urad", "kHz", "MHz", "GHz",
];

/// Common wrong spellings, matched case-insensitively against an unknown atom, with what to
/// write instead. Never consulted for a valid atom (`nm` is the nanometre).
static ALIASES: &[(&str, &str)] = &[
    // `G` and `gs` for gravity; `g` itself is the gram.
    ("g", "gn"),
    ("gs", "gn"),
    ("nm", "N*m"),
    ("knm", "kN*m"),
    ("nmm", "N*mm"),
    ("nms", "N*m*s"),
    ("mps", "m/s"),
    ("rps", "rev/s"),
    ("hr", "h"),
    ("hrs", "h"),
    ("sec", "s"),
    ("secs", "s"),
    ("msec", "ms"),
    ("feet", "ft"),
    ("ounce", "oz"),
    ("ounces", "oz"),
    ("metricton", "t"),
    ("kilopound", "kip"),
    ("kgm2", "kg*m^2"),
];

/// The unit table (prefixable entries take the SI prefixes of [`prefixes`]).
pub fn units() -> &'static [UnitInfo] {
    UNITS
}

/// The SI prefixes: n, u, µ (U+00B5), μ (U+03BC), m, k, M, G.
pub fn prefixes() -> &'static [Prefix] {
    PREFIXES
}

/// Atom spellings for completion and suggestions: every table symbol, then the common
/// prefixed forms (`kg`, `mm`, `kN`...).
pub fn common_atoms() -> impl Iterator<Item = &'static str> {
    UNITS
        .iter()
        .map(|u| u.symbol)
        .chain(COMMON_PREFIXED.iter().copied())
}

/// The table entry and prefix an atom is made of: exact match first, then one SI prefix on a
/// prefixable symbol.
fn resolve(atom: &str) -> Option<(&'static UnitInfo, Option<Prefix>)> {
    if let Some(u) = UNITS.iter().find(|u| u.symbol == atom) {
        return Some((u, None));
    }
    PREFIXES.iter().find_map(|p| {
        let rest = atom.strip_prefix(p.symbol)?;
        UNITS
            .iter()
            .find(|u| u.prefixable && u.symbol == rest)
            .map(|u| (u, Some(*p)))
    })
}

fn prefixed_factor(base: f64, prefix: Option<Prefix>) -> f64 {
    match prefix {
        None => base,
        // Powers of ten up to 10^9 are exact; divide for negative powers so that `mm` is the
        // correctly rounded 0.001.
        Some(p) if p.exponent >= 0 => base * 10f64.powi(p.exponent),
        Some(p) => base / 10f64.powi(-p.exponent),
    }
}

fn is_pound(atom: &str) -> bool {
    ["lb", "lbs", "pound", "pounds"]
        .iter()
        .any(|p| atom.eq_ignore_ascii_case(p))
}

/// Reads one unit atom (`kN`, `rpm`, `µm`).
pub fn lookup_atom(atom: &str) -> Result<Atom, UnitError> {
    if let Some((u, p)) = resolve(atom) {
        return Ok(Atom {
            factor: prefixed_factor(u.factor, p),
            dim: u.dim,
        });
    }
    if is_pound(atom) {
        return Err(UnitError::AmbiguousPound);
    }
    Err(UnitError::Unknown {
        atom: atom.to_string(),
        suggestion: suggest(atom),
    })
}

/// Describes a possibly prefixed atom for a hover; `None` when it is not a unit.
pub fn describe_atom(atom: &str) -> Option<AtomInfo> {
    let (u, p) = resolve(atom)?;
    let meaning = match p {
        Some(p) => format!("{}{}", p.name, u.meaning),
        None => u.meaning.to_string(),
    };
    Some(AtomInfo {
        symbol: atom.to_string(),
        meaning,
        factor: prefixed_factor(u.factor, p),
        dim: u.dim,
        source: u.source,
        prefix: p,
        base: u,
    })
}

/// Longest atom worth comparing: every known spelling is far shorter.
const MAX_SUGGEST_LEN: usize = 40;

/// `kilo-newtons` → `kilonewton`: lowercase, no `-`/`_`, `meter` spelled `metre`.
fn normalize_name(s: &str) -> String {
    s.chars()
        .filter(|c| *c != '-' && *c != '_' && *c != ' ')
        .flat_map(char::to_lowercase)
        .collect::<String>()
        .replace("meter", "metre")
}

/// The nearest known spelling to an unknown atom, if one is close.
fn suggest(atom: &str) -> Option<String> {
    if atom.is_empty() || atom.len() > MAX_SUGGEST_LEN {
        return None;
    }
    let lower = atom.to_lowercase();
    // 1. A known wrong spelling.
    if let Some((_, s)) = ALIASES.iter().find(|(a, _)| *a == lower) {
        return Some((*s).to_string());
    }
    // 2. A symbol with a plural `s` (`kgs`, `revs`); after a force, torque or power the `s`
    //    is more likely the second (`Ns` → `N*s`, `kNs` → `kN*s`, `Ws` → `W*s`).
    if let Some(stem) = atom.strip_suffix('s') {
        if let Some((u, _)) = resolve(stem) {
            let per_second = [Dim::FORCE, Dim::TORQUE, POWER].contains(&u.dim);
            return Some(if per_second {
                format!("{stem}*s")
            } else {
                stem.to_string()
            });
        }
    }
    // 3. A unit's name, singular or plural (`Newton`, `kilonewtons`, `inches`).
    let name = normalize_name(atom);
    let singulars = [
        Some(name.as_str()),
        name.strip_suffix('s'),
        name.strip_suffix("es"),
    ];
    for u in UNITS {
        let base = normalize_name(u.meaning);
        for cand in singulars.iter().flatten() {
            if *cand == base {
                return Some(u.symbol.to_string());
            }
            if u.prefixable {
                for p in PREFIXES.iter().filter(|p| p.symbol.is_ascii()) {
                    if cand.strip_prefix(p.name) == Some(base.as_str()) {
                        return Some(format!("{}{}", p.symbol, u.symbol));
                    }
                }
            }
        }
    }
    // 4. The same letters in another case (`kn` → `kN`, `hz` → `Hz`); prefer the spelling
    //    closest in case (`Mhz` → `MHz`).
    let ci = common_atoms()
        .filter(|c| c.to_lowercase() == lower)
        .min_by_key(|c| strsim::osa_distance(atom, c));
    if let Some(c) = ci {
        return Some(c.to_string());
    }
    // A prefix on a unit that takes none (`kft`, `krpm`): dropping the prefix would change
    // the value a thousandfold, so suggest nothing.
    let prefixed_fixed = PREFIXES.iter().any(|p| {
        atom.strip_prefix(p.symbol)
            .is_some_and(|rest| UNITS.iter().any(|u| !u.prefixable && u.symbol == rest))
    });
    if prefixed_fixed {
        return None;
    }
    // 5. A small edit: at most 1 for atoms of up to 3 letters, else 2, and never as many as
    //    the atom has letters (so `q` suggests nothing rather than any one-letter unit).
    let n = atom.chars().count();
    let limit: usize = if n <= 3 { 1 } else { 2 };
    let limit = limit.min(n.saturating_sub(1));
    common_atoms()
        .enumerate()
        .filter_map(|(i, c)| {
            let d = strsim::osa_distance(&lower, &c.to_lowercase());
            (d <= limit).then(|| {
                let len_diff = n.abs_diff(c.chars().count());
                ((d, len_diff, strsim::osa_distance(atom, c), i), c)
            })
        })
        .min_by_key(|(key, _)| *key)
        .map(|(_, c)| c.to_string())
}

/// Evaluates a whole unit expression to its SI factor and dimension, terms left to right with
/// integer exponents; on failure, the span of the offending atom (or atom and exponent) and
/// why.
pub fn eval_unit(unit: &UnitExpr) -> Result<Atom, (Span, UnitError)> {
    let mut factor = 1.0f64;
    let mut dim = Dim::NONE;
    for term in &unit.terms {
        let atom = lookup_atom(&term.atom).map_err(|e| (term.atom_span, e))?;
        let term_span = match term.exponent_span {
            Some(e) => Span::new(
                term.atom_span.start.min(e.start),
                term.atom_span.end.max(e.end),
            ),
            None => term.atom_span,
        };
        let too_large = || (term_span, UnitError::ExponentTooLarge);
        if term.exponent.unsigned_abs() > u32::from(MAX_EXPONENT.unsigned_abs()) {
            return Err(too_large());
        }
        let d = atom.dim.powi(term.exponent).ok_or_else(too_large)?;
        let f = atom.factor.powi(term.exponent);
        let (next_factor, next_dim) = match term.op {
            UnitOp::Mul => (factor * f, dim.times(d)),
            UnitOp::Div => (factor / f, dim.per(d)),
        };
        dim = next_dim.ok_or_else(too_large)?;
        if !next_factor.is_normal() {
            return Err((term_span, UnitError::FactorOutOfRange));
        }
        factor = next_factor;
    }
    Ok(Atom { factor, dim })
}

/// Common spellings for a dimension, for completion: atoms and short compound units, most
/// usual first. Dimensions shared by several quantities list all of them (torque, energy and
/// rotational stiffness are all kg·m²/s²). Empty for an unusual dimension.
pub fn units_with_dim(dim: Dim) -> Vec<&'static str> {
    let list: &[&str] = match dim {
        Dim::MASS => &["kg", "g", "t", "lbm", "slug", "oz"],
        Dim::INERTIA => &[
            "kg*m^2",
            "g*cm^2",
            "kg*cm^2",
            "kg*mm^2",
            "lbm*in^2",
            "lbm*ft^2",
            "slug*ft^2",
        ],
        Dim::STIFFNESS => &["N/m", "kN/m", "N/mm", "MN/m", "kN/mm", "lbf/in", "kip/in"],
        Dim::TORQUE => &[
            "N*m/rad",
            "kN*m/rad",
            "N*mm/rad",
            "N*m/deg",
            "lbf*in/rad",
            "lbf*ft/rad",
            "N*m",
            "kN*m",
            "N*mm",
            "lbf*in",
            "lbf*ft",
            "J",
            "kJ",
        ],
        Dim::DAMPING => &["N*s/m", "kN*s/m", "N*s/mm", "lbf*s/in"],
        Dim::ROTATIONAL_DAMPING => &[
            "N*m*s/rad",
            "kN*m*s/rad",
            "N*mm*s/rad",
            "lbf*in*s/rad",
            "N*m*s",
        ],
        Dim::FORCE => &["N", "kN", "MN", "mN", "kgf", "lbf", "kip"],
        Dim::IMPULSE => &["N*s", "kN*s", "lbf*s"],
        Dim::LENGTH => &["m", "mm", "cm", "um", "km", "in", "ft"],
        Dim::VELOCITY => &["m/s", "mm/s", "km/h", "in/s", "ft/s"],
        Dim::ACCELERATION => &["m/s^2", "mm/s^2", "gn", "in/s^2", "ft/s^2"],
        Dim::FREQUENCY => &["Hz", "kHz", "rpm", "cpm", "rad/s", "rev/s", "s^-1"],
        Dim::TIME => &["s", "ms", "us", "min", "h"],
        Dim::NONE => &["rad", "mrad", "deg", "rev", "cycle"],
        POWER => &["W", "kW", "MW"],
        _ => &[],
    };
    list.to_vec()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_symbol_resolves_to_itself() {
        for u in units() {
            let a = lookup_atom(u.symbol);
            assert_eq!(
                a,
                Ok(Atom {
                    factor: u.factor,
                    dim: u.dim
                }),
                "{}",
                u.symbol
            );
            assert!(u.factor.is_normal() && u.factor > 0.0, "{}", u.symbol);
        }
    }

    #[test]
    fn symbols_are_unique_and_no_prefix_parse_shadows_an_entry() {
        for (i, u) in units().iter().enumerate() {
            assert!(
                units()[..i].iter().all(|v| v.symbol != u.symbol),
                "{} twice",
                u.symbol
            );
            // A table entry that could also be read as prefix + prefixable symbol would be
            // ambiguous; the table wins, but flag any new such case here.
            let shadowed = prefixes().iter().any(|p| {
                u.symbol
                    .strip_prefix(p.symbol)
                    .is_some_and(|rest| units().iter().any(|v| v.prefixable && v.symbol == rest))
            });
            assert!(!shadowed, "{} is also a prefixed form", u.symbol);
        }
    }

    #[test]
    fn common_atoms_are_valid() {
        for a in common_atoms() {
            assert!(lookup_atom(a).is_ok(), "{a}");
        }
    }

    /// Evaluates `text` as the unit after a number, via the real lexer.
    fn eval_text(text: &str) -> Option<Atom> {
        let src = format!("1 {text}");
        let lexed = sprung_syntax::lexer::lex(&src);
        match lexed.tokens.as_slice() {
            [_, (sprung_syntax::lexer::Token::Unit(u), _)] => eval_unit(u).ok(),
            _ => None,
        }
    }

    #[test]
    fn alias_suggestions_are_valid_unit_text() {
        for (alias, suggestion) in ALIASES {
            assert_eq!(*alias, alias.to_lowercase(), "alias keys are lowercase");
            assert!(eval_text(suggestion).is_some(), "{alias} -> {suggestion}");
        }
        // `nm` itself is the nanometre; only the other spellings reach the alias.
        assert_eq!(lookup_atom("nm").map(|a| a.dim), Ok(Dim::LENGTH));
        assert_eq!(suggest("Nm").as_deref(), Some("N*m"));
    }

    #[test]
    fn dimension_lists_spell_their_dimension() {
        let dims = [
            Dim::MASS,
            Dim::INERTIA,
            Dim::STIFFNESS,
            Dim::TORQUE,
            Dim::DAMPING,
            Dim::ROTATIONAL_DAMPING,
            Dim::FORCE,
            Dim::IMPULSE,
            Dim::LENGTH,
            Dim::VELOCITY,
            Dim::ACCELERATION,
            Dim::FREQUENCY,
            Dim::TIME,
            Dim::NONE,
            POWER,
        ];
        for d in dims {
            let list = units_with_dim(d);
            assert!(!list.is_empty(), "{d}");
            for text in list {
                assert_eq!(eval_text(text).map(|a| a.dim), Some(d), "{text}");
            }
        }
        assert!(units_with_dim(Dim::new(3, 0, 0)).is_empty());
    }

    #[test]
    fn long_or_empty_atoms_have_no_suggestion() {
        let long = "k".repeat(10_000);
        assert_eq!(suggest(&long), None);
        assert_eq!(suggest(""), None);
        assert_eq!(suggest("q"), None);
    }
}
