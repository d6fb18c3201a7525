//! Eigendecompositions: the one module that talks to faer.
//!
//! The rest of the engine holds its matrices as nalgebra [`DMatrix`]; this module copies them
//! into faer, decomposes, and copies the results back. Why faer: nalgebra has no eigenvectors for
//! non-symmetric matrices and no generalized symmetric solver, and its Schur iteration can fail
//! to converge on companion-like state matrices; faer has both at about LAPACK speed.
//!
//! Every failure (a mass matrix that is not positive definite, a value that is not finite, an
//! iteration that does not converge) is an [`EigenError`]; the inputs are checked before faer
//! sees them, so faer's own shape assertions cannot fire.

use faer::linalg::triangular_solve;
use faer::{Mat, MatRef, Par, Side};
use nalgebra::{Complex, DMatrix};

pub type Complex64 = Complex<f64>;

#[derive(Clone, Debug, PartialEq)]
pub enum EigenError {
    /// The mass matrix is not positive definite: its Cholesky factorisation met a pivot that is
    /// not positive at this coordinate.
    NotPositiveDefinite { index: usize },
    /// A matrix entry is infinite or not a number.
    NonFinite,
    /// The matrices are not square or not of the same size.
    Shape,
    /// The eigenvalue iteration did not converge.
    NoConvergence,
}

impl std::fmt::Display for EigenError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            EigenError::NotPositiveDefinite { index } => write!(
                f,
                "the mass matrix is not positive definite (at coordinate {index})"
            ),
            EigenError::NonFinite => f.write_str("a matrix entry is infinite or not a number"),
            EigenError::Shape => f.write_str("the matrices are not square and of one size"),
            EigenError::NoConvergence => f.write_str("the eigenvalue iteration did not converge"),
        }
    }
}

impl std::error::Error for EigenError {}

/// The solution of K φ = ω² M φ.
#[derive(Clone, Debug)]
pub struct UndampedEigen {
    /// ω², ascending (negative for an unstable, negative-stiffness mode).
    pub omega2: Vec<f64>,
    /// One column per mode, mass-normalised: φᵀ M φ = 1.
    pub shapes: DMatrix<f64>,
}

/// Eigenvalues and right eigenvectors of a real square matrix.
#[derive(Clone, Debug)]
pub struct GeneralEigen {
    /// In faer's order: a complex conjugate pair is two adjacent entries, positive imaginary
    /// part first.
    pub values: Vec<Complex64>,
    /// One column per eigenvalue.
    pub vectors: DMatrix<Complex64>,
}

/// Eigenvalues (ascending) and orthonormal eigenvectors of a real symmetric matrix; only the
/// lower triangle is read.
pub fn symmetric(a: &DMatrix<f64>) -> Result<(Vec<f64>, DMatrix<f64>), EigenError> {
    check_square(a)?;
    let evd = to_faer(a)
        .self_adjoint_eigen(Side::Lower)
        .map_err(|_| EigenError::NoConvergence)?;
    let values = (0..a.nrows()).map(|i| evd.S()[i]).collect();
    Ok((values, from_faer(evd.U())))
}

