//! An arena of value formulas in SI. Children are always pushed before their parents, so the
//! arena is in topological order and any set of values is evaluated by one forward pass, without
//! recursion, however long the chain of `let`s behind them.

use std::collections::BTreeSet;

#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct FormulaId(u32);

impl FormulaId {
    pub fn index(self) -> usize {
        self.0 as usize
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Func {
    Sqrt,
    Abs,
    Exp,
    Ln,
    Log10,
    Sin,
    Cos,
    Tan,
}

impl Func {
    pub fn from_name(name: &str) -> Option<Func> {
        Some(match name {
            "sqrt" => Func::Sqrt,
            "abs" => Func::Abs,
            "exp" => Func::Exp,
            "ln" => Func::Ln,
            "log10" => Func::Log10,
            "sin" => Func::Sin,
            "cos" => Func::Cos,
            "tan" => Func::Tan,
            _ => return None,
        })
    }

    fn apply(self, x: f64) -> f64 {
        match self {
            Func::Sqrt => x.sqrt(),
            Func::Abs => x.abs(),
            Func::Exp => x.exp(),
            Func::Ln => x.ln(),
            Func::Log10 => x.log10(),
            Func::Sin => x.sin(),
            Func::Cos => x.cos(),
            Func::Tan => x.tan(),
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum Node {
    Const(f64),
    Neg(FormulaId),
    Add(FormulaId, FormulaId),
    Sub(FormulaId, FormulaId),
    Mul(FormulaId, FormulaId),
    Div(FormulaId, FormulaId),
    Pow(FormulaId, FormulaId),
    Call(Func, FormulaId),
    Min(Vec<FormulaId>),
    Max(Vec<FormulaId>),
    /// `base × (1 + d)`: a relative tolerance with deviation parameter `param`.
    Relative {
        base: FormulaId,
        param: usize,
    },
    /// `base + d`: an absolute tolerance.
    Absolute {
        base: FormulaId,
        param: usize,
    },
}

impl Node {
    fn children(&self) -> Vec<FormulaId> {
        match self {
            Node::Const(_) => vec![],
            Node::Neg(a) | Node::Call(_, a) => vec![*a],
            Node::Relative { base, .. } | Node::Absolute { base, .. } => vec![*base],
            Node::Add(a, b)
            | Node::Sub(a, b)
            | Node::Mul(a, b)
            | Node::Div(a, b)
            | Node::Pow(a, b) => {
                vec![*a, *b]
            }
            Node::Min(v) | Node::Max(v) => v.clone(),
        }
    }
}

#[derive(Clone, Debug, Default)]
pub struct Formulas {
    nodes: Vec<Node>,
}

impl Formulas {
    pub fn push(&mut self, node: Node) -> FormulaId {
        debug_assert!(node.children().iter().all(|c| c.index() < self.nodes.len()));
        self.nodes.push(node);
        FormulaId((self.nodes.len() - 1) as u32)
    }

    pub fn constant(&mut self, value: f64) -> FormulaId {
        self.push(Node::Const(value))
    }

    pub fn node(&self, id: FormulaId) -> &Node {
        &self.nodes[id.index()]
    }

    pub fn len(&self) -> usize {
        self.nodes.len()
    }

    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }

    /// Every node that `roots` depend on, themselves included, in topological order.
    pub fn closure(&self, roots: &[FormulaId]) -> Vec<FormulaId> {
        let mut seen = vec![false; self.nodes.len()];
        let mut stack: Vec<FormulaId> = roots.to_vec();
        while let Some(id) = stack.pop() {
            if std::mem::replace(&mut seen[id.index()], true) {
                continue;
            }
            stack.extend(self.nodes[id.index()].children());
        }
        (0..self.nodes.len())
            .filter(|&i| seen[i])
            .map(|i| FormulaId(i as u32))
            .collect()
    }

    /// The tolerance parameters that `roots` depend on.
    pub fn params_of(&self, roots: &[FormulaId]) -> BTreeSet<usize> {
        self.closure(roots)
            .into_iter()
            .filter_map(|id| match self.nodes[id.index()] {
                Node::Relative { param, .. } | Node::Absolute { param, .. } => Some(param),
                _ => None,
            })
            .collect()
    }

    /// Evaluates one value with every deviation given in `deviations` (indexed by parameter).
    pub fn eval(&self, id: FormulaId, deviations: &[f64]) -> f64 {
        let mut ev = Evaluator::new(self, &[id]);
        ev.run(deviations);
        ev.get(id)
    }
}

/// Evaluates a fixed set of values again and again (once per tolerance corner).
pub struct Evaluator<'f> {
    formulas: &'f Formulas,
    order: Vec<FormulaId>,
    values: Vec<f64>,
}

impl<'f> Evaluator<'f> {
    pub fn new(formulas: &'f Formulas, roots: &[FormulaId]) -> Self {
        Evaluator {
            formulas,
            order: formulas.closure(roots),
            values: vec![f64::NAN; formulas.len()],
        }
    }

    /// Evaluates every needed node; a parameter missing from `deviations` is at nominal (0).
    pub fn run(&mut self, deviations: &[f64]) {
        let dev = |p: usize| deviations.get(p).copied().unwrap_or(0.0);
        for &id in &self.order {
            let v = |x: FormulaId| self.values[x.index()];
            let value = match &self.formulas.nodes[id.index()] {
                Node::Const(c) => *c,
                Node::Neg(a) => -v(*a),
                Node::Add(a, b) => v(*a) + v(*b),
                Node::Sub(a, b) => v(*a) - v(*b),
                Node::Mul(a, b) => v(*a) * v(*b),
                Node::Div(a, b) => v(*a) / v(*b),
                Node::Pow(a, b) => v(*a).powf(v(*b)),
                Node::Call(f, a) => f.apply(v(*a)),
                Node::Min(xs) => xs.iter().map(|x| v(*x)).fold(f64::INFINITY, f64::min),
                Node::Max(xs) => xs.iter().map(|x| v(*x)).fold(f64::NEG_INFINITY, f64::max),
                Node::Relative { base, param } => v(*base) * (1.0 + dev(*param)),
                Node::Absolute { base, param } => v(*base) + dev(*param),
            };
            self.values[id.index()] = value;
        }
    }

    pub fn get(&self, id: FormulaId) -> f64 {
        self.values[id.index()]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shared_subexpressions_evaluate_once_per_pass() {
        let mut f = Formulas::default();
        let k = f.constant(1000.0);
        let tol = f.push(Node::Relative { base: k, param: 0 });
        // A chain of 10,000 doublings of a shared node: no recursion, no blow-up.
        let mut x = tol;
        for _ in 0..10_000 {
            let two = f.constant(0.5);
            let half = f.push(Node::Mul(x, two));
            x = f.push(Node::Add(half, half));
        }
        assert_eq!(f.eval(x, &[]), 1000.0);
        assert!((f.eval(x, &[0.1]) - 1100.0).abs() < 1e-9);
        assert_eq!(f.params_of(&[x]).into_iter().collect::<Vec<_>>(), vec![0]);
    }
}
