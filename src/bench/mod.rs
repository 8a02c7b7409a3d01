//! Benchmark workloads for `bandcast bench`, kept apart from the numerical modules they
//! measure. The CLI parses and prints; the work is here.
//!
//! - `core_level`: carbon 1s levels of an all-trans n-alkane.
pub mod core_level;
