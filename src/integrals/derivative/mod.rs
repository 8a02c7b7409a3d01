//! First derivatives of the integrals with respect to nuclear positions, contracted with
//! densities as an energy gradient needs them: `one_electron` (overlap, kinetic, nuclear
//! attraction including the operator's own derivative), `eri` (two-electron, integral-direct
//! with Schwarz screening). Both differentiate the primitive Gaussians and reuse the plain
//! integral code on angular momenta raised and lowered by one, so every l the plain
//! integrals handle below `cartesian::MAX_L` (s–g plus one) is covered, pure and Cartesian.
pub mod eri;
pub mod fitting;
pub mod one_electron;
pub(crate) mod one_pass;
#[cfg(test)]
pub(crate) mod test_support;

pub use eri::EriDerivative;
pub use fitting::FittingDerivative;
pub use one_electron::{kinetic_gradient, nuclear_gradient, overlap_gradient, ChargeSite};
