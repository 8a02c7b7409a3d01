//! Printers and output files.
pub mod atomic_write;
pub mod csv;
pub mod html;
pub mod svg;

pub use atomic_write::write_atomic;
