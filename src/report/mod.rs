//! Printers and output files.
pub mod atomic_write;

pub use atomic_write::write_atomic;
