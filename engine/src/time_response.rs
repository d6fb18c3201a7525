//! Time response of M ẍ + C ẋ + K x = f(t) to step and impulse drives and initial conditions
//! (language.md §4, §5), exact for the linear model.
//!
//! # Method
//!
//! With state z = [x; ẋ] and A = [[0, I], [−M⁻¹K, −M⁻¹C]] ([`eigen::state_matrix`]), a
//! constant load F switched on at t = 0 and a stable system with no rigid-body mode,
//! z(t) = z_f + e^{At}(z₀ − z_f) where z_f = [K⁻¹F; 0] is the static equilibrium. Impulses J
//! are velocity jumps: z₀ = [x₀; v₀ + M⁻¹J]. A step of ground displacement (or rotation) Y
//! loads every grounded spring of that kind, F = K_g Y, and its grounded dampers see ẏ = Y δ(t),
//! an impulse C_g Y. A step of ground velocity or acceleration has no final position and is
//! an error.
//!
//! The matrix exponential is computed by scaling and squaring with the degree-13 Padé
//! approximant (Higham's 2005 algorithm, from memory), which needs no eigendecomposition and
//! so is as accurate at critical damping (a defective state matrix) as anywhere else. Samples
//! on a uniform grid come from z_{k+1} − z_f = Φ (z_k − z_f) with Φ = e^{A Δt}; between two
//! samples a finer grid (Δt / 1000, from e^{A Δt/1000}) locates peaks and band crossings, a
//! parabola through the three finest points around a peak giving its height. Any time t is
//! exact through e^{A(t − t_k)} from the sample before it ([`Transient::state_at`]).
//!
//! **Window**: `decay_times` (12) × the slowest decay time 1/|Re λ| over the roots; when a
//! root is undamped (|Re λ| ≤ 1e-12 |λ|), at least 20 periods of the slowest such root.
//! **Grid**: max(2000, 50 per period of the fastest root |λ|) samples over the window, capped
//! at 200,000 samples and at 4,000,000 stored numbers.
//!
//! **Measures**: overshoot (peak − final) / final, the peak taken in the direction of the final
//! value and clamped at 0 for a response that never passes it; settling time: the time after
//! which |x − final| stays ≤ P |final| (P = 2% by default). When the final value is zero (an
//! impulse or initial-condition response) the band is P × the peak |x| instead. A response
//! still outside its band in the last 10% of the window is [`ResponseError::NeverSettles`].

use nalgebra::{DMatrix, DVector};

use crate::assemble::Matrices;
use crate::eigen;
use crate::model::MotionKind;
use crate::modes::{ModalResult, ModeRegime};
use crate::response::{Excitation, Inputs, LinkKind, ResponseError, Waveform};

/// Sampling and size limits.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TimeConfig {
    pub min_samples: usize,
    pub samples_per_period: usize,
    pub max_samples: usize,
    /// The most numbers (samples × 2n) kept in memory.
    pub max_stored: usize,
    /// The window is this many slowest decay times.
    pub decay_times: f64,
    /// A fixed window (s) instead of the automatic one.
    pub duration: Option<f64>,
    /// The largest number of degrees of freedom simulated.
    pub max_dofs: usize,
}

impl Default for TimeConfig {
    fn default() -> Self {
        TimeConfig {
            min_samples: 2000,
            samples_per_period: 50,
            max_samples: 200_000,
            max_stored: 4_000_000,
            decay_times: 12.0,
            duration: None,
            max_dofs: 200,
        }
    }
}

/// The transient loading: a constant load for t > 0 and the state just after t = 0.
#[derive(Clone, Debug, PartialEq)]
pub struct Loading {
    /// The constant load (N or N·m per coordinate) of the step drives.
    pub force: DVector<f64>,
    /// Displacement at t = 0⁺.
    pub x0: DVector<f64>,
    /// Velocity at t = 0⁺ (initial velocity plus M⁻¹ × impulses).
    pub v0: DVector<f64>,
    /// Whether any step drive contributes (overshoot is defined under step drives).
    pub has_step: bool,
}

