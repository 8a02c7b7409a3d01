//! Stage 3, holes: the 1s hole of one atom in its unit's basis. The hole is localised on the
//! atom (`localize.rs`), the cation SCF starts are tried (`cation.rs`: MOM, IMOM, ROHF,
//! ROHF→UHF) and the lowest state that still holds the hole is kept; failures are reported
//! as errors naming every start, never as numbers (`hole_check.rs`). Optionally the
//! delocalised hole (`delocalised.rs`) and ΔMP2 (`correlation::mp2`).

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::chem::elements::symbol;
use crate::chem::environment::environments;
use crate::chem::Molecule;
use crate::correlation::mp2::mp2_energy;
use crate::correlation::open_shell::CutPair;
use crate::error::{Error, Result};
use crate::scf::{ScfContext, Wavefunction};
use crate::units::ev;

use super::cation::{
    final_hole_overlap, run_from_rohf, run_start, CationState, HoleSetup, IMOM_SKIP_OVERLAP,
};
use super::delocalised::{delocalised_hole, describe_shares, DelocalisedHole, DelocalisedSetup};
use super::hole_check::{spin_contaminated, HoleStatus};
use super::lifetime::lifetime_fwhm_ev;
use super::localize::{localise_core_hole, LocalisedHole};
use super::notes::{CoreNote, Notes};
use super::options::{CoreOptions, IonReference};
use super::result::{CoreLevel, HoleAttempt};
use super::targets::atom_label;

/// What every hole of one unit shares: the molecule, the unit's basis and its neutral.
pub struct HoleContext<'a> {
    pub mol: &'a Molecule,
    pub basis: &'a BasisSet,
    pub s: &'a Mat<f64>,
    pub s_half: &'a Mat<f64>,
    pub neutral: &'a Wavefunction,
    pub neutral_mp2: Option<f64>,
    /// Coupled cluster of the neutral, when ΔCC was asked.
    pub neutral_cc: Option<&'a crate::correlation::open_shell::OpenShellResult>,
    pub opts: &'a CoreOptions,
    pub memory_budget_bytes: usize,
    /// The fitting set of density-fitted J and K, None for exact integrals (`fitting.rs`).
    pub jk_fitting: Option<String>,
}

/// The 1s hole of `atom` (0-based; `partners`: its symmetry-equivalent atoms): localise,
/// try the starts, keep the best that holds.
pub fn ionise_atom(
    ctx: &HoleContext,
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
        jk_fitting: ctx.jk_fitting.clone(),
    };
    let states = match ctx.opts.ion_reference {
        IonReference::Rohf => vec![run_start(&setup, scf, "rohf")],
        _ => search(&setup, scf, ctx.opts.thorough),
    };
    let delocalised = if ctx.opts.delocalised && !partners.is_empty() {
        delocalised_for(ctx, scf, &cation, &loc, atom, partners)
    } else {
        None
    };
    let label = atom_label(ctx.mol, atom);
    let attempts: Vec<_> = states.iter().map(|s| s.attempt.clone()).collect();
    let Some(best) = lowest_held(&states, |s| {
        ctx.opts.ion_reference.accepts(&s.attempt.start)
    }) else {
        return Err(no_hole_error(&format!("{label} 1s"), &attempts, koopmans));
    };
    let wf = best.wf.as_ref().expect("held state has a wavefunction");
    let mut notes = hole_notes(
        ctx,
        &loc,
        localised,
        partners,
        &label,
        &delocalised,
        &best.attempt,
    );
    if spin_contaminated(wf.s2) {
        notes.push(CoreNote::SpinContaminated { s2: wf.s2 });
    }
    let dmp2 = match ctx.neutral_mp2 {
        Some(e2n) => dmp2_ev(ctx, &states, e2n, &mut notes)?,
        None => None,
    };
    let mut cc = super::delta_cc::CcEnergies::default();
    match (ctx.neutral_cc, ctx.opts.cc) {
        (Some(ncc), Some(which)) => {
            match super::delta_cc::delta(
                ctx.mol,
                ctx.basis,
                wf,
                ncc,
                which,
                Some(super::memory::cc_budget_bytes(ctx.opts) as usize),
                ctx.opts.natural_virtuals,
                ctx.opts.progress,
            ) {
                Ok((s, t, cut)) => {
                    cc.dccsd_ev = Some(s);
                    cc.dccsdt_ev = t;
                    if let (Some(i), Some(n)) = (cut, ncc.natural_virtuals.as_ref()) {
                        notes.push(CoreNote::NaturalVirtuals(CutPair::new(n, &i)));
                    }
                }
                Err(Error::TooLarge(m)) if ctx.opts.cc_optional => {
                    notes.push(CoreNote::CoupledClusterSkipped { reason: m })
                }
                Err(e) => return Err(e),
            }
        }
        (None, Some(_)) => notes.push(CoreNote::CoupledClusterSkipped {
            reason: "the neutral's coupled cluster did not fit the memory available".into(),
        }),
        _ => {}
    }
    let dscf_ev = best.attempt.dscf_ev.expect("held state has an energy");
    super::delta_cc::recommend(dscf_ev, &mut cc, None);
    let z = ctx.mol.atoms[atom].z;
    Ok(CoreLevel {
        atom: atom + 1,
        element: symbol(z).to_string(),
        label: format!("{label} 1s"),
        environment: environments(ctx.mol).swap_remove(atom),
        shell: "1s".into(),
        koopmans_ev: ev(koopmans),
        dscf_ev,
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
        spin_orbit_ev: None,
        components: Vec::new(),
        spatial_holes: Vec::new(),
        cc,
        notes,
    })
}

