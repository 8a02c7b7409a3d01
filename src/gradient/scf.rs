//! The analytic gradient of an SCF energy with respect to the nuclear positions:
//!
//! dE/dR_A = ∂V_nn/∂R_A + Σ_μν P_μν ∂h_μν/∂R_A − Σ_μν W_μν ∂S_μν/∂R_A
//!           + ½ Σ_μνλσ Γ_μνλσ ∂(μν|λσ)/∂R_A,
//!
//! P = P^α + P^β, Γ = P_μν P_λσ − Σ_σ ½ (P^σ_μλ P^σ_νσ + P^σ_μσ P^σ_νλ), W the
//! energy-weighted density (`energy_weighted`), h' including the derivative of the
//! nuclear-attraction operator (common practice; Pulay, Mol. Phys. 17 (1969) 197). Valid
//! for any stationary SCF state — RHF, UHF, ROHF, and holes held by the maximum overlap
//! method. Two-electron part integral-direct (`integrals::derivative::EriDerivative`),
//! one-electron parts by shell pairs; all parallel and independent of the thread count.
//!
//! A density-fitted energy (J and K fitted) has its own gradient: `scf_gradient_fitted`
//! replaces the two-electron part by `density_fitted`'s; everything else is shared.

use super::density_fitted::fitted_two_electron;
use super::energy_weighted::{energy_weighted_density, energy_weighted_from_orbitals};
use super::nuclear_repulsion::nuclear_repulsion_gradient;
use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::integrals::derivative::{
    kinetic_gradient, nuclear_gradient, overlap_gradient, ChargeSite, EriDerivative,
};
use crate::integrals::EriEngine;
use crate::scf::fock::quartets::QuartetPlan;
use crate::scf::fock::source::EngineSource;
use crate::scf::fock::{DfFock, DirectFock, FockBuilder};
use crate::scf::{core_hamiltonian, Reference, Wavefunction};
use bandcast_linalg::Mat;

/// Thresholds of a gradient evaluation.
#[derive(Debug, Clone, Copy)]
pub struct GradientOptions {
    /// Schwarz × density threshold for the derivative integrals and the Fock build.
    pub screening: f64,
    /// Build W from Fock matrices rebuilt at the converged densities even where the
    /// orbital energies give it (RHF, UHF); for checks. ROHF always rebuilds.
    pub w_from_fock: bool,
}

impl Default for GradientOptions {
    fn default() -> Self {
        GradientOptions {
            screening: 1e-12,
            w_from_fock: false,
        }
    }
}

/// The gradient and its parts (each n_atoms × [x, y, z], hartree/bohr).
#[derive(Debug, Clone)]
pub struct ScfGradient {
    pub total: Vec<[f64; 3]>,
    pub nuclear_repulsion: Vec<[f64; 3]>,
    /// Kinetic plus nuclear attraction, Σ P h'.
    pub one_electron: Vec<[f64; 3]>,
    /// −Σ W S'.
    pub overlap: Vec<[f64; 3]>,
    pub two_electron: Vec<[f64; 3]>,
    /// Wall seconds of the parts: "fock" (W: from the orbital energies, or J and K at the
    /// converged densities for ROHF),
    /// "one-electron" (S', T', V'), "two-electron" (the derivative ERIs).
    pub timings: Vec<(String, f64)>,
}

/// dE/dR of the SCF state `wf` of `mol` in `basis` (exact integrals: the SCF used the
/// in-core or the integral-direct Fock builder).
pub fn scf_gradient(
    mol: &Molecule,
    basis: &BasisSet,
    wf: &Wavefunction,
    opts: &GradientOptions,
) -> Result<ScfGradient> {
    gradient_with(mol, basis, None, wf, opts)
}

/// dE/dR of the density-fitted SCF state `wf` (J and K fitted with the auxiliary set `aux`,
/// the density-fitted Fock builder): the exact derivative of that energy
/// (`density_fitted`).
pub fn scf_gradient_fitted(
    mol: &Molecule,
    basis: &BasisSet,
    aux: &BasisSet,
    wf: &Wavefunction,
    opts: &GradientOptions,
) -> Result<ScfGradient> {
    gradient_with(mol, basis, Some(aux), wf, opts)
}

