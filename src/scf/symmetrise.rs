//! Optional symmetry constraint on an SCF: J and K are built from densities averaged over
//! the operations of a point group, so the Fock matrices keep the full symmetry and a
//! solution that would break it (a core hole shared by equivalent atoms, which on its own
//! localises on one of them) stays symmetric. The constrained state is a stationary point
//! of the energy within the symmetric densities, not necessarily a minimum of the
//! unconstrained problem: its energy lies at or above the broken-symmetry one (Löwdin's
//! symmetry dilemma; Bagus & Schaefer, J. Chem. Phys. 56 (1972) 224, for core holes).
//!
//! The SCF knows nothing about point groups: the caller supplies a `DensitySymmetry` (for
//! example P ↦ (1/|G|) Σ_R R P Rᵀ with R the AO representation of each operation) through
//! `ScfOptions::density_symmetry`, and `ScfContext::run` wraps its Fock builder in
//! `SymmetrisedFock`.

use bandcast_linalg::Mat;

use super::fock::{FockBuilder, Jk};
use crate::error::Result;

/// A projection of AO densities onto the symmetric ones.
pub trait DensitySymmetry: Send + Sync + std::fmt::Debug {
    /// The symmetric part of density `p` (AO × AO).
    fn symmetrise(&self, p: &Mat<f64>) -> Mat<f64>;
    /// Short description for logs ("D∞h, 40 operations").
    fn describe(&self) -> String;
}

/// A Fock builder that symmetrises the densities before passing them on.
pub struct SymmetrisedFock<'a> {
    inner: &'a mut dyn FockBuilder,
    symmetry: &'a dyn DensitySymmetry,
}

impl<'a> SymmetrisedFock<'a> {
    pub fn new(inner: &'a mut dyn FockBuilder, symmetry: &'a dyn DensitySymmetry) -> Self {
        SymmetrisedFock { inner, symmetry }
    }
}

impl FockBuilder for SymmetrisedFock<'_> {
    fn describe(&self) -> String {
        format!(
            "{}, densities symmetrised ({})",
            self.inner.describe(),
            self.symmetry.describe()
        )
    }

    fn jk(&mut self, densities: &[&Mat<f64>]) -> Result<Vec<Jk>> {
        let sym: Vec<Mat<f64>> = densities
            .iter()
            .map(|p| self.symmetry.symmetrise(p))
            .collect();
        let refs: Vec<&Mat<f64>> = sym.iter().collect();
        self.inner.jk(&refs)
    }

    fn reset(&mut self) {
        self.inner.reset()
    }

    fn last_note(&self) -> Option<String> {
        self.inner.last_note()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scf::fock::TensorFock;

    /// Swap of two functions (a two-element group {E, σ}).
    #[derive(Debug)]
    struct Swap;
    impl DensitySymmetry for Swap {
        fn symmetrise(&self, p: &Mat<f64>) -> Mat<f64> {
            let sw = |i: usize| 1 - i;
            Mat::<f64>::from_fn(2, 2, |i, j| 0.5 * (p[(i, j)] + p[(sw(i), sw(j))]))
        }
        fn describe(&self) -> String {
            "swap".into()
        }
    }

    #[test]
    fn builds_from_the_symmetrised_density() {
        // (ij|kl) = 1 for all indices: J[D] = K[D] = (Σ D) everywhere.
        let mut inner = TensorFock::new(2, vec![1.0; 16]);
        let p = Mat::<f64>::from_fn(2, 2, |i, j| if i == 0 && j == 0 { 1.0 } else { 0.0 });
        let mut b = SymmetrisedFock::new(&mut inner, &Swap);
        let jk = b.jk(&[&p]).unwrap();
        assert!((jk[0].j[(0, 0)] - 1.0).abs() < 1e-15);
        // A builder that depends on the density's asymmetry: J of a unit (ij|kl) only for
        // i = j = k = l = 0 sees the swapped half.
        let mut t = vec![0.0; 16];
        t[0] = 1.0;
        let mut inner = TensorFock::new(2, t);
        let mut b = SymmetrisedFock::new(&mut inner, &Swap);
        let jk = b.jk(&[&p]).unwrap();
        assert!((jk[0].j[(0, 0)] - 0.5).abs() < 1e-15, "{:?}", jk[0].j);
    }
}
