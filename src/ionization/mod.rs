//! Ionization methods and the bands they produce.
//!
//! - `koopmans`, `dscf`, `ep2`: the methods (−ε; E(cation) − E(neutral) with MOM; second-order
//!   electron propagator). `method`: their names and typical errors.
//! - `bands`: degenerate orbitals → bands; `annotate`: labels and make-up from `analysis`;
//!   `uncertainty`: which band pairs may be in the wrong order.
//! - `valence`: the entry point, `valence::predict`; `fallback`: the default method and its
//!   fallbacks (`fallback::predict_default`). `frozen_core`: core orbital counts.
//! - `bench`: the `bandcast bench ep2` workload.
//! - `core`: core-level (1s) binding energies and shifts, ΔSCF with localised holes.
pub mod annotate;
pub mod band;
pub mod bands;
pub mod bench;
pub mod core;
pub mod dscf;
pub mod ep2;
pub mod fallback;
pub mod frozen_core;
pub mod koopmans;
pub mod method;
pub mod uncertainty;
pub mod valence;

pub use band::{Band, MakeupEntry, Region};
pub use method::Method;
