//! Chemistry basics: elements, molecules, the structure readers (XYZ, MOL/SDF).
pub mod elements;
pub mod molecule;
pub mod sdf;
pub mod structure;
pub mod xyz;

pub use molecule::{Atom, Molecule};
