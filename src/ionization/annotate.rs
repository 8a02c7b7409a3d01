//! Orbital annotations for bands — point group, irrep labels, Mulliken make-up, bonding
//! character — gathered from `crate::analysis` in one place, so the band code does not
//! depend on how the analysis module spells its calls.
//!
//! (The orbital analysis is not on this branch yet: every orbital is unlabelled.)

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::ionization::bands::{OrbitalNotes, OrbitalSet};
use crate::ionization::koopmans::Spin;
use crate::scf::Wavefunction;

/// Labels of one wavefunction's orbitals, and what is needed to describe orbital sets.
pub struct Annotator<'a> {
    _mol: &'a Molecule,
    _basis: &'a BasisSet,
    _wf: &'a Wavefunction,
    _s: &'a Mat<f64>,
}

impl<'a> Annotator<'a> {
    pub fn new(
        mol: &'a Molecule,
        basis: &'a BasisSet,
        wf: &'a Wavefunction,
        s: &'a Mat<f64>,
        warnings: &mut Vec<String>,
    ) -> Self {
        warnings.push("orbital analysis not available in this build: bands are unlabelled".into());
        Annotator {
            _mol: mol,
            _basis: basis,
            _wf: wf,
            _s: s,
        }
    }
    pub fn point_group(&self) -> Option<String> {
        None
    }
    pub fn set_key(&self, _spin: Spin, _mo: usize) -> Option<String> {
        None
    }
    pub fn notes(&self, _set: &OrbitalSet) -> OrbitalNotes {
        OrbitalNotes::default()
    }
}
