//! Chemistry basics: elements, molecules, the XYZ reader.
pub mod elements;
pub mod masses;
pub mod molecule;
pub mod xyz;

pub use molecule::{Atom, Molecule};
