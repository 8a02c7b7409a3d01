//! Pulay's direct inversion in the iterative subspace (P. Pulay, Chem. Phys. Lett. 73 (1980)
//! 393; J. Comput. Chem. 3 (1982) 556).
//!
//! Each iteration stores the Fock matrices (one per spin channel) and an error vector, the
//! orthogonalised commutator Xᵀ(FPS − SPF)X, which vanishes at self-consistency. The
//! extrapolated Fock matrix is F = Σ c_i F_i with c minimising |Σ c_i e_i|² subject to
//! Σ c_i = 1, i.e. the linear system
//!
//! ```text
//! | B   -1 | |c|   | 0|
//! | -1ᵀ  0 | |λ| = |-1|,   B_ij = e_i · e_j
//! ```
//!
//! When B becomes numerically singular the oldest entries are dropped until it solves.
//!
//! The same Pulay solve (`pulay_coefficients`) serves the coupled-cluster amplitudes
//! (`VectorDiis`); this file is the one DIIS of the program.

use std::collections::VecDeque;

use bandcast_linalg::{solve_small, Mat};

/// The DIIS subspace.
#[derive(Debug, Clone)]
pub struct Diis {
    capacity: usize,
    focks: VecDeque<Vec<Mat<f64>>>,
    errors: VecDeque<Vec<f64>>,
}

impl Diis {
    pub fn new(capacity: usize) -> Self {
        Diis {
            capacity: capacity.max(2),
            focks: VecDeque::new(),
            errors: VecDeque::new(),
        }
    }

    pub fn len(&self) -> usize {
        self.focks.len()
    }

    pub fn is_empty(&self) -> bool {
        self.focks.is_empty()
    }

    pub fn clear(&mut self) {
        self.focks.clear();
        self.errors.clear();
    }

    /// Add (F per spin channel, error vector) and return the extrapolated Fock matrices.
    pub fn extrapolate(&mut self, focks: Vec<Mat<f64>>, error: Vec<f64>) -> Vec<Mat<f64>> {
        if self.focks.len() == self.capacity {
            self.focks.pop_front();
            self.errors.pop_front();
        }
        self.focks.push_back(focks);
        self.errors.push_back(error);
        loop {
            let m = self.focks.len();
            if m == 1 {
                return self.focks[0].clone();
            }
            if let Some(c) = self.coefficients() {
                let mut out: Vec<Mat<f64>> = self.focks[0]
                    .iter()
                    .map(|f| Mat::<f64>::zeros(f.nrows(), f.ncols()))
                    .collect();
                for (ci, fi) in c.iter().zip(self.focks.iter()) {
                    for (o, f) in out.iter_mut().zip(fi.iter()) {
                        for j in 0..f.ncols() {
                            for i in 0..f.nrows() {
                                o[(i, j)] += ci * f[(i, j)];
                            }
                        }
                    }
                }
                return out;
            }
            self.focks.pop_front();
            self.errors.pop_front();
        }
    }

    /// Solve the bordered system; None when it is singular.
    fn coefficients(&self) -> Option<Vec<f64>> {
        pulay_coefficients(&self.errors, Some(1e8))
    }
}

/// The Pulay coefficients c (Σ c_i = 1) minimising |Σ c_i e_i|² for the stored error
/// vectors: the bordered system above, B scaled by its largest diagonal element. None when
/// the system is singular, or when some |c_i| exceeds `max_coefficient` (near-linear
/// dependence of the error vectors).
pub fn pulay_coefficients(
    errors: &VecDeque<Vec<f64>>,
    max_coefficient: Option<f64>,
) -> Option<Vec<f64>> {
    let m = errors.len();
    let mut b = vec![vec![0.0; m + 1]; m + 1];
    for i in 0..m {
        for j in 0..=i {
            let v: f64 = errors[i]
                .iter()
                .zip(errors[j].iter())
                .map(|(a, b)| a * b)
                .sum();
            b[i][j] = v;
            b[j][i] = v;
        }
    }
    // Scale by the largest diagonal so the border (−1) is commensurate with B.
    let scale = (0..m).map(|i| b[i][i]).fold(0.0f64, f64::max);
    if scale <= 0.0 {
        return None;
    }
    for row in b.iter_mut().take(m) {
        for v in row.iter_mut().take(m) {
            *v /= scale;
        }
    }
    for i in 0..m {
        b[i][m] = -1.0;
        b[m][i] = -1.0;
    }
    let mut rhs = vec![0.0; m + 1];
    rhs[m] = -1.0;
    let x = solve_small(&b, &rhs)?;
    let c = x[..m].to_vec();
    if let Some(limit) = max_coefficient {
        if c.iter().any(|v| !v.is_finite() || v.abs() > limit) {
            return None;
        }
    }
    Some(c)
}

