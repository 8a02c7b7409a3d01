//! Second-shell core levels of Na–Ar: 2p (with its spin–orbit doublet) and 2s.
//!
//! The same stages as the 1s levels (`predict.rs`): plan (targets, symmetry-equivalent
//! atoms, one basis per distinct hole atom with core flexibility on it), neutrals, holes,
//! assemble. What differs is the hole:
//! - the hole orbitals are the atom's localised 2p set (or 2s), found by projection on the
//!   atom's p (s) functions inside the energy cluster of that shell (`shell_hole.rs`); for 2p
//!   they point along the principal axes of the molecular field at the atom;
//! - a ΔSCF cation (MOM/IMOM/ROHF starts, the same escape/collapse/excited checks as 1s,
//!   `cation.rs`, `hole_check.rs`) for each of the three 2p holes whose orbital energies
//!   differ (holes degenerate by symmetry, e.g. across a linear or threefold axis, are
//!   computed once);
//! - the three 2p-hole energies and the spin–orbit coupling give the 2p3/2 and 2p1/2
//!   levels with their molecular-field substructure (`spin_orbit.rs`).
//!
//! A run may mix shells (SO2 at Al Kα: S 2p and O 1s): the 1s atoms go through the 1s path
//! unchanged and the levels are merged in atom order.

use crate::basis::BasisSet;
use crate::chem::elements::symbol;
use crate::chem::environment::environments;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::ionization::band::Band;
use crate::scf::ScfContext;
use crate::system::process_cpu_seconds as cpu_seconds;
use crate::units::{ev, HARTREE_TO_EV};

use super::cation::{final_hole_overlap, HoleSetup};
use super::holes::{dmp2_ev, lowest_held, no_hole_error, search, HoleContext};
use super::lifetime::level_fwhm_ev;
use super::neutrals::{
    cpu_diff, memory_budget_bytes, neutral, shared_quartets, Carried, NeutralInputs,
};
use super::notes::{CoreNote, Notes};
use super::options::{CoreOptions, ShiftReference, TargetSelection};
use super::plan::plan;
use super::result::{CoreLevel, CoreResult, CoreTimings, HoleAttempt, StageTiming};
use super::shell::{shell_for, sources_reaching, CoreShell, ShellChoice};
use super::shell_hole::{localise_shell, p_direction, SpatialHole, DEGENERATE_HARTREE};
use super::spin_orbit::{
    atomic_p, doublets, j32_doublets, mean_inverse_cube, zeta_hartree, LevelComponent,
};
use super::targets::{atom_label, resolve_targets};

/// Overlap of a 2p hole's final vacancy with its start orbital below which the hole is said
/// to have turned (the 1s IMOM threshold, `cation::IMOM_SKIP_OVERLAP`).
pub const TURNED_OVERLAP: f64 = 0.9;

