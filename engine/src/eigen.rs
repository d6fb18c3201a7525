//! Eigendecompositions: the one module that talks to faer.
//!
//! The rest of the engine holds M, C and K as nalgebra-sparse [`CscMatrix`] and everything
//! else as nalgebra [`DMatrix`]; this module copies them into faer, decomposes, and copies the
//! results back. The undamped modal solve ([`generalized_symmetric_sparse`]) reads K and a
//! diagonal M straight from their stored entries, so it never holds them dense. Why faer:
//! nalgebra has no eigenvectors for non-symmetric matrices and no generalized symmetric solver,
//! and its Schur iteration can fail to converge on companion-like state matrices; faer has both
//! at about LAPACK speed.
//!
//! Every failure (a mass matrix that is not positive definite, a value that is not finite, an
//! iteration that does not converge) is an [`EigenError`]; the inputs are checked before faer
//! sees them, so faer's own shape assertions cannot fire.

use faer::diag::{DiagMut, DiagRef};
use faer::dyn_stack::{MemBuffer, MemStack, StackReq};
use faer::linalg::{evd, temp_mat_scratch, triangular_solve};
use faer::{Mat, MatMut, MatRef, Par, Side};
use nalgebra::{Complex, DMatrix};
use nalgebra_sparse::CscMatrix;

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
/// produces) takes the same route with L = diag(√mᵢ), done by scaling; then, when the springs
/// join the coordinates in chains (see [`path_order`]), L⁻¹ K L⁻ᵀ is tridiagonal after a
/// reordering and goes straight to the tridiagonal solver. Dense K and M are stored sparse and
/// handed to [`generalized_symmetric_sparse`].
pub fn generalized_symmetric(
    k: &DMatrix<f64>,
    m: &DMatrix<f64>,
) -> Result<UndampedEigen, EigenError> {
    check_square(k)?;
    check_same(k, m)?;
    generalized_symmetric_sparse(&CscMatrix::from(k), &CscMatrix::from(m))
}

