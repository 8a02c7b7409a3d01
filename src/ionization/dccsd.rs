//! ΔCCSD(T) valence ionization energies: IE = E_CCSD(T)(cation) − E_CCSD(T)(neutral), the
//! cation a UHF state held by MOM with the hole in the chosen orbital (dscf.rs), each state
//! its own SCF and its own coupled cluster (`correlation::open_shell`: spin-orbital CCSD
//! and (T) on UHF references; an open-shell neutral is its UHF determinant). Frozen core by
//! chem/frozen_core.rs in both states. This is the definition of the ΔCCSD(T) reference IEs
//! of Krause, Harding & Klopper, Mol. Phys. 113 (2015) 1952 (docs/reference-data.md §2).
//!
//! The cation's lowest state of each symmetry is reached when the hole is put in the
//! highest orbital of that symmetry; a hole in a deeper orbital of the same symmetry relaxes
//! towards the lower state, and the hole weight says so (`hole_moved`).

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::correlation::open_shell::{self, FrozenCore, NaturalVirtuals, OpenShellOptions};
use crate::correlation::two_electron::TwoElectron;
use crate::error::Result;
use crate::ionization::dscf::{cation_wavefunction, exact_s2, hole_weight, HoldRoute, HOLE_KEPT};
use crate::ionization::koopmans::Spin;
use crate::scf::{ScfOptions, Wavefunction};

/// One ΔCCSD(T) ionization.
#[derive(Debug, Clone, PartialEq)]
pub struct CcHole {
    /// IE (hartree) at ΔCCSD(T), and at ΔCCSD and ΔSCF beside it.
    pub ie: f64,
    pub ie_ccsd: f64,
    pub ie_scf: f64,
    /// Total CCSD(T) energies (hartree) of the neutral and of the cation: the published
    /// reference sets give them too, so a check can say which state differs.
    pub neutral_energy: f64,
    pub cation_energy: f64,
    pub hole_overlap: f64,
    pub hole_moved: bool,
    /// ⟨S²⟩ of the cation's UHF determinant, and the exact S(S+1) of its spin state.
    pub s2: f64,
    pub s2_exact: f64,
    /// How the cation SCF was held on the hole (None for a cation without electrons).
    pub route: Option<HoldRoute>,
    /// The frozen-natural-orbital cuts of the neutral and the cation, when asked for.
    pub natural_virtuals: Option<(NaturalVirtuals, NaturalVirtuals)>,
}

/// ΔCCSD(T) for the given holes of a converged neutral; a hole whose cation SCF or coupled
/// cluster fails (deep holes of non-aufbau states may not converge) is an error of its own.
#[allow(clippy::too_many_arguments)]
pub fn dccsd_t(
    mol: &Molecule,
    basis: &BasisSet,
    neutral: &Wavefunction,
    overlap: &Mat<f64>,
    holes: &[(Spin, usize)],
    base: &ScfOptions,
    frozen_core: bool,
    two_electron: &TwoElectron,
    memory_bytes: Option<f64>,
    natural_virtuals: Option<f64>,
    progress: bool,
) -> Result<Vec<Result<CcHole>>> {
    let say = |state: String| {
        move |line: &str| {
            if progress {
                eprintln!("  [{state}] {line}");
            }
        }
    };
    let opts = OpenShellOptions {
        natural_virtuals,
        frozen_core: if frozen_core {
            FrozenCore::Standard
        } else {
            FrozenCore::None
        },
        two_electron: two_electron.clone(),
        memory_budget: memory_bytes,
        ..Default::default()
    };
    let n = open_shell::run(mol, basis, neutral, &opts, &mut say("neutral".into()))?;
    let en = n.e_ccsd_t().expect("(T) asked");
    Ok(holes
        .iter()
        .map(|&(spin, orbital)| -> Result<CcHole> {
            let (cation, hole_spin, wf) =
                cation_wavefunction(mol, basis, neutral, spin, orbital, base)?;
            let Some((wf, route)) = wf else {
                let e = cation.nuclear_repulsion();
                return Ok(CcHole {
                    ie: e - en,
                    ie_ccsd: e - n.e_ccsd(),
                    ie_scf: e - neutral.energy,
                    neutral_energy: en,
                    cation_energy: e,
                    hole_overlap: 1.0,
                    hole_moved: false,
                    s2: 0.0,
                    s2_exact: 0.0,
                    route: None,
                    natural_virtuals: None,
                });
            };
            let (c_ref, c, occ) = match hole_spin {
                Spin::Alpha => (&neutral.c_alpha, &wf.c_alpha, &wf.occ_alpha),
                _ => (&neutral.c_beta, &wf.c_beta, &wf.occ_beta),
            };
            let w = hole_weight(overlap, c_ref, orbital, c, occ);
            let r = open_shell::run(
                &cation,
                basis,
                &wf,
                &opts,
                &mut say(format!("cation, hole in MO {}", orbital + 1)),
            )?;
            let ec = r.e_ccsd_t().expect("(T) asked");
            Ok(CcHole {
                ie: ec - en,
                ie_ccsd: r.e_ccsd() - n.e_ccsd(),
                ie_scf: wf.energy - neutral.energy,
                neutral_energy: en,
                cation_energy: ec,
                hole_overlap: w,
                hole_moved: w < HOLE_KEPT,
                s2: wf.s2,
                s2_exact: exact_s2(&cation),
                route: Some(route),
                natural_virtuals: n.natural_virtuals.clone().zip(r.natural_virtuals.clone()),
            })
        })
        .collect())
}
