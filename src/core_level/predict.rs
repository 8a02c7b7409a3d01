//! The driver: plan → neutrals → holes → assemble.
//!
//! The holes run one after another; each Fock build uses every thread of the pool, and one
//! SCF context (one-electron integrals, the in-core two-electron store when it fits
//! `memory_budget_bytes`) serves the neutral and every cation start of a unit's holes.
//! Holes on atoms equivalent by symmetry are computed once (`equivalence.rs`).

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::system::process_cpu_seconds as cpu_seconds;

use super::assemble::{
    apply_relativistic, apply_shifts, atom_reference, expand_equivalent, molecule_reference,
    note_basis_limits, note_equivalent, note_localised,
};
use super::holes::{ionise_atom, HoleContext};
use super::neutrals::{
    cpu_diff, memory_budget_bytes, neutral, shared_quartets, Carried, NeutralInputs,
};
use super::notes::{CoreNote, Notes};
use super::options::{CoreOptions, ReferenceMolecule, ShiftReference, TargetSelection};
use super::plan::{plan, Plan};
use super::result::{CoreLevel, CoreResult, CoreTimings, ShiftReferenceLevel, StageTiming};
use super::targets::atom_label;

/// Core-level binding energies of `mol` in `basis` (a set already on `mol`; each hole's
/// basis is derived from it with the core flexibility of `opts.core_basis`).
pub fn predict(mol: &Molecule, basis: &BasisSet, opts: &CoreOptions) -> Result<CoreResult> {
    predict_with_progress(mol, basis, opts, &|_, _| {})
}

/// Displacements below this (bohr) are rounding in the input: no note.
const SYMMETRISED_NOTE_BOHR: f64 = 1e-6;

