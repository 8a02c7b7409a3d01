//! System probes (Linux /proc): CPU time, peak and resident memory, available memory, the
//! default memory budget and the stage memory estimate record. Measurement only: nothing here changes a computed number, except
//! that the memory budget decides how integrals are stored and which default method runs.
pub mod available_memory;
pub mod bytes;
pub mod cpu_time;
pub mod estimate;
pub mod freed_memory;
pub mod load;
pub mod peak_memory;

pub use available_memory::{available_bytes, default_memory_budget};
pub use bytes::{format_bytes, format_gib};
pub use cpu_time::{process_cpu_seconds, thread_cpu_seconds};
pub use estimate::StageEstimate;
pub use freed_memory::keep_freed_memory;
pub use load::load_average;
pub use peak_memory::{peak_memory_mib, reset_peak_memory, resident_memory_mib};