/// Solves the generalized symmetric problem K φ = ω² M φ with M positive definite: Cholesky
/// M = L Lᵀ, a symmetric eigensolver on L⁻¹ K L⁻ᵀ, and φ = L⁻ᵀ u. A diagonal M (what assembly
/// produces) takes the same route with L = diag(√mᵢ), done by scaling.
pub fn generalized_symmetric(
    k: &DMatrix<f64>,
    m: &DMatrix<f64>,
) -> Result<UndampedEigen, EigenError> {
    check_square(k)?;
    check_same(k, m)?;
    let n = k.nrows();
    if is_diagonal(m) {
        let mut s = Vec::with_capacity(n);
        for i in 0..n {
            let mi = m[(i, i)];
            if mi.is_nan() || mi <= 0.0 {
                return Err(EigenError::NotPositiveDefinite { index: i });
            }
            s.push(mi.sqrt());
        }
        let a = DMatrix::from_fn(n, n, |i, j| {
            // Symmetric by construction: the same expression for (i, j) and (j, i).
            let kij = 0.5 * (k[(i, j)] + k[(j, i)]);
            kij / s[i] / s[j]
        });
        let (omega2, u) = symmetric(&a)?;
        let shapes = DMatrix::from_fn(n, n, |i, j| u[(i, j)] / s[i]);
        return Ok(UndampedEigen { omega2, shapes });
    }
    let l = cholesky(m)?;
    // Y = L⁻¹ K; then A = L⁻¹ Yᵀ = L⁻¹ K L⁻ᵀ (K symmetric).
    let mut y = to_faer(k);
    triangular_solve::solve_lower_triangular_in_place(l.as_ref(), y.as_mut(), Par::Seq);
    let mut a = y.transpose().to_owned();
    triangular_solve::solve_lower_triangular_in_place(l.as_ref(), a.as_mut(), Par::Seq);
    let a = Mat::from_fn(n, n, |i, j| 0.5 * (a[(i, j)] + a[(j, i)]));
    let evd = a
        .self_adjoint_eigen(Side::Lower)
        .map_err(|_| EigenError::NoConvergence)?;
    let mut phi = evd.U().to_owned();
    triangular_solve::solve_upper_triangular_in_place(l.transpose(), phi.as_mut(), Par::Seq);
    Ok(UndampedEigen {
        omega2: (0..n).map(|i| evd.S()[i]).collect(),
        shapes: from_faer(phi.as_ref()),
    })
}

/// Eigenvalues and right eigenvectors of a real square matrix.
pub fn general(a: &DMatrix<f64>) -> Result<GeneralEigen, EigenError> {
    check_square(a)?;
    let n = a.nrows();
    let evd = to_faer(a).eigen().map_err(|_| EigenError::NoConvergence)?;
    let values: Vec<Complex64> = (0..n).map(|i| evd.S()[i]).collect();
    let u = evd.U();
    let vectors = DMatrix::from_fn(n, n, |i, j| u[(i, j)]);
    if values
        .iter()
        .any(|v| !v.re.is_finite() || !v.im.is_finite())
    {
        return Err(EigenError::NoConvergence);
    }
    Ok(GeneralEigen { values, vectors })
}

/// The state matrix A = [[0, I], [−M⁻¹K, −M⁻¹C]] of M ẍ + C ẋ + K x = 0 with state [x; ẋ]
/// (M⁻¹ applied through its Cholesky factor).
pub fn state_matrix(
    m: &DMatrix<f64>,
    c: &DMatrix<f64>,
    k: &DMatrix<f64>,
) -> Result<DMatrix<f64>, EigenError> {
    check_square(m)?;
    check_same(m, c)?;
    check_same(m, k)?;
    let n = m.nrows();
    let l = cholesky(m)?;
    let solve = |rhs: &DMatrix<f64>| {
        let mut x = to_faer(rhs);
        triangular_solve::solve_lower_triangular_in_place(l.as_ref(), x.as_mut(), Par::Seq);
        triangular_solve::solve_upper_triangular_in_place(l.transpose(), x.as_mut(), Par::Seq);
        from_faer(x.as_ref())
    };
    let mk = solve(k);
    let mc = solve(c);
    let mut a = DMatrix::zeros(2 * n, 2 * n);
    for i in 0..n {
        a[(i, n + i)] = 1.0;
        for j in 0..n {
            a[(n + i, j)] = -mk[(i, j)];
            a[(n + i, n + j)] = -mc[(i, j)];
        }
    }
    Ok(a)
}

/// Eigenvalues and eigenvectors of the state matrix (see [`state_matrix`]); the first n entries
/// of each eigenvector are its displacement part.
pub fn state_space(
    m: &DMatrix<f64>,
    c: &DMatrix<f64>,
    k: &DMatrix<f64>,
) -> Result<GeneralEigen, EigenError> {
    general(&state_matrix(m, c, k)?)
}

/// Φᵀ A Φ, for projecting a damping or stiffness matrix onto mode shapes.
pub fn congruence(phi: &DMatrix<f64>, a: &DMatrix<f64>) -> Result<DMatrix<f64>, EigenError> {
    check_square(a)?;
    if phi.nrows() != a.nrows() {
        return Err(EigenError::Shape);
    }
    check_finite(phi)?;
    let p = to_faer(phi);
    let ap = to_faer(a) * &p;
    let out = p.transpose() * &ap;
    Ok(from_faer(out.as_ref()))
}

