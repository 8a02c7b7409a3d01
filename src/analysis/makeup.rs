//! The make-up of an orbital: its atom-and-shell shares, as the population analysis
//! computes them and the bands carry them.

use serde::Serialize;

/// One atom-and-shell share of a band's orbital (Mulliken gross population fraction).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MakeupEntry {
    /// Atom label, e.g. "O1" (symbol and 1-based input index).
    pub atom: String,
    /// Shell label, e.g. "2p".
    pub shell: String,
    pub fraction: f64,
}
