//! A band of a photoelectron spectrum: what every ionization method produces and what the
//! spectrum and assignment modules consume.

use serde::Serialize;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Region {
    Valence,
    Core,
}

/// Re-exported from `analysis`, where the make-up of an orbital is computed.
pub use crate::analysis::MakeupEntry;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Band {
    /// Display label: "1b1", "3σg", or for core levels "C3 1s".
    pub label: String,
    /// Irreducible representation (lower case, e.g. "b1", "e1g"), None when unknown.
    pub symmetry: Option<String>,
    /// Vertical ionization energy (binding energy) in eV.
    pub ie_ev: f64,
    /// Number of degenerate orbitals in the band.
    pub degeneracy: usize,
    /// Electrons per orbital before ionization (2 closed shell, 1 open shell).
    pub occupation: f64,
    /// Pole strength of a propagator method, None otherwise.
    pub pole_strength: Option<f64>,
    /// One-hole weight of an EOM state, None otherwise.
    pub one_hole_weight: Option<f64>,
    /// "bonding", "nonbonding", "antibonding" (+ consequence in `character_note`).
    pub character: Option<String>,
    pub character_note: Option<String>,
    pub makeup: Vec<MakeupEntry>,
    /// Method that produced the energy ("koopmans", "dscf", "ep2", "eom-ccsd", …).
    pub method: String,
    pub region: Region,
    /// Atom (0-based) for core levels.
    pub atom: Option<usize>,
    /// Chemical environment of that atom from its bonded neighbours ("C=O", "CH3";
    /// `chem::environment`), for core levels; None for valence bands.
    pub environment: Option<String>,
    /// Lorentzian lifetime FWHM in eV (core levels), None when not known.
    pub lifetime_fwhm_ev: Option<f64>,
}

impl Band {
    /// Default intensity: occupation × degeneracy.
    pub fn default_intensity(&self) -> f64 {
        self.occupation * self.degeneracy as f64
    }
}
