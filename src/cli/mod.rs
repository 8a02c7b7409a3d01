//! One file per subcommand; shared argument groups in `common`.
pub mod assign;
pub mod basis;
pub mod bench;
pub mod common;
pub mod core;
pub mod eom_bench;
pub mod ionize;
pub mod scf;
pub mod spectrum;
pub mod vibronic_bench;
