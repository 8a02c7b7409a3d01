//! Which atoms are bonded, from the distance alone: closer than 1.25 × the sum of their
//! covalent radii (B. Cordero et al., "Covalent radii revisited", Dalton Trans. (2008) 2832;
//! values typed from memory, C sp3 radius, low-spin radii for Mn, Fe, Co). The one bond
//! perception of the code: bonding analysis, vibronic bond changes and the chemical
//! environment of core levels (`environment.rs`) all use it.

use crate::chem::molecule::distance;
use crate::chem::Molecule;
use crate::units::ANGSTROM_TO_BOHR;

/// Bonded when R < BOND_FACTOR × (r_A + r_B).
pub const BOND_FACTOR: f64 = 1.25;

/// Covalent radius in Å, Cordero et al. (2008), H–Kr (from memory); None beyond.
pub fn covalent_radius_angstrom(z: u32) -> Option<f64> {
    const R: [f64; 36] = [
        0.31, 0.28, // H He
        1.28, 0.96, 0.84, 0.76, 0.71, 0.66, 0.57, 0.58, // Li–Ne
        1.66, 1.41, 1.21, 1.11, 1.07, 1.05, 1.02, 1.06, // Na–Ar
        2.03, 1.76, 1.70, 1.60, 1.53, 1.39, 1.39, 1.32, 1.26, 1.24, 1.32, 1.22, // K–Zn
        1.22, 1.20, 1.19, 1.20, 1.20, 1.16, // Ga–Kr
    ];
    R.get((z as usize).checked_sub(1)?).copied()
}

/// Bonded atom pairs (A < B).
pub fn bonded_pairs(mol: &Molecule) -> Vec<(usize, usize)> {
    let mut v = Vec::new();
    for (b, ab) in mol.atoms.iter().enumerate() {
        for (a, aa) in mol.atoms[..b].iter().enumerate() {
            let (Some(ra), Some(rb)) = (
                covalent_radius_angstrom(aa.z),
                covalent_radius_angstrom(ab.z),
            ) else {
                continue;
            };
            let limit = BOND_FACTOR * (ra + rb) * ANGSTROM_TO_BOHR;
            if distance(&aa.position, &ab.position) < limit {
                v.push((a, b));
            }
        }
    }
    v
}

/// The bonded neighbours of every atom (ascending indices).
pub fn neighbours(mol: &Molecule) -> Vec<Vec<usize>> {
    let mut n = vec![Vec::new(); mol.atoms.len()];
    for (a, b) in bonded_pairs(mol) {
        n[a].push(b);
        n[b].push(a);
    }
    for v in n.iter_mut() {
        v.sort_unstable();
    }
    n
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::Atom;

    #[test]
    fn bonds_by_covalent_radii() {
        // Water at its experimental geometry (O–H 0.958 Å): two O–H bonds, no H–H bond
        // (H···H 1.51 Å > 1.25 × 0.62 Å).
        let a = ANGSTROM_TO_BOHR;
        let m = Molecule::new(vec![
            Atom {
                z: 8,
                position: [0.0, 0.0, 0.0],
            },
            Atom {
                z: 1,
                position: [0.7571 * a, 0.0, 0.5861 * a],
            },
            Atom {
                z: 1,
                position: [-0.7571 * a, 0.0, 0.5861 * a],
            },
        ]);
        assert_eq!(bonded_pairs(&m), vec![(0, 1), (0, 2)]);
        assert_eq!(neighbours(&m), vec![vec![1, 2], vec![0], vec![0]]);
    }
}
