//! Values of a shell's AOs at a point, in the same order and normalisation as the
//! integrals: φ_k(r) = Σ_c T_kc x^a y^b z^c Σ_i d_i exp(−α_i |r − A|²), with d_i from
//! `normalize::contracted_coefficients` and T from `solid_harmonics::transform`.

use crate::basis::cartesian::components;
use crate::basis::normalize::contracted_coefficients;
use crate::basis::solid_harmonics;
use crate::basis::{BasisSet, Shell};

/// Every AO of a basis set at many points, the normalised coefficients computed once.
pub struct BasisValues<'a> {
    basis: &'a BasisSet,
    coefs: Vec<Vec<f64>>,
}

impl<'a> BasisValues<'a> {
    pub fn new(basis: &'a BasisSet) -> Self {
        let coefs = basis.shells.iter().map(contracted_coefficients).collect();
        BasisValues { basis, coefs }
    }

    /// The n_basis AO values at `point` (bohr), in AO order.
    pub fn at(&self, point: [f64; 3]) -> Vec<f64> {
        let mut v = Vec::with_capacity(self.basis.n_basis);
        for (s, c) in self.basis.shells.iter().zip(&self.coefs) {
            v.extend(shell_values_with(s, c, point));
        }
        v
    }
}

/// AO values of `shell` at `point` (bohr).
pub fn shell_values(shell: &Shell, point: [f64; 3]) -> Vec<f64> {
    let d = contracted_coefficients(shell);
    shell_values_with(shell, &d, point)
}

/// As [`shell_values`] with precomputed normalised coefficients (for many points).
pub fn shell_values_with(shell: &Shell, coefs: &[f64], point: [f64; 3]) -> Vec<f64> {
    let x = point[0] - shell.center[0];
    let y = point[1] - shell.center[1];
    let z = point[2] - shell.center[2];
    let r2 = x * x + y * y + z * z;
    let radial: f64 = shell
        .exponents
        .iter()
        .zip(coefs)
        .map(|(&a, &c)| c * (-a * r2).exp())
        .sum();
    let cart: Vec<f64> = components(shell.l)
        .iter()
        .map(|c| radial * x.powi(c[0] as i32) * y.powi(c[1] as i32) * z.powi(c[2] as i32))
        .collect();
    let t = solid_harmonics::transform(shell.l, shell.pure);
    let nc = cart.len();
    (0..shell.n_functions())
        .map(|k| (0..nc).map(|c| t[k * nc + c] * cart[c]).sum())
        .collect()
}