fn gradient_with(
    mol: &Molecule,
    basis: &BasisSet,
    aux: Option<&BasisSet>,
    wf: &Wavefunction,
    opts: &GradientOptions,
) -> Result<ScfGradient> {
    if !wf.converged {
        return Err(Error::computation(
            "the gradient needs a converged SCF".to_string(),
        ));
    }
    if wf.n_basis != basis.n_basis {
        return Err(Error::input(
            "the wavefunction and the basis set for the gradient differ in size",
        ));
    }
    let n_atoms = mol.atoms.len();
    let pa = wf.density_alpha();
    let pb = match wf.reference {
        Reference::Rhf => pa.clone(),
        _ => wf.density_beta(),
    };
    let pt = &pa + &pb;

    let clock = std::time::Instant::now();
    let mut timings: Vec<(String, f64)> = Vec::new();
    let lap = |name: &str, timings: &mut Vec<(String, f64)>| {
        let before: f64 = timings.iter().map(|t| t.1).sum();
        timings.push((name.to_string(), clock.elapsed().as_secs_f64() - before));
    };
    // W: from the orbital energies (RHF, UHF), or from the Fock matrices at the converged
    // densities (ROHF, or when asked)
    let from_orbitals = if opts.w_from_fock {
        None
    } else {
        energy_weighted_from_orbitals(
            wf.reference,
            &wf.c_alpha,
            &wf.c_beta,
            &wf.eps_alpha,
            &wf.eps_beta,
            &wf.occ_alpha,
            &wf.occ_beta,
        )
    };
    let w = match from_orbitals {
        Some(w) => w,
        None => {
            let h = core_hamiltonian(basis, mol);
            let jk = match aux {
                Some(aux) => DfFock::new(basis, aux, usize::MAX)?.jk(&[&pa, &pb])?,
                None => {
                    let engine = EriEngine::new(basis);
                    let src = EngineSource::new(&engine, basis);
                    let plan = QuartetPlan::new(&src, opts.screening);
                    DirectFock::new(&src, plan).jk(&[&pa, &pb])?
                }
            };
            let j = &jk[0].j + &jk[1].j;
            let fa = &(&h + &j) - &jk[0].k;
            let fb = &(&h + &j) - &jk[1].k;
            energy_weighted_density(
                wf.reference,
                &wf.c_alpha,
                &wf.c_beta,
                &wf.occ_alpha,
                &wf.occ_beta,
                &fa,
                &fb,
            )
        }
    };

    lap("fock", &mut timings);
    let vnn = nuclear_repulsion_gradient(mol);
    let sites: Vec<ChargeSite> = mol
        .atoms
        .iter()
        .enumerate()
        .map(|(i, a)| ChargeSite {
            charge: a.z as f64,
            position: a.position,
            atom: i,
        })
        .collect();
    let gt = kinetic_gradient(basis, n_atoms, &pt);
    let gv = nuclear_gradient(basis, n_atoms, &sites, &pt);
    let one: Vec<[f64; 3]> = gt
        .iter()
        .zip(&gv)
        .map(|(a, b)| [a[0] + b[0], a[1] + b[1], a[2] + b[2]])
        .collect();
    let gs = overlap_gradient(basis, n_atoms, &w);
    let ovl: Vec<[f64; 3]> = gs.iter().map(|a| [-a[0], -a[1], -a[2]]).collect();
    lap("one-electron", &mut timings);
    let two = match aux {
        None => {
            let deriv = EriDerivative::new(basis);
            match wf.reference {
                Reference::Rhf => {
                    deriv.contract(basis, n_atoms, &pt, &[(0.5, &pt)], opts.screening)
                }
                _ => deriv.contract(
                    basis,
                    n_atoms,
                    &pt,
                    &[(1.0, &pa), (1.0, &pb)],
                    opts.screening,
                ),
            }
        }
        Some(aux) => {
            // exchange densities as factors X = L Lᵀ (occupied orbitals, √occupation)
            let factor = |c: &Mat<f64>, occ: &[f64], scale: f64| {
                let cols: Vec<usize> = (0..occ.len()).filter(|&i| occ[i] > 0.0).collect();
                Mat::<f64>::from_fn(c.nrows(), cols.len(), |mu, k| {
                    c[(mu, cols[k])] * (scale * occ[cols[k]]).sqrt()
                })
            };
            let exchange = match wf.reference {
                Reference::Rhf => vec![(0.5, factor(&wf.c_alpha, &wf.occ_alpha, 2.0))],
                _ => vec![
                    (1.0, factor(&wf.c_alpha, &wf.occ_alpha, 1.0)),
                    (1.0, factor(&wf.c_beta, &wf.occ_beta, 1.0)),
                ],
            };
            fitted_two_electron(basis, aux, n_atoms, &pt, &exchange, opts.screening)?
        }
    };
    lap("two-electron", &mut timings);
    let total: Vec<[f64; 3]> = (0..n_atoms)
        .map(|a| std::array::from_fn(|k| vnn[a][k] + one[a][k] + ovl[a][k] + two[a][k]))
        .collect();
    Ok(ScfGradient {
        total,
        nuclear_repulsion: vnn,
        one_electron: one,
        overlap: ovl,
        two_electron: two,
        timings,
    })
}

/// Largest |component| of a gradient.
pub fn max_abs(g: &[[f64; 3]]) -> f64 {
    g.iter().flatten().fold(0.0f64, |m, x| m.max(x.abs()))
}
