//! Dimensions as exponent vectors over mass, length and time (language.md §3). The radian is
//! dimensionless, so angles, cycles and revolutions carry only a numeric factor.

use std::fmt;

/// Exponents of M, L and T.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default, serde::Serialize)]
pub struct Dim {
    pub m: i16,
    pub l: i16,
    pub t: i16,
}

/// Exponents stay far inside `i16`; anything beyond is reported as an error, never wrapped.
pub const MAX_EXPONENT: i16 = 64;

impl Dim {
    pub const NONE: Dim = Dim::new(0, 0, 0);
    pub const MASS: Dim = Dim::new(1, 0, 0);
    pub const LENGTH: Dim = Dim::new(0, 1, 0);
    pub const TIME: Dim = Dim::new(0, 0, 1);
    /// kg·m² (rotational inertia).
    pub const INERTIA: Dim = Dim::new(1, 2, 0);
    /// N = kg·m/s².
    pub const FORCE: Dim = Dim::new(1, 1, -2);
    /// N·m = kg·m²/s² (torque; also energy).
    pub const TORQUE: Dim = Dim::new(1, 2, -2);
    /// N/m = kg/s².
    pub const STIFFNESS: Dim = Dim::new(1, 0, -2);
    /// N·m/rad = kg·m²/s².
    pub const ROTATIONAL_STIFFNESS: Dim = Dim::new(1, 2, -2);
    /// N·s/m = kg/s.
    pub const DAMPING: Dim = Dim::new(1, 0, -1);
    /// N·m·s/rad = kg·m²/s.
    pub const ROTATIONAL_DAMPING: Dim = Dim::new(1, 2, -1);
    /// 1/s (angular or cyclic frequency; the cycle is 2π, a pure number).
    pub const FREQUENCY: Dim = Dim::new(0, 0, -1);
    pub const VELOCITY: Dim = Dim::new(0, 1, -1);
    pub const ACCELERATION: Dim = Dim::new(0, 1, -2);
    /// N·s (impulse).
    pub const IMPULSE: Dim = Dim::new(1, 1, -1);
    /// N·m·s (angular impulse).
    pub const ANGULAR_IMPULSE: Dim = Dim::new(1, 2, -1);

    pub const fn new(m: i16, l: i16, t: i16) -> Dim {
        Dim { m, l, t }
    }

    pub fn is_none(self) -> bool {
        self == Dim::NONE
    }

    /// The product's dimension, or `None` when an exponent would leave the allowed range.
    pub fn times(self, o: Dim) -> Option<Dim> {
        Dim::checked(self.m + o.m, self.l + o.l, self.t + o.t)
    }

    pub fn per(self, o: Dim) -> Option<Dim> {
        Dim::checked(self.m - o.m, self.l - o.l, self.t - o.t)
    }

    pub fn powi(self, n: i32) -> Option<Dim> {
        let f = |e: i16| {
            i32::from(e)
                .checked_mul(n)
                .and_then(|v| i16::try_from(v).ok())
        };
        Dim::checked(f(self.m)?, f(self.l)?, f(self.t)?)
    }

    /// Halves every exponent; `None` when one is odd.
    pub fn sqrt(self) -> Option<Dim> {
        if self.m % 2 != 0 || self.l % 2 != 0 || self.t % 2 != 0 {
            return None;
        }
        Some(Dim::new(self.m / 2, self.l / 2, self.t / 2))
    }

    fn checked(m: i16, l: i16, t: i16) -> Option<Dim> {
        let ok = |e: i16| e.abs() <= MAX_EXPONENT;
        (ok(m) && ok(l) && ok(t)).then_some(Dim::new(m, l, t))
    }

    /// A name for the quantity when it is a familiar one (`a stiffness (N/m)`), else the SI
    /// base-unit expression.
    pub fn describe(self) -> String {
        match self.quantity_name() {
            Some(name) => format!("{name} ({})", self.si_unit()),
            None if self.is_none() => "a plain number".to_string(),
            None => format!("a quantity in {}", self.si_unit()),
        }
    }

    /// The familiar name of this dimension, if it has one. Several quantities share a
    /// dimension (torque and rotational stiffness); the name lists both.
    pub fn quantity_name(self) -> Option<&'static str> {
        Some(match self {
            Dim::MASS => "a mass",
            Dim::LENGTH => "a length",
            Dim::TIME => "a time",
            Dim::INERTIA => "a rotational inertia",
            Dim::FORCE => "a force",
            Dim::TORQUE => "a torque or rotational stiffness",
            Dim::STIFFNESS => "a stiffness",
            Dim::DAMPING => "a damping coefficient",
            Dim::ROTATIONAL_DAMPING => "a rotational damping coefficient or angular impulse",
            Dim::FREQUENCY => "a frequency",
            Dim::VELOCITY => "a velocity",
            Dim::ACCELERATION => "an acceleration",
            Dim::IMPULSE => "an impulse",
            _ => return None,
        })
    }

    /// The dimension written in SI: a derived unit where one reads naturally, else base units.
    pub fn si_unit(self) -> String {
        let named = match self {
            Dim::NONE => Some("1"),
            Dim::FORCE => Some("N"),
            Dim::TORQUE => Some("N*m"),
            Dim::STIFFNESS => Some("N/m"),
            Dim::DAMPING => Some("N*s/m"),
            Dim::ROTATIONAL_DAMPING => Some("N*m*s"),
            Dim::IMPULSE => Some("N*s"),
            Dim::FREQUENCY => Some("1/s"),
            Dim::INERTIA => Some("kg*m^2"),
            _ => None,
        };
        if let Some(n) = named {
            return n.to_string();
        }
        let mut num = Vec::new();
        let mut den = Vec::new();
        for (sym, e) in [("kg", self.m), ("m", self.l), ("s", self.t)] {
            let part = |e: i16| {
                if e == 1 {
                    sym.to_string()
                } else {
                    format!("{sym}^{e}")
                }
            };
            match e.cmp(&0) {
                std::cmp::Ordering::Greater => num.push(part(e)),
                std::cmp::Ordering::Less => den.push(part(-e)),
                std::cmp::Ordering::Equal => {}
            }
        }
        let num = if num.is_empty() {
            "1".to_string()
        } else {
            num.join("*")
        };
        if den.is_empty() {
            num
        } else {
            format!("{num}/{}", den.join("/"))
        }
    }
}

impl fmt::Display for Dim {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.si_unit())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn algebra() {
        assert_eq!(Dim::FORCE.per(Dim::LENGTH), Some(Dim::STIFFNESS));
        assert_eq!(
            Dim::STIFFNESS.per(Dim::MASS).and_then(Dim::sqrt),
            Some(Dim::FREQUENCY)
        );
        assert_eq!(Dim::MASS.sqrt(), None);
        assert_eq!(Dim::LENGTH.powi(100), None);
        assert_eq!(Dim::new(1, 3, -2).si_unit(), "kg*m^3/s^2");
        assert_eq!(Dim::new(0, -1, 0).si_unit(), "1/m");
        assert_eq!(Dim::STIFFNESS.describe(), "a stiffness (N/m)");
    }
}
