//! Non-generic dense linear algebra for bandcast.
//!
//! faer's routines are generic and are compiled in the crate that calls them. Keeping every
//! heavy call behind the plain `f64` functions of this small crate means faer is instantiated
//! once, here, and rebuilding the main crate stays fast. Use these functions for
//! eigen-decompositions, products and solves; plain `Mat` construction and indexing are fine
//! to use directly.

pub use faer::{Mat, MatMut, MatRef, Par};

use faer::linalg::matmul::matmul;
use faer::linalg::triangular_solve::{
    solve_lower_triangular_in_place, solve_upper_triangular_in_place,
};
use faer::{Accum, Side};

/// Clear the upper halves of the vector registers of the calling thread (`vzeroupper`).
///
/// faer's vectorised kernels can leave the upper halves of the AVX registers "dirty" on the
/// threads that ran them. Code compiled for baseline x86-64 (SSE encodings: all of
/// bandcast's own loops, e.g. the integral engine) then runs up to about twice as slow on
/// those threads, because every SSE instruction must merge with the stale upper bits
/// (measured: all ERIs of benzene/cc-pVDZ after one faer eigen-decomposition took 4.0–5.7
/// instead of 3.2 CPU-s). Every wrapper below calls this (on all pool threads when faer ran
/// in parallel); call it yourself at the start of hot loops that may run after faer code
/// called outside this crate.
#[inline]
pub fn clear_vector_state() {
    #[cfg(target_arch = "x86_64")]
    {
        #[target_feature(enable = "avx")]
        unsafe fn zero_upper() {
            std::arch::x86_64::_mm256_zeroupper();
        }
        if std::arch::is_x86_feature_detected!("avx") {
            // SAFETY: the CPU supports AVX (checked above); vzeroupper only clears the
            // upper register halves, which hold no live values between function calls.
            unsafe { zero_upper() };
        }
    }
}

/// `clear_vector_state` on the calling thread now and on every other thread of the current
/// rayon pool as soon as it looks for work (`rayon::spawn_broadcast`: nothing waits, so
/// this cannot deadlock whatever the caller holds).
pub fn clear_vector_state_all_threads() {
    clear_vector_state();
    if rayon::current_num_threads() > 1 {
        rayon::spawn_broadcast(|_| clear_vector_state());
    }
}

/// After a faer call with parallelism `par`: clear the vector state where faer ran.
fn after(par: Par) {
    match par {
        Par::Seq => clear_vector_state(),
        _ => clear_vector_state_all_threads(),
    }
}

/// Parallelism for the calls below: all rayon threads, or sequential for small matrices
/// (faer's sequential path is faster below about n = 100).
pub fn par_for(n: usize) -> Par {
    if n < 100 {
        Par::Seq
    } else {
        Par::rayon(0)
    }
}

/// Make faer's implicit parallelism (used inside eigen solvers) follow the calls above.
pub fn set_global_parallelism_rayon() {
    faer::set_global_parallelism(Par::rayon(0));
}

/// Eigen-decomposition of a symmetric matrix (lower triangle read):
/// eigenvalues ascending, eigenvectors as columns.
pub fn eigh(a: MatRef<'_, f64>) -> (Vec<f64>, Mat<f64>) {
    let n = a.nrows();
    assert_eq!(n, a.ncols(), "eigh needs a square matrix");
    if n == 0 {
        return (Vec::new(), Mat::zeros(0, 0));
    }
    let eig = a
        .self_adjoint_eigen(Side::Lower)
        .expect("symmetric eigen-decomposition failed");
    after(faer::get_global_parallelism());
    let w: Vec<f64> = eig.S().column_vector().iter().copied().collect();
    (w, eig.U().to_owned())
}

/// c = beta_keep * c + alpha * op(a) * op(b), where op is transpose when the flag is set.
/// With `accumulate == false` the old content of c is discarded.
#[allow(clippy::too_many_arguments)]
pub fn gemm(
    c: MatMut<'_, f64>,
    accumulate: bool,
    a: MatRef<'_, f64>,
    trans_a: bool,
    b: MatRef<'_, f64>,
    trans_b: bool,
    alpha: f64,
    par: Par,
) {
    let a = if trans_a { a.transpose() } else { a };
    let b = if trans_b { b.transpose() } else { b };
    let acc = if accumulate {
        Accum::Add
    } else {
        Accum::Replace
    };
    matmul(c, acc, a, b, alpha, par);
    after(par);
}

/// op(a) * op(b) as a new matrix.
pub fn mul(a: MatRef<'_, f64>, trans_a: bool, b: MatRef<'_, f64>, trans_b: bool) -> Mat<f64> {
    let m = if trans_a { a.ncols() } else { a.nrows() };
    let n = if trans_b { b.nrows() } else { b.ncols() };
    let k = if trans_a { a.nrows() } else { a.ncols() };
    let mut c = Mat::<f64>::zeros(m, n);
    gemm(
        c.as_mut(),
        false,
        a,
        trans_a,
        b,
        trans_b,
        1.0,
        par_for(m.max(n).max(k)),
    );
    c
}

