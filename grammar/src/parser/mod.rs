//! The parser: tokens in, a syntax tree and a list of errors out. It never fails.
//!
//! Two layers (see `grammar/sprung.ebnf` for the grammar itself):
//!
//! 1. A hand-written *splitter* walks the significant tokens. Every item and statement starts
//!    with a keyword, so it cuts the file into top-level items (`let`, `use`, `system`) and each
//!    system body into statements, and it owns block recovery: a body ends at its `}`, or
//!    implicitly at the next `system` or the end of the file (an [`ParseErrorKind::UnclosedBlock`]
//!    error), and a run of tokens that starts nothing is one [`ParseErrorKind::Syntax`] error.
//! 2. Each statement's tokens are parsed on their own with chumsky ([`grammar`]). A statement
//!    that does not parse gives one error and is left out of its system; the next statement is
//!    unaffected.
//!
//! Before a statement reaches chumsky its depth is measured ([`depth`]): anything nested deeper
//! than [`MAX_NESTING`] or building a tree deeper than [`MAX_EXPR_DEPTH`] is one
//! [`ParseErrorKind::TooDeep`] error and is skipped, so neither the parser nor any later tree
//! walk can run out of stack.

mod depth;
mod dump;
mod grammar;

use chumsky::error::{RichPattern, RichReason};
use chumsky::input::Input as _;
use chumsky::prelude::{Parser as _, SimpleSpan};

use crate::ast::{Comment, Doc, File, Ident, Item, Statement, System};
use crate::lexer::{Token, lex};
use crate::span::Span;

pub use depth::MAX_EXPR_DEPTH;
pub use dump::dump;
use grammar::{Grammar, Tok};

/// The deepest nesting of parentheses, unary minus runs and `^` chains a statement may have.
pub const MAX_NESTING: usize = 128;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ParseErrorKind {
    /// Text the lexer could not read (stray character, unterminated string, bad unit exponent).
    Lex,
    /// A statement or item that does not follow the grammar.
    Syntax,
    /// A system body whose `}` is missing.
    UnclosedBlock,
    /// Nesting deeper than [`MAX_NESTING`] (or an expression tree deeper than
    /// [`MAX_EXPR_DEPTH`]).
    TooDeep,
}

#[derive(Clone, Debug, PartialEq)]
pub struct ParseError {
    pub kind: ParseErrorKind,
    pub span: Span,
    pub message: String,
    pub help: Option<String>,
}

impl std::fmt::Display for ParseError {
    /// The message, then the help on its own line when there is one.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)?;
        if let Some(help) = &self.help {
            write!(f, "\nhelp: {help}")?;
        }
        Ok(())
    }
}

impl std::error::Error for ParseError {}

#[derive(Clone, Debug, Default)]
pub struct Parse {
    pub file: File,
    /// Every error, ordered by where it starts.
    pub errors: Vec<ParseError>,
}

/// Parses a whole file. Always returns a tree; what did not parse is reported in `errors`.
pub fn parse(text: &str) -> Parse {
    let lexed = lex(text);
    let mut errors: Vec<ParseError> = lexed
        .errors
        .into_iter()
        .map(|e| ParseError {
            kind: ParseErrorKind::Lex,
            span: e.span,
            message: e.message,
            help: None,
        })
        .collect();

    let mut comments = Vec::new();
    let mut sig: Vec<Tok<'_>> = Vec::with_capacity(lexed.tokens.len());
    // For each significant token, the doc comment lines directly above it.
    let mut docs: Vec<Option<Doc>> = Vec::with_capacity(lexed.tokens.len());
    let mut pending: Vec<(Span, String)> = Vec::new();
    for (tok, span) in lexed.tokens {
        match tok {
            Token::Comment(body) => {
                let doc = body.starts_with("##");
                let text_after = if doc { &body[2..] } else { &body[1..] };
                comments.push(Comment {
                    span,
                    doc,
                    text: text_after.to_string(),
                });
                if doc && starts_line(text, span.start) {
                    let line = text_after.strip_prefix(' ').unwrap_or(text_after);
                    pending.push((span, line.to_string()));
                } else {
                    pending.clear();
                }
            }
            tok => {
                docs.push(take_doc(&mut pending));
                sig.push((tok, SimpleSpan::from(span.range())));
            }
        }
    }

    let mut lex_errors: Vec<Span> = errors.iter().map(|e| e.span).collect();
    lex_errors.sort();
    let grammar = Grammar::new();
    let mut splitter = Splitter {
        sig: &sig,
        docs: &mut docs,
        grammar: &grammar,
        errors: &mut errors,
        lex_errors: &lex_errors,
        pos: 0,
    };
    let items = splitter.file();
    errors.sort_by_key(|e| (e.span.start, e.span.end));
    Parse {
        file: File { items, comments },
        errors,
    }
}

