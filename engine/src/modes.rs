//! Modal analysis of M ẍ + C ẋ + K x = 0 (language.md §4): undamped modes, damped roots, and
//! per mode the natural frequency, damping ratio, regime and derived figures.
//!
//! # Method
//!
//! 1. **Undamped modes**: K φ = ω² M φ through [`eigen::generalized_symmetric`]; ω² ascending,
//!    shapes mass-normalised (φᵀ M φ = 1), each signed so that its largest-magnitude entry is
//!    positive (the first one, in dof order, of entries equal in magnitude to rounding). A mode is a **rigid-body** mode when |ω²| ≤ `rigid_tolerance` (1e-10) × the
//!    largest |ω²| (so every mode is rigid when K = 0).
//! 2. **Damped roots** are the eigenvalues of the state matrix [[0, I], [−M⁻¹K, −M⁻¹C]]. We use
//!    it in undamped modal coordinates x = Φ q, which is a similarity transform
//!    (Φ⁻¹ = Φᵀ M), so the eigenvalues are the same: [[0, I], [−Ω², −D]] with D = Φᵀ C Φ;
//!    each q-coordinate is further scaled by its natural frequency (z = Ω q, rigid modes by the
//!    largest ω) so that every entry is of the order of a frequency, not of its square.
//!    - If C is the zero matrix, every root is exactly ±iω and every elastic mode `undamped`.
//!    - Modes i and j are **coupled by damping** when |Dᵢⱼ| > `coupling_tolerance` (1e-10) ×
//!      max |D|. With M diagonal, D is not formed when a bound on each of its columns already
//!      shows every pair uncoupled (see `classical_diagonal`); only its diagonal is computed. A mode coupled to no other (every mode, when damping is classical, e.g.
//!      Rayleigh C = αM + βK) spans an exact invariant 2×2 block of the state matrix: its two
//!      roots are those of s² + Dⱼⱼ s + ωⱼ², solved in closed form by the stable quadratic
//!      formula. This is exact at critical damping, where the state matrix has a defective
//!      double root and a general eigensolver splits it by ~√eps.
//!    - Each group of coupled modes (a connected component of the coupling graph) is solved as
//!      one state matrix by [`eigen::general`], with eigenvectors, and its roots are assigned
//!      to its modes as below.
//! 3. **Assignment** (coupled groups only): a root is real when |Im λ| ≤ `real_tolerance`
//!    (1e-7) × |λ|; a complex root and its conjugate form one unit of weight 2, a real root a
//!    unit of weight 1. The similarity of a root to mode j is the M-weighted modal assurance
//!    criterion of its displacement part u = Φ q to φⱼ, |φⱼᵀ M u|² / ((φⱼᵀ M φⱼ)(uᴴ M u)),
//!    which in modal coordinates is |qⱼ|² / ‖q‖². Every mode has 2 slots. Units are assigned
//!    greedily, most similar (unit, mode) first, to a mode with enough free slots; a real root
//!    is refused a still-empty mode if that would leave too few empty modes for the complex
//!    pairs not yet placed. A final pass places any refused unit in its most similar mode that
//!    has room (pairs first), so every mode receives exactly two roots. Sort order plays no
//!    part.
//! 4. **Per mode**, from its two roots λ₁, λ₂: S = λ₁ + λ₂, P = λ₁λ₂ (real numbers); ωn = √P
//!    and ζ = −S / (2√P) (for a complex pair: |λ| and −Re λ/|λ|). Sum and product stay accurate
//!    where the separate roots do not (critical damping).
//! 5. **Regime**: `rigid_body` for a rigid mode (ωn reported as 0; `unstable` instead if its
//!    moving root is positive, S > 0 beyond rounding); `unstable` when P < 0 (negative
//!    stiffness) or ζ < −`undamped_tolerance` (negative damping), i.e. whenever a root has
//!    Re λ > 0; `undamped` when |ζ| ≤ `undamped_tolerance` (1e-12), with ζ then reported as
//!    exactly 0 (a mode that no damper feels gives a ζ of rounding size, not a damped mode);
//!    `critically_damped` when |ζ − 1| ≤ ε (1e-6); `underdamped` below, `overdamped` above.
//! 6. **Derived**: damped frequency ωd = ωn√(1−ζ²) for undamped and underdamped modes (none when
//!    the mode does not oscillate: critical, overdamped, rigid; for an unstable complex pair,
//!    |Im λ|); Q = 1/(2ζ), decay time constant 1/(ζωn) for damped stable modes (none when
//!    ζ = 0: infinite); logarithmic decrement 2πζ/√(1−ζ²) for undamped (0) and underdamped
//!    modes.