/// The loading of every step and impulse drive and every initial condition in `inputs`.
pub fn loading(mats: &Matrices, inputs: &Inputs) -> Result<Loading, ResponseError> {
    let n = mats.dofs();
    if mats.dof_kinds.len() != n || (mats.m.nrows(), mats.m.ncols()) != (n, n) {
        return Err(ResponseError::Shape);
    }
    let mut force = DVector::zeros(n);
    let mut impulse = DVector::zeros(n);
    let mut x0 = DVector::zeros(n);
    let mut v0 = DVector::zeros(n);
    let mut any = false;
    let mut has_step = false;
    for (index, d) in inputs.drives.iter().enumerate() {
        let target = match d.waveform {
            Waveform::Step => {
                has_step = true;
                &mut force
            }
            Waveform::Impulse => &mut impulse,
            Waveform::Harmonic { .. } | Waveform::Band { .. } => continue,
        };
        any = true;
        match d.excitation {
            Excitation::Load { dof } if dof < n => target[dof] += d.amplitude,
            Excitation::Load { .. } => return Err(ResponseError::Shape),
            Excitation::Base { kind, motion } => {
                if matches!(motion, MotionKind::Velocity | MotionKind::Acceleration)
                    || d.waveform == Waveform::Impulse
                {
                    return Err(ResponseError::UnboundedStep { drive: index });
                }
                for g in inputs.ground.iter().filter(|g| g.dof_kind == kind) {
                    if g.dof >= n {
                        return Err(ResponseError::Shape);
                    }
                    match g.kind {
                        LinkKind::Spring => force[g.dof] += g.value * d.amplitude,
                        LinkKind::Damper => impulse[g.dof] += g.value * d.amplitude,
                    }
                }
            }
        }
    }
    for i in &inputs.initials {
        if i.dof >= n {
            return Err(ResponseError::Shape);
        }
        any = true;
        x0[i.dof] = i.displacement;
        v0[i.dof] = i.velocity;
    }
    if !any {
        return Err(ResponseError::NoTransient);
    }
    if impulse.iter().any(|j| *j != 0.0) {
        let dv = mats
            .dense_m()
            .cholesky()
            .ok_or(ResponseError::Shape)?
            .solve(&impulse);
        v0 += dv;
    }
    Ok(Loading {
        force,
        x0,
        v0,
        has_step,
    })
}

/// Fine steps per sample interval for locating peaks and crossings.
const FINE: usize = 1000;

/// A sampled exact time response.
#[derive(Clone, Debug)]
pub struct Transient {
    n: usize,
    a: DMatrix<f64>,
    dt: f64,
    phi_fine: DMatrix<f64>,
    /// The static equilibrium [K⁻¹F; 0].
    final_state: DVector<f64>,
    /// One column per sample: [x; ẋ] at `times[k]`.
    states: DMatrix<f64>,
    pub times: Vec<f64>,
    pub has_step: bool,
}

