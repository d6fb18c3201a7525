//! Numbers and quantities as hints and hovers show them: a few significant figures in a unit
//! that keeps the number readable (`5.37 kN·s/m`, not `5370 N·s/m`). Unit factors come from the
//! engine's unit registry; this module only chooses which unit to show.

use sprung_engine::dim::Dim;
use sprung_engine::units;

/// `x` with three significant figures, without trailing zeros; scientific outside 1e-3..1e6.
pub fn num(x: f64) -> String {
    sig_figs(x, 3)
}

/// `x` with `figures` significant figures.
pub fn sig_figs(x: f64, figures: i32) -> String {
    if x == 0.0 {
        return "0".to_string();
    }
    if !x.is_finite() {
        return format!("{x}");
    }
    let mag = x.abs().log10().floor() as i32;
    if !(-3..6).contains(&mag) {
        let s = format!("{:.*e}", (figures - 1).max(0) as usize, x);
        // `1.50e3` → `1.5e3`
        if let Some((m, e)) = s.split_once('e') {
            let m = if m.contains('.') {
                m.trim_end_matches('0').trim_end_matches('.')
            } else {
                m
            };
            return format!("{m}e{e}");
        }
        return s;
    }
    let decimals = (figures - 1 - mag).max(0) as usize;
    let s = format!("{x:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// The SI factor of a unit written in the file's own syntax (`kN*s/m`), from the registry.
pub fn unit_factor(unit: &str) -> Option<f64> {
    let mut factor = 1.0;
    let mut op = '*';
    let mut rest = unit;
    loop {
        let end = rest.find(['*', '/']).unwrap_or(rest.len());
        let term = &rest[..end];
        let (atom, exp) = match term.split_once('^') {
            Some((a, e)) => (a, e.parse::<i32>().ok()?),
            None => (term, 1),
        };
        let f = units::lookup_atom(atom).ok()?.factor.powi(exp);
        factor = if op == '*' { factor * f } else { factor / f };
        if end == rest.len() {
            return Some(factor);
        }
        op = rest.as_bytes()[end] as char;
        rest = &rest[end + 1..];
    }
}

/// A unit as shown to a person: `·` for products, superscript squares.
pub fn pretty_unit(unit: &str) -> String {
    unit.replace('*', "·")
        .replace("^-1", "⁻¹")
        .replace("^-2", "⁻²")
        .replace("^2", "²")
        .replace("^3", "³")
        .replace("um", "µm")
}

/// Candidate units for a dimension, smallest first. `rotational` picks the per-radian
/// spellings for torsional springs and dampers.
fn candidates(dim: Dim, rotational: bool) -> &'static [&'static str] {
    match dim {
        Dim::MASS => &["g", "kg", "t"],
        Dim::LENGTH => &["um", "mm", "m"],
        Dim::TIME => &["ms", "s"],
        Dim::INERTIA => &["kg*m^2"],
        Dim::FORCE => &["N", "kN", "MN"],
        Dim::TORQUE if rotational => &["N*m/rad", "kN*m/rad", "MN*m/rad"],
        Dim::TORQUE => &["N*m", "kN*m"],
        Dim::STIFFNESS => &["N/m", "kN/m", "MN/m"],
        Dim::DAMPING => &["N*s/m", "kN*s/m"],
        Dim::ROTATIONAL_DAMPING if rotational => &["N*m*s/rad", "kN*m*s/rad"],
        Dim::ROTATIONAL_DAMPING => &["N*m*s", "kN*m*s"],
        Dim::FREQUENCY => &["Hz", "kHz"],
        Dim::VELOCITY => &["mm/s", "m/s"],
        Dim::ACCELERATION => &["m/s^2"],
        Dim::IMPULSE => &["N*s"],
        _ => &[],
    }
}

/// A value in a readable unit: the largest candidate unit that keeps the number at least 1.
pub fn quantity(si: f64, dim: Dim, rotational: bool) -> String {
    if dim.is_none() {
        return num(si);
    }
    let list = candidates(dim, rotational);
    let scaled: Vec<(&str, f64)> = list
        .iter()
        .filter_map(|u| unit_factor(u).map(|f| (*u, f)))
        .collect();
    let pick = scaled
        .iter()
        .rev()
        .find(|(_, f)| si.abs() / f >= 1.0 - 1e-12)
        .or(scaled.first());
    match pick {
        Some((u, f)) => format!("{} {}", num(si / f), pretty_unit(u)),
        None => format!("{} {}", num(si), pretty_unit(&dim.si_unit())),
    }
}

/// An angle (rad) in µrad, mrad or rad, whichever keeps the number at least 1.
pub fn angle(rad: f64) -> String {
    let pick = ["rad", "mrad", "urad"]
        .iter()
        .filter_map(|u| unit_factor(u).map(|f| (*u, f)))
        .find(|(_, f)| rad.abs() / f >= 1.0 - 1e-12);
    match pick {
        Some((u, f)) => format!("{} {}", num(rad / f), u.replace("urad", "µrad")),
        None => format!("{} rad", num(rad)),
    }
}

/// The motion of a coordinate: a length for a mass, an angle for an inertia.
pub fn motion(si: f64, rotational: bool) -> String {
    if rotational {
        angle(si)
    } else {
        quantity(si, Dim::LENGTH, false)
    }
}

/// The force (or torque, for a rotational coordinate) a coordinate's elements carry.
pub fn load(si: f64, rotational: bool) -> String {
    let dim = if rotational { Dim::TORQUE } else { Dim::FORCE };
    quantity(si, dim, false)
}

/// A phase angle in degrees, one decimal.
pub fn degrees(rad: f64) -> String {
    let d = rad.to_degrees();
    // −0.0 and a value that rounds to −0.0 read as 0.
    let d = if d.abs() < 0.05 { 0.0 } else { d };
    format!("{d:.1}°")
}

/// A value in SI, four significant figures.
pub fn si(si: f64, dim: Dim) -> String {
    if dim.is_none() {
        return sig_figs(si, 4);
    }
    format!("{} {}", sig_figs(si, 4), pretty_unit(&dim.si_unit()))
}

/// An angular frequency (rad/s) in hertz.
pub fn hz(rad_per_s: f64) -> String {
    format!("{} Hz", num(rad_per_s / std::f64::consts::TAU))
}

/// A ratio as a percentage.
pub fn percent(ratio: f64) -> String {
    format!("{}%", sig_figs(ratio * 100.0, 3))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_keep_three_figures() {
        assert_eq!(num(5366.56), "5367");
        assert_eq!(num(5.36656), "5.37");
        assert_eq!(num(0.05), "0.05");
        assert_eq!(num(1.5e7), "1.5e7");
        assert_eq!(num(0.0), "0");
    }

    #[test]
    fn quantities_pick_a_readable_unit() {
        // 5366.56 N·s/m = 5.37 kN·s/m (kN = 1000 N, SI prefix).
        assert_eq!(quantity(5366.56, Dim::DAMPING, false), "5.37 kN·s/m");
        assert_eq!(quantity(40_000.0, Dim::STIFFNESS, false), "40 kN/m");
        assert_eq!(quantity(0.004, Dim::LENGTH, false), "4 mm");
        // 2π rad/s is 1 Hz (Hz = cycle/s, cycle = 2π rad).
        assert_eq!(
            quantity(std::f64::consts::TAU * 10.0, Dim::FREQUENCY, false),
            "10 Hz"
        );
        assert_eq!(quantity(0.5, Dim::NONE, false), "0.5");
        assert_eq!(quantity(250.0, Dim::TORQUE, true), "250 N·m/rad");
    }

    #[test]
    fn angles_and_loads_pick_a_readable_unit() {
        // mrad = 1e-3 rad, µrad = 1e-6 rad (SI prefixes on the radian).
        assert_eq!(angle(0.0042), "4.2 mrad");
        assert_eq!(angle(0.00042), "420 µrad");
        assert_eq!(angle(4.2e-5), "42 µrad");
        assert_eq!(angle(1.5), "1.5 rad");
        assert_eq!(motion(0.0042, false), "4.2 mm");
        assert_eq!(load(2500.0, false), "2.5 kN");
        assert_eq!(load(12.0, true), "12 N·m");
        assert_eq!(degrees(-std::f64::consts::FRAC_PI_2), "-90.0°");
        assert_eq!(degrees(-1e-9), "0.0°");
    }
}
