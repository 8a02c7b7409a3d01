//! Predicted photoelectron spectra and comparison with measured ones.
//!
//! Prediction: `photon` (sources, BE ↔ KE) → `predicted` (which bands, how intense:
//! `cross_section` for the Gelius model, `core_level::lifetime` for core-hole widths) → `broaden`
//! (line shapes from `lineshape`, Voigt through `faddeeva`); `mixture` weights several
//! molecules; `build` runs the chain for the printers.
//!
//! Comparison: `measured` (reading a trace) → `smooth` (Savitzky–Golay) → `background`
//! (linear, Shirley) → `peaks` (prominence) → `align` (global shift/scale) → `assign`
//! (one-to-one matching by `hungarian`, evidence per pair; widths and vibronic
//! progressions by `band_shape`) → `confidence` (calibrated
//! probability) → `verdict`; `trace_check` (noise, inverted traces) and `method_error`
//! (plausible shifts) feed it; `compare` runs the whole chain and
//! `assignment` feeds it predicted bands. Notes of both are typed values (`note`).
pub mod align;
pub mod assign;
pub mod assignment;
pub mod background;
pub mod band_shape;
pub mod broaden;
pub mod build;
pub mod central_field;
pub mod compare;
pub mod confidence;
pub mod cross_section;
pub mod faddeeva;
pub mod hungarian;
pub mod lineshape;
pub mod measured;
pub mod method_error;
pub mod mixture;
pub mod note;
pub mod peaks;
pub mod photon;
pub mod predicted;
pub mod smooth;
pub mod trace_check;
pub mod verdict;

pub use lineshape::Shape;
pub use photon::{Axis, Photon};