/// Simulates `loading` on the assembled system. A rigid-body or unstable mode is an error.
pub fn simulate(
    mats: &Matrices,
    loading: &Loading,
    modal: &ModalResult,
    config: &TimeConfig,
) -> Result<Transient, ResponseError> {
    let n = mats.dofs();
    if n > config.max_dofs {
        return Err(ResponseError::TooLarge {
            dofs: n,
            limit: config.max_dofs,
        });
    }
    if n == 0
        || loading.force.len() != n
        || loading.x0.len() != n
        || loading.v0.len() != n
        || modal.modes.len() != n
    {
        return Err(ResponseError::Shape);
    }
    if [&loading.force, &loading.x0, &loading.v0]
        .iter()
        .any(|v| v.iter().any(|x| !x.is_finite()))
    {
        return Err(ResponseError::NonFinite);
    }
    if modal.modes.iter().any(|m| m.regime == ModeRegime::Unstable) {
        return Err(ResponseError::Unstable);
    }
    if modal
        .modes
        .iter()
        .any(|m| m.regime == ModeRegime::RigidBody)
    {
        return Err(ResponseError::RigidBody);
    }
    // The state matrix is dense anyway: M, C and K are made dense for it.
    let a = eigen::state_matrix(&mats.dense_m(), &mats.dense_c(), &mats.dense_k())
        .map_err(|e| ResponseError::Modal(e.into()))?;
    let x_f = if loading.force.iter().all(|f| *f == 0.0) {
        DVector::zeros(n)
    } else {
        mats.dense_k()
            .lu()
            .solve(&loading.force)
            .ok_or(ResponseError::RigidBody)?
    };
    let mut final_state = DVector::zeros(2 * n);
    final_state.rows_mut(0, n).copy_from(&x_f);

    // Time scales from the damped roots.
    let mut fastest = 0.0_f64;
    let mut slowest_decay = 0.0_f64;
    let mut slowest_undamped_period = 0.0_f64;
    for r in modal.roots() {
        let mag = r.norm();
        if !mag.is_finite() {
            return Err(ResponseError::NonFinite);
        }
        fastest = fastest.max(mag);
        if r.re.abs() <= 1e-12 * mag {
            if r.im.abs() > 0.0 {
                slowest_undamped_period =
                    slowest_undamped_period.max(std::f64::consts::TAU / r.im.abs());
            }
        } else {
            slowest_decay = slowest_decay.max(1.0 / r.re.abs());
        }
    }
    let duration = match config.duration {
        Some(d) => d,
        None => (config.decay_times * slowest_decay).max(20.0 * slowest_undamped_period),
    };
    if !(duration > 0.0 && duration.is_finite() && fastest > 0.0) {
        return Err(ResponseError::NonFinite);
    }
    let per_period = config.samples_per_period as f64 * duration * fastest / std::f64::consts::TAU;
    let wanted = if per_period.is_finite() && per_period < config.max_samples as f64 {
        (per_period.ceil() as usize).max(config.min_samples)
    } else {
        config.max_samples
    };
    let samples = wanted
        .min(config.max_samples)
        .min(config.max_stored / (2 * n))
        + 1;
    if samples < 3 {
        return Err(ResponseError::TooLarge {
            dofs: n,
            limit: config.max_stored / 6,
        });
    }
    let dt = duration / (samples - 1) as f64;
    let phi = expm(&(&a * dt))?;
    let phi_fine = expm(&(&a * (dt / FINE as f64)))?;
    let mut states = DMatrix::zeros(2 * n, samples);
    let mut dev = DVector::zeros(2 * n);
    dev.rows_mut(0, n).copy_from(&(&loading.x0 - &x_f));
    dev.rows_mut(n, n).copy_from(&loading.v0);
    for k in 0..samples {
        if k > 0 {
            dev = &phi * &dev;
        }
        states.set_column(k, &(&final_state + &dev));
    }
    if states.iter().any(|x| !x.is_finite()) {
        return Err(ResponseError::NonFinite);
    }
    Ok(Transient {
        n,
        a,
        dt,
        phi_fine,
        final_state,
        states,
        times: (0..samples).map(|k| k as f64 * dt).collect(),
        has_step: loading.has_step,
    })
}

/// A peak of one coordinate: when and how high.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Peak {
    pub time: f64,
    pub value: f64,
}

impl Transient {
    /// The number of degrees of freedom.
    pub fn dofs(&self) -> usize {
        self.n
    }

    /// The simulated window (s).
    pub fn duration(&self) -> f64 {
        self.times.last().copied().unwrap_or(0.0)
    }

    /// The exact state [x; ẋ] at any t ≥ 0 (e^{A(t − t_k)} from the sample before t).
    pub fn state_at(&self, t: f64) -> Result<DVector<f64>, ResponseError> {
        if !(t >= 0.0 && t.is_finite()) {
            return Err(ResponseError::NonFinite);
        }
        let k = ((t / self.dt).floor() as usize).min(self.times.len() - 1);
        let s = t - self.times[k];
        let zk = self.states.column(k).into_owned();
        if s == 0.0 {
            return Ok(zk);
        }
        let e = expm(&(&self.a * s))?;
        Ok(&self.final_state + e * (zk - &self.final_state))
    }

    /// The sampled displacement of coordinate `dof`.
    pub fn displacement(&self, dof: usize) -> Result<Vec<f64>, ResponseError> {
        self.check(dof)?;
        Ok(self.states.row(dof).iter().copied().collect())
    }

    /// The final (static) value of coordinate `dof`.
    pub fn final_value(&self, dof: usize) -> Result<f64, ResponseError> {
        self.check(dof)?;
        Ok(self.final_state[dof])
    }

    fn check(&self, dof: usize) -> Result<(), ResponseError> {
        if dof < self.n {
            Ok(())
        } else {
            Err(ResponseError::Shape)
        }
    }

