//! Fixtures shared by the integration tests (`mod common;` in each test file).
#![allow(dead_code)]

use std::path::PathBuf;

use bandcast::chem::{Atom, Molecule};

/// Water at the Crawford group Programming Projects geometry (bohr), the geometry of their
/// STO-3G SCF, MP2 and CCSD projects (published reference values used in several tests).
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

/// A path in the system temporary directory unique to this test process.
pub fn temp_path(prefix: &str, name: &str) -> PathBuf {
    std::env::temp_dir().join(format!("bandcast-{prefix}-{}-{name}", std::process::id()))
}