use nalgebra::{DMatrix, DVector};
use nalgebra_sparse::CscMatrix;

use crate::assemble::Matrices;
use crate::eigen::{self, Complex64, EigenError};

/// How the damped roots are found.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DampedMethod {
    /// Closed form for modes that damping does not couple, state matrix for the rest.
    Auto,
    /// One state matrix for all modes, whatever the damping (for validating the general path).
    StateSpace,
}

#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ModalConfig {
    /// The half-width of the critically damped band: |ζ − 1| ≤ ε.
    pub epsilon: f64,
    /// A root is real when |Im λ| ≤ `real_tolerance` × |λ|.
    pub real_tolerance: f64,
    /// A mode is rigid when |ω²| ≤ `rigid_tolerance` × max |ω²|.
    pub rigid_tolerance: f64,
    /// A mode is undamped when |ζ| ≤ `undamped_tolerance`.
    pub undamped_tolerance: f64,
    /// Modes i, j are coupled by damping when |Dᵢⱼ| > `coupling_tolerance` × max |D|.
    pub coupling_tolerance: f64,
    pub method: DampedMethod,
}

impl Default for ModalConfig {
    fn default() -> Self {
        ModalConfig {
            epsilon: 1e-6,
            real_tolerance: 1e-7,
            rigid_tolerance: 1e-10,
            undamped_tolerance: 1e-12,
            coupling_tolerance: 1e-10,
            method: DampedMethod::Auto,
        }
    }
}

/// The regime of one mode, spelt as in the JSON contract (language.md §7).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ModeRegime {
    Undamped,
    Underdamped,
    CriticallyDamped,
    Overdamped,
    RigidBody,
    Unstable,
}

impl ModeRegime {
    /// The JSON spelling (`critically_damped`).
    pub fn as_str(self) -> &'static str {
        match self {
            ModeRegime::Undamped => "undamped",
            ModeRegime::Underdamped => "underdamped",
            ModeRegime::CriticallyDamped => "critically_damped",
            ModeRegime::Overdamped => "overdamped",
            ModeRegime::RigidBody => "rigid_body",
            ModeRegime::Unstable => "unstable",
        }
    }
}

/// How damping couples the modes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DampingKind {
    /// C = 0.
    None,
    /// Φᵀ C Φ is diagonal: every mode's roots in closed form.
    Classical,
    /// Some modes are coupled by damping and were solved as a state matrix.
    NonClassical,
}

/// One mode: an undamped shape and the two damped roots assigned to it.
#[derive(Clone, Debug)]
pub struct Mode {
    /// 1-based, in ascending order of ω².
    pub index: usize,
    /// The undamped eigenvalue ω² (rad²/s²); negative for a negative-stiffness mode.
    pub omega2: f64,
    /// The undamped natural frequency √ω² (rad/s); 0 for rigid and negative ω².
    pub undamped_frequency: f64,
    /// ωn = √|λ₁λ₂| (rad/s); 0 for a rigid-body mode.
    pub natural_frequency: f64,
    pub natural_frequency_hz: f64,
    /// ζ = −(λ₁+λ₂)/(2ωn); `None` for a rigid-body mode.
    pub damping_ratio: Option<f64>,
    /// ωd (rad/s); `None` when the mode does not oscillate.
    pub damped_frequency: Option<f64>,
    pub damped_frequency_hz: Option<f64>,
    /// Q = 1/(2ζ); `None` when infinite or undefined.
    pub quality_factor: Option<f64>,
    /// 1/(ζωn) in seconds; `None` when infinite or undefined.
    pub decay_time_constant: Option<f64>,
    /// 2πζ/√(1−ζ²); `None` when the mode does not oscillate.
    pub log_decrement: Option<f64>,
    pub regime: ModeRegime,
    /// The two roots assigned to this mode.
    pub roots: [Complex64; 2],
    /// The smaller of the two roots' similarity (MAC) to this mode's shape; 1 for a mode whose
    /// roots were found in closed form.
    pub assignment_mac: f64,
    /// The undamped shape, mass-normalised (φᵀ M φ = 1), largest-magnitude entry positive.
    pub shape: DVector<f64>,
}

