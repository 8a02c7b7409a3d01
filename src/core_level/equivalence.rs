//! Symmetry-equivalent hole atoms: one ΔSCF per class, the others share its numbers.
//!
//! Two atoms whose 1s holes are carried into each other by a point-group operation of the
//! molecule have the same binding energy (the cations are images of each other), provided
//! the bases used are images of each other too. They are: each hole's basis is the basis as
//! named with the core flexibility on the hole atom alone (`predict.rs`), and the image of
//! that under an operation is the basis of the image atom's hole. The classes are the
//! orbits of the hole atoms; the first atom of each class (input order) is computed, the
//! others copy it.
//!
//! The point group is detected with a tight tolerance (`TOLERANCE`, bohr), so that atoms
//! called equivalent differ in environment by less than a few thousandths of an ångström,
//! which moves a 1s binding energy by far less than the 0.01 eV the output prints.

use crate::analysis::symmetry::detect_point_group;
use crate::chem::Molecule;

/// Coordinate tolerance (bohr) for calling two atoms equivalent.
pub const TOLERANCE: f64 = 0.01;

/// Classes of equivalent hole atoms.
#[derive(Debug, Clone, PartialEq)]
pub struct Equivalence {
    /// Point group used (Schoenflies name, as detected).
    pub group: String,
    /// For each entry of `hole_atoms` (same order): the hole atom (0-based) whose result it
    /// takes, itself for the atoms that are computed.
    pub representative: Vec<usize>,
    /// For each entry of `hole_atoms`: the other atoms of the molecule (hole atoms or not)
    /// equivalent to it, ascending.
    pub partners: Vec<Vec<usize>>,
}

impl Equivalence {
    /// No symmetry used: every atom is its own representative.
    pub fn none(hole_atoms: &[usize]) -> Self {
        Equivalence {
            group: "C1".into(),
            representative: hole_atoms.to_vec(),
            partners: vec![Vec::new(); hole_atoms.len()],
        }
    }

    /// The same classes, but every hole atom computed on its own (partners are kept, so a
    /// hole can still be called localised on one of several equivalent atoms).
    pub fn without_copies(mut self, hole_atoms: &[usize]) -> Self {
        self.representative = hole_atoms.to_vec();
        self
    }

    /// Partners of hole atom `atom` (empty if it is not a hole atom).
    pub fn partners_of(&self, hole_atoms: &[usize], atom: usize) -> &[usize] {
        hole_atoms
            .iter()
            .position(|&a| a == atom)
            .map(|k| self.partners[k].as_slice())
            .unwrap_or(&[])
    }

    /// The atoms that need an SCF of their own.
    pub fn computed(&self, hole_atoms: &[usize]) -> Vec<usize> {
        hole_atoms
            .iter()
            .zip(&self.representative)
            .filter(|(a, r)| a == r)
            .map(|(a, _)| *a)
            .collect()
    }
}

/// Classes of `hole_atoms` (0-based, ascending) under the operations of `mol`'s point group.
pub fn equivalent_holes(mol: &Molecule, hole_atoms: &[usize]) -> Equivalence {
    if mol.atoms.len() < 2 {
        return Equivalence::none(hole_atoms);
    }
    let pg = detect_point_group(mol, TOLERANCE);
    let mut parent: Vec<usize> = (0..mol.atoms.len()).collect();
    fn find(p: &mut [usize], mut i: usize) -> usize {
        while p[i] != i {
            p[i] = p[p[i]];
            i = p[i];
        }
        i
    }
    for op in &pg.operations {
        let perm = &op.permutation;
        if perm.len() != mol.atoms.len() {
            continue;
        }
        for a in 0..mol.atoms.len() {
            let (ra, rb) = (find(&mut parent, a), find(&mut parent, perm[a]));
            if ra != rb {
                let (lo, hi) = (ra.min(rb), ra.max(rb));
                parent[hi] = lo;
            }
        }
    }
    let class: Vec<usize> = (0..mol.atoms.len()).map(|a| find(&mut parent, a)).collect();
    // The representative is the first hole atom (input order) of the class.
    let representative = hole_atoms
        .iter()
        .map(|&a| {
            *hole_atoms
                .iter()
                .find(|&&b| class[b] == class[a])
                .expect("a is a hole atom")
        })
        .collect();
    let partners = hole_atoms
        .iter()
        .map(|&a| {
            (0..mol.atoms.len())
                .filter(|&b| b != a && class[b] == class[a])
                .collect()
        })
        .collect();
    Equivalence {
        group: pg.name.clone(),
        representative,
        partners,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::xyz::{parse_xyz, LengthUnit};

    fn mol(text: &str) -> Molecule {
        parse_xyz(text, LengthUnit::Angstrom).unwrap()
    }

    #[test]
    fn carbon_dioxide_oxygens_are_one_class() {
        // Linear O=C=O, C–O 1.16 Å (common practice).
        let m = mol("3\nCO2\nO 0 0 -1.16\nC 0 0 0\nO 0 0 1.16\n");
        let e = equivalent_holes(&m, &[0, 1, 2]);
        assert_eq!(e.representative, vec![0, 1, 0]);
        assert_eq!(e.computed(&[0, 1, 2]), vec![0, 1]);
        assert_eq!(e.partners, vec![vec![2], vec![], vec![0]]);
    }

    #[test]
    fn different_elements_stay_apart() {
        let m = mol("3\nCO2\nO 0 0 -1.16\nC 0 0 0\nO 0 0 1.16\n");
        let e = equivalent_holes(&m, &[0, 1]);
        assert_eq!(e.representative, vec![0, 1]);
        // O1 still has a partner outside the targets.
        assert_eq!(e.partners_of(&[0, 1], 0), &[2]);
    }

    #[test]
    fn butane_end_and_middle_carbons_pair_up() {
        // All-trans butane (C2h): C1 ≡ C4 and C2 ≡ C3.
        let m = crate::chem::alkane::alkane(4);
        let e = equivalent_holes(&m, &[0, 1, 2, 3]);
        assert_eq!(e.representative, vec![0, 1, 1, 0]);
        assert_eq!(e.group, "C2h");
    }

    #[test]
    fn a_distorted_copy_is_not_equivalent() {
        let m = mol("3\nCO2\nO 0 0 -1.16\nC 0 0 0\nO 0 0 1.17\n");
        let e = equivalent_holes(&m, &[0, 2]);
        assert_eq!(e.representative, vec![0, 2]);
        assert!(e.partners.iter().all(|p| p.is_empty()));
    }
}
