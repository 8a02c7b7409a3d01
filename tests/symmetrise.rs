//! Inputs symmetric within the tolerance are symmetrised before a core-level run, so atoms
//! equivalent by symmetry are computed once and get identical numbers.
//!
//! Pyridine (GW100 structure, tests/data/gw100/pyridine.xyz) is C2v (exact condition of
//! the molecule: the two ortho carbons and the two meta carbons are pairwise equivalent); the
//! input is about 0.03 bohr off exact symmetry, which used to make the ortho carbons two
//! different atoms computed separately.

mod common;

use std::process::Command;

#[test]
fn pyridine_equivalent_carbons_get_identical_c1s() {
    let out = Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args([
            "core",
            "tests/data/gw100/pyridine.xyz",
            "--basis",
            "sto-3g",
            "--element",
            "C",
            "--quick",
            "--method",
            "dscf",
            "--json",
        ])
        .output()
        .unwrap();
    let j = common::json_of(&out);
    let levels = j["core_levels"].as_array().unwrap();
    assert_eq!(levels.len(), 5);
    let by_label = |l: &str| {
        levels
            .iter()
            .find(|x| x["label"].as_str().unwrap_or("").starts_with(l))
            .unwrap_or_else(|| panic!("no level {l}: {j}"))
    };
    // The file's carbons: C2/C3 (one pair) and C4/C5 (the other pair), C6 para.
    for (a, b) in [("C2", "C3"), ("C4", "C5")] {
        let (x, y) = (by_label(a), by_label(b));
        for key in ["dscf_ev", "koopmans_ev"] {
            let d = (x[key].as_f64().unwrap() - y[key].as_f64().unwrap()).abs();
            assert!(d <= 0.01, "{a}/{b} {key} differ by {d} eV");
        }
    }
    let codes: Vec<&str> = j["note_details"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|n| n["code"].as_str())
        .collect();
    assert!(codes.contains(&"symmetrised"), "{codes:?}");
}
