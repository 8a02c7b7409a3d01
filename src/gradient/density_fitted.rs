//! The two-electron part of the gradient of a density-fitted SCF energy (J and K both
//! fitted in the Coulomb metric, as `scf::fock::DfFock` builds them): the exact derivative
//! of that energy, not an approximation to the exact-integral gradient.
//!
//! With (μν|λσ) ≈ Σ_PQ (μν|P) [V⁻¹]_PQ (Q|λσ), V_PQ = (P|Q), the two-electron energy
//! E₂ = ½ Γ·(μν|λσ) has (robust-fitting gradient in the form of Weigend, Häser, Patzelt &
//! Ahlrichs, Chem. Phys. Lett. 294 (1998) 143, for J and K; common practice)
//!
//!   ∂E₂ = Σ_Pμν T_P,μν ∂(P|μν) + Σ_PQ M_PQ ∂(P|Q),
//!   d = V⁻¹ γ, γ_P = Σ_μν (P|μν) J_μν                      (Coulomb coefficients),
//!   c^ij = V⁻¹ (·|ij), (P|ij) = Σ_μν L_μi L_νj (P|μν)      (exchange, X = L Lᵀ),
//!   T_P,μν = J_μν d_P − Σ_s c_s Σ_ij L_μi L_νj c^ij_P,
//!   M_PQ   = −½ d_P d_Q + Σ_s (c_s/2) Σ_ij c^ij_P c^ij_Q,
//!
//! for the Coulomb density J and the exchange terms (c_s, X_s) of
//! [`crate::integrals::derivative::EriDerivative::contract`]. The orbitals are stationary
//! for the fitted energy, so the orbital response is the usual −Σ W S' (W from the fitted
//! Fock operator's orbital energies).
//!
//! Memory: (P|μν) and T, two n_aux·n² arrays, plus n_aux·o² per exchange term.

use bandcast_linalg::{cholesky_lower, mul, solve_lower_in_place, solve_upper_in_place, Mat};

use crate::basis::BasisSet;
use crate::error::{Error, Result};
use crate::integrals::derivative::FittingDerivative;
use crate::integrals::{eri2c, eri3c};

/// Bytes the fitted two-electron gradient holds for `n` orbital and `naux` auxiliary
/// functions and `o` occupied orbitals per exchange term (`terms` of them).
pub fn fitted_gradient_bytes(n: usize, naux: usize, o: usize, terms: usize) -> usize {
    8 * (2 * naux * n * n + 2 * terms * naux * o * o + 2 * naux * naux)
}

/// Σ_Pμν T ∂(P|μν) + Σ_PQ M ∂(P|Q) (module docs) for every atom (n_atoms × 3).
/// `exchange` holds (c_s, L_s) with X_s = L_s L_sᵀ (n × o_s).
pub fn fitted_two_electron(
    basis: &BasisSet,
    aux: &BasisSet,
    n_atoms: usize,
    coulomb: &Mat<f64>,
    exchange: &[(f64, Mat<f64>)],
    threshold: f64,
) -> Result<Vec<[f64; 3]>> {
    let n = basis.n_basis;
    let naux = aux.n_basis;
    let b3 = eri3c(aux, basis);
    let v = eri2c(aux);
    let l = cholesky_lower(v.as_ref()).ok_or_else(|| {
        Error::computation(format!(
            "the Coulomb metric of the fitting set {} is not positive definite on this molecule",
            aux.name
        ))
    })?;
    let lt = Mat::<f64>::from_fn(naux, naux, |i, j| l[(j, i)]);
    // V⁻¹ X in place (V = L Lᵀ)
    let solve = |x: &mut Mat<f64>| {
        solve_lower_in_place(l.as_ref(), x.as_mut());
        solve_upper_in_place(lt.as_ref(), x.as_mut());
    };
    let row = |p: usize| &b3[p * n * n..(p + 1) * n * n];
    let mut d = Mat::<f64>::from_fn(naux, 1, |p, _| {
        let r = row(p);
        let mut s = 0.0;
        for mu in 0..n {
            for nu in 0..n {
                s += r[mu * n + nu] * coulomb[(mu, nu)];
            }
        }
        s
    });
    solve(&mut d);
    let mut t = vec![0.0; naux * n * n];
    let mut m = Mat::<f64>::from_fn(naux, naux, |p, q| -0.5 * d[(p, 0)] * d[(q, 0)]);
    for p in 0..naux {
        let tp = &mut t[p * n * n..(p + 1) * n * n];
        for mu in 0..n {
            for nu in 0..n {
                tp[mu * n + nu] = coulomb[(mu, nu)] * d[(p, 0)];
            }
        }
    }
    for (c, lf) in exchange {
        let o = lf.ncols();
        if o == 0 {
            continue;
        }
        // (P|ij), then c^ij = V⁻¹ (·|ij)
        let mut cij = Mat::<f64>::zeros(naux, o * o);
        for p in 0..naux {
            let bp = Mat::<f64>::from_fn(n, n, |mu, nu| row(p)[mu * n + nu]);
            let x = mul(
                mul(lf.as_ref(), true, bp.as_ref(), false).as_ref(),
                false,
                lf.as_ref(),
                false,
            );
            for i in 0..o {
                for j in 0..o {
                    cij[(p, i * o + j)] = x[(i, j)];
                }
            }
        }
        solve(&mut cij);
        let cc = mul(cij.as_ref(), false, cij.as_ref(), true);
        for p in 0..naux {
            for q in 0..naux {
                m[(p, q)] += 0.5 * c * cc[(p, q)];
            }
            let cp = Mat::<f64>::from_fn(o, o, |i, j| cij[(p, i * o + j)]);
            let y = mul(
                mul(lf.as_ref(), false, cp.as_ref(), false).as_ref(),
                false,
                lf.as_ref(),
                true,
            );
            let tp = &mut t[p * n * n..(p + 1) * n * n];
            for mu in 0..n {
                for nu in 0..n {
                    // symmetrised: T must be symmetric in μν like (P|μν)
                    tp[mu * n + nu] -= 0.5 * c * (y[(mu, nu)] + y[(nu, mu)]);
                }
            }
        }
    }
    drop(b3);
    let fd = FittingDerivative::new(aux, basis);
    let g3 = fd.three_centre_gradient(&t, n_atoms, threshold);
    let g2 = fd.two_centre_gradient(&m, n_atoms);
    Ok(g3
        .iter()
        .zip(&g2)
        .map(|(a, b)| [a[0] + b[0], a[1] + b[1], a[2] + b[2]])
        .collect())
}
