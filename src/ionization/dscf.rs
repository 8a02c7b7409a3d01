//! ΔSCF valence ionization energies: IE = E(cation) − E(neutral), each energy a separate
//! Hartree–Fock calculation, so the cation's orbitals relax around the hole (the effect
//! Koopmans' theorem leaves out).
//!
//! The cation is an unrestricted (UHF) calculation started from the neutral's orbitals with
//! one electron taken out of the chosen orbital. The maximum overlap method keeps the hole
//! there instead of letting the SCF fall back to the cation ground state: at every iteration
//! the occupied orbitals are those that overlap most with the occupied space of the previous
//! iteration (A. T. B. Gilbert, N. A. Besley & P. M. W. Gill, J. Phys. Chem. A 112 (2008)
//! 13164). After convergence the hole is checked: if less than half of the target orbital
//! is missing from the cation's occupied space, the hole has moved to another orbital and
//! the result says so (`hole_moved`).
//!
//! A cation without electrons (the H atom, He⁺ → He²⁺, …) needs no SCF: its energy is the
//! nuclear repulsion alone.

use bandcast_linalg::{mul, Mat};

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::ionization::koopmans::Spin;
use crate::scf::{Guess, Occupation, Reference, ScfOptions, Wavefunction};

/// The target orbital's share missing from the cation's occupied space must be at least this
/// for the hole to count as staying where it was put.
pub const HOLE_KEPT: f64 = 0.5;

/// One ΔSCF ionization.
#[derive(Debug, Clone, PartialEq)]
pub struct DscfHole {
    /// Spin and MO index of the emptied orbital of the neutral.
    pub spin: Spin,
    pub orbital: usize,
    /// IE = E(cation) − E(neutral), hartree.
    pub ie: f64,
    pub cation_energy: f64,
    /// 1 − Σ_j |⟨target|cation occupied j⟩|² for the hole's spin: 1 = the hole is exactly the
    /// target orbital, 0 = the target is fully occupied again.
    pub hole_overlap: f64,
    /// The hole ended up in another orbital (hole_overlap < HOLE_KEPT).
    pub hole_moved: bool,
    /// ⟨S²⟩ of the cation, and the exact S(S+1) of its spin state.
    pub s2: f64,
    pub s2_exact: f64,
    pub iterations: usize,
    /// How the SCF was held on the hole (None for a cation without electrons).
    pub route: Option<HoldRoute>,
}

/// S(S+1) of a molecule's multiplicity 2S + 1.
pub fn exact_s2(mol: &Molecule) -> f64 {
    let s = (mol.multiplicity as f64 - 1.0) / 2.0;
    s * (s + 1.0)
}

/// The cation obtained by removing one electron of `spin` from `neutral`: (molecule,
/// alpha occupations, beta occupations, which spin actually lost the electron).
fn cation_state(
    mol: &Molecule,
    neutral: &Wavefunction,
    spin: Spin,
    orbital: usize,
) -> Result<(Molecule, Vec<f64>, Vec<f64>, Spin)> {
    let mut occ_a = neutral.occ_alpha.clone();
    let mut occ_b = neutral.occ_beta.clone();
    let (na, nb) = (neutral.n_alpha(), neutral.n_beta());
    // For a restricted reference take the beta electron (leaves n_alpha ≥ n_beta); for an
    // unrestricted one with equal counts an alpha hole is the same state mirrored.
    let spin = match spin {
        Spin::Restricted => Spin::Beta,
        Spin::Alpha if na == nb => Spin::Beta,
        s => s,
    };
    let occ = match spin {
        Spin::Alpha => &mut occ_a,
        _ => &mut occ_b,
    };
    if orbital >= occ.len() || occ[orbital] < 0.5 {
        return Err(Error::input(format!(
            "ΔSCF: orbital {} ({spin:?}) is not occupied in the neutral",
            orbital + 1
        )));
    }
    occ[orbital] = 0.0;
    let (na2, nb2) = match spin {
        Spin::Alpha => (na - 1, nb),
        _ => (na, nb - 1),
    };
    let mult = (na2 - nb2) as u32 + 1;
    let cation = mol.clone().with_charge_multiplicity(mol.charge + 1, mult)?;
    Ok((cation, occ_a, occ_b, spin))
}