    /// `FINE` × (k1 − k0) + 1 values of `g(x_dof)` between samples k0 and k1.
    fn fine(&self, dof: usize, k0: usize, k1: usize, g: impl Fn(f64) -> f64) -> Vec<f64> {
        let mut dev = self.states.column(k0) - &self.final_state;
        let mut out = Vec::with_capacity(FINE * (k1 - k0) + 1);
        out.push(g(dev[dof] + self.final_state[dof]));
        for _ in 0..FINE * (k1 - k0) {
            dev = &self.phi_fine * &dev;
            out.push(g(dev[dof] + self.final_state[dof]));
        }
        out
    }

    /// The maximum of g(x_dof(t)) over the window, refined on the fine grid around the
    /// highest sampled local maxima.
    fn max_of(&self, dof: usize, g: impl Fn(f64) -> f64 + Copy) -> Peak {
        let v: Vec<f64> = self.states.row(dof).iter().map(|x| g(*x)).collect();
        let last = v.len() - 1;
        let top = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let mut candidates: Vec<usize> = (0..=last)
            .filter(|&k| (k == 0 || v[k] >= v[k - 1]) && (k == last || v[k] >= v[k + 1]))
            .filter(|&k| v[k] >= top - 0.01 * top.abs())
            .collect();
        candidates.sort_by(|a, b| v[*b].total_cmp(&v[*a]));
        candidates.truncate(20);
        let mut best = Peak {
            time: 0.0,
            value: f64::NEG_INFINITY,
        };
        for k in candidates {
            let k0 = k.saturating_sub(1);
            let k1 = (k + 1).min(last);
            if k1 == k0 {
                continue;
            }
            let f = self.fine(dof, k0, k1, g);
            let (j, &fj) = f
                .iter()
                .enumerate()
                .max_by(|a, b| a.1.total_cmp(b.1))
                .unwrap_or((0, &f64::NEG_INFINITY));
            let h = self.dt / FINE as f64;
            let mut peak = Peak {
                time: self.times[k0] + j as f64 * h,
                value: fj,
            };
            if j > 0 && j + 1 < f.len() {
                // Parabola through the three finest points around the maximum.
                let (y0, y1, y2) = (f[j - 1], fj, f[j + 1]);
                let denom = y0 - 2.0 * y1 + y2;
                if denom < 0.0 {
                    let off = 0.5 * (y0 - y2) / denom;
                    peak.time += off * h;
                    peak.value = y1 - 0.25 * (y0 - y2) * off;
                }
            }
            if peak.value > best.value {
                best = peak;
            }
        }
        best
    }

    /// The largest |x| of coordinate `dof` and when it happens.
    pub fn peak_displacement(&self, dof: usize) -> Result<Peak, ResponseError> {
        self.check(dof)?;
        Ok(self.max_of(dof, f64::abs))
    }

    /// (peak − final) / final, the peak in the direction of the final value; 0 when the
    /// response never passes its final value.
    pub fn overshoot(&self, dof: usize) -> Result<f64, ResponseError> {
        let fin = self.final_value(dof)?;
        let scale = self.peak_displacement(dof)?.value;
        if fin == 0.0 || fin.abs() <= 1e-12 * scale {
            return Err(ResponseError::ZeroFinal);
        }
        let s = fin.signum();
        let peak = self.max_of(dof, move |x| s * x);
        Ok(((peak.value - fin.abs()) / fin.abs()).max(0.0))
    }

    /// The time after which coordinate `dof` stays within `within` (a fraction, e.g. 0.02) of
    /// its final value (of its peak |x| when the final value is zero).
    pub fn settling_time(&self, dof: usize, within: f64) -> Result<f64, ResponseError> {
        let fin = self.final_value(dof)?;
        if !(within > 0.0 && within.is_finite()) {
            return Err(ResponseError::NonFinite);
        }
        let scale = self.peak_displacement(dof)?.value;
        let band = if fin != 0.0 && fin.abs() > 1e-12 * scale {
            within * fin.abs()
        } else {
            within * scale
        };
        if band == 0.0 {
            return Ok(0.0);
        }
        let e: Vec<f64> = self
            .states
            .row(dof)
            .iter()
            .map(|x| (x - fin).abs())
            .collect();
        let last = e.len() - 1;
        // The last sample interval in which e may exceed the band: a sample above it, or a
        // sampled local maximum near it whose true peak may be above.
        let mut out = None;
        for k in (0..=last).rev() {
            let local_max = (k == 0 || e[k] >= e[k - 1]) && (k == last || e[k] >= e[k + 1]);
            if e[k] > band || (local_max && e[k] > 0.9 * band) {
                let k0 = k.saturating_sub(1);
                let k1 = (k + 1).min(last);
                let f = self.fine(dof, k0, k1, |x| (x - fin).abs());
                if let Some(j) = f.iter().rposition(|v| *v > band) {
                    out = Some((k0, j, f));
                    break;
                }
            }
        }
        let Some((k0, j, f)) = out else {
            return Ok(0.0);
        };
        let h = self.dt / FINE as f64;
        let mut t = self.times[k0] + j as f64 * h;
        if j + 1 < f.len() {
            // Linear interpolation of the crossing between the two finest points.
            let (a, b) = (f[j], f[j + 1]);
            if a > b {
                t += h * (a - band) / (a - b);
            }
        }
        if t > 0.9 * self.duration() {
            return Err(ResponseError::NeverSettles);
        }
        Ok(t)
    }
}

