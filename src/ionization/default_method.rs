//! The ONE default-method rule: which valence ionization method a job gets when none is
//! asked for — the most accurate one that fits the job's size and memory.
//!
//! Rule (measured on 2 cores, README "Benchmarks: EOM"): open shells get ΔSCF (the EOM and
//! EP2 code here is closed-shell only); closed shells get EOM-IP-CCSD up to
//! `CCSD_MAX_BASIS` basis functions, EOM-IP-MBPT2 up to `MBPT2_MAX_BASIS`, the EP2
//! propagator beyond — each only when its memory plan (`correlation::memory`) fits the
//! budget; a method that does not fit falls through to the next.

use serde::Serialize;

use crate::basis::BasisSet;
use crate::chem::frozen_core::frozen_orbitals;
use crate::chem::Molecule;
use crate::correlation::memory::{self, FactorRoute, Stage};
use crate::correlation::two_electron::{self, Resolved, TwoElectron};
use crate::ionization::method::Method;
use crate::system::available_bytes;

/// Largest basis for the EOM-IP-CCSD default (benzene/def2-TZVPP has 270 functions).
pub const CCSD_MAX_BASIS: usize = 300;
/// Largest basis for the EOM-IP-MBPT2 default (guanine/def2-TZVPP has 411 functions).
pub const MBPT2_MAX_BASIS: usize = 450;

/// Why a more accurate method was passed over.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "code", rename_all = "kebab-case")]
pub enum Skipped {
    /// The basis is larger than the method's limit.
    BasisAboveLimit { method: Method, limit: usize },
    /// The method's memory estimate exceeds the budget.
    MemoryAboveBudget { method: Method },
}

/// Why the default method was chosen.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "code", rename_all = "kebab-case")]
pub enum DefaultReason {
    /// Open-shell molecule: the correlated methods here are closed-shell only.
    OpenShell,
    /// Closed shell: the most accurate method whose size limit and memory plan fit;
    /// `skipped` lists the more accurate ones passed over.
    MostAccurateThatFits { n_basis: usize, skipped: Vec<Skipped> },
}

/// The chosen method and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DefaultChoice {
    pub method: Method,
    pub reason: DefaultReason,
}

/// The rule in words, for help texts and output.
pub fn rule_text() -> String {
    format!(
        "default method: eom-ccsd up to {CCSD_MAX_BASIS} basis functions, eom-mp2 up to \
         {MBPT2_MAX_BASIS}, ep2 beyond (or whenever the memory estimate of the more accurate \
         method exceeds the budget)"
    )
}

impl std::fmt::Display for DefaultChoice {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match &self.reason {
            DefaultReason::OpenShell => write!(
                f,
                "default method for an open shell: {} (the correlated methods are closed-shell only)",
                self.method
            ),
            DefaultReason::MostAccurateThatFits { n_basis, .. } => write!(
                f,
                "{} — chose {} for {n_basis} basis functions",
                rule_text(),
                self.method
            ),
        }
    }
}

/// The closed-shell ladder for a job with `n_corr_occ` correlated occupied and `n_vir`
/// virtual orbitals, integrals factorised as `route`, memory budget `budget` bytes.
pub fn choose_closed_shell(
    n_basis: usize,
    n_corr_occ: usize,
    n_vir: usize,
    route: FactorRoute,
    budget: f64,
) -> (Method, Vec<Skipped>) {
    let fits =
        |stage| memory::plan(stage, n_basis, n_corr_occ, n_vir, route, 8, 60, budget).is_ok();
    let mut skipped = Vec::new();
    for (method, stage, limit) in [
        (Method::EomCcsd, Stage::EomCcsd, CCSD_MAX_BASIS),
        (Method::EomMp2, Stage::EomMbpt2, MBPT2_MAX_BASIS),
    ] {
        if n_basis > limit {
            skipped.push(Skipped::BasisAboveLimit { method, limit });
        } else if !fits(stage) {
            skipped.push(Skipped::MemoryAboveBudget { method });
        } else {
            return (method, skipped);
        }
    }
    (Method::Ep2, skipped)
}

/// The default valence method for a molecule in a basis; `budget_bytes` as in
/// `EomOptions::memory_budget` (None: 80 % of the available memory). Closed shells use the
/// correlated space of the frozen-core default (`chem::frozen_core`).
pub fn choose(mol: &Molecule, basis: &BasisSet, budget_bytes: Option<f64>) -> DefaultChoice {
    if mol.multiplicity != 1 {
        return DefaultChoice {
            method: Method::Dscf,
            reason: DefaultReason::OpenShell,
        };
    }
    let nocc = mol.n_electrons() / 2;
    let core = frozen_orbitals(mol, nocc);
    let nvir = basis.n_basis.saturating_sub(nocc);
    let route = match two_electron::resolve(&TwoElectron::Auto, mol, basis, 1e-5) {
        Ok(Resolved::Fitted(aux)) => FactorRoute::Fitted(aux.n_basis),
        _ => FactorRoute::Cholesky(memory::expected_cholesky_vectors(basis.n_basis, 1e-5)),
    };
    let budget = budget_bytes.unwrap_or_else(|| 0.8 * available_bytes());
    let (method, skipped) = choose_closed_shell(basis.n_basis, nocc - core, nvir, route, budget);
    DefaultChoice {
        method,
        reason: DefaultReason::MostAccurateThatFits {
            n_basis: basis.n_basis,
            skipped,
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Regression: the ladder follows the size limits and the memory plan.
    #[test]
    fn regression_rule_follows_size_and_memory() {
        let ri = |n: usize| FactorRoute::Fitted(5 * n / 2);
        assert_eq!(choose_closed_shell(60, 4, 55, ri(60), 8e9).0, Method::EomCcsd);
        assert_eq!(choose_closed_shell(270, 15, 249, ri(270), 8e9).0, Method::EomCcsd);
        let (m, skipped) = choose_closed_shell(411, 28, 372, ri(411), 14e9);
        assert_eq!(m, Method::EomMp2);
        assert_eq!(
            skipped,
            vec![Skipped::BasisAboveLimit {
                method: Method::EomCcsd,
                limit: CCSD_MAX_BASIS
            }]
        );
        assert_eq!(choose_closed_shell(800, 60, 700, ri(800), 16e9).0, Method::Ep2);
        // memory too small for anything correlated → ep2
        let (m, skipped) = choose_closed_shell(270, 15, 249, ri(270), 1e8);
        assert_eq!(m, Method::Ep2);
        assert!(skipped
            .iter()
            .all(|s| matches!(s, Skipped::MemoryAboveBudget { .. })));
        assert!(rule_text().contains("eom-ccsd"));
    }
}
