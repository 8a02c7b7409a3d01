//! The driver: for each hole, a neutral and a core-ionised cation SCF in a basis with core
//! flexibility on the hole atom; shifts against a reference; optional ΔMP2.
//!
//! Each computed hole gets its own basis (the basis as named, with the requested core
//! flexibility on the hole atom alone) and its own neutral SCF in that basis, so ΔSCF
//! compares like with like and every hole of a run is treated alike. This is cheaper than
//! one basis with flexibility on every hole atom as soon as there are two or more distinct
//! holes: the Fock builds of the cation dominate the cost and grow with about the third
//! power of the number of functions (measured in README "bandcast core"). With
//! `CoreBasis::Plain` every hole uses the same basis and one neutral serves them all.
//! Holes on atoms equivalent by symmetry are computed once (`equivalence.rs`).
//!
//! The holes run one after another; each Fock build uses every thread of the pool, and one
//! SCF context (one-electron integrals, the in-core two-electron store when it fits
//! `memory_budget_bytes`) serves the neutral and every cation start of a hole.

use bandcast_linalg::Mat;

use crate::basis::{self, BasisSet};
use crate::chem::elements::symbol;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::integrals::EriEngine;
use crate::system::process_cpu_seconds as cpu_seconds;
use crate::scf::fock::source::EngineSource;
use crate::scf::{Guess, Reference, ScfContext, ScfOptions, Wavefunction};
use crate::units::ev;

use super::carry_over::project_occupied;
use super::cation::{
    final_hole_overlap, run_from_rohf, run_start, CationState, HoleSetup, IMOM_SKIP_OVERLAP,
};
use super::delocalised::{delocalised_hole, describe_shares, DelocalisedSetup};
use super::equivalence::{equivalent_holes, TOLERANCE};
use super::flexibility::{replace_atoms, uncontract};
use super::hole_check::{spin_contaminated, HoleStatus};
use super::lifetime::lifetime_fwhm_ev;
use super::localize::localise_core_hole;
use super::mp2::mp2_energy;
use super::options::{CoreBasis, CoreOptions, ShiftReference, TargetSelection};
use super::population::sqrt_overlap;
use super::relativistic;
use super::result::{
    CoreLevel, CoreResult, CoreTimings, HoleAttempt, ShiftReferenceLevel, StageTiming,
};
use super::shared_eri::{shell_map, MixedSource, PlainQuartets};
use super::targets::{atom_label, check_core_atom, resolve_targets};

/// Memory the stored two-electron integrals of a run may take (bytes): the machine-dependent
/// rule of `bandcast scf` (`scf::options::default_memory_budget`); above it the Fock
/// matrices are built integral-direct.
pub fn memory_budget_bytes() -> usize {
    crate::system::default_memory_budget()
}

/// Core-level binding energies of `mol` in basis `basis_name`.
pub fn predict(mol: &Molecule, basis_name: &str, opts: &CoreOptions) -> Result<CoreResult> {
    predict_with_progress(mol, basis_name, opts, &|_, _| {})
}

