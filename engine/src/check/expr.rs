//! Expressions to formulas: units applied, dimensions checked, nominal values computed, and
//! tolerances turned into deviation parameters.

use sprung_syntax::Span;
use sprung_syntax::ast::{BinaryOp, Expr, ExprKind, Value};

use crate::diagnostics::{Code, Diagnostic};
use crate::dim::Dim;
use crate::formula::{Formulas, Func, Node};
use crate::model::{Param, Quantity, ToleranceKind};
use crate::suggest::did_you_mean;
use crate::units::{self, UnitError};

/// What a name in an expression stands for.
pub(crate) enum Resolved {
    Value(Quantity),
    /// Defined, but its own definition failed (already reported): stay quiet.
    Poisoned,
    /// Defined, but not something with a value (a drive); the string says what it is.
    NotAValue(&'static str),
    Unknown,
}

/// The names an expression can see.
pub(crate) trait Names {
    fn resolve(&self, name: &str) -> Resolved;
    /// Every visible name, for did-you-mean.
    fn candidates(&self) -> Vec<&str>;
}

/// The functions an expression may call (language.md §3).
pub const FUNCTIONS: &[&str] = &[
    "sqrt", "abs", "min", "max", "exp", "ln", "log10", "sin", "cos", "tan",
];

pub(crate) struct Compiler<'c> {
    pub formulas: &'c mut Formulas,
    pub params: &'c mut Vec<Param>,
    pub diags: &'c mut Vec<Diagnostic>,
}

fn is_tolerant(formulas: &Formulas, q: &Quantity) -> bool {
    !formulas.params_of(&[q.formula]).is_empty()
}

