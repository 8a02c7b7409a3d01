//! What a prediction returns: plain data for the spectrum, the assignment and the printers.

use serde::Serialize;

use super::notice::Notice;
use crate::ionization::{Band, Region};

/// The bands of one molecule, and how they were obtained.
#[derive(Debug, Clone, Serialize)]
pub struct Prediction {
    pub region: Region,
    /// Method name as on the command line and in JSON ("eom-ccsd", "ep2", "dscf", "dmp2", …).
    pub method: String,
    /// True when the default rule chose the method.
    pub method_defaulted: bool,
    /// Basis-set name (canonical name or the user file's path).
    pub basis: String,
    pub n_basis: usize,
    /// Bands with binding energy, label, intensity data (occupation, degeneracy, pole
    /// strength or one-hole weight) and lifetime widths; valence bands by energy ascending.
    pub bands: Vec<Band>,
    /// How the job was run: information, not a problem.
    pub notes: Vec<Notice>,
    /// Something to look at before relying on the numbers.
    pub warnings: Vec<Notice>,
}
