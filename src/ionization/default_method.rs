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
use crate::chem::frozen_core::{core_orbitals, frozen_orbitals};
use crate::chem::Molecule;
use crate::correlation::memory::{self, FactorRoute, Stage};
use crate::correlation::two_electron::{self, Resolved, TwoElectron};
use crate::error::{Error, Result};
use crate::integrals::mo_transform::{estimate_bytes_for, max_shell_functions};
use crate::ionization::method::Method;
use crate::ionization::notice::ValenceNotice;
use crate::ionization::valence::{predict_with, ValenceOptions, ValenceResult, COUNT_MARGIN};
use crate::scf::{Reference, ScfOptions};
use crate::system::{format_gib, StageEstimate};

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

/// The SCF options a valence job runs with: the reference its spin needs, and `--memory`
/// bounding the SCF too (the smaller of the SCF's own budget and the job's).
pub fn scf_options(mol: &Molecule, opts: &ValenceOptions) -> ScfOptions {
    let mut scf = opts.scf.clone();
    scf.reference = if mol.multiplicity == 1 {
        Reference::Rhf
    } else {
        Reference::Uhf
    };
    scf.memory_budget_bytes = scf.memory_budget_bytes.min(opts.memory_bytes);
    scf
}

/// Target orbitals EP2 may be asked for before the SCF has grouped them into bands: one per
/// valence orbital (degenerate orbitals share one target, so this is an upper bound), or
/// the band count plus the margin the valence code adds.
fn ep2_targets(mol: &Molecule, opts: &ValenceOptions) -> usize {
    let nocc = mol.n_electrons() / 2;
    let nval = nocc - core_orbitals(mol).min(nocc);
    match opts.count {
        Some(c) => (c + COUNT_MARGIN).min(nval),
        None => nval,
    }
    .max(1)
}

/// Peak bytes of EP2's MO integral transformation for `n_targets` target orbitals (the
/// blocks (t a|j b) and (t j|a k) of `ionization::ep2`).
pub fn ep2_transform_bytes(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
    n_targets: usize,
) -> f64 {
    let nocc = mol.n_electrons() / 2;
    let no = if opts.frozen_core {
        nocc - core_orbitals(mol).min(nocc)
    } else {
        nocc
    };
    let nv = basis.n_basis.saturating_sub(nocc);
    estimate_bytes_for(
        basis.n_basis,
        max_shell_functions(basis),
        &[[n_targets, nv, no, nv], [n_targets, no, nv, no]],
        rayon::current_num_threads(),
    ) as f64
}

/// The correlated memory plan of an EOM-IP method for this job (refuses with
/// `Error::TooLarge` naming the cheaper method when it cannot fit).
fn eom_plan(
    stage: Stage,
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
) -> Result<memory::MemoryPlan> {
    let (ncorr, nvir, route) = correlated_space(mol, basis);
    let ncorr = if opts.frozen_core {
        ncorr
    } else {
        mol.n_electrons() / 2
    };
    let route = match opts.eom_integrals {
        TwoElectron::Cholesky => {
            FactorRoute::Cholesky(memory::expected_cholesky_vectors(basis.n_basis, 1e-5))
        }
        _ => route,
    };
    // 8 DIIS vectors, 60 Davidson vectors: the plan the EOM code makes by default
    memory::plan(
        stage,
        basis.n_basis,
        ncorr,
        nvir,
        route,
        8,
        60,
        opts.memory_bytes as f64,
    )
}

fn applies(method: Method, mol: &Molecule, basis: &BasisSet) -> bool {
    matches!(method, Method::EomCcsd | Method::EomMp2 | Method::Ep2)
        && mol.multiplicity == 1
        && basis.n_basis > mol.n_electrons() / 2
}

/// The peak memory of each stage of `method` for this job, from the molecule and basis
/// alone (no integral, no SCF): the SCF (its matrices, and the optional in-core store),
/// then EP2's MO integral transformation for all candidate targets, or the EOM-IP plan's
/// factors, MO integrals, amplitudes and Davidson space. Estimates only: the refusals are
/// [`check_scf`] and [`cannot_run_with`].
pub fn stage_estimates(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
    method: Method,
) -> Vec<StageEstimate> {
    let scf = scf_options(mol, opts);
    let mut out = crate::scf::memory::estimates(basis.n_basis, basis.shells.len(), &scf);
    if !applies(method, mol, basis) {
        return out;
    }
    match method {
        Method::Ep2 => {
            let t = ep2_targets(mol, opts);
            out.push(StageEstimate::needed(
                format!(
                    "ep2: MO integrals for {t} target orbital{} (at most: degenerate orbitals \
                     share one)",
                    if t == 1 { "" } else { "s" }
                ),
                ep2_transform_bytes(mol, basis, opts, t),
            ));
        }
        Method::EomCcsd | Method::EomMp2 => {
            let stage = if method == Method::EomCcsd {
                Stage::EomCcsd
            } else {
                Stage::EomMbpt2
            };
            if let Ok(p) = eom_plan(stage, mol, basis, opts) {
                out.extend(p.stages);
            }
        }
        _ => {}
    }
    out
}