impl Compiler<'_> {
    fn push(&mut self, node: Node, dim: Dim, nominal: f64, span: Span) -> Option<Quantity> {
        if !nominal.is_finite() {
            self.diags.push(
                Diagnostic::new(Code::NotFinite, span, format!("this evaluates to {nominal}, not a finite number"))
                    .with_help("look for a division by zero, an overflow, or the root or logarithm of a negative value"),
            );
            return None;
        }
        let formula = self.formulas.push(node);
        Some(Quantity {
            formula,
            dim,
            nominal,
        })
    }

    fn constant(&mut self, value: f64, dim: Dim, span: Span) -> Option<Quantity> {
        self.push(Node::Const(value), dim, value, span)
    }

    /// Compiles an expression; `None` means an error was reported (or an operand was already bad).
    pub fn expr(&mut self, e: &Expr, names: &dyn Names) -> Option<Quantity> {
        match &e.kind {
            ExprKind::Error => None,
            ExprKind::Paren(inner) => self.expr(inner, names),
            ExprKind::Number {
                value,
                unit,
                percent,
                ..
            } => {
                let mut v = *value;
                let mut dim = Dim::NONE;
                if let Some(unit) = unit {
                    match units::eval_unit(unit) {
                        Ok(atom) => {
                            v *= atom.factor;
                            dim = atom.dim;
                        }
                        Err((span, err)) => {
                            self.unit_error(
                                span,
                                err,
                                unit.terms
                                    .iter()
                                    .find(|t| t.atom_span == span)
                                    .map(|t| t.atom.as_str()),
                            );
                            return None;
                        }
                    }
                }
                if *percent {
                    v *= 0.01;
                }
                self.constant(v, dim, e.span)
            }
            ExprKind::Name(ident) => match names.resolve(&ident.name) {
                Resolved::Value(q) => Some(q),
                Resolved::Poisoned => None,
                Resolved::NotAValue(what) => {
                    self.diags.push(Diagnostic::new(
                        Code::NotAValue,
                        ident.span,
                        format!(
                            "`{}` is {what}, which has no single value to compute with",
                            ident.name
                        ),
                    ));
                    None
                }
                Resolved::Unknown if ident.name == "pi" => {
                    self.constant(std::f64::consts::PI, Dim::NONE, e.span)
                }
                Resolved::Unknown => {
                    let cands = names.candidates();
                    let mut d = Diagnostic::new(
                        Code::UnknownName,
                        ident.span,
                        format!(
                            "unknown name `{}`: no value, mass, inertia, spring or damper is called that",
                            ident.name
                        ),
                    );
                    let pool = cands.iter().copied().chain(["pi"]);
                    if let Some(s) = did_you_mean(&ident.name, pool) {
                        d = d.with_help(format!("did you mean `{s}`?"));
                    } else if units::lookup_atom(&ident.name).is_ok() {
                        d = d.with_help(format!(
                            "`{}` is a unit; a unit goes right after a number, as in `1 {}`",
                            ident.name, ident.name
                        ));
                    }
                    self.diags.push(d);
                    None
                }
            },
            ExprKind::Neg(inner) => {
                let q = self.expr(inner, names)?;
                self.push(Node::Neg(q.formula), q.dim, -q.nominal, e.span)
            }
            ExprKind::Binary { op, lhs, rhs } => {
                let a = self.expr(lhs, names);
                let b = self.expr(rhs, names);
                let (a, b) = (a?, b?);
                self.binary(*op, a, b, lhs.span, rhs.span, e.span)
            }
            ExprKind::Call { func, args } => {
                let qs: Vec<Option<Quantity>> = args.iter().map(|a| self.expr(a, names)).collect();
                self.call(&func.name, func.span, args, qs, e.span)
            }
        }
    }

    fn unit_error(&mut self, span: Span, err: UnitError, text: Option<&str>) {
        let d = match err {
            UnitError::AmbiguousPound => Diagnostic::new(
                Code::AmbiguousPound,
                span,
                format!(
                    "`{}` is ambiguous: it could be the pound-mass or the pound-force",
                    text.unwrap_or("lb")
                ),
            )
            .with_help("write `lbm` for the pound-mass or `lbf` for the pound-force"),
            UnitError::ExponentTooLarge => Diagnostic::new(
                Code::BadPower,
                span,
                "this unit's exponent is larger than any physical quantity has",
            ),
            UnitError::FactorOutOfRange => Diagnostic::new(
                Code::NotFinite,
                span,
                "this unit's conversion factor overflows a floating-point number",
            ),
            UnitError::Unknown { atom, suggestion } => {
                let d = Diagnostic::new(Code::UnknownUnit, span, format!("unknown unit `{atom}`"));
                match suggestion {
                    Some(s) => d.with_help(format!("did you mean `{s}`?")),
                    None => {
                        d.with_help("see the unit table in the README; units are case-sensitive")
                    }
                }
            }
        };
        self.diags.push(d);
    }

    fn binary(
        &mut self,
        op: BinaryOp,
        a: Quantity,
        b: Quantity,
        sa: Span,
        sb: Span,
        span: Span,
    ) -> Option<Quantity> {
        match op {
            BinaryOp::Add | BinaryOp::Sub => {
                if a.dim != b.dim {
                    let verb = if op == BinaryOp::Add {
                        "add"
                    } else {
                        "subtract"
                    };
                    self.diags.push(
                        Diagnostic::new(
                            Code::DimensionMismatch,
                            span,
                            format!(
                                "cannot {verb} {} and {}",
                                a.dim.describe(),
                                b.dim.describe()
                            ),
                        )
                        .with_label(sa, format!("this is {}", a.dim.describe()))
                        .with_label(sb, format!("this is {}", b.dim.describe())),
                    );
                    return None;
                }
                let (node, v) = if op == BinaryOp::Add {
                    (Node::Add(a.formula, b.formula), a.nominal + b.nominal)
                } else {
                    (Node::Sub(a.formula, b.formula), a.nominal - b.nominal)
                };
                self.push(node, a.dim, v, span)
            }
            BinaryOp::Mul | BinaryOp::Div => {
                let dim = if op == BinaryOp::Mul {
                    a.dim.times(b.dim)
                } else {
                    a.dim.per(b.dim)
                };
                let Some(dim) = dim else {
                    self.diags.push(Diagnostic::new(
                        Code::BadPower,
                        span,
                        "the dimension exponents of this product grow beyond what any physical quantity has",
                    ));
                    return None;
                };
                let (node, v) = if op == BinaryOp::Mul {
                    (Node::Mul(a.formula, b.formula), a.nominal * b.nominal)
                } else {
                    if b.nominal == 0.0 {
                        self.diags
                            .push(Diagnostic::new(Code::NotFinite, sb, "division by zero"));
                        return None;
                    }
                    (Node::Div(a.formula, b.formula), a.nominal / b.nominal)
                };
                self.push(node, dim, v, span)
            }
            BinaryOp::Pow => {
                if !b.dim.is_none() {
                    self.diags.push(Diagnostic::new(
                        Code::BadPower,
                        sb,
                        format!(
                            "an exponent must be a plain number, found {}",
                            b.dim.describe()
                        ),
                    ));
                    return None;
                }
                let dim = if a.dim.is_none() {
                    Dim::NONE
                } else {
                    let e = b.nominal;
                    let whole = (e - e.round()).abs() < 1e-9 && e.abs() <= 64.0;
                    if !whole || is_tolerant(self.formulas, &b) {
                        self.diags.push(
                            Diagnostic::new(
                                Code::BadPower,
                                sb,
                                format!(
                                    "{} can only be raised to a fixed whole-number power, found exponent {e}",
                                    a.dim.describe()
                                ),
                            )
                            .with_help("use `sqrt(...)` for a square root of an even-powered quantity"),
                        );
                        return None;
                    }
                    match a.dim.powi(e.round() as i32) {
                        Some(d) => d,
                        None => {
                            self.diags.push(Diagnostic::new(
                                Code::BadPower,
                                span,
                                "the dimension exponents of this power grow beyond what any physical quantity has",
                            ));
                            return None;
                        }
                    }
                };
                self.push(
                    Node::Pow(a.formula, b.formula),
                    dim,
                    a.nominal.powf(b.nominal),
                    span,
                )
            }
        }
    }

    fn call(
        &mut self,
        name: &str,
        name_span: Span,
        args: &[Expr],
        qs: Vec<Option<Quantity>>,
        span: Span,
    ) -> Option<Quantity> {
        if !FUNCTIONS.contains(&name) {
            let mut d = Diagnostic::new(
                Code::UnknownFunction,
                name_span,
                format!("unknown function `{name}`"),
            );
            d = match did_you_mean(name, FUNCTIONS.iter().copied()) {
                Some(s) => d.with_help(format!("did you mean `{s}`?")),
                None => d.with_help(format!("the functions are {}", FUNCTIONS.join(", "))),
            };
            self.diags.push(d);
            return None;
        }
        let variadic = matches!(name, "min" | "max");
        let arity_ok = if variadic {
            args.len() >= 2
        } else {
            args.len() == 1
        };
        if !arity_ok {
            let expected = if variadic {
                "two or more arguments"
            } else {
                "exactly one argument"
            };
            self.diags.push(Diagnostic::new(
                Code::WrongArity,
                span,
                format!("`{name}` takes {expected}, found {}", args.len()),
            ));
            return None;
        }
        let qs: Vec<Quantity> = qs.into_iter().collect::<Option<Vec<_>>>()?;
        if variadic {
            let dim = qs[0].dim;
            if let Some((i, q)) = qs.iter().enumerate().find(|(_, q)| q.dim != dim) {
                self.diags.push(
                    Diagnostic::new(
                        Code::DimensionMismatch,
                        args[i].span,
                        format!(
                            "`{name}` needs arguments of one kind: expected {}, found {}",
                            dim.describe(),
                            q.dim.describe()
                        ),
                    )
                    .with_label(args[0].span, format!("this is {}", dim.describe())),
                );
                return None;
            }
            let ids = qs.iter().map(|q| q.formula).collect();
            let vals = qs.iter().map(|q| q.nominal);
            return if name == "min" {
                let v = vals.fold(f64::INFINITY, f64::min);
                self.push(Node::Min(ids), dim, v, span)
            } else {
                let v = vals.fold(f64::NEG_INFINITY, f64::max);
                self.push(Node::Max(ids), dim, v, span)
            };
        }
        let q = qs[0];
        let func = Func::from_name(name)?;
        let dim = match func {
            Func::Sqrt => match q.dim.sqrt() {
                Some(d) => d,
                None => {
                    self.diags.push(Diagnostic::new(
                        Code::BadPower,
                        args[0].span,
                        format!(
                            "cannot take the square root of {}: its dimension has an odd exponent",
                            q.dim.describe()
                        ),
                    ));
                    return None;
                }
            },
            Func::Abs => q.dim,
            _ => {
                if !q.dim.is_none() {
                    self.diags.push(Diagnostic::new(
                        Code::DimensionMismatch,
                        args[0].span,
                        format!("`{name}` needs a plain number, found {}", q.dim.describe()),
                    ));
                    return None;
                }
                Dim::NONE
            }
        };
        let v = match func {
            Func::Sqrt => q.nominal.sqrt(),
            Func::Abs => q.nominal.abs(),
            Func::Exp => q.nominal.exp(),
            Func::Ln => q.nominal.ln(),
            Func::Log10 => q.nominal.log10(),
            Func::Sin => q.nominal.sin(),
            Func::Cos => q.nominal.cos(),
            Func::Tan => q.nominal.tan(),
        };
        self.push(Node::Call(func, q.formula), dim, v, span)
    }

    /// Compiles `EXPR [± TOL]`; a tolerance becomes a parameter named `owner`.
    pub fn value(&mut self, v: &Value, owner: &str, names: &dyn Names) -> Option<Quantity> {
        let base = self.expr(&v.expr, names);
        let Some(tol_expr) = &v.tolerance else {
            return base;
        };
        let tol = self.expr(tol_expr, names);
        let (base, tol) = (base?, tol?);
        let tol_span = tol_expr.span;
        if is_tolerant(self.formulas, &tol) {
            self.diags.push(Diagnostic::new(
                Code::BadTolerance,
                tol_span,
                "a tolerance must be a fixed amount, not itself toleranced",
            ));
            return None;
        }
        let kind = if has_percent(tol_expr) && tol.dim.is_none() {
            ToleranceKind::Relative
        } else if tol.dim == base.dim {
            ToleranceKind::Absolute
        } else if tol.dim.is_none() {
            self.diags.push(
                Diagnostic::new(
                    Code::BadTolerance,
                    tol_span,
                    format!(
                        "a tolerance on {} needs `%` (relative) or the value's own unit (absolute), found a plain number",
                        base.dim.describe()
                    ),
                )
                .with_help(format!("write `± {}%` or `± {} {}`", tol.nominal * 100.0, tol.nominal, base.dim.si_unit())),
            );
            return None;
        } else {
            self.diags.push(
                Diagnostic::new(
                    Code::BadTolerance,
                    tol_span,
                    format!(
                        "the tolerance is {} but the value is {}",
                        tol.dim.describe(),
                        base.dim.describe()
                    ),
                )
                .with_label(v.expr.span, format!("this is {}", base.dim.describe())),
            );
            return None;
        };
        let amount = tol.nominal;
        if amount < 0.0 || (kind == ToleranceKind::Relative && amount >= 1.0) {
            let what = if amount < 0.0 {
                "a tolerance cannot be negative".to_string()
            } else {
                format!(
                    "a relative tolerance of {}% would let the value reach zero or change sign",
                    amount * 100.0
                )
            };
            self.diags
                .push(Diagnostic::new(Code::BadTolerance, tol_span, what));
            return None;
        }
        let param = self.params.len();
        self.params.push(Param {
            name: owner.to_string(),
            span: tol_span,
            kind,
            low: -amount,
            high: amount,
        });
        let node = match kind {
            ToleranceKind::Relative => Node::Relative {
                base: base.formula,
                param,
            },
            ToleranceKind::Absolute => Node::Absolute {
                base: base.formula,
                param,
            },
        };
        self.push(node, base.dim, base.nominal, v.span)
    }
}

/// Whether the expression is written with a `%` literal (which makes a tolerance relative).
fn has_percent(e: &Expr) -> bool {
    match &e.kind {
        ExprKind::Number { percent, .. } => *percent,
        ExprKind::Paren(x) | ExprKind::Neg(x) => has_percent(x),
        ExprKind::Binary { lhs, rhs, .. } => has_percent(lhs) || has_percent(rhs),
        ExprKind::Call { args, .. } => args.iter().any(has_percent),
        ExprKind::Name(_) | ExprKind::Error => false,
    }
}
