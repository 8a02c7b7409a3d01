//! bandcast: photoelectron spectra from first principles.
//!
//! Data flow: Molecule + BasisSet → integrals → SCF Wavefunction → analysis (symmetry,
//! populations) and ionization methods → Bands (one request path: `predict`) → spectrum,
//! assignment, printers.
//! Everything below `cli` and `report` is plain functions on plain data, in atomic units.

pub mod analysis;
pub mod basis;
pub mod batch;
pub mod bench;
pub mod chem;
pub mod cli;
pub mod core_level;
pub mod correlation;
pub mod error;
pub mod geometry;
pub mod gradient;
pub mod integrals;
pub mod ionization;
pub mod predict;
pub mod report;
pub mod scf;
pub mod spectrum;
pub mod system;
pub mod units;
pub mod vibrations;
pub mod vibronic;

pub use error::{Error, Result};

// The command-line code in `cli` names the library by its crate name, as the binary does.
extern crate self as bandcast;
