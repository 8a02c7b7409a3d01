//! bandcast: photoelectron spectra from first principles.
//!
//! Data flow: Molecule + BasisSet → integrals → SCF Wavefunction → analysis (symmetry,
//! populations) and ionization methods → Bands → spectrum, assignment, printers.
//! Everything below `cli` and `report` is plain functions on plain data, in atomic units.

pub mod analysis;
pub mod basis;
pub mod chem;
pub mod correlation;
pub mod error;
pub mod integrals;
pub mod ionization;
pub mod report;
pub mod scf;
pub mod spectrum;
pub mod units;
pub mod vibronic;

pub use error::{Error, Result};
