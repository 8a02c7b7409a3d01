//! How the correlated methods get their two-electron integrals: which three-index
//! factorisation (pq|rs) ≈ Σ_P B^P_pq B^P_rs is used, and producing the MO factors.
//!
//! - Density fitting (RI, density_fit.rs) with the fitting set made for the orbital basis
//!   (`basis::default_auxiliary_for`): the default whenever such a set is bundled. Its
//!   error on ionization energies is at the meV level (common practice; measured in
//!   tests/correlation.rs against the Cholesky route) and it needs only cheap three-centre
//!   integrals.
//! - Pivoted Cholesky decomposition of the AO integrals (cholesky.rs): every integral within
//!   the threshold of the exact one, so it can reproduce exact-integral results; used when
//!   no fitting set is bundled (STO-3G, Pople sets without polarisation, user files) or
//!   when asked for.

use crate::basis::{self, BasisSet};
use crate::chem::Molecule;
use crate::integrals::EriEngine;
use crate::Result;

use super::cholesky;
use super::integrals::MoFactors;

/// Requested treatment of the two-electron integrals.
#[derive(Debug, Clone, PartialEq)]
pub enum TwoElectron {
    /// Density fitting with the bundled fitting set of the orbital basis; Cholesky (at
    /// `cholesky_threshold`) when there is none.
    Auto,
    /// Density fitting with this auxiliary set (bundled name or file).
    Fitted(String),
    /// Pivoted Cholesky decomposition at `cholesky_threshold`.
    Cholesky,
}

/// What will be used, decided before any integral is computed.
#[derive(Debug, Clone)]
pub enum Resolved {
    Fitted(BasisSet),
    Cholesky(f64),
}

impl Resolved {
    /// Number of factors: exact for fitting, an estimate for Cholesky.
    pub fn expected_rank(&self, n_basis: usize) -> usize {
        match self {
            Resolved::Fitted(aux) => aux.n_basis,
            Resolved::Cholesky(tau) => super::memory::expected_cholesky_vectors(n_basis, *tau),
        }
    }

    pub fn is_fitted(&self) -> bool {
        matches!(self, Resolved::Fitted(_))
    }
}

/// Decide the treatment for `basis` on `mol`.
pub fn resolve(
    choice: &TwoElectron,
    mol: &Molecule,
    basis: &BasisSet,
    cholesky_threshold: f64,
) -> Result<Resolved> {
    match choice {
        TwoElectron::Cholesky => Ok(Resolved::Cholesky(cholesky_threshold)),
        TwoElectron::Fitted(name) => Ok(Resolved::Fitted(basis::load_auxiliary(name, mol)?)),
        TwoElectron::Auto => match basis::default_auxiliary_for(&basis.name) {
            Some(name) => Ok(Resolved::Fitted(basis::load_auxiliary(name, mol)?)),
            None => Ok(Resolved::Cholesky(cholesky_threshold)),
        },
    }
}

/// MO factors of the two spins of an open-shell reference, each over its own active
/// orbitals (`spins[s]` = (c_occ, o, c_vir, v) as in `mo_factors`): the Cholesky route
/// decomposes the AO integrals once for both, and the description is logged once.
pub fn mo_factors_both_spins(
    how: &Resolved,
    basis: &BasisSet,
    spins: [(&[f64], usize, &[f64], usize); 2],
    max_cholesky_vectors: usize,
    log: &mut dyn FnMut(&str),
) -> Result<([MoFactors; 2], String)> {
    match how {
        Resolved::Fitted(_) => {
            let (a, note) = mo_factors(
                how,
                basis,
                spins[0].0,
                spins[0].1,
                spins[0].2,
                spins[0].3,
                max_cholesky_vectors,
                log,
            )?;
            let (b, _) = mo_factors(
                how,
                basis,
                spins[1].0,
                spins[1].1,
                spins[1].2,
                spins[1].3,
                max_cholesky_vectors,
                &mut |_| {},
            )?;
            Ok(([a, b], note))
        }
        Resolved::Cholesky(tau) => {
            let eng = EriEngine::new(basis);
            let cd = cholesky::decompose(basis, &eng, *tau, max_cholesky_vectors, log)?;
            let f = spins.map(|(co, o, cv, v)| cd.to_mo(co, o, cv, v));
            let note = format!(
                "two-electron integrals: Cholesky decomposition, threshold {tau:.0e} Eh, {} \
                 vectors",
                cd.nvec
            );
            Ok((f, note))
        }
    }
}

/// MO factors over the active orbitals (`c_occ` n × o, `c_vir` n × v, row-major, MOs as
/// columns) and a one-line description for the report. `max_cholesky_vectors` bounds the
/// Cholesky route's memory.
#[allow(clippy::too_many_arguments)]
pub fn mo_factors(
    how: &Resolved,
    basis: &BasisSet,
    c_occ: &[f64],
    o: usize,
    c_vir: &[f64],
    v: usize,
    max_cholesky_vectors: usize,
    log: &mut dyn FnMut(&str),
) -> Result<(MoFactors, String)> {
    match how {
        Resolved::Fitted(aux) => {
            let f = super::density_fit::mo_factors(basis, aux, c_occ, o, c_vir, v)?;
            let note = format!(
                "two-electron integrals: density fitting (RI) with {} ({} auxiliary \
                 functions); its error on ionization energies is at the meV level",
                aux.name, aux.n_basis
            );
            log(&note);
            Ok((f, note))
        }
        Resolved::Cholesky(tau) => {
            let eng = EriEngine::new(basis);
            let cd = cholesky::decompose(basis, &eng, *tau, max_cholesky_vectors, log)?;
            let f = cd.to_mo(c_occ, o, c_vir, v);
            let note = format!(
                "two-electron integrals: Cholesky decomposition, threshold {tau:.0e} Eh, {} \
                 vectors",
                cd.nvec
            );
            Ok((f, note))
        }
    }
}
