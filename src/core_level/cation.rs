//! The core-ionised cation: several SCF starts for one 1s hole, each judged, the lowest
//! state that still holds the hole kept.
//!
//! Starts (in this order):
//! 1. `mom`: UHF from the neutral orbitals with the localised 1s rotated in, β hole in that
//!    orbital, maximum overlap method against the previous iteration (Gilbert, Besley &
//!    Gill, J. Phys. Chem. A 112 (2008) 13164);
//! 2. `imom`: the same with overlaps always taken against the initial orbitals (IMOM:
//!    Barca, Gilbert & Gill, J. Chem. Theory Comput. 14 (2018) 1501), which stops a hole from
//!    drifting a little at each iteration;
//! 3. `rohf`: restricted open-shell cation with MOM occupations (spin-pure, ⟨S²⟩ = 3/4), and
//!    `rohf→uhf`: UHF + MOM started from the ROHF orbitals, which reaches the relaxed UHF
//!    state from a spin-pure point when the first two get trapped in a spin-contaminated one.
//!
//! A start that does not converge, whose hole escaped or collapsed, is recorded but not used.

use bandcast_linalg::{mul, Mat};

use crate::basis::BasisSet;
use crate::chem::Molecule;
use std::sync::Arc;

use crate::scf::{
    DensitySymmetry, Guess, Occupation, Reference, ScfContext, ScfOptions, Wavefunction,
};
use crate::units::ev;

use super::hole_check::{judge, HoleStatus};
use super::population::orbital_population_on;
use super::result::HoleAttempt;

/// Iteration limit of one cation start (the SCF controller has tried DIIS, level shifts and
/// damping by then; a start that needs more is recorded as failed and the next one tried).
pub const MAX_ITER: usize = 100;

/// Convergence of a cation start: |ΔE| below this (hartree) between iterations …
///
/// The binding energy is printed to 0.01 eV (3.7e-4 Eh); near convergence the energy error
/// is second order in the orbital gradient. Measured on propane/cc-pVDZ (all starts of the
/// three C 1s holes): these thresholds give the same ΔSCF as the SCF defaults (1e-10 Eh,
/// 1e-8) to 1e-6 eV in 9–11 instead of 12–15 Fock builds per start.
pub const E_TOL: f64 = 1e-7;
/// … and RMS orthogonalised commutator below this.
pub const COMMUTATOR_TOL: f64 = 1e-5;

/// Everything a cation start needs.
pub struct HoleSetup<'a> {
    pub cation: &'a Molecule,
    pub basis: &'a BasisSet,
    pub s: &'a Mat<f64>,
    pub s_half: &'a Mat<f64>,
    /// Neutral orbitals with the core block rotated (AO × MO).
    pub c_ref: &'a Mat<f64>,
    /// Neutral occupations (α) and the same with the hole removed (β).
    pub occ_alpha: Vec<f64>,
    pub occ_beta: Vec<f64>,
    /// Column of `c_ref` holding the hole.
    pub hole: usize,
    pub atom: usize,
    pub e_neutral: f64,
    /// Koopmans 1s energy (hartree) for the collapse test.
    pub koopmans: f64,
    /// Whether the hole is meant to stay on the target atom.
    pub localised: bool,
    pub memory_budget_bytes: usize,
    /// Keep the densities symmetric under this constraint (the delocalised hole of
    /// `delocalised.rs`); None for the ordinary, unconstrained starts.
    pub symmetry: Option<Arc<dyn DensitySymmetry>>,
    /// Density-fitted J and K with this fitting set (prepared in the SCF context); None:
    /// exact integrals (`fitting.rs`).
    pub jk_fitting: Option<String>,
}

/// A converged cation with its verdict.
pub struct CationState {
    pub attempt: HoleAttempt,
    pub wf: Option<Wavefunction>,
}

fn base_options(setup: &HoleSetup) -> ScfOptions {
    let mut o = ScfOptions {
        max_iter: MAX_ITER,
        memory_budget_bytes: setup.memory_budget_bytes,
        e_tol: E_TOL,
        commutator_tol: COMMUTATOR_TOL,
        density_symmetry: setup.symmetry.clone(),
        ..ScfOptions::default()
    };
    super::fitting::apply(&mut o, setup.jk_fitting.as_deref());
    o
}

