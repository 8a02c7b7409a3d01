//! Basis sets: shells, bundled data, loading by name or path.
pub mod shell;

pub use shell::{BasisSet, Harmonics, Shell};