/// Refuse (`Error::TooLarge`) when even the SCF cannot fit the job's budget: no method of
/// the chain can run then.
pub fn check_scf(mol: &Molecule, basis: &BasisSet, opts: &ValenceOptions) -> Result<f64> {
    crate::scf::memory::check(basis.n_basis, &scf_options(mol, opts))
}

/// Why `method` cannot run for this molecule, basis and options (the budget is
/// `opts.memory_bytes`), checked before any work; None when it can. EP2 counts one target
/// per valence orbital (an upper bound), so the default never starts an EP2 it would have
/// to abandon after the SCF.
pub fn cannot_run_with(
    method: Method,
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
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
    let budget = opts.memory_bytes as f64;
    let (stage, limit) = match method {
        Method::EomCcsd => (Stage::EomCcsd, CCSD_MAX_BASIS),
        Method::EomMp2 => (Stage::EomMbpt2, MBPT2_MAX_BASIS),
        _ => {
            let t = ep2_targets(mol, opts);
            let need = ep2_transform_bytes(mol, basis, opts, t);
            if need > budget {
                return Some(SkipReason::DoesNotFit {
                    message: format!(
                        "EP2 may need {} for the MO integrals of its {t} target orbitals ({} \
                         basis functions), over the budget of {}",
                        format_gib(need),
                        basis.n_basis,
                        format_gib(budget)
                    ),
                });
            }
            return None;
        }
    };
    if basis.n_basis > limit {
        return Some(SkipReason::BasisTooLarge {
            n_basis: basis.n_basis,
            limit,
        });
    }
    match eom_plan(stage, mol, basis, opts) {
        Ok(_) => None,
        Err(e) => Some(SkipReason::DoesNotFit {
            message: e.to_string(),
        }),
    }
}

/// [`cannot_run_with`] with default options and this budget (bytes).
pub fn cannot_run(
    method: Method,
    mol: &Molecule,
    basis: &BasisSet,
    budget_bytes: f64,
) -> Option<SkipReason> {
    let opts = ValenceOptions {
        memory_bytes: budget_bytes as usize,
        ..ValenceOptions::default()
    };
    cannot_run_with(method, mol, basis, &opts)
}

/// The default choice made before any work, with the chosen method's stage estimates.
#[derive(Debug, Clone)]
pub struct Preflight {
    pub choice: DefaultChoice,
    pub estimates: Vec<StageEstimate>,
}

/// Choose the default method from the molecule, basis and options alone — every memory
/// estimate (SCF, EP2, EOM-IP) enters the choice before the SCF starts. Refuses with
/// `Error::TooLarge` when not even the SCF fits the budget.
pub fn plan_before_work(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
) -> Result<Preflight> {
    check_scf(mol, basis, opts)?;
    let choice = choose_with(mol, basis, opts);
    let estimates = stage_estimates(mol, basis, opts, choice.method);
    Ok(Preflight { choice, estimates })
}

/// The first method of the chain that can run for these options (checked before any work).
pub fn choose_with(mol: &Molecule, basis: &BasisSet, opts: &ValenceOptions) -> DefaultChoice {
    let mut skipped = Vec::new();
    for m in chain(mol) {
        match cannot_run_with(m, mol, basis, opts) {
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

/// The first method of the chain that can run within `budget_bytes` with default options.
pub fn choose(mol: &Molecule, basis: &BasisSet, budget_bytes: f64) -> DefaultChoice {
    let opts = ValenceOptions {
        memory_bytes: budget_bytes as usize,
        ..ValenceOptions::default()
    };
    choose_with(mol, basis, &opts)
}

/// Run the SCF once and predict the valence bands with the default method, falling back
/// along the chain when a method cannot run or fails (a computation error, or a memory
/// refusal found only when the job is planned in full). `opts.method` is ignored;
/// `opts.memory_bytes` is the budget of every stage, the SCF included, and the choice is
/// made before the SCF ([`plan_before_work`]). The choice is added to the result's notes, and a
/// method that failed after starting also gives a warning.
pub fn predict_default(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
) -> Result<(ValenceResult, DefaultChoice)> {
    // every estimate enters the choice before the SCF; a job that cannot fit stops here
    plan_before_work(mol, basis, opts)?;
    let wf = crate::scf::run(mol, basis, &scf_options(mol, opts))?;
    let mut skipped = Vec::new();
    let mut failures: Vec<Skipped> = Vec::new();
    for m in chain(mol) {
        if let Some(reason) = cannot_run_with(m, mol, basis, opts) {
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
