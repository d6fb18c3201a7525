//! Static sag under `gravity` (language.md §4): K x = M g, where g holds the gravity
//! acceleration on every translational coordinate and 0 on the rotational ones (a torsional
//! coordinate carries no weight). Positive sag is a deflection along gravity.
//!
//! A rigid-body mode (K singular: some coordinate has no elastic path to ground) leaves the
//! equilibrium undefined, and a negative-stiffness mode makes it unstable: both are errors.
//! Rigidity is judged as in [`crate::modes`]: |ω²| ≤ 1e-10 × the largest |ω²|.

use nalgebra::DVector;

use crate::assemble::Matrices;
use crate::eigen;
use crate::model::DofKind;
use crate::response::ResponseError;

/// The relative size below which an undamped ω² counts as a rigid-body mode.
pub const RIGID_TOLERANCE: f64 = 1e-10;

/// The static deflection of every coordinate under gravity `g` (m/s²); rotational coordinates
/// deflect only through their coupling to translational ones (none, since the kinds never
/// share an element), so they come out 0.
pub fn sag(mats: &Matrices, g: f64) -> Result<DVector<f64>, ResponseError> {
    let n = mats.dofs();
    if (mats.k.nrows(), mats.k.ncols()) != (n, n) || mats.dof_kinds.len() != n {
        return Err(ResponseError::Shape);
    }
    if !g.is_finite() {
        return Err(ResponseError::NonFinite);
    }
    if n == 0 {
        return Ok(DVector::zeros(0));
    }
    let und = eigen::generalized_symmetric_sparse(&mats.k, &mats.m)
        .map_err(|e| ResponseError::Modal(e.into()))?;
    let scale = und.omega2.iter().fold(0.0_f64, |a, w| a.max(w.abs()));
    if und
        .omega2
        .iter()
        .any(|w| w.abs() <= RIGID_TOLERANCE * scale)
    {
        return Err(ResponseError::RigidBody);
    }
    if und.omega2.iter().any(|w| *w < 0.0) {
        return Err(ResponseError::Unstable);
    }
    let gravity = DVector::from_fn(n, |i, _| match mats.dof_kinds[i] {
        DofKind::Translational => g,
        DofKind::Rotational => 0.0,
    });
    // The static solve is dense: n is small wherever a sag is asked for.
    let load = mats.dense_m() * gravity;
    let x = mats
        .dense_k()
        .lu()
        .solve(&load)
        .ok_or(ResponseError::RigidBody)?;
    if x.iter().any(|v| !v.is_finite()) {
        return Err(ResponseError::RigidBody);
    }
    Ok(x)
}
