//! Diagnostics as plain data: a stable code, a severity, a primary byte span, a message that
//! says what was found and what was expected, an optional help line and related labels.
//! Rendering (miette, LSP, SARIF, JSON) happens at the edges, never here.
//!
//! Every code is listed once in [`CATALOGUE`] with a title and the long explanation that
//! `sprung explain CODE` prints.

use serde::Serialize;
use sprung_syntax::Span;

use crate::dim::Dim;

#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    Error,
    Warning,
    Info,
}

impl Severity {
    pub fn as_str(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Info => "info",
        }
    }
}

/// A secondary location with a short message ("first defined here").
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Label {
    #[serde(skip)]
    pub span: Span,
    pub message: String,
}

/// What a place in the model expected, as data for quick fixes (so that no tool reads it out of
/// the message): the dimension, and the SI spelling of a unit to write there (`N*m/rad` for a
/// torsional spring, `N*m` for a torque; the two share a dimension).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ExpectedUnit {
    pub dim: Dim,
    pub unit: &'static str,
}

#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Diagnostic {
    pub code: &'static str,
    pub severity: Severity,
    #[serde(skip)]
    pub span: Span,
    pub message: String,
    pub help: Option<String>,
    pub labels: Vec<Label>,
    /// For a value of the wrong dimension: what its place expects. Not part of any report.
    #[serde(skip)]
    pub expected_unit: Option<ExpectedUnit>,
}

impl Diagnostic {
    /// A diagnostic with the code's default severity.
    pub fn new(code: Code, span: Span, message: impl Into<String>) -> Self {
        Diagnostic {
            code: code.info().code,
            severity: code.info().severity,
            span,
            message: message.into(),
            help: None,
            labels: Vec::new(),
            expected_unit: None,
        }
    }

    /// Records what the diagnostic's span was expected to be (see [`ExpectedUnit`]).
    pub fn with_expected_unit(mut self, dim: Dim, unit: &'static str) -> Self {
        self.expected_unit = Some(ExpectedUnit { dim, unit });
        self
    }

    pub fn with_help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }

    pub fn with_label(mut self, span: Span, message: impl Into<String>) -> Self {
        self.labels.push(Label {
            span,
            message: message.into(),
        });
        self
    }

    pub fn with_severity(mut self, severity: Severity) -> Self {
        self.severity = severity;
        self
    }

    pub fn is_error(&self) -> bool {
        self.severity == Severity::Error
    }
}

/// One entry of the catalogue.
#[derive(Clone, Copy, Debug)]
pub struct CodeInfo {
    pub code: &'static str,
    pub title: &'static str,
    pub severity: Severity,
    pub explanation: &'static str,
}

macro_rules! catalogue {
    ($( $variant:ident = $code:literal, $sev:ident, $title:literal, $expl:literal; )*) => {
        /// Every diagnostic the toolchain can emit.
        #[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
        pub enum Code { $( $variant, )* }

        /// The catalogue: one entry per [`Code`], in code order.
        pub const CATALOGUE: &[CodeInfo] = &[
            $( CodeInfo { code: $code, title: $title, severity: Severity::$sev, explanation: $expl }, )*
        ];

        impl Code {
            pub const ALL: &'static [Code] = &[ $( Code::$variant, )* ];

            pub fn info(self) -> &'static CodeInfo {
                &CATALOGUE[self as usize]
            }
        }
    };
}

/// Looks a code up by its spelling (`SP301`), case-insensitively.
pub fn lookup(code: &str) -> Option<&'static CodeInfo> {
    CATALOGUE
        .iter()
        .find(|c| c.code.eq_ignore_ascii_case(code.trim()))
}

