//! Valence photoelectron bands of a molecule: SCF reference, occupied orbitals grouped into
//! bands, one ionization method for their energies, labels and make-up from the orbital
//! analysis, and flags where the band order is in doubt.
//!
//! This is the entry point other modules (spectrum, assignment, the CLI) call:
//! [`predict`] (runs the SCF) or [`predict_with`] (reuses a converged reference).

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::chem::frozen_core::core_orbitals;
use crate::chem::Molecule;
use crate::correlation::open_shell::CutPair;
use crate::error::{Error, Result};
use crate::integrals::EriEngine;
use crate::ionization::annotate::Annotator;
use crate::ionization::band::Band;
use crate::ionization::bands::{
    group_degenerate, make_band, BandEnergy, OrbitalSet, DEGENERACY_TOL,
};
use crate::ionization::dscf::{dscf_each, HoldRoute};
use crate::ionization::ep2::{ep2, Ep2Options};
use crate::ionization::koopmans::{koopmans, Spin};
use crate::ionization::method::Method;
use crate::ionization::notice::ValenceNotice;
use crate::ionization::uncertainty::{disagreements, merge, within_error, UncertainPair};
use crate::scf::{Reference, ScfOptions, Wavefunction};
use crate::units::ev;

/// Pole strengths below this get a warning: the one-hole picture is failing (inner valence).
pub const LOW_POLE_STRENGTH: f64 = 0.85;

/// Bands with Koopmans IEs up to this much above the window are computed as candidates,
/// because correlated methods usually lower Koopmans' IEs (by 2.5 eV for F2, by 3.5 eV for
/// some σ bands in a minimal basis).
const WINDOW_MARGIN_EV: f64 = 5.0;

/// Extra bands computed beyond `count` so that a band that overtakes one in the Koopmans
/// order (N2's 3σg) is not lost.
pub const COUNT_MARGIN: usize = 2;

/// ΔCCSD(T) runs a cation SCF and a coupled cluster per band (an hour each for benzene in
/// triple-zeta), so of the `COUNT_MARGIN` extra bands it keeps only those whose Koopmans IE
/// lies within this much of the last counted band's. The largest reordering by
/// correlation in the molecules measured here is N2's 3σg overtaking 1πu from 0.6 eV
/// behind in Koopmans' order (docs/valence-methods.md); lone pairs of azabenzenes move about
/// 1.5 eV against π bands (common practice).
pub const STATE_SPECIFIC_OVERTAKE_EV: f64 = 3.0;

#[derive(Debug, Clone)]
pub struct ValenceOptions {
    pub method: Method,
    /// Keep the `count` lowest-IE bands.
    pub count: Option<usize>,
    /// Keep bands with IE up to this value (eV), e.g. 21.2 for a He I lamp.
    pub window_ev: Option<f64>,
    /// Keep bands with IE from this value (eV) on; used only together with `window_ev`.
    pub window_min_ev: Option<f64>,
    /// Leave core orbitals out of the EP2 sums (common practice; they are never listed as
    /// valence bands anyway).
    pub frozen_core: bool,
    /// Also order the bands by Koopmans and flag pairs the two methods order differently.
    pub compare_with_koopmans: bool,
    /// Orbital energies closer than this (hartree) form one band.
    pub degeneracy_tol: f64,
    /// Memory for MO integrals (bytes).
    pub memory_bytes: usize,
    /// Two-electron integrals of eom-ccsd / eom-mp2 (density fitting by default).
    pub eom_integrals: crate::correlation::two_electron::TwoElectron,
    /// SCF settings for the neutral (and, for ΔSCF, the base settings for the cations).
    pub scf: ScfOptions,
    /// Frozen natural orbitals for ΔCCSD(T): the fraction of the MP2 virtual population
    /// kept (`correlation::open_shell::natural_virtuals`); None: all virtuals.
    pub natural_virtuals: Option<f64>,
    /// Write the coupled-cluster iterations of ΔCCSD(T) to stderr as they run (the CLI's
    /// `--verbose`).
    pub progress: bool,
}

impl Default for ValenceOptions {
    fn default() -> Self {
        ValenceOptions {
            method: Method::Ep2,
            count: None,
            window_ev: None,
            window_min_ev: None,
            frozen_core: true,
            compare_with_koopmans: true,
            degeneracy_tol: DEGENERACY_TOL,
            memory_bytes: 4_000_000_000,
            eom_integrals: crate::correlation::two_electron::TwoElectron::Auto,
            scf: ScfOptions::default(),
            natural_virtuals: None,
            progress: false,
        }
    }
}

