//! Ionization methods and the bands they produce.
pub mod band;

pub use band::{Band, MakeupEntry, Region};