fn cholesky(m: &DMatrix<f64>) -> Result<Mat<f64>, EigenError> {
    let llt = to_faer(m).llt(Side::Lower).map_err(|e| match e {
        faer::linalg::cholesky::llt::factor::LltError::NonPositivePivot { index } => {
            EigenError::NotPositiveDefinite { index }
        }
    })?;
    Ok(llt.L().to_owned())
}

fn is_diagonal(m: &DMatrix<f64>) -> bool {
    let n = m.nrows();
    (0..n).all(|j| (0..n).all(|i| i == j || m[(i, j)] == 0.0))
}

fn check_square(a: &DMatrix<f64>) -> Result<(), EigenError> {
    if a.nrows() != a.ncols() {
        return Err(EigenError::Shape);
    }
    check_finite(a)
}

fn check_finite(a: &DMatrix<f64>) -> Result<(), EigenError> {
    if a.iter().all(|x| x.is_finite()) {
        Ok(())
    } else {
        Err(EigenError::NonFinite)
    }
}

fn check_same(a: &DMatrix<f64>, b: &DMatrix<f64>) -> Result<(), EigenError> {
    if a.shape() != b.shape() {
        return Err(EigenError::Shape);
    }
    check_finite(b)
}

fn to_faer(a: &DMatrix<f64>) -> Mat<f64> {
    Mat::from_fn(a.nrows(), a.ncols(), |i, j| a[(i, j)])
}

fn from_faer(a: MatRef<'_, f64>) -> DMatrix<f64> {
    DMatrix::from_fn(a.nrows(), a.ncols(), |i, j| a[(i, j)])
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn generalized_problem_with_a_full_mass_matrix() {
        // A non-diagonal M takes the Cholesky route; check K φ = ω² M φ and φᵀ M φ = I.
        let m = DMatrix::from_row_slice(2, 2, &[2.0, 0.5, 0.5, 1.0]);
        let k = DMatrix::from_row_slice(2, 2, &[300.0, -100.0, -100.0, 100.0]);
        let e = generalized_symmetric(&k, &m).unwrap();
        assert!(e.omega2[0] < e.omega2[1]);
        let residual =
            &k * &e.shapes - &m * &e.shapes * DMatrix::from_diagonal(&e.omega2.clone().into());
        assert!(residual.abs().max() < 1e-10);
        let gram = e.shapes.transpose() * &m * &e.shapes;
        assert!((gram - DMatrix::identity(2, 2)).abs().max() < 1e-12);
    }

    #[test]
    fn indefinite_mass_and_bad_entries_are_errors() {
        let m = DMatrix::from_row_slice(2, 2, &[1.0, 2.0, 2.0, 1.0]);
        let k = DMatrix::identity(2, 2);
        assert!(matches!(
            generalized_symmetric(&k, &m),
            Err(EigenError::NotPositiveDefinite { .. })
        ));
        let m = DMatrix::from_row_slice(2, 2, &[1.0, 0.0, 0.0, 0.0]);
        assert_eq!(
            generalized_symmetric(&k, &m).err(),
            Some(EigenError::NotPositiveDefinite { index: 1 })
        );
        let mut bad = DMatrix::identity(2, 2);
        bad[(0, 1)] = f64::NAN;
        assert_eq!(general(&bad).err(), Some(EigenError::NonFinite));
        assert_eq!(
            general(&DMatrix::zeros(2, 3)).err(),
            Some(EigenError::Shape)
        );
    }

    #[test]
    fn state_space_of_one_mass() {
        // m = 1, c = 2, k = 5: roots of s² + 2s + 5 are −1 ± 2i (quadratic formula).
        let one = |x: f64| DMatrix::from_element(1, 1, x);
        let e = state_space(&one(1.0), &one(2.0), &one(5.0)).unwrap();
        let mut v = e.values.clone();
        v.sort_by(|a, b| a.im.total_cmp(&b.im));
        assert!((v[0] - Complex64::new(-1.0, -2.0)).norm() < 1e-12);
        assert!((v[1] - Complex64::new(-1.0, 2.0)).norm() < 1e-12);
    }
}
