//! Ionization methods and the bands they produce.
pub mod band;
pub mod bands;
pub mod ep2;
pub mod frozen_core;
pub mod koopmans;
pub mod method;
pub mod uncertainty;

pub use band::{Band, MakeupEntry, Region};
pub use method::Method;
