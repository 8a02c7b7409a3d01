//! Molecular integrals over contracted Gaussian shells, in the final AO basis
//! (every AO normalised; pure shells as real solid harmonics). See DEVELOPERS.md,
//! section "Integrals", for the equations and conventions.
//!
//! - `boys`: the Boys function F_m(T).
//! - `hermite_expansion`, `hermite_coulomb`: McMurchie–Davidson E and R quantities.
//! - `overlap`, `kinetic`, `nuclear`, `dipole`: one-electron matrices (driver in `one_electron`).
//! - `shell_pair`, `vrr`, `hrr`, `quartet`, `ket_batch`, `family_cache`, `eri`: the
//!   two-electron engine (Head-Gordon–Pople); `schwarz` screening helpers.
//! - `density_fitting`: (P|Q) and (P|μν) for density fitting.
pub mod boys;
pub mod density_fitting;
pub mod derivative;
pub mod dipole;
pub mod eri;
pub mod family_cache;
pub mod hermite_coulomb;
pub mod hermite_expansion;
pub mod hrr;
pub mod ket_batch;
pub mod kinetic;
pub mod mo_transform;
pub mod nuclear;
pub mod one_electron;
pub mod overlap;
pub mod quartet;
pub mod schwarz;
pub mod shell_pair;
pub mod transform;
pub mod vrr;

pub use density_fitting::{eri2c, eri3c, eri3c_bytes, DfEngine};
pub use dipole::dipole;
pub use eri::{eri_tensor, eri_tensor_with, EriEngine};
pub use kinetic::kinetic;
pub use nuclear::{nuclear, nuclear_from_charges};
pub use overlap::overlap;
