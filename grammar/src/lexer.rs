//! The lexer: logos turns text into raw tokens, then one pass attaches units to the number
//! literals they follow (language.md §3: a unit follows a number after optional spaces and has
//! no spaces inside it). Whether `in` is the inch or the range keyword, and whether an
//! identifier after a number is a unit, is decided here by position, once.

use logos::Logos;

use crate::ast::{UnitExpr, UnitOp, UnitTerm};
use crate::span::Span;

/// A token as the parser sees it.
#[derive(Logos, Clone, Debug, PartialEq)]
#[logos(skip r"[ \t\r\n\f\u{FEFF}]+")]
pub enum Token<'s> {
    // Keywords (language.md §1).
    #[token("let")]
    Let,
    #[token("system")]
    System,
    #[token("mass")]
    Mass,
    #[token("inertia")]
    Inertia,
    #[token("spring")]
    Spring,
    #[token("damper")]
    Damper,
    #[token("force")]
    Force,
    #[token("torque")]
    Torque,
    #[token("motion")]
    Motion,
    #[token("initial")]
    Initial,
    #[token("gravity")]
    Gravity,
    #[token("require")]
    Require,
    #[token("between")]
    Between,
    #[token("and")]
    And,
    #[token("on")]
    On,
    #[token("of")]
    Of,
    #[token("at")]
    At,
    #[token("step")]
    Step,
    #[token("impulse")]
    Impulse,
    #[token("mode")]
    Mode,
    #[token("is")]
    Is,
    #[token("not")]
    Not,
    #[token("in")]
    In,
    #[token("outside")]
    Outside,
    #[token("ground")]
    Ground,
    #[token("use")]
    Use,

    #[regex(r"[A-Za-z_][A-Za-z0-9_]*")]
    Ident(&'s str),
    /// An atom spelled with the micro sign (`µm`, `μs`): only valid as a unit atom.
    #[regex(r"[\u{00B5}\u{03BC}][A-Za-z_][A-Za-z0-9_]*")]
    MicroAtom(&'s str),
    #[regex(r"([0-9][0-9_]*(\.[0-9][0-9_]*)?|\.[0-9][0-9_]*)([eE][+-]?[0-9][0-9_]*)?")]
    Number(&'s str),
    #[regex(r#""([^"\\\n]|\\.)*""#)]
    Str(&'s str),
    #[regex(r#""([^"\\\n]|\\.)*"#)]
    UnterminatedStr(&'s str),
    /// `#` to the end of the line; `##` is a doc comment.
    #[regex(r"#[^\n]*", allow_greedy = true)]
    Comment(&'s str),

    #[token("{")]
    LBrace,
    #[token("}")]
    RBrace,
    #[token("(")]
    LParen,
    #[token(")")]
    RParen,
    #[token(",")]
    Comma,
    #[token("=")]
    Eq,
    #[token("+")]
    Plus,
    #[token("-")]
    Minus,
    #[token("*")]
    Star,
    #[token("\u{00B7}")]
    Dot,
    #[token("/")]
    Slash,
    #[token("^")]
    Caret,
    #[token("%")]
    Percent,
    #[token("\u{00B1}")]
    #[token("+-")]
    PlusMinus,
    #[token("..")]
    DotDot,
    #[token("<")]
    Lt,
    #[token("<=")]
    Le,
    #[token(">")]
    Gt,
    #[token(">=")]
    Ge,

    /// A unit attached to the number before it; never produced by logos itself.
    Unit(Box<UnitExpr>),
    /// Text the lexer could not read.
    Error(&'s str),
}

/// A problem found while lexing, located by byte span.
#[derive(Clone, Debug, PartialEq)]
pub struct LexError {
    pub span: Span,
    pub message: String,
}

/// The output of [`lex`]: tokens (comments included, in order) and lexical errors.
#[derive(Clone, Debug, Default)]
pub struct Lexed<'s> {
    pub tokens: Vec<(Token<'s>, Span)>,
    pub errors: Vec<LexError>,
}

impl Token<'_> {
    /// How the token reads in an error message.
    pub fn describe(&self) -> String {
        match self {
            Token::Ident(s) => format!("name `{s}`"),
            Token::MicroAtom(s) => format!("unit `{s}`"),
            Token::Number(s) => format!("number `{s}`"),
            Token::Str(_) | Token::UnterminatedStr(_) => "a string".to_string(),
            Token::Comment(_) => "a comment".to_string(),
            Token::Unit(u) => format!("unit `{}`", u.text()),
            Token::Error(s) => format!("`{s}`"),
            other => format!("`{}`", other.keyword_text().unwrap_or("?")),
        }
    }

    /// The fixed spelling of a keyword or punctuation token.
    pub fn keyword_text(&self) -> Option<&'static str> {
        Some(match self {
            Token::Let => "let",
            Token::System => "system",
            Token::Mass => "mass",
            Token::Inertia => "inertia",
            Token::Spring => "spring",
            Token::Damper => "damper",
            Token::Force => "force",
            Token::Torque => "torque",
            Token::Motion => "motion",
            Token::Initial => "initial",
            Token::Gravity => "gravity",
            Token::Require => "require",
            Token::Between => "between",
            Token::And => "and",
            Token::On => "on",
            Token::Of => "of",
            Token::At => "at",
            Token::Step => "step",
            Token::Impulse => "impulse",
            Token::Mode => "mode",
            Token::Is => "is",
            Token::Not => "not",
            Token::In => "in",
            Token::Outside => "outside",
            Token::Ground => "ground",
            Token::Use => "use",
            Token::LBrace => "{",
            Token::RBrace => "}",
            Token::LParen => "(",
            Token::RParen => ")",
            Token::Comma => ",",
            Token::Eq => "=",
            Token::Plus => "+",
            Token::Minus => "-",
            Token::Star => "*",
            Token::Dot => "\u{00B7}",
            Token::Slash => "/",
            Token::Caret => "^",
            Token::Percent => "%",
            Token::PlusMinus => "\u{00B1}",
            Token::DotDot => "..",
            Token::Lt => "<",
            Token::Le => "<=",
            Token::Gt => ">",
            Token::Ge => ">=",
            _ => return None,
        })
    }

    /// Whether this token begins a statement inside a system body.
    pub fn starts_statement(&self) -> bool {
        matches!(
            self,
            Token::Let
                | Token::Mass
                | Token::Inertia
                | Token::Spring
                | Token::Damper
                | Token::Force
                | Token::Torque
                | Token::Motion
                | Token::Initial
                | Token::Gravity
                | Token::Require
        )
    }

    /// Whether this token begins a top-level item.
    pub fn starts_item(&self) -> bool {
        matches!(self, Token::Let | Token::System | Token::Use)
    }
}

/// Every keyword of the language, as written.
pub const KEYWORDS: &[&str] = &[
    "let", "system", "mass", "inertia", "spring", "damper", "force", "torque", "motion", "initial",
    "gravity", "require", "between", "and", "on", "of", "at", "step", "impulse", "mode", "is",
    "not", "in", "outside", "ground", "use",
];

/// Words with a meaning in some positions that remain ordinary identifiers elsewhere
/// (language.md §1): requirement subjects and regime words.
pub const CONTEXTUAL_WORDS: &[&str] = &[
    "undamped",
    "underdamped",
    "critically",
    "damped",
    "overdamped",
    "damping",
    "frequency",
    "regime",
    "amplitude",
    "transmissibility",
    "separation",
    "settling",
    "overshoot",
    "sag",
    "within",
    "from",
    "to",
];

/// Lexes `text`, keeping comments, and attaches units to number literals.
pub fn lex(text: &str) -> Lexed<'_> {
    let mut raw = Vec::new();
    let mut errors = Vec::new();
    let mut lexer = Token::lexer(text);
    while let Some(result) = lexer.next() {
        let span = Span::from(lexer.span());
        match result {
            Ok(Token::UnterminatedStr(s)) => {
                errors.push(LexError {
                    span,
                    message: "unterminated string: expected a closing `\"` on the same line"
                        .to_string(),
                });
                raw.push((Token::UnterminatedStr(s), span));
            }
            Ok(tok) => raw.push((tok, span)),
            Err(()) => {
                let slice = lexer.slice();
                errors.push(LexError {
                    span,
                    message: format!("unexpected character `{}`", slice.escape_debug()),
                });
                raw.push((Token::Error(slice), span));
            }
        }
    }
    let tokens = attach_units(raw, &mut errors);
    Lexed { tokens, errors }
}

fn is_atom(tok: &Token<'_>) -> bool {
    matches!(tok, Token::Ident(_) | Token::MicroAtom(_) | Token::In)
}

fn atom_text<'s>(tok: &Token<'s>) -> &'s str {
    match tok {
        Token::Ident(s) | Token::MicroAtom(s) => s,
        _ => "in",
    }
}

/// Merges `NUMBER ATOM [^ INT] ((* | / | ·) ATOM [^ INT])*` runs into `Number, Unit` pairs.
fn attach_units<'s>(
    raw: Vec<(Token<'s>, Span)>,
    errors: &mut Vec<LexError>,
) -> Vec<(Token<'s>, Span)> {
    let mut out: Vec<(Token<'s>, Span)> = Vec::with_capacity(raw.len());
    let mut i = 0;
    // The last significant (non-comment) token, to know that a number follows `mode`.
    let mut prev_significant: Option<usize> = None;
    while i < raw.len() {
        let (tok, span) = &raw[i];
        let is_mode_index = prev_significant.is_some_and(|p| matches!(raw[p].0, Token::Mode));
        if matches!(tok, Token::Number(_)) && !is_mode_index {
            out.push((tok.clone(), *span));
            prev_significant = Some(i);
            i += 1;
            // A comment may not sit between a number and its unit; only spaces may.
            if i < raw.len() && is_atom(&raw[i].0) {
                let (unit, next) = read_unit(&raw, i, errors);
                let unit_span = unit.span;
                out.push((Token::Unit(Box::new(unit)), unit_span));
                prev_significant = Some(next - 1);
                i = next;
            }
            continue;
        }
        if !matches!(tok, Token::Comment(_)) {
            prev_significant = Some(i);
        }
        out.push((tok.clone(), *span));
        i += 1;
    }
    out
}

fn tight(raw: &[(Token<'_>, Span)], i: usize) -> bool {
    i > 0 && i < raw.len() && raw[i - 1].1.end == raw[i].1.start
}

/// Reads one unit expression starting at the atom `raw[start]`; returns it and the index after it.
fn read_unit(
    raw: &[(Token<'_>, Span)],
    start: usize,
    errors: &mut Vec<LexError>,
) -> (UnitExpr, usize) {
    let mut terms = Vec::new();
    let mut i = start;
    let mut op = UnitOp::Mul;
    loop {
        let (atom_tok, atom_span) = &raw[i];
        let mut term = UnitTerm {
            op,
            atom: atom_text(atom_tok).to_string(),
            atom_span: *atom_span,
            exponent: 1,
            exponent_span: None,
        };
        i += 1;
        // `^` [-] INT, all tight.
        if i < raw.len() && tight(raw, i) && matches!(raw[i].0, Token::Caret) {
            let caret = raw[i].1;
            let mut j = i + 1;
            let mut negative = false;
            if j < raw.len() && tight(raw, j) && matches!(raw[j].0, Token::Minus) {
                negative = true;
                j += 1;
            }
            match raw.get(j) {
                Some((Token::Number(digits), nspan)) if tight(raw, j) => {
                    let cleaned: String = digits.chars().filter(|c| *c != '_').collect();
                    match cleaned.parse::<i32>() {
                        Ok(n) if n.unsigned_abs() <= 64 => {
                            term.exponent = if negative { -n } else { n };
                        }
                        _ => errors.push(LexError {
                            span: Span::new(caret.start, nspan.end),
                            message: format!(
                                "a unit exponent must be a small whole number, found `{digits}`"
                            ),
                        }),
                    }
                    term.exponent_span = Some(Span::new(caret.start, nspan.end));
                    i = j + 1;
                }
                _ => {
                    errors.push(LexError {
                        span: caret,
                        message: "expected a whole-number exponent right after `^` in a unit"
                            .to_string(),
                    });
                    term.exponent_span = Some(caret);
                    i = j;
                }
            }
        }
        terms.push(term);
        // (* | / | ·) ATOM, all tight.
        let next_op = match raw.get(i) {
            Some((Token::Star | Token::Dot, _)) => UnitOp::Mul,
            Some((Token::Slash, _)) => UnitOp::Div,
            _ => break,
        };
        if tight(raw, i) && i + 1 < raw.len() && tight(raw, i + 1) && is_atom(&raw[i + 1].0) {
            op = next_op;
            i += 1;
        } else {
            break;
        }
    }
    let span = Span::new(raw[start].1.start, raw[i - 1].1.end);
    (UnitExpr { span, terms }, i)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kinds(text: &str) -> Vec<String> {
        lex(text)
            .tokens
            .iter()
            .map(|(t, _)| match t {
                Token::Unit(u) => format!("unit({})", u.text()),
                other => other.describe(),
            })
            .collect()
    }

    #[test]
    fn unit_is_tight_and_left_associative() {
        assert_eq!(kinds("2 kg*m"), ["number `2`", "unit(kg*m)"]);
        assert_eq!(
            kinds("2 kg * m"),
            ["number `2`", "unit(kg)", "`*`", "name `m`"]
        );
        assert_eq!(kinds("900 N*s/m"), ["number `900`", "unit(N*s/m)"]);
        assert_eq!(kinds("3 s^-1"), ["number `3`", "unit(s^-1)"]);
        assert_eq!(kinds("9.81 m/s^2"), ["number `9.81`", "unit(m/s^2)"]);
    }

    #[test]
    fn inch_versus_range_keyword_by_position() {
        assert_eq!(
            kinds("sag of base in 1 in .. 2 in"),
            [
                "name `sag`",
                "`of`",
                "name `base`",
                "`in`",
                "number `1`",
                "unit(in)",
                "`..`",
                "number `2`",
                "unit(in)"
            ]
        );
        assert_eq!(
            kinds("mode 1 in 5 Hz"),
            ["`mode`", "number `1`", "`in`", "number `5`", "unit(Hz)"]
        );
    }

    #[test]
    fn numbers_and_ranges() {
        assert_eq!(kinds("1..2"), ["number `1`", "`..`", "number `2`"]);
        assert_eq!(
            kinds(".5 1e-3 2.5E6 1_000"),
            [
                "number `.5`",
                "number `1e-3`",
                "number `2.5E6`",
                "number `1_000`"
            ]
        );
        assert_eq!(
            kinds("5 ± 1 +- 2"),
            [
                "number `5`",
                "`\u{b1}`",
                "number `1`",
                "`\u{b1}`",
                "number `2`"
            ]
        );
    }

    #[test]
    fn micro_sign_and_errors() {
        assert_eq!(kinds("3 µm"), ["number `3`", "unit(µm)"]);
        let lexed = lex("let a = 3 $ 4");
        assert_eq!(lexed.errors.len(), 1);
        assert_eq!(lexed.errors[0].span, Span::new(10, 11));
        let lexed = lex("\"open");
        assert_eq!(lexed.errors.len(), 1);
    }
}
