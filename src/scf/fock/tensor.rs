//! Fock builds from a full n⁴ ERI tensor by plain summation: the reference the other
//! builders are tested against, and the builder for tiny model systems.

use bandcast_linalg::Mat;

use super::{FockBuilder, Jk};
use crate::error::Result;

pub struct TensorFock {
    pub n: usize,
    /// (ij|kl) at ((i*n + j)*n + k)*n + l.
    pub eri: Vec<f64>,
}

impl TensorFock {
    pub fn new(n: usize, eri: Vec<f64>) -> Self {
        assert_eq!(eri.len(), n * n * n * n);
        TensorFock { n, eri }
    }
}

impl FockBuilder for TensorFock {
    fn describe(&self) -> String {
        format!("full tensor ({} functions)", self.n)
    }

    fn jk(&mut self, densities: &[&Mat<f64>]) -> Result<Vec<Jk>> {
        let n = self.n;
        let g = &self.eri;
        Ok(densities
            .iter()
            .map(|d| {
                let mut j = Mat::<f64>::zeros(n, n);
                let mut k = Mat::<f64>::zeros(n, n);
                for p in 0..n {
                    for q in 0..n {
                        let mut sj = 0.0;
                        let mut sk = 0.0;
                        for r in 0..n {
                            for s in 0..n {
                                sj += g[((p * n + q) * n + r) * n + s] * d[(r, s)];
                                sk += g[((p * n + r) * n + q) * n + s] * d[(r, s)];
                            }
                        }
                        j[(p, q)] = sj;
                        k[(p, q)] = sk;
                    }
                }
                Jk { j, k }
            })
            .collect())
    }
}
