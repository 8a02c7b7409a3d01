//! The default method of a core-level run: ΔCCSD(T) when its coupled cluster fits the memory
//! budget and a cost cap, ΔSCF otherwise — decided from the molecule, the basis and the
//! options alone, before any SCF.
//!
//! - ΔCCSD(T) is the most accurate method here (docs/core-levels.md: CO2 − CH4 C 1s shift
//!   within 0.3 eV of experiment where ΔSCF is 1.6 eV off).
//! - The coupled cluster is spin-orbital and all-electron (`delta_cc.rs`): its peak memory
//!   is `correlation::open_shell::estimate_bytes` with o = every electron and v = the rest of
//!   the 2n spin orbitals, the largest hole basis of the run (or of the shift-reference
//!   molecule) deciding.
//! - Cost cap: the (T) step of each state costs o³v⁴ operations (counted in spin orbitals
//!   of the neutral). Measured 4 December 2026 (closed-shell neutral route, spin-blocked
//!   ion), `core X.xyz --basis cc-pVDZ --element C --method dccsd-t`, idle 2-core machine:
//!   CO2 (o³v⁴ = 5.8 × 10¹¹) 16 CPU-s for the one hole; ethanol (84 functions per hole,
//!   o³v⁴ = 7.2 × 10¹²) 243 CPU-s for its two holes, about 2 CPU-minutes per hole. Above
//!   `MAX_TRIPLES_OPS` (about 6 CPU-minutes per hole on that scale) the default falls back
//!   to ΔSCF: ΔMP2 is not a better recommended value in the bases measured
//!   (docs/core-levels.md), so it is not the fallback. (The cap was 2 × 10¹² with the
//!   earlier spin-orbital code, on which CO2 took 226 CPU-s.)
//! - 2s and 2p levels (Na–Ar) are ΔSCF: the coupled cluster is computed for 1s holes only.

use std::fmt;

use serde::Serialize;

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::correlation::open_shell::preflight_bytes;
use crate::error::Result;

use super::delta_cc::{DeltaCc, CHOLESKY_THRESHOLD};
use super::flexibility::flexible_basis;
use super::options::{CoreOptions, ShiftReference};
use super::plan::plan;
use super::shell::{shell_for, CoreShell};
use super::targets::resolve_targets;

/// Largest o³v⁴ (spin orbitals, one state) for which ΔCCSD(T) is the default (see the module
/// text for the measurement behind it).
pub const MAX_TRIPLES_OPS: f64 = 2.0e13;

/// What the default is and why (printed as a note, as `ionize` does for its default).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DefaultChoice {
    /// "dccsd-t" or "dscf".
    pub method: String,
    /// Largest number of basis functions of a hole's basis.
    pub n_basis: usize,
    /// Estimated peak memory of the coupled cluster (bytes) and the budget it was held to.
    pub cc_peak_bytes: f64,
    pub budget_bytes: f64,
    /// o³v⁴ of the largest state.
    pub triples_ops: f64,
    /// Why ΔSCF was chosen, when it was.
    pub fallback_reason: Option<String>,
}

impl DefaultChoice {
    /// The coupled-cluster level for `CoreOptions::cc`.
    pub fn cc(&self) -> Option<DeltaCc> {
        (self.method == "dccsd-t").then_some(DeltaCc::CcsdT)
    }
}

impl fmt::Display for DefaultChoice {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match &self.fallback_reason {
            None => write!(
                f,
                "default method: ΔCCSD(T) — the coupled cluster fits ({} basis functions, about \
                 {} of a {} budget); ΔSCF beside it",
                self.n_basis,
                crate::system::format_bytes(self.cc_peak_bytes),
                crate::system::format_bytes(self.budget_bytes)
            ),
            Some(r) => write!(f, "default method: ΔSCF — {r}"),
        }
    }
}

/// Peak memory (bytes) of the cation's all-electron CCSD(T) and o³v⁴ of the spin-orbital
/// CCSD(T) of a closed-shell molecule of `n_electrons` in `n_basis` functions (the neutral;
/// the ion has one spin orbital fewer on each side).
pub fn cc_size(n_basis: usize, n_electrons: usize) -> (f64, f64) {
    let o = n_electrons;
    let v = (2 * n_basis).saturating_sub(n_electrons);
    // the cation's smallest plan (ladder integrals rebuilt in batches) with the Cholesky
    // decomposition: the estimate the check before work uses
    let occ = [n_electrons.div_ceil(2), (n_electrons / 2).saturating_sub(1)];
    let peak = preflight_bytes(n_basis, occ, true, false, CHOLESKY_THRESHOLD);
    (peak, (o as f64).powi(3) * (v as f64).powi(4))
}

/// Largest hole basis of the run on `mol` (each unit's flexible basis).
fn largest_hole_basis(mol: &Molecule, plain: &BasisSet, opts: &CoreOptions) -> Result<usize> {
    let p = plan(mol, opts)?;
    let mut n = 0;
    for u in &p.units {
        n = n.max(flexible_basis(plain, mol, &u.flex, &opts.core_basis)?.n_basis);
    }
    Ok(n)
}