/// As `predict`, calling `progress(done, total)` after each finished hole.
pub fn predict_with_progress(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &CoreOptions,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<CoreResult> {
    use crate::analysis::symmetry::{symmetrize, DEFAULT_TOLERANCE};
    // before any integral: refuse a run whose SCF, fitting tensor or ΔMP2 cannot fit
    super::memory::check_before_work(mol, basis, opts)?;
    // 2s/2p levels (and photon-energy notes) take their own path (`two_p.rs`).
    if let Some(r) = super::two_p::predict_shells(mol, basis, opts, progress)? {
        return Ok(r);
    }
    // Exactly symmetric positions first, so equivalent atoms are computed once.
    let (symmetric, displacement, group) = symmetrize(mol, DEFAULT_TOLERANCE);
    let moved = displacement > SYMMETRISED_NOTE_BOHR;
    let mol = &symmetric;
    let moved_basis;
    let basis = if moved {
        // the same functions on the moved atoms
        let mut b = basis.clone();
        for sh in &mut b.shells {
            sh.center = mol.atoms[sh.atom].position;
        }
        moved_basis = b;
        &moved_basis
    } else {
        basis
    };
    let plan = plan(mol, opts)?;
    let t_start = std::time::Instant::now();
    let cpu_start = cpu_seconds();
    let mut timings = CoreTimings::default();
    let computed = compute_holes(mol, basis, opts, &plan, progress, &mut timings)?;
    let mut levels = expand_equivalent(mol, &plan, &computed.levels);
    timings.total_s = t_start.elapsed().as_secs_f64();
    timings.total_cpu_s = cpu_diff(cpu_start);

    let mut notes = Notes::default();
    if moved {
        notes.push(CoreNote::Symmetrised {
            group: group.name.clone(),
            max_displacement_angstrom: displacement * crate::units::BOHR_TO_ANGSTROM,
        });
    }
    let references = shift_references(mol, opts, &plan, &mut levels, &mut notes)?;
    apply_shifts(&mut levels, &references);
    note_localised(&levels, &mut notes);
    let relativistic_source = opts
        .relativistic
        .then(|| apply_relativistic(&mut levels, &mut notes));
    note_equivalent(&levels, &plan, &mut notes);
    note_basis_limits(&basis.name, &levels, &mut notes);
    let one_basis = plan.units.len() == 1;
    Ok(CoreResult {
        molecule: mol.name.clone(),
        basis: basis.name.clone(),
        core_basis: opts.core_basis.describe(),
        n_basis: computed.n_basis_max,
        neutral_energy_hartree: if one_basis {
            computed.neutral_energies.first().copied()
        } else {
            None
        },
        neutral_mp2_hartree: if one_basis {
            computed.neutral_mp2s.first().copied().flatten()
        } else {
            None
        },
        core_levels: levels,
        references,
        relativistic_source,
        integrals: super::fitting::used(opts.fock, computed.density_fitted),
        notes,
        timings,
    })
}

/// The computed holes of a run and what their neutrals gave.
struct Computed {
    /// (atom, level) in the order computed.
    levels: Vec<(usize, CoreLevel)>,
    neutral_energies: Vec<f64>,
    neutral_mp2s: Vec<Option<f64>>,
    n_basis_max: usize,
    /// Some unit's SCFs used density-fitted J and K.
    density_fitted: bool,
}

/// Stages 2 and 3 for every unit of the plan. A hole without a trustworthy state is a
/// computation error listing every such hole.
fn compute_holes(
    mol: &Molecule,
    plain: &BasisSet,
    opts: &CoreOptions,
    plan: &Plan,
    progress: &(dyn Fn(usize, usize) + Sync),
    timings: &mut CoreTimings,
) -> Result<Computed> {
    let total = plan.computed.len();
    let mut out = Computed {
        levels: Vec::with_capacity(total),
        neutral_energies: Vec::new(),
        neutral_mp2s: Vec::new(),
        n_basis_max: 0,
        density_fitted: false,
    };
    let mut failures = Vec::new();
    let mut done = 0usize;
    let shared = shared_quartets(plain, plan, opts, timings);
    let budget = memory_budget_bytes(opts).saturating_sub(shared.as_ref().map_or(0, |c| c.bytes()));
    let inputs = NeutralInputs {
        mol,
        plain,
        opts,
        shared: shared.as_ref(),
        budget,
    };
    let mut previous: Option<Carried> = None;
    for unit in &plan.units {
        let mut n = neutral(&inputs, unit, previous.as_ref(), timings)?;
        out.n_basis_max = out.n_basis_max.max(n.basis.n_basis);
        out.density_fitted |= n.jk_fitting.is_some();
        out.neutral_energies.push(n.wf.energy);
        out.neutral_mp2s.push(n.mp2);
        let neutral_cc = match opts.cc {
            Some(which) => {
                match super::delta_cc::neutral(
                    mol,
                    &n.basis,
                    &n.wf,
                    which,
                    Some(super::memory::cc_budget_bytes(opts) as usize),
                    opts.natural_virtuals,
                    opts.progress,
                ) {
                    Ok(r) => Some(r),
                    // a default coupled cluster refused for memory: the holes keep ΔSCF
                    Err(Error::TooLarge(_)) if opts.cc_optional => None,
                    Err(e) => return Err(e),
                }
            }
            None => None,
        };
        let ctx = HoleContext {
            mol,
            basis: &n.basis,
            s: &n.s,
            s_half: &n.s_half,
            neutral: &n.wf,
            neutral_mp2: n.mp2,
            neutral_cc: neutral_cc.as_ref(),
            opts,
            memory_budget_bytes: budget,
            jk_fitting: n.jk_fitting.clone(),
        };
        for &a in &unit.holes {
            let t = std::time::Instant::now();
            let c0 = cpu_seconds();
            let r = ionise_atom(&ctx, &mut n.scf, a, plan.partners_of(a));
            timings.holes.push(StageTiming {
                label: format!("{} 1s", atom_label(mol, a)),
                n_basis: n.basis.n_basis,
                seconds: t.elapsed().as_secs_f64(),
                cpu_seconds: cpu_diff(c0),
                iterations: match &r {
                    Ok(l) => l.attempts.iter().filter_map(|x| x.iterations).sum(),
                    Err(_) => 0,
                },
            });
            done += 1;
            progress(done, total);
            match r {
                Ok(l) => out.levels.push((a, l)),
                Err(e) => failures.push(e.to_string()),
            }
        }
        previous = Some(n.carried());
    }
    if !failures.is_empty() {
        return Err(Error::computation(format!(
            "no trustworthy core-ionised state for {} of {} atoms:\n  {}",
            failures.len(),
            total,
            failures.join("\n  ")
        )));
    }
    Ok(out)
}

/// The reference levels of the shifts: an atom of this molecule (dropped from the levels
/// when it was not a target), or the first atom of each target element in a reference
/// molecule (computed here with the same options).
fn shift_references(
    mol: &Molecule,
    opts: &CoreOptions,
    plan: &Plan,
    levels: &mut Vec<CoreLevel>,
    notes: &mut Notes,
) -> Result<Vec<ShiftReferenceLevel>> {
    match &opts.reference {
        ShiftReference::None => Ok(Vec::new()),
        ShiftReference::Atom(r) => {
            let rl = levels
                .iter()
                .find(|l| l.atom == r + 1)
                .cloned()
                .expect("reference atom was ionised");
            if !plan.targets.contains(r) {
                levels.retain(|l| l.atom != r + 1);
            }
            Ok(vec![atom_reference(mol, &rl)])
        }
        ShiftReference::Molecule(refmol) => molecule_references(mol, refmol, opts, levels, notes),
    }
}

fn molecule_references(
    mol: &Molecule,
    refmol: &ReferenceMolecule,
    opts: &CoreOptions,
    levels: &[CoreLevel],
    notes: &mut Notes,
) -> Result<Vec<ShiftReferenceLevel>> {
    let rm = &refmol.molecule;
    // The first atom of each target element in the reference molecule.
    let mut want: Vec<usize> = Vec::new();
    for l in levels {
        let z = mol.atoms[l.atom - 1].z;
        match rm.atoms.iter().position(|a| a.z == z) {
            Some(i) if !want.contains(&i) => want.push(i),
            Some(_) => {}
            None => notes.push(CoreNote::ReferenceLacksElement {
                element: l.element.clone(),
                level: l.label.clone(),
            }),
        }
    }
    if want.is_empty() {
        return Ok(Vec::new());
    }
    want.sort_unstable();
    let ropts = CoreOptions {
        targets: TargetSelection::Atoms(want),
        reference: ShiftReference::None,
        ..opts.clone()
    };
    let rr = predict(rm, &refmol.basis, &ropts).map_err(|e| match e {
        Error::Computation(m) => Error::computation(format!("reference molecule: {m}")),
        other => other,
    })?;
    Ok(rr
        .core_levels
        .iter()
        .map(|rl| molecule_reference(rm, rl))
        .collect())
}
