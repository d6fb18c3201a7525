//! Go to definition, references, document highlights and rename, over the name index.

use sprung_engine::check::FUNCTIONS;
use sprung_syntax::lexer::{CONTEXTUAL_WORDS, KEYWORDS};
use tower_lsp_server::ls_types::{
    DocumentHighlight, DocumentHighlightKind, Position, PrepareRenameResponse, Range, TextEdit,
};

use crate::snapshot::Snapshot;
use crate::symbols::Target;

/// Whether a name may not be taken: keywords, contextual words, functions and the constant `pi`.
fn reserved(name: &str) -> bool {
    KEYWORDS.contains(&name)
        || CONTEXTUAL_WORDS.contains(&name)
        || FUNCTIONS.contains(&name)
        || name == "pi"
}

pub fn definition(snap: &Snapshot, pos: Position) -> Option<Range> {
    let t = snap.symbols.at(snap.offset(pos))?;
    let d = &snap.symbols.defs[snap.symbols.def_of(t)];
    Some(snap.range(d.name_span))
}

pub fn references(snap: &Snapshot, pos: Position, include_declaration: bool) -> Option<Vec<Range>> {
    let t = snap.symbols.at(snap.offset(pos))?;
    let def = snap.symbols.def_of(t);
    let mut out = Vec::new();
    if include_declaration {
        out.push(snap.range(snap.symbols.defs[def].name_span));
    }
    out.extend(snap.symbols.uses(def).map(|r| snap.range(r.span)));
    Some(out)
}

pub fn highlights(snap: &Snapshot, pos: Position) -> Option<Vec<DocumentHighlight>> {
    let t = snap.symbols.at(snap.offset(pos))?;
    let def = snap.symbols.def_of(t);
    let mut out = vec![DocumentHighlight {
        range: snap.range(snap.symbols.defs[def].name_span),
        kind: Some(DocumentHighlightKind::WRITE),
    }];
    out.extend(snap.symbols.uses(def).map(|r| DocumentHighlight {
        range: snap.range(r.span),
        kind: Some(DocumentHighlightKind::READ),
    }));
    Some(out)
}

/// The name under the cursor, when it can be renamed. Keywords, units and functions are not
/// names, so they are never offered.
pub fn prepare_rename(snap: &Snapshot, pos: Position) -> Option<PrepareRenameResponse> {
    let t = snap.symbols.at(snap.offset(pos))?;
    let span = match t {
        Target::Def(d) => snap.symbols.defs[d].name_span,
        Target::Ref(r) => snap.symbols.refs[r].span,
    };
    Some(PrepareRenameResponse::RangeWithPlaceholder {
        range: snap.range(span),
        placeholder: snap.text.get(span.range())?.to_string(),
    })
}

fn valid_name(name: &str) -> bool {
    let mut chars = name.chars();
    chars
        .next()
        .is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

/// The edits renaming the name under the cursor; `Err` says why the new name is refused.
pub fn rename(
    snap: &Snapshot,
    pos: Position,
    new_name: &str,
) -> Result<Option<Vec<TextEdit>>, String> {
    let Some(t) = snap.symbols.at(snap.offset(pos)) else {
        return Ok(None);
    };
    if !valid_name(new_name) {
        return Err(format!(
            "`{new_name}` is not a name: use letters, digits and `_`, not starting with a digit"
        ));
    }
    if reserved(new_name) {
        return Err(format!("`{new_name}` is a reserved word of the language"));
    }
    let def = snap.symbols.def_of(t);
    let d = &snap.symbols.defs[def];
    let clash = snap.symbols.defs.iter().enumerate().any(|(i, o)| {
        i != def
            && o.name == new_name
            && (o.system == d.system || o.system.is_none() || d.system.is_none())
    });
    if clash {
        return Err(format!(
            "`{new_name}` is already defined where `{}` is visible",
            d.name
        ));
    }
    let mut edits = vec![TextEdit::new(snap.range(d.name_span), new_name.to_string())];
    edits.extend(
        snap.symbols
            .uses(def)
            .map(|r| TextEdit::new(snap.range(r.span), new_name.to_string())),
    );
    Ok(Some(edits))
}