/// The default method for `mol` in `plain` under `opts` (whose `cc` and `mp2` are ignored).
pub fn choose(mol: &Molecule, plain: &BasisSet, opts: &CoreOptions) -> Result<DefaultChoice> {
    let budget = super::memory::cc_budget_bytes(opts);
    let mut choice = DefaultChoice {
        method: "dscf".into(),
        n_basis: 0,
        cc_peak_bytes: 0.0,
        budget_bytes: budget,
        triples_ops: 0.0,
        fallback_reason: None,
    };
    // Only 1s levels get coupled cluster.
    let targets = resolve_targets(mol, &opts.targets)?;
    let second_shell = targets.iter().any(|&t| {
        shell_for(mol.atoms[t].z, opts.shell, opts.photon_ev)
            .map(|s| s != CoreShell::S1)
            .unwrap_or(false)
    });
    if second_shell {
        choice.fallback_reason =
            Some("2s and 2p levels are computed by ΔSCF; coupled cluster is for 1s".into());
        return Ok(choice);
    }
    let mut sizes = vec![(largest_hole_basis(mol, plain, opts)?, mol.n_electrons())];
    if let ShiftReference::Molecule(r) = &opts.reference {
        let ropts = CoreOptions {
            reference: ShiftReference::None,
            targets: super::options::TargetSelection::AllHeavy,
            ..opts.clone()
        };
        sizes.push((
            largest_hole_basis(&r.molecule, &r.basis, &ropts)?,
            r.molecule.n_electrons(),
        ));
    }
    for (n, ne) in sizes {
        let (peak, ops) = cc_size(n, ne);
        if peak > choice.cc_peak_bytes {
            choice.cc_peak_bytes = peak;
            choice.n_basis = n;
        }
        choice.triples_ops = choice.triples_ops.max(ops);
    }
    choice.fallback_reason = if choice.cc_peak_bytes > budget {
        Some(format!(
            "ΔCCSD(T) would need about {} ({} basis functions) over the {} budget",
            crate::system::format_bytes(choice.cc_peak_bytes),
            choice.n_basis,
            crate::system::format_bytes(budget)
        ))
    } else if choice.triples_ops > MAX_TRIPLES_OPS {
        Some(format!(
            "ΔCCSD(T) in {} basis functions would take more than about 6 CPU-minutes per \
             hole (o³v⁴ = {:.1e} > {:.0e}); `--method dccsd-t` runs it anyway, `--fno 99.5` \
             cuts its cost several times",
            choice.n_basis, choice.triples_ops, MAX_TRIPLES_OPS
        ))
    } else {
        None
    };
    if choice.fallback_reason.is_none() {
        choice.method = "dccsd-t".into();
    }
    Ok(choice)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::fixtures::rough_ethanol as ethanol;

    fn water() -> Molecule {
        crate::chem::fixtures::crawford_water()
    }

    /// Benzene, C–C 1.39 Å, C–H 1.09 Å (common practice).
    fn benzene() -> Molecule {
        let mut xyz = String::from("12\nbenzene\n");
        for k in 0..6 {
            let a = std::f64::consts::PI / 3.0 * k as f64;
            let (s, c) = a.sin_cos();
            xyz += &format!(
                "C {} {} 0\nH {} {} 0\n",
                1.39 * c,
                1.39 * s,
                2.48 * c,
                2.48 * s
            );
        }
        crate::chem::xyz::parse_xyz(&xyz, crate::chem::xyz::LengthUnit::Angstrom).unwrap()
    }

    #[test]
    fn small_molecules_get_dccsd_t_and_large_ones_dscf() {
        // Water in cc-pVDZ (uncontracted s/p on O): 36 functions, a few hundred MiB at most.
        let w = water();
        let b = crate::basis::load("cc-pVDZ", &w, None).unwrap();
        let c = choose(&w, &b, &CoreOptions::default()).unwrap();
        assert_eq!(c.method, "dccsd-t", "{c}");
        assert_eq!(c.cc(), Some(DeltaCc::CcsdT));
        assert!(c.to_string().starts_with("default method: ΔCCSD(T)"), "{c}");
        // Ethanol in cc-pVDZ (o³v⁴ 7.2e12, about 2 CPU-minutes per hole) is under the cap.
        let e = ethanol();
        let b = crate::basis::load("cc-pVDZ", &e, None).unwrap();
        let c = choose(&e, &b, &CoreOptions::default()).unwrap();
        assert_eq!(c.method, "dccsd-t", "{c}");
        assert!(
            c.triples_ops > 5e12 && c.triples_ops < MAX_TRIPLES_OPS,
            "{c:?}"
        );
        // Benzene in cc-pVDZ (o³v⁴ about 1e14) is over it: ΔSCF, with the reason.
        let bz = benzene();
        let b = crate::basis::load("cc-pVDZ", &bz, None).unwrap();
        let huge = CoreOptions {
            memory_bytes: Some(1 << 40),
            ..CoreOptions::default()
        };
        let c = choose(&bz, &b, &huge).unwrap();
        assert_eq!(c.method, "dscf", "{c}");
        assert!(c.to_string().contains("CPU-minutes"), "{c}");
        // A tiny budget refuses the coupled cluster for water too.
        let tight = CoreOptions {
            memory_bytes: Some(1 << 20),
            ..CoreOptions::default()
        };
        let b = crate::basis::load("cc-pVDZ", &w, None).unwrap();
        let c = choose(&w, &b, &tight).unwrap();
        assert_eq!(c.method, "dscf");
        assert!(c.to_string().contains("budget"), "{c}");
    }
}
