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
//!   context — and with density fitting its tensor — is still held, so the two add up.

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

/// Refuse (`Error::TooLarge`, exit 2) before any integral when a needed stage of the run does
/// not fit its memory budget (`opts.memory_bytes`, else the machine's default), naming the
/// stage and what needs less.
pub fn check_before_work(mol: &Molecule, basis: &BasisSet, opts: &CoreOptions) -> Result<()> {
    let budget = memory_budget_bytes(opts) as f64;
    let estimates = stage_estimates(mol, basis, opts)?;
    match estimates.iter().find(|e| !e.optional && e.bytes > budget) {
        Some(e) => Err(Error::TooLarge(format!(
            "core levels of {}: {} needs about {}, more than the memory budget of {}; {}",
            mol.name,
            e.stage,
            format_gib(e.bytes),
            format_gib(budget),
            cheaper(opts)
        ))),
        None => Ok(()),
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
