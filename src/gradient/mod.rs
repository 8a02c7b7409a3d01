//! Analytic nuclear gradients of Hartree–Fock energies (RHF, UHF, ROHF, and states held by
//! the maximum overlap method, which are stationary SCF solutions too).
//!
//! - `nuclear_repulsion`: ∂V_nn/∂R.
//! - `energy_weighted`: the Fock matrices at the converged densities and the energy-weighted
//!   density W (the Lagrange multipliers of orbital orthonormality).
//! - `scf`: the assembled gradient dE/dR = V_nn' + Σ P h' − Σ W S' + ½ Σ Γ (μν|λσ)'.
//! - `density_fitted`: the two-electron part for density-fitted J and K (RI-JK gradient).
//! - `invariance`: net force and torque (exact conditions: both vanish).
pub mod density_fitted;
pub mod energy_weighted;
pub mod invariance;
pub mod nuclear_repulsion;
pub mod scf;

pub use invariance::{net_force, net_torque};
pub use scf::{scf_gradient, scf_gradient_fitted, GradientOptions, ScfGradient};
