//! Limits that keep every later tree walk safe.
//!
//! Two measures, both checked on a statement's tokens before chumsky sees them, so nothing
//! recursive ever runs on an input that is too deep:
//!
//! - the *nesting* of parentheses, unary minus runs and `^` chains, which is how deep the
//!   parser itself recurses (limit [`MAX_NESTING`](super::MAX_NESTING));
//! - an upper bound on the depth of the expression tree that would be built. A long flat sum
//!   `1 + 1 + ... + 1` parses iteratively (chumsky's Pratt parser folds left in a loop) but
//!   builds a left-leaning tree as deep as it is long, and dropping, cloning or walking such a
//!   tree recurses once per level: 100 000 terms overflow a 2 MiB thread stack on drop alone.
//!   So the tree depth is bounded too (limit [`MAX_EXPR_DEPTH`]).

use super::grammar::Tok;
use crate::lexer::Token;

/// The deepest expression tree a statement may build (see the module comment).
pub const MAX_EXPR_DEPTH: usize = 512;

/// What a statement's tokens measure.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub(super) struct Depth {
    /// Parentheses plus unary-minus runs plus `^` chains, at the deepest point.
    pub nesting: usize,
    /// An upper bound on the expression tree's depth.
    pub tree: usize,
}

/// Whether the token can end an operand, so that a `-` after it is binary.
fn ends_operand(tok: &Token<'_>) -> bool {
    matches!(
        tok,
        Token::Number(_) | Token::Unit(_) | Token::Percent | Token::Ident(_) | Token::RParen
    )
}

/// Measures one statement's tokens in a single pass with an explicit stack.
pub(super) fn measure(tokens: &[Tok<'_>]) -> Depth {
    // Per open parenthesis: (nesting at the group's start, nesting just before the `(`,
    // operators counted in the group, deepest closed child group).
    struct Group {
        base: usize,
        before: usize,
        ops: usize,
        child: usize,
    }
    let mut stack: Vec<Group> = Vec::new();
    let mut base = 0usize;
    let mut cur = 0usize;
    let mut ops = 0usize;
    let mut child = 0usize;
    let mut max_nesting = 0usize;
    let mut prev: Option<&Token<'_>> = None;
    for (tok, _) in tokens {
        match tok {
            Token::LParen => {
                stack.push(Group {
                    base,
                    before: cur,
                    ops,
                    child,
                });
                cur += 1;
                base = cur;
                ops = 0;
                child = 0;
            }
            Token::RParen => {
                let inner = ops + child + 1;
                if let Some(g) = stack.pop() {
                    base = g.base;
                    cur = g.before;
                    ops = g.ops;
                    child = g.child.max(inner);
                } else {
                    // An unmatched `)`: the statement will not parse; keep counting at the top.
                    child = child.max(inner);
                    ops = 0;
                    cur = base;
                }
            }
            Token::Caret => {
                cur += 1;
                ops += 1;
            }
            Token::Minus if !prev.is_some_and(ends_operand) => {
                cur += 1;
                ops += 1;
            }
            Token::Minus | Token::Plus | Token::Star | Token::Slash | Token::Dot => {
                cur = base;
                ops += 1;
            }
            _ if !ends_operand(tok) => cur = base,
            _ => {}
        }
        max_nesting = max_nesting.max(cur);
        prev = Some(tok);
    }
    // Close any group left open by an unbalanced statement.
    let mut tree = ops + child;
    while let Some(g) = stack.pop() {
        tree = g.ops + g.child.max(tree + 1);
    }
    Depth {
        nesting: max_nesting,
        tree,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexer::lex;
    use chumsky::span::SimpleSpan;

    fn depth(text: &str) -> Depth {
        let toks: Vec<Tok<'_>> = lex(text)
            .tokens
            .into_iter()
            .map(|(t, s)| (t, SimpleSpan::from(s.range())))
            .collect();
        measure(&toks)
    }

    #[test]
    fn parentheses_unary_and_power_nest() {
        assert_eq!(depth("1 + 2").nesting, 0);
        assert_eq!(depth("((1))").nesting, 2);
        assert_eq!(depth("- - - 1").nesting, 3);
        assert_eq!(depth("2 ^ 3 ^ 4").nesting, 2);
        // A binary operator ends the run: `-a * -b` nests one level at a time.
        assert_eq!(depth("-a * -b").nesting, 1);
        assert_eq!(depth("a - -b").nesting, 1);
        assert_eq!(depth("-(-(1))").nesting, 4);
    }

    #[test]
    fn tree_bound_follows_flat_chains() {
        assert_eq!(depth("1 + 1 + 1 + 1").tree, 3);
        assert_eq!(depth("1 + 1 + 1 + 1").nesting, 0);
        // One for the group, one for its `+`, one for the `*` outside.
        assert_eq!(depth("(1 + 2) * 3").tree, 3);
        assert_eq!(depth("max(1 + 2, 3)").tree, 2);
    }
}