catalogue! {
    // 1xx: text and syntax.
    Lex = "SP101", Error, "unreadable text",
        "The lexer met text that is not part of the language: a stray character, a string \
         without its closing quote on the same line, or a unit exponent that is not a small \
         whole number (`m^x`, `s^0.5`). Only the bad text is skipped; the rest of the statement \
         and file are still read.";
    Syntax = "SP102", Error, "statement does not follow the grammar",
        "A statement or item does not follow the grammar of language.md section 2. The message \
         says what was found and what could come there instead. The statement is left out of \
         the model; every other statement of the file is still checked and analyzed.";
    UnclosedSystem = "SP103", Error, "system body not closed",
        "A `system NAME { ... }` body reached the end of the file, or the next `system`, \
         without its closing `}`. The statements read so far are kept.";
    TooDeep = "SP104", Error, "expression nested too deeply",
        "An expression nests parentheses, unary minus or powers deeper than the parser's limit. \
         Real models never come close; the limit keeps the tools from exhausting the stack on \
         generated or corrupted input. Split the expression into `let` values.";
    EmptyFile = "SP105", Warning, "nothing to check",
        "The file holds no system. A model file needs at least one `system NAME { ... }` for \
         there to be anything to analyze.";
    FileTooLarge = "SP106", Error, "file too large",
        "The file is larger than the limit the tools accept (8 MiB). Lumped models are small; a \
         file this large is almost certainly not a model.";

    // 2xx: names.
    UnknownName = "SP201", Error, "unknown name",
        "A name is used that no `let`, mass, inertia, spring, damper or drive defines in this \
         system or at the top level of the file, and that is not a built-in constant (`pi`). \
         The help suggests the nearest defined name.";
    DuplicateName = "SP202", Error, "name defined twice",
        "Two definitions in the same scope share a name. Masses, inertias, elements, drives and \
         local `let`s of a system share one scope; top-level `let`s share another. A local \
         `let` may shadow a top-level one.";
    Cycle = "SP203", Error, "definitions depend on each other in a cycle",
        "Names are resolved independently of order, so a value may use a name defined further \
         down, but a chain of definitions that leads back to itself has no value. The message \
         names every member of the cycle.";
    UnknownNode = "SP204", Error, "unknown mass or inertia",
        "An element end, drive target, initial condition or requirement names something that \
         is not a mass or inertia of this system (nor `ground` where ground is allowed).";
    UnknownFunction = "SP205", Error, "unknown function",
        "Only `sqrt abs min max exp ln log10 sin cos tan` may be called.";
    WrongArity = "SP206", Error, "wrong number of arguments",
        "`min` and `max` take two or more arguments; every other function takes exactly one.";
    UnknownDrive = "SP207", Error, "unknown drive",
        "A requirement names a drive that no `force`, `torque` or `motion` of this system defines.";
    DuplicateSystem = "SP208", Error, "system defined twice",
        "Two systems of one file share a name. Reports and requirements name systems, so each \
         needs its own.";
    KeywordAsName = "SP209", Error, "keyword used as a name",
        "Keywords are reserved and cannot name a value or element.";
    NotAValue = "SP210", Error, "name has no value",
        "A name used in an expression must stand for a value: a `let`, a mass or inertia (its \
         mass), a spring or damper (its coefficient). A drive has an amplitude and a frequency \
         rather than one value, so it cannot be used in an expression; put the amount in a \
         `let` and use that in both places.";

    // 3xx: units and dimensions.
    UnknownUnit = "SP301", Error, "unknown unit",
        "A unit atom after a number is not in the unit table (language.md section 3). Units are \
         case-sensitive (`N`, `kN`, `Hz`, `kg`). The help suggests the nearest known unit. Note \
         that a space ends a unit: `2 kg * m` multiplies by the value named `m`.";
    AmbiguousPound = "SP302", Error, "`lb` is ambiguous",
        "In this trade `lb` is used both for the pound-mass and the pound-force. Write `lbm` \
         (0.45359237 kg) or `lbf` (4.4482216152605 N) so the model says which.";
    DimensionMismatch = "SP303", Error, "dimensions do not match",
        "Two quantities of different dimension are added, subtracted, compared or bounded \
         together, or a function receives an argument of the wrong dimension (`sin`, `cos`, \
         `tan`, `exp`, `ln`, `log10` need plain numbers).";
    WrongQuantity = "SP304", Error, "value of the wrong kind of quantity",
        "A value does not have the dimension its place requires: a mass in kg, an inertia in \
         kg*m^2, a translational spring in N/m, a rotational spring in N*m/rad, a damper in \
         N*s/m or N*m*s/rad, a force in N, a torque in N*m, a ground motion in m, m/s or m/s^2 \
         (or rad for rotational ground motion), a frequency in Hz, rpm or 1/s, gravity as an \
         acceleration. The message says what was found and what was expected.";
    BadPower = "SP305", Error, "power of a dimensioned value",
        "A dimensioned base needs a whole-number exponent that is known without tolerances, and \
         `sqrt` needs every dimension exponent to be even. The exponent itself must be a plain \
         number.";
    BadTolerance = "SP306", Error, "tolerance not understood",
        "A tolerance is either relative (`± 10%`) or absolute in the value's own unit \
         (`± 5 kN/m`). A plain number without `%` on a dimensioned value, a tolerance of \
         another dimension, a negative tolerance or a relative tolerance of 100% or more is \
         refused.";
    NotFinite = "SP307", Error, "value is not a finite number",
        "Evaluating the expression gave infinity or NaN: a division by zero, an overflow, the \
         square root or logarithm of a negative number.";

    // 4xx: model and topology.
    SelfLoop = "SP401", Error, "element connects a node to itself",
        "Both ends of a spring or damper name the same node; such an element does nothing.";
    GroundToGround = "SP402", Error, "element connects ground to ground",
        "A spring or damper with both ends at ground does nothing.";
    MixedKinds = "SP403", Error, "element joins a translational and a rotational node",
        "Both ends of one element must be of the same kind: two masses (or a mass and ground), \
         or two inertias (or an inertia and ground). A gear or lever coupling needs a ratio, \
         which this version of the language does not express.";
    WrongTarget = "SP404", Error, "drive on the wrong kind of node",
        "A `force` acts on a mass, a `torque` on an inertia; a `motion` is of `ground`.";
    NonPositive = "SP405", Warning, "value is zero or negative",
        "A mass, inertia, spring or damper value is zero or negative where only a positive value \
         makes sense. A negative stiffness or damping makes the model unstable; a zero mass \
         makes the mass matrix singular.";
    MassWithoutSpring = "SP406", Warning, "mass with no spring",
        "A mass or inertia has no spring attached, so nothing holds it: it moves freely \
         (a rigid-body mode) unless that is intended.";
    NoGround = "SP407", Warning, "system has no ground connection",
        "No spring or damper of the system reaches ground, so the whole system can move freely. \
         Free-floating models are allowed (their rigid-body modes are reported), but a mounted \
         machine is usually meant to be connected to ground.";
    NotGrounded = "SP408", Warning, "part of the system has no path to ground",
        "Some masses or inertias are not connected to ground through any chain of springs, \
         while others are. The unconnected group moves freely.";
    NoMasses = "SP409", Warning, "system has no mass or inertia",
        "A system without a mass or inertia has no degree of freedom and nothing to analyze.";
    DuplicateInitial = "SP410", Error, "initial condition given twice",
        "Each mass or inertia takes at most one `initial` statement.";
    DuplicateGravity = "SP411", Error, "gravity given twice",
        "A system takes at most one `gravity` statement.";
    UnusedUse = "SP412", Warning, "`use` is not supported yet",
        "`use \"path\"` (sharing top-level `let`s between files) is read but not yet acted on; \
         names it would bring in are unknown.";
    EmptyBand = "SP413", Error, "drive band is empty or reversed",
        "A band `at F1 .. F2` needs F1 < F2, both positive. Write the lower running speed first.";
    DamperNotFelt = "SP414", Warning, "damper that no mode feels",
        "In every undamped mode both ends of this damper move together (or stay still), so it \
         adds no damping to any mode. It may still act on a forced response; check that it \
         connects what was meant.";

    // 5xx: requirements.
    RequirementFailed = "SP501", Error, "requirement not met",
        "A `require` statement does not hold at the nominal values or at some corner of the \
         tolerance box. The message gives the measured value, the limit, the margin and the \
         worst corner.";
    RequirementUnit = "SP502", Error, "requirement limit of the wrong kind",
        "The limit of a requirement must have the subject's dimension: damping, separation, \
         transmissibility and overshoot are plain ratios (`0.05`, `25%`), frequency is a \
         frequency (`Hz`, `rpm`), amplitude and sag are lengths (or angles for inertias), \
         settling is a time.";
    RequirementForm = "SP503", Error, "requirement form not allowed for its subject",
        "`is [not] REGIME` compares only a `regime`, and a `regime` compares only with \
         `is [not] REGIME`. Numeric subjects take `<`, `<=`, `>`, `>=`, `in A .. B` or \
         `outside A .. B`.";
    ModeOutOfRange = "SP504", Error, "no such mode",
        "`mode N` counts modes from 1 in ascending natural frequency; the system has fewer modes.";
    NotYetEvaluated = "SP505", Warning, "requirement not evaluated yet",
        "This kind of requirement is read and checked but this version does not evaluate it \
         yet. It neither passes nor fails; it is reported so that nothing passes silently.";
    RigidExcepted = "SP506", Warning, "rigid-body mode excepted from a requirement",
        "A requirement without `of mode N` must hold for every mode, but a rigid-body mode \
         (a mass or group with no spring path to ground) has no natural frequency or damping \
         ratio to compare. It is left out, and this warning says so.";

    // 6xx: analysis.
    TooManyDofs = "SP601", Error, "system too large to analyze",
        "The system has more degrees of freedom than the analysis limit (5,000 by default). \
         The model is still checked; its modes and requirements are not computed.";
    AnalysisFailed = "SP602", Error, "modal analysis failed",
        "The eigenvalue problem of the system could not be solved: the mass matrix is not \
         positive definite (a zero or negative mass or inertia) or an eigensolver did not \
         converge. The requirements of the system are not evaluated.";
    TooManyCorners = "SP603", Error, "tolerance box too large to search",
        "The system depends on more than 16 toleranced values, so its tolerance box has more \
         than 2^16 corners, or searching its corners would exceed the analyzer's work budget \
         (many corners of a large system, or of one with settling or overshoot requirements, \
         each needing a simulation). Rather than guess a worst case or run for minutes, the \
         analyzer evaluates none and says so. Fix some values, or merge tolerances that move \
         together into one `let`.";
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::HashSet;

    #[test]
    fn codes_are_unique_ordered_and_explained() {
        let mut seen = HashSet::new();
        for (i, info) in CATALOGUE.iter().enumerate() {
            assert!(seen.insert(info.code), "duplicate code {}", info.code);
            assert!(
                info.explanation.len() > 40,
                "{} needs a real explanation",
                info.code
            );
            assert!(!info.title.is_empty());
            assert_eq!(Code::ALL[i].info().code, info.code);
            if i > 0 {
                assert!(
                    CATALOGUE[i - 1].code < info.code,
                    "{} out of order",
                    info.code
                );
            }
        }
        assert_eq!(lookup("sp303").map(|c| c.code), Some("SP303"));
        assert!(lookup("SP999").is_none());
    }
}
