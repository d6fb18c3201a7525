//! The unit registry (placeholder; the full table arrives in its own commit).

use sprung_syntax::Span;
use sprung_syntax::ast::UnitExpr;

use crate::dim::Dim;

/// Why a unit atom could not be read.
#[derive(Clone, Debug, PartialEq)]
pub enum UnitError {
    /// Not in the table; `suggestion` is the nearest known spelling, if any is close.
    Unknown {
        atom: String,
        suggestion: Option<String>,
    },
    /// `lb`: write `lbm` or `lbf`.
    AmbiguousPound,
}

/// A unit atom read from the table, prefix applied.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Atom {
    /// Multiply by this to get SI (radian = 1, cycle = 2π).
    pub factor: f64,
    pub dim: Dim,
}

pub fn lookup_atom(atom: &str) -> Result<Atom, UnitError> {
    match atom {
        "kg" => Ok(Atom {
            factor: 1.0,
            dim: Dim::MASS,
        }),
        "m" => Ok(Atom {
            factor: 1.0,
            dim: Dim::LENGTH,
        }),
        "s" => Ok(Atom {
            factor: 1.0,
            dim: Dim::TIME,
        }),
        "N" => Ok(Atom {
            factor: 1.0,
            dim: Dim::FORCE,
        }),
        "lb" => Err(UnitError::AmbiguousPound),
        _ => Err(UnitError::Unknown {
            atom: atom.to_string(),
            suggestion: None,
        }),
    }
}

/// Evaluates a whole unit expression to its SI factor and dimension; on failure, the span of
/// the offending atom and why.
pub fn eval_unit(unit: &UnitExpr) -> Result<Atom, (Span, UnitError)> {
    let mut factor = 1.0;
    let mut dim = Dim::NONE;
    for term in &unit.terms {
        let atom = lookup_atom(&term.atom).map_err(|e| (term.atom_span, e))?;
        let f = atom.factor.powi(term.exponent);
        let d = atom.dim.powi(term.exponent).unwrap_or(Dim::NONE);
        match term.op {
            sprung_syntax::ast::UnitOp::Mul => {
                factor *= f;
                dim = dim.times(d).unwrap_or(dim);
            }
            sprung_syntax::ast::UnitOp::Div => {
                factor /= f;
                dim = dim.per(d).unwrap_or(dim);
            }
        }
    }
    Ok(Atom { factor, dim })
}
