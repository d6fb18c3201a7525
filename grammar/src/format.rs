//! The formatter: one canonical layout for `.sprung` text (language.md §1: "the formatter
//! writes one statement per line").
//!
//! # What it writes
//!
//! - One item or statement per line; 2-space indent inside `system NAME ["Title"] {`, with `{`
//!   on the header line and `}` alone on its line.
//! - Operators spaced (`a * b`, `x + y`, `= `, `± `, `..`, comparisons), units tight after one
//!   space (`140 kN/m`, `0.4 g*mm`, `kg*m^2`), `%` tight (`25%`), calls tight (`sqrt(k * m)`),
//!   `, ` between arguments, unary minus tight (`-2 N*s/m`, `x^-2`).
//! - `^` tight (`rotor_speed^2`, as language.md writes it), except after a unit: `2 kg ^ 2`
//!   stays spaced, because `2 kg^2` would read as the unit kg² (language.md §3: spaces end a
//!   unit).
//! - `·` becomes `*`, in units and between values; `+-` becomes `±`, the spelling language.md
//!   uses throughout. Both pairs are the same token to the lexer, so nothing else changes.
//! - Number literals (`1_000`, `.5`, `2.5E6`), names, strings and comments as written.
//!   Parentheses are kept exactly as written: the formatter never adds or drops one, so it can
//!   never change how an expression groups.
//! - Comments are all kept, in order, each between the same two tokens as before. A comment
//!   on a line of its own stays on a line of its own (indented like what follows it); a
//!   comment after code stays after that code, one space from it. A comment inside a
//!   statement ends the line there, and the statement goes on on the next line, indented four
//!   more spaces: moving the comment would change what the lexer reads (a comment between a
//!   number and a name is what keeps the name from being read as the number's unit), and a
//!   `##` line moved above a statement would become its doc. Comments between a system
//!   header and its `{` follow the `{`. Trailing spaces of comments are dropped.
//! - Blank lines the user put between statements, items or comments are kept, collapsed to
//!   one; none after `{`, before `}` or inside a statement. The file ends with one newline; an
//!   empty file stays empty. A leading byte-order mark is kept.
//! - Line endings: those of the input (`\r\n` when its first line ends so), unless
//!   [`FormatConfig::line_ending`] says otherwise.
//!
//! `=` signs are not aligned within a block: aligning makes one renamed statement re-indent
//! its neighbours, so diffs would show lines nobody changed. Long statements are not wrapped
//! either; a statement is one line (a formatter that wraps must choose break points, and every
//! choice moves when a value changes length).
//!
//! # Safety
//!
//! A text with any parse error is refused ([`FormatError::Syntax`], with the located errors),
//! never half-formatted. The layout is decided token by token from the lexer's own tokens and
//! the syntax tree's spans, and every result is checked before it is returned: the output is
//! parsed again and its tree (without spans, with doc comments) and its comments must equal
//! the input's, or the result is refused with [`FormatError::Unsafe`] instead. Formatting is
//! idempotent (tested on every example and fixture, and by a property test over mutated
//! examples).

use std::collections::HashSet;
use std::fmt;

use crate::ast::{
    Comparison, Drive, Expr, ExprKind, Item, Let, StatementKind, Subject, System, Value,
};
use crate::lexer::{Token, lex};
use crate::parser::{Parse, ParseError, dump, parse};
use crate::span::Span;

/// Which line endings the formatter writes.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum LineEnding {
    /// The input's: `\r\n` when its first line ends with `\r\n`, else `\n`.
    #[default]
    Keep,
    Lf,
    CrLf,
}

/// Settings of the formatter. The layout itself has no settings: one canonical form.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct FormatConfig {
    pub line_ending: LineEnding,
}

/// Why a text was not formatted. The text is then to be left as it is.
#[derive(Clone, Debug, PartialEq)]
pub enum FormatError {
    /// The text does not parse. Every parse error, ordered by position (never empty).
    Syntax(Vec<ParseError>),
    /// The formatter's own check found that its output would not read as the input does. This
    /// is a bug of the formatter; the text is refused rather than changed.
    Unsafe { span: Span, message: String },
}