/// Weight of MO `target` of `c_ref` outside the space spanned by the occupied columns of
/// `c` (metric `s`): 1 − Σ_j (c_refᵀ S c)_{t j}² over occupied j.
pub fn hole_weight(
    s: &Mat<f64>,
    c_ref: &Mat<f64>,
    target: usize,
    c: &Mat<f64>,
    occ: &[f64],
) -> f64 {
    let n = s.nrows();
    let t = Mat::<f64>::from_fn(n, 1, |mu, _| c_ref[(mu, target)]);
    let st = mul(s.as_ref(), false, t.as_ref(), false);
    let proj = mul(st.as_ref(), true, c.as_ref(), false); // 1 × n_mo
    let kept: f64 = occ
        .iter()
        .enumerate()
        .filter(|(_, &o)| o > 0.5)
        .map(|(j, _)| proj[(0, j)].powi(2))
        .sum();
    (1.0 - kept).clamp(0.0, 1.0)
}

/// ΔSCF IEs for the given (spin, MO index) holes of a converged neutral wavefunction; the
/// first hole whose cation fails is the error. `base` supplies thresholds and memory
/// settings; reference, guess and occupation are set here. `overlap` is the AO overlap
/// matrix.
pub fn dscf(
    mol: &Molecule,
    basis: &BasisSet,
    neutral: &Wavefunction,
    overlap: &Mat<f64>,
    holes: &[(Spin, usize)],
    base: &ScfOptions,
) -> Result<Vec<DscfHole>> {
    dscf_each(mol, basis, neutral, overlap, holes, base)?
        .into_iter()
        .collect()
}

/// As [`dscf`], one result per hole: a cation whose SCF fails (a deep hole of a
/// non-aufbau state) is an error of its own and the others stand.
pub fn dscf_each(
    mol: &Molecule,
    basis: &BasisSet,
    neutral: &Wavefunction,
    overlap: &Mat<f64>,
    holes: &[(Spin, usize)],
    base: &ScfOptions,
) -> Result<Vec<Result<DscfHole>>> {
    if !neutral.converged {
        return Err(Error::computation(
            "ΔSCF needs a converged neutral reference".to_string(),
        ));
    }
    Ok(holes
        .iter()
        .map(|&(spin, orbital)| -> Result<DscfHole> {
            let (cation, hole_spin, wf) =
                cation_wavefunction(mol, basis, neutral, spin, orbital, base)?;
            let Some((wf, route)) = wf else {
                let e = cation.nuclear_repulsion();
                return Ok(DscfHole {
                    spin: hole_spin,
                    orbital,
                    ie: e - neutral.energy,
                    cation_energy: e,
                    hole_overlap: 1.0,
                    hole_moved: false,
                    s2: 0.0,
                    s2_exact: 0.0,
                    iterations: 0,
                    route: None,
                });
            };
            let (c_ref, c, occ) = match hole_spin {
                Spin::Alpha => (&neutral.c_alpha, &wf.c_alpha, &wf.occ_alpha),
                _ => (&neutral.c_beta, &wf.c_beta, &wf.occ_beta),
            };
            let w = hole_weight(overlap, c_ref, orbital, c, occ);
            Ok(DscfHole {
                spin: hole_spin,
                orbital,
                ie: wf.energy - neutral.energy,
                cation_energy: wf.energy,
                hole_overlap: w,
                hole_moved: w < HOLE_KEPT,
                s2: wf.s2,
                s2_exact: exact_s2(&cation),
                iterations: wf.iterations,
                route: Some(route),
            })
        })
        .collect())
}

/// Which cation SCF holds the hole.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum HoldRoute {
    /// UHF held by MOM (the first try).
    Uhf,
    /// ROHF held by MOM, after the UHF did not converge (closed-shell neutrals only).
    Rohf,
}

