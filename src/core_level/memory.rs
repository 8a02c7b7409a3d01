//! The memory a core run needs, estimated from the molecule, the basis and the options before
//! any integral: the one home of the core estimates (printed by `--verbose`, and the refusal
//! before work when a needed stage cannot fit the budget).
//!
//! Each unit of the plan (`plan.rs`) has its own basis — the given one with core flexibility
//! on its hole atoms (`flexibility.rs`) — and its own fitting set (`fitting.rs`); the peak is
//! that of the largest unit. The stages:
//! - the SCF matrices of the cation (UHF, integrals computed on the fly): `scf::memory`;
//! - density-fitted J and K (the default): the three-index tensor B^Q_μν, n_aux · n(n+1)/2
//!   words (`scf::fock::df`), held from the neutral to the last cation of the unit;
//! - exact J and K: the in-core integral store, optional (used only when it fits);
//! - ΔMP2 (1s, 2s and 2p alike): the MO transformation of the cation's UMP2
//!   (`correlation::mp2::delta_mp2_preflight`, all electrons), made while the unit's SCF
//!   context — and with density fitting its tensor — is still held, so the two add up;
//! - ΔCCSD / ΔCCSD(T): the cation's coupled cluster at its smallest plan with the Cholesky
//!   decomposition of the integrals (`correlation::open_shell::preflight_bytes`); needed
//!   when asked for, optional when it was the default choice.

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::scf::fock::DfFock;
use crate::scf::{Reference, ScfOptions};
use crate::system::{format_gib, StageEstimate};

use super::fitting::{fitting_set, CoreFock};
use super::flexibility::flexible_basis;
use super::neutrals::memory_budget_bytes;
use super::options::{CoreOptions, ShiftReference};
use super::plan::plan;

/// The largest unit of a run: its basis (with the core flexibility) and its fitting-set size
/// (0 with exact integrals).
struct Largest {
    basis: Option<BasisSet>,
    n_aux: usize,
    tensor_bytes: f64,
}

impl Largest {
    fn add(
        &mut self,
        mol: &Molecule,
        plain: &BasisSet,
        flex: &[usize],
        opts: &CoreOptions,
    ) -> Result<()> {
        let work = flexible_basis(plain, mol, flex, &opts.core_basis)?;
        let n_aux = fitting_set(mol, &work, flex, opts.fock)?.map_or(0, |a| a.n_basis);
        let tensor = if n_aux > 0 {
            DfFock::estimate_bytes(work.n_basis, n_aux) as f64
        } else {
            0.0
        };
        self.tensor_bytes = self.tensor_bytes.max(tensor);
        self.n_aux = self.n_aux.max(n_aux);
        if self.basis.as_ref().is_none_or(|b| b.n_basis < work.n_basis) {
            self.basis = Some(work);
        }
        Ok(())
    }
}