impl FormatError {
    /// Where the (first) problem is, as a byte span of the input.
    pub fn span(&self) -> Span {
        match self {
            FormatError::Syntax(errors) => errors.first().map_or(Span::at(0), |e| e.span),
            FormatError::Unsafe { span, .. } => *span,
        }
    }
}

impl fmt::Display for FormatError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FormatError::Syntax(errors) => {
                let n = errors.len();
                match errors.first() {
                    Some(first) if n == 1 => write!(f, "not formatted: {}", first.message),
                    Some(first) => write!(
                        f,
                        "not formatted: {n} syntax errors, the first: {}",
                        first.message
                    ),
                    None => f.write_str("not formatted: the text does not parse"),
                }
            }
            FormatError::Unsafe { message, .. } => write!(f, "not formatted: {message}"),
        }
    }
}

impl std::error::Error for FormatError {}

/// Formats a whole file. Returns the canonical text (equal to `text` when it is formatted
/// already).
pub fn format(text: &str, cfg: &FormatConfig) -> Result<String, FormatError> {
    let parsed = parse(text);
    if !parsed.errors.is_empty() {
        return Err(FormatError::Syntax(parsed.errors));
    }
    let layout = Layout::new(text, &parsed);
    let body = layout.render(&layout.order, 0);
    let newline = line_ending(text, cfg);
    let mut out = String::with_capacity(text.len() + text.len() / 8);
    if !body.is_empty() {
        if text.starts_with('\u{FEFF}') {
            out.push('\u{FEFF}');
        }
        out.push_str(&with_newlines(&body, newline));
        out.push_str(newline);
    }
    verify(text, &out)?;
    Ok(out)
}

/// Formats only the items or statements that overlap `range` (a byte span of `text`; an empty
/// span formats the statement it touches). Returns the edits to apply to `text`: none when
/// that part is formatted already, else one edit replacing whole lines. Whole lines are
/// always taken, so a statement that shares a line with a selected one is formatted with it,
/// and a range that touches a system's header or braces formats the whole system.
pub fn format_range(
    text: &str,
    range: Span,
    cfg: &FormatConfig,
) -> Result<Vec<(Span, String)>, FormatError> {
    let parsed = parse(text);
    if !parsed.errors.is_empty() {
        return Err(FormatError::Syntax(parsed.errors));
    }
    let range = Span::new(range.start.min(text.len()), range.end.min(text.len()));
    let range = Span::new(range.start.min(range.end), range.end);
    let Some((region, depth)) = region_for(text, &parsed, range) else {
        return Ok(Vec::new());
    };
    let layout = Layout::new(text, &parsed);
    let picked: Vec<usize> = layout
        .order
        .iter()
        .copied()
        .filter(|&i| {
            let s = layout.tokens[i].span;
            s.start >= region.start && s.end <= region.end
        })
        .collect();
    let replacement = with_newlines(&layout.render(&picked, depth), line_ending(text, cfg));
    if text.get(region.range()) == Some(replacement.as_str()) {
        return Ok(Vec::new());
    }
    let mut edited = String::with_capacity(text.len() + replacement.len());
    edited.push_str(&text[..region.start]);
    edited.push_str(&replacement);
    edited.push_str(&text[region.end..]);
    verify(text, &edited)?;
    Ok(vec![(region, replacement)])
}

fn line_ending(text: &str, cfg: &FormatConfig) -> &'static str {
    match cfg.line_ending {
        LineEnding::Lf => "\n",
        LineEnding::CrLf => "\r\n",
        LineEnding::Keep => match text.find('\n') {
            Some(i) if i > 0 && text.as_bytes()[i - 1] == b'\r' => "\r\n",
            _ => "\n",
        },
    }
}

fn with_newlines(body: &str, newline: &str) -> String {
    if newline == "\n" {
        body.to_string()
    } else {
        body.replace('\n', newline)
    }
}

/// What a significant token is to the layout.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Role {
    /// The first token of an item (depth 0) or of a statement (depth 1).
    Start(usize),
    /// The `{` of a system body.
    Open,
    /// The `}` of a system body.
    Close,
    /// Any other token of an item or statement.
    Inner,
    Comment,
}

struct Tk<'s> {
    tok: Token<'s>,
    span: Span,
    role: Role,
    /// Line breaks between the token before it (in the text) and this one.
    newlines: usize,
    /// Whether only blanks stand before it on its line.
    own_line: bool,
}

