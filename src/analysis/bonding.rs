//! Bonding character of an orbital from its share of the overlap population between bonded
//! atoms, and what that means for the band shape.
//!
//! Per orbital i (Mulliken overlap population, R. S. Mulliken, J. Chem. Phys. 23 (1955)
//! 1833), over bonded pairs A < B:
//!
//!   q_i = Σ_{A<B bonded} Σ_{μ∈A, ν∈B} 2 C_μi C_νi S_μν,
//!
//! for one electron in the orbital; for a degenerate set the mean over its orbitals.
//! Bonded atoms come from `chem::bonds` (closer than 1.25 × the sum of their covalent
//! radii).
//!
//! Thresholds (`BONDING_THRESHOLD`, `STRONG_THRESHOLD`): q > +0.08 bonding, q < −0.08
//! antibonding, otherwise nonbonding; |q| < 0.2 is called "weakly". Tuned on HF/cc-pVDZ
//! orbitals at the GW100 geometries (tests/population.rs), against the textbook MO diagrams
//! (common practice): lone pairs give |q| ≤ 0.07 (water 1b1 +0.04 and 3a1 +0.01, HF 1π
//! +0.02, CO 5σ −0.07 and 4σ +0.03, N2 3σg −0.03); bond orbitals +0.27…+0.45 (N2 1πu +0.27,
//! water 1b2 +0.37, methane 1t2 +0.41); F2, with its long bond and contracted 2p, sits low:
//! 3σg +0.084, 1πu +0.094 (bonding), 1πg −0.119 and 2σu −0.120 (antibonding), hence 0.08 and
//! not 0.1; N2 2σu −0.135 is weakly antibonding (N2⁺ B state slightly shorter than N2,
//! common practice). Not captured: a change of bond *angle* (water's 3a1 band is broad from
//! the bending progression although its bond overlap population is near zero).
//!
//! Spectroscopic consequence (Franck–Condon principle; common practice): removing an
//! electron from a bonding or antibonding orbital changes the equilibrium bond lengths, so
//! the band shows a long vibrational progression (broad band); a nonbonding orbital leaves
//! the geometry nearly unchanged, so the band is short and sharp, the 0–0 transition
//! strongest. Mulliken overlap populations are basis-dependent and qualitative: this is a
//! guide for reading a spectrum, not a prediction of the band shape.

use crate::basis::BasisSet;
use crate::chem::bonds::bonded_pairs;
use crate::chem::Molecule;
use bandcast_linalg::Mat;
use serde::Serialize;

/// |q| above which an orbital counts as bonding (q > 0) or antibonding (q < 0).
pub const BONDING_THRESHOLD: f64 = 0.08;
/// |q| below which a bonding/antibonding orbital is called "weakly" so.
pub const STRONG_THRESHOLD: f64 = 0.2;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Character {
    Bonding,
    Nonbonding,
    Antibonding,
}

impl Character {
    pub fn as_str(self) -> &'static str {
        match self {
            Character::Bonding => "bonding",
            Character::Nonbonding => "nonbonding",
            Character::Antibonding => "antibonding",
        }
    }

    /// What to expect in the photoelectron band.
    pub fn consequence(self) -> &'static str {
        match self {
            Character::Bonding => {
                "bonding: bonds lengthen on ionization, long vibrational progression expected"
            }
            Character::Antibonding => {
                "antibonding: bonds shorten on ionization, long vibrational progression expected"
            }
            Character::Nonbonding => "nonbonding: short progression, sharp band",
        }
    }
}

/// Mean bonded overlap population q of the orbitals `mo_indices` (see the module docs).
pub fn bond_overlap_population(
    mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    mo_indices: &[usize],
) -> f64 {
    if mo_indices.is_empty() {
        return 0.0;
    }
    let n_atoms = mol.atoms.len();
    let mut bonded = vec![false; n_atoms * n_atoms];
    for (a, b) in bonded_pairs(mol) {
        bonded[a * n_atoms + b] = true;
        bonded[b * n_atoms + a] = true;
    }
    let ao = basis.ao_map();
    let n = basis.n_basis;
    let mut q = 0.0;
    for &i in mo_indices {
        for mu in 0..n {
            let a = ao[mu].0;
            for nu in 0..mu {
                let b = ao[nu].0;
                if a != b && bonded[a * n_atoms + b] {
                    q += 2.0 * c[(mu, i)] * c[(nu, i)] * s[(mu, nu)];
                }
            }
        }
    }
    q / mo_indices.len() as f64
}

/// Classification of an orbital or degenerate set: (character, q, consequence).
pub fn bonding_character(
    mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    mo_indices: &[usize],
) -> (Character, f64, &'static str) {
    let q = bond_overlap_population(mol, basis, s, c, mo_indices);
    let ch = classify(q);
    (ch, q, consequence(ch, q))
}

/// Band-shape note for a character and its q ("weakly" below `STRONG_THRESHOLD`).
pub fn consequence(ch: Character, q: f64) -> &'static str {
    match ch {
        Character::Nonbonding => ch.consequence(),
        _ if q.abs() >= STRONG_THRESHOLD => ch.consequence(),
        Character::Bonding => {
            "weakly bonding: bonds lengthen a little on ionization, short to moderate vibrational progression"
        }
        Character::Antibonding => {
            "weakly antibonding: bonds shorten a little on ionization, short to moderate vibrational progression"
        }
    }
}

/// Character from an overlap population q.
pub fn classify(q: f64) -> Character {
    if q > BONDING_THRESHOLD {
        Character::Bonding
    } else if q < -BONDING_THRESHOLD {
        Character::Antibonding
    } else {
        Character::Nonbonding
    }
}

/// The name in the shared interface plan.
pub fn character(
    mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    mo_indices: &[usize],
) -> (Character, f64, &'static str) {
    bonding_character(mol, basis, s, c, mo_indices)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn classification_thresholds() {
        assert_eq!(classify(0.3), Character::Bonding);
        assert_eq!(classify(-0.3), Character::Antibonding);
        assert_eq!(classify(0.01), Character::Nonbonding);
    }
}
