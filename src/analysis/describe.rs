//! Everything the analysis says about a set of orbitals, in one call: point group, irrep
//! label, degenerate set, Mulliken make-up and bonding character — the material of a band.

use super::bonding::{bonding_character, Character};
use super::population::orbital_makeup;
use super::symmetry::{degenerate_sets, label_orbitals, PointGroup};
use crate::analysis::makeup::MakeupEntry;
use crate::basis::BasisSet;
use crate::chem::Molecule;
use bandcast_linalg::Mat;

/// One degenerate set of orbitals (one band).
#[derive(Debug, Clone, PartialEq)]
pub struct OrbitalSet {
    /// MO columns, energy order.
    pub mos: Vec<usize>,
    /// "1b1", "3σg"; None when no label fits.
    pub label: Option<String>,
    /// "b1", "σg".
    pub irrep: Option<String>,
    /// Group the label belongs to (the molecule's, or its abelian subgroup on fallback).
    pub group: String,
    pub fallback: bool,
    /// Mean orbital energy of the set (hartree).
    pub energy: f64,
    /// Make-up per atom ("O1") and shell, largest first.
    pub makeup: Vec<MakeupEntry>,
    pub character: Character,
    /// Bonded overlap population per electron (see `bonding`).
    pub overlap_population: f64,
    pub character_note: &'static str,
}

/// Describe the degenerate sets containing any of the columns `mos` of `c` (energies `eps`).
/// Labels are numbered over all columns of `c` — pass the full coefficient matrix (core
/// orbitals included) so that "3a1" counts from the core.
#[allow(clippy::too_many_arguments)]
pub fn describe_orbital_sets(
    pg: &PointGroup,
    mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    eps: &[f64],
    mos: &[usize],
    degeneracy_tol: f64,
) -> Vec<OrbitalSet> {
    let labels = label_orbitals(pg, mol, basis, s, c, eps, degeneracy_tol);
    degenerate_sets(&labels)
        .into_iter()
        .filter(|set| set.iter().any(|m| mos.contains(m)))
        .map(|set| {
            let first = &labels[set[0]];
            let (character, q, note) = bonding_character(mol, basis, s, c, &set);
            OrbitalSet {
                label: first.label.clone(),
                irrep: first.irrep.clone(),
                group: first.group.clone(),
                fallback: first.fallback,
                energy: set.iter().map(|&m| eps[m]).sum::<f64>() / set.len() as f64,
                makeup: orbital_makeup(mol, basis, s, c, &set),
                character,
                overlap_population: q,
                character_note: note,
                mos: set,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::symmetry::{detect_point_group, DEFAULT_TOLERANCE};
    use crate::chem::xyz::{read_xyz, LengthUnit};

    /// Water HF/STO-3G valence bands: 1b1 (HOMO) is nonbonding O 2p; sets come in energy order
    /// (textbook MO diagram, common practice).
    #[test]
    fn water_valence_sets() {
        let p = std::path::Path::new(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/tests/data/gw100/water.xyz"
        ));
        let mol = read_xyz(p, LengthUnit::Angstrom).unwrap();
        let basis = crate::basis::load("sto-3g", &mol, None).unwrap();
        let wf = crate::scf::run(&mol, &basis, &crate::scf::ScfOptions::default()).unwrap();
        let s = crate::integrals::overlap(&basis);
        let pg = detect_point_group(&mol, DEFAULT_TOLERANCE);
        let occ: Vec<usize> = (1..wf.n_alpha()).collect();
        let sets = describe_orbital_sets(
            &pg,
            &mol,
            &basis,
            &s,
            &wf.c_alpha,
            &wf.eps_alpha,
            &occ,
            1e-5,
        );
        let labels: Vec<&str> = sets.iter().map(|s| s.label.as_deref().unwrap()).collect();
        assert_eq!(labels, ["2a1", "1b2", "3a1", "1b1"]);
        let homo = sets.last().unwrap();
        assert_eq!(homo.character, Character::Nonbonding);
        assert_eq!(
            (homo.makeup[0].atom.as_str(), homo.makeup[0].shell.as_str()),
            ("O1", "2p")
        );
        assert!(sets.windows(2).all(|w| w[0].energy < w[1].energy));
    }
}