/// The default method for a molecule: EP2 for closed shells, ΔSCF for open shells (EP2 is
/// closed-shell only here).
pub fn default_method(mol: &Molecule) -> Method {
    if mol.multiplicity == 1 {
        Method::Ep2
    } else {
        Method::Dscf
    }
}

#[derive(Debug, Clone)]
pub struct ValenceResult {
    pub method: Method,
    /// Basis-set name.
    pub basis: String,
    /// Schoenflies symbol of the point group used for labels, when known.
    pub point_group: Option<String>,
    /// Bands ordered by `ie_ev` ascending.
    pub bands: Vec<Band>,
    /// Koopmans IE (eV) of each band, same order as `bands`.
    pub koopmans_ev: Vec<f64>,
    /// How the job was run (integral factorisation, frozen core, correlation energies,
    /// the default-method rule): information, not a problem.
    pub notes: Vec<ValenceNotice>,
    /// Something the user should look at (low pole strength, a hole that moved, a root
    /// that did not converge, spin contamination, …).
    pub warnings: Vec<ValenceNotice>,
    pub uncertain_pairs: Vec<UncertainPair>,
    /// Total SCF energy of the neutral (hartree).
    pub reference_energy: f64,
    pub reference: Reference,
}

/// Run the SCF of the neutral and predict its valence bands.
pub fn predict(mol: &Molecule, basis: &BasisSet, opts: &ValenceOptions) -> Result<ValenceResult> {
    let mut scf = opts.scf.clone();
    scf.reference = if mol.multiplicity == 1 {
        Reference::Rhf
    } else {
        Reference::Uhf
    };
    scf.memory_budget_bytes = scf.memory_budget_bytes.min(opts.memory_bytes);
    memory_preflight(mol, basis, opts, &scf)?;
    let wf = crate::scf::run(mol, basis, &scf)?;
    predict_with(mol, basis, &wf, opts)
}

