//! Coupled cluster on open-shell and other non-closed-shell references: spin-orbital CCSD
//! and (T) on UHF, ROHF (semicanonical) and core-hole (MOM) determinants.
//!
//! Files: reference.rs (orbital selection, Fock, semicanonical rotation, ⟨pq||rs⟩ blocks
//! from the three-index factors of two_electron.rs), ccsd.rs (amplitude equations),
//! triples.rs ((T)), this file (memory plan, refusal, the one entry `run`).
//!
//! Spin orbitals make every block twice as long per index as the closed-shell code, so the
//! v⁴ block (16× the spatial one) bounds the size: a few dozen basis functions per
//! molecule in practice (memory plan below), enough for core holes of small molecules.

pub mod ccsd;
pub mod reference;
pub mod spin_blocks;
pub mod spin_system;
pub mod triples;
pub mod uccsd;
pub mod utriples;

#[cfg(test)]
mod tests;

use crate::basis::BasisSet;
use crate::chem::frozen_core::frozen_orbitals;
use crate::chem::Molecule;
use crate::correlation::two_electron::{self, Resolved, TwoElectron};
use crate::scf::Wavefunction;
use crate::{Error, Result};

pub use ccsd::CcsdOptions;
pub use reference::Selection;

/// How the frozen core is chosen.
#[derive(Debug, Clone, PartialEq)]
pub enum FrozenCore {
    /// chem/frozen_core.rs's count for the molecule, the same in both spins.
    Standard,
    /// Correlate every electron.
    None,
    /// These many lowest occupied orbitals of each spin (α, β).
    Count([usize; 2]),
}

#[derive(Debug, Clone)]
pub struct OpenShellOptions {
    pub frozen_core: FrozenCore,
    /// Spatial virtual MO columns (α, β) removed from the correlation space.
    pub excluded_virtuals: [Vec<usize>; 2],
    pub triples: bool,
    pub two_electron: TwoElectron,
    pub cholesky_threshold: f64,
    /// Memory budget (bytes); None = 80 % of the available memory.
    pub memory_budget: Option<f64>,
    pub ccsd: CcsdOptions,
}

impl Default for OpenShellOptions {
    fn default() -> Self {
        OpenShellOptions {
            frozen_core: FrozenCore::Standard,
            excluded_virtuals: [Vec::new(), Vec::new()],
            triples: true,
            two_electron: TwoElectron::Auto,
            cholesky_threshold: 1e-5,
            memory_budget: None,
            ccsd: CcsdOptions::default(),
        }
    }
}

#[derive(Debug, Clone)]
pub struct OpenShellResult {
    /// Energy of the reference determinant (the SCF energy).
    pub e_reference: f64,
    pub e_ccsd_corr: f64,
    /// (T) correction, when asked for.
    pub e_triples: Option<f64>,
    pub iterations: usize,
    /// Frozen occupied orbitals (α, β), active occupied and virtual spin orbitals.
    pub n_frozen: [usize; 2],
    pub nocc: usize,
    pub nvir: usize,
    pub semicanonical: bool,
    pub peak_estimate_bytes: f64,
    pub notes: Vec<String>,
}

impl OpenShellResult {
    pub fn e_ccsd(&self) -> f64 {
        self.e_reference + self.e_ccsd_corr
    }
    pub fn e_ccsd_t(&self) -> Option<f64> {
        self.e_triples.map(|t| self.e_ccsd() + t)
    }
}

/// Peak estimate in bytes for a job of this size: the reference stage, then the CCSD stage
/// (integral blocks + amplitudes/intermediates/DIIS), then (T) (blocks + amplitudes + one
/// task's arrays per thread). Formulas in reference.rs, ccsd.rs and triples.rs.
pub fn estimate_bytes(
    naux: usize,
    m: [usize; 2],
    o: usize,
    v: usize,
    diis: usize,
    triples: bool,
) -> f64 {
    let (of, vf) = (o as f64, v as f64);
    let blocks =
        of.powi(4) + of.powi(3) * vf + 2.0 * of * of * vf * vf + of * vf.powi(3) + vf.powi(4);
    let reference = reference::peak_words(naux, m, o, v);
    let cc = blocks + ccsd::peak_words(o, v, diis);
    let t = if triples {
        blocks
            + 2.0 * of * of * vf * vf
            + rayon::current_num_threads() as f64 * triples::task_words(v)
    } else {
        0.0
    };
    8.0 * reference.max(cc).max(t)
}

