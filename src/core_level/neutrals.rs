//! Stage 2, neutrals: for each unit of the plan, the basis with its core flexibility, one
//! SCF context (one-electron integrals, the in-core two-electron store when it fits the
//! budget) and the closed-shell neutral in that basis (plus its MP2 energy for ΔMP2). The
//! same context then serves every cation start of the unit's holes (`holes.rs`).
//!
//! Quartets that do not touch a hole atom are the same in every hole's basis: with several
//! units they are computed once (`shared_eri.rs`) when that store fits half the budget.

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::correlation::mp2::mp2_energy;
use crate::error::{Error, Result};
use crate::integrals::EriEngine;
// TODO(merge): the CPU-time probe moves to `system/`.
use crate::scf::fock::source::EngineSource;
use crate::scf::{Guess, Reference, ScfContext, ScfOptions, Wavefunction};
use crate::system::process_cpu_seconds as cpu_seconds;

use super::carry_over::project_occupied;
use super::flexibility::flexible_basis;
use super::options::{CoreBasis, CoreOptions};
use super::plan::{Plan, Unit};
use super::population::sqrt_overlap;
use super::result::{CoreTimings, StageTiming};
use super::shared_eri::{shell_map, MixedSource, PlainQuartets};

/// Memory the stored two-electron integrals of a run may take (bytes): `--memory` when
/// given, else the machine-dependent rule of `bandcast scf` (`system::default_memory_budget`);
/// above it the Fock matrices are built integral-direct.
pub fn memory_budget_bytes(opts: &CoreOptions) -> usize {
    opts.memory_bytes
        .unwrap_or_else(crate::system::default_memory_budget)
}

/// CPU seconds since `start`, when the probe works.
pub fn cpu_diff(start: Option<f64>) -> Option<f64> {
    Some(cpu_seconds()? - start?)
}

/// The quartets shared by the units' bases, when there are several units with flexible
/// core functions and the store fits half the budget (its time and size go to `timings`).
pub fn shared_quartets(
    plain: &BasisSet,
    plan: &Plan,
    opts: &CoreOptions,
    timings: &mut CoreTimings,
) -> Option<PlainQuartets> {
    if plan.units.len() <= 1
        || opts.core_basis == CoreBasis::Plain
        || opts.fock != super::fitting::CoreFock::Exact
    {
        return None;
    }
    let threshold = ScfOptions::default().screening;
    let t = std::time::Instant::now();
    let c0 = cpu_seconds();
    let cache = (PlainQuartets::estimate_bytes(plain, threshold) <= memory_budget_bytes(opts) / 2)
        .then(|| PlainQuartets::new(plain, threshold));
    timings.shared_s = t.elapsed().as_secs_f64();
    timings.shared_cpu_s = cpu_diff(c0);
    timings.shared_bytes = cache.as_ref().map_or(0, |c| c.bytes());
    cache
}

/// The previous unit's neutral, carried into the next basis as a start (`carry_over.rs`).
pub struct Carried {
    pub basis: BasisSet,
    pub c: Mat<f64>,
    pub occupied: Vec<usize>,
}

/// One unit's basis, SCF context and neutral.
pub struct Neutral {
    pub basis: BasisSet,
    pub scf: ScfContext,
    pub s: Mat<f64>,
    pub s_half: Mat<f64>,
    pub wf: Wavefunction,
    /// MP2 correlation energy of the neutral, when ΔMP2 is asked.
    pub mp2: Option<f64>,
    /// The fitting set of density-fitted J and K (its tensor is held by `scf`); None for
    /// exact integrals.
    pub jk_fitting: Option<String>,
}

impl Neutral {
    /// What the next unit starts from.
    pub fn carried(&self) -> Carried {
        let occ = &self.wf.occ_alpha;
        Carried {
            basis: self.basis.clone(),
            c: self.wf.c_alpha.clone(),
            occupied: (0..occ.len()).filter(|&k| occ[k] > 0.5).collect(),
        }
    }
}

/// Everything one unit's neutral needs from the run.
pub struct NeutralInputs<'a> {
    pub mol: &'a Molecule,
    pub plain: &'a BasisSet,
    pub opts: &'a CoreOptions,
    pub shared: Option<&'a PlainQuartets>,
    /// Budget for the in-core store of this unit (the shared store already subtracted).
    pub budget: usize,
}

