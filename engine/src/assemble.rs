//! Assembly of the mass, damping and stiffness matrices M, C, K of one checked system, at the
//! nominal values or at any corner of the tolerance box.
//!
//! One coordinate per mass or inertia, in [`SystemModel::dofs`] order. M is diagonal. A spring
//! or damper between coordinates i and j adds its value to (i,i) and (j,j) and subtracts it
//! from (i,j) and (j,i); one between i and ground adds to (i,i) only; so C and K are symmetric
//! by construction. Every failure is an [`AssembleError`], never a panic.
//!
//! The three matrices are stored sparse (compressed columns, nalgebra-sparse [`CscMatrix`]): a
//! chain of n masses has at most about 3n nonzeros in each, where dense storage would keep
//! 3 n² values alive through the eigensolve. Every stamp is pushed even when its value is
//! zero, so the pattern holds an entry for every element (sizing updates a damper's entries in
//! place).
//! Consumers that need dense matrices (the state matrix, the harmonic solve) ask for them with
//! [`Matrices::dense_m`] and its siblings.

use nalgebra::DMatrix;
use nalgebra_sparse::{CooMatrix, CscMatrix};
use sprung_syntax::ast::ElementKind;

use crate::formula::{Evaluator, FormulaId};
use crate::model::{DofKind, End, Model, SystemModel};

/// Size limits checked before any matrix is allocated.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Limits {
    /// The largest number of degrees of freedom a system may have (default 5,000).
    pub max_dofs: usize,
}

impl Default for Limits {
    fn default() -> Self {
        Limits { max_dofs: 5000 }
    }
}

/// The matrices of M ẍ + C ẋ + K x = f, in SI units, n × n with n = number of dofs, stored
/// sparse.
#[derive(Clone, Debug, PartialEq)]
pub struct Matrices {
    pub m: CscMatrix<f64>,
    pub c: CscMatrix<f64>,
    pub k: CscMatrix<f64>,
    /// Translational or rotational, per coordinate.
    pub dof_kinds: Vec<DofKind>,
}

impl Matrices {
    /// Matrices from dense M, C, K (their nonzero entries are stored).
    pub fn from_dense(
        m: DMatrix<f64>,
        c: DMatrix<f64>,
        k: DMatrix<f64>,
        dof_kinds: Vec<DofKind>,
    ) -> Self {
        Matrices {
            m: CscMatrix::from(&m),
            c: CscMatrix::from(&c),
            k: CscMatrix::from(&k),
            dof_kinds,
        }
    }

    /// The number of degrees of freedom.
    pub fn dofs(&self) -> usize {
        self.m.nrows()
    }

    /// M as a dense matrix.
    pub fn dense_m(&self) -> DMatrix<f64> {
        DMatrix::from(&self.m)
    }

    /// C as a dense matrix.
    pub fn dense_c(&self) -> DMatrix<f64> {
        DMatrix::from(&self.c)
    }

    /// K as a dense matrix.
    pub fn dense_k(&self) -> DMatrix<f64> {
        DMatrix::from(&self.k)
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum AssembleError {
    /// The system has more degrees of freedom than [`Limits::max_dofs`].
    TooManyDofs { dofs: usize, limit: usize },
    /// A mass or inertia evaluated to zero, a negative number, or not a number: M would not be
    /// positive definite.
    NonPositiveMass { dof: usize, value: f64 },
    /// A spring or damper evaluated to infinity or not a number (a division by zero, say).
    NonFiniteValue { element: usize, value: f64 },
    /// An element end names a coordinate the system does not have (a malformed model).
    BadEnd { element: usize },
}

impl std::fmt::Display for AssembleError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            AssembleError::TooManyDofs { dofs, limit } => write!(
                f,
                "the system has {dofs} degrees of freedom, more than the limit of {limit}"
            ),
            AssembleError::NonPositiveMass { dof, value } => write!(
                f,
                "degree of freedom {dof} has mass or inertia {value}; it must be positive"
            ),
            AssembleError::NonFiniteValue { element, value } => {
                write!(f, "element {element} evaluates to {value}")
            }
            AssembleError::BadEnd { element } => {
                write!(
                    f,
                    "element {element} names a coordinate that does not exist"
                )
            }
        }
    }
}

impl std::error::Error for AssembleError {}

/// Assembles one system at the given deviations (indexed like [`Model::params`]; an empty slice
/// is the nominal model), with the default [`Limits`].
pub fn assemble(
    model: &Model,
    sys: &SystemModel,
    deviations: &[f64],
) -> Result<Matrices, AssembleError> {
    Assembler::new(model, sys, Limits::default())?.assemble(deviations)
}

