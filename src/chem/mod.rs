//! Chemistry basics: elements, molecules, the structure readers (XYZ, MOL/SDF), the
//! frozen-core rule, a standard-geometry alkane builder (`alkane`), bonds from covalent
//! radii (`bonds`) and the chemical environment of each atom (`environment`).
pub mod alkane;
pub mod bonds;
pub mod elements;
pub mod environment;
#[cfg(test)]
pub mod fixtures;
pub mod frozen_core;
pub mod masses;
pub mod molecule;
pub mod sdf;
pub mod structure;
pub mod xyz;

pub use molecule::{Atom, Molecule};
