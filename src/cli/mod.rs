//! One file per subcommand; shared argument groups in `common`.
pub mod assign;
pub mod basis;
pub mod batch;
pub mod bench;
pub mod common;
pub mod core;
pub mod eom_bench;
pub mod geometry_common;
pub mod ionize;
pub mod optimize;
pub mod scf;
pub mod spectrum;
pub mod vibrations;
pub mod vibronic;
pub mod vibronic_bench;
