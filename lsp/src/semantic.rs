//! Semantic tokens (full): keywords, numbers, units, comments, strings, and names by what they
//! name (systems, lets, masses, springs, dampers, drives), from the lexer and the name index.

use std::collections::HashMap;

use sprung_engine::check::FUNCTIONS;
use sprung_syntax::lexer::{CONTEXTUAL_WORDS, Token, lex};
use tower_lsp_server::ls_types::{
    SemanticToken, SemanticTokenModifier, SemanticTokenType, SemanticTokens, SemanticTokensEdit,
    SemanticTokensLegend,
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

/// The edits that turn the token set `old` into `new`, for `semanticTokens/full/delta`: one
/// edit replacing what lies between their common prefix and common suffix (empty when they are
/// equal). Offsets count integers, five per token, as the protocol's flat encoding does; a
/// token's encoding is relative to the one before it, so an edit that shifts lines changes only
/// the first token after it and the prefix/suffix stay long.
pub fn delta(old: &[SemanticToken], new: &[SemanticToken]) -> Vec<SemanticTokensEdit> {
    let prefix = old.iter().zip(new).take_while(|(a, b)| a == b).count();
    let suffix = old[prefix..]
        .iter()
        .rev()
        .zip(new[prefix..].iter().rev())
        .take_while(|(a, b)| a == b)
        .count();
    if prefix == old.len() && prefix == new.len() {
        return Vec::new();
    }
    let (old_mid, new_mid) = (
        &old[prefix..old.len() - suffix],
        &new[prefix..new.len() - suffix],
    );
    vec![SemanticTokensEdit {
        start: 5 * prefix as u32,
        delete_count: 5 * old_mid.len() as u32,
        data: (!new_mid.is_empty()).then(|| new_mid.to_vec()),
    }]
}

#[cfg(test)]
mod tests {
    use super::*;

    fn tok(delta_line: u32, delta_start: u32, length: u32) -> SemanticToken {
        SemanticToken {
            delta_line,
            delta_start,
            length,
            token_type: 0,
            token_modifiers_bitset: 0,
        }
    }

    /// The protocol's flat encoding: five integers per token.
    fn flat(tokens: &[SemanticToken]) -> Vec<u32> {
        tokens
            .iter()
            .flat_map(|t| {
                [
                    t.delta_line,
                    t.delta_start,
                    t.length,
                    t.token_type,
                    t.token_modifiers_bitset,
                ]
            })
            .collect()
    }

    /// Applies edits as a client does: on the flat integer array.
    fn apply(old: &[SemanticToken], edits: &[SemanticTokensEdit]) -> Vec<u32> {
        let mut flat_old = flat(old);
        for e in edits {
            let data = flat(e.data.as_deref().unwrap_or(&[]));
            let (s, n) = (e.start as usize, e.delete_count as usize);
            flat_old.splice(s..s + n, data);
        }
        flat_old
    }

    #[test]
    fn delta_applied_to_the_old_set_gives_the_new_one() {
        let a = [tok(0, 0, 3), tok(0, 4, 2), tok(1, 2, 5), tok(0, 6, 1)];
        let cases: Vec<Vec<SemanticToken>> = vec![
            a.to_vec(),
            vec![],
            vec![tok(0, 0, 3), tok(0, 4, 2), tok(2, 2, 5), tok(0, 6, 1)],
            vec![
                tok(0, 0, 3),
                tok(0, 4, 2),
                tok(0, 1, 1),
                tok(1, 2, 5),
                tok(0, 6, 1),
            ],
            vec![tok(0, 0, 3), tok(0, 6, 1)],
            vec![tok(5, 0, 1)],
            vec![
                tok(0, 0, 3),
                tok(0, 4, 2),
                tok(1, 2, 5),
                tok(0, 6, 1),
                tok(0, 6, 1),
            ],
        ];
        for new in &cases {
            let edits = delta(&a, new);
            let expect = flat(new);
            assert_eq!(apply(&a, &edits), expect, "{new:?}");
            assert!(edits.len() <= 1);
        }
        assert!(delta(&a, &a).is_empty());
        // A changed line in the middle touches one token, not the rest.
        let edits = delta(&a, &cases[2]);
        assert_eq!((edits[0].start, edits[0].delete_count), (10, 5));
    }
}
