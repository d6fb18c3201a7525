//! Semantic tokens (full): keywords, numbers, units, comments, strings, and names by what they
//! name (systems, lets, masses, springs, dampers, drives), from the lexer and the name index.

use std::collections::HashMap;

use sprung_engine::check::FUNCTIONS;
use sprung_syntax::lexer::{CONTEXTUAL_WORDS, Token, lex};
use tower_lsp_server::ls_types::{
    SemanticToken, SemanticTokenModifier, SemanticTokenType, SemanticTokens, SemanticTokensLegend,
};

use crate::snapshot::Snapshot;
use crate::symbols::DefKind;

const TYPES: &[&str] = &[
    "keyword",   // 0
    "number",    // 1
    "comment",   // 2
    "string",    // 3
    "namespace", // 4 system
    "variable",  // 5 let
    "mass",      // 6 mass or inertia
    "spring",    // 7
    "damper",    // 8
    "drive",     // 9 force, torque, motion
    "unit",      // 10
    "function",  // 11
    "operator",  // 12
];

pub fn legend() -> SemanticTokensLegend {
    SemanticTokensLegend {
        token_types: TYPES.iter().map(|t| SemanticTokenType::new(t)).collect(),
        token_modifiers: vec![
            SemanticTokenModifier::DECLARATION,
            SemanticTokenModifier::DOCUMENTATION,
        ],
    }
}

fn kind_type(k: DefKind) -> u32 {
    match k {
        DefKind::System => 4,
        DefKind::Let => 5,
        DefKind::Mass | DefKind::Inertia => 6,
        DefKind::Spring => 7,
        DefKind::Damper => 8,
        DefKind::Force | DefKind::Torque | DefKind::Motion => 9,
    }
}

pub fn tokens(snap: &Snapshot) -> SemanticTokens {
    let ix = &snap.symbols;
    let mut names: HashMap<usize, (u32, u32)> = HashMap::new();
    for d in &ix.defs {
        names.insert(d.name_span.start, (kind_type(d.kind), 1));
    }
    for r in &ix.refs {
        names.insert(r.span.start, (kind_type(ix.defs[r.def].kind), 0));
    }
    let lexed = lex(&snap.text);
    let mut raw: Vec<(usize, usize, u32, u32)> = Vec::new();
    let toks = &lexed.tokens;
    for (i, (tok, span)) in toks.iter().enumerate() {
        let (ty, modifiers) = match tok {
            Token::Number(_) => (1, 0),
            Token::Comment(_) => {
                let doc = snap
                    .text
                    .get(span.range())
                    .is_some_and(|t| t.starts_with("##"));
                (2, if doc { 2 } else { 0 })
            }
            Token::Str(_) | Token::UnterminatedStr(_) => (3, 0),
            Token::Unit(_) | Token::MicroAtom(_) => (10, 0),
            Token::Ident(name) => match names.get(&span.start) {
                Some(&(t, m)) => (t, m),
                None if FUNCTIONS.contains(name)
                    && matches!(toks.get(i + 1), Some((Token::LParen, _))) =>
                {
                    (11, 0)
                }
                None if CONTEXTUAL_WORDS.contains(name) => (0, 0),
                None => continue,
            },
            Token::PlusMinus => (12, 0),
            Token::Error(_) => continue,
            t if t
                .keyword_text()
                .is_some_and(|k| k.chars().all(|c| c.is_ascii_alphabetic())) =>
            {
                (0, 0)
            }
            _ => continue,
        };
        raw.push((span.start, span.end, ty, modifiers));
    }
    let mut data = Vec::with_capacity(raw.len());
    let (mut prev_line, mut prev_col) = (0u32, 0u32);
    for (start, end, ty, modifiers) in raw {
        let a = snap.position(start);
        let b = snap.position(end);
        if b.line != a.line || b.character <= a.character {
            continue; // tokens never span lines here; skip anything odd rather than mis-encode
        }
        let delta_line = a.line - prev_line;
        let delta_start = if delta_line == 0 {
            a.character - prev_col
        } else {
            a.character
        };
        data.push(SemanticToken {
            delta_line,
            delta_start,
            length: b.character - a.character,
            token_type: ty,
            token_modifiers_bitset: modifiers,
        });
        prev_line = a.line;
        prev_col = a.character;
    }
    SemanticTokens {
        result_id: None,
        data,
    }
}