/// Assembles one system again and again, once per tolerance corner, building the formula
/// evaluator only once.
pub struct Assembler<'m> {
    sys: &'m SystemModel,
    evaluator: Evaluator<'m>,
    dof_values: Vec<FormulaId>,
    element_values: Vec<FormulaId>,
}

impl<'m> Assembler<'m> {
    /// Checks the limits and the element ends, and prepares the evaluator.
    pub fn new(
        model: &'m Model,
        sys: &'m SystemModel,
        limits: Limits,
    ) -> Result<Self, AssembleError> {
        let n = sys.dofs.len();
        if n > limits.max_dofs {
            return Err(AssembleError::TooManyDofs {
                dofs: n,
                limit: limits.max_dofs,
            });
        }
        for (index, element) in sys.elements.iter().enumerate() {
            for end in [element.a, element.b] {
                if let End::Dof(i) = end
                    && i >= n
                {
                    return Err(AssembleError::BadEnd { element: index });
                }
            }
        }
        let dof_values: Vec<FormulaId> = sys.dofs.iter().map(|d| d.value.formula).collect();
        let element_values: Vec<FormulaId> = sys.elements.iter().map(|e| e.value.formula).collect();
        let mut roots = dof_values.clone();
        roots.extend_from_slice(&element_values);
        if let Some(bad) = roots.iter().find(|id| id.index() >= model.formulas.len()) {
            // A formula outside the arena can only come from a malformed model.
            let element = element_values
                .iter()
                .position(|id| id == bad)
                .unwrap_or_default();
            return Err(AssembleError::BadEnd { element });
        }
        Ok(Assembler {
            sys,
            evaluator: Evaluator::new(&model.formulas, &roots),
            dof_values,
            element_values,
        })
    }

    /// Evaluates every mass, spring and damper at `deviations` and assembles M, C, K.
    pub fn assemble(&mut self, deviations: &[f64]) -> Result<Matrices, AssembleError> {
        self.evaluator.run(deviations);
        let n = self.sys.dofs.len();
        let mut m = CooMatrix::new(n, n);
        let mut c = CooMatrix::new(n, n);
        let mut k = CooMatrix::new(n, n);
        for (i, id) in self.dof_values.iter().enumerate() {
            let value = self.evaluator.get(*id);
            // `!(value > 0)` also catches NaN.
            if !(value > 0.0 && value.is_finite()) {
                return Err(AssembleError::NonPositiveMass { dof: i, value });
            }
            m.push(i, i, value);
        }
        for (index, (element, id)) in self
            .sys
            .elements
            .iter()
            .zip(&self.element_values)
            .enumerate()
        {
            let value = self.evaluator.get(*id);
            if !value.is_finite() {
                return Err(AssembleError::NonFiniteValue {
                    element: index,
                    value,
                });
            }
            let target = match element.kind {
                ElementKind::Spring => &mut k,
                ElementKind::Damper => &mut c,
            };
            add_element(target, element.a, element.b, value);
        }
        // Duplicates are summed on conversion; explicit zeros are kept.
        Ok(Matrices {
            m: CscMatrix::from(&m),
            c: CscMatrix::from(&c),
            k: CscMatrix::from(&k),
            dof_kinds: self.sys.dofs.iter().map(|d| d.kind).collect(),
        })
    }
}

