//! Point-group symmetry: detection from the geometry, the standard orientation, character
//! tables, the action of operations on atomic orbitals, and irrep labels of molecular
//! orbitals.

pub mod detect;
pub mod group;

pub mod ops;
pub mod orient;
pub mod subgroup;
pub mod tables;

pub use detect::{detect_point_group, DEFAULT_TOLERANCE};
pub use group::{PointGroup, SymOp};
pub use tables::CharacterTable;
pub type PointGroupInfo = PointGroup;