/// Whether only spaces and tabs stand between the start of the line and `offset`.
fn starts_line(text: &str, offset: usize) -> bool {
    let before = text.get(..offset).unwrap_or("");
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    before[line_start..]
        .chars()
        .all(|c| c == ' ' || c == '\t' || c == '\u{FEFF}')
}

fn take_doc(pending: &mut Vec<(Span, String)>) -> Option<Doc> {
    let first = pending.first()?.0;
    let last = pending.last()?.0;
    let text = pending
        .iter()
        .map(|(_, line)| line.as_str())
        .collect::<Vec<_>>()
        .join("\n");
    pending.clear();
    Some(Doc {
        text,
        span: first.cover(last),
    })
}

fn to_span(s: SimpleSpan) -> Span {
    Span::new(s.start, s.end)
}

/// The form of a statement, shown as help when it does not parse.
fn form_of(first: &Token<'_>) -> &'static str {
    match first {
        Token::Let => "the form is `let NAME = VALUE`",
        Token::Use => "the form is `use \"relative/path.sprung\"`",
        Token::System => "the form is `system NAME [\"Title\"] { ... }`",
        Token::Mass => "the form is `mass NAME = VALUE`",
        Token::Inertia => "the form is `inertia NAME = VALUE`",
        Token::Spring => "the form is `spring NAME between A and B = VALUE`",
        Token::Damper => "the form is `damper NAME between A and B = VALUE`",
        Token::Force => "the form is `force NAME on A = DRIVE`",
        Token::Torque => "the form is `torque NAME on A = DRIVE`",
        Token::Motion => "the form is `motion NAME of ground = DRIVE`",
        Token::Initial => "the form is `initial A = DISPLACEMENT [, VELOCITY]`",
        Token::Gravity => "the form is `gravity = VALUE`",
        Token::Require => "the form is `require SUBJECT COMPARISON`",
        _ => "",
    }
}

struct Splitter<'a, 't, 's> {
    sig: &'t [Tok<'s>],
    docs: &'a mut [Option<Doc>],
    grammar: &'a Grammar<'t, 's>,
    errors: &'a mut Vec<ParseError>,
    /// Spans of the lexer's errors, in order.
    lex_errors: &'a [Span],
    pos: usize,
}

impl<'t, 's: 't> Splitter<'_, 't, 's> {
    fn peek(&self) -> Option<&'t Token<'s>> {
        self.sig.get(self.pos).map(|(t, _)| t)
    }

    fn span_of(&self, i: usize) -> Span {
        self.sig.get(i).map_or(Span::at(0), |(_, s)| to_span(*s))
    }

    fn doc_at(&mut self, i: usize) -> Option<Doc> {
        self.docs.get_mut(i).and_then(Option::take)
    }