/// aᵀ · m · a (for example Cᵀ F C or Xᵀ F X).
pub fn congruence(a: MatRef<'_, f64>, m: MatRef<'_, f64>) -> Mat<f64> {
    let ma = mul(m, false, a, false);
    mul(a, true, ma.as_ref(), false)
}

/// `eigh` with explicit parallelism: `Par::Seq` gives the same bits on any thread count.
pub fn eigh_with(a: MatRef<'_, f64>, par: Par) -> (Vec<f64>, Mat<f64>) {
    use faer::dyn_stack::{MemBuffer, MemStack};
    use faer::linalg::evd;
    let n = a.nrows();
    assert_eq!(n, a.ncols(), "eigh needs a square matrix");
    if n == 0 {
        return (Vec::new(), Mat::zeros(0, 0));
    }
    let mut u = Mat::<f64>::zeros(n, n);
    let mut s = faer::diag::Diag::<f64>::zeros(n);
    let mut mem = MemBuffer::new(evd::self_adjoint_evd_scratch::<f64>(
        n,
        evd::ComputeEigenvectors::Yes,
        par,
        Default::default(),
    ));
    evd::self_adjoint_evd(
        a,
        s.as_mut(),
        Some(u.as_mut()),
        par,
        MemStack::new(&mut mem),
        Default::default(),
    )
    .expect("symmetric eigen-decomposition failed");
    after(par);
    let w: Vec<f64> = s.column_vector().iter().copied().collect();
    (w, u)
}

/// `cholesky_lower` with explicit parallelism (`Par::Seq`: the same bits on any thread
/// count).
pub fn cholesky_lower_with(a: MatRef<'_, f64>, par: Par) -> Option<Mat<f64>> {
    use faer::dyn_stack::{MemBuffer, MemStack};
    use faer::linalg::cholesky::llt::factor;
    let n = a.nrows();
    let mut l = a.to_owned();
    let mut mem = MemBuffer::new(factor::cholesky_in_place_scratch::<f64>(
        n,
        par,
        Default::default(),
    ));
    factor::cholesky_in_place(
        l.as_mut(),
        Default::default(),
        par,
        MemStack::new(&mut mem),
        Default::default(),
    )
    .ok()?;
    after(par);
    for j in 0..n {
        for i in 0..j {
            l[(i, j)] = 0.0;
        }
    }
    Some(l)
}

/// Solve L X = B in place with explicit parallelism.
pub fn solve_lower_in_place_with(l: MatRef<'_, f64>, b: MatMut<'_, f64>, par: Par) {
    solve_lower_triangular_in_place(l, b, par);
    after(par);
}

/// Lower Cholesky factor L of a symmetric positive-definite matrix, or None.
pub fn cholesky_lower(a: MatRef<'_, f64>) -> Option<Mat<f64>> {
    let llt = a.llt(Side::Lower);
    after(faer::get_global_parallelism());
    Some(llt.ok()?.L().to_owned())
}

/// Solve L X = B in place (L lower triangular).
pub fn solve_lower_in_place(l: MatRef<'_, f64>, b: MatMut<'_, f64>) {
    let par = par_for(l.nrows());
    solve_lower_triangular_in_place(l, b, par);
    after(par);
}

/// Solve U X = B in place (U upper triangular).
pub fn solve_upper_in_place(u: MatRef<'_, f64>, b: MatMut<'_, f64>) {
    let par = par_for(u.nrows());
    solve_upper_triangular_in_place(u, b, par);
    after(par);
}

/// Solve the general square system A x = b by Gaussian elimination with partial pivoting.
/// Returns None when A is singular to working precision. Meant for small systems (DIIS).
pub fn solve_small(a: &[Vec<f64>], b: &[f64]) -> Option<Vec<f64>> {
    let n = b.len();
    let mut m: Vec<Vec<f64>> = a.to_vec();
    let mut x = b.to_vec();
    let scale = m
        .iter()
        .flat_map(|r| r.iter())
        .fold(0.0f64, |s, v| s.max(v.abs()))
        .max(f64::MIN_POSITIVE);
    for col in 0..n {
        let piv = (col..n).max_by(|&i, &j| m[i][col].abs().total_cmp(&m[j][col].abs()))?;
        if m[piv][col].abs() <= 1e-14 * scale {
            return None;
        }
        m.swap(col, piv);
        x.swap(col, piv);
        for row in col + 1..n {
            let f = m[row][col] / m[col][col];
            if f != 0.0 {
                for k in col..n {
                    m[row][k] -= f * m[col][k];
                }
                x[row] -= f * x[col];
            }
        }
    }
    for col in (0..n).rev() {
        let mut s = x[col];
        for k in col + 1..n {
            s -= m[col][k] * x[k];
        }
        x[col] = s / m[col][col];
    }
    Some(x)
}

