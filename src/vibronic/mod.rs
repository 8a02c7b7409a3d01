//! Vibrational structure of photoelectron bands in the harmonic Franck–Condon model.
//!
//! Input: the harmonic analyses of the neutral (initial) and of the ion (final) state
//! (`state::HarmonicState`, atomic units), or the ion's gradient at the neutral's geometry
//! (`linear_coupling`). Output: vibronic lines (energy, intensity, quanta per mode) with the
//! fraction of the band's intensity they hold, and the band's summary numbers.
//!
//! - `state`: the plain input data and its checks;
//! - `align`: the ion's structure in the neutral's Eckart frame (quaternion best fit);
//! - `duschinsky`: J = L_fᵀL_i, K = L_fᵀM^{1/2}(x_i − x_f) (sign convention stated there);
//! - `recursion`: the Franck–Condon overlaps ⟨v|v′⟩ (Doktorov–Malkin–Man'ko recursion);
//! - `progression`: lines class by class with prescreening and bounded memory;
//! - `summary`: strongest line, progression-forming modes, vertical vs adiabatic, envelope;
//! - `envelope`: a band's envelope at a given resolution (for `assign`), its main
//!   progression spacing and whether a resolution shows it;
//! - `linear_coupling`: the vertical-gradient model (J = 1, ω′ = ω);
//! - `band`: the pipeline from a molecule to its bands (optimise, Hessians, progression);
//! - `composite`: correlated vertical energies + HF relaxation for the band positions;
//! - `plan`: the run's cost estimate (gradients, memory) and its progress stages;
//! - `notes`: typed notes. (The seeded workload of `bandcast bench franck-condon` is
//!   `crate::bench::franck_condon`.)
//!
//! No I/O; hartree and bohr throughout (eV and cm⁻¹ at the edges).

pub mod align;
pub mod band;
pub mod composite;
pub mod duschinsky;
pub mod envelope;
pub mod linear_coupling;
pub mod notes;
pub mod plan;
pub mod progression;
pub mod recursion;
pub mod state;
pub mod summary;

pub use duschinsky::{build as build_duschinsky, Alignment, Duschinsky};
pub use envelope::{band_envelope, band_envelope_at, BandEnvelope};
pub use linear_coupling::{linear_coupling, project_gradient, LinearCoupling};
pub use notes::VibronicNote;
pub use progression::{progression, FcOptions, Progression, VibronicLine};
pub use state::HarmonicState;
pub use summary::{band_shape, gaussian_envelope, BandShape, ProgressionMode};
