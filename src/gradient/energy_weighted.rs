//! The energy-weighted density W: the Lagrange multipliers that keep the orbitals
//! orthonormal as the basis moves with the nuclei, entering the gradient as −Σ W_μν S'_μν.
//!
//! With E(C) stationary under every allowed orbital rotation and the constraint
//! CᵀSC = 1, ∂E/∂C_μi = 2 Σ_σ n^σ_i (F^σ C)_μi = 2 (S C λ)_μi, so
//! λ_ki = Σ_σ n^σ_i (Cᵀ F^σ C)_ki over occupied k, i, and W = C_occ λ C_occᵀ
//! (common practice; e.g. Pople, Krishnan, Schlegel & Binkley, Int. J. Quantum Chem.
//! Symp. 13 (1979) 225 for the closed- and open-shell forms).
//! - UHF (and RHF as two equal spin sets): each spin has its own orbitals, λ^σ is the
//!   occupied block of F^σ, so W = Σ_σ P^σ F^σ P^σ. This holds for any occupation pattern
//!   of a converged SCF, so MOM-held holes need nothing extra.
//! - ROHF: one set of orbitals with n^α_i, n^β_i ∈ {0, 1}; λ_ki = F^α_ki n^α_i +
//!   F^β_ki n^β_i (MO basis). At convergence λ is symmetric (the closed–open block of F^β
//!   and the open–virtual block of F^α vanish, see `scf::rohf`); its symmetric part is
//!   used, which is what multiplies the symmetric S'.

use bandcast_linalg::{mul, Mat};

use crate::scf::Reference;

/// W for the reference `reference` from the orbitals, occupations and the α and β Fock
/// matrices (AO basis) at the converged densities. For RHF and ROHF `c_beta` is ignored
/// (one set of orbitals).
pub fn energy_weighted_density(
    reference: Reference,
    c_alpha: &Mat<f64>,
    c_beta: &Mat<f64>,
    occ_alpha: &[f64],
    occ_beta: &[f64],
    f_alpha: &Mat<f64>,
    f_beta: &Mat<f64>,
) -> Mat<f64> {
    match reference {
        Reference::Rhf => {
            // both spins in the same orbitals with F^α = F^β
            let w = spin_block(c_alpha, occ_alpha, f_alpha);
            Mat::<f64>::from_fn(w.nrows(), w.ncols(), |i, j| 2.0 * w[(i, j)])
        }
        Reference::Uhf => {
            &spin_block(c_alpha, occ_alpha, f_alpha) + &spin_block(c_beta, occ_beta, f_beta)
        }
        Reference::Rohf => {
            let occ: Vec<usize> = (0..occ_alpha.len())
                .filter(|&i| occ_alpha[i] > 0.5 || occ_beta[i] > 0.5)
                .collect();
            let n = c_alpha.nrows();
            let co = Mat::<f64>::from_fn(n, occ.len(), |mu, i| c_alpha[(mu, occ[i])]);
            let fa = mul(
                mul(co.as_ref(), true, f_alpha.as_ref(), false).as_ref(),
                false,
                co.as_ref(),
                false,
            );
            let fb = mul(
                mul(co.as_ref(), true, f_beta.as_ref(), false).as_ref(),
                false,
                co.as_ref(),
                false,
            );
            let m = occ.len();
            let lam = Mat::<f64>::from_fn(m, m, |k, i| {
                fa[(k, i)] * occ_alpha[occ[i]] + fb[(k, i)] * occ_beta[occ[i]]
            });
            let sym = Mat::<f64>::from_fn(m, m, |k, i| 0.5 * (lam[(k, i)] + lam[(i, k)]));
            let cl = mul(co.as_ref(), false, sym.as_ref(), false);
            mul(cl.as_ref(), false, co.as_ref(), true)
        }
    }
}

/// W of an RHF or UHF state from its orbitals and orbital energies, without a Fock
/// matrix: the occupied orbitals of each spin are eigenvectors of that spin's Fock matrix,
/// so P^σ F^σ P^σ = Σ_i n^σ_i ε^σ_i c^σ_i c^σᵀ_i (the same W as
/// [`energy_weighted_density`] up to the SCF's convergence; common practice). RHF: both spins
/// in `c_alpha`, W = 2 Σ_i n_i ε_i c_i c_iᵀ. ROHF orbital energies belong to an effective
/// Fock operator and do not give W: `None`.
pub fn energy_weighted_from_orbitals(
    reference: Reference,
    c_alpha: &Mat<f64>,
    c_beta: &Mat<f64>,
    eps_alpha: &[f64],
    eps_beta: &[f64],
    occ_alpha: &[f64],
    occ_beta: &[f64],
) -> Option<Mat<f64>> {
    let weighted = |occ: &[f64], eps: &[f64], scale: f64| -> Vec<f64> {
        occ.iter().zip(eps).map(|(n, e)| scale * n * e).collect()
    };
    match reference {
        Reference::Rhf => Some(crate::scf::wavefunction::density(
            c_alpha,
            &weighted(occ_alpha, eps_alpha, 2.0),
        )),
        Reference::Uhf => Some(
            &crate::scf::wavefunction::density(c_alpha, &weighted(occ_alpha, eps_alpha, 1.0))
                + &crate::scf::wavefunction::density(c_beta, &weighted(occ_beta, eps_beta, 1.0)),
        ),
        Reference::Rohf => None,
    }
}

/// P F P for one spin, P = Σ_i n_i c_i c_iᵀ.
fn spin_block(c: &Mat<f64>, occ: &[f64], f: &Mat<f64>) -> Mat<f64> {
    let p = crate::scf::wavefunction::density(c, occ);
    let pf = mul(p.as_ref(), false, f.as_ref(), false);
    mul(pf.as_ref(), false, p.as_ref(), false)
}
