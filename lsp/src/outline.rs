//! Document symbols (systems → their statements) and folding ranges (system bodies, runs of
//! comments) and selection ranges.

use sprung_syntax::ast::{Expr, Item};
use tower_lsp_server::ls_types::{
    DocumentSymbol, FoldingRange, FoldingRangeKind, SelectionRange, SymbolInformation, SymbolKind,
};

use crate::snapshot::Snapshot;
use crate::symbols::DefKind;

fn symbol_kind(k: DefKind) -> SymbolKind {
    match k {
        DefKind::System => SymbolKind::MODULE,
        DefKind::Let => SymbolKind::CONSTANT,
        DefKind::Mass | DefKind::Inertia => SymbolKind::OBJECT,
        DefKind::Spring | DefKind::Damper => SymbolKind::FIELD,
        DefKind::Force | DefKind::Torque | DefKind::Motion => SymbolKind::EVENT,
    }
}

#[allow(deprecated)] // `DocumentSymbol::deprecated` must still be given.
fn symbol(
    snap: &Snapshot,
    d: &crate::symbols::Def,
    children: Option<Vec<DocumentSymbol>>,
) -> DocumentSymbol {
    DocumentSymbol {
        name: d.name.clone(),
        detail: Some(d.kind.word().to_string()),
        kind: symbol_kind(d.kind),
        tags: None,
        deprecated: None,
        range: snap.range(d.span),
        selection_range: snap.range(d.name_span),
        children,
    }
}

pub fn document_symbols(snap: &Snapshot) -> Vec<DocumentSymbol> {
    let ix = &snap.symbols;
    let mut out = Vec::new();
    let mut system = 0usize;
    for d in &ix.defs {
        match (d.kind, d.system) {
            (DefKind::System, _) => {
                let children: Vec<DocumentSymbol> = ix
                    .defs
                    .iter()
                    .filter(|c| c.system == Some(system))
                    .map(|c| symbol(snap, c, None))
                    .collect();
                out.push(symbol(snap, d, Some(children)));
                system += 1;
            }
            (_, None) => out.push(symbol(snap, d, None)),
            _ => {}
        }
    }
    out.sort_by_key(|s| (s.range.start.line, s.range.start.character));
    out
}

pub fn folding_ranges(snap: &Snapshot) -> Vec<FoldingRange> {
    let mut out = Vec::new();
    for item in &snap.checked.parse.file.items {
        if let Item::System(s) = item {
            let body = s.body_span.unwrap_or(s.span);
            let (a, b) = (snap.position(body.start), snap.position(body.end));
            if b.line > a.line {
                out.push(FoldingRange {
                    start_line: a.line,
                    start_character: None,
                    end_line: b.line.saturating_sub(1).max(a.line),
                    end_character: None,
                    kind: Some(FoldingRangeKind::Region),
                    collapsed_text: None,
                });
            }
        }
    }
    // Runs of comment lines (two or more).
    let mut run: Option<(u32, u32)> = None;
    let flush = |run: &mut Option<(u32, u32)>, out: &mut Vec<FoldingRange>| {
        if let Some((a, b)) = run.take()
            && b > a
        {
            out.push(FoldingRange {
                start_line: a,
                start_character: None,
                end_line: b,
                end_character: None,
                kind: Some(FoldingRangeKind::Comment),
                collapsed_text: None,
            });
        }
    };
    for c in &snap.checked.parse.file.comments {
        let line = snap.position(c.span.start).line;
        let own_line = snap.text[..c.span.start.min(snap.text.len())]
            .rsplit('\n')
            .next()
            .is_some_and(|before| before.trim().is_empty());
        match run {
            Some((a, b)) if own_line && line == b + 1 => run = Some((a, line)),
            _ => {
                flush(&mut run, &mut out);
                if own_line {
                    run = Some((line, line));
                }
            }
        }
    }
    flush(&mut run, &mut out);
    out.sort_by_key(|f| f.start_line);
    out
}

/// Selection ranges: from the innermost expression around the cursor out to its statement, the
/// system body, the system and the file.
pub fn selection_range(
    snap: &Snapshot,
    pos: tower_lsp_server::ls_types::Position,
) -> SelectionRange {
    let offset = snap.offset(pos);
    let mut spans: Vec<sprung_syntax::Span> = vec![sprung_syntax::Span::new(0, snap.text.len())];
    for item in &snap.checked.parse.file.items {
        if !item.span().contains(offset) {
            continue;
        }
        spans.push(item.span());
        let mut exprs: Vec<&Expr> = Vec::new();
        match item {
            Item::Let(l) => {
                spans.push(l.value.span);
                l.value.push_exprs(&mut exprs);
            }
            Item::System(s) => {
                if let Some(b) = s.body_span {
                    spans.push(b);
                }
                for st in s.statements.iter().filter(|st| st.span.contains(offset)) {
                    spans.push(st.span);
                    st.kind.push_exprs(&mut exprs);
                }
            }
            Item::Use(_) => {}
        }
        // Expressions containing the cursor, outermost first (each child inside its parent).
        while let Some(e) = exprs.pop() {
            if !e.span.contains(offset) {
                continue;
            }
            spans.push(e.span);
            use sprung_syntax::ast::ExprKind;
            match &e.kind {
                ExprKind::Neg(a) | ExprKind::Paren(a) => exprs.push(a),
                ExprKind::Binary { lhs, rhs, .. } => {
                    exprs.push(lhs);
                    exprs.push(rhs);
                }
                ExprKind::Call { args, .. } => exprs.extend(args.iter()),
                _ => {}
            }
        }
    }
    if let Some(t) = snap.symbols.at(offset) {
        spans.push(match t {
            crate::symbols::Target::Def(d) => snap.symbols.defs[d].name_span,
            crate::symbols::Target::Ref(r) => snap.symbols.refs[r].span,
        });
    }
    // Outermost first; keep each span only if it lies inside the previous one.
    spans.sort_by_key(|s| (std::cmp::Reverse(s.len()), s.start));
    spans.dedup();
    let mut chain: Option<SelectionRange> = None;
    let mut last: Option<sprung_syntax::Span> = None;
    for s in spans {
        if last.is_some_and(|l| !(l.start <= s.start && s.end <= l.end)) {
            continue;
        }
        last = Some(s);
        chain = Some(SelectionRange {
            range: snap.range(s),
            parent: chain.map(Box::new),
        });
    }
    chain.unwrap_or(SelectionRange {
        range: snap.range(sprung_syntax::Span::at(offset)),
        parent: None,
    })
}

/// Workspace symbols of one document whose name contains `query` (any case).
#[allow(deprecated)] // `SymbolInformation::deprecated` must still be given.
pub fn workspace_symbols(
    snap: &Snapshot,
    uri: &tower_lsp_server::ls_types::Uri,
    query: &str,
) -> Vec<SymbolInformation> {
    let q = query.to_lowercase();
    let systems: Vec<&str> = snap
        .symbols
        .defs
        .iter()
        .filter(|d| d.kind == DefKind::System)
        .map(|d| d.name.as_str())
        .collect();
    snap.symbols
        .defs
        .iter()
        .filter(|d| d.name.to_lowercase().contains(&q))
        .map(|d| SymbolInformation {
            name: d.name.clone(),
            kind: symbol_kind(d.kind),
            tags: None,
            deprecated: None,
            location: tower_lsp_server::ls_types::Location::new(
                uri.clone(),
                snap.range(d.name_span),
            ),
            container_name: d.system.and_then(|s| systems.get(s)).map(|s| s.to_string()),
        })
        .collect()
}