/// Frozen orbitals per spin for these options.
pub fn frozen_counts(mol: &Molecule, wfn: &Wavefunction, f: &FrozenCore) -> [usize; 2] {
    match f {
        FrozenCore::Standard => {
            let k = frozen_orbitals(mol, wfn.n_alpha().min(wfn.n_beta()));
            [k, k]
        }
        FrozenCore::None => [0, 0],
        FrozenCore::Count(c) => *c,
    }
}

/// The memory estimate for `wfn` under `opts`, or `Error::TooLarge` naming what is cheaper.
pub fn plan(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    opts: &OpenShellOptions,
) -> Result<(f64, Resolved)> {
    let how = two_electron::resolve(&opts.two_electron, mol, basis, opts.cholesky_threshold)?;
    let nf = frozen_counts(mol, wfn, &opts.frozen_core);
    let sel = Selection {
        n_frozen: nf,
        excluded_virtuals: opts.excluded_virtuals.clone(),
    };
    let lists = reference::orbital_lists(wfn, &sel);
    let m = [
        lists[0].0.len() + lists[0].1.len(),
        lists[1].0.len() + lists[1].1.len(),
    ];
    let o = lists[0].0.len() + lists[1].0.len() - nf[0] - nf[1];
    let v = lists[0].1.len() + lists[1].1.len();
    let naux = how.expected_rank(basis.n_basis);
    let peak = estimate_bytes(naux, m, o, v, opts.ccsd.diis_size, opts.triples);
    let budget = opts
        .memory_budget
        .unwrap_or_else(|| 0.8 * crate::system::available_bytes());
    if peak > budget {
        let hint = if opts.triples {
            "try CCSD without (T), ΔMP2 or ΔSCF, or a smaller basis"
        } else {
            "try ΔMP2 or ΔSCF, or a smaller basis"
        };
        return Err(Error::TooLarge(format!(
            "open-shell coupled cluster needs about {} of memory ({} basis functions, {o} \
             correlated occupied and {v} virtual spin orbitals, {naux} factors) but the \
             budget is {}; {hint}",
            crate::system::format_bytes(peak),
            basis.n_basis,
            crate::system::format_bytes(budget)
        )));
    }
    Ok((peak, how))
}

/// CCSD (and (T)) energy of `wfn` (UHF, ROHF, or RHF treated as UHF).
pub fn run(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    opts: &OpenShellOptions,
    log: &mut dyn FnMut(&str),
) -> Result<OpenShellResult> {
    if !wfn.converged {
        return Err(Error::computation(
            "the SCF reference is not converged; coupled cluster on it would be meaningless",
        ));
    }
    let (peak, how) = plan(mol, basis, wfn, opts)?;
    let nf = frozen_counts(mol, wfn, &opts.frozen_core);
    let sel = Selection {
        n_frozen: nf,
        excluded_virtuals: opts.excluded_virtuals.clone(),
    };
    let h = crate::scf::context::core_hamiltonian(basis, mol);
    let budget = opts
        .memory_budget
        .unwrap_or_else(|| 0.8 * crate::system::available_bytes());
    let npair = (basis.n_basis * (basis.n_basis + 1) / 2) as f64;
    let max_chol = ((budget - peak).max(0.0) / (8.0 * npair) / 2.0) as usize;
    let (sys, note) = reference::build(basis, &h, wfn, &sel, &how, max_chol.max(1), log)?;
    log(&format!(
        "open-shell CCSD: {} correlated occupied and {} virtual spin orbitals, frozen {}α/{}β; \
         memory estimate {}",
        sys.nocc,
        sys.nvir,
        nf[0],
        nf[1],
        crate::system::format_bytes(peak)
    ));
    let cc = ccsd::solve(&sys, &opts.ccsd, log)?;
    let e_t = opts
        .triples
        .then(|| triples::correction(&sys, &cc.t1, &cc.t2));
    let mut notes = vec![note];
    if sys.semicanonical {
        notes.push(
            "ROHF reference: semicanonical orbitals, f_ia terms kept in CCSD and (T) (Watts, \
             Gauss & Bartlett, J. Chem. Phys. 98 (1993) 8718)"
                .to_string(),
        );
    }
    Ok(OpenShellResult {
        e_reference: wfn.energy,
        e_ccsd_corr: cc.e_corr,
        e_triples: e_t,
        iterations: cc.iterations,
        n_frozen: nf,
        nocc: sys.nocc,
        nvir: sys.nvir,
        semicanonical: sys.semicanonical,
        peak_estimate_bytes: peak,
        notes,
    })
}
