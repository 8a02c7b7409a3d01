//! How many of the lowest orbitals count as core: left out of correlation sums when the core
//! is frozen, and left out of valence band lists.
//!
//! Common practice: freeze the closed noble-gas shells below the valence shell — none for H
//! and He, 1s for Li–Ne, 1s2s2p for Na–Ar, [Ar] for K–Zn, and [Ar]3d for Ga–Kr.

use crate::chem::Molecule;

/// Core orbitals (spatial) of one atom of atomic number `z`.
pub fn core_orbitals_of(z: u32) -> usize {
    match z {
        0..=2 => 0,
        3..=10 => 1,
        11..=18 => 5,
        19..=30 => 9,
        _ => 14,
    }
}

/// Core orbitals of a molecule: the sum over its atoms, capped so that a cation with fewer
/// electrons keeps at least its valence electrons (never more than floor(n_electrons/2)).
pub fn core_orbitals(mol: &Molecule) -> usize {
    let n: usize = mol.atoms.iter().map(|a| core_orbitals_of(a.z)).sum();
    n.min(mol.n_electrons() / 2)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::molecule::Atom;

    #[test]
    fn counts_follow_noble_gas_shells() {
        assert_eq!(core_orbitals_of(1), 0);
        assert_eq!(core_orbitals_of(8), 1);
        assert_eq!(core_orbitals_of(17), 5);
        assert_eq!(core_orbitals_of(26), 9);
        let water = Molecule::new(vec![
            Atom {
                z: 8,
                position: [0.0; 3],
            },
            Atom {
                z: 1,
                position: [1.0, 0.0, 0.0],
            },
            Atom {
                z: 1,
                position: [0.0, 1.0, 0.0],
            },
        ]);
        assert_eq!(core_orbitals(&water), 1);
        // Li3+ has no electrons: nothing is core
        let li = Molecule::new(vec![Atom {
            z: 3,
            position: [0.0; 3],
        }])
        .with_charge_multiplicity(3, 1)
        .unwrap();
        assert_eq!(core_orbitals(&li), 0);
    }
}
