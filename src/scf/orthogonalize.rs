//! Canonical orthogonalisation (Löwdin, Adv. Quantum Chem. 5 (1970) 185; Szabo & Ostlund
//! eq. 3.169): X = U s^{-1/2} over the eigenvectors of S whose eigenvalues exceed a threshold.
//! Dropping the small ones removes near-linear dependencies of the basis; the number of
//! molecular orbitals becomes the number kept.

use bandcast_linalg::{congruence, eigh, mul, Mat};

use crate::error::{Error, Result};

/// The orthogonalising transformation X (AO × kept), XᵀSX = 1.
#[derive(Debug, Clone)]
pub struct Orthogonalizer {
    pub x: Mat<f64>,
    /// Overlap eigenvalues removed (below `threshold`).
    pub n_dropped: usize,
    pub smallest_kept: f64,
    pub threshold: f64,
}

impl Orthogonalizer {
    /// Canonical orthogonalisation of the overlap matrix `s`.
    pub fn canonical(s: &Mat<f64>, threshold: f64) -> Result<Self> {
        let n = s.nrows();
        let (w, u) = eigh(s.as_ref());
        if w.first().is_some_and(|&v| v < -1e-8) {
            return Err(Error::computation(format!(
                "the overlap matrix has a negative eigenvalue ({:.3e}): the basis functions or \
                 geometry are broken (two atoms on top of each other?)",
                w[0]
            )));
        }
        let kept: Vec<usize> = (0..n).filter(|&k| w[k] >= threshold).collect();
        if kept.is_empty() {
            return Err(Error::computation(
                "every overlap eigenvalue is below the linear-dependence threshold",
            ));
        }
        let x = Mat::<f64>::from_fn(n, kept.len(), |i, k| u[(i, kept[k])] / w[kept[k]].sqrt());
        Ok(Orthogonalizer {
            x,
            n_dropped: n - kept.len(),
            smallest_kept: w[kept[0]],
            threshold,
        })
    }

    pub fn n_independent(&self) -> usize {
        self.x.ncols()
    }

    /// Solve F C = S C ε: eigenvalues ascending and C (AO × kept) with CᵀSC = 1.
    pub fn solve(&self, f: &Mat<f64>) -> (Vec<f64>, Mat<f64>) {
        let fp = congruence(self.x.as_ref(), f.as_ref());
        let (eps, cp) = eigh(fp.as_ref());
        (eps, mul(self.x.as_ref(), false, cp.as_ref(), false))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn drops_a_duplicate_function_and_orthonormalises() {
        // Three functions, the third a copy of the first: one exact dependence.
        let s = Mat::<f64>::from_fn(3, 3, |i, j| {
            let a = [[1.0, 0.4, 1.0], [0.4, 1.0, 0.4], [1.0, 0.4, 1.0]];
            a[i][j]
        });
        let o = Orthogonalizer::canonical(&s, 1e-7).unwrap();
        assert_eq!(o.n_dropped, 1);
        assert_eq!(o.n_independent(), 2);
        let xsx = congruence(o.x.as_ref(), s.as_ref());
        for i in 0..2 {
            for j in 0..2 {
                let e = if i == j { 1.0 } else { 0.0 };
                assert!((xsx[(i, j)] - e).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn generalized_eigenproblem_is_solved() {
        let s = Mat::<f64>::from_fn(2, 2, |i, j| if i == j { 1.0 } else { 0.5 });
        let f = Mat::<f64>::from_fn(2, 2, |i, j| if i == j { -1.0 } else { -0.8 });
        let o = Orthogonalizer::canonical(&s, 1e-7).unwrap();
        let (eps, c) = o.solve(&f);
        // For the symmetric 2×2 problem the roots are (F11 ± F12)/(1 ± S12).
        assert!((eps[0] - (-1.8 / 1.5)).abs() < 1e-12);
        assert!((eps[1] - (-0.2 / 0.5)).abs() < 1e-12);
        for k in 0..2 {
            for i in 0..2 {
                let fc: f64 = (0..2).map(|j| f[(i, j)] * c[(j, k)]).sum();
                let sc: f64 = (0..2).map(|j| s[(i, j)] * c[(j, k)]).sum();
                assert!((fc - eps[k] * sc).abs() < 1e-12);
            }
        }
    }
}
