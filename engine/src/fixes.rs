//! Answers that quick fixes need from the unit registry, so that the tools never guess a unit
//! rule: which unit to add to a bare number where a diagnostic says what its place expects.

use std::collections::HashMap;

use sprung_syntax::ast::{Expr, ExprKind, File};

use crate::diagnostics::ExpectedUnit;
use crate::dim::Dim;
use crate::units;

/// The unit to write after a bare number whose place expects `expected`: the unit the file
/// already writes most often for that dimension (the first written wins a tie), else the SI
/// spelling the diagnostic carries (`Hz` for frequencies). Torque and rotational stiffness
/// share a dimension, so where the expected spelling is per angle (`N*m/rad`) only units per
/// angle count, and the other way round.
pub fn unit_to_add(file: &File, expected: ExpectedUnit) -> String {
    let per_angle = |text: &str| -> bool {
        text.split(['*', '/'])
            .map(|atom| atom.split('^').next().unwrap_or(atom))
            .any(|atom| units::lookup_atom(atom).is_ok_and(|a| a.dim == Dim::NONE))
    };
    let angle_matters = matches!(expected.dim, Dim::TORQUE | Dim::ROTATIONAL_DAMPING);
    let want_angle = per_angle(expected.unit);
    // Unit text -> (count, first position).
    let mut seen: HashMap<String, (usize, usize)> = HashMap::new();
    for e in file.top_exprs() {
        visit(e, &mut |e| {
            let ExprKind::Number {
                unit: Some(u),
                percent: false,
                ..
            } = &e.kind
            else {
                return;
            };
            let Ok(atom) = units::eval_unit(u) else {
                return;
            };
            let text = u.text();
            if atom.dim != expected.dim || (angle_matters && per_angle(&text) != want_angle) {
                return;
            }
            let entry = seen.entry(text).or_insert((0, u.span.start));
            entry.0 += 1;
            entry.1 = entry.1.min(u.span.start);
        });
    }
    seen.into_iter()
        .max_by(|(_, (n1, at1)), (_, (n2, at2))| n1.cmp(n2).then(at2.cmp(at1)))
        .map_or_else(|| expected.unit.to_string(), |(text, _)| text)
}

/// Calls `f` on `e` and every sub-expression, without recursion (depth is bounded by the
/// parser, but an explicit stack costs nothing).
fn visit<'a>(e: &'a Expr, f: &mut dyn FnMut(&'a Expr)) {
    let mut stack = vec![e];
    while let Some(e) = stack.pop() {
        f(e);
        match &e.kind {
            ExprKind::Neg(a) | ExprKind::Paren(a) => stack.push(a),
            ExprKind::Binary { lhs, rhs, .. } => {
                stack.push(rhs);
                stack.push(lhs);
            }
            ExprKind::Call { args, .. } => stack.extend(args.iter().rev()),
            ExprKind::Number { .. } | ExprKind::Name(_) | ExprKind::Error => {}
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn unit_for(text: &str, dim: Dim, unit: &'static str) -> String {
        let checked = crate::check(text);
        unit_to_add(&checked.parse.file, ExpectedUnit { dim, unit })
    }

    #[test]
    fn the_most_used_unit_of_the_dimension_wins() {
        let text = "system s {\n  mass a = 2 lbm\n  mass b = 3 lbm\n  mass c = 1 kg\n  spring k between a and b = 4 kN/m\n}\n";
        assert_eq!(unit_for(text, Dim::MASS, "kg"), "lbm");
        assert_eq!(unit_for(text, Dim::STIFFNESS, "N/m"), "kN/m");
        // Nothing of the dimension written yet: the SI spelling.
        assert_eq!(unit_for(text, Dim::DAMPING, "N*s/m"), "N*s/m");
    }

    #[test]
    fn ties_go_to_the_first_written_and_angles_are_told_apart() {
        let text = "system s {\n  inertia j = 1 kg*m^2\n  spring t between j and ground = 3 kN*m/rad\n  torque q on j = 5 N*m at 3 Hz\n  force f on j = 2 N at 3 rpm\n}\n";
        // One `Hz` and one `rpm`: the first written.
        assert_eq!(unit_for(text, Dim::FREQUENCY, "Hz"), "Hz");
        // Torque and rotational stiffness share kg*m^2/s^2; the angle decides.
        assert_eq!(unit_for(text, Dim::TORQUE, "N*m/rad"), "kN*m/rad");
        assert_eq!(unit_for(text, Dim::TORQUE, "N*m"), "N*m");
    }
}