/// The delocalised (symmetry-kept) hole of `atom` and its partners, if one converges.
fn delocalised_for(
    ctx: &HoleContext,
    scf: &mut ScfContext,
    cation: &Molecule,
    loc: &LocalisedHole,
    atom: usize,
    partners: &[usize],
) -> Option<DelocalisedHole> {
    let nw = ctx.neutral;
    let occ_flags = nw.occ_alpha.clone();
    delocalised_hole(
        &DelocalisedSetup {
            cation,
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
            jk_fitting: ctx.jk_fitting.clone(),
        },
        scf,
    )
}

/// The held state of lowest ΔSCF energy among the states `keep` accepts.
pub(crate) fn lowest_held(
    states: &[CationState],
    keep: impl Fn(&CationState) -> bool,
) -> Option<&CationState> {
    states
        .iter()
        .filter(|s| s.attempt.status == HoleStatus::Held && keep(s))
        .min_by(|a, b| {
            a.attempt
                .dscf_ev
                .unwrap_or(f64::MAX)
                .total_cmp(&b.attempt.dscf_ev.unwrap_or(f64::MAX))
        })
}

/// The computation error when no start held the hole: what each start did.
pub(crate) fn no_hole_error(label: &str, attempts: &[HoleAttempt], koopmans: f64) -> Error {
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
    Error::computation(format!("{label}: {}", what.join("; ")))
}

/// Notes on where the hole sat: localised, delocalised beside it, or canonical kept.
fn hole_notes(
    ctx: &HoleContext,
    loc: &LocalisedHole,
    localised: bool,
    partners: &[usize],
    label: &str,
    delocalised: &Option<DelocalisedHole>,
    best: &HoleAttempt,
) -> Notes {
    let mut notes = Notes::default();
    if localised {
        let mut eq: Vec<String> = partners.iter().map(|&p| atom_label(ctx.mol, p)).collect();
        eq.insert(0, label.to_string());
        notes.push(CoreNote::HoleLocalised {
            atom: label.to_string(),
            equivalent: eq,
            canonical_percent: 100.0 * loc.canonical_population,
            localised_percent: 100.0 * loc.population,
        });
    }
    match (delocalised, ctx.opts.delocalised && !partners.is_empty()) {
        (Some(d), _) => notes.push(CoreNote::DelocalisedHole {
            group: d.group.clone(),
            dscf_ev: d.dscf_ev,
            above_localised_ev: d.dscf_ev - best.dscf_ev.unwrap_or(f64::NAN),
            shares: describe_shares(ctx.mol, &d.vacancy_shares),
        }),
        (None, true) => notes.push(CoreNote::NoDelocalisedHole),
        _ => {}
    }
    if !ctx.opts.localise && loc.rotated() {
        let pop = best.hole_population.unwrap_or(0.0);
        let atom = label.to_string();
        notes.push(if pop > 0.75 {
            CoreNote::SelfLocalised {
                atom,
                percent: 100.0 * pop,
            }
        } else {
            CoreNote::CanonicalHoleKept {
                atom,
                percent: 100.0 * pop,
            }
        });
    }
    notes
}

/// ΔSCF plus the change of the MP2 energy (eV), from the best UHF cation that held the hole
/// (UMP2 needs an unrestricted reference: an ROHF winner is passed over); None with a note
/// when no UHF start held it.
pub(crate) fn dmp2_ev(
    ctx: &HoleContext,
    states: &[CationState],
    neutral_mp2: f64,
    notes: &mut Notes,
) -> Result<Option<f64>> {
    let uhf = lowest_held(states, |s| s.attempt.start != "rohf");
    match uhf.and_then(|s| s.wf.as_ref()) {
        Some(u) => {
            let e2c = mp2_energy(ctx.basis, u)?;
            Ok(Some(ev(u.energy + e2c - ctx.neutral.energy - neutral_mp2)))
        }
        None => {
            notes.push(CoreNote::NoUhfForMp2);
            Ok(None)
        }
    }
}

/// The starts for one hole. Thorough: all of them. Otherwise stop at the first start that
/// holds the hole.
pub(crate) fn search(setup: &HoleSetup, scf: &mut ScfContext, thorough: bool) -> Vec<CationState> {
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
        Some(ov) if ov >= IMOM_SKIP_OVERLAP => states.push(skipped_imom(ov)),
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

/// The IMOM start, not run because MOM's hole stayed in its orbital (`overlap`).
fn skipped_imom(overlap: f64) -> CationState {
    CationState {
        attempt: HoleAttempt {
            start: "imom".into(),
            status: HoleStatus::Skipped,
            dscf_ev: None,
            s2: None,
            hole_population: None,
            iterations: None,
            message: Some(format!(
                "not run: the MOM hole stayed in its initial orbital (overlap {overlap:.3}), \
                 where IMOM gives the same state"
            )),
        },
        wf: None,
    }
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