impl Mode {
    /// The shape scaled so that its largest-magnitude entry is +1 (the JSON `shape`); computed
    /// on demand rather than stored, since a 1,000-mode result would hold n² more numbers.
    pub fn shape_unit(&self) -> Vec<f64> {
        let peak = self.shape.iter().fold(0.0_f64, |a, x| a.max(x.abs()));
        self.shape
            .iter()
            .map(|x| if peak > 0.0 { x / peak } else { 0.0 })
            .collect()
    }
}

#[derive(Clone, Debug)]
pub struct ModalResult {
    pub modes: Vec<Mode>,
    pub damping: DampingKind,
}

impl ModalResult {
    /// All 2n roots, mode by mode.
    pub fn roots(&self) -> Vec<Complex64> {
        self.modes.iter().flat_map(|m| m.roots).collect()
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum ModalError {
    Eigen(EigenError),
    /// The roots could not be shared out two per mode (should not happen; never a panic).
    Assignment,
}

impl std::fmt::Display for ModalError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ModalError::Eigen(e) => e.fmt(f),
            ModalError::Assignment => {
                f.write_str("the damped roots could not be assigned two per mode")
            }
        }
    }
}

impl std::error::Error for ModalError {}

impl From<EigenError> for ModalError {
    fn from(e: EigenError) -> Self {
        ModalError::Eigen(e)
    }
}

/// Modal analysis of one assembled system.
pub fn analyze(mats: &Matrices, config: &ModalConfig) -> Result<ModalResult, ModalError> {
    let n = mats.dofs();
    if (mats.c.nrows(), mats.c.ncols()) != (n, n) || (mats.k.nrows(), mats.k.ncols()) != (n, n) {
        return Err(EigenError::Shape.into());
    }
    if n == 0 {
        return Ok(ModalResult {
            modes: vec![],
            damping: DampingKind::None,
        });
    }
    let und = eigen::generalized_symmetric_sparse(&mats.k, &mats.m)?;
    let mut shapes = und.shapes;
    for j in 0..n {
        let mut col = shapes.column_mut(j);
        // The first entry within rounding of the largest magnitude decides the sign, so that
        // a shape with two equal-magnitude extremes (an antisymmetric mode) is signed the same
        // way on every machine.
        let peak = col.iter().fold(0.0_f64, |a, x| a.max(x.abs()));
        let lead = (0..n)
            .find(|&i| col[i].abs() >= peak * (1.0 - 1e-9))
            .unwrap_or(0);
        if col[lead] < 0.0 {
            col.neg_mut();
        }
    }
    let omega2 = und.omega2;
    let scale = omega2.iter().fold(0.0_f64, |a, w| a.max(w.abs()));
    let rigid: Vec<bool> = omega2
        .iter()
        .map(|w| w.abs() <= config.rigid_tolerance * scale)
        .collect();
    let omega_max = if scale > 0.0 { scale.sqrt() } else { 1.0 };

    // (S, P, roots, mac) per mode.
    let mut pairs: Vec<Option<([Complex64; 2], f64)>> = vec![None; n];
    let damping;
    if mats.c.values().iter().all(|&x| x == 0.0) {
        damping = DampingKind::None;
        for j in 0..n {
            pairs[j] = Some((quadratic_roots(0.0, omega2[j]), 1.0));
        }
    } else if let Some(diag) = (config.method == DampedMethod::Auto)
        .then(|| classical_diagonal(&shapes, &mats.c, &mats.m, config.coupling_tolerance))
        .flatten()
    {
        damping = DampingKind::Classical;
        for j in 0..n {
            pairs[j] = Some((quadratic_roots(diag[j], omega2[j]), 1.0));
        }
    } else {
        let d = eigen::congruence_sparse(&shapes, &mats.c)?;
        let d = DMatrix::from_fn(n, n, |i, j| 0.5 * (d[(i, j)] + d[(j, i)]));
        let groups = match config.method {
            DampedMethod::StateSpace => vec![(0..n).collect()],
            DampedMethod::Auto => coupled_groups(&d, config.coupling_tolerance),
        };
        damping = if config.method == DampedMethod::Auto && groups.iter().all(|g| g.len() == 1) {
            DampingKind::Classical
        } else {
            DampingKind::NonClassical
        };
        for group in groups {
            if let [j] = group[..]
                && config.method == DampedMethod::Auto
            {
                pairs[j] = Some((quadratic_roots(d[(j, j)], omega2[j]), 1.0));
            } else {
                let assigned = solve_group(&group, &omega2, &rigid, omega_max, &d, config)?;
                for (j, roots) in group.iter().zip(assigned) {
                    pairs[*j] = Some(roots);
                }
            }
        }
    }

    let mut modes = Vec::with_capacity(n);
    for j in 0..n {
        let (roots, mac) = pairs[j].ok_or(ModalError::Assignment)?;
        let shape: DVector<f64> = shapes.column(j).into_owned();
        modes.push(characterise(
            j + 1,
            omega2[j],
            rigid[j],
            omega_max,
            roots,
            mac,
            shape,
            config,
        ));
    }
    Ok(ModalResult { modes, damping })
}

