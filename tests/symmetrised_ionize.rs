//! `ionize` (and the request path of `spectrum`/`assign`) symmetrise a structure that is
//! symmetric within the tolerance before any work, say so with the largest displacement,
//! and report the point group from the same detection `core` uses.
//!
//! Geometries: GW100 set (van Setten et al., J. Chem. Theory Comput. 11 (2015) 5665),
//! tests/data/gw100. Exact condition checked: orbitals that an exact symmetry makes
//! degenerate (benzene's e1g HOMO pair, D6h; common practice) have identical energies.

mod common;

use std::process::Command;

use bandcast::chem::xyz::{parse_xyz, LengthUnit};
use bandcast::ionization::method::Method;
use bandcast::ionization::valence::{predict, ValenceOptions};
use bandcast::predict::{MethodChoice, Request};

/// Benzene with every atom pushed off its D6h position by up to 0.021 bohr (0.011 Å) in a
/// fixed pattern — within the 0.05 bohr tolerance, well above rounding.
fn perturbed_benzene() -> String {
    let text = std::fs::read_to_string("tests/data/gw100/benzene.xyz").unwrap();
    let mut out = Vec::new();
    for (k, line) in text.lines().enumerate() {
        if k < 2 {
            out.push(line.to_string());
            continue;
        }
        let f: Vec<&str> = line.split_whitespace().collect();
        let i = (k - 2) as f64;
        let dx = 0.008 * (1.7 * i).sin();
        let dy = 0.008 * (2.3 * i + 0.5).cos();
        let x: f64 = f[1].parse::<f64>().unwrap() + dx;
        let y: f64 = f[2].parse::<f64>().unwrap() + dy;
        out.push(format!("{} {x:.6} {y:.6} {}", f[0], f[3]));
    }
    out.join("\n") + "\n"
}

fn ionize_json(file: &std::path::Path, extra: &[&str]) -> serde_json::Value {
    let out = Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args([
            "ionize",
            file.to_str().unwrap(),
            "--basis",
            "sto-3g",
            "--json",
        ])
        .args(extra)
        .output()
        .unwrap();
    common::json_of(&out)
}

fn tmp(name: &str, text: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("bandcast-symion-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let f = dir.join(name);
    std::fs::write(&f, text).unwrap();
    f
}

/// Unsymmetrised, the perturbed benzene's e1g pair splits by more than 0.01 eV (so the
/// check below can fail); symmetrised by `ionize`, the pair is one band of two identical
/// orbitals, the group is D6h, and the note gives the largest displacement.
#[test]
fn perturbed_benzene_degenerate_pair_identical_and_said() {
    let text = perturbed_benzene();
    let m = parse_xyz(&text, LengthUnit::Angstrom).unwrap();
    let b = bandcast::basis::load("sto-3g", &m, None).unwrap();
    let raw = predict(
        &m,
        &b,
        &ValenceOptions {
            method: Method::Koopmans,
            degeneracy_tol: 0.0,
            count: Some(2),
            ..ValenceOptions::default()
        },
    )
    .unwrap();
    let split = raw.bands[1].ie_ev - raw.bands[0].ie_ev;
    assert!(split > 0.01, "unsymmetrised split {split} eV");

    let f = tmp("benzene-perturbed.xyz", &text);
    let v = ionize_json(&f, &["--method", "koopmans", "--count", "1"]);
    assert_eq!(v["point_group"], "D6h");
    let homo = &v["bands"][0];
    assert_eq!(homo["degeneracy"], 2, "{homo}");
    assert_eq!(homo["symmetry"], "e1g");
    let note = v["note_details"]
        .as_array()
        .unwrap()
        .iter()
        .find(|n| n["code"] == "symmetrised")
        .expect("a symmetrised note");
    let msg = note["message"].as_str().unwrap();
    assert!(
        msg.contains("D6h") && msg.contains("largest displacement"),
        "{msg}"
    );

    // the request path of spectrum/assign symmetrises the same way
    let mut req = Request::new(&m, &b, bandcast::ionization::Region::Valence);
    req.method = MethodChoice::Valence(Method::Koopmans);
    req.options.count = Some(1);
    let p = bandcast::predict::predict(&req, &|_| {}).unwrap();
    assert_eq!(p.bands[0].degeneracy, 2);
    assert!((p.bands[0].ie_ev - homo["ie_ev"].as_f64().unwrap()).abs() < 1e-9);
}

/// Pyridine as given by GW100 (ortho carbons 0.06 bohr off exact C2v): `ionize` and `core`
/// report the same group from the same detection and tolerance, and both say they moved
/// the atoms by the same largest displacement.
#[test]
fn pyridine_same_group_in_ionize_and_core() {
    let f = std::path::Path::new("tests/data/gw100/pyridine.xyz");
    let v = ionize_json(f, &["--method", "koopmans", "--count", "1"]);
    assert_eq!(v["point_group"], "C2v");
    let find = |v: &serde_json::Value| -> String {
        v["note_details"]
            .as_array()
            .unwrap()
            .iter()
            .find(|n| n["code"] == "symmetrised")
            .map(|n| n["message"].as_str().unwrap().to_string())
            .expect("a symmetrised note")
    };
    let ion = find(&v);
    let out = Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args(["core", f.to_str().unwrap(), "--basis", "sto-3g", "--quick"])
        .args(["--element", "N", "--method", "dscf", "--json"])
        .output()
        .unwrap();
    let c = common::json_of(&out);
    let core = find(&c);
    let disp = |m: &str| -> String {
        let i = m.find("largest displacement").unwrap();
        m[i..].split(')').next().unwrap().to_string()
    };
    assert!(
        ion.contains("C2v") && core.contains("C2v"),
        "{ion} / {core}"
    );
    assert_eq!(disp(&ion), disp(&core));
}
