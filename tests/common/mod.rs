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

/// A structure of the bundled GW100 set (tests/data/gw100, experimental geometries).
pub fn gw100_file(name: &str) -> PathBuf {
    PathBuf::from(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/gw100"))
        .join(format!("{name}.xyz"))
}

/// A GW100 molecule read from its XYZ file (Å).
pub fn gw100_molecule(name: &str) -> bandcast::chem::Molecule {
    bandcast::chem::xyz::read_xyz(&gw100_file(name), bandcast::chem::xyz::LengthUnit::Angstrom)
        .expect("benchmark geometry")
}

/// The bandcast binary built for these tests.
pub fn bandcast() -> std::process::Command {
    std::process::Command::new(env!("CARGO_BIN_EXE_bandcast"))
}

/// The `--json` object a finished command printed; fails the test, showing stderr, when the
/// command did not succeed.
pub fn json_of(out: &std::process::Output) -> serde_json::Value {
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("JSON on stdout")
}

/// A hand-made band (method "hand-made", occupation 2, degeneracy 1) with the make-up
/// `(atom, shell, fraction)`: only what spectra and assignments read.
pub fn hand_band(
    label: &str,
    ie: f64,
    makeup: &[(&str, &str, f64)],
    region: bandcast::ionization::Region,
) -> bandcast::ionization::Band {
    bandcast::ionization::Band {
        label: label.into(),
        symmetry: None,
        ie_ev: ie,
        degeneracy: 1,
        occupation: 2.0,
        pole_strength: None,
        one_hole_weight: None,
        character: None,
        character_note: None,
        makeup: makeup
            .iter()
            .map(|(a, s, f)| bandcast::ionization::MakeupEntry {
                atom: a.to_string(),
                shell: s.to_string(),
                fraction: *f,
            })
            .collect(),
        method: "hand-made".into(),
        region,
        atom: None,
        lifetime_fwhm_ev: None,
        environment: None,
    }
}

/// The `code` of every typed note of a command's JSON (`note_details`), in order.
pub fn note_codes(v: &serde_json::Value) -> Vec<&str> {
    v["note_details"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n["code"].as_str().unwrap())
        .collect()
}
