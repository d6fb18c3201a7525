//! Completion by context: statement keywords (inside or outside a system), nodes and `ground`
//! after `between`/`and`/`on`, drives after `from`/`transmissibility of`, requirement
//! subjects after `require`, regime words after `is`, units after a number (filtered to the
//! dimension the statement expects), and names, functions and `pi` in expressions.

use sprung_engine::check::FUNCTIONS;
use sprung_engine::dim::Dim;
use sprung_engine::units;
use sprung_syntax::lexer::{Token, lex};
use tower_lsp_server::ls_types::{CompletionItem, CompletionItemKind, Position};

use crate::snapshot::Snapshot;
use crate::symbols::{Def, DefKind};

const SYSTEM_KEYWORDS: &[&str] = &[
    "let", "mass", "inertia", "spring", "damper", "force", "torque", "motion", "initial",
    "gravity", "require",
];
const TOP_KEYWORDS: &[&str] = &["let", "system", "use"];
const SUBJECTS: &[&str] = &[
    "damping",
    "frequency",
    "regime",
    "separation from",
    "transmissibility of",
    "amplitude of",
    "settling of",
    "overshoot of",
    "sag of",
];
const REGIMES: &[&str] = &["undamped", "underdamped", "critically damped", "overdamped"];

fn is_word_char(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

pub fn complete(snap: &Snapshot, pos: Position) -> Vec<CompletionItem> {
    let offset = snap.offset(pos).min(snap.text.len());
    let prefix = snap.text.get(..offset).unwrap_or("");
    let word_start = prefix
        .char_indices()
        .rev()
        .take_while(|(_, c)| is_word_char(*c) || *c == 'µ' || *c == 'μ')
        .last()
        .map_or(offset, |(i, _)| i);
    // A number is not part of the word: in `1k` the word is `k`, in `40` there is none.
    let word_start = word_start
        + prefix[word_start..]
            .find(|c: char| !(c.is_ascii_digit() || c == '.' || c == '_'))
            .unwrap_or(prefix.len() - word_start);
    let before = &prefix[..word_start];
    let system = snap.symbols.system_at(offset);

    // A unit: right after a number (spaces allowed), or after `*`, `/` inside a unit.
    if let Some(dim) = unit_context(snap, before) {
        return unit_items(dim);
    }

    let lexed = lex(before);
    let sig: Vec<&Token<'_>> = lexed
        .tokens
        .iter()
        .map(|(t, _)| t)
        .filter(|t| !matches!(t, Token::Comment(_)))
        .collect();
    let last = sig.last().copied();
    let statement = sig.iter().rev().find(|t| starts_statement(t)).copied();
    let visible = snap.symbols.visible(system);
    let names = |pred: &dyn Fn(&Def) -> bool| -> Vec<CompletionItem> {
        visible
            .iter()
            .filter(|d| pred(d))
            .map(|d| item(&d.name, CompletionItemKind::VARIABLE, d.kind.word()))
            .collect()
    };

    let line_before = before.rsplit('\n').next().unwrap_or("");
    let at_statement_start = line_before.trim().is_empty()
        && !matches!(
            last,
            Some(
                Token::Eq
                    | Token::Plus
                    | Token::Minus
                    | Token::Star
                    | Token::Slash
                    | Token::Caret
                    | Token::LParen
                    | Token::Comma
                    | Token::PlusMinus
                    | Token::DotDot
            )
        );
    match last {
        _ if at_statement_start || matches!(last, None | Some(Token::LBrace | Token::RBrace)) => {
            let words = if system.is_some() && !matches!(last, Some(Token::RBrace)) {
                SYSTEM_KEYWORDS
            } else {
                TOP_KEYWORDS
            };
            words
                .iter()
                .map(|w| item(w, CompletionItemKind::KEYWORD, "keyword"))
                .collect()
        }
        Some(Token::Between | Token::And | Token::On) => {
            let mut out = names(&|d: &Def| d.kind.is_node());
            out.push(item(
                "ground",
                CompletionItemKind::KEYWORD,
                "the fixed frame",
            ));
            out
        }
        Some(Token::Of) if matches!(statement, Some(Token::Motion)) => {
            vec![item(
                "ground",
                CompletionItemKind::KEYWORD,
                "the fixed frame",
            )]
        }
        Some(Token::Of)
            if matches!(
                sig.iter().rev().nth(1),
                Some(Token::Ident("transmissibility"))
            ) =>
        {
            names(&|d: &Def| d.kind.is_drive())
        }
        Some(Token::Of) if matches!(sig.iter().rev().nth(1), Some(Token::Ident(w)) if ["damping", "frequency", "regime"].contains(w)) =>
        {
            vec![item("mode", CompletionItemKind::KEYWORD, "mode N")]
        }
        Some(Token::Of) => names(&|d: &Def| d.kind.is_node()),
        Some(Token::Ident("from")) if matches!(statement, Some(Token::Require)) => {
            names(&|d: &Def| d.kind.is_drive())
        }
        Some(Token::Require) => SUBJECTS
            .iter()
            .map(|w| item(w, CompletionItemKind::KEYWORD, "requirement subject"))
            .collect(),
        Some(Token::Is) => {
            let mut out: Vec<CompletionItem> = REGIMES
                .iter()
                .map(|w| item(w, CompletionItemKind::ENUM_MEMBER, "regime"))
                .collect();
            out.push(item("not", CompletionItemKind::KEYWORD, "keyword"));
            out
        }
        Some(Token::Not) => REGIMES
            .iter()
            .map(|w| item(w, CompletionItemKind::ENUM_MEMBER, "regime"))
            .collect(),
        Some(
            Token::Mass
            | Token::Inertia
            | Token::Spring
            | Token::Damper
            | Token::Force
            | Token::Torque
            | Token::Motion
            | Token::System
            | Token::Let,
        ) => Vec::new(), // a new name: nothing to offer
        _ => {
            let mut out = names(&|d: &Def| d.kind != DefKind::System);
            out.extend(
                FUNCTIONS
                    .iter()
                    .map(|f| item(f, CompletionItemKind::FUNCTION, "function")),
            );
            out.push(item("pi", CompletionItemKind::CONSTANT, "π"));
            out
        }
    }
}

fn starts_statement(t: &Token<'_>) -> bool {
    t.starts_statement() || t.starts_item()
}

fn item(label: &str, kind: CompletionItemKind, detail: &str) -> CompletionItem {
    CompletionItem {
        label: label.to_string(),
        kind: Some(kind),
        detail: Some(detail.to_string()),
        ..CompletionItem::default()
    }
}

/// `Some(dim)` when the cursor is where a unit goes: `Some(None)` for any unit.
fn unit_context(snap: &Snapshot, before: &str) -> Option<Option<Dim>> {
    let trimmed = before.trim_end_matches([' ', '\t']);
    let spaced = trimmed.len() < before.len();
    // Inside a compound unit: `40 kN/` → any atom.
    if !spaced && (trimmed.ends_with('*') || trimmed.ends_with('/')) {
        let head = &trimmed[..trimmed.len() - 1];
        let unit_start = head
            .char_indices()
            .rev()
            .take_while(|(_, c)| is_word_char(*c) || "*/^-µμ".contains(*c))
            .last()
            .map(|(i, _)| i)?;
        let unit = &head[unit_start..];
        let before_unit = head[..unit_start].trim_end();
        let first_is_letter = unit.chars().next().is_some_and(|c| !c.is_ascii_digit());
        if first_is_letter && ends_with_number(before_unit) {
            return Some(None);
        }
        return None;
    }
    if ends_with_number(trimmed) {
        return Some(expected_dim(snap, before));
    }
    None
}

fn ends_with_number(s: &str) -> bool {
    let tail: String = s
        .chars()
        .rev()
        .take_while(|c| c.is_ascii_digit() || *c == '.' || *c == '_')
        .collect();
    tail.chars().any(|c| c.is_ascii_digit())
        && !s[..s.len() - tail.len()]
            .chars()
            .next_back()
            .is_some_and(is_word_char)
}

/// The dimension the statement around the cursor expects of its value.
fn expected_dim(snap: &Snapshot, before: &str) -> Option<Dim> {
    let lexed = lex(before);
    let toks: Vec<&Token<'_>> = lexed.tokens.iter().map(|(t, _)| t).collect();
    let start = toks.iter().rposition(|t| starts_statement(t))?;
    let stmt = &toks[start..];
    // Past the `=`?
    let after_eq = stmt.iter().any(|t| matches!(t, Token::Eq));
    let node_kind = |name: &str| {
        snap.symbols
            .defs
            .iter()
            .find(|d| d.name == name && d.kind.is_node())
            .map(|d| d.kind)
    };
    let rotational = stmt.iter().any(|t| match t {
        Token::Ident(n) => node_kind(n) == Some(DefKind::Inertia),
        _ => false,
    });
    match stmt[0] {
        Token::Mass if after_eq => Some(Dim::MASS),
        Token::Inertia if after_eq => Some(Dim::INERTIA),
        Token::Spring if after_eq => Some(if rotational {
            Dim::ROTATIONAL_STIFFNESS
        } else {
            Dim::STIFFNESS
        }),
        Token::Damper if after_eq => Some(if rotational {
            Dim::ROTATIONAL_DAMPING
        } else {
            Dim::DAMPING
        }),
        Token::Force | Token::Torque | Token::Motion
            if stmt.iter().any(|t| matches!(t, Token::At)) =>
        {
            Some(Dim::FREQUENCY)
        }
        Token::Force if after_eq => Some(Dim::FORCE),
        Token::Gravity => Some(Dim::ACCELERATION),
        Token::Require => match stmt.get(1) {
            Some(Token::Ident("frequency")) => Some(Dim::FREQUENCY),
            Some(Token::Ident("sag" | "amplitude")) => Some(Dim::LENGTH),
            Some(Token::Ident("settling")) => Some(Dim::TIME),
            _ => None,
        },
        _ => None,
    }
}

fn unit_items(dim: Option<Dim>) -> Vec<CompletionItem> {
    let list: Vec<&str> = match dim {
        Some(d) => {
            let l = units::units_with_dim(d);
            if l.is_empty() {
                units::common_atoms().collect()
            } else {
                l
            }
        }
        None => units::common_atoms().collect(),
    };
    let mut seen = std::collections::HashSet::new();
    list.into_iter()
        .filter(|u| seen.insert(*u))
        .enumerate()
        .map(|(i, u)| {
            let detail = match units::describe_atom(u) {
                Some(info) => info.meaning,
                None => dim.map_or_else(|| "unit".to_string(), |d| d.describe()),
            };
            CompletionItem {
                // Most usual first, as the registry orders them.
                sort_text: Some(format!("{i:04}")),
                ..item(u, CompletionItemKind::UNIT, &detail)
            }
        })
        .collect()
}
