//! Orbital annotations for bands — point group, irrep labels, Mulliken make-up, bonding
//! character — gathered from `crate::analysis` in one place, so the band code does not
//! depend on how the analysis module spells its calls.

use std::collections::HashMap;

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::ionization::bands::OrbitalNotes;
use crate::ionization::koopmans::{OrbitalIe, Spin};
use crate::scf::Wavefunction;

/// What the analysis found for the orbitals of one wavefunction.
#[derive(Debug, Clone, Default)]
pub struct Annotations {
    pub point_group: Option<String>,
    pub notes: HashMap<(Spin, usize), OrbitalNotes>,
}

impl Annotations {
    pub fn orbital(&self, spin: Spin, index: usize) -> Option<&OrbitalNotes> {
        self.notes.get(&(spin, index))
    }
}

/// Annotate the given occupied orbitals. Problems of the analysis (no point group found,
/// …) become warnings, never errors: bands without labels are still bands.
pub fn annotate(
    _mol: &Molecule,
    _basis: &BasisSet,
    _wf: &Wavefunction,
    _orbitals: &[OrbitalIe],
    warnings: &mut Vec<String>,
) -> Annotations {
    warnings.push("orbital analysis not available in this build: bands are unlabelled".into());
    Annotations::default()
}
