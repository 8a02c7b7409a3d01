//! Ionization methods and the bands they produce.
//!
//! - `dccsd`: ΔCCSD(T) (MOM cation and neutral, each with open-shell coupled cluster).
//! - `koopmans`, `dscf`, `ep2`: the methods (−ε; E(cation) − E(neutral) with MOM; second-order
//!   electron propagator). `method`: their names and typical errors.
//! - `bands`: degenerate orbitals → bands; `annotate`: labels and make-up from `analysis`;
//!   `uncertainty`: which band pairs may be in the wrong order.
//! - `notice`: the typed notes and warnings of a prediction.
//! - `valence`: the entry point, `valence::predict`. `default_method`: THE default-method rule.
//!
//! Core levels (1s holes) live in `crate::core_level`.
pub mod annotate;
pub mod band;
pub mod bands;
pub mod dccsd;
pub mod default_method;
pub mod dscf;
pub mod ep2;
pub mod koopmans;
pub mod method;
pub mod notice;
pub mod uncertainty;
pub mod valence;

pub use band::{Band, MakeupEntry, Region};
pub use method::Method;
