//! Ionization methods and the bands they produce.
pub mod band;
pub mod ep2;
pub mod frozen_core;
pub mod koopmans;

pub use band::{Band, MakeupEntry, Region};
