//! Screening many molecules: a manifest of structures, split into shards for a scheduler's
//! job array, one JSON record per molecule, and a merged table of every band or level.
//!
//! The runner itself (starting one `bandcast` process per molecule) is in `cli/batch.rs`;
//! this module holds the plain parts: reading the manifest, choosing a shard's molecules,
//! the record written per molecule, and merging records into rows.

pub mod manifest;
pub mod merge;
pub mod record;
pub mod shard;

pub use manifest::{read_manifest, Entry};
pub use merge::{merge_records, Row};
pub use record::{Record, Status};
pub use shard::Shard;
