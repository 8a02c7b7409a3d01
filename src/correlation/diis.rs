//! Pulay's direct inversion in the iterative subspace for amplitude vectors
//! (Pulay, Chem. Phys. Lett. 73 (1980) 393; for coupled cluster: Scuseria, Lee & Schaefer,
//! Chem. Phys. Lett. 130 (1986) 236). Each iterate is a flat vector; its error vector is
//! the step the Jacobi update wants to take.

use std::collections::VecDeque;

pub struct Diis {
    max: usize,
    vecs: VecDeque<Vec<f64>>,
    errs: VecDeque<Vec<f64>>,
}

impl Diis {
    pub fn new(max: usize) -> Self {
        Diis {
            max: max.max(2),
            vecs: VecDeque::new(),
            errs: VecDeque::new(),
        }
    }

    /// Store (x, err) and return the extrapolated vector (x itself until two are stored or
    /// when the DIIS system is singular).
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
        let mut a = vec![vec![0.0; m + 1]; m + 1];
        for i in 0..m {
            for j in 0..=i {
                let d: f64 = self.errs[i]
                    .iter()
                    .zip(&self.errs[j])
                    .map(|(x, y)| x * y)
                    .sum();
                a[i][j] = d;
                a[j][i] = d;
            }
            a[i][m] = -1.0;
            a[m][i] = -1.0;
        }
        // Scale for conditioning.
        let scale = (0..m).map(|i| a[i][i]).fold(0.0f64, f64::max).max(1e-300);
        for row in a.iter_mut().take(m) {
            for x in row.iter_mut().take(m) {
                *x /= scale;
            }
        }
        let mut rhs = vec![0.0; m + 1];
        rhs[m] = -1.0;
        match bandcast_linalg::solve_small(&a, &rhs) {
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
                // Drop the oldest and fall back to the plain step.
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
        let mut diis = Diis::new(8);
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