/// Run one start. `start` is "mom", "imom" or "rohf"; "rohf→uhf" is `from_rohf`.
pub fn run_start(setup: &HoleSetup, ctx: &mut ScfContext, start: &str) -> CationState {
    let mut o = base_options(setup);
    o.reference = if start == "rohf" {
        Reference::Rohf
    } else {
        Reference::Uhf
    };
    o.guess = Guess::Orbitals {
        c_alpha: setup.c_ref.clone(),
        c_beta: setup.c_ref.clone(),
    };
    o.occupation = Occupation::Mom {
        c_alpha_ref: setup.c_ref.clone(),
        c_beta_ref: setup.c_ref.clone(),
        occ_alpha: setup.occ_alpha.clone(),
        occ_beta: setup.occ_beta.clone(),
        initial: start == "imom",
    };
    finish(setup, start, ctx.run(setup.cation, &o, &mut |_| {}))
}

/// UHF + MOM started from a converged ROHF cation (its orbitals and occupations).
pub fn run_from_rohf(setup: &HoleSetup, ctx: &mut ScfContext, rohf: &Wavefunction) -> CationState {
    let mut o = base_options(setup);
    o.reference = Reference::Uhf;
    o.guess = Guess::Orbitals {
        c_alpha: rohf.c_alpha.clone(),
        c_beta: rohf.c_beta.clone(),
    };
    o.occupation = Occupation::Mom {
        c_alpha_ref: rohf.c_alpha.clone(),
        c_beta_ref: rohf.c_beta.clone(),
        occ_alpha: rohf.occ_alpha.clone(),
        occ_beta: rohf.occ_beta.clone(),
        initial: false,
    };
    finish(setup, "rohf→uhf", ctx.run(setup.cation, &o, &mut |_| {}))
}

fn finish(setup: &HoleSetup, start: &str, r: crate::Result<Wavefunction>) -> CationState {
    match r {
        Err(e) => CationState {
            attempt: HoleAttempt {
                start: start.into(),
                status: HoleStatus::Failed,
                dscf_ev: None,
                s2: None,
                hole_population: None,
                iterations: None,
                message: Some(e.to_string()),
            },
            wf: None,
        },
        Ok(wf) => {
            let pop = final_hole_population(setup, &wf);
            let dscf = wf.energy - setup.e_neutral;
            let status = judge(pop, dscf, setup.koopmans, setup.localised);
            CationState {
                attempt: HoleAttempt {
                    start: start.into(),
                    status,
                    dscf_ev: Some(ev(dscf)),
                    s2: Some(wf.s2),
                    hole_population: Some(pop),
                    iterations: Some(wf.iterations),
                    message: None,
                },
                wf: Some(wf),
            }
        }
    }
}

/// IMOM is not run when the MOM cation's vacancy overlaps the initial hole orbital at least
/// this much (|⟨hole|S|vacancy⟩|; relaxation alone leaves it at 0.98–1.00 for 1s holes).
pub const IMOM_SKIP_OVERLAP: f64 = 0.9;

/// The cation's vacant β orbital that overlaps most with the reference hole orbital: its
/// column and |overlap|.
fn final_vacancy(setup: &HoleSetup, wf: &Wavefunction) -> (usize, f64) {
    let n = setup.c_ref.nrows();
    let h = Mat::<f64>::from_fn(n, 1, |mu, _| setup.c_ref[(mu, setup.hole)]);
    let sh = mul(setup.s.as_ref(), false, h.as_ref(), false);
    let ov = mul(wf.c_beta.as_ref(), true, sh.as_ref(), false);
    let mut best = (0usize, -1.0f64);
    for j in 0..wf.c_beta.ncols() {
        let vacant = wf.occ_beta.get(j).copied().unwrap_or(0.0) < 0.5;
        if vacant && ov[(j, 0)].abs() > best.1 {
            best = (j, ov[(j, 0)].abs());
        }
    }
    best
}

/// |⟨reference hole|S|final vacancy⟩|: 1 when the hole stayed in the orbital it was put in.
pub fn final_hole_overlap(setup: &HoleSetup, wf: &Wavefunction) -> f64 {
    final_vacancy(setup, wf).1
}

/// Löwdin population on the target atom of the cation's vacant β orbital that overlaps most
/// with the reference hole orbital.
pub fn final_hole_population(setup: &HoleSetup, wf: &Wavefunction) -> f64 {
    final_hole_population_on(setup, wf, setup.atom)
}

/// The same on any atom.
pub fn final_hole_population_on(setup: &HoleSetup, wf: &Wavefunction, atom: usize) -> f64 {
    let n = setup.c_ref.nrows();
    let (j, _) = final_vacancy(setup, wf);
    let v: Vec<f64> = (0..n).map(|mu| wf.c_beta[(mu, j)]).collect();
    orbital_population_on(setup.basis, setup.s_half, &v, atom)
}