/// Predict valence bands from a converged SCF wavefunction of `mol`.
pub fn predict_with(
    mol: &Molecule,
    basis: &BasisSet,
    wf: &Wavefunction,
    opts: &ValenceOptions,
) -> Result<ValenceResult> {
    if let Some(0) = opts.count {
        return Err(Error::input("the band count must be at least 1"));
    }
    if let Some(w) = opts.window_ev {
        if !(w > 0.0) {
            return Err(Error::input(
                "the upper end of the energy window must be a positive energy in eV",
            ));
        }
        if let Some(lo) = opts.window_min_ev {
            if !(lo.is_finite() && lo < w) {
                return Err(Error::input(
                    "the lower end of the energy window must lie below its upper end",
                ));
            }
        }
    }
    let mut warnings = Vec::new();
    if !wf.converged {
        return Err(Error::computation(
            "the SCF reference is not converged; no ionization energies from it",
        ));
    }
    if wf.reference != Reference::Rhf && wf.s2 > 0.0 {
        let s = (mol.multiplicity as f64 - 1.0) / 2.0;
        let exact = s * (s + 1.0);
        if wf.s2 - exact > 0.1 {
            warnings.push(ValenceNotice::SpinContaminated { s2: wf.s2, exact });
        }
    }

    // Valence orbitals: all occupied minus the core of each spin.
    let n_core = core_orbitals(mol);
    let occupied = koopmans(wf);
    let core_of = |spin: Spin| -> Vec<usize> {
        let mut idx: Vec<(f64, usize)> = occupied
            .iter()
            .filter(|o| o.spin == spin)
            .map(|o| (o.epsilon, o.index))
            .collect();
        idx.sort_by(|a, b| a.0.total_cmp(&b.0));
        idx.into_iter().take(n_core).map(|(_, i)| i).collect()
    };
    let core: Vec<(Spin, usize)> = [Spin::Restricted, Spin::Alpha, Spin::Beta]
        .into_iter()
        .flat_map(|s| core_of(s).into_iter().map(move |i| (s, i)))
        .collect();
    let valence: Vec<_> = occupied
        .iter()
        .filter(|o| !core.contains(&(o.spin, o.index)))
        .cloned()
        .collect();
    if valence.is_empty() {
        return Err(Error::input(
            "the molecule has no valence electrons to ionize (core levels: `bandcast core`)",
        ));
    }

    let s: Mat<f64> = crate::integrals::overlap(basis);
    let mut analysis_warnings = Vec::new();
    let notes = Annotator::new(mol, basis, wf, &s, &mut analysis_warnings);
    warnings.extend(analysis_warnings.into_iter().map(ValenceNotice::Analysis));
    let sets = group_degenerate(
        &valence,
        |spin, i| notes.set_key(spin, i),
        opts.degeneracy_tol,
    );

    // Candidate sets by Koopmans order.
    let mut candidates: Vec<OrbitalSet> = sets;
    if let Some(w) = opts.window_ev {
        candidates.retain(|s| ev(s.koopmans_ie()) <= w + WINDOW_MARGIN_EV);
        if opts.method == Method::Koopmans {
            candidates.retain(|s| ev(s.koopmans_ie()) <= w);
        }
        if let Some(lo) = opts.window_min_ev {
            // correlated methods move IEs by a few eV either way of Koopmans'
            let margin = if opts.method == Method::Koopmans {
                0.0
            } else {
                WINDOW_MARGIN_EV
            };
            candidates.retain(|s| ev(s.koopmans_ie()) >= lo - margin);
        }
    }
    if let Some(c) = opts.count {
        let extra = if opts.method == Method::Koopmans {
            0
        } else {
            COUNT_MARGIN
        };
        candidates.truncate(c + extra);
        if opts.method == Method::DccsdT && candidates.len() > c {
            let last = candidates[c - 1].koopmans_ie();
            let near = candidates[c..]
                .iter()
                .take_while(|s| ev(s.koopmans_ie() - last) <= STATE_SPECIFIC_OVERTAKE_EV)
                .count();
            candidates.truncate(c + near);
        }
    }

    let mut run_notes = Vec::new();
    let energies = method_energies(
        mol,
        basis,
        wf,
        &s,
        &candidates,
        opts,
        n_core,
        &mut run_notes,
        &mut warnings,
    )?;

    // A set without an energy (an EOM root that did not converge) is left out; the method
    // said so in a warning.
    let mut rows: Vec<(Band, f64)> = candidates
        .iter()
        .zip(&energies)
        .filter_map(|(set, e)| {
            let e = (*e)?;
            let n = notes.notes(set);
            Some((
                make_band(set, e, &n, opts.method.name()),
                ev(set.koopmans_ie()),
            ))
        })
        .collect();
    rows.sort_by(|a, b| a.0.ie_ev.total_cmp(&b.0.ie_ev));
    if let Some(w) = opts.window_ev {
        rows.retain(|r| r.0.ie_ev <= w);
        if let Some(lo) = opts.window_min_ev {
            rows.retain(|r| r.0.ie_ev >= lo);
        }
    }
    if let Some(c) = opts.count {
        rows.truncate(c);
    }
    let (bands, koopmans_ev): (Vec<Band>, Vec<f64>) = rows.into_iter().unzip();

    for b in &bands {
        if let Some(p) = b.pole_strength {
            if p < LOW_POLE_STRENGTH {
                warnings.push(ValenceNotice::LowPoleStrength {
                    band: b.label.clone(),
                    pole_strength: p,
                });
            }
        }
    }

    let close = within_error(&bands, opts.method);
    let disagree = if opts.compare_with_koopmans && opts.method != Method::Koopmans {
        disagreements(&bands, opts.method, &koopmans_ev, Method::Koopmans)
    } else {
        Vec::new()
    };
    let uncertain_pairs = merge(disagree, close);

    Ok(ValenceResult {
        method: opts.method,
        basis: basis.name.clone(),
        point_group: notes.point_group(),
        bands,
        koopmans_ev,
        notes: run_notes,
        warnings,
        uncertain_pairs,
        reference_energy: wf.energy,
        reference: wf.reference,
    })
}