struct Layout<'s> {
    tokens: Vec<Tk<'s>>,
    /// Token indices in output order: as in the text, except that a system's `{` is moved
    /// before the comments between its header and it.
    order: Vec<usize>,
    /// Offsets of the `-` tokens that are unary minus.
    unary: HashSet<usize>,
    /// Offsets of the names that are called (`sqrt` in `sqrt(x)`).
    calls: HashSet<usize>,
}

impl<'s> Layout<'s> {
    fn new(text: &'s str, parsed: &Parse) -> Layout<'s> {
        let mut starts: Vec<(usize, Role)> = Vec::new();
        let mut roots: Vec<&Expr> = Vec::new();
        for item in &parsed.file.items {
            match item {
                Item::Let(l) => {
                    starts.push((l.span.start, Role::Start(0)));
                    let_roots(l, &mut roots);
                }
                Item::Use(u) => starts.push((u.span.start, Role::Start(0))),
                Item::System(s) => system_roles(s, &mut starts, &mut roots),
            }
        }
        starts.sort_by_key(|(offset, _)| *offset);

        let (unary, calls) = expression_marks(&roots);

        let lexed = lex(text);
        let mut tokens = Vec::with_capacity(lexed.tokens.len());
        let mut prev_end = 0;
        for (k, (tok, span)) in lexed.tokens.into_iter().enumerate() {
            let role = if matches!(tok, Token::Comment(_)) {
                Role::Comment
            } else {
                match starts.binary_search_by_key(&span.start, |(o, _)| *o) {
                    Ok(k) => starts[k].1,
                    Err(_) => Role::Inner,
                }
            };
            // Only whitespace stands between two tokens, so a token starts its line exactly
            // when a line break comes before it (or it is the first). Counted on the gap, not
            // by looking back along the line, which would be quadratic on one long line.
            let gap = text.get(prev_end..span.start).unwrap_or("");
            let newlines = gap.matches('\n').count();
            tokens.push(Tk {
                tok,
                span,
                role,
                newlines,
                own_line: newlines > 0 || k == 0,
            });
            prev_end = span.end;
        }

        let mut order: Vec<usize> = (0..tokens.len()).collect();
        for k in 0..order.len() {
            if tokens[order[k]].role != Role::Open {
                continue;
            }
            let mut j = k;
            while j > 0 && tokens[order[j - 1]].role == Role::Comment {
                order.swap(j - 1, j);
                j -= 1;
            }
        }
        Layout {
            tokens,
            order,
            unary,
            calls,
        }
    }

    /// Lays out the tokens `picked` (indices in output order), starting at block depth
    /// `depth`. Lines are joined with `\n`; there is no newline after the last.
    fn render(&self, picked: &[usize], depth: usize) -> String {
        let mut out = String::new();
        let mut depth = depth;
        // The last token written was a `{`: no blank line may follow it.
        let mut after_open = false;
        // A comment ended the line: the next token starts a new one.
        let mut line_ended = false;
        // The line so far ends with a comment.
        let mut comment_ended = false;
        let mut prev: Option<&Tk<'_>> = None;
        let mut caret_spaced = false;
        // For each picked token, whether the next significant token after it is inside a
        // statement (one backward pass, so runs of comments cost no more than one each).
        let mut next_inner = vec![false; picked.len()];
        let mut seen_inner = false;
        for (k, &i) in picked.iter().enumerate().rev() {
            next_inner[k] = seen_inner;
            let role = self.tokens[i].role;
            if role != Role::Comment {
                seen_inner = role == Role::Inner;
            }
        }
        for (k, &i) in picked.iter().enumerate() {
            let t = &self.tokens[i];
            let blank = t.newlines >= 2 && !out.is_empty() && !after_open;
            match t.role {
                Role::Comment => {
                    let Token::Comment(body) = t.tok else {
                        continue;
                    };
                    // A comment after a comment (the first moved behind a `{`) cannot share
                    // its line.
                    if t.own_line || out.is_empty() || comment_ended {
                        let (indent, blank) = if next_inner[k] {
                            (depth * 2 + 4, false)
                        } else {
                            (depth * 2, blank)
                        };
                        new_line(&mut out, blank, indent);
                    } else {
                        out.push(' ');
                    }
                    out.push_str(body.trim_end());
                    if t.own_line {
                        after_open = false;
                    }
                    line_ended = true;
                    comment_ended = true;
                    continue;
                }
                Role::Start(d) => {
                    depth = d;
                    new_line(&mut out, blank, depth * 2);
                    self.write_token(&mut out, t);
                    line_ended = false;
                    after_open = false;
                    prev = Some(t);
                }
                Role::Open => {
                    if line_ended || out.is_empty() {
                        new_line(&mut out, false, depth * 2);
                        out.push('{');
                    } else {
                        out.push_str(" {");
                    }
                    depth += 1;
                    line_ended = true;
                    after_open = true;
                    prev = None;
                }
                Role::Close => {
                    depth = depth.saturating_sub(1);
                    new_line(&mut out, false, depth * 2);
                    out.push('}');
                    line_ended = true;
                    after_open = false;
                    prev = None;
                }
                Role::Inner => {
                    if line_ended || out.is_empty() {
                        new_line(&mut out, false, depth * 2 + 4);
                    } else if let Some(p) = prev {
                        let spaced = self.spaced(p, t, caret_spaced);
                        if matches!(t.tok, Token::Caret) {
                            caret_spaced = spaced;
                        }
                        if spaced {
                            out.push(' ');
                        }
                    }
                    self.write_token(&mut out, t);
                    line_ended = false;
                    after_open = false;
                    prev = Some(t);
                }
            }
            comment_ended = false;
        }
        out
    }

    /// Whether one space goes between two tokens of a statement written on one line.
    fn spaced(&self, prev: &Tk<'_>, cur: &Tk<'_>, caret_spaced: bool) -> bool {
        match (&prev.tok, &cur.tok) {
            (_, Token::Comma | Token::RParen | Token::Percent) => false,
            (Token::LParen, _) => false,
            (Token::Ident(_), Token::LParen) => !self.calls.contains(&prev.span.start),
            (Token::Minus, _) if self.unary.contains(&prev.span.start) => false,
            // `2 kg ^ 2` must not become `2 kg^2`, the unit kg².
            (Token::Unit(_), Token::Caret) => true,
            (_, Token::Caret) => false,
            (Token::Caret, _) => caret_spaced,
            _ => true,
        }
    }

    fn write_token(&self, out: &mut String, t: &Tk<'_>) {
        match &t.tok {
            Token::Ident(s)
            | Token::MicroAtom(s)
            | Token::Number(s)
            | Token::Str(s)
            | Token::UnterminatedStr(s)
            | Token::Error(s) => out.push_str(s),
            Token::Unit(u) => out.push_str(&u.text()),
            Token::Comment(s) => out.push_str(s.trim_end()),
            Token::Dot => out.push('*'),
            other => out.push_str(other.keyword_text().unwrap_or("")),
        }
    }
}

fn new_line(out: &mut String, blank: bool, indent: usize) {
    if !out.is_empty() {
        out.push('\n');
        if blank {
            out.push('\n');
        }
    }
    for _ in 0..indent {
        out.push(' ');
    }
}

fn let_roots<'a>(l: &'a Let, roots: &mut Vec<&'a Expr>) {
    value_roots(&l.value, roots);
}

