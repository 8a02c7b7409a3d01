//! Chemistry basics: elements, molecules, the XYZ reader, the frozen-core rule.
pub mod elements;
pub mod frozen_core;
pub mod molecule;
pub mod xyz;

pub use molecule::{Atom, Molecule};