/// The chosen method's energy for each orbital set (one representative per degenerate set);
/// None where the method gave none (an unconverged EOM root).
fn method_energies(
    mol: &Molecule,
    basis: &BasisSet,
    wf: &Wavefunction,
    s: &Mat<f64>,
    sets: &[OrbitalSet],
    opts: &ValenceOptions,
    n_core: usize,
    notes: &mut Vec<ValenceNotice>,
    warnings: &mut Vec<ValenceNotice>,
) -> Result<Vec<Option<BandEnergy>>> {
    let all = |v: Vec<BandEnergy>| v.into_iter().map(Some).collect();
    match opts.method {
        Method::Koopmans => Ok(all(sets
            .iter()
            .map(|s| BandEnergy {
                ie: s.koopmans_ie(),
                ..Default::default()
            })
            .collect())),
        Method::Ep2 => {
            let engine = EriEngine::new(basis);
            let targets: Vec<usize> = sets.iter().map(|s| s.representative()).collect();
            let ep = Ep2Options {
                frozen_core: if opts.frozen_core { n_core } else { 0 },
                memory_bytes: opts.memory_bytes,
                ..Default::default()
            };
            let poles = ep2(&engine, basis, wf, &targets, &ep)?;
            Ok(all(poles
                .iter()
                .map(|p| BandEnergy {
                    ie: p.ie,
                    pole_strength: Some(p.pole_strength),
                    one_hole_weight: None,
                })
                .collect()))
        }
        Method::Dscf => {
            let holes: Vec<(Spin, usize)> =
                sets.iter().map(|s| (s.spin, s.representative())).collect();
            let res = dscf_each(mol, basis, wf, s, &holes, &opts.scf)?;
            let mut out = Vec::new();
            for (set, h) in sets.iter().zip(res) {
                let h = match h {
                    Ok(h) => h,
                    Err(e) => {
                        warnings.push(ValenceNotice::MethodWarning(format!(
                            "MO {}: ΔSCF failed: {e}",
                            set.representative() + 1
                        )));
                        out.push(None);
                        continue;
                    }
                };
                cation_notices(
                    set.representative() + 1,
                    h.route,
                    h.s2,
                    h.s2_exact,
                    notes,
                    warnings,
                );
                if h.hole_moved {
                    warnings.push(ValenceNotice::HoleMoved {
                        mo: set.representative() + 1,
                        percent: 100.0 * h.hole_overlap,
                    });
                }
                if h.ie <= 0.0 {
                    warnings.push(ValenceNotice::CationBelowNeutral {
                        mo: set.representative() + 1,
                        ie_ev: ev(h.ie),
                    });
                }
                out.push(Some(BandEnergy {
                    ie: h.ie,
                    ..Default::default()
                }));
            }
            Ok(out)
        }
        Method::DccsdT => {
            let holes: Vec<(Spin, usize)> =
                sets.iter().map(|s| (s.spin, s.representative())).collect();
            let res = crate::ionization::dccsd::dccsd_t(
                mol,
                basis,
                wf,
                s,
                &holes,
                &opts.scf,
                opts.frozen_core,
                &opts.eom_integrals,
                Some(opts.memory_bytes as f64),
                opts.natural_virtuals,
                opts.progress,
            )?;
            let mut out = Vec::new();
            for (set, h) in sets.iter().zip(res) {
                match h {
                    Ok(h) => {
                        let mo = set.representative() + 1;
                        cation_notices(mo, h.route, h.s2, h.s2_exact, notes, warnings);
                        notes.push(ValenceNotice::DeltaCcLevels {
                            mo,
                            dscf_ev: ev(h.ie_scf),
                            dccsd_ev: ev(h.ie_ccsd),
                            dccsdt_ev: ev(h.ie),
                            s2: h.s2,
                            neutral_eh: h.neutral_energy,
                            cation_eh: h.cation_energy,
                        });
                        if let Some((n, c)) = &h.natural_virtuals {
                            notes.push(ValenceNotice::NaturalVirtuals {
                                mo,
                                cut: CutPair::new(n, c),
                            });
                        }
                        if h.hole_moved {
                            warnings.push(ValenceNotice::HoleMoved {
                                mo: set.representative() + 1,
                                percent: 100.0 * h.hole_overlap,
                            });
                        }
                        out.push(Some(BandEnergy {
                            ie: h.ie,
                            ..Default::default()
                        }));
                    }
                    Err(e) => {
                        warnings.push(ValenceNotice::MethodWarning(format!(
                            "MO {}: ΔCCSD(T) failed: {e}",
                            set.representative() + 1
                        )));
                        out.push(None);
                    }
                }
            }
            Ok(out)
        }
        // bandcast::correlation::eom_ip: one EOM root started from each set's representative.
        Method::EomCcsd | Method::EomMp2 => {
            use crate::correlation::eom_ip::{band_energies, EomMethod};
            let m = if opts.method == Method::EomCcsd {
                EomMethod::Ccsd
            } else {
                EomMethod::Mbpt2
            };
            let reps: Vec<usize> = sets.iter().map(|s| s.representative()).collect();
            let _ = (s, n_core);
            let (res, run_notes, run_warnings) = band_energies(
                mol,
                basis,
                wf,
                &reps,
                m,
                opts.frozen_core,
                Some(opts.memory_bytes as f64),
                &opts.eom_integrals,
            )?;
            notes.extend(run_notes.into_iter().map(ValenceNotice::MethodNote));
            warnings.extend(run_warnings.into_iter().map(ValenceNotice::MethodWarning));
            Ok(res
                .into_iter()
                .map(|r| {
                    r.map(|(ie, w)| BandEnergy {
                        ie,
                        pole_strength: None,
                        one_hole_weight: Some(w),
                    })
                })
                .collect())
        }
    }
}