/// The roots of s² + c s + k = 0 by the stable quadratic formula: no cancellation between
/// −c/2 and the square root, the discriminant by a fused multiply-add, and the smaller root
/// from the product k. (ζ and ωn come from c and k directly, not from these roots.)
fn quadratic_roots(c: f64, k: f64) -> [Complex64; 2] {
    let h = 0.5 * c;
    // h² − k with a single rounding: accurate even where the two nearly cancel.
    let disc = h.mul_add(h, -k);
    if disc < 0.0 {
        let im = (-disc).sqrt();
        [Complex64::new(-h, im), Complex64::new(-h, -im)]
    } else {
        let q = -(h + h.signum() * disc.sqrt());
        if q == 0.0 {
            [Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0)]
        } else {
            [Complex64::new(q, 0.0), Complex64::new(k / q, 0.0)]
        }
    }
}

/// The diagonal of D = Φᵀ C Φ, when the damping is classical by the coupling test of step 2
/// (every |Dᵢⱼ|, i ≠ j, at most `tol` × max |D|), found without forming D: `None` when that
/// cannot be shown this way, and then D is formed and tested entry by entry.
///
/// With M diagonal and Φ mass-normalised (Φᵀ M Φ = I, so Φ Φᵀ = M⁻¹), let dⱼ = φⱼᵀ C φⱼ and
/// rⱼ = C φⱼ − dⱼ M φⱼ. Then Dᵢⱼ = φᵢᵀ rⱼ for i ≠ j and φⱼᵀ rⱼ = 0, so the off-diagonal part of
/// column j has Euclidean norm ‖Φᵀ rⱼ‖ = √(rⱼᵀ M⁻¹ rⱼ), a bound on each of its entries; and
/// max |dⱼ| ≤ max |D|. When every column's bound is within `tol` × max |dⱼ|, every entry passes
/// the test. C is applied through its nonzero entries (a damper touches at most four), so the
/// cost is about n × (nonzeros of C + 3n) instead of the two dense n³ products of Φᵀ C Φ.
fn classical_diagonal(
    shapes: &DMatrix<f64>,
    c: &CscMatrix<f64>,
    m: &CscMatrix<f64>,
    tol: f64,
) -> Option<Vec<f64>> {
    let n = shapes.nrows();
    if m.nrows() != n || c.nrows() != n {
        return None;
    }
    let mut masses = vec![0.0; n];
    for (i, j, &v) in m.triplet_iter() {
        if i != j && v != 0.0 {
            return None;
        }
        if i == j {
            masses[i] = v;
        }
    }
    // Column by column, as stored: the order in which C φ is accumulated below.
    let nonzeros: Vec<(usize, usize, f64)> = c
        .triplet_iter()
        .filter(|&(_, _, &v)| v != 0.0)
        .map(|(i, j, &v)| (i, j, v))
        .collect();
    // A dense C gains nothing from this route.
    if nonzeros.len() > n * n / 8 + 16 {
        return None;
    }
    let inverse: Vec<f64> = masses.iter().map(|m| 1.0 / m).collect();
    let mut diag = Vec::with_capacity(n);
    let mut bound = 0.0_f64;
    let mut y = vec![0.0; n];
    for phi in shapes.column_iter() {
        let phi = phi.as_slice();
        y.fill(0.0);
        for &(r, col, v) in &nonzeros {
            y[r] += v * phi[col];
        }
        let dj: f64 = phi.iter().zip(&y).map(|(p, q)| p * q).sum();
        let off2: f64 = y
            .iter()
            .zip(phi)
            .zip(masses.iter().zip(&inverse))
            .map(|((yi, pi), (mi, wi))| {
                let r = yi - dj * mi * pi;
                r * r * wi
            })
            .sum();
        bound = bound.max(off2.sqrt());
        diag.push(dj);
    }
    let dmax = diag.iter().fold(0.0_f64, |a, x| a.max(x.abs()));
    (dmax > 0.0 && bound.is_finite() && bound <= tol * dmax).then_some(diag)
}

