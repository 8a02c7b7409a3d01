//! Hartree–Fock SCF: RHF, UHF and ROHF with DIIS, SAD/core/orbital guesses, aufbau or MOM
//! occupations, and Fock builders behind a trait.
//!
//! Files: `context` (`run`, integrals, guesses, the finished `Wavefunction`), `options` (what to do), `driver` (the iterations), `fock/` (J and K builders),
//! `diis`, `convergence` (DIIS / level shift / damping control), `occupation` (aufbau, MOM),
//! `orthogonalize` (canonical orthogonalisation), `guess` (core, SAD), `rohf` (effective Fock
//! matrix), `spin` (⟨S²⟩), `symmetrise` (optional point-group constraint on the densities),
//! `wavefunction` (the result every later method reads).
pub mod context;
pub mod convergence;
pub mod df_start;
pub mod diis;
pub mod driver;
pub mod fock;
pub mod guess;
pub mod memory;
pub mod occupation;
pub mod options;
pub mod orthogonalize;
pub mod rohf;
pub mod spin;
pub mod symmetrise;
pub mod wavefunction;

pub use context::{core_hamiltonian, dipole_moment, run, run_logged, sad_density, ScfContext};
pub use driver::{IterationInfo, Problem, Solution, Start};
pub use fock::{FockBuilder, Jk};
pub use options::{DfStart, FockMethod, Guess, Occupation, ScfOptions};
pub use orthogonalize::Orthogonalizer;
pub use symmetrise::{DensitySymmetry, SymmetrisedFock};
pub use wavefunction::{Reference, Wavefunction};

#[cfg(test)]
mod model_tests;
