//! Molecules the unit tests of several rooms share (test builds only). Integration tests
//! have their own copy in `tests/common/` (they cannot see `cfg(test)` items).

use crate::chem::xyz::{parse_xyz, LengthUnit};
use crate::chem::{Atom, Molecule};

/// Water at the Crawford group Programming Projects geometry (bohr): the geometry of their
/// STO-3G SCF, MP2 and CCSD projects (docs/reference-data.md §1).
pub fn crawford_water() -> Molecule {
    Molecule::new(vec![
        Atom {
            z: 8,
            position: [0.0, -0.143225816552, 0.0],
        },
        Atom {
            z: 1,
            position: [1.638036840407, 1.136548822547, 0.0],
        },
        Atom {
            z: 1,
            position: [-1.638036840407, 1.136548822547, 0.0],
        },
    ])
}

/// A rough ethanol (Å, no symmetry): three distinct heavy atoms for core-level planning tests.
pub fn rough_ethanol() -> Molecule {
    parse_xyz(
        "9\nethanol\nC 0 0 0\nC 1.52 0 0\nO 2.0 1.3 0\nH 0 1 0\nH 0 -0.5 0.9\nH 0 -0.5 -0.9\n\
         H 1.9 -0.5 0.9\nH 1.9 -0.5 -0.9\nH 2.9 1.3 0\n",
        LengthUnit::Angstrom,
    )
    .unwrap()
}