/// The run when some target needs a 2s or 2p level, or when a photon energy was given (for
/// the notes on levels out of reach); None otherwise (the 1s path runs as before).
pub fn predict_shells(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &CoreOptions,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<Option<CoreResult>> {
    let groups = shell_groups(mol, opts)?;
    if groups.iter().all(|(s, _)| *s == CoreShell::S1) && opts.photon_ev.is_none() {
        return Ok(None);
    }
    if opts.reference != ShiftReference::None {
        return with_shifts(mol, basis, opts, progress);
    }
    if groups.iter().any(|(s, _)| *s != CoreShell::S1) {
        if opts.ion_reference != super::options::IonReference::Lowest {
            return Err(Error::input(
                "the cation's wavefunction type is chosen for 1s levels; 2s and 2p levels take \
                 the lowest state of every start",
            ));
        }
        if opts.cc.is_some() {
            return Err(Error::input(
                "ΔCCSD and ΔCCSD(T) are computed for 1s levels; 2s and 2p levels are ΔSCF \
                 (use --method dscf, or --shell 1s)",
            ));
        }
    }
    let mut parts: Vec<CoreResult> = Vec::new();
    for (shell, atoms) in &groups {
        let r = if *shell == CoreShell::S1 {
            let o = CoreOptions {
                targets: TargetSelection::Atoms(atoms.clone()),
                shell: ShellChoice::Fixed(CoreShell::S1),
                photon_ev: None,
                ..opts.clone()
            };
            super::predict::predict_with_progress(mol, basis, &o, progress)?
        } else {
            second_shell(mol, basis, opts, *shell, atoms, progress)?
        };
        parts.push(r);
    }
    let mut r = merge(parts);
    if let Some(hv) = opts.photon_ev {
        note_beyond_photon(&mut r, hv);
    }
    Ok(Some(r))
}

/// A run with shifts when 2s/2p levels are involved: the levels without a reference, the
/// reference levels (an atom of this molecule, or the first atom of each target element in
/// the reference molecule, computed with the same shell choice), and each level's shift
/// against the reference level of the same element and shell.
fn with_shifts(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &CoreOptions,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<Option<CoreResult>> {
    let targets = resolve_targets(mol, &opts.targets)?;
    let plain = CoreOptions {
        reference: ShiftReference::None,
        ..opts.clone()
    };
    let (mut r, refs) = match &opts.reference {
        ShiftReference::None => unreachable!("called with a reference"),
        ShiftReference::Atom(ra) => {
            let ra = *ra;
            super::targets::check_core_atom(mol, ra)?;
            let zr = mol.atoms[ra].z;
            if let Some(&bad) = targets.iter().find(|&&t| mol.atoms[t].z != zr) {
                return Err(Error::input(format!(
                    "the shift reference atom {} is {}, but target atom {} is {}: a shift \
                     compares levels of one element (choose {} atoms as targets)",
                    ra + 1,
                    symbol(zr),
                    bad + 1,
                    symbol(mol.atoms[bad].z),
                    symbol(zr)
                )));
            }
            let mut all = targets.clone();
            if !all.contains(&ra) {
                all.push(ra);
                all.sort_unstable();
            }
            let o = CoreOptions {
                targets: TargetSelection::Atoms(all),
                ..plain
            };
            let mut r = predict_shells(mol, basis, &o, progress)?
                .expect("a run with 2s/2p levels or a photon energy");
            let refs: Vec<CoreLevel> = r
                .core_levels
                .iter()
                .filter(|l| l.atom == ra + 1)
                .cloned()
                .collect();
            if !targets.contains(&ra) {
                r.core_levels.retain(|l| l.atom != ra + 1);
            }
            let refs = refs
                .iter()
                .map(|l| ("atom", mol, l.clone()))
                .collect::<Vec<_>>();
            (r, into_references(&refs))
        }
        ShiftReference::Molecule(rm) => {
            let r = predict_shells(mol, basis, &plain, progress)?
                .expect("a run with 2s/2p levels or a photon energy");
            let m = &rm.molecule;
            let mut want: Vec<usize> = Vec::new();
            for l in &r.core_levels {
                let z = mol.atoms[l.atom - 1].z;
                if let Some(i) = m.atoms.iter().position(|a| a.z == z) {
                    if !want.contains(&i) {
                        want.push(i);
                    }
                }
            }
            want.sort_unstable();
            let refs = if want.is_empty() {
                Vec::new()
            } else {
                let o = CoreOptions {
                    targets: TargetSelection::Atoms(want),
                    ..plain.clone()
                };
                let rr = super::predict::predict(m, &rm.basis, &o).map_err(|e| match e {
                    Error::Computation(msg) => {
                        Error::computation(format!("reference molecule: {msg}"))
                    }
                    other => other,
                })?;
                rr.core_levels
                    .into_iter()
                    .map(|l| ("molecule", m, l))
                    .collect::<Vec<_>>()
            };
            (r, into_references(&refs))
        }
    };
    let mut notes = Vec::new();
    for l in &mut r.core_levels {
        match refs
            .iter()
            .find(|(sh, x)| x.element == l.element && *sh == l.shell)
        {
            Some((_, x)) => {
                l.shift_ev = Some(l.dscf_ev - x.dscf_ev);
                l.shift_dmp2_ev = match (l.dmp2_ev, x.dmp2_ev) {
                    (Some(a), Some(b)) => Some(a - b),
                    _ => None,
                };
                l.cc.shift_binding_ev = Some(l.cc.binding_ev - x.binding_ev);
            }
            None => notes.push(CoreNote::ReferenceLacksElement {
                element: l.element.clone(),
                level: l.label.clone(),
            }),
        }
    }
    r.notes.extend(notes);
    r.references = refs.into_iter().map(|(_, x)| x).collect();
    Ok(Some(r))
}

/// (shell, reference record) of each reference level.
fn into_references(
    levels: &[(&str, &Molecule, CoreLevel)],
) -> Vec<(String, super::result::ShiftReferenceLevel)> {
    levels
        .iter()
        .map(|(kind, m, l)| {
            (
                l.shell.clone(),
                super::result::ShiftReferenceLevel {
                    kind: kind.to_string(),
                    molecule: m.name.clone(),
                    atom: l.atom,
                    element: l.element.clone(),
                    shell: l.shell.clone(),
                    dscf_ev: l.dscf_ev,
                    dmp2_ev: l.dmp2_ev,
                    binding_ev: l.cc.binding_ev - l.relativistic_correction_ev.unwrap_or(0.0),
                },
            )
        })
        .collect()
}

/// The targets grouped by the shell computed for them (1s first, then 2s, 2p).
fn shell_groups(mol: &Molecule, opts: &CoreOptions) -> Result<Vec<(CoreShell, Vec<usize>)>> {
    let targets = resolve_targets(mol, &opts.targets)?;
    let mut groups: Vec<(CoreShell, Vec<usize>)> = Vec::new();
    for t in targets {
        let z = mol.atoms[t].z;
        let s = match shell_for(z, opts.shell, opts.photon_ev) {
            Ok(s) => s,
            // every heavy atom asked: those without the shell are left out
            Err(_) if opts.targets == TargetSelection::AllHeavy => continue,
            Err(e) => return Err(e),
        };
        match groups.iter_mut().find(|(g, _)| *g == s) {
            Some((_, v)) => v.push(t),
            None => groups.push((s, vec![t])),
        }
    }
    if groups.is_empty() {
        let ShellChoice::Fixed(s) = opts.shell else {
            unreachable!("auto gives every core atom a shell")
        };
        return Err(Error::input(format!(
            "no atom of the molecule has a {} core level that can be computed here (2s and \
             2p: Na–Ar)",
            s.name()
        )));
    }
    groups.sort_by_key(|(s, _)| *s);
    Ok(groups)
}

/// One result from the results of several shells: levels in atom order (then shell).
fn merge(parts: Vec<CoreResult>) -> CoreResult {
    let mut it = parts.into_iter();
    let mut r = it.next().expect("at least one shell");
    let mut several = false;
    for p in it {
        several = true;
        r.n_basis = r.n_basis.max(p.n_basis);
        r.core_levels.extend(p.core_levels);
        if p.integrals.fitting_basis.is_some() {
            r.integrals = p.integrals;
        }
        for n in p.notes.0 {
            if !r.notes.contains(&n) {
                r.notes.push(n);
            }
        }
        let t = p.timings;
        r.timings.neutrals.extend(t.neutrals);
        r.timings.holes.extend(t.holes);
        r.timings.total_s += t.total_s;
        r.timings.total_cpu_s = match (r.timings.total_cpu_s, t.total_cpu_s) {
            (Some(a), Some(b)) => Some(a + b),
            _ => None,
        };
    }
    if several {
        r.neutral_energy_hartree = None;
        r.neutral_mp2_hartree = None;
    }
    r.core_levels.sort_by_key(|l| l.atom);
    r
}

/// A note on each level (and on the run) that the photons do not reach.
fn note_beyond_photon(r: &mut CoreResult, photon_ev: f64) {
    for l in &mut r.core_levels {
        let e = l.dscf_ev;
        if e >= photon_ev {
            let n = CoreNote::BeyondPhoton {
                level: l.label.clone(),
                energy_ev: e,
                photon_ev,
                reached_by: sources_reaching(e),
            };
            r.notes.push(n);
        }
    }
}

/// The 2s or 2p levels of `atoms` (stages as in `predict.rs`).
fn second_shell(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &CoreOptions,
    shell: CoreShell,
    atoms: &[usize],
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<CoreResult> {
    use crate::analysis::symmetry::{symmetrize, DEFAULT_TOLERANCE};
    let (symmetric, displacement, group) = symmetrize(mol, DEFAULT_TOLERANCE);
    let moved = displacement > 1e-6;
    let mol = &symmetric;
    let mut basis = basis.clone();
    for sh in &mut basis.shells {
        sh.center = mol.atoms[sh.atom].position;
    }
    let popts = CoreOptions {
        targets: TargetSelection::Atoms(atoms.to_vec()),
        reference: ShiftReference::None,
        localise: true,
        delocalised: false,
        relativistic: false,
        ..opts.clone()
    };
    let plan = plan(mol, &popts)?;
    let t_start = std::time::Instant::now();
    let cpu_start = cpu_seconds();
    let mut timings = CoreTimings::default();
    let shared = shared_quartets(&basis, &plan, &popts, &mut timings);
    let budget =
        memory_budget_bytes(&popts).saturating_sub(shared.as_ref().map_or(0, |c| c.bytes()));
    let inputs = NeutralInputs {
        mol,
        plain: &basis,
        opts: &popts,
        shared: shared.as_ref(),
        budget,
    };
    let total = plan.computed.len();
    let mut computed: Vec<(usize, Vec<CoreLevel>)> = Vec::new();
    let mut failures = Vec::new();
    let mut previous: Option<Carried> = None;
    let mut n_basis_max = 0;
    let mut density_fitted = false;
    let mut neutral_energies = Vec::new();
    let mut neutral_mp2 = Vec::new();
    for unit in &plan.units {
        let mut n = neutral(&inputs, unit, previous.as_ref(), &mut timings)?;
        n_basis_max = n_basis_max.max(n.basis.n_basis);
        density_fitted |= n.jk_fitting.is_some();
        neutral_energies.push(n.wf.energy);
        neutral_mp2.extend(n.mp2);
        let ctx = HoleContext {
            mol,
            basis: &n.basis,
            s: &n.s,
            s_half: &n.s_half,
            neutral: &n.wf,
            neutral_mp2: n.mp2,
            neutral_cc: None,
            opts: &popts,
            memory_budget_bytes: budget,
            jk_fitting: n.jk_fitting.clone(),
        };
        for &a in &unit.holes {
            let t = std::time::Instant::now();
            let c0 = cpu_seconds();
            let r = atom_levels(&ctx, &mut n.scf, a, shell, plan.partners_of(a));
            timings.holes.push(StageTiming {
                label: format!("{} {}", atom_label(mol, a), shell.name()),
                n_basis: n.basis.n_basis,
                seconds: t.elapsed().as_secs_f64(),
                cpu_seconds: cpu_diff(c0),
                iterations: match &r {
                    Ok(l) => l[0].attempts.iter().filter_map(|x| x.iterations).sum(),
                    Err(_) => 0,
                },
            });
            progress(computed.len() + failures.len() + 1, total);
            match r {
                Ok(l) => computed.push((a, l)),
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
    let mut levels = Vec::new();
    for (&a, &rep) in plan.hole_atoms.iter().zip(&plan.equivalence.representative) {
        let (_, src) = computed
            .iter()
            .find(|(c, _)| *c == rep)
            .expect("every representative was computed");
        for l in src {
            levels.push(if a == rep {
                l.clone()
            } else {
                copy_level(mol, l, a, &plan.equivalence.group)
            });
        }
    }
    let mut notes = Notes::default();
    if moved {
        notes.push(CoreNote::Symmetrised {
            group: group.name.clone(),
            max_displacement_angstrom: displacement * crate::units::BOHR_TO_ANGSTROM,
        });
    }
    // As for 1s: say that holes of atoms with equivalent partners sit on one atom.
    super::assemble::note_localised(&levels, &mut notes);
    if shell == CoreShell::P2 {
        notes.push(CoreNote::SpinOrbitModel {
            source: SPIN_ORBIT_SOURCE.to_string(),
        });
    }
    if levels.iter().any(|l| l.same_as_atom.is_some()) {
        notes.push(CoreNote::EquivalentComputedOnce {
            group: plan.equivalence.group.clone(),
            tolerance_bohr: super::equivalence::TOLERANCE,
            computed: plan.computed.len(),
            levels: levels.len(),
        });
    }
    timings.total_s = t_start.elapsed().as_secs_f64();
    timings.total_cpu_s = cpu_diff(cpu_start);
    let n_mp2 = (neutral_mp2.len() == 1).then(|| neutral_mp2[0]);
    Ok(CoreResult {
        molecule: mol.name.clone(),
        basis: basis.name.clone(),
        core_basis: opts.core_basis.describe(),
        n_basis: n_basis_max,
        neutral_energy_hartree: (neutral_energies.len() == 1).then(|| neutral_energies[0]),
        neutral_mp2_hartree: n_mp2,
        core_levels: levels,
        references: Vec::new(),
        relativistic_source: None,
        integrals: super::fitting::used(opts.fock, density_fitted),
        notes,
        timings,
    })
}

/// Printed with 2p levels.
pub const SPIN_ORBIT_SOURCE: &str =
    "ζ_2p l·s on the three ΔSCF 2p holes, ζ = (α²/2)(Z − 2)⟨r⁻³⟩_2p \
     from the atom's own 2p orbitals (one-electron Breit–Pauli operator with an effective \
     charge, after Koseki, Schmidt & Gordon, J. Phys. Chem. 96 (1992) 10768); intensities \
     statistical (two electrons per Kramers doublet)";

/// The level of `atom` copied from the equivalent computed level `src`.
fn copy_level(mol: &Molecule, src: &CoreLevel, atom: usize, group: &str) -> CoreLevel {
    let mut l = src.clone();
    let shell_part = src.label.split_once(' ').map_or("", |(_, s)| s).to_string();
    l.atom = atom + 1;
    l.label = format!("{} {shell_part}", atom_label(mol, atom));
    l.same_as_atom = Some(src.atom);
    l.notes.retain(|n| !n.is_about_the_computed_atom());
    l.notes.insert(
        0,
        CoreNote::EquivalentTo {
            atom: atom_label(mol, src.atom - 1),
            group: group.to_string(),
        },
    );
    l
}

/// The levels of one atom: [2s], or [2p3/2, 2p1/2].
fn atom_levels(
    ctx: &HoleContext,
    scf: &mut ScfContext,
    atom: usize,
    shell: CoreShell,
    partners: &[usize],
) -> Result<Vec<CoreLevel>> {
    let nw = ctx.neutral;
    let occ: Vec<usize> = (0..nw.occ_alpha.len())
        .filter(|&k| nw.occ_alpha[k] > 0.5)
        .collect();
    let loc = localise_shell(
        ctx.basis,
        ctx.s_half,
        &nw.c_alpha,
        &nw.eps_alpha,
        &occ,
        atom,
        shell,
    )?;
    let cation = ctx
        .mol
        .clone()
        .with_charge_multiplicity(ctx.mol.charge + 1, 2)?;
    let label = atom_label(ctx.mol, atom);
    let mut spatial: Vec<SpatialHole> = Vec::new();
    let mut attempts: Vec<HoleAttempt> = Vec::new();
    let mut notes = Notes::default();
    let mut cation_energy = f64::NAN;
    let n_hole = loc.holes.len();
    for h in 0..n_hole {
        if let Some(g) = (0..h).find(|&g| (loc.eps[g] - loc.eps[h]).abs() < DEGENERATE_HARTREE) {
            let mut copy = spatial[g].clone();
            copy.axis = h + 1;
            copy.direction = p_direction(ctx.basis, &loc.c, loc.holes[h], atom);
            copy.same_as_axis = Some(g + 1);
            spatial.push(copy);
            continue;
        }
        let mut occ_beta = nw.occ_alpha.clone();
        occ_beta[loc.holes[h]] = 0.0;
        let koopmans = -loc.eps[h];
        let setup = HoleSetup {
            cation: &cation,
            basis: ctx.basis,
            s: ctx.s,
            s_half: ctx.s_half,
            c_ref: &loc.c,
            occ_alpha: nw.occ_alpha.clone(),
            occ_beta,
            hole: loc.holes[h],
            atom,
            e_neutral: nw.energy,
            koopmans,
            localised: true,
            memory_budget_bytes: ctx.memory_budget_bytes,
            symmetry: None,
            jk_fitting: ctx.jk_fitting.clone(),
        };
        let states = search(&setup, scf, ctx.opts.thorough);
        let mine: Vec<HoleAttempt> = states
            .iter()
            .map(|s| {
                let mut a = s.attempt.clone();
                if n_hole > 1 {
                    a.start = format!("axis {}: {}", h + 1, a.start);
                }
                a
            })
            .collect();
        let what = if n_hole > 1 {
            format!("{label} 2p (axis {})", h + 1)
        } else {
            format!("{label} {}", shell.name())
        };
        let best =
            lowest_held(&states, |_| true).ok_or_else(|| no_hole_error(&what, &mine, koopmans))?;
        attempts.extend(mine);
        let wf = best.wf.as_ref().expect("held state has a wavefunction");
        if h == 0 {
            cation_energy = wf.energy;
        }
        // ΔMP2 of this hole (all electrons, UMP2 on the best UHF cation), as for 1s.
        // A vanishing denominator (the MP2 refusal) leaves the level without ΔMP2, with a note.
        let dmp2 = match ctx.neutral_mp2 {
            Some(e2n) => match dmp2_ev(ctx, &states, e2n, &mut notes) {
                Ok(v) => v,
                Err(Error::Computation(msg)) => {
                    notes.push(CoreNote::Mp2Intruder {
                        axis: h + 1,
                        reason: msg,
                    });
                    None
                }
                Err(e) => return Err(e),
            },
            None => None,
        };
        if super::hole_check::spin_contaminated(wf.s2) && notes.is_empty() {
            notes.push(CoreNote::SpinContaminated { s2: wf.s2 });
        }
        let overlap = final_hole_overlap(&setup, wf);
        if n_hole > 1 && overlap < TURNED_OVERLAP {
            notes.push(CoreNote::HoleTurned {
                axis: h + 1,
                overlap,
            });
        }
        spatial.push(SpatialHole {
            axis: h + 1,
            direction: p_direction(ctx.basis, &loc.c, loc.holes[h], atom),
            koopmans_ev: ev(koopmans),
            dscf_ev: best.attempt.dscf_ev.expect("held state has an energy"),
            hole_population: best.attempt.hole_population.unwrap_or(0.0),
            s2: wf.s2,
            start: best.attempt.start.clone(),
            same_as_axis: None,
            dmp2_ev: dmp2,
        });
    }
    mp2_spread_guard(&mut spatial, &mut notes);
    let z = ctx.mol.atoms[atom].z;
    let base = CoreLevel {
        atom: atom + 1,
        element: symbol(z).to_string(),
        label: format!("{label} {}", shell.name()),
        environment: environments(ctx.mol).swap_remove(atom),
        shell: shell.name().into(),
        koopmans_ev: spatial[0].koopmans_ev,
        dscf_ev: spatial[0].dscf_ev,
        dmp2_ev: spatial[0].dmp2_ev,
        s2: spatial[0].s2,
        relativistic_correction_ev: None,
        dscf_relativistic_ev: None,
        shift_ev: None,
        shift_dmp2_ev: None,
        localised: !partners.is_empty(),
        hole_population: spatial
            .iter()
            .map(|s| s.hole_population)
            .fold(f64::INFINITY, f64::min),
        start: spatial[0].start.clone(),
        attempts,
        lifetime_fwhm_ev: level_fwhm_ev(z, shell.name()),
        cation_energy_hartree: cation_energy,
        neutral_energy_hartree: nw.energy,
        n_basis: ctx.basis.n_basis,
        same_as_atom: None,
        delocalised: None,
        spin_orbit_ev: None,
        components: Vec::new(),
        spatial_holes: Vec::new(),
        cc: Default::default(),
        notes,
    };
    let mut base = base;
    super::delta_cc::recommend(base.dscf_ev, &mut base.cc, None);
    if shell != CoreShell::P2 {
        return Ok(vec![base]);
    }
    Ok(spin_orbit_levels(ctx, &loc, atom, base, &spatial))
}

/// Largest spread (eV) of the ΔMP2 corrections (ΔMP2 − ΔSCF) of the three 2p holes of one
/// atom that is accepted. The three ΔSCF energies differ by a few tenths of an eV (the
/// molecular field); their second-order corrections should agree about as well. A spread
/// beyond 1 eV is the mark of a near-vanishing denominator (measured: SO2 in cc-pVDZ, one
/// hole −5.2 eV against −0.7 and −0.8 for the other two), so the level's ΔMP2 is dropped.
pub const MP2_SPREAD_EV: f64 = 1.0;

/// Drop the ΔMP2 values of a 2p set whose corrections disagree by more than
/// `MP2_SPREAD_EV`, with a note naming the odd hole.
fn mp2_spread_guard(spatial: &mut [SpatialHole], notes: &mut Notes) {
    let corr: Vec<(usize, f64)> = spatial
        .iter()
        .filter(|s| s.same_as_axis.is_none())
        .filter_map(|s| s.dmp2_ev.map(|m| (s.axis, m - s.dscf_ev)))
        .collect();
    if corr.len() < 2 {
        return;
    }
    let mean = corr.iter().map(|c| c.1).sum::<f64>() / corr.len() as f64;
    let lo = corr.iter().map(|c| c.1).fold(f64::INFINITY, f64::min);
    let hi = corr.iter().map(|c| c.1).fold(f64::NEG_INFINITY, f64::max);
    if hi - lo <= MP2_SPREAD_EV {
        return;
    }
    let odd = corr
        .iter()
        .max_by(|a, b| (a.1 - mean).abs().total_cmp(&(b.1 - mean).abs()))
        .expect("two or more");
    notes.push(CoreNote::Mp2Intruder {
        axis: odd.0,
        reason: format!(
            "its second-order correction {:+.2} eV differs from the other holes' by more than \
             {MP2_SPREAD_EV} eV",
            odd.1
        ),
    });
    for s in spatial.iter_mut() {
        s.dmp2_ev = None;
    }
}

/// The 2p3/2 and 2p1/2 levels of an atom from its three spatial holes.
fn spin_orbit_levels(
    ctx: &HoleContext,
    loc: &super::shell_hole::ShellHoles,
    atom: usize,
    base: CoreLevel,
    spatial: &[SpatialHole],
) -> Vec<CoreLevel> {
    let z = ctx.mol.atoms[atom].z;
    let p = atomic_p(ctx.basis, atom, &loc.c, &loc.holes);
    let zeta_ev = ev(zeta_hartree(z, mean_inverse_cube(&p)));
    let e = [spatial[0].dscf_ev, spatial[1].dscf_ev, spatial[2].dscf_ev];
    let k = [
        spatial[0].koopmans_ev,
        spatial[1].koopmans_ev,
        spatial[2].koopmans_ev,
    ];
    let d = doublets(e, zeta_ev, Some(&p));
    let dk = doublets(k, zeta_ev, Some(&p));
    let (is32, is32k) = (j32_doublets(&d), j32_doublets(&dk));
    let mean = |v: &[super::spin_orbit::Doublet], f: &[bool; 3], want: bool| -> f64 {
        let sel: Vec<f64> = (0..3)
            .filter(|&i| f[i] == want)
            .map(|i| v[i].energy)
            .collect();
        sel.iter().sum::<f64>() / sel.len() as f64
    };
    let (e32, e12) = (mean(&d, &is32, true), mean(&d, &is32, false));
    // ΔMP2 energies of the three holes through the same spin–orbit matrix (ζ unchanged).
    let dm = match (spatial[0].dmp2_ev, spatial[1].dmp2_ev, spatial[2].dmp2_ev) {
        (Some(a), Some(b), Some(c)) => Some(doublets([a, b, c], zeta_ev, Some(&p))),
        _ => None,
    };
    let make = |want: bool, name: &str| {
        let mut l = base.clone();
        l.label = format!("{} {name}", atom_label(ctx.mol, atom));
        l.shell = name.into();
        l.dscf_ev = mean(&d, &is32, want);
        l.koopmans_ev = mean(&dk, &is32k, want);
        l.dmp2_ev = dm.as_ref().map(|v| mean(v, &j32_doublets(v), want));
        l.cation_energy_hartree = base.neutral_energy_hartree + l.dscf_ev / HARTREE_TO_EV;
        l.lifetime_fwhm_ev = level_fwhm_ev(z, name);
        l.spin_orbit_ev = Some(e12 - e32);
        l.components = (0..3)
            .filter(|&i| is32[i] == want)
            .map(|i| LevelComponent {
                dscf_ev: d[i].energy,
                electrons: 2.0,
                j32_weight: d[i].j32_weight,
                axis_weights: d[i].axis_weights,
            })
            .collect();
        l.spatial_holes = spatial.to_vec();
        super::delta_cc::recommend(l.dscf_ev, &mut l.cc, None);
        l
    };
    vec![make(true, "2p3/2"), make(false, "2p1/2")]
}

/// One band per component of a 2p level (two electrons each), from the level's band.
pub fn component_bands(l: &CoreLevel, base: Band) -> Vec<Band> {
    let n = l.components.len();
    l.components
        .iter()
        .enumerate()
        .map(|(i, c)| Band {
            label: if n > 1 {
                format!("{} ({})", l.label, (b'a' + i as u8) as char)
            } else {
                l.label.clone()
            },
            ie_ev: c.dscf_ev,
            occupation: c.electrons,
            ..base.clone()
        })
        .collect()
}