/// Thin singular value decomposition a = U diag(s) Vᵀ; singular values descending.
pub fn svd(a: MatRef<'_, f64>) -> (Mat<f64>, Vec<f64>, Mat<f64>) {
    let s = a.thin_svd();
    after(faer::get_global_parallelism());
    let s = s.expect("singular value decomposition failed");
    let sv: Vec<f64> = s.S().column_vector().iter().copied().collect();
    (s.U().to_owned(), sv, s.V().to_owned())
}

/// Eigen-decomposition of a general (non-symmetric) real square matrix: eigenvalues as
/// (real parts, imaginary parts) and right eigenvectors as columns (real and imaginary
/// parts), in no particular order. None when the iteration fails. Meant for small
/// matrices (Davidson subspaces, reference checks).
#[allow(clippy::type_complexity)]
pub fn eig_general(a: MatRef<'_, f64>) -> Option<(Vec<f64>, Vec<f64>, Mat<f64>, Mat<f64>)> {
    let n = a.nrows();
    assert_eq!(n, a.ncols(), "eig_general needs a square matrix");
    if n == 0 {
        return Some((Vec::new(), Vec::new(), Mat::zeros(0, 0), Mat::zeros(0, 0)));
    }
    let e = a.eigen();
    after(faer::get_global_parallelism());
    let e = e.ok()?;
    let s = e.S();
    let w = s.column_vector();
    let re: Vec<f64> = (0..n).map(|k| w[k].re).collect();
    let im: Vec<f64> = (0..n).map(|k| w[k].im).collect();
    let u = e.U();
    let ur = Mat::<f64>::from_fn(n, n, |i, j| u[(i, j)].re);
    let ui = Mat::<f64>::from_fn(n, n, |i, j| u[(i, j)].im);
    Some((re, im, ur, ui))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn eigh_reconstructs_symmetric_matrix() {
        let n = 7;
        let a = Mat::<f64>::from_fn(n, n, |i, j| 1.0 / (1.0 + i as f64 + j as f64));
        let (w, u) = eigh(a.as_ref());
        for k in 1..n {
            assert!(w[k] >= w[k - 1]);
        }
        let mut r = Mat::<f64>::zeros(n, n);
        for i in 0..n {
            for j in 0..n {
                r[(i, j)] = (0..n).map(|k| u[(i, k)] * w[k] * u[(j, k)]).sum();
            }
        }
        for i in 0..n {
            for j in 0..n {
                assert!((r[(i, j)] - a[(i, j)]).abs() < 1e-13);
            }
        }
    }

    #[test]
    fn gemm_transposes() {
        let a = Mat::<f64>::from_fn(3, 2, |i, j| (i * 2 + j) as f64);
        let b = Mat::<f64>::from_fn(3, 4, |i, j| (i + j) as f64 - 1.0);
        let c = mul(a.as_ref(), true, b.as_ref(), false);
        for i in 0..2 {
            for j in 0..4 {
                let e: f64 = (0..3).map(|k| a[(k, i)] * b[(k, j)]).sum();
                assert!((c[(i, j)] - e).abs() < 1e-14);
            }
        }
    }

    #[test]
    fn small_solve_and_cholesky() {
        let a = vec![
            vec![4.0, 1.0, 0.5],
            vec![1.0, 3.0, 0.2],
            vec![0.5, 0.2, 2.0],
        ];
        let x = solve_small(&a, &[1.0, 2.0, 3.0]).unwrap();
        for i in 0..3 {
            let r: f64 = (0..3).map(|k| a[i][k] * x[k]).sum();
            assert!((r - [1.0, 2.0, 3.0][i]).abs() < 1e-14);
        }
        let m = Mat::<f64>::from_fn(3, 3, |i, j| a[i][j]);
        let l = cholesky_lower(m.as_ref()).unwrap();
        let llt = mul(l.as_ref(), false, l.as_ref(), true);
        for i in 0..3 {
            for j in 0..3 {
                assert!((llt[(i, j)] - a[i][j]).abs() < 1e-14);
            }
        }
        let (re, im, ur, _ui) = eig_general(m.as_ref()).unwrap();
        for k in 0..3 {
            assert!(im[k].abs() < 1e-12);
            for i in 0..3 {
                let r: f64 = (0..3).map(|j| a[i][j] * ur[(j, k)]).sum();
                assert!((r - re[k] * ur[(i, k)]).abs() < 1e-10);
            }
        }
        let (u, s, v) = svd(m.as_ref());
        assert_eq!(s.len(), 3);
        assert!(u.nrows() == 3 && v.nrows() == 3);
    }
}
