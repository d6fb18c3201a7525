//! `sprung-syntax`: the text layer of the Sprung model language.
//!
//! Owns the tokens ([`lexer`]), the parser with error recovery ([`parser`]), the syntax tree
//! with byte spans ([`ast`]), the formal grammar (`grammar/sprung.ebnf`) and the line index for
//! converting byte offsets to line/column at the edges ([`line_index`]), and the formatter
//! ([`format`](mod@format): one canonical layout, comments kept, meaning checked).
//!
//! It must not know about units or physics: a unit here is only a spelling attached to a number.
//! Parsing never fails: [`parse`] always returns a tree plus a list of errors.

pub mod ast;
pub mod format;
pub mod lexer;
pub mod line_index;
pub mod parser;
pub mod span;

pub use format::{FormatConfig, FormatError, LineEnding, format, format_range};
pub use line_index::{Encoding, LineCol, LineIndex};
pub use parser::{MAX_NESTING, Parse, ParseError, ParseErrorKind, parse};
pub use span::Span;
