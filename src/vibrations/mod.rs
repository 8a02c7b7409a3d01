//! Harmonic vibrational analysis: the Hessian by central differences of analytic
//! gradients (`hessian`), then mass weighting, removal of rigid translations and rotations,
//! normal modes, wavenumbers, irreps and the zero-point energy (`harmonic`).
pub mod harmonic;
pub mod hessian;

pub use harmonic::{harmonic_analysis, HarmonicAnalysis, Mode};
pub use hessian::{
    hessian_by_gradients, hessian_by_gradients_with, hessian_estimate, HessianEstimate,
    HESSIAN_STEP,
};
