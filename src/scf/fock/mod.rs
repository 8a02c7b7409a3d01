//! Two-electron parts of the Fock matrix: Coulomb J[D] and exchange K[D] for given densities,
//! behind the `FockBuilder` trait so the SCF driver does not know how they are made.
//!
//! J_μν[D] = Σ_λσ (μν|λσ) D_λσ,   K_μν[D] = Σ_λσ (μλ|νσ) D_λσ   (chemists' notation).
//!
//! Builders: `InCoreFock` (unique shell quartets stored once, 8-fold symmetry), `DirectFock`
//! (recomputed each call with Schwarz and density screening, incremental in ΔD) and
//! `TensorFock` (a full n⁴ tensor, for tiny model systems and tests). The in-core and direct
//! builders share the quartet list (`quartets.rs`) and the digestion kernel (`digest.rs`).

pub mod df;
pub mod digest;
pub mod direct;
pub mod incore;
pub mod quartets;
pub mod schedule;
pub mod source;
pub mod tensor;

pub use df::DfFock;
pub use direct::DirectFock;
pub use incore::InCoreFock;
pub use source::{EriSource, TensorEri};
pub use tensor::TensorFock;

use bandcast_linalg::Mat;

use crate::error::Result;

/// Coulomb and exchange matrices of one density.
#[derive(Debug, Clone)]
pub struct Jk {
    pub j: Mat<f64>,
    pub k: Mat<f64>,
}

/// Something that turns densities into J and K. `&mut self` so builders may keep state
/// between calls (the direct builder keeps the last densities for incremental builds).
pub trait FockBuilder {
    /// Short description for logs ("in-core, 1.2 GB", "direct").
    fn describe(&self) -> String;
    /// J[D] and K[D] for each symmetric density (all AO × AO).
    fn jk(&mut self, densities: &[&Mat<f64>]) -> Result<Vec<Jk>>;
    /// Forget any state kept between calls (next build is from scratch).
    fn reset(&mut self) {}
    /// A short note on the last build for progress lines (e.g. work skipped by screening).
    fn last_note(&self) -> Option<String> {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::quartets::QuartetPlan;
    use super::*;

    /// A model ERI tensor with the full 8-fold symmetry and positive semidefinite as a matrix
    /// over pairs (so the Schwarz inequality holds): (ij|kl) = Σ_P L_ij,P L_kl,P with
    /// L symmetric in ij and decaying with |i − j|, like a product-density expansion.
    fn model_tensor(n: usize) -> Vec<f64> {
        let naux = 2 * n;
        let mut seed = 12345u64;
        let mut rnd = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        let mut l = vec![0.0; n * n * naux];
        for i in 0..n {
            for j in 0..=i {
                let decay = (-(0.3 * (i as f64 - j as f64).abs())).exp();
                for p in 0..naux {
                    let v = rnd() * decay;
                    l[(i * n + j) * naux + p] = v;
                    l[(j * n + i) * naux + p] = v;
                }
            }
        }
        let mut eri = vec![0.0; n * n * n * n];
        for ij in 0..n * n {
            for kl in 0..n * n {
                eri[ij * n * n + kl] = (0..naux).map(|p| l[ij * naux + p] * l[kl * naux + p]).sum();
            }
        }
        eri
    }

    fn model_density(n: usize, shift: f64) -> Mat<f64> {
        Mat::<f64>::from_fn(n, n, |i, j| {
            ((i + 2 * j) as f64 * 0.37 + shift).sin() + ((j + 2 * i) as f64 * 0.37 + shift).sin()
        })
    }

    /// Largest |a_ij − b_ij| (also used by the other builders' tests).
    pub(super) fn max_diff(a: &Mat<f64>, b: &Mat<f64>) -> f64 {
        let mut m = 0.0f64;
        for i in 0..a.nrows() {
            for j in 0..a.ncols() {
                m = m.max((a[(i, j)] - b[(i, j)]).abs());
            }
        }
        m
    }

    #[test]
    fn in_core_and_direct_match_plain_summation() {
        let sizes = vec![1, 3, 1, 5, 3, 6, 1];
        let n: usize = sizes.iter().sum();
        let eri = model_tensor(n);
        let src = TensorEri::new(eri.clone(), sizes);
        let mut reference = TensorFock::new(n, eri);
        let plan = QuartetPlan::new(&src, 0.0);
        let mut incore = InCoreFock::new(&src, &plan, 1 << 30).unwrap();
        let mut direct = DirectFock::new(&src, plan.clone());
        for step in 0..4 {
            let d1 = model_density(n, step as f64 * 0.1);
            let d2 = model_density(n, 1.0 + step as f64 * 0.05);
            let want = reference.jk(&[&d1, &d2]).unwrap();
            for got in [
                incore.jk(&[&d1, &d2]).unwrap(),
                direct.jk(&[&d1, &d2]).unwrap(),
            ] {
                for (w, g) in want.iter().zip(&got) {
                    assert!(max_diff(&w.j, &g.j) < 1e-11, "J {}", max_diff(&w.j, &g.j));
                    assert!(max_diff(&w.k, &g.k) < 1e-11, "K {}", max_diff(&w.k, &g.k));
                }
            }
        }
    }

    #[test]
    fn every_kernel_width_matches_plain_summation() {
        // d-shell widths 7, 9, 10 (compile-time kernels), 2 and 4 (general kernel), 1 and
        // (ss|ss) blocks; two densities as for UHF.
        let sizes = vec![7, 1, 9, 2, 10, 4, 1];
        let n: usize = sizes.iter().sum();
        let eri = model_tensor(n);
        let src = TensorEri::new(eri.clone(), sizes);
        let mut reference = TensorFock::new(n, eri);
        let plan = QuartetPlan::new(&src, 0.0);
        let mut incore = InCoreFock::new(&src, &plan, 1 << 30).unwrap();
        let d1 = model_density(n, 0.4);
        let d2 = model_density(n, 1.3);
        let want = reference.jk(&[&d1, &d2]).unwrap();
        let got = incore.jk(&[&d1, &d2]).unwrap();
        for (w, g) in want.iter().zip(&got) {
            assert!(max_diff(&w.j, &g.j) < 1e-10, "J {}", max_diff(&w.j, &g.j));
            assert!(max_diff(&w.k, &g.k) < 1e-10, "K {}", max_diff(&w.k, &g.k));
        }
    }

    #[test]
    fn same_bits_on_one_and_two_threads() {
        let sizes = vec![3, 1, 5, 3, 1, 6, 3, 1];
        let n: usize = sizes.iter().sum();
        let src = TensorEri::new(model_tensor(n), sizes);
        let plan = QuartetPlan::new(&src, 1e-12);
        let d = model_density(n, 0.3);
        let run = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            pool.install(|| {
                let mut b = DirectFock::new(&src, plan.clone());
                b.jk(&[&d]).unwrap()
            })
        };
        let (a, b) = (run(1), run(2));
        assert_eq!(max_diff(&a[0].j, &b[0].j), 0.0);
        assert_eq!(max_diff(&a[0].k, &b[0].k), 0.0);
    }

