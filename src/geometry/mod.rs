//! Molecular geometry: the electronic state a structure belongs to (`state`), a model
//! Hessian (`model_hessian`), keeping the point group (`symmetrize`) and the quasi-Newton
//! optimisation of minimum-energy structures (`optimize`).
pub mod model_hessian;
pub mod optimize;
pub mod state;
pub mod symmetrize;

pub use optimize::{optimize, OptStep, OptimizeOptions, OptimizeResult};
pub use state::{SolvedState, StateSpec};