/// [`generalized_symmetric`] on sparse K and M. A diagonal M (every stored off-diagonal entry
/// zero) is read from its stored entries and K from its pattern, so neither is made dense; any
/// other M is made dense for its Cholesky factorisation.
pub fn generalized_symmetric_sparse(
    k: &CscMatrix<f64>,
    m: &CscMatrix<f64>,
) -> Result<UndampedEigen, EigenError> {
    check_square_sparse(k)?;
    check_square_sparse(m)?;
    if k.nrows() != m.nrows() {
        return Err(EigenError::Shape);
    }
    let n = k.nrows();
    if n == 0 {
        return Ok(UndampedEigen {
            omega2: Vec::new(),
            shapes: DMatrix::zeros(0, 0),
        });
    }
    if m.triplet_iter().all(|(i, j, &v)| i == j || v == 0.0) {
        let mut s = Vec::with_capacity(n);
        for i in 0..n {
            let mi = entry_of(m, i, i);
            if mi.is_nan() || mi <= 0.0 {
                return Err(EigenError::NotPositiveDefinite { index: i });
            }
            s.push(mi.sqrt());
        }
        // L⁻¹ K L⁻ᵀ entry by entry, for the few entries the tridiagonal route reads.
        let entry = |i: usize, j: usize| {
            let kij = 0.5 * (entry_of(k, i, j) + entry_of(k, j, i));
            kij / s[i] / s[j]
        };
        // The eigenvectors are written straight into the shapes' storage, then scaled (and
        // put back in coordinate order) in place: no second n × n matrix.
        let mut shapes = DMatrix::<f64>::zeros(n, n);
        let mut omega2 = vec![0.0; n];
        let mut u = MatMut::from_column_major_slice_mut(shapes.as_mut_slice(), n, n);
        // A pair whose two entries cancel is still taken as coupled: harmless, its entry in
        // the tridiagonal matrix is then zero.
        let coupled = k
            .triplet_iter()
            .filter(|&(_, _, &v)| v != 0.0)
            .map(|(i, j, _)| (i, j));
        match path_order(n, coupled) {
            Some(order) => {
                let diag: Vec<f64> = order.iter().map(|&i| entry(i, i)).collect();
                let sub: Vec<f64> = (0..n)
                    .map(|p| match order.get(p + 1) {
                        // Between two paths the entry is zero, which the solver deflates.
                        Some(&q) => entry(q.max(order[p]), q.min(order[p])),
                        None => 0.0,
                    })
                    .collect();
                tridiagonal(&diag, &sub, &mut omega2, u.as_mut())?;
                // Row p of u holds coordinate order[p].
                let mut column = vec![0.0; n];
                for mut col in shapes.column_iter_mut() {
                    column.copy_from_slice(col.as_slice());
                    for (p, &i) in order.iter().enumerate() {
                        col[i] = column[p] / s[i];
                    }
                }
            }
            None => {
                // K + Kᵀ from the stored entries, then halved and scaled in place: the same
                // arithmetic as `entry`, over every entry.
                let mut a = Mat::<f64>::zeros(n, n);
                for (i, j, &v) in k.triplet_iter() {
                    a[(i, j)] += v;
                    a[(j, i)] += v;
                }
                for j in 0..n {
                    for i in 0..n {
                        a[(i, j)] = 0.5 * a[(i, j)] / s[i] / s[j];
                    }
                }
                dense_symmetric(a.as_ref(), &mut omega2, u.as_mut())?;
                drop(a);
                for mut col in shapes.column_iter_mut() {
                    for (x, si) in col.iter_mut().zip(&s) {
                        *x /= si;
                    }
                }
            }
        }
        return Ok(UndampedEigen { omega2, shapes });
    }
    let l = cholesky(&DMatrix::from(m))?;
    // Y = L⁻¹ K; then A = L⁻¹ Yᵀ = L⁻¹ K L⁻ᵀ (K symmetric).
    let mut y = sparse_to_faer(k);
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

/// The entry (i, j) of a sparse matrix, zero where none is stored.
pub(crate) fn entry_of(a: &CscMatrix<f64>, i: usize, j: usize) -> f64 {
    a.get_entry(i, j).map_or(0.0, |e| e.into_value())
}

/// When the off-diagonal nonzeros of an n × n matrix (`nonzero`, its (i, j) positions; i, j
/// coupled when either (i, j) or (j, i) is listed; diagonal positions are skipped) form
/// disjoint paths, as they do for a chain of masses, an order of the coordinates along those
/// paths, path after path: in that order the matrix is tridiagonal. `None` for any other
/// pattern (a coordinate with three neighbours, or a cycle). The scan stops at the first
/// coordinate with a third neighbour, so a dense pattern costs little.
fn path_order(n: usize, nonzero: impl IntoIterator<Item = (usize, usize)>) -> Option<Vec<usize>> {
    const NONE: usize = usize::MAX;
    let mut nbr = vec![[NONE; 2]; n];
    let link = |nbr: &mut [[usize; 2]], i: usize, j: usize| -> bool {
        match nbr[i] {
            [NONE, _] => nbr[i][0] = j,
            [_, NONE] => nbr[i][1] = j,
            _ => return false,
        }
        true
    };
    // Both triangles: a pair is linked the first time either of its entries is seen. The
    // order of the links does not matter: a path is walked away from where it came from.
    for (i, j) in nonzero {
        if i == j || nbr[i].contains(&j) {
            continue;
        }
        if !(link(&mut nbr, i, j) && link(&mut nbr, j, i)) {
            return None;
        }
    }
    let mut order = Vec::with_capacity(n);
    let mut seen = vec![false; n];
    for start in 0..n {
        // Walk each path from one of its ends (a coordinate with at most one neighbour).
        if seen[start] || nbr[start][1] != NONE {
            continue;
        }
        let (mut prev, mut at) = (NONE, start);
        while at != NONE && !seen[at] {
            seen[at] = true;
            order.push(at);
            let next = if nbr[at][0] != prev {
                nbr[at][0]
            } else {
                nbr[at][1]
            };
            (prev, at) = (at, next);
        }
    }
    // Coordinates left unvisited lie on a cycle.
    (order.len() == n).then_some(order)
}

/// Eigenvalues (ascending, into `values`) and orthonormal eigenvectors (into `u`, one column
/// each) of the symmetric tridiagonal matrix with diagonal `diag` and subdiagonal `sub`
/// (`sub[p]` couples p and p + 1; its last entry is not read): faer's tridiagonal
/// divide-and-conquer solver, skipping the dense reduction to tridiagonal form and the
/// back-transformation that the general solver would spend on a matrix already in that form.
fn tridiagonal(
    diag: &[f64],
    sub: &[f64],
    values: &mut [f64],
    u: MatMut<'_, f64>,
) -> Result<(), EigenError> {
    let mut buffer = MemBuffer::new(tridiagonal_scratch(diag.len()));
    evd::tridiagonal_self_adjoint_evd(
        DiagRef::from_slice(diag),
        DiagRef::from_slice(sub),
        DiagMut::from_slice_mut(values),
        Some(u),
        Par::Seq,
        MemStack::new(&mut buffer),
        Default::default(),
    )
    .map_err(|_| EigenError::NoConvergence)
}

/// The workspace of faer's `tridiagonal_self_adjoint_evd` for a real matrix with eigenvectors,
/// exactly: copies of the diagonal and subdiagonal, an empty real U (the scalar is real), and
/// divide and conquer's four index arrays, six vectors and two n × n matrices (faer's
/// `tridiag_evd::divide_and_conquer_scratch`, which is not public). faer offers only the dense
/// solver's requirement, which adds a third n × n matrix (8 MB more at 1,000 coordinates) for
/// the reduction this route skips. faer is pinned to the version this was read from
/// (Cargo.toml), and the `tridiagonal_workspace_suffices` test runs the solver at sizes on both
/// sides of its recursion threshold: a MemStack that is too small would panic there.
fn tridiagonal_scratch(n: usize) -> StackReq {
    StackReq::all_of(&[
        temp_mat_scratch::<f64>(n, 1).array(2),
        temp_mat_scratch::<f64>(n, 0),
        StackReq::new::<usize>(n).array(4),
        temp_mat_scratch::<f64>(n, 1).array(6),
        temp_mat_scratch::<f64>(n, n).array(2),
    ])
}

/// Eigenvalues (ascending, into `values`) and orthonormal eigenvectors (into `u`) of the
/// symmetric matrix `a`, lower triangle read: what `Mat::self_adjoint_eigen` does, writing
/// into the caller's storage.
fn dense_symmetric(
    a: MatRef<'_, f64>,
    values: &mut [f64],
    u: MatMut<'_, f64>,
) -> Result<(), EigenError> {
    let mut buffer = MemBuffer::new(evd::self_adjoint_evd_scratch::<f64>(
        a.nrows(),
        evd::ComputeEigenvectors::Yes,
        Par::Seq,
        Default::default(),
    ));
    evd::self_adjoint_evd(
        a,
        DiagMut::from_slice_mut(values),
        Some(u),
        Par::Seq,
        MemStack::new(&mut buffer),
        Default::default(),
    )
    .map_err(|_| EigenError::NoConvergence)
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

/// Φᵀ A Φ for a sparse A: A Φ through A's stored entries (sparse times dense), then Φᵀ (A Φ)
/// dense, so A is never made dense.
pub fn congruence_sparse(
    phi: &DMatrix<f64>,
    a: &CscMatrix<f64>,
) -> Result<DMatrix<f64>, EigenError> {
    check_square_sparse(a)?;
    if phi.nrows() != a.nrows() {
        return Err(EigenError::Shape);
    }
    check_finite(phi)?;
    let p = to_faer(phi);
    let mut ap = Mat::<f64>::zeros(a.nrows(), phi.ncols());
    for (i, l, &v) in a.triplet_iter() {
        for col in 0..phi.ncols() {
            ap[(i, col)] += v * p[(l, col)];
        }
    }
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

fn check_square_sparse(a: &CscMatrix<f64>) -> Result<(), EigenError> {
    if a.nrows() != a.ncols() {
        return Err(EigenError::Shape);
    }
    if a.values().iter().all(|x| x.is_finite()) {
        Ok(())
    } else {
        Err(EigenError::NonFinite)
    }
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

fn sparse_to_faer(a: &CscMatrix<f64>) -> Mat<f64> {
    let mut out = Mat::zeros(a.nrows(), a.ncols());
    for (i, j, &v) in a.triplet_iter() {
        out[(i, j)] += v;
    }
    out
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

    /// A fixed–free chain of `n` equal masses whose coordinate i sits at position `at[i]` along
    /// the chain (position 0 is the one on the spring to ground).
    fn scrambled_chain(at: &[usize], m: f64, k: f64) -> (DMatrix<f64>, DMatrix<f64>) {
        let n = at.len();
        let mut pos_to_dof = vec![0; n];
        for (i, &p) in at.iter().enumerate() {
            pos_to_dof[p] = i;
        }
        let mut kk = DMatrix::zeros(n, n);
        kk[(pos_to_dof[0], pos_to_dof[0])] += k;
        for p in 1..n {
            let (a, b) = (pos_to_dof[p - 1], pos_to_dof[p]);
            kk[(a, a)] += k;
            kk[(b, b)] += k;
            kk[(a, b)] -= k;
            kk[(b, a)] -= k;
        }
        (kk, DMatrix::from_diagonal_element(n, n, m))
    }

    /// The positions of the nonzero entries of `a`, column by column.
    fn nonzero(a: &DMatrix<f64>) -> Vec<(usize, usize)> {
        let (r, c) = a.shape();
        (0..c)
            .flat_map(|j| (0..r).map(move |i| (i, j)))
            .filter(|&(i, j)| a[(i, j)] != 0.0)
            .collect()
    }

    #[test]
    fn path_order_finds_chains_and_refuses_other_patterns() {
        let (k, _) = scrambled_chain(&[3, 0, 5, 1, 4, 2], 1.0, 1.0);
        let order = path_order(6, nonzero(&k)).unwrap();
        // Along the order, only neighbours are coupled: tridiagonal.
        for (p, &i) in order.iter().enumerate() {
            for (q, &j) in order.iter().enumerate() {
                if p.abs_diff(q) > 1 {
                    assert_eq!(k[(i, j)], 0.0);
                }
            }
        }
        // Two separate chains and a lone coordinate: still paths.
        let mut two = DMatrix::<f64>::identity(5, 5);
        for (a, b) in [(0, 3), (1, 4)] {
            two[(a, b)] = -1.0;
            two[(b, a)] = -1.0;
        }
        assert_eq!(path_order(5, nonzero(&two)).map(|o| o.len()), Some(5));
        // A coordinate with three neighbours, and a ring: not paths.
        let mut star = DMatrix::<f64>::identity(4, 4);
        for b in 1..4 {
            star[(0, b)] = -1.0;
            star[(b, 0)] = -1.0;
        }
        assert_eq!(path_order(4, nonzero(&star)), None);
        let mut ring = DMatrix::<f64>::identity(4, 4);
        for a in 0..4 {
            let b = (a + 1) % 4;
            ring[(a, b)] = -1.0;
            ring[(b, a)] = -1.0;
        }
        assert_eq!(path_order(4, nonzero(&ring)), None);
    }

    #[test]
    fn scrambled_chain_matches_the_closed_form_through_the_tridiagonal_route() {
        // Fixed–free chain of N equal masses (standard closed form for the discrete chain,
        // from memory): ωj = 2√(k/m)·sin((2j−1)π/(2(2N+1))), j = 1..N. Coordinates declared
        // out of chain order, so the reordering is exercised; N = 150 is above faer's
        // divide-and-conquer threshold (128), so its recursion is exercised too.
        let n = 150;
        let at: Vec<usize> = (0..n).map(|i| (i * 37) % n).collect();
        let (m, k) = (2.0, 5e4);
        let (kk, mm) = scrambled_chain(&at, m, k);
        assert!(path_order(n, nonzero(&kk)).is_some());
        let e = generalized_symmetric(&kk, &mm).unwrap();
        for (j, w2) in e.omega2.iter().enumerate() {
            let theta = (2 * j + 1) as f64 * std::f64::consts::PI / (2.0 * (2 * n + 1) as f64);
            let expected = 4.0 * k / m * theta.sin().powi(2);
            assert!(
                (w2 - expected).abs() <= 1e-10 * expected,
                "mode {j}: {w2} vs {expected}"
            );
        }
        let residual =
            &kk * &e.shapes - &mm * &e.shapes * DMatrix::from_diagonal(&e.omega2.clone().into());
        assert!(residual.abs().max() < 1e-8 * 4.0 * k / m);
        let gram = e.shapes.transpose() * &mm * &e.shapes;
        assert!((gram - DMatrix::identity(n, n)).abs().max() < 1e-12);
    }

    #[test]
    fn tridiagonal_workspace_suffices() {
        // The exact workspace of `tridiagonal_scratch` at sizes below, at and above faer's
        // recursion threshold (128), with a zero subdiagonal entry (two paths) in the larger
        // ones: the solver must not run out of workspace (a panic) and must decompose.
        for n in [1, 2, 3, 64, 127, 128, 129, 200, 257, 600] {
            let diag: Vec<f64> = (0..n).map(|i| 2.0 + (i % 7) as f64 * 0.25).collect();
            let sub: Vec<f64> = (0..n)
                .map(|p| {
                    if n > 100 && p == n / 2 {
                        0.0
                    } else {
                        -1.0 + (p % 3) as f64 * 0.1
                    }
                })
                .collect();
            let mut values = vec![0.0; n];
            let mut u = Mat::<f64>::zeros(n, n);
            tridiagonal(&diag, &sub, &mut values, u.as_mut()).unwrap();
            let t = Mat::from_fn(n, n, |i, j| match i.abs_diff(j) {
                0 => diag[i],
                1 => sub[i.min(j)],
                _ => 0.0,
            });
            let residual = &t * &u
                - &u * faer::Mat::from_fn(n, n, |i, j| if i == j { values[i] } else { 0.0 });
            let gram = u.transpose() * &u - Mat::<f64>::identity(n, n);
            let max = |a: &Mat<f64>| {
                (0..n)
                    .flat_map(|j| (0..n).map(move |i| (i, j)))
                    .fold(0.0_f64, |m, (i, j)| m.max(a[(i, j)].abs()))
            };
            assert!(
                max(&residual) < 1e-12,
                "n = {n}: residual {}",
                max(&residual)
            );
            assert!(max(&gram) < 1e-12, "n = {n}: orthogonality {}", max(&gram));
            assert!(
                values.windows(2).all(|w| w[0] <= w[1]),
                "n = {n}: not ascending"
            );
        }
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
    fn empty_and_one_coordinate_problems() {
        let e = generalized_symmetric(&DMatrix::zeros(0, 0), &DMatrix::zeros(0, 0)).unwrap();
        assert!(e.omega2.is_empty() && e.shapes.is_empty());
        // One mass m = 4 on k = 100: ω² = k/m = 25, φ = 1/√m (mass-normalised).
        let e = generalized_symmetric(
            &DMatrix::from_element(1, 1, 100.0),
            &DMatrix::from_element(1, 1, 4.0),
        )
        .unwrap();
        assert!((e.omega2[0] - 25.0).abs() < 1e-12);
        assert!((e.shapes[(0, 0)].abs() - 0.5).abs() < 1e-15);
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
