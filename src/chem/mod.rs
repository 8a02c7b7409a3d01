//! Chemistry basics: elements, molecules, the structure readers (XYZ, MOL/SDF), the
//! frozen-core rule, and a standard-geometry alkane builder (`alkane`).
pub mod alkane;
pub mod elements;
#[cfg(test)]
pub mod fixtures;
pub mod frozen_core;
pub mod masses;
pub mod molecule;
pub mod sdf;
pub mod structure;
pub mod xyz;

pub use molecule::{Atom, Molecule};
