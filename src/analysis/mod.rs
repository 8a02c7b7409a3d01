//! Orbital analysis: point-group symmetry and irrep labels, Mulliken make-up of orbitals,
//! bonding character.
pub mod bonding;
pub mod describe;
pub mod makeup;
pub mod population;
pub mod symmetry;

pub use describe::{describe_orbital_sets, OrbitalSet};
pub use makeup::MakeupEntry;
