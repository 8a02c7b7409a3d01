//! What an SCF run is asked to do: reference, thresholds, guess, occupations, fallbacks.

use crate::system::default_memory_budget;
use bandcast_linalg::Mat;

pub use super::symmetrise::DensitySymmetry;
pub use super::wavefunction::Reference;

/// Starting point of the iterations.
#[derive(Debug, Clone)]
pub enum Guess {
    /// Diagonalise the core Hamiltonian h = T + V (no electron repulsion). Crude for anything
    /// beyond a few electrons, but needs nothing.
    Core,
    /// Superposition of atomic densities: a spherically averaged, fractional-occupation
    /// atomic SCF per element in the molecule's own basis (see `guess.rs`).
    Sad,
    /// Given MO coefficients (AO rows × MO columns), e.g. from a previous SCF in the same
    /// basis. With `Occupation::Aufbau` the lowest columns are occupied; with
    /// `Occupation::Mom` the columns flagged in `occ_alpha` / `occ_beta`. For RHF only
    /// `c_alpha` is read.
    Orbitals { c_alpha: Mat<f64>, c_beta: Mat<f64> },
}

/// How orbitals are chosen as occupied after each diagonalisation.
#[derive(Debug, Clone)]
pub enum Occupation {
    /// Lowest orbital energies first.
    Aufbau,
    /// Maximum overlap method (Gilbert, Besley & Gill, J. Phys. Chem. A 112 (2008) 13164):
    /// occupy the new orbitals j with the largest projections p_j = Σ_i (C_refᵀ S C_new)_ij²
    /// onto the occupied space of the previous iteration (i over occupied reference
    /// orbitals). With `initial == true` the projection is always onto these initial
    /// reference orbitals (IMOM: Barca, Gilbert & Gill, J. Chem. Theory Comput. 14 (2018)
    /// 1501), which keeps holes from drifting over many iterations.
    ///
    /// `occ_alpha` / `occ_beta` are 0/1 flags over the columns of `c_alpha_ref` /
    /// `c_beta_ref` (a 1s core hole in beta: `occ_beta[0] = 0.0`). For RHF the alpha pair
    /// is used (doubly occupied); for ROHF both refer to the alpha orbitals and the beta
    /// occupied set must lie inside the alpha one.
    Mom {
        c_alpha_ref: Mat<f64>,
        c_beta_ref: Mat<f64>,
        occ_alpha: Vec<f64>,
        occ_beta: Vec<f64>,
        initial: bool,
    },
}

/// How the two-electron part of the Fock matrix is built.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FockMethod {
    /// In-core when the unique integrals fit `memory_budget_bytes`, direct otherwise.
    Auto,
    /// Store the unique ERIs once (fails with `Error::TooLarge` if over budget).
    InCore,
    /// Recompute screened ERIs each iteration, incremental in ΔP.
    Direct,
    /// Density-fitted J and K with the auxiliary set `ScfOptions::jk_fitting` (an
    /// approximation: the energy differs from the exact-integral one by the fitting error).
    DensityFitted,
}

/// Whether an exact integral-direct SCF first converges with density-fitted J and K.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DfStart {
    /// When the exact builder is integral-direct (large jobs) and the fitting set covers
    /// the molecule.
    Auto,
    Always,
    Never,
}

/// Options of one SCF run. `ScfOptions::default()` is RHF, SAD guess, aufbau, DIIS.
/// Progress lines: pass a callback to `run_logged` / `ScfContext::run`; threads: run inside
/// a rayon `ThreadPool::install` (the result does not depend on the thread count).
#[derive(Debug, Clone)]
pub struct ScfOptions {
    pub reference: Reference,
    /// Convergence on the energy change between iterations (hartree).
    pub e_tol: f64,
    /// Convergence on the RMS of the orthogonalised commutator FPS − SPF.
    pub commutator_tol: f64,
    /// Maximum number of Fock builds.
    pub max_iter: usize,
    /// Memory the in-core ERI store or the density-fitting tensor may use (bytes); default
    /// `default_memory_budget()`.
    pub memory_budget_bytes: usize,
    pub guess: Guess,
    pub occupation: Occupation,
    /// Level shift (hartree) applied to virtual orbitals from the first iteration; 0 = off
    /// (the convergence controller may still switch one on when DIIS stalls).
    pub level_shift: f64,
    /// Density damping factor in [0, 1): P ← (1−d) P_new + d P_old; 0 = off.
    pub damping: f64,
    /// Number of Fock/error pairs DIIS keeps.
    pub diis_space: usize,
    /// Overlap eigenvalues below this are dropped in the canonical orthogonalisation.
    pub lindep_threshold: f64,
    pub fock: FockMethod,
    /// Auxiliary set for density-fitted J and K (`FockMethod::DensityFitted`, `DfStart`);
    /// None: def2-universal-JKFIT.
    pub jk_fitting: Option<String>,
    /// Converge with density-fitted J and K first, then finish with exact integrals.
    pub df_start: DfStart,
    /// Schwarz / density screening threshold for two-electron integrals.
    pub screening: f64,
    /// Build J and K from symmetrised densities (`symmetrise.rs`); None = unconstrained.
    pub density_symmetry: Option<std::sync::Arc<dyn DensitySymmetry>>,
}

impl Default for ScfOptions {
    fn default() -> Self {
        ScfOptions {
            reference: Reference::Rhf,
            e_tol: 1e-10,
            commutator_tol: 1e-8,
            max_iter: 128,
            memory_budget_bytes: default_memory_budget(),
            guess: Guess::Sad,
            occupation: Occupation::Aufbau,
            level_shift: 0.0,
            damping: 0.0,
            diis_space: 8,
            lindep_threshold: 1e-7,
            fock: FockMethod::Auto,
            jk_fitting: None,
            df_start: DfStart::Auto,
            screening: 1e-12,
            density_symmetry: None,
        }
    }
}