/// The stage estimates of a core run on `mol` in `basis` with `opts`, before any integral.
/// Input errors of the request (targets, shift atom, open shell) come out here as they would
/// from `predict`.
pub fn stage_estimates(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &CoreOptions,
) -> Result<Vec<StageEstimate>> {
    let mut largest = Largest {
        basis: None,
        n_aux: 0,
        tensor_bytes: 0.0,
    };
    for unit in &plan(mol, opts)?.units {
        largest.add(mol, basis, &unit.flex, opts)?;
    }
    // a reference molecule: its first atom of each element is ionised; bounded here by a
    // hole on any of its heavy atoms
    if let ShiftReference::Molecule(r) = &opts.reference {
        for (a, atom) in r.molecule.atoms.iter().enumerate() {
            if atom.z > 2 {
                largest.add(&r.molecule, &r.basis, &[a], opts)?;
            }
        }
    }
    let work = largest.basis.unwrap_or_else(|| basis.clone());
    let n = work.n_basis;
    let cation = ScfOptions {
        reference: Reference::Uhf,
        ..ScfOptions::default()
    };
    let mut out = vec![StageEstimate::needed(
        format!("SCF matrices of the cation ({n} functions, integrals computed on the fly)"),
        crate::scf::memory::direct_floor_bytes(n, &cation),
    )];
    if opts.fock == CoreFock::Exact {
        out.push(StageEstimate::optional(
            "SCF in-core integral store (before screening, at most)",
            crate::scf::memory::in_core_bound_bytes(n, work.shells.len()),
        ));
    } else {
        out.push(StageEstimate::needed(
            format!(
                "density-fitted J and K: three-index tensor ({} fitting × {n} functions)",
                largest.n_aux
            ),
            largest.tensor_bytes,
        ));
    }
    if let Some(which) = opts.cc {
        // the cation's coupled cluster (spin-blocked, all electrons correlated) at its
        // smallest plan, with the Cholesky decomposition of the integrals; the neutral's
        // closed-shell one needs less. Optional when the method was the default choice
        // (a refusal at run time then keeps ΔSCF).
        let ne = mol.n_electrons();
        let occ = [ne.div_ceil(2), (ne / 2).saturating_sub(1)];
        let bytes = crate::correlation::open_shell::preflight_bytes(
            n,
            occ,
            which.triples(),
            opts.natural_virtuals.is_some(),
            super::delta_cc::CHOLESKY_THRESHOLD,
        );
        let stage = format!(
            "{CC_STAGE} ({}, {n} functions, with the Cholesky \
             decomposition of the integrals{})",
            if which.triples() {
                "ΔCCSD(T)"
            } else {
                "ΔCCSD"
            },
            if opts.natural_virtuals.is_some() {
                "; the natural-virtual cut's stage"
            } else {
                ""
            }
        );
        out.push(if opts.cc_optional {
            StageEstimate::optional(stage, bytes)
        } else {
            StageEstimate::needed(stage, bytes)
        });
    }
    if opts.mp2 {
        let transform = crate::correlation::mp2::delta_mp2_preflight(&work, mol.n_electrons())?;
        out.push(StageEstimate::needed(
            if largest.tensor_bytes > 0.0 {
                "ΔMP2: MO integrals of the cation's UMP2, with the fitting tensor held"
            } else {
                "ΔMP2: MO integrals of the cation's UMP2"
            },
            transform as f64 + largest.tensor_bytes,
        ));
    }
    Ok(out)
}

/// The memory budget (bytes) of the coupled cluster: `--memory` when given, else the run's
/// default budget, at most 80 % of the memory available now (what `correlation::open_shell`
/// allows by default), so a coupled cluster is not refused halfway through the run. The one
/// home of this rule: the default-method choice, the check before work and the coupled
/// cluster itself use it.
pub fn cc_budget_bytes(opts: &CoreOptions) -> f64 {
    match opts.memory_bytes {
        Some(b) => b as f64,
        None => (memory_budget_bytes(opts) as f64).min(0.8 * crate::system::available_bytes()),
    }
}

/// Refuse (`Error::TooLarge`, exit 2) before any integral when a needed stage of the run does
/// not fit its memory budget (`opts.memory_bytes`, else the machine's default; for the
/// coupled cluster `cc_budget_bytes`), naming the stage and what needs less.
pub fn check_before_work(mol: &Molecule, basis: &BasisSet, opts: &CoreOptions) -> Result<()> {
    let budget = memory_budget_bytes(opts) as f64;
    let cc_budget = cc_budget_bytes(opts);
    let estimates = stage_estimates(mol, basis, opts)?;
    let over = |e: &StageEstimate| {
        let b = if is_cc_stage(e) { cc_budget } else { budget };
        (!e.optional && e.bytes > b).then_some(b)
    };
    match estimates.iter().find_map(|e| over(e).map(|b| (e, b))) {
        Some((e, b)) => Err(Error::TooLarge(format!(
            "core levels of {}: {} needs about {}, more than the memory budget of {}; {}",
            mol.name,
            e.stage,
            format_gib(e.bytes),
            format_gib(b),
            if is_cc_stage(e) {
                cheaper_cc(opts)
            } else {
                cheaper(opts)
            }
        ))),
        None => Ok(()),
    }
}

/// The start of the coupled-cluster stage's name.
const CC_STAGE: &str = "coupled cluster of the cation";