fn value_roots<'a>(v: &'a Value, roots: &mut Vec<&'a Expr>) {
    roots.push(&v.expr);
    if let Some(t) = &v.tolerance {
        roots.push(t);
    }
}

fn system_roles<'a>(s: &'a System, starts: &mut Vec<(usize, Role)>, roots: &mut Vec<&'a Expr>) {
    starts.push((s.span.start, Role::Start(0)));
    if let Some(body) = s.body_span {
        starts.push((body.start, Role::Open));
        // With no parse error, every body is closed by its `}` (one byte).
        starts.push((body.end.saturating_sub(1), Role::Close));
    }
    for st in &s.statements {
        starts.push((st.span.start, Role::Start(1)));
        match &st.kind {
            StatementKind::Let(l) => let_roots(l, roots),
            StatementKind::Node { value, .. }
            | StatementKind::Element { value, .. }
            | StatementKind::Gravity { value } => value_roots(value, roots),
            StatementKind::Drive { drive, .. } => match drive {
                Drive::Harmonic {
                    amplitude,
                    frequency,
                } => {
                    value_roots(amplitude, roots);
                    value_roots(frequency, roots);
                }
                Drive::Band {
                    amplitude,
                    from,
                    to,
                } => {
                    value_roots(amplitude, roots);
                    roots.push(from);
                    roots.push(to);
                }
                Drive::Step(v) | Drive::Impulse(v) => value_roots(v, roots),
            },
            StatementKind::Initial {
                displacement,
                velocity,
                ..
            } => {
                value_roots(displacement, roots);
                if let Some(v) = velocity {
                    value_roots(v, roots);
                }
            }
            StatementKind::Require(r) => {
                if let Subject::Settling {
                    within: Some(w), ..
                } = &r.subject
                {
                    roots.push(w);
                }
                match &r.comparison {
                    Comparison::Compare { rhs, .. } => roots.push(rhs),
                    Comparison::In { lo, hi } | Comparison::Outside { lo, hi } => {
                        roots.push(lo);
                        roots.push(hi);
                    }
                    Comparison::Is { .. } => {}
                }
            }
        }
    }
}