/// Connected components of the graph "|Dᵢⱼ| > tol × max |D|", each sorted, in order of their
/// smallest mode.
fn coupled_groups(d: &DMatrix<f64>, tol: f64) -> Vec<Vec<usize>> {
    let n = d.nrows();
    let dmax = d.iter().fold(0.0_f64, |a, x| a.max(x.abs()));
    let mut parent: Vec<usize> = (0..n).collect();
    fn find(parent: &mut [usize], mut i: usize) -> usize {
        while parent[i] != i {
            parent[i] = parent[parent[i]];
            i = parent[i];
        }
        i
    }
    for j in 0..n {
        for i in (j + 1)..n {
            if d[(i, j)].abs() > tol * dmax {
                let (a, b) = (find(&mut parent, i), find(&mut parent, j));
                if a != b {
                    parent[a.max(b)] = a.min(b);
                }
            }
        }
    }
    let mut groups: Vec<Vec<usize>> = Vec::new();
    let mut slot = vec![usize::MAX; n];
    for i in 0..n {
        let r = find(&mut parent, i);
        if slot[r] == usize::MAX {
            slot[r] = groups.len();
            groups.push(Vec::new());
        }
        groups[slot[r]].push(i);
    }
    groups
}

/// Solves one group of damping-coupled modes as a state matrix and assigns its 2r roots two
/// per mode (module doc, step 3). Returns, per mode of the group, its roots and the smaller MAC.
fn solve_group(
    group: &[usize],
    omega2: &[f64],
    rigid: &[bool],
    omega_max: f64,
    d: &DMatrix<f64>,
    config: &ModalConfig,
) -> Result<Vec<([Complex64; 2], f64)>, ModalError> {
    let r = group.len();
    let s: Vec<f64> = group
        .iter()
        .map(|&j| {
            if rigid[j] {
                omega_max
            } else {
                omega2[j].abs().sqrt()
            }
        })
        .collect();
    let mut a = DMatrix::zeros(2 * r, 2 * r);
    for (p, &j) in group.iter().enumerate() {
        a[(p, r + p)] = s[p];
        a[(r + p, p)] = -omega2[j] / s[p];
        for (q, &i) in group.iter().enumerate() {
            a[(r + p, r + q)] = -d[(j, i)];
        }
    }
    let evd = eigen::general(&a)?;
    let roots = &evd.values;

    // MAC of every root to every mode of the group, from its modal displacement q = z / s.
    let mac_of = |u: usize| -> Vec<f64> {
        let q: Vec<f64> = (0..r)
            .map(|p| (evd.vectors[(p, u)] / s[p]).norm_sqr())
            .collect();
        let total: f64 = q.iter().sum();
        q.iter()
            .map(|x| {
                let m = x / total;
                if m.is_finite() { m } else { 0.0 }
            })
            .collect()
    };

    // Units: a complex root with its conjugate (weight 2), or a single root (weight 1).
    let is_real = |z: Complex64| z.im.abs() <= config.real_tolerance * z.norm();
    let mut used = vec![false; 2 * r];
    let mut units: Vec<(Vec<usize>, Vec<f64>)> = Vec::new();
    for u in 0..2 * r {
        if used[u] {
            continue;
        }
        used[u] = true;
        let z = roots[u];
        if !is_real(z) && z.im > 0.0 {
            let conj = z.conj();
            let partner = if u + 1 < 2 * r && !used[u + 1] && roots[u + 1] == conj {
                Some(u + 1)
            } else {
                (0..2 * r)
                    .filter(|&v| !used[v] && !is_real(roots[v]) && roots[v].im < 0.0)
                    .min_by(|&v, &w| {
                        (roots[v] - conj)
                            .norm()
                            .total_cmp(&(roots[w] - conj).norm())
                    })
            };
            if let Some(v) = partner {
                used[v] = true;
                units.push((vec![u, v], mac_of(u)));
                continue;
            }
        }
        units.push((vec![u], mac_of(u)));
    }

    let mut order: Vec<(usize, usize)> = (0..units.len())
        .flat_map(|u| (0..r).map(move |p| (u, p)))
        .collect();
    order.sort_by(|&(u, p), &(v, q)| units[v].1[q].total_cmp(&units[u].1[p]));
    let weight = |u: usize| units[u].0.len();
    let mut slots: Vec<Vec<usize>> = vec![Vec::new(); r];
    let mut room = vec![2_usize; r];
    let mut placed = vec![false; units.len()];
    let mut pairs_left = (0..units.len()).filter(|&u| weight(u) == 2).count();
    let mut empty_modes = r;
    for &(u, p) in &order {
        if placed[u] || room[p] < weight(u) {
            continue;
        }
        // A single root must not take an empty mode that a complex pair still needs.
        if weight(u) == 1 && room[p] == 2 && empty_modes < pairs_left + 1 {
            continue;
        }
        if room[p] == 2 {
            empty_modes -= 1;
        }
        if weight(u) == 2 {
            pairs_left -= 1;
        }
        room[p] -= weight(u);
        slots[p].push(u);
        placed[u] = true;
    }
    // Final pass: pairs first, each into its most similar empty mode; then single roots.
    for want in [2, 1] {
        for u in 0..units.len() {
            if placed[u] || weight(u) != want {
                continue;
            }
            let best = (0..r)
                .filter(|&p| room[p] >= want)
                .max_by(|&p, &q| units[u].1[p].total_cmp(&units[u].1[q]))
                .ok_or(ModalError::Assignment)?;
            room[best] -= want;
            slots[best].push(u);
            placed[u] = true;
        }
    }

    let mut out = Vec::with_capacity(r);
    for (p, mode_units) in slots.iter().enumerate() {
        let members: Vec<usize> = mode_units
            .iter()
            .flat_map(|&u| units[u].0.clone())
            .collect();
        let [a, b] = members[..] else {
            return Err(ModalError::Assignment);
        };
        let mac = mode_units
            .iter()
            .map(|&u| units[u].1[p])
            .fold(1.0_f64, f64::min);
        out.push(([roots[a], roots[b]], mac));
    }
    Ok(out)
}

