//! (module under construction)
pub mod mo_transform;