/// The offsets of unary minus signs and of called names, by an explicit-stack walk (trees
/// are bounded by the parser's depth limit, but a stack costs nothing here).
fn expression_marks(roots: &[&Expr]) -> (HashSet<usize>, HashSet<usize>) {
    let mut unary = HashSet::new();
    let mut calls = HashSet::new();
    let mut stack: Vec<&Expr> = roots.to_vec();
    while let Some(e) = stack.pop() {
        match &e.kind {
            ExprKind::Neg(inner) => {
                unary.insert(e.span.start);
                stack.push(inner);
            }
            ExprKind::Binary { lhs, rhs, .. } => {
                stack.push(lhs);
                stack.push(rhs);
            }
            ExprKind::Call { func, args } => {
                calls.insert(func.span.start);
                stack.extend(args.iter());
            }
            ExprKind::Paren(inner) => stack.push(inner),
            ExprKind::Number { .. } | ExprKind::Name(_) | ExprKind::Error => {}
        }
    }
    (unary, calls)
}

/// The byte region to replace for a range format, and the block depth it starts at.
fn region_for(text: &str, parsed: &Parse, range: Span) -> Option<(Span, usize)> {
    let touches = |s: Span| s.start <= range.end && range.start <= s.end;
    let items = &parsed.file.items;
    let first = items.iter().position(|i| touches(i.span()))?;
    let last = items.iter().rposition(|i| touches(i.span()))?;

    // Inside one system's body, away from its header and braces: only statements.
    if first == last
        && let Item::System(sys) = &items[first]
        && let Some(body) = sys.body_span
        && range.start > body.start
        && range.end < body.end.saturating_sub(1)
    {
        let stmts: Vec<Span> = sys.statements.iter().map(|s| s.span).collect();
        let open = body.start;
        let close = body.end.saturating_sub(1);
        if let Some(region) = grow(text, &stmts, range, |r| r.start <= open || r.end > close) {
            return Some((region, 1));
        }
        // The lines reach the header or a brace: the whole system.
    }
    let spans: Vec<Span> = items.iter().map(Item::span).collect();
    let covered = spans[first].cover(spans[last]);
    grow(text, &spans, covered, |_| false).map(|r| (r, 0))
}

/// Grows `range` to whole lines and to every unit (item or statement) on those lines, until
/// it stops growing. `None` when no unit is touched or the region `escapes`.
fn grow(text: &str, units: &[Span], range: Span, escapes: impl Fn(Span) -> bool) -> Option<Span> {
    let touches = |s: Span, r: Span| s.start <= r.end && r.start <= s.end;
    let mut first = units.iter().position(|u| touches(*u, range))?;
    let mut last = units.iter().rposition(|u| touches(*u, range))?;
    // Units are in order and do not overlap, so growing one unit at a time at either end is
    // linear overall.
    loop {
        let region = Span::new(
            line_start(text, units[first].start),
            line_end(text, units[last].end),
        );
        if escapes(region) {
            return None;
        }
        let mut grew = false;
        while first > 0 && units[first - 1].end > region.start {
            first -= 1;
            grew = true;
        }
        while last + 1 < units.len() && units[last + 1].start < region.end {
            last += 1;
            grew = true;
        }
        if !grew {
            return Some(region);
        }
    }
}