#[allow(clippy::too_many_arguments)]
fn characterise(
    index: usize,
    omega2: f64,
    rigid: bool,
    omega_max: f64,
    roots: [Complex64; 2],
    assignment_mac: f64,
    shape: DVector<f64>,
    config: &ModalConfig,
) -> Mode {
    let sum = (roots[0] + roots[1]).re;
    let product = (roots[0] * roots[1]).re;
    let undamped_frequency = if omega2 > 0.0 && !rigid {
        omega2.sqrt()
    } else {
        0.0
    };
    let oscillating_pair = roots[0].im != 0.0
        && roots[0].im.abs() > config.real_tolerance * roots[0].norm()
        && (roots[0].conj() - roots[1]).norm() <= 1e-12 * roots[0].norm();

    let (natural_frequency, zeta, regime) = if rigid {
        // The moving root of a rigid mode is S (the other is 0); rounding allowance in terms
        // of the largest natural frequency.
        let regime = if sum > 2.0 * config.undamped_tolerance * omega_max {
            ModeRegime::Unstable
        } else {
            ModeRegime::RigidBody
        };
        (0.0, None, regime)
    } else {
        let wn = product.abs().sqrt();
        let mut zeta = -sum / (2.0 * wn);
        let regime = if product < 0.0 || zeta < -config.undamped_tolerance {
            ModeRegime::Unstable
        } else if zeta.abs() <= config.undamped_tolerance {
            zeta = 0.0;
            ModeRegime::Undamped
        } else if (zeta - 1.0).abs() <= config.epsilon {
            ModeRegime::CriticallyDamped
        } else if zeta < 1.0 {
            ModeRegime::Underdamped
        } else {
            ModeRegime::Overdamped
        };
        (wn, Some(zeta), regime)
    };

    let z = zeta.unwrap_or(0.0);
    let (damped_frequency, quality_factor, decay_time_constant, log_decrement) = match regime {
        ModeRegime::Undamped => (Some(natural_frequency), None, None, Some(0.0)),
        ModeRegime::Underdamped => {
            let root = (1.0 - z * z).sqrt();
            (
                Some(natural_frequency * root),
                Some(1.0 / (2.0 * z)),
                Some(1.0 / (z * natural_frequency)),
                Some(2.0 * std::f64::consts::PI * z / root),
            )
        }
        ModeRegime::CriticallyDamped | ModeRegime::Overdamped => (
            None,
            Some(1.0 / (2.0 * z)),
            Some(1.0 / (z * natural_frequency)),
            None,
        ),
        ModeRegime::RigidBody => (None, None, None, None),
        ModeRegime::Unstable => (
            oscillating_pair.then(|| roots[0].im.abs()),
            None,
            None,
            None,
        ),
    };
    let hz = |w: f64| w / (2.0 * std::f64::consts::PI);
    Mode {
        index,
        omega2,
        undamped_frequency,
        natural_frequency,
        natural_frequency_hz: hz(natural_frequency),
        damping_ratio: zeta,
        damped_frequency,
        damped_frequency_hz: damped_frequency.map(hz),
        quality_factor,
        decay_time_constant,
        log_decrement,
        regime,
        roots,
        assignment_mac,
        shape,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stable_quadratic_roots() {
        // s² + 3s + 2 = (s + 1)(s + 2).
        let r = quadratic_roots(3.0, 2.0);
        assert_eq!([r[0].re, r[1].re], [-2.0, -1.0]);
        // s² + 2s + 5: −1 ± 2i.
        let r = quadratic_roots(2.0, 5.0);
        assert_eq!(r[0], Complex64::new(-1.0, 2.0));
        // s² − 4 (negative stiffness): ±2.
        let r = quadratic_roots(0.0, -4.0);
        assert_eq!([r[0].re.abs(), r[1].re.abs()], [2.0, 2.0]);
        assert_eq!(r[0].re * r[1].re, -4.0);
        // A free mass with a damper: s² + 3s = s(s + 3).
        let r = quadratic_roots(3.0, 0.0);
        assert_eq!([r[0].re, r[1].re], [-3.0, 0.0]);
        // Negative damping on a free mass: s² − 3s.
        let r = quadratic_roots(-3.0, 0.0);
        assert_eq!([r[0].re, r[1].re], [3.0, 0.0]);
    }

    #[test]
    fn classical_damping_is_recognised_without_forming_d() {
        // A chain of unequal masses: M = diag(1, 2, 3), springs 100 N/m to ground and between
        // neighbours. Rayleigh damping C = αM + βK gives D = αI + βΩ² (Φᵀ M Φ = I, Φᵀ K Φ = Ω²).
        let m = DMatrix::from_diagonal(&DVector::from_vec(vec![1.0, 2.0, 3.0]));
        let k = DMatrix::from_row_slice(
            3,
            3,
            &[
                200.0, -100.0, 0.0, -100.0, 200.0, -100.0, 0.0, -100.0, 100.0,
            ],
        );
        let und = eigen::generalized_symmetric(&k, &m).unwrap();
        let (alpha, beta) = (0.3, 0.002);
        let c = &m * alpha + &k * beta;
        let sparse = |a: &DMatrix<f64>| CscMatrix::from(a);
        let diag = classical_diagonal(&und.shapes, &sparse(&c), &sparse(&m), 1e-10).unwrap();
        for (d, w2) in diag.iter().zip(&und.omega2) {
            assert!((d - (alpha + beta * w2)).abs() < 1e-12);
        }
        // One damper at the free end couples the modes: not shown classical, D is formed.
        let mut c = DMatrix::zeros(3, 3);
        c[(2, 2)] = 5.0;
        assert_eq!(
            classical_diagonal(&und.shapes, &sparse(&c), &sparse(&m), 1e-10),
            None
        );
        // A full mass matrix is not handled here either.
        let mut full = m.clone();
        full[(0, 1)] = 0.1;
        full[(1, 0)] = 0.1;
        assert_eq!(
            classical_diagonal(&und.shapes, &sparse(&(&m * alpha)), &sparse(&full), 1e-10),
            None
        );
    }

    #[test]
    fn coupling_graph_components() {
        let mut d = DMatrix::identity(4, 4);
        d[(0, 2)] = 0.5;
        d[(2, 0)] = 0.5;
        assert_eq!(
            coupled_groups(&d, 1e-10),
            vec![vec![0, 2], vec![1], vec![3]]
        );
    }
}