/// e^A by scaling and squaring with the degree-13 Padé approximant.
pub fn expm(a: &DMatrix<f64>) -> Result<DMatrix<f64>, ResponseError> {
    let n = a.nrows();
    if a.ncols() != n {
        return Err(ResponseError::Shape);
    }
    if a.iter().any(|x| !x.is_finite()) {
        return Err(ResponseError::NonFinite);
    }
    const B: [f64; 14] = [
        64_764_752_532_480_000.0,
        32_382_376_266_240_000.0,
        7_771_770_303_897_600.0,
        1_187_353_796_428_800.0,
        129_060_195_264_000.0,
        10_559_470_521_600.0,
        670_442_572_800.0,
        33_522_128_640.0,
        1_323_241_920.0,
        40_840_800.0,
        960_960.0,
        16_380.0,
        182.0,
        1.0,
    ];
    const THETA13: f64 = 5.371_920_351_148_152;
    let norm1 = (0..n)
        .map(|j| a.column(j).iter().map(|x| x.abs()).sum::<f64>())
        .fold(0.0_f64, f64::max);
    let s = if norm1 > THETA13 {
        (norm1 / THETA13).log2().ceil().clamp(0.0, 1100.0) as i32
    } else {
        0
    };
    let a = a * 2.0_f64.powi(-s);
    let id = DMatrix::<f64>::identity(n, n);
    let a2 = &a * &a;
    let a4 = &a2 * &a2;
    let a6 = &a4 * &a2;
    let u_inner = &a6 * (&a6 * B[13] + &a4 * B[11] + &a2 * B[9])
        + &a6 * B[7]
        + &a4 * B[5]
        + &a2 * B[3]
        + &id * B[1];
    let u = &a * u_inner;
    let v = &a6 * (&a6 * B[12] + &a4 * B[10] + &a2 * B[8])
        + &a6 * B[6]
        + &a4 * B[4]
        + &a2 * B[2]
        + &id * B[0];
    let p = &v + &u;
    let q = v - u;
    let mut r = q.lu().solve(&p).ok_or(ResponseError::NonFinite)?;
    for _ in 0..s {
        r = &r * &r;
    }
    if r.iter().any(|x| !x.is_finite()) {
        return Err(ResponseError::NonFinite);
    }
    Ok(r)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn expm_of_a_rotation_and_a_jordan_block() {
        // e^{[[0, w], [−w, 0]] t} is a rotation by wt; e^{[[a, 1], [0, a]]} = e^a [[1, 1], [0, 1]]
        // (closed forms, linear algebra texts).
        let w = 7.0;
        let r = expm(&DMatrix::from_row_slice(2, 2, &[0.0, w, -w, 0.0])).unwrap();
        let want = DMatrix::from_row_slice(2, 2, &[w.cos(), w.sin(), -w.sin(), w.cos()]);
        assert!((r - want).abs().max() < 1e-13);
        let a = -3.0;
        let j = expm(&DMatrix::from_row_slice(2, 2, &[a, 1.0, 0.0, a])).unwrap();
        let want = DMatrix::from_row_slice(2, 2, &[1.0, 1.0, 0.0, 1.0]) * a.exp();
        assert!((j - want).abs().max() < 1e-15);
        assert_eq!(
            expm(&DMatrix::from_element(1, 1, f64::NAN)).err(),
            Some(ResponseError::NonFinite)
        );
    }
}