/// The notes and warnings of one ΔSCF/ΔCCSD(T) cation: how its SCF was held, and its spin
/// contamination (more than 0.1 above S(S+1), the threshold of the neutral's warning).
fn cation_notices(
    mo: usize,
    route: Option<HoldRoute>,
    s2: f64,
    s2_exact: f64,
    notes: &mut Vec<ValenceNotice>,
    warnings: &mut Vec<ValenceNotice>,
) {
    if route == Some(HoldRoute::Rohf) {
        notes.push(ValenceNotice::CationRohf { mo });
    }
    if route.is_some() && s2 - s2_exact > 0.1 {
        warnings.push(ValenceNotice::CationSpinContaminated {
            mo,
            s2,
            exact: s2_exact,
        });
    }
}

/// The memory estimates of the stages of a valence prediction, made from the molecule and
/// basis before any integral is computed: the SCF floor (direct Fock build), then for
/// EOM-IP the correlated plan (`correlation::memory::plan`, with the frozen-core space
/// unless the core is correlated). Refuses with `Error::TooLarge` naming the cheaper option
/// when a stage cannot fit; returns (stage, bytes) estimates otherwise.
pub fn memory_preflight(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ValenceOptions,
    scf: &ScfOptions,
) -> Result<Vec<(&'static str, f64)>> {
    use crate::correlation::memory::{self, FactorRoute, Stage};
    use crate::correlation::two_electron::TwoElectron;
    let mut out = vec![("scf", crate::scf::memory::check(basis.n_basis, scf)?)];
    let nocc = mol.n_electrons() / 2;
    if opts.method == Method::Ep2 && mol.multiplicity == 1 && basis.n_basis > nocc {
        // one target orbital: the least the EP2 transformation can need
        use crate::integrals::mo_transform::{estimate_bytes_for, max_shell_functions};
        let no = if opts.frozen_core {
            nocc - core_orbitals(mol).min(nocc)
        } else {
            nocc
        };
        let nv = basis.n_basis - nocc;
        let need = estimate_bytes_for(
            basis.n_basis,
            max_shell_functions(basis),
            &[[1, nv, no, nv], [1, no, nv, no]],
            rayon::current_num_threads(),
        );
        if need > opts.memory_bytes {
            return Err(Error::TooLarge(format!(
                "EP2 needs at least {} for its MO integral transformation ({} basis functions), \
                 over the memory budget of {}; use --method koopmans or dscf, or a smaller basis",
                crate::system::format_bytes(need as f64),
                basis.n_basis,
                crate::system::format_bytes(opts.memory_bytes as f64)
            )));
        }
        out.push(("ep2", need as f64));
        return Ok(out);
    }
    let stage = match opts.method {
        Method::EomCcsd => Stage::EomCcsd,
        Method::EomMp2 => Stage::EomMbpt2,
        _ => return Ok(out),
    };
    // Open shells and bases without virtual orbitals are refused by the method itself.
    if mol.multiplicity != 1 || basis.n_basis <= nocc {
        return Ok(out);
    }
    let (ncorr, nvir, route) = crate::ionization::default_method::correlated_space(mol, basis);
    let ncorr = if opts.frozen_core { ncorr } else { nocc };
    let route = match opts.eom_integrals {
        TwoElectron::Cholesky => {
            FactorRoute::Cholesky(memory::expected_cholesky_vectors(basis.n_basis, 1e-5))
        }
        _ => route,
    };
    // 8 DIIS vectors and a 60-vector Davidson space: the EOM code's defaults.
    let plan = memory::plan(
        stage,
        basis.n_basis,
        ncorr,
        nvir,
        route,
        8,
        60,
        opts.memory_bytes as f64,
    )?;
    out.push((opts.method.name(), plan.peak_bytes));
    Ok(out)
}
