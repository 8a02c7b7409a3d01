//! Ionization methods and the bands they produce.
pub mod band;
pub mod core;

pub use band::{Band, MakeupEntry, Region};