/// DIIS for flat amplitude vectors (coupled cluster: Scuseria, Lee & Schaefer, Chem. Phys.
/// Lett. 130 (1986) 236). Each iterate x comes with the step e the Jacobi update wants to
/// take; the extrapolation is Σ c_i (x_i + e_i).
pub struct VectorDiis {
    max: usize,
    vecs: VecDeque<Vec<f64>>,
    errs: VecDeque<Vec<f64>>,
}

impl VectorDiis {
    pub fn new(max: usize) -> Self {
        VectorDiis {
            max: max.max(2),
            vecs: VecDeque::new(),
            errs: VecDeque::new(),
        }
    }

    /// Store (x, err) and return the extrapolated vector (x itself until two are stored; the
    /// plain step x + err, after dropping the oldest entry, when the system is singular).
    pub fn extrapolate(&mut self, x: Vec<f64>, err: Vec<f64>) -> Vec<f64> {
        if self.vecs.len() == self.max {
            self.vecs.pop_front();
            self.errs.pop_front();
        }
        self.vecs.push_back(x);
        self.errs.push_back(err);
        let m = self.vecs.len();
        if m < 2 {
            return self.vecs[m - 1].clone();
        }
        match pulay_coefficients(&self.errs, None) {
            Some(c) => {
                let n = self.vecs[0].len();
                let mut out = vec![0.0; n];
                for (k, ck) in c.iter().take(m).enumerate() {
                    for (o, (x, e)) in out.iter_mut().zip(self.vecs[k].iter().zip(&self.errs[k])) {
                        *o += ck * (x + e);
                    }
                }
                out
            }
            None => {
                self.vecs.pop_front();
                self.errs.pop_front();
                let k = self.vecs.len() - 1;
                self.vecs[k]
                    .iter()
                    .zip(&self.errs[k])
                    .map(|(x, e)| x + e)
                    .collect()
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coefficients_sum_to_one_and_cancel_linear_errors() {
        // Error vectors e_i = F_i − F* (a linear model): DIIS finds F* from two points.
        let target = 0.3;
        let mut d = Diis::new(6);
        let f1 = Mat::<f64>::from_fn(1, 1, |_, _| 1.0);
        let f2 = Mat::<f64>::from_fn(1, 1, |_, _| -0.5);
        d.extrapolate(vec![f1], vec![1.0 - target]);
        let out = d.extrapolate(vec![f2], vec![-0.5 - target]);
        assert!((out[0][(0, 0)] - target).abs() < 1e-12);
        let c = d.coefficients().unwrap();
        assert!((c.iter().sum::<f64>() - 1.0).abs() < 1e-12);
    }

    #[test]
    fn singular_subspace_drops_oldest() {
        let mut d = Diis::new(4);
        let f = Mat::<f64>::from_fn(1, 1, |_, _| 2.0);
        d.extrapolate(vec![f.clone()], vec![1.0, 0.0]);
        let out = d.extrapolate(vec![f], vec![1.0, 0.0]);
        assert_eq!(d.len(), 1);
        assert!((out[0][(0, 0)] - 2.0).abs() < 1e-15);
    }

    #[test]
    fn keeps_at_most_capacity() {
        let mut d = Diis::new(3);
        for k in 0..10 {
            let f = Mat::<f64>::from_fn(1, 1, |_, _| k as f64);
            d.extrapolate(vec![f], vec![(k as f64).exp(), 1.0 / (1.0 + k as f64)]);
        }
        assert!(d.len() <= 3);
    }

    /// DIIS on a linear fixed-point iteration x ← Bx + c converges to the solution of
    /// (1 − B)x = c far faster than the plain iteration (Pulay 1980).
    #[test]
    fn diis_solves_linear_fixed_point() {
        let n = 6;
        let b: Vec<Vec<f64>> = (0..n)
            .map(|i| {
                (0..n)
                    .map(|j| 0.9 * ((i * 3 + j * 5) % 7) as f64 / 7.0 / n as f64)
                    .collect()
            })
            .collect();
        let c: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
        let mut x = vec![0.0; n];
        let mut diis = VectorDiis::new(8);
        for _ in 0..30 {
            let nx: Vec<f64> = (0..n)
                .map(|i| (0..n).map(|j| b[i][j] * x[j]).sum::<f64>() + c[i])
                .collect();
            let err: Vec<f64> = nx.iter().zip(&x).map(|(a, b)| a - b).collect();
            x = diis.extrapolate(x, err);
        }
        for i in 0..n {
            let r: f64 = x[i] - (0..n).map(|j| b[i][j] * x[j]).sum::<f64>() - c[i];
            assert!(r.abs() < 1e-10, "residual {r}");
        }
    }
}