/// Pushes the stamps of a two-terminal element of value `value` between ends `a` and `b` (ends
/// already checked to be in range), all of them even for a zero value.
fn add_element(target: &mut CooMatrix<f64>, a: End, b: End, value: f64) {
    match (a, b) {
        (End::Dof(i), End::Dof(j)) if i != j => {
            target.push(i, i, value);
            target.push(j, j, value);
            target.push(i, j, -value);
            target.push(j, i, -value);
        }
        // An element from a coordinate to itself stretches nothing.
        (End::Dof(_), End::Dof(_)) => {}
        (End::Dof(i), End::Ground) | (End::Ground, End::Dof(i)) => target.push(i, i, value),
        (End::Ground, End::Ground) => {}
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dim::Dim;
    use crate::formula::{Formulas, Node};
    use crate::model::{Dof, Element, Quantity};
    use sprung_syntax::Span;

    fn quantity(formulas: &mut Formulas, value: f64) -> Quantity {
        Quantity {
            formula: formulas.constant(value),
            dim: Dim::default(),
            nominal: value,
        }
    }

    fn dof(formulas: &mut Formulas, value: f64) -> Dof {
        Dof {
            name: "m".into(),
            name_span: Span::default(),
            span: Span::default(),
            kind: DofKind::Translational,
            value: quantity(formulas, value),
            doc: None,
        }
    }

    fn element(kind: ElementKind, a: End, b: End, value: Quantity) -> Element {
        Element {
            kind,
            name: "e".into(),
            name_span: Span::default(),
            span: Span::default(),
            a,
            b,
            rotational: false,
            value,
            doc: None,
        }
    }

    fn system(dofs: Vec<Dof>, elements: Vec<Element>) -> SystemModel {
        SystemModel {
            name: "s".into(),
            name_span: Span::default(),
            title: None,
            span: Span::default(),
            doc: None,
            lets: vec![],
            dofs,
            elements,
            drives: vec![],
            initials: vec![],
            gravity: None,
            requirements: vec![],
            params: vec![],
            has_errors: false,
        }
    }

    fn model_of(formulas: Formulas) -> Model {
        Model {
            formulas,
            params: vec![],
            globals: vec![],
            systems: vec![],
        }
    }

    #[test]
    fn two_masses_stamp_symmetric_matrices() {
        let mut f = Formulas::default();
        let dofs = vec![dof(&mut f, 2.0), dof(&mut f, 3.0)];
        let k1 = quantity(&mut f, 100.0);
        let k2 = quantity(&mut f, 40.0);
        let c1 = quantity(&mut f, 5.0);
        let elements = vec![
            element(ElementKind::Spring, End::Dof(0), End::Ground, k1),
            element(ElementKind::Spring, End::Dof(0), End::Dof(1), k2),
            element(ElementKind::Damper, End::Ground, End::Dof(1), c1),
        ];
        let sys = system(dofs, elements);
        let model = model_of(f);
        let mats = assemble(&model, &sys, &[]).unwrap();
        assert_eq!(
            mats.dense_m(),
            DMatrix::from_row_slice(2, 2, &[2.0, 0.0, 0.0, 3.0])
        );
        assert_eq!(
            mats.dense_k(),
            DMatrix::from_row_slice(2, 2, &[140.0, -40.0, -40.0, 40.0])
        );
        assert_eq!(
            mats.dense_c(),
            DMatrix::from_row_slice(2, 2, &[0.0, 0.0, 0.0, 5.0])
        );
    }

    #[test]
    fn a_zero_damper_keeps_its_entries() {
        // Sizing updates a damper's stamps in place, so they must be stored even at zero.
        let mut f = Formulas::default();
        let dofs = vec![dof(&mut f, 1.0), dof(&mut f, 1.0)];
        let c0 = quantity(&mut f, 0.0);
        let sys = system(
            dofs,
            vec![element(ElementKind::Damper, End::Dof(0), End::Dof(1), c0)],
        );
        let model = model_of(f);
        let mats = assemble(&model, &sys, &[]).unwrap();
        assert_eq!(mats.c.nnz(), 4);
        assert!(mats.c.values().iter().all(|&v| v == 0.0));
    }

    #[test]
    fn corners_re_evaluate_toleranced_values() {
        let mut f = Formulas::default();
        let dofs = vec![dof(&mut f, 1.0)];
        let base = f.constant(1000.0);
        let tol = f.push(Node::Relative { base, param: 0 });
        let k = Quantity {
            formula: tol,
            dim: Dim::default(),
            nominal: 1000.0,
        };
        let sys = system(
            dofs,
            vec![element(ElementKind::Spring, End::Dof(0), End::Ground, k)],
        );
        let model = model_of(f);
        let mut asm = Assembler::new(&model, &sys, Limits::default()).unwrap();
        assert_eq!(asm.assemble(&[]).unwrap().dense_k()[(0, 0)], 1000.0);
        assert!((asm.assemble(&[-0.1]).unwrap().dense_k()[(0, 0)] - 900.0).abs() < 1e-12);
        assert!((asm.assemble(&[0.1]).unwrap().dense_k()[(0, 0)] - 1100.0).abs() < 1e-12);
    }

    #[test]
    fn limits_and_bad_values_are_errors() {
        let mut f = Formulas::default();
        let dofs = vec![dof(&mut f, 1.0), dof(&mut f, -1.0)];
        let sys = system(dofs, vec![]);
        let model = model_of(f);
        assert_eq!(
            Assembler::new(&model, &sys, Limits { max_dofs: 1 }).err(),
            Some(AssembleError::TooManyDofs { dofs: 2, limit: 1 })
        );
        assert_eq!(
            assemble(&model, &sys, &[]).err(),
            Some(AssembleError::NonPositiveMass {
                dof: 1,
                value: -1.0
            })
        );
        let mut f = Formulas::default();
        let dofs = vec![dof(&mut f, 1.0)];
        let k = quantity(&mut f, 1.0);
        let sys = system(
            dofs,
            vec![element(ElementKind::Spring, End::Dof(3), End::Ground, k)],
        );
        let model = model_of(f);
        assert_eq!(
            assemble(&model, &sys, &[]).err(),
            Some(AssembleError::BadEnd { element: 0 })
        );
    }
}