/// Whether an estimate is the coupled-cluster stage (held to `cc_budget_bytes`).
pub fn is_cc_stage(e: &StageEstimate) -> bool {
    e.stage.starts_with(CC_STAGE)
}

/// What needs less memory than the coupled cluster as asked.
fn cheaper_cc(opts: &CoreOptions) -> &'static str {
    if opts.natural_virtuals.is_some() {
        "a larger --memory, --method dmp2 or dscf, or a smaller basis"
    } else {
        "a larger --memory, --fno 99.5 (frozen natural orbitals), --method dmp2 or dscf, or a \
         smaller basis"
    }
}

/// What needs less memory than the run as asked.
fn cheaper(opts: &CoreOptions) -> &'static str {
    match (opts.fock == CoreFock::Exact, opts.mp2) {
        (false, true) => {
            "exact J and K (no fitting tensor), ΔSCF alone (no ΔMP2) or a smaller basis need less"
        }
        (false, false) => "exact J and K (no fitting tensor) or a smaller basis need less",
        (true, true) => "ΔSCF alone (no ΔMP2) or a smaller basis needs less",
        (true, false) => "a smaller basis needs less",
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::fixtures::rough_ethanol as ethanol;

    /// The two numbers of "(N fitting × M functions)" in a stage name.
    fn sizes(stage: &str) -> (usize, usize) {
        let inner = stage.rsplit_once('(').unwrap().1;
        let mut nums = inner
            .split(|c: char| !c.is_ascii_digit())
            .filter(|t| !t.is_empty())
            .map(|t| t.parse::<usize>().unwrap());
        (nums.next().unwrap(), nums.next().unwrap())
    }

    #[test]
    fn the_fitting_tensor_and_the_dmp2_transform_are_counted() {
        let m = ethanol();
        let b = crate::basis::load("sto-3g", &m, None).unwrap();
        let df = stage_estimates(&m, &b, &CoreOptions::default()).unwrap();
        assert_eq!(df.len(), 2);
        assert!(!df[1].optional, "{df:?}");
        // Exact condition: B^Q_μν holds n_aux · n(n+1)/2 doubles (μ ≥ ν), for the basis with
        // the hole atom's s and p shells uncontracted (larger than the plain one).
        let (n_aux, n) = sizes(&df[1].stage);
        assert!(n > b.n_basis && n_aux > n, "{df:?}");
        assert_eq!(df[1].bytes, (8 * n_aux * n * (n + 1) / 2) as f64);
        let exact = CoreOptions {
            fock: CoreFock::Exact,
            ..CoreOptions::default()
        };
        assert!(stage_estimates(&m, &b, &exact).unwrap()[1].optional);
        // ΔMP2: its transformation, plus the tensor when J and K are fitted
        let mp2 = |fock| CoreOptions {
            mp2: true,
            fock,
            ..CoreOptions::default()
        };
        let fitted = stage_estimates(&m, &b, &mp2(CoreFock::DensityFitted)).unwrap();
        let plain = stage_estimates(&m, &b, &mp2(CoreFock::Exact)).unwrap();
        assert!(plain[2].bytes > 0.0 && !plain[2].optional);
        assert_eq!(fitted[2].bytes, plain[2].bytes + df[1].bytes);
        // A budget between the SCF floor and the tensor: refused before work with density
        // fitting, naming the tensor in GiB; accepted with exact integrals.
        let budget = (df[0].bytes + df[1].bytes) / 2.0;
        assert!(df[0].bytes < budget && df[1].bytes > budget);
        let tight = |fock| CoreOptions {
            memory_bytes: Some(budget as usize),
            fock,
            ..CoreOptions::default()
        };
        match check_before_work(&m, &b, &tight(CoreFock::DensityFitted)) {
            Err(Error::TooLarge(msg)) => {
                assert!(msg.contains("three-index") && msg.contains("GiB"), "{msg}");
                assert!(!msg.contains("MiB"), "{msg}");
            }
            other => panic!("expected a refusal, got {other:?}"),
        }
        assert!(check_before_work(&m, &b, &tight(CoreFock::Exact)).is_ok());
    }
}
