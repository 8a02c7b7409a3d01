//! The ONE default-method rule: which valence ionization method a job gets when none is
//! asked for — the most accurate method that can run for this molecule, in the order
//! eom-ccsd → eom-mp2 → ep2 → koopmans (open shells: … → dscf → koopmans), each skipped
//! with a typed reason when it cannot run.
//!
//! Size limits (measured on 2 cores, docs/benchmarks.md "EOM"): EOM-IP-CCSD up to
//! `CCSD_MAX_BASIS` basis functions, EOM-IP-MBPT2 up to `MBPT2_MAX_BASIS`, each only when its
//! memory plan (`correlation::memory`) fits the budget.
//!
//! A method is skipped before any work when it does not apply (open shell: the EOM-IP and
//! EP2 code here needs a closed-shell RHF reference; no virtual orbital, as for helium in a
//! minimal basis: nothing to correlate with), when the basis is beyond its size limit or its
//! memory plan does not fit the budget, and after the fact when it ran and failed (a
//! computation error: the next method is tried on the same SCF reference, in
//! `predict_default`). Bad input is never covered up by a fallback.

use serde::Serialize;

use crate::basis::BasisSet;
use crate::chem::frozen_core::frozen_orbitals;
use crate::chem::Molecule;
use crate::correlation::memory::{self, FactorRoute, Stage};
use crate::correlation::two_electron::{self, Resolved, TwoElectron};
use crate::error::{Error, Result};
use crate::ionization::method::Method;
use crate::ionization::notice::ValenceNotice;
use crate::ionization::valence::{predict_with, ValenceOptions, ValenceResult};
use crate::scf::Reference;

/// Largest basis for the EOM-IP-CCSD default (benzene/def2-TZVPP has 270 functions).
pub const CCSD_MAX_BASIS: usize = 300;
/// Largest basis for the EOM-IP-MBPT2 default (guanine/def2-TZVPP has 411 functions).
pub const MBPT2_MAX_BASIS: usize = 450;

/// The rule in words, for help texts and output.
pub fn rule_text() -> String {
    format!(
        "default method: eom-ccsd up to {CCSD_MAX_BASIS} basis functions, eom-mp2 up to \
         {MBPT2_MAX_BASIS}, ep2 beyond (or whenever the memory estimate of the more accurate \
         method exceeds the budget)"
    )
}

/// The correlated space of the frozen-core default for a closed-shell molecule: (correlated
/// occupied, virtual, factor route of the two-electron integrals).
pub fn correlated_space(mol: &Molecule, basis: &BasisSet) -> (usize, usize, FactorRoute) {
    let nocc = mol.n_electrons() / 2;
    let core = frozen_orbitals(mol, nocc);
    let nvir = basis.n_basis.saturating_sub(nocc);
    let route = match two_electron::resolve(&TwoElectron::Auto, mol, basis, 1e-5) {
        Ok(Resolved::Fitted(aux)) => FactorRoute::Fitted(aux.n_basis),
        _ => FactorRoute::Cholesky(memory::expected_cholesky_vectors(basis.n_basis, 1e-5)),
    };
    (nocc - core, nvir, route)
}

/// Why a method of the default chain was not used.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "code", rename_all = "kebab-case")]
pub enum SkipReason {
    /// The molecule is open-shell; the method needs a closed-shell reference.
    OpenShell { multiplicity: u32 },
    /// The basis has no virtual orbital (e.g. helium in a minimal basis).
    NoVirtualOrbitals { n_basis: usize, n_occupied: usize },
    /// More basis functions than the method's default limit (time).
    BasisTooLarge { n_basis: usize, limit: usize },
    /// The memory plan does not fit the budget (the plan's message).
    DoesNotFit { message: String },
    /// The method ran and failed (the error's message).
    Failed { message: String },
}

impl SkipReason {
    /// Stable identifier of the reason.
    pub fn code(&self) -> &'static str {
        match self {
            SkipReason::OpenShell { .. } => "open-shell",
            SkipReason::NoVirtualOrbitals { .. } => "no-virtual-orbitals",
            SkipReason::BasisTooLarge { .. } => "basis-too-large",
            SkipReason::DoesNotFit { .. } => "does-not-fit",
            SkipReason::Failed { .. } => "failed",
        }
    }
}

impl std::fmt::Display for SkipReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SkipReason::OpenShell { multiplicity } => write!(
                f,
                "the molecule is open-shell (multiplicity {multiplicity}) and the method needs a \
                 closed-shell reference"
            ),
            SkipReason::NoVirtualOrbitals {
                n_basis,
                n_occupied,
            } => write!(
                f,
                "the basis has no virtual orbital ({n_basis} functions, {n_occupied} occupied): \
                 there is nothing to correlate with"
            ),
            SkipReason::BasisTooLarge { n_basis, limit } => write!(
                f,
                "{n_basis} basis functions exceed its default limit of {limit}"
            ),
            SkipReason::DoesNotFit { message } => write!(f, "memory: {message}"),
            SkipReason::Failed { message } => write!(f, "it failed: {message}"),
        }
    }
}

/// One method of the chain that was not used, and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Skipped {
    pub method: Method,
    pub reason: SkipReason,
}