/// The neutral of `unit`, started from the previous unit's orbitals when given (falling
/// back to atomic densities when that start fails). Its timing goes to `timings`.
pub fn neutral(
    inp: &NeutralInputs,
    unit: &Unit,
    previous: Option<&Carried>,
    timings: &mut CoreTimings,
) -> Result<Neutral> {
    let mol = inp.mol;
    let work = flexible_basis(inp.plain, mol, &unit.flex, &inp.opts.core_basis)?;
    let t = std::time::Instant::now();
    let c0 = cpu_seconds();
    let (mut scf, jk_fitting) = context(inp, &work, &unit.flex)?;
    let s = scf.s.clone();
    let s_half = sqrt_overlap(&s);
    let mut neutral_opts = ScfOptions {
        reference: Reference::Rhf,
        memory_budget_bytes: inp.budget,
        ..ScfOptions::default()
    };
    super::fitting::apply(&mut neutral_opts, jk_fitting.as_deref());
    if !inp.opts.mp2 && inp.opts.cc.is_none() {
        // Only the energy is used: the cation's thresholds (an energy error second order
        // in the orbital gradient; `cation::E_TOL`).
        neutral_opts.e_tol = super::cation::E_TOL;
        neutral_opts.commutator_tol = super::cation::COMMUTATOR_TOL;
    }
    let carried = previous.and_then(|p| project_occupied(&p.basis, &p.c, &p.occupied, &work, &s));
    let wf = match carried {
        Some(c) => scf
            .run(
                mol,
                &ScfOptions {
                    guess: Guess::Orbitals {
                        c_alpha: c.clone(),
                        c_beta: c,
                    },
                    ..neutral_opts.clone()
                },
                &mut |_| {},
            )
            .or_else(|_| scf.run(mol, &neutral_opts, &mut |_| {})),
        None => scf.run(mol, &neutral_opts, &mut |_| {}),
    }
    .map_err(|e| Error::computation(format!("neutral Hartree–Fock: {e}")))?;
    let mp2 = if inp.opts.mp2 {
        Some(mp2_energy(&work, &wf)?)
    } else {
        None
    };
    timings.fock_builder = scf.last_builder.clone();
    timings.neutrals.push(StageTiming {
        label: unit.label(mol),
        n_basis: work.n_basis,
        seconds: t.elapsed().as_secs_f64(),
        cpu_seconds: cpu_diff(c0),
        iterations: wf.iterations,
    });
    Ok(Neutral {
        basis: work,
        scf,
        s,
        s_half,
        wf,
        mp2,
        jk_fitting,
    })
}

/// The SCF context of a unit's basis with the name of its fitting set when J and K are
/// density-fitted (the tensor built here, once for the neutral and every cation start);
/// with exact integrals its in-core store is filled from the shared quartets when there are
/// some and the store fits the budget.
fn context(
    inp: &NeutralInputs,
    work: &BasisSet,
    flex: &[usize],
) -> Result<(ScfContext, Option<String>)> {
    let threshold = ScfOptions::default().screening;
    let lindep = ScfOptions::default().lindep_threshold;
    let mut scf = ScfContext::new(inp.mol, work, lindep)?;
    if let Some(aux) = super::fitting::fitting_set(inp.mol, work, flex, inp.opts.fock)? {
        match scf.prepare_density_fitting(&aux, inp.budget) {
            Ok(()) => return Ok((scf, Some(aux.name))),
            // the three-index tensor does not fit: exact integrals (integral-direct)
            Err(Error::TooLarge(_)) => {}
            Err(e) => return Err(e),
        }
    }
    if let (Some(cache), Some(map)) = (inp.shared, shell_map(inp.plain, work, flex)) {
        if scf.in_core_bytes(threshold) <= inp.budget {
            let engine = EriEngine::new(work);
            let src = MixedSource {
                engine: EngineSource::new(&engine, work),
                plain: cache,
                map: &map,
            };
            scf.build_in_core_from(&src, threshold, inp.budget)?;
        }
    }
    Ok((scf, None))
}