    /// A tensor source whose shells come in general-contraction families, so the plan
    /// reorders the pairs family pair by family pair.
    struct FamilySource(TensorEri, Vec<usize>);
    impl EriSource for FamilySource {
        fn shell_sizes(&self) -> &[usize] {
            self.0.shell_sizes()
        }
        fn shell_offsets(&self) -> &[usize] {
            self.0.shell_offsets()
        }
        fn schwarz(&self) -> &[f64] {
            self.0.schwarz()
        }
        fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
            self.0.quartet(a, b, c, d, out)
        }
        fn families(&self) -> Vec<usize> {
            self.1.clone()
        }
        fn primitives(&self) -> Vec<usize> {
            vec![3; self.1.len()]
        }
    }

    #[test]
    fn family_ordered_pairs_cover_each_quartet_once() {
        let sizes = vec![1, 1, 3, 1, 3, 5, 1, 1];
        let families = vec![0, 0, 2, 3, 2, 5, 3, 3];
        let n: usize = sizes.iter().sum();
        let eri = model_tensor(n);
        let src = FamilySource(TensorEri::new(eri.clone(), sizes), families);
        let plan = QuartetPlan::with_chunks(&src, 0.0, 5);
        let pairs = &plan.pairs;
        assert_eq!(pairs.len(), 36);
        // the pairs of one family pair are adjacent
        let fam = &src.1;
        let key = |&(a, b): &(usize, usize)| (fam[a].max(fam[b]), fam[a].min(fam[b]));
        let mut seen = Vec::new();
        for (i, p) in pairs.iter().enumerate() {
            if i == 0 || key(p) != key(&pairs[i - 1]) {
                assert!(!seen.contains(&key(p)), "family pair {:?} split", key(p));
                seen.push(key(p));
            }
        }
        let mut reference = TensorFock::new(n, eri);
        let mut incore = InCoreFock::new(&src, &plan, 1 << 30).unwrap();
        let d1 = model_density(n, 0.2);
        let d2 = model_density(n, 0.9);
        let want = reference.jk(&[&d1, &d2]).unwrap();
        let got = incore.jk(&[&d1, &d2]).unwrap();
        for (w, g) in want.iter().zip(&got) {
            assert!(max_diff(&w.j, &g.j) < 1e-11, "J {}", max_diff(&w.j, &g.j));
            assert!(max_diff(&w.k, &g.k) < 1e-11, "K {}", max_diff(&w.k, &g.k));
        }
    }

    #[test]
    fn in_core_refuses_over_budget() {
        let sizes = vec![3, 3];
        let src = TensorEri::new(model_tensor(6), sizes);
        let plan = QuartetPlan::new(&src, 0.0);
        assert!(matches!(
            InCoreFock::new(&src, &plan, 100),
            Err(crate::Error::TooLarge(_))
        ));
    }
}
