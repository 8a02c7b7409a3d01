//! The default ionization method: the most accurate one that fits the job's time and memory.
//!
//! Rule (measured on 2 cores, README "Benchmarks: EOM"): EOM-IP-CCSD up to
//! `CCSD_MAX_BASIS` basis functions, EOM-IP-MBPT2 up to `MBPT2_MAX_BASIS`, the EP2
//! propagator beyond — each only when its memory plan (memory.rs) fits the budget; a method
//! that does not fit falls through to the next.

use super::memory::{self, FactorRoute, Stage};

/// Largest basis for the EOM-IP-CCSD default (benzene/def2-TZVPP has 270 functions).
pub const CCSD_MAX_BASIS: usize = 300;
/// Largest basis for the EOM-IP-MBPT2 default (guanine/def2-TZVPP has 411 functions).
pub const MBPT2_MAX_BASIS: usize = 450;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DefaultMethod {
    EomCcsd,
    EomMbpt2,
    Ep2,
}

/// The rule in words, for help texts and output.
pub fn rule_text() -> String {
    format!(
        "default method: eom-ccsd up to {CCSD_MAX_BASIS} basis functions, eom-mp2 up to \
         {MBPT2_MAX_BASIS}, ep2 beyond (or whenever the memory estimate of the more accurate \
         method exceeds the budget)"
    )
}

/// Choose for a closed-shell job with `n_corr_occ` correlated occupied and `n_vir` virtual
/// orbitals, integrals factorised as `route`; `budget_bytes` as in
/// `EomOptions::memory_budget` (None: available memory).
pub fn choose(
    n_basis: usize,
    n_corr_occ: usize,
    n_vir: usize,
    route: FactorRoute,
    budget_bytes: Option<f64>,
) -> DefaultMethod {
    let budget = budget_bytes.unwrap_or_else(|| 0.8 * memory::available_bytes());
    let fits =
        |stage| memory::plan(stage, n_basis, n_corr_occ, n_vir, route, 8, 60, budget).is_ok();
    if n_basis <= CCSD_MAX_BASIS && fits(Stage::EomCcsd) {
        DefaultMethod::EomCcsd
    } else if n_basis <= MBPT2_MAX_BASIS && fits(Stage::EomMbpt2) {
        DefaultMethod::EomMbpt2
    } else {
        DefaultMethod::Ep2
    }
}

/// The correlated space of the frozen-core default for a closed-shell molecule: (correlated
/// occupied, virtual, factor route). Shared with the fallback chain
/// (`ionization::fallback`).
pub fn correlated_space(
    mol: &crate::chem::Molecule,
    basis: &crate::basis::BasisSet,
) -> (usize, usize, FactorRoute) {
    let nocc = mol.n_electrons() / 2;
    let core: usize = mol
        .atoms
        .iter()
        .map(|a| super::eom_ip::frozen_core_orbitals(a.z))
        .sum();
    let core = if core >= nocc { 0 } else { core };
    let nvir = basis.n_basis.saturating_sub(nocc);
    let route = match super::two_electron::resolve(
        &super::two_electron::TwoElectron::Auto,
        mol,
        basis,
        1e-5,
    ) {
        Ok(super::two_electron::Resolved::Fitted(aux)) => FactorRoute::Fitted(aux.n_basis),
        _ => FactorRoute::Cholesky(memory::expected_cholesky_vectors(basis.n_basis, 1e-5)),
    };
    (nocc - core, nvir, route)
}

/// The default `bandcast ionize` method for a molecule in a basis: for closed shells the
/// rule above with the correlated space of the frozen-core default; open shells get ΔSCF
/// (the EOM and EP2 code here is closed-shell only).
pub fn default_ionization_method(
    mol: &crate::chem::Molecule,
    basis: &crate::basis::BasisSet,
    budget_bytes: Option<f64>,
) -> crate::ionization::method::Method {
    use crate::ionization::method::Method;
    if mol.multiplicity != 1 {
        return Method::Dscf;
    }
    let (ncorr, nvir, route) = correlated_space(mol, basis);
    match choose(basis.n_basis, ncorr, nvir, route, budget_bytes) {
        DefaultMethod::EomCcsd => Method::EomCcsd,
        DefaultMethod::EomMbpt2 => Method::EomMp2,
        DefaultMethod::Ep2 => Method::Ep2,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rule_follows_size_and_memory() {
        let ri = |n: usize| FactorRoute::Fitted(5 * n / 2);
        assert_eq!(choose(60, 4, 55, ri(60), Some(8e9)), DefaultMethod::EomCcsd);
        assert_eq!(
            choose(270, 15, 249, ri(270), Some(8e9)),
            DefaultMethod::EomCcsd
        );
        assert_eq!(
            choose(411, 28, 372, ri(411), Some(14e9)),
            DefaultMethod::EomMbpt2
        );
        assert_eq!(
            choose(800, 60, 700, ri(800), Some(16e9)),
            DefaultMethod::Ep2
        );
        // memory too small for anything correlated → ep2
        assert_eq!(choose(270, 15, 249, ri(270), Some(1e8)), DefaultMethod::Ep2);
        assert!(rule_text().contains("eom-ccsd"));
    }
}
