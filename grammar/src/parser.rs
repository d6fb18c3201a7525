//! Placeholder: the parser arrives in the next commit.
use crate::ast::File;
use crate::span::Span;

pub const MAX_NESTING: usize = 128;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ParseErrorKind {
    /// Text the lexer could not read (stray character, unterminated string, bad unit exponent).
    Lex,
    /// A statement or item that does not follow the grammar.
    Syntax,
    /// A system body whose `}` is missing.
    UnclosedBlock,
    /// Nesting deeper than [`MAX_NESTING`].
    TooDeep,
}

#[derive(Clone, Debug, PartialEq)]
pub struct ParseError {
    pub kind: ParseErrorKind,
    pub span: Span,
    pub message: String,
    pub help: Option<String>,
}

#[derive(Clone, Debug, Default)]
pub struct Parse {
    pub file: File,
    pub errors: Vec<ParseError>,
}

pub fn parse(_text: &str) -> Parse {
    Parse::default()
}
