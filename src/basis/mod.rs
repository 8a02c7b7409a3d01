//! Basis sets: shells, bundled data, loading by name or path.
pub mod evaluate;
pub mod normalize;
pub mod shell;
pub mod solid_harmonics;

pub use shell::{BasisSet, Harmonics, Shell};
