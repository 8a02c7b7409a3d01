//! Orbital annotations for bands — point group, irrep labels, Mulliken make-up, bonding
//! character — gathered from `crate::analysis` in one place, so the band code does not
//! depend on how the analysis module spells its calls.

use bandcast_linalg::Mat;

use crate::analysis::bonding::bonding_character;
use crate::analysis::population::orbital_makeup;
use crate::analysis::symmetry::{
    detect_point_group, label_orbitals, OrbitalLabel, DEFAULT_TOLERANCE,
};
use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::ionization::bands::{OrbitalNotes, OrbitalSet};
use crate::ionization::koopmans::Spin;
use crate::scf::Wavefunction;

/// Energy window (hartree) the symmetry labelling treats as degenerate.
const LABEL_DEGENERACY_EH: f64 = 1e-5;

/// Labels of one wavefunction's orbitals, and what is needed to describe orbital sets.
pub struct Annotator<'a> {
    mol: &'a Molecule,
    basis: &'a BasisSet,
    wf: &'a Wavefunction,
    s: &'a Mat<f64>,
    point_group: Option<String>,
    alpha: Vec<OrbitalLabel>,
    beta: Vec<OrbitalLabel>,
}

impl<'a> Annotator<'a> {
    /// Detect the point group and label all orbitals. Problems of the analysis become
    /// warnings, never errors: bands without labels are still bands.
    pub fn new(
        mol: &'a Molecule,
        basis: &'a BasisSet,
        wf: &'a Wavefunction,
        s: &'a Mat<f64>,
        warnings: &mut Vec<String>,
    ) -> Self {
        let pg = detect_point_group(mol, DEFAULT_TOLERANCE);
        let alpha = label_orbitals(
            &pg,
            mol,
            basis,
            s,
            &wf.c_alpha,
            &wf.eps_alpha,
            LABEL_DEGENERACY_EH,
        );
        let beta = if wf.reference == crate::scf::Reference::Rhf {
            Vec::new()
        } else {
            label_orbitals(
                &pg,
                mol,
                basis,
                s,
                &wf.c_beta,
                &wf.eps_beta,
                LABEL_DEGENERACY_EH,
            )
        };
        if alpha.iter().any(|l| l.fallback) {
            warnings.push(format!(
                "some orbitals are labelled in an abelian subgroup of {} (symmetry slightly broken)",
                pg.name
            ));
        }
        Annotator {
            mol,
            basis,
            wf,
            s,
            point_group: Some(pg.name.clone()),
            alpha,
            beta,
        }
    }

    pub fn point_group(&self) -> Option<String> {
        self.point_group.clone()
    }

    fn label(&self, spin: Spin, mo: usize) -> Option<&OrbitalLabel> {
        let v = match spin {
            Spin::Beta => &self.beta,
            _ => &self.alpha,
        };
        v.iter().find(|l| l.mo == mo)
    }

    /// Key of the degenerate set the symmetry analysis put this orbital in.
    pub fn set_key(&self, spin: Spin, mo: usize) -> Option<String> {
        let l = self.label(spin, mo)?;
        let irrep = l.irrep.as_ref()?;
        Some(format!("{irrep}#{}", l.set))
    }

    /// Label, irrep, make-up and bonding character of an orbital set.
    pub fn notes(&self, set: &OrbitalSet) -> OrbitalNotes {
        let l = self.label(set.spin, set.representative());
        let c = match set.spin {
            Spin::Beta => &self.wf.c_beta,
            _ => &self.wf.c_alpha,
        };
        let makeup = orbital_makeup(self.mol, self.basis, self.s, c, &set.orbitals);
        let (ch, _q, note) = bonding_character(self.mol, self.basis, self.s, c, &set.orbitals);
        OrbitalNotes {
            label: l.and_then(|l| l.label.clone()),
            symmetry: l.and_then(|l| l.irrep.clone()),
            makeup,
            character: Some(ch.as_str().to_string()),
            character_note: Some(note.to_string()),
        }
    }
}
