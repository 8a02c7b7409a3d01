//! Hartree–Fock SCF.
pub mod wavefunction;

pub use wavefunction::{Reference, Wavefunction};
