//! Basis sets: shells, bundled data, loading by name or path.
//!
//! - `cartesian`: Cartesian component order, double factorials.
//! - `shell`: the Shell / BasisSet contract (AO order, normalisation).
//! - `schema`: the basis-set file format and its reader.
//! - `catalog`: the sets bundled in the binary.
//! - `names`: name spellings, default fitting sets.
//! - `load`: a set on a molecule.
//! - `normalize`, `solid_harmonics`, `evaluate`: AO normalisation, Cartesian → real solid
//!   harmonics, AO values at a point.
pub mod cartesian;
pub mod catalog;
pub mod evaluate;
pub mod load;
pub mod names;
pub mod normalize;
pub mod schema;
pub mod shell;
pub mod solid_harmonics;

pub use load::{load, load_auxiliary};
pub use names::{default_auxiliary_for, default_jk_auxiliary_for};
pub use schema::{BasisData, ElementData, SetKind, ShellData};
pub use shell::{BasisSet, Harmonics, Shell};