fn line_start(text: &str, offset: usize) -> usize {
    text.get(..offset)
        .and_then(|b| b.rfind('\n'))
        .map_or(0, |i| i + 1)
}

/// The end of the line holding `offset`, before its `\n` or `\r\n`.
fn line_end(text: &str, offset: usize) -> usize {
    let rest = text.get(offset..).unwrap_or("");
    let end = offset + rest.find('\n').unwrap_or(rest.len());
    if end > offset && text.as_bytes().get(end - 1) == Some(&b'\r') {
        end - 1
    } else {
        end
    }
}

/// Checks that `after` reads exactly as `before`: it parses, and its tree (without spans,
/// docs included) and its comments are the same. Trailing blanks of lines and line endings do
/// not count; the formatter changes those on purpose.
fn verify(before: &str, after: &str) -> Result<(), FormatError> {
    let old = parse(&normalize(before));
    let new = parse(&normalize(after));
    if let Some(e) = new.errors.first() {
        return Err(FormatError::Unsafe {
            span: Span::at(0),
            message: format!(
                "the formatted text would not parse ({}); this is a formatter bug, the file is \
                 left as it is",
                e.message
            ),
        });
    }
    if shape(&old) != shape(&new) {
        return Err(FormatError::Unsafe {
            span: Span::at(0),
            message: "the formatted text would not read as the original does; this is a \
                      formatter bug, the file is left as it is"
                .to_string(),
        });
    }
    Ok(())
}

fn normalize(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for line in text.split('\n') {
        out.push_str(line.trim_end_matches([' ', '\t', '\r', '\u{c}']));
        out.push('\n');
    }
    out
}

/// The parse dump without its byte spans.
fn shape(parsed: &Parse) -> String {
    let dumped = dump(parsed);
    let mut out = String::with_capacity(dumped.len());
    let mut rest = dumped.as_str();
    while let Some(at) = rest.find('@') {
        out.push_str(&rest[..at]);
        let tail = &rest[at + 1..];
        let skip = tail
            .find(|c: char| !(c.is_ascii_digit() || c == '.'))
            .unwrap_or(tail.len());
        if skip == 0 {
            out.push('@');
        }
        rest = &tail[skip..];
    }
    out.push_str(rest);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fmt(text: &str) -> String {
        match format(text, &FormatConfig::default()) {
            Ok(s) => s,
            Err(e) => panic!("{e}"),
        }
    }

    #[test]
    fn spacing_of_operators_units_and_calls() {
        assert_eq!(
            fmt("let a=2 kg*m+3*sqrt( k*m )-(-x)^2"),
            "let a = 2 kg*m + 3 * sqrt(k * m) - (-x)^2\n"
        );
        assert_eq!(fmt("let a = 2 kg * m"), "let a = 2 kg * m\n");
        assert_eq!(fmt("let a = 2 kg ^2"), "let a = 2 kg ^ 2\n");
        assert_eq!(fmt("let a = x ^ - 2"), "let a = x^-2\n");
        assert_eq!(fmt("let a = 3 N·s/m · b"), "let a = 3 N*s/m * b\n");
        assert_eq!(fmt("let a = 4 +- 10 %"), "let a = 4 ± 10%\n");
        assert_eq!(fmt("let a = min(1,2 ,3)"), "let a = min(1, 2, 3)\n");
    }

    #[test]
    fn unit_and_range_keyword_in_stay_apart() {
        let text = "system s { require sag of base in 1 in..2 in\n\
                    require frequency of mode 1 in 5 Hz..8 Hz }";
        assert_eq!(
            fmt(text),
            "system s {\n  require sag of base in 1 in .. 2 in\n  \
             require frequency of mode 1 in 5 Hz .. 8 Hz\n}\n"
        );
    }

    #[test]
    fn spans_are_stripped_from_the_shape() {
        let p = parse("let a = 1");
        assert!(!shape(&p).contains("@0"));
        assert!(shape(&p).contains("(let a"));
    }

    #[test]
    fn crlf_is_kept() {
        assert_eq!(
            fmt("let a=1\r\n\r\n\r\nlet b=2  # c  \r\n"),
            "let a = 1\r\n\r\nlet b = 2 # c\r\n"
        );
    }
}