    /// The index of the first token at or after `from` for which `stop` holds.
    fn scan(&self, from: usize, stop: impl Fn(&Token<'s>) -> bool) -> usize {
        let mut i = from;
        while i < self.sig.len() && !stop(&self.sig[i].0) {
            i += 1;
        }
        i
    }

    fn error(&mut self, kind: ParseErrorKind, span: Span, message: String, help: Option<String>) {
        self.errors.push(ParseError {
            kind,
            span,
            message,
            help,
        });
    }

    fn file(&mut self) -> Vec<Item> {
        let mut items = Vec::new();
        while let Some(tok) = self.peek() {
            match tok {
                Token::Let | Token::Use => {
                    let start = self.pos;
                    let end = self.scan(start + 1, |t| {
                        t.starts_item() || t.starts_statement() || matches!(t, Token::RBrace)
                    });
                    self.pos = end;
                    let doc = self.doc_at(start);
                    let slice = &self.sig[start..end];
                    if matches!(tok, Token::Let) {
                        if let Some((mut item, _)) = self.run(&self.grammar.let_item, slice, start)
                        {
                            item.doc = doc;
                            items.push(Item::Let(item));
                        }
                    } else if let Some((mut item, _)) =
                        self.run(&self.grammar.use_item, slice, start)
                    {
                        item.doc = doc;
                        items.push(Item::Use(item));
                    }
                }
                Token::System => items.push(Item::System(self.system())),
                _ => self.top_level_junk(),
            }
        }
        items
    }

    fn top_level_junk(&mut self) {
        let start = self.pos;
        let end = self.scan(start + 1, Token::starts_item);
        self.pos = end;
        let first = &self.sig[start].0;
        let span = self.span_of(start).cover(self.span_of(end - 1));
        if self.lex_error_within(span) {
            return;
        }
        let (message, help) = match first {
            Token::RBrace => (
                "found `}` with no open system body".to_string(),
                Some("remove it, or check the `{` of the system above".to_string()),
            ),
            t if t.starts_statement() => (
                format!(
                    "a {} statement must be inside a system body, found it at the top level",
                    t.describe()
                ),
                Some("move it into a `system NAME { ... }` block".to_string()),
            ),
            t => (
                format!(
                    "expected `let`, `use` or `system` at the top level, found {}",
                    t.describe()
                ),
                None,
            ),
        };
        self.error(ParseErrorKind::Syntax, span, message, help);
    }

    fn system(&mut self) -> System {
        let start = self.pos;
        let doc = self.doc_at(start);
        let header_end = self.scan(start + 1, |t| {
            matches!(t, Token::LBrace | Token::RBrace) || t.starts_item() || t.starts_statement()
        });
        let header = &self.sig[start..header_end];
        let header_span = self.span_of(start).cover(self.span_of(header_end - 1));
        let header_has_lex_error = self.lex_error_within(header_span);
        let errors_before = self.errors.len();
        let parsed = self.run(&self.grammar.header, header, start);
        // One error per header: a broken header does not also get "expected `{`".
        let header_failed = header_has_lex_error || self.errors.len() > errors_before;
        let (name, title) = match parsed {
            Some(((name, title), _)) => (name, title),
            None => {
                // Keep the body: name the system after the first name in the header, if any.
                let name = header
                    .iter()
                    .find_map(|(t, s)| match t {
                        Token::Ident(n) => Some(Ident {
                            name: (*n).to_string(),
                            span: to_span(*s),
                        }),
                        _ => None,
                    })
                    .unwrap_or(Ident {
                        name: String::new(),
                        span: Span::at(header_span.end),
                    });
                (name, None)
            }
        };
        self.pos = header_end;

        let mut system = System {
            name,
            title,
            statements: Vec::new(),
            doc,
            span: header_span,
            body_span: None,
        };
        let open = match self.peek() {
            Some(Token::LBrace) => {
                let open = self.span_of(self.pos);
                self.pos += 1;
                Some(open)
            }
            found => {
                if !header_failed {
                    let found_text =
                        found.map_or("the end of the file".to_string(), |t| t.describe());
                    let at = self
                        .sig
                        .get(self.pos)
                        .map_or(Span::at(header_span.end), |(_, s)| to_span(*s));
                    self.error(
                        ParseErrorKind::Syntax,
                        at,
                        format!("expected `{{` after the system header, found {found_text}"),
                        Some("a system's statements go between `{` and `}`".to_string()),
                    );
                }
                // Without `{`, the statements that follow are still read as the body, unless
                // what follows is a top-level item.
                let body_follows = found.is_some_and(|t| t.starts_statement() && !t.starts_item())
                    || (header_has_lex_error
                        && found
                            .is_some_and(|t| t.starts_statement() || matches!(t, Token::RBrace)));
                if !body_follows {
                    return system;
                }
                None
            }
        };

        let body_start = open.map_or(self.span_of(self.pos).start, |s| s.start);
        loop {
            match self.peek() {
                None | Some(Token::System) => {
                    let name = &system.name.name;
                    let message = if name.is_empty() {
                        "this system is missing its closing `}`".to_string()
                    } else {
                        format!("system `{name}` is missing its closing `}}`")
                    };
                    self.error(
                        ParseErrorKind::UnclosedBlock,
                        open.map_or(header_span, |o| header_span.cover(o)),
                        message,
                        Some("add `}` after the system's last statement".to_string()),
                    );
                    let last = self.pos.saturating_sub(1).max(start);
                    let end = self.span_of(last).end;
                    system.span = header_span.cover(Span::at(end));
                    system.body_span = open.map(|_| Span::new(body_start, end));
                    break;
                }
                Some(Token::RBrace) => {
                    let close = self.span_of(self.pos);
                    self.pos += 1;
                    system.span = header_span.cover(close);
                    system.body_span = Some(Span::new(body_start, close.end));
                    break;
                }
                Some(t) if t.starts_statement() => {
                    if let Some(statement) = self.statement() {
                        system.statements.push(statement);
                    }
                }
                Some(_) => self.body_junk(),
            }
        }
        system
    }

    fn body_boundary(t: &Token<'_>) -> bool {
        t.starts_statement() || matches!(t, Token::RBrace | Token::System | Token::Use)
    }

    fn body_junk(&mut self) {
        let start = self.pos;
        let end = self.scan(start + 1, Self::body_boundary);
        self.pos = end;
        let first = &self.sig[start].0;
        let span = self.span_of(start).cover(self.span_of(end - 1));
        if self.lex_error_within(span) {
            return;
        }
        let (message, help) = match first {
            Token::Use => (
                "`use` belongs at the top level, outside any system".to_string(),
                Some("move it above the first `system`".to_string()),
            ),
            t => (
                format!(
                    "expected a statement (`let`, `mass`, `inertia`, `spring`, `damper`, \
                     `force`, `torque`, `motion`, `initial`, `gravity` or `require`), found {}",
                    t.describe()
                ),
                None,
            ),
        };
        self.error(ParseErrorKind::Syntax, span, message, help);
    }

    fn statement(&mut self) -> Option<Statement> {
        let start = self.pos;
        let end = self.scan(start + 1, Self::body_boundary);
        self.pos = end;
        let doc = self.doc_at(start);
        let slice = &self.sig[start..end];
        let (kind, used) = self.run(&self.grammar.statement, slice, start)?;
        let span = self.span_of(start).cover(self.span_of(start + used - 1));
        Some(Statement { kind, doc, span })
    }

    /// Whether the lexer reported an error inside `span`; it has then said what is wrong.
    fn lex_error_within(&self, span: Span) -> bool {
        let i = self.lex_errors.partition_point(|s| s.start < span.start);
        self.lex_errors
            .get(i)
            .is_some_and(|s| s.start < span.end.max(span.start + 1))
    }

    /// Runs one parser over one statement's tokens `slice` (which begins at `sig[start]`).
    /// Returns the output and how many tokens of the slice it covers. A statement followed by
    /// tokens that cannot continue it is kept, and the leftover tokens are the error.
    fn run<O>(
        &mut self,
        parser: &grammar::P<'t, 's, O>,
        slice: &'t [Tok<'s>],
        start: usize,
    ) -> Option<(O, usize)> {
        let first = slice.first().map(|(t, _)| t)?;
        let stmt_span = self
            .span_of(start)
            .cover(slice.last().map_or(Span::at(0), |(_, s)| to_span(*s)));
        let depth = depth::measure(slice);
        if depth.nesting > MAX_NESTING {
            self.error(
                ParseErrorKind::TooDeep,
                stmt_span,
                format!("this statement nests more than {MAX_NESTING} levels deep"),
                Some(
                    "split the expression into several `let` values; deep nesting of \
                     parentheses, `-` or `^` is refused"
                        .to_string(),
                ),
            );
            return None;
        }
        if depth.tree > MAX_EXPR_DEPTH {
            self.error(
                ParseErrorKind::TooDeep,
                stmt_span,
                format!(
                    "this statement's expression is too long: more than {MAX_EXPR_DEPTH} \
                     operators in a chain"
                ),
                Some("split the expression into several `let` values".to_string()),
            );
            return None;
        }
        let (output, errs) = parse_slice(parser, slice);
        if errs.is_empty() {
            return output.map(|o| (o, slice.len()));
        }
        let first_err = errs.into_iter().min_by_key(|e| e.span().start)?;
        let err_span = to_span(*first_err.span());
        // A complete statement followed by leftovers: keep the statement.
        let mut kept = None;
        if ends_here(&first_err) {
            let k = slice.partition_point(|(_, s)| s.start < err_span.start);
            if k > 0 && k < slice.len() {
                if let (Some(o), e) = parse_slice(parser, &slice[..k]) {
                    if e.is_empty() {
                        kept = Some((o, k));
                    }
                }
            }
        }
        if self.lex_error_within(stmt_span) {
            return kept;
        }
        let (message, trailing) = describe_error(&first_err);
        let header = matches!(first, Token::System);
        let (message, help) = if header && trailing {
            (
                format!(
                    "expected `{{` after the system header, found {}",
                    first_err
                        .found()
                        .map_or("the end of the header".to_string(), Token::describe)
                ),
                "a system header is `system NAME [\"Title\"]`, then `{`",
            )
        } else if trailing {
            (
                message,
                "a statement ends here; the next one starts with a keyword such as `mass`, \
             `spring` or `require` (or is an operator missing?)",
            )
        } else {
            (message, form_of(first))
        };
        self.error(
            ParseErrorKind::Syntax,
            err_span,
            message,
            Some(help.to_string()).filter(|h| !h.is_empty()),
        );
        kept
    }
}