/// The MOM-held cation with one electron of `spin` removed from MO `orbital` of `neutral`:
/// (cation molecule, spin that lost the electron, wavefunction and which SCF held it — None
/// when no electron is left).
///
/// The first try is a UHF cation held by MOM from the neutral's orbitals. Where two holes
/// lie close in energy the UHF landscape can have no stable solution near the start (CO at
/// the GW100 1.283 Å bond: 5σ and 1π within 0.4 eV; the 5σ-hole UHF wanders at a
/// commutator of 1e-4 for 400 iterations with any level shift or damping, and even from a
/// superposition-of-atoms start). A closed-shell neutral then gets the spin-restricted
/// (ROHF) cation, held by MOM the same way, which has no spin polarisation to wander in.
/// Coupled cluster on top removes most of the reference dependence (F2⁺ 1πg hole:
/// ΔCCSD(T) 15.7009 eV on UHF, 15.7077 eV on ROHF, def2-TZVPP; docs/valence-methods.md);
/// ΔSCF on ROHF lies above the UHF value. An SCF that converges on the first try is never
/// repeated, so the fallback changes no result that converged before.
pub fn cation_wavefunction(
    mol: &Molecule,
    basis: &BasisSet,
    neutral: &Wavefunction,
    spin: Spin,
    orbital: usize,
    base: &ScfOptions,
) -> Result<(Molecule, Spin, Option<(Wavefunction, HoldRoute)>)> {
    let (cation, occ_a, occ_b, hole_spin) = cation_state(mol, neutral, spin, orbital)?;
    if cation.n_electrons() == 0 {
        return Ok((cation, hole_spin, None));
    }
    let opts = ScfOptions {
        reference: Reference::Uhf,
        guess: Guess::Orbitals {
            c_alpha: neutral.c_alpha.clone(),
            c_beta: neutral.c_beta.clone(),
        },
        occupation: Occupation::Mom {
            c_alpha_ref: neutral.c_alpha.clone(),
            c_beta_ref: neutral.c_beta.clone(),
            occ_alpha: occ_a.clone(),
            occ_beta: occ_b.clone(),
            initial: false,
        },
        ..base.clone()
    };
    let first = match crate::scf::run(&cation, basis, &opts) {
        Ok(wf) => return Ok((cation, hole_spin, Some((wf, HoldRoute::Uhf)))),
        Err(e) => e,
    };
    let failed = |e: &Error| {
        Error::computation(format!(
            "ΔSCF cation with a hole in orbital {} failed: {e}",
            orbital + 1
        ))
    };
    if neutral.reference != Reference::Rhf {
        return Err(failed(&first));
    }
    // ROHF: both spins in the alpha orbitals, the beta set inside the alpha one.
    let rohf = ScfOptions {
        reference: Reference::Rohf,
        guess: Guess::Orbitals {
            c_alpha: neutral.c_alpha.clone(),
            c_beta: neutral.c_alpha.clone(),
        },
        occupation: Occupation::Mom {
            c_alpha_ref: neutral.c_alpha.clone(),
            c_beta_ref: neutral.c_alpha.clone(),
            occ_alpha: occ_a,
            occ_beta: occ_b,
            initial: false,
        },
        ..base.clone()
    };
    match crate::scf::run(&cation, basis, &rohf) {
        Ok(wf) => Ok((cation, hole_spin, Some((wf, HoldRoute::Rohf)))),
        Err(second) => Err(Error::computation(format!(
            "ΔSCF cation with a hole in orbital {} failed: the UHF cation ({first}) and then \
             the ROHF cation ({second}) did not converge",
            orbital + 1
        ))),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hole_weight_sees_which_orbital_is_empty() {
        // orthonormal toy orbitals (S = 1): rotate orbitals 0 and 1 by 30°
        let s = Mat::<f64>::identity(3, 3);
        let c_ref = Mat::<f64>::identity(3, 3);
        let (cs, sn) = (30f64.to_radians().cos(), 30f64.to_radians().sin());
        let mut c = Mat::<f64>::identity(3, 3);
        c[(0, 0)] = cs;
        c[(1, 0)] = sn;
        c[(0, 1)] = -sn;
        c[(1, 1)] = cs;
        // cation occupies orbital 0 only of {0,1}: the hole is orbital 1 of c
        let occ = [1.0, 0.0, 0.0];
        let w1 = hole_weight(&s, &c_ref, 1, &c, &occ);
        let w0 = hole_weight(&s, &c_ref, 0, &c, &occ);
        assert!((w1 - cs * cs).abs() < 1e-14); // target 1 mostly still empty
        assert!((w0 - sn * sn).abs() < 1e-14); // target 0 mostly occupied
        assert!(w1 >= HOLE_KEPT && w0 < HOLE_KEPT);
    }
}
