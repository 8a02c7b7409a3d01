//! The driver: neutral SCF once, then one core-ionised cation per target atom (in
//! parallel), shifts against a reference, optional ΔMP2.
//!
//! One basis serves every target of a run: all hole atoms (targets and a reference atom)
//! get the requested core flexibility at once, so a single neutral SCF is shared and
//! shifts between atoms compare like with like. A hole atom's flexible functions also let
//! the other targets' neutral and cations relax a little more than a plain basis would; the
//! effect on a binding energy is far below the method's error (see README, "bandcast core").

use rayon::prelude::*;

use bandcast_linalg::Mat;

use crate::basis::{self, BasisSet};
use crate::chem::elements::symbol;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::scf::{Reference, ScfContext, ScfOptions, Wavefunction};
use crate::units::ev;

use super::cation::{run_from_rohf, run_start, CationState, HoleSetup};
use super::flexibility::{replace_atoms, uncontract};
use super::hole_check::{spin_contaminated, HoleStatus};
use super::lifetime::lifetime_fwhm_ev;
use super::localize::localise_core_hole;
use super::mp2::mp2_energy;
use super::options::{CoreBasis, CoreOptions, ShiftReference, TargetSelection};
use super::population::sqrt_overlap;
use super::result::{CoreLevel, CoreResult, ShiftReferenceLevel};
use super::targets::{atom_label, check_core_atom, resolve_targets};

/// Memory all concurrent SCFs of a run may use together for stored integrals (bytes).
pub const MEMORY_BUDGET_BYTES: usize = 4 << 30;

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
    if mol.multiplicity != 1 || mol.n_electrons() % 2 != 0 {
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
    let work = flexible_basis(&plain, mol, &hole_atoms, &opts.core_basis)?;

    let total = hole_atoms.len();
    // One SCF context (integrals, in-core ERI store) per concurrent task, shared by all the
    // SCFs that task runs; the memory budget is split between them.
    let n_ctx = rayon::current_num_threads().max(1).min(total).max(1);
    let budget = MEMORY_BUDGET_BYTES / n_ctx;
    let lindep = ScfOptions::default().lindep_threshold;
    let mut ctx0 = ScfContext::new(mol, &work, lindep)?;
    let s = ctx0.s.clone();
    let s_half = sqrt_overlap(&s);
    let neutral = ctx0
        .run(
            mol,
            &ScfOptions {
                reference: Reference::Rhf,
                memory_budget_bytes: budget,
                ..ScfOptions::default()
            },
            &mut |_| {},
        )
        .map_err(|e| Error::computation(format!("neutral Hartree–Fock: {e}")))?;
    let neutral_mp2 = if opts.mp2 {
        Some(mp2_energy(&work, &neutral)?)
    } else {
        None
    };

    let done = std::sync::atomic::AtomicUsize::new(0);
    let pool = std::sync::Mutex::new(vec![ctx0]);
    let ctx = Context {
        mol,
        basis: &work,
        s: &s,
        s_half: &s_half,
        neutral: &neutral,
        neutral_mp2,
        opts,
        memory_budget_bytes: budget,
        pool: &pool,
        lindep,
    };
    let results: Vec<Result<CoreLevel>> = hole_atoms
        .par_iter()
        .map(|&a| {
            let r = ionise_atom(&ctx, a);
            let k = done.fetch_add(1, std::sync::atomic::Ordering::SeqCst) + 1;
            progress(k, total);
            r
        })
        .collect();
    let mut levels = Vec::with_capacity(total);
    let mut failures = Vec::new();
    for r in results {
        match r {
            Ok(l) => levels.push(l),
            Err(e) => failures.push(e.to_string()),
        }
    }
    if !failures.is_empty() {
        return Err(Error::computation(format!(
            "no trustworthy core-ionised state for {} of {} atoms:\n  {}",
            failures.len(),
            total,
            failures.join("\n  ")
        )));
    }

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
            "holes on symmetry-equivalent atoms were localised on one atom before the SCF \
             (the canonical 1s orbitals are spread over the equivalent atoms)"
                .into(),
        );
    }
    Ok(CoreResult {
        molecule: mol.name.clone(),
        basis: plain.name.clone(),
        core_basis: opts.core_basis.describe(),
        n_basis: work.n_basis,
        neutral_energy_hartree: neutral.energy,
        neutral_mp2_hartree: neutral_mp2,
        core_levels: levels,
        references,
        notes,
    })
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
    pool: &'a std::sync::Mutex<Vec<ScfContext>>,
    lindep: f64,
}

/// The 1s hole of one atom: localise, try the starts, keep the best that holds.
fn ionise_atom(ctx: &Context, atom: usize) -> Result<CoreLevel> {
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
    let localised = ctx.opts.localise && loc.rotated();
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
    };
    let taken = ctx.pool.lock().map(|mut p| p.pop()).unwrap_or(None);
    let mut scf = match taken {
        Some(c) => c,
        None => ScfContext::new(ctx.mol, ctx.basis, ctx.lindep)?,
    };
    let states = search(&setup, &mut scf, ctx.opts.thorough);
    if let Ok(mut p) = ctx.pool.lock() {
        p.push(scf);
    }
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
        notes.push(format!(
            "hole localised on {label}: the canonical 1s had {:.0} % of its weight there, the \
             localised one {:.0} %",
            100.0 * loc.canonical_population,
            100.0 * loc.population
        ));
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
        shift_ev: None,
        shift_dmp2_ev: None,
        localised,
        hole_population: best.attempt.hole_population.unwrap_or(0.0),
        start: best.attempt.start.clone(),
        attempts,
        lifetime_fwhm_ev: lifetime_fwhm_ev(z),
        cation_energy_hartree: wf.energy,
        notes,
    })
}

/// The starts for one hole. Thorough: all of them. Otherwise stop at the first start that
/// holds the hole.
fn search(setup: &HoleSetup, scf: &mut ScfContext, thorough: bool) -> Vec<CationState> {
    let mut states: Vec<CationState> = Vec::new();
    let held = |s: &CationState| s.attempt.status == HoleStatus::Held;
    for start in ["mom", "imom"] {
        let st = run_start(setup, scf, start);
        let ok = held(&st);
        states.push(st);
        if ok && !thorough {
            return states;
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
    }
}