fn parse_slice<'t, 's: 't, O>(
    parser: &grammar::P<'t, 's, O>,
    slice: &'t [Tok<'s>],
) -> (Option<O>, Vec<grammar::Error<'t, 's>>) {
    let eoi = slice.last().map_or(SimpleSpan::from(0..0), |(_, s)| {
        SimpleSpan::from(s.end..s.end)
    });
    parser
        .parse(slice.split_token_span(eoi))
        .into_output_errors()
}

/// Whether the statement could have ended where this error stands.
fn ends_here(err: &grammar::Error<'_, '_>) -> bool {
    err.found().is_some() && err.expected().any(|p| matches!(p, RichPattern::EndOfInput))
}

/// "expected LABEL, found TOKEN" from a chumsky error, and whether it is about tokens left
/// over after a complete statement.
fn describe_error(err: &grammar::Error<'_, '_>) -> (String, bool) {
    let found =
        |t: Option<&Token<'_>>| t.map_or("the end of the statement".to_string(), Token::describe);
    match err.reason() {
        RichReason::Custom(msg) => (msg.clone(), false),
        RichReason::ExpectedFound { expected, found: f } => {
            let found_text = found(f.as_deref());
            let mut labels: Vec<String> = Vec::new();
            let mut tokens: Vec<String> = Vec::new();
            let mut end = false;
            for pattern in expected {
                match pattern {
                    RichPattern::Label(l) => labels.push(l.to_string()),
                    RichPattern::Token(t) => tokens.push(t.describe()),
                    RichPattern::EndOfInput => end = true,
                    _ => {}
                }
            }
            // Bare operator tokens come from the expression parser's "an operator could
            // continue here"; they only matter when nothing better is expected.
            if labels.is_empty() && !end {
                labels = tokens;
            }
            labels.dedup();
            if labels.is_empty() {
                return if end {
                    (
                        format!("unexpected {found_text} after the end of the statement"),
                        true,
                    )
                } else {
                    (format!("unexpected {found_text}"), false)
                };
            }
            let list = match labels.len() {
                1 => labels[0].clone(),
                n => format!("{} or {}", labels[..n - 1].join(", "), labels[n - 1]),
            };
            (format!("expected {list}, found {found_text}"), false)
        }
    }
}