/// The method the default rule settled on and the ones it skipped on the way.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DefaultChoice {
    pub method: Method,
    pub skipped: Vec<Skipped>,
}

impl std::fmt::Display for DefaultChoice {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} — chose {}", rule_text(), self.method)?;
        if !self.skipped.is_empty() {
            let why: Vec<String> = self
                .skipped
                .iter()
                .map(|s| format!("{} ({})", s.method, s.reason))
                .collect();
            write!(f, "; not used: {}", why.join("; "))?;
        }
        Ok(())
    }
}

/// The chain of methods tried by default, most accurate first.
pub fn chain(mol: &Molecule) -> Vec<Method> {
    if mol.multiplicity == 1 {
        vec![
            Method::EomCcsd,
            Method::EomMp2,
            Method::Ep2,
            Method::Koopmans,
        ]
    } else {
        vec![
            Method::EomCcsd,
            Method::EomMp2,
            Method::Ep2,
            Method::Dscf,
            Method::Koopmans,
        ]
    }
}

/// Why `method` cannot run for this molecule, basis and memory budget (bytes), checked
/// before any work; None when it can.
pub fn cannot_run(
    method: Method,
    mol: &Molecule,
    basis: &BasisSet,
    budget_bytes: f64,
) -> Option<SkipReason> {
    let correlated = matches!(method, Method::EomCcsd | Method::EomMp2 | Method::Ep2);
    if !correlated {
        return None;
    }
    if mol.multiplicity != 1 {
        return Some(SkipReason::OpenShell {
            multiplicity: mol.multiplicity,
        });
    }
    let n_occupied = mol.n_electrons() / 2;
    if basis.n_basis <= n_occupied {
        return Some(SkipReason::NoVirtualOrbitals {
            n_basis: basis.n_basis,
            n_occupied,
        });
    }
    let (stage, limit) = match method {
        Method::EomCcsd => (Stage::EomCcsd, CCSD_MAX_BASIS),
        Method::EomMp2 => (Stage::EomMbpt2, MBPT2_MAX_BASIS),
        _ => return None,
    };
    if basis.n_basis > limit {
        return Some(SkipReason::BasisTooLarge {
            n_basis: basis.n_basis,
            limit,
        });
    }
    let (ncorr, nvir, route) = correlated_space(mol, basis);
    // 8 DIIS vectors, 60 Davidson vectors: the plan the EOM code makes by default
    match memory::plan(
        stage,
        basis.n_basis,
        ncorr,
        nvir,
        route,
        8,
        60,
        budget_bytes,
    ) {
        Ok(_) => None,
        Err(e) => Some(SkipReason::DoesNotFit {
            message: e.to_string(),
        }),
    }
}

/// The first method of the chain that can run (checked before any work).
pub fn choose(mol: &Molecule, basis: &BasisSet, budget_bytes: f64) -> DefaultChoice {
    let mut skipped = Vec::new();
    for m in chain(mol) {
        match cannot_run(m, mol, basis, budget_bytes) {
            None => return DefaultChoice { method: m, skipped },
            Some(reason) => skipped.push(Skipped { method: m, reason }),
        }
    }
    // koopmans always runs; not reached
    DefaultChoice {
        method: Method::Koopmans,
        skipped,
    }
}

/// Run the SCF once and predict the valence bands with the default method, falling back
/// along the chain when a method cannot run or fails (a computation error, or a memory
/// refusal found only when the job is planned in full). `opts.method` is ignored;
/// `opts.memory_bytes` is the budget. The choice is added to the result's notes, and a
/// method that failed after starting also gives a warning.
pub fn predict_default(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
) -> Result<(ValenceResult, DefaultChoice)> {
    let mut scf = opts.scf.clone();
    scf.reference = if mol.multiplicity == 1 {
        Reference::Rhf
    } else {
        Reference::Uhf
    };
    let wf = crate::scf::run(mol, basis, &scf)?;
    let budget = opts.memory_bytes as f64;
    let mut skipped = Vec::new();
    let mut failures: Vec<Skipped> = Vec::new();
    for m in chain(mol) {
        if let Some(reason) = cannot_run(m, mol, basis, budget) {
            skipped.push(Skipped { method: m, reason });
            continue;
        }
        let o = ValenceOptions {
            method: m,
            ..opts.clone()
        };
        match predict_with(mol, basis, &wf, &o) {
            Ok(mut r) => {
                let choice = DefaultChoice { method: m, skipped };
                r.notes
                    .push(ValenceNotice::DefaultMethodChosen(choice.clone()));
                for s in &failures {
                    r.warnings.push(ValenceNotice::DefaultFellBack {
                        method: s.method,
                        reason: s.reason.clone(),
                    });
                }
                return Ok((r, choice));
            }
            Err(e @ Error::Input { .. }) => return Err(e),
            Err(e) => {
                let s = Skipped {
                    method: m,
                    reason: SkipReason::Failed {
                        message: e.to_string(),
                    },
                };
                failures.push(s.clone());
                skipped.push(s);
            }
        }
    }
    Err(Error::computation(format!(
        "no ionization method could run: {}",
        skipped
            .iter()
            .map(|s| format!("{} ({})", s.method, s.reason))
            .collect::<Vec<_>>()
            .join("; ")
    )))
}
