//! Before and during a vibronic run: what it will cost (gradients, memory) and where it is
//! (stages reported to a callback). No I/O: the command line turns these into the estimate
//! line, the refusal and the progress bars.
//!
//! **Work.** Almost all the time of `band::vibronic_bands` goes into SCF + analytic
//! gradient evaluations: the neutral's optimisation (a few to ~20 gradients), its Hessian
//! by central differences (6N gradients for N atoms), and per band a vertical SCF, the
//! cation's optimisation and its Hessian (another 6N). The Franck–Condon sums are bounded
//! separately (`progression::FcOptions`: at most `max_overlaps` overlaps). The estimate
//! counts gradients with `ASSUMED_OPTIMISATION_STEPS` per optimisation; the time per
//! gradient is not known before the first one, so the command line times the neutral's
//! first gradient (a cold start, the slowest) and multiplies.
//!
//! **Memory.** The direct-SCF floor of the open-shell cation (`scf::memory`, the largest
//! state), the analytic gradient's work matrices, the (3N)² Hessian, and the engine's stated
//! bounds: one block of `max_block_points` overlaps, at most 2 × `max_lines` lines held while
//! generating, and the screening tables. In-core integrals are used only where they fit the
//! budget, so they are not part of the floor. The correlated vertical energies of the
//! composite choose their method within the same budget (`ionization::default_method`) and
//! are not counted here.

use crate::basis;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::scf::memory::direct_floor_bytes;
use crate::scf::{Reference, ScfOptions};
use crate::system::format_bytes;

use super::progression::FcOptions;

/// Optimisation steps (gradients) assumed per state in the estimate: quasi-Newton
/// optimisations from a reasonable start take 5–20 steps (common practice).
pub const ASSUMED_OPTIMISATION_STEPS: usize = 15;

/// Bytes held per kept vibronic line while generating (energy, intensity, two small quanta
/// vectors and their heap headers).
const LINE_BYTES: f64 = 160.0;

/// Words of N×N work matrices of the analytic gradient beyond the SCF's own (energy-weighted
/// density, per-spin densities, derivative accumulators).
const GRADIENT_MATRICES: f64 = 8.0;

/// Stages of a vibronic run, reported as they start or advance.
#[derive(Debug, Clone, PartialEq)]
pub enum Stage {
    /// The neutral's optimisation: one gradient per step.
    NeutralOptimisation { step: usize },
    /// The neutral's Hessian: `done` of `total` displaced gradients.
    NeutralHessian { done: usize, total: usize },
    /// Band `band` (0-based, of `bands`): the cation at the neutral's minimum.
    IonVertical { band: usize, bands: usize },
    /// Band `band`: the cation's optimisation.
    IonOptimisation {
        band: usize,
        bands: usize,
        step: usize,
    },
    /// Band `band`: the cation's Hessian.
    IonHessian {
        band: usize,
        bands: usize,
        done: usize,
        total: usize,
    },
    /// Band `band`: the Franck–Condon progression (or the linear-coupling fallback).
    FranckCondon { band: usize, bands: usize },
}

/// What a vibronic run is expected to cost.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct VibronicEstimate {
    pub atoms: usize,
    pub basis_functions: usize,
    pub bands: usize,
    /// Gradients of the two Hessians per band and the neutral's (exact: 6N each).
    pub hessian_gradients: usize,
    /// Gradients of the optimisations, `ASSUMED_OPTIMISATION_STEPS` per state (assumed).
    pub optimisation_gradients: usize,
    /// Peak memory (bytes) of the largest stage (module comment).
    pub peak_bytes: f64,
}

impl VibronicEstimate {
    /// All gradient evaluations expected (plus one vertical SCF per band).
    pub fn gradients(&self) -> usize {
        self.hessian_gradients + self.optimisation_gradients
    }

    /// Seconds expected from the time of one gradient.
    pub fn seconds(&self, seconds_per_gradient: f64) -> f64 {
        (self.gradients() + self.bands) as f64 * seconds_per_gradient
    }
}

/// The cost of `count` bands of `mol` in `basis_name` (module comment). Err(Input) when the
/// basis does not load.
pub fn estimate(
    mol: &Molecule,
    basis_name: &str,
    count: usize,
    fc: &FcOptions,
) -> Result<VibronicEstimate> {
    let b = basis::load(basis_name, mol, None)?;
    let atoms = mol.atoms.len();
    let nb = b.n_basis;
    let uhf = ScfOptions {
        reference: Reference::Uhf,
        ..ScfOptions::default()
    };
    let scf = direct_floor_bytes(nb, &uhf);
    let grad = GRADIENT_MATRICES * 8.0 * (nb * nb) as f64;
    // neutral + the reference state kept for the displaced guesses + the current state
    let states = 2.0 * 8.0 * 4.0 * (nb * nb) as f64;
    let hessian = 8.0 * (3 * atoms * 3 * atoms) as f64;
    let fc_bytes = 8.0 * fc.max_block_points as f64
        + 2.0 * fc.max_lines as f64 * LINE_BYTES
        + 2.0 * fc.max_combinations_per_class as f64 * 64.0;
    // the FC stage runs after the SCF stages of its band have released their matrices, but
    // the neutral and the band's cation stay alive: count them together (upper side)
    let peak_bytes = scf + grad + states + hessian + fc_bytes;
    Ok(VibronicEstimate {
        atoms,
        basis_functions: nb,
        bands: count,
        hessian_gradients: (count + 1) * 6 * atoms,
        optimisation_gradients: (count + 1) * ASSUMED_OPTIMISATION_STEPS,
        peak_bytes,
    })
}

/// Refuse (`Error::TooLarge`, exit 2) when the estimate exceeds `budget_bytes`.
pub fn check_memory(est: &VibronicEstimate, budget_bytes: f64) -> Result<()> {
    if est.peak_bytes > budget_bytes {
        return Err(Error::TooLarge(format!(
            "the vibronic bands need about {} ({} basis functions, {} atoms), over the memory \
             budget of {}; raise --memory or use a smaller basis",
            format_bytes(est.peak_bytes),
            est.basis_functions,
            est.atoms,
            format_bytes(budget_bytes)
        )));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::fixtures::crawford_water as water;

    #[test]
    fn counts_six_n_gradients_per_hessian_and_refuses_a_small_budget() {
        // Exact condition: a central-difference Hessian of N atoms takes 2 × 3N gradients,
        // one for the neutral and one per band.
        let w = water();
        let e = estimate(&w, "cc-pVDZ", 3, &FcOptions::default()).unwrap();
        assert_eq!(e.hessian_gradients, 4 * 18);
        assert_eq!(e.basis_functions, 24);
        assert!(e.peak_bytes > 8.0 * (1 << 22) as f64);
        assert!(check_memory(&e, 1e12).is_ok());
        let err = check_memory(&e, 1e6).unwrap_err();
        assert_eq!(err.exit_code(), 2);
        assert!((e.seconds(0.5) - 0.5 * (e.gradients() + 3) as f64).abs() < 1e-12);
    }
}
