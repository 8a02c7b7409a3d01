//! One request path: every command that predicts bands (valence or core) asks here.
//!
//! A typed [`Request`] (molecule, basis set, region, method choice, options) goes in;
//! [`predict`] dispatches to the valence methods (`ionization::valence`) or to the core
//! levels, applying the one default-method rule, and returns a plain [`Prediction`]: bands
//! with energies, labels, intensity data and widths, plus typed notes and warnings.
//! Nothing here prints or names a command-line option; the printers live in `report`.
pub mod notice;
pub mod prediction;
pub mod request;
mod run;

pub use notice::Notice;
pub use prediction::Prediction;
pub use request::{CoreMethod, MethodChoice, Request, RequestOptions};
pub use run::{memory_estimates, predict, Progress};