/// As `predict`, calling `progress(done, total)` after each finished hole.
pub fn predict_with_progress(
    mol: &Molecule,
    basis_name: &str,
    opts: &CoreOptions,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<CoreResult> {
    if mol.multiplicity != 1 || !mol.n_electrons().is_multiple_of(2) {
        return Err(Error::input(format!(
            "core levels are computed for closed-shell molecules (multiplicity 1); this one has \
             charge {} and multiplicity {}",
            mol.charge, mol.multiplicity
        )));
    }
    let targets = resolve_targets(mol, &opts.targets)?;
    let mut hole_atoms = targets.clone();
    if let ShiftReference::Atom(r) = opts.reference {
        check_core_atom(mol, r)?;
        let zr = mol.atoms[r].z;
        if let Some(&bad) = targets.iter().find(|&&t| mol.atoms[t].z != zr) {
            return Err(Error::input(format!(
                "--reference-atom {} is {}, but target atom {} is {}: a shift compares 1s levels \
                 of one element (choose the targets with --element {})",
                r + 1,
                symbol(zr),
                bad + 1,
                symbol(mol.atoms[bad].z),
                symbol(zr)
            )));
        }
        if !hole_atoms.contains(&r) {
            hole_atoms.push(r);
            hole_atoms.sort_unstable();
        }
    }
    let plain = basis::load(basis_name, mol, opts.harmonics)?;
    let equivalence = equivalent_holes(mol, &hole_atoms);
    let equivalence = if opts.use_symmetry {
        equivalence
    } else {
        equivalence.without_copies(&hole_atoms)
    };
    let computed = equivalence.computed(&hole_atoms);

    // Units of work, each a basis with its neutral SCF: (atoms with the flexible functions,
    // holes computed in that basis). A canonical or delocalised hole needs a symmetric
    // basis: flexibility on the equivalent atoms too.
    let units: Vec<(Vec<usize>, Vec<usize>)> = if opts.core_basis == CoreBasis::Plain {
        vec![(Vec::new(), computed.clone())]
    } else {
        computed
            .iter()
            .map(|&a| {
                let mut flex = vec![a];
                if !opts.localise || opts.delocalised {
                    flex.extend_from_slice(equivalence.partners_of(&hole_atoms, a));
                    flex.sort_unstable();
                }
                (flex, vec![a])
            })
            .collect()
    };
    let total = computed.len();
    let t_start = std::time::Instant::now();
    let cpu_start = cpu_seconds();
    let mut timings = CoreTimings::default();
    let mut done = 0usize;
    let mut computed_levels: Vec<(usize, CoreLevel)> = Vec::with_capacity(total);
    let mut failures = Vec::new();
    let mut neutral_energies = Vec::new();
    let mut neutral_mp2s = Vec::new();
    let mut n_basis_max = 0usize;
    // Quartets that do not touch a hole atom are the same in every hole's basis: computed
    // once (`shared_eri.rs`) when that store fits half the budget.
    let threshold = ScfOptions::default().screening;
    let shared = if units.len() > 1 && opts.core_basis != CoreBasis::Plain {
        let t = std::time::Instant::now();
        let c0 = cpu_seconds();
        let cache = (PlainQuartets::estimate_bytes(&plain, threshold) <= memory_budget_bytes() / 2)
            .then(|| PlainQuartets::new(&plain, threshold));
        timings.shared_s = t.elapsed().as_secs_f64();
        timings.shared_cpu_s = cpu_diff(c0);
        timings.shared_bytes = cache.as_ref().map_or(0, |c| c.bytes());
        cache
    } else {
        None
    };
    let budget = memory_budget_bytes() - shared.as_ref().map_or(0, |c| c.bytes());
    let mut previous: Option<(BasisSet, Mat<f64>, Vec<usize>)> = None;
    for (flex, unit) in &units {
        let work = flexible_basis(&plain, mol, flex, &opts.core_basis)?;
        n_basis_max = n_basis_max.max(work.n_basis);
        let t = std::time::Instant::now();
        let c0 = cpu_seconds();
        let lindep = ScfOptions::default().lindep_threshold;
        let mut scf = ScfContext::new(mol, &work, lindep)?;
        if let (Some(cache), Some(map)) = (&shared, shell_map(&plain, &work, flex)) {
            if scf.in_core_bytes(threshold) <= budget {
                let engine = EriEngine::new(&work);
                let src = MixedSource {
                    engine: EngineSource::new(&engine, &work),
                    plain: cache,
                    map: &map,
                };
                scf.build_in_core_from(&src, threshold, budget)?;
            }
        }
        let s = scf.s.clone();
        let s_half = sqrt_overlap(&s);
        let neutral_opts = ScfOptions {
            reference: Reference::Rhf,
            memory_budget_bytes: budget,
            ..ScfOptions::default()
        };
        // Start from the previous hole's neutral (`carry_over.rs`), else from atomic
        // densities; a carried start that fails falls back to the atomic one.
        let carried =
            previous
                .as_ref()
                .and_then(|(b, c, occ): &(BasisSet, Mat<f64>, Vec<usize>)| {
                    project_occupied(b, c, occ, &work, &s)
                });
        let neutral = match carried {
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
        let neutral_mp2 = if opts.mp2 {
            Some(mp2_energy(&work, &neutral)?)
        } else {
            None
        };
        neutral_energies.push(neutral.energy);
        neutral_mp2s.push(neutral_mp2);
        timings.fock_builder = scf.last_builder.clone();
        timings.neutrals.push(StageTiming {
            label: unit_label(mol, unit),
            n_basis: work.n_basis,
            seconds: t.elapsed().as_secs_f64(),
            cpu_seconds: cpu_diff(c0),
            iterations: neutral.iterations,
        });
        let ctx = Context {
            mol,
            basis: &work,
            s: &s,
            s_half: &s_half,
            neutral: &neutral,
            neutral_mp2,
            opts,
            memory_budget_bytes: budget,
        };
        let occupied: Vec<usize> = (0..neutral.occ_alpha.len())
            .filter(|&k| neutral.occ_alpha[k] > 0.5)
            .collect();
        for &a in unit {
            let t = std::time::Instant::now();
            let c0 = cpu_seconds();
            let r = ionise_atom(&ctx, &mut scf, a, equivalence.partners_of(&hole_atoms, a));
            timings.holes.push(StageTiming {
                label: format!("{} 1s", atom_label(mol, a)),
                n_basis: work.n_basis,
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
                Ok(l) => computed_levels.push((a, l)),
                Err(e) => failures.push(e.to_string()),
            }
        }
        previous = Some((work.clone(), neutral.c_alpha.clone(), occupied));
    }
    if !failures.is_empty() {
        return Err(Error::computation(format!(
            "no trustworthy core-ionised state for {} of {} atoms:\n  {}",
            failures.len(),
            total,
            failures.join("\n  ")
        )));
    }
    // Every hole atom in input order; symmetry-equivalent ones copy their representative.
    let mut levels = Vec::with_capacity(hole_atoms.len());
    for (&a, &rep) in hole_atoms.iter().zip(&equivalence.representative) {
        let (_, src) = computed_levels
            .iter()
            .find(|(c, _)| *c == rep)
            .expect("every representative was computed");
        if a == rep {
            levels.push(src.clone());
        } else {
            levels.push(symmetry_copy(mol, src, a, &equivalence.group));
        }
    }
    timings.total_s = t_start.elapsed().as_secs_f64();
    timings.total_cpu_s = cpu_diff(cpu_start);

    let mut notes = Vec::new();
    let mut references = Vec::new();
    match &opts.reference {
        ShiftReference::None => {}
        ShiftReference::Atom(r) => {
            let rl = levels
                .iter()
                .find(|l| l.atom == r + 1)
                .cloned()
                .expect("reference atom was ionised");
            references.push(ShiftReferenceLevel {
                kind: "atom".into(),
                molecule: mol.name.clone(),
                atom: rl.atom,
                element: rl.element.clone(),
                dscf_ev: rl.dscf_ev,
                dmp2_ev: rl.dmp2_ev,
            });
            if !targets.contains(r) {
                levels.retain(|l| l.atom != r + 1);
            }
        }
        ShiftReference::Molecule(refmol) => {
            // The first atom of each target element in the reference molecule.
            let mut want: Vec<usize> = Vec::new();
            for l in &levels {
                let z = mol.atoms[l.atom - 1].z;
                match refmol.atoms.iter().position(|a| a.z == z) {
                    Some(i) if !want.contains(&i) => want.push(i),
                    Some(_) => {}
                    None => notes.push(format!(
                        "the reference molecule has no {}: no shift for {}",
                        l.element, l.label
                    )),
                }
            }
            if !want.is_empty() {
                want.sort_unstable();
                let ropts = CoreOptions {
                    targets: TargetSelection::Atoms(want),
                    reference: ShiftReference::None,
                    ..opts.clone()
                };
                let rr =
                    predict_with_progress(refmol, basis_name, &ropts, &|_, _| {}).map_err(|e| {
                        match e {
                            Error::Computation(m) => {
                                Error::computation(format!("reference molecule: {m}"))
                            }
                            other => other,
                        }
                    })?;
                for rl in rr.core_levels {
                    references.push(ShiftReferenceLevel {
                        kind: "molecule".into(),
                        molecule: refmol.name.clone(),
                        atom: rl.atom,
                        element: rl.element.clone(),
                        dscf_ev: rl.dscf_ev,
                        dmp2_ev: rl.dmp2_ev,
                    });
                }
            }
        }
    }
    for l in &mut levels {
        if let Some(r) = references.iter().find(|r| r.element == l.element) {
            l.shift_ev = Some(l.dscf_ev - r.dscf_ev);
            l.shift_dmp2_ev = match (l.dmp2_ev, r.dmp2_ev) {
                (Some(a), Some(b)) => Some(a - b),
                _ => None,
            };
        }
    }
    if levels.iter().any(|l| l.localised) {
        notes.push(
            "holes on atoms with symmetry-equivalent partners were localised on the chosen atom \
             before the SCF (core flexibility on that atom alone, core orbitals rotated onto it); \
             a hole shared by equivalent atoms lies several eV higher"
                .into(),
        );
    }
    let relativistic_source = if opts.relativistic {
        for l in &mut levels {
            let c = relativistic::correction_ev(l.dscf_ev);
            l.relativistic_correction_ev = Some(c);
            l.dscf_relativistic_ev = Some(l.dscf_ev + c);
        }
        notes.push(format!(
            "relativistic correction added from {} (shifts are left non-relativistic: the \
             correction of one element changes by < 0.01 eV over its chemical shifts)",
            relativistic::SOURCE
        ));
        Some(relativistic::SOURCE.to_string())
    } else {
        None
    };
    if levels.iter().any(|l| l.same_as_atom.is_some()) {
        notes.push(format!(
            "atoms equivalent by symmetry ({}, within {} bohr) were computed once ({} of {} \
             levels needed a hole search)",
            equivalence.group,
            TOLERANCE,
            total,
            levels.len()
        ));
    }
    Ok(CoreResult {
        molecule: mol.name.clone(),
        basis: plain.name.clone(),
        core_basis: opts.core_basis.describe(),
        n_basis: n_basis_max,
        neutral_energy_hartree: if units.len() == 1 {
            neutral_energies.first().copied()
        } else {
            None
        },
        neutral_mp2_hartree: if units.len() == 1 {
            neutral_mp2s.first().copied().flatten()
        } else {
            None
        },
        core_levels: levels,
        references,
        relativistic_source,
        notes,
        timings,
    })
}

/// The level of `atom`, equivalent by symmetry to the computed level `src`.
fn symmetry_copy(mol: &Molecule, src: &CoreLevel, atom: usize, group: &str) -> CoreLevel {
    let label = atom_label(mol, atom);
    let src_label = atom_label(mol, src.atom - 1);
    let mut l = src.clone();
    l.atom = atom + 1;
    l.label = format!("{label} 1s");
    l.same_as_atom = Some(src.atom);
    // Notes that name the computed atom belong to it; the rest (spin contamination) apply.
    l.notes.retain(|n| !n.contains(&src_label));
    l.notes.insert(
        0,
        format!("equivalent to {src_label} by symmetry ({group}): its numbers, not computed again"),
    );
    l
}

/// "C1" or "C1, C2, O3": the holes computed in one basis.
fn unit_label(mol: &Molecule, unit: &[usize]) -> String {
    let v: Vec<String> = unit.iter().map(|&a| atom_label(mol, a)).collect();
    v.join(", ")
}

fn cpu_diff(start: Option<f64>) -> Option<f64> {
    Some(cpu_seconds()? - start?)
}

/// The basis with core flexibility on the hole atoms.
pub fn flexible_basis(
    plain: &BasisSet,
    mol: &Molecule,
    hole_atoms: &[usize],
    core: &CoreBasis,
) -> Result<BasisSet> {
    Ok(match core {
        CoreBasis::Plain => plain.clone(),
        CoreBasis::Uncontract => uncontract(plain, hole_atoms, 0),
        CoreBasis::UncontractSp => uncontract(plain, hole_atoms, 1),
        CoreBasis::Named(name) => {
            // Load the donor set for the hole atoms only (it may lack other elements, e.g. a
            // core-valence set without hydrogen), then put the shells back on their atoms.
            let sub = Molecule {
                atoms: hole_atoms.iter().map(|&a| mol.atoms[a].clone()).collect(),
                charge: 0,
                multiplicity: 1,
                name: mol.name.clone(),
            };
            let mut donor = basis::load(name, &sub, None)?;
            for sh in &mut donor.shells {
                sh.atom = hole_atoms[sh.atom];
            }
            replace_atoms(plain, &donor, hole_atoms)
        }
    })
}

struct Context<'a> {
    mol: &'a Molecule,
    basis: &'a BasisSet,
    s: &'a Mat<f64>,
    s_half: &'a Mat<f64>,
    neutral: &'a Wavefunction,
    neutral_mp2: Option<f64>,
    opts: &'a CoreOptions,
    memory_budget_bytes: usize,
}

/// The 1s hole of one atom: localise, try the starts, keep the best that holds.
fn ionise_atom(
    ctx: &Context,
    scf: &mut ScfContext,
    atom: usize,
    partners: &[usize],
) -> Result<CoreLevel> {
    let nw = ctx.neutral;
    let occ: Vec<usize> = (0..nw.occ_alpha.len())
        .filter(|&k| nw.occ_alpha[k] > 0.5)
        .collect();
    let loc = localise_core_hole(
        ctx.basis,
        ctx.s_half,
        &nw.c_alpha,
        &nw.eps_alpha,
        &occ,
        atom,
    );
    let (c_ref, hole) = if ctx.opts.localise {
        (loc.c.clone(), loc.hole)
    } else {
        (nw.c_alpha.clone(), loc.canonical)
    };
    // The hole sits on one of several equivalent atoms: by rotation of the core block when
    // the basis is symmetric, or already in the canonical orbitals when only this atom
    // carries the flexible functions.
    let localised = ctx.opts.localise && (loc.rotated() || !partners.is_empty());
    let koopmans = -nw.eps_alpha[loc.canonical];
    let mut occ_beta = nw.occ_alpha.clone();
    occ_beta[hole] = 0.0;
    let cation = ctx
        .mol
        .clone()
        .with_charge_multiplicity(ctx.mol.charge + 1, 2)?;
    let setup = HoleSetup {
        cation: &cation,
        basis: ctx.basis,
        s: ctx.s,
        s_half: ctx.s_half,
        c_ref: &c_ref,
        occ_alpha: nw.occ_alpha.clone(),
        occ_beta,
        hole,
        atom,
        e_neutral: nw.energy,
        koopmans,
        // A canonical hole on equivalent atoms is spread on purpose: do not call it escaped.
        localised: ctx.opts.localise || !loc.rotated(),
        memory_budget_bytes: ctx.memory_budget_bytes,
        symmetry: None,
    };
    let states = search(&setup, scf, ctx.opts.thorough);
    let delocalised = if ctx.opts.delocalised && !partners.is_empty() {
        let occ_flags = nw.occ_alpha.clone();
        delocalised_hole(
            &DelocalisedSetup {
                cation: &cation,
                basis: ctx.basis,
                s: ctx.s,
                s_half: ctx.s_half,
                c: &nw.c_alpha,
                eps: &nw.eps_alpha,
                occ: &occ_flags,
                block: &loc.block,
                atom,
                partners,
                e_neutral: nw.energy,
                memory_budget_bytes: ctx.memory_budget_bytes,
            },
            scf,
        )
    } else {
        None
    };
    let label = atom_label(ctx.mol, atom);
    let best = states
        .iter()
        .filter(|s| s.attempt.status == HoleStatus::Held)
        .min_by(|a, b| {
            a.attempt
                .dscf_ev
                .unwrap_or(f64::MAX)
                .total_cmp(&b.attempt.dscf_ev.unwrap_or(f64::MAX))
        });
    let attempts: Vec<_> = states.iter().map(|s| s.attempt.clone()).collect();
    let Some(best) = best else {
        let what: Vec<String> = attempts
            .iter()
            .map(|a| {
                format!(
                    "{}: {}{}",
                    a.start,
                    status_word(a.status),
                    match (a.dscf_ev, a.hole_population, &a.message) {
                        (_, _, Some(m)) => format!(" ({m})"),
                        (Some(e), Some(p), None) => format!(
                            " (ΔSCF {e:.2} eV, Koopmans {:.2} eV, hole population on the atom {p:.2})",
                            ev(koopmans)
                        ),
                        _ => String::new(),
                    }
                )
            })
            .collect();
        return Err(Error::computation(format!(
            "{label} 1s: {}",
            what.join("; ")
        )));
    };
    let wf = best.wf.as_ref().expect("held state has a wavefunction");
    let mut notes = Vec::new();
    if localised {
        let mut eq: Vec<String> = partners.iter().map(|&p| atom_label(ctx.mol, p)).collect();
        eq.insert(0, label.clone());
        notes.push(format!(
            "hole localised on {label} (equivalent atoms: {}): the canonical 1s had {:.0} % of \
             its weight there, the localised one {:.0} %",
            eq.join(", "),
            100.0 * loc.canonical_population,
            100.0 * loc.population
        ));
    }
    match (&delocalised, ctx.opts.delocalised && !partners.is_empty()) {
        (Some(d), _) => notes.push(format!(
            "delocalised hole (densities kept {}-symmetric): ΔSCF {:.2} eV, {:+.2} eV from the \
             localised hole; vacancy shared {}",
            d.group,
            d.dscf_ev,
            d.dscf_ev - best.attempt.dscf_ev.unwrap_or(f64::NAN),
            describe_shares(ctx.mol, &d.vacancy_shares)
        )),
        (None, true) => notes.push(
            "no delocalised hole state converged (or the geometry has no usable symmetry)".into(),
        ),
        _ => {}
    }
    if !ctx.opts.localise && loc.rotated() {
        let pop = best.attempt.hole_population.unwrap_or(0.0);
        notes.push(if pop > 0.75 {
            format!(
                "started from the canonical (delocalised) 1s, the SCF localised the hole on \
                 {label} by itself ({:.0} % there): a hole spread over equivalent atoms is not a \
                 stable Hartree–Fock solution",
                100.0 * pop
            )
        } else {
            format!(
                "canonical (delocalised) hole kept: {:.0} % on {label}",
                100.0 * pop
            )
        });
    }
    if spin_contaminated(wf.s2) {
        notes.push(format!(
            "⟨S²⟩ = {:.3} is far from 0.75: the cation is spin-contaminated",
            wf.s2
        ));
    }
    let dmp2 = match ctx.neutral_mp2 {
        Some(e2n) => {
            // UMP2 needs an unrestricted reference: use the best UHF start when an ROHF won.
            let uhf = states
                .iter()
                .filter(|s| s.attempt.status == HoleStatus::Held && s.attempt.start != "rohf")
                .min_by(|a, b| {
                    a.attempt
                        .dscf_ev
                        .unwrap_or(f64::MAX)
                        .total_cmp(&b.attempt.dscf_ev.unwrap_or(f64::MAX))
                });
            match uhf.and_then(|s| s.wf.as_ref()) {
                Some(u) => {
                    let e2c = mp2_energy(ctx.basis, u)?;
                    Some(ev(u.energy + e2c - nw.energy - e2n))
                }
                None => {
                    notes.push("no UHF cation held the hole: ΔMP2 not computed".into());
                    None
                }
            }
        }
        None => None,
    };
    let z = ctx.mol.atoms[atom].z;
    Ok(CoreLevel {
        atom: atom + 1,
        element: symbol(z).to_string(),
        label: format!("{label} 1s"),
        shell: "1s".into(),
        koopmans_ev: ev(koopmans),
        dscf_ev: best.attempt.dscf_ev.expect("held state has an energy"),
        dmp2_ev: dmp2,
        s2: wf.s2,
        relativistic_correction_ev: None,
        dscf_relativistic_ev: None,
        shift_ev: None,
        shift_dmp2_ev: None,
        localised,
        hole_population: best.attempt.hole_population.unwrap_or(0.0),
        start: best.attempt.start.clone(),
        attempts,
        lifetime_fwhm_ev: lifetime_fwhm_ev(z),
        cation_energy_hartree: wf.energy,
        neutral_energy_hartree: nw.energy,
        n_basis: ctx.basis.n_basis,
        same_as_atom: None,
        delocalised,
        notes,
    })
}

/// The starts for one hole. Thorough: all of them. Otherwise stop at the first start that
/// holds the hole.
fn search(setup: &HoleSetup, scf: &mut ScfContext, thorough: bool) -> Vec<CationState> {
    let mut states: Vec<CationState> = Vec::new();
    let held = |s: &CationState| s.attempt.status == HoleStatus::Held;
    let mom = run_start(setup, scf, "mom");
    if held(&mom) && !thorough {
        states.push(mom);
        return states;
    }
    // IMOM differs from MOM only when the hole drifts away from the orbital it was put in;
    // when MOM's final vacancy is still that orbital (overlap ≥ IMOM_SKIP_OVERLAP), IMOM
    // would retrace the same iterations.
    let stayed = match (&mom.wf, held(&mom)) {
        (Some(wf), true) => Some(final_hole_overlap(setup, wf)),
        _ => None,
    };
    states.push(mom);
    match stayed {
        Some(ov) if ov >= IMOM_SKIP_OVERLAP => states.push(CationState {
            attempt: HoleAttempt {
                start: "imom".into(),
                status: HoleStatus::Skipped,
                dscf_ev: None,
                s2: None,
                hole_population: None,
                iterations: None,
                message: Some(format!(
                    "not run: the MOM hole stayed in its initial orbital (overlap {ov:.3}), \
                     where IMOM gives the same state"
                )),
            },
            wf: None,
        }),
        _ => {
            let st = run_start(setup, scf, "imom");
            let ok = held(&st);
            states.push(st);
            if ok && !thorough {
                return states;
            }
        }
    }
    let rohf = run_start(setup, scf, "rohf");
    if held(&rohf) {
        let u = run_from_rohf(setup, scf, rohf.wf.as_ref().expect("converged"));
        states.push(rohf);
        states.push(u);
    } else {
        states.push(rohf);
    }
    states
}

fn status_word(s: HoleStatus) -> &'static str {
    match s {
        HoleStatus::Held => "held",
        HoleStatus::Escaped => "the hole escaped from the atom",
        HoleStatus::Collapsed => "the hole collapsed into the valence shell",
        HoleStatus::Excited => {
            "the cation settled above the Koopmans energy (an excited state, not the relaxed hole)"
        }
        HoleStatus::Failed => "did not converge",
        HoleStatus::Skipped => "not run",
    }
}
