//! Point-group symmetry: detection from the geometry, the standard orientation, character
//! tables, the action of operations on atomic orbitals, and irrep labels of molecular
//! orbitals.
//!
//! - `ops`: 3×3 operations; `tables`: character tables in the standard frame;
//! - `detect`: finding the group of a geometry; `orient`: the standard frame;
//! - `group`: the group placed on a molecule (operations in the input frame);
//! - `subgroup`: the abelian subgroup used as fallback;
//! - `angular`: D(R) on the AOs of one shell; `ao_action`: an operation on AO coefficient
//!   vectors of a whole basis; `labels`: irrep labels of MOs.
pub mod angular;
pub mod ao_action;
pub mod detect;
pub mod group;
pub mod labels;
pub mod ops;
pub mod orient;
pub mod subgroup;
pub mod symmetrize;
pub mod tables;

pub use ao_action::{ao_actions, AoAction};
pub use detect::{detect_point_group, DEFAULT_TOLERANCE};
pub use group::{PointGroup, SymOp};
pub use labels::{degenerate_sets, label_orbitals, OrbitalLabel};
pub use orient::Frame;
pub use symmetrize::{symmetrize, symmetrize_job, SymmetrisedJob};
pub use tables::CharacterTable;

/// The name used for the detected group in the shared interface plan.
pub type PointGroupInfo = PointGroup;
