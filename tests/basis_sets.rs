//! Bundled basis sets and the loader, checked against the published set definitions.

use std::path::PathBuf;

use bandcast::basis::{
    self, catalog, default_auxiliary_for, load, load_auxiliary, BasisData, Harmonics, SetKind,
};
use bandcast::chem::{Atom, Molecule};

mod common;
use common::crawford_water as water;

fn atom(z: u32, position: [f64; 3]) -> Atom {
    Atom { z, position }
}

fn one_atom(z: u32) -> Molecule {
    Molecule::new(vec![atom(z, [0.0; 3])])
}

fn temp_path(name: &str) -> PathBuf {
    common::temp_path("basis", name)
}

const ORBITAL_SETS: [&str; 17] = [
    "STO-3G",
    "3-21G",
    "6-31G",
    "6-31G*",
    "6-31G**",
    "6-31+G*",
    "6-311G**",
    "cc-pVDZ",
    "cc-pVTZ",
    "cc-pVQZ",
    "aug-cc-pVDZ",
    "aug-cc-pVTZ",
    "cc-pCVDZ",
    "cc-pCVTZ",
    "def2-SVP",
    "def2-TZVP",
    "def2-TZVPP",
];

#[test]
fn every_bundled_set_parses_and_names_its_source() {
    let names = catalog::names();
    assert!(names.len() >= 17 + 5);
    for name in names {
        let d = catalog::get(name).unwrap();
        assert_eq!(d.name, name);
        assert!(!d.elements.is_empty(), "{name}");
        // Writing the set out and reading it back gives the same data, bit for bit.
        assert_eq!(
            &BasisData::from_json(&d.to_json(), None).unwrap(),
            d,
            "{name}"
        );
        let cites: usize = d.source.iter().map(|s| s.cite.len()).sum();
        assert!(cites >= 1, "{name} cites no paper");
        // Every element the set defines has a source entry (possibly one saying that no
        // journal publication is recorded).
        for e in &d.elements {
            assert!(
                d.source
                    .iter()
                    .any(|s| s.elements.iter().any(|x| x == e.symbol())),
                "{name}: no source entry covers {}",
                e.symbol()
            );
        }
        // Fitting sets are the ones named …FIT (they are refused as orbital sets).
        assert_eq!(
            d.kind.is_fitting(),
            name.to_ascii_uppercase().ends_with("FIT"),
            "{name}"
        );
        // Every element loads on a single atom with the advertised function count.
        for e in &d.elements {
            let mol = one_atom(e.z);
            let b = if d.kind.is_fitting() {
                load_auxiliary(name, &mol).unwrap()
            } else {
                load(name, &mol, None).unwrap()
            };
            assert_eq!(b.n_basis, e.n_functions(d.harmonics == Harmonics::Pure));
            assert!(b
                .shells
                .iter()
                .all(|s| s.exponents.len() == s.coefficients.len()));
        }
    }
}

#[test]
fn orbital_sets_cover_hydrogen_to_argon() {
    // The published sets define H–Ar, except the core-valence sets, which start at Li
    // (Woon & Dunning, J. Chem. Phys. 103 (1995) 4572: H and He have no core; from memory).
    for name in ORBITAL_SETS {
        let zs = catalog::elements_of(name).unwrap();
        let first = if name.starts_with("cc-pCV") { 3 } else { 1 };
        assert_eq!(zs, (first..=18).collect::<Vec<u32>>(), "{name}");
        assert_eq!(catalog::get(name).unwrap().kind, SetKind::Orbital);
    }
    for name in [
        "def2-universal-JKFIT",
        "def2-SVP-RIFIT",
        "def2-TZVPP-RIFIT",
        "cc-pVDZ-RIFIT",
        "cc-pVTZ-RIFIT",
    ] {
        let d = catalog::get(name).unwrap();
        assert!(d.kind.is_fitting(), "{name}");
        assert_eq!(d.atomic_numbers(), (1..=18).collect::<Vec<u32>>(), "{name}");
    }
}

/// (set, Z, contracted shells, number of functions in the set's convention).
/// Sources (the set papers, shell structure from memory; common practice for counts):
/// STO-3G Hehre, Stewart & Pople 1969; 3-21G Binkley, Pople & Hehre 1980;
/// 6-31G* Hariharan & Pople 1973 (6d); 6-31+G* Clark et al. 1983; 6-311G** Krishnan et al.
/// 1980; cc-pVXZ Dunning 1989 (O: [3s2p1d], [4s3p2d1f], [5s4p3d2f1g]); aug-cc-pVDZ Kendall,
/// Dunning & Harrison 1992; cc-pCVXZ Woon & Dunning 1995; def2 Weigend & Ahlrichs 2005.
const SHELL_COUNTS: [(&str, u32, &str, usize); 22] = [
    ("STO-3G", 1, "1s", 1),
    ("STO-3G", 6, "2s1p", 5),
    ("STO-3G", 17, "3s2p", 9),
    ("3-21G", 6, "3s2p", 9),
    ("6-31G*", 6, "3s2p1d", 15),
    ("6-31G*", 1, "2s", 2),
    ("6-31G**", 1, "2s1p", 5),
    ("6-31+G*", 6, "4s3p1d", 19),
    ("6-311G**", 8, "4s3p1d", 18),
    ("6-311G**", 1, "3s1p", 6),
    ("cc-pVDZ", 8, "3s2p1d", 14),
    ("cc-pVDZ", 1, "2s1p", 5),
    ("cc-pVTZ", 8, "4s3p2d1f", 30),
    ("cc-pVQZ", 8, "5s4p3d2f1g", 55),
    ("aug-cc-pVDZ", 8, "4s3p2d", 23),
    ("cc-pCVDZ", 6, "4s3p1d", 18),
    ("cc-pCVTZ", 6, "6s5p3d1f", 43),
    ("def2-SVP", 8, "3s2p1d", 14),
    ("def2-SVP", 1, "2s1p", 5),
    ("def2-TZVP", 1, "3s1p", 6),
    ("def2-TZVPP", 6, "5s3p2d1f", 31),
    ("def2-TZVPP", 1, "3s2p1d", 14),
];

#[test]
fn shell_structure_matches_the_published_sets() {
    for (name, z, contracted, nf) in SHELL_COUNTS {
        let d = catalog::get(name).unwrap();
        let e = d.element(z).unwrap();
        assert_eq!(e.contracted_summary(), contracted, "{name} Z={z}");
        assert_eq!(
            e.n_functions(d.harmonics == Harmonics::Pure),
            nf,
            "{name} Z={z}"
        );
        let b = load(name, &one_atom(z), None).unwrap();
        assert_eq!(b.n_basis, nf, "{name} Z={z}");
    }
    // Primitive sets (Dunning 1989: O (9s4p1d) → [3s2p1d]; 6-31G*: C (10s4p1d), from memory).
    assert_eq!(
        catalog::get("cc-pVDZ")
            .unwrap()
            .element(8)
            .unwrap()
            .primitive_summary(),
        "9s4p1d"
    );
    assert_eq!(
        catalog::get("6-31G*")
            .unwrap()
            .element(6)
            .unwrap()
            .primitive_summary(),
        "10s4p1d"
    );
}

#[test]
fn conventions_and_override() {
    // Common practice: Pople sets with 6d, correlation-consistent and def2 with 5d.
    let w = water();
    let b = load("6-31G*", &w, None).unwrap();
    assert_eq!(b.n_basis, 15 + 2 + 2);
    assert!(b.shells.iter().all(|s| !s.pure));
    let b = load("6-31G*", &w, Some(Harmonics::Pure)).unwrap();
    assert_eq!(b.n_basis, 14 + 2 + 2);
    assert!(b.shells.iter().all(|s| s.pure));
    let b = load("cc-pVDZ", &w, None).unwrap();
    assert_eq!(b.n_basis, 24); // 14 + 5 + 5, common practice
    assert_eq!(b.name, "cc-pVDZ");
    let b = load("cc-pVDZ", &w, Some(Harmonics::Cartesian)).unwrap();
    assert_eq!(b.n_basis, 15 + 5 + 5); // O 3s2p1d with 6d = 15; H 2s1p = 5 each
                                       // Shells sit on their atoms, in atom order, with AO offsets accumulated.
    let b = load("STO-3G", &w, None).unwrap();
    assert_eq!(b.n_basis, 7);
    assert_eq!(
        b.shells.iter().map(|s| (s.atom, s.l)).collect::<Vec<_>>(),
        vec![(0, 0), (0, 0), (0, 1), (1, 0), (2, 0)]
    );
    assert_eq!(b.offsets, vec![0, 1, 2, 5, 6]);
    assert_eq!(b.shells[3].center, w.atoms[1].position);
}

#[test]
fn sto3g_hydrogen_is_the_published_contraction() {
    // Hehre, Stewart & Pople, J. Chem. Phys. 51 (1969) 2657, ζ = 1.24; as tabulated in Szabo
    // & Ostlund (1989) ch. 3 (from memory): α = 3.42525091, 0.62391373, 0.16885540;
    // d = 0.15432897, 0.53532814, 0.44463454.
    let d = catalog::get("sto-3g").unwrap();
    let h = &d.element(1).unwrap().shells;
    assert_eq!(h.len(), 1);
    let expect_a = [3.42525091, 0.62391373, 0.16885540];
    let expect_d = [0.15432897, 0.53532814, 0.44463454];
    for i in 0..3 {
        assert!((h[0].exponents[i] - expect_a[i]).abs() < 1e-7, "{:?}", h[0]);
        assert!(
            (h[0].coefficients[i] - expect_d[i]).abs() < 1e-7,
            "{:?}",
            h[0]
        );
    }
    // The library's text is kept digit for digit: 0.3425250914E+01 parses to this f64.
    assert_eq!(h[0].exponents[0], 3.425250914);
}

#[test]
fn cc_pvdz_hydrogen_exponents() {
    // Dunning, J. Chem. Phys. 90 (1989) 1007, H (4s1p)/[2s1p]: s exponents 13.01, 1.962,
    // 0.4446, 0.1220; p exponent 0.727 (from memory).
    let d = catalog::get("cc-pvdz").unwrap();
    let h = &d.element(1).unwrap().shells;
    let s: Vec<f64> = h[0].exponents.clone();
    for (got, want) in s.iter().zip([13.01, 1.962, 0.4446, 0.1220]) {
        assert!((got - want).abs() < 1e-3 * want, "{s:?}");
    }
    assert_eq!(h.len(), 3);
    assert_eq!(h[2].l, 1);
    assert!((h[2].exponents[0] - 0.727).abs() < 1e-3);
    // General contraction split: the second s shell is the free outer primitive alone.
    assert_eq!(h[1].exponents, vec![h[0].exponents[3]]);
}

#[test]
fn name_spellings_resolve() {
    let w = water();
    for (a, b) in [
        ("6-31g(d)", "6-31G*"),
        ("6-31G(d,p)", "6-31G**"),
        ("6-31+g(d)", "6-31+G*"),
        ("6-311g(d,p)", "6-311G**"),
        ("CC-PVDZ", "cc-pVDZ"),
        ("def2svp", "def2-SVP"),
        ("Def2-TZVPP", "def2-TZVPP"),
        ("aug-cc-pvtz", "aug-cc-pVTZ"),
    ] {
        assert_eq!(load(a, &w, None).unwrap().name, b, "{a}");
    }
    let e = load("6-31G(2df)", &w, None).unwrap_err();
    assert_eq!(e.exit_code(), 2);
    assert!(e.to_string().contains("def2-TZVPP"), "{e}");
}

#[test]
fn missing_element_names_set_and_element() {
    // cc-pCVDZ starts at Li (see above): hydrogen is missing.
    let e = load("cc-pCVDZ", &water(), None).unwrap_err();
    let s = e.to_string();
    assert!(
        s.contains("cc-pCVDZ") && s.contains(" H ") && s.contains("Li–Ar"),
        "{s}"
    );
    assert_eq!(e.exit_code(), 2);
    let k = Molecule::new(vec![atom(19, [0.0; 3])]);
    let s = load("def2-SVP", &k, None).unwrap_err().to_string();
    assert!(s.contains("def2-SVP") && s.contains(" K "), "{s}");
}

#[test]
fn fitting_sets_load_only_as_auxiliaries() {
    let w = water();
    let e = load("def2-universal-jkfit", &w, None).unwrap_err();
    assert!(e.to_string().contains("auxiliary"), "{e}");
    let aux = load_auxiliary("def2-universal-JKFIT", &w).unwrap();
    assert!(aux.shells.iter().all(|s| s.pure));
    assert!(aux.n_basis > load("def2-SVP", &w, None).unwrap().n_basis);
    // Default fitting sets exist and are fitting sets.
    for name in ORBITAL_SETS {
        if let Some(aux) = default_auxiliary_for(name) {
            assert_eq!(
                catalog::get(aux).unwrap().kind,
                SetKind::FittingRi,
                "{name}"
            );
            // The RI sets made for def2-* and cc-pVXZ cover every element of their set.
            if name.starts_with("def2-") || name.starts_with("cc-pV") {
                assert_eq!(
                    catalog::elements_of(aux).unwrap(),
                    catalog::elements_of(name).unwrap()
                );
            }
        }
    }
    assert_eq!(default_auxiliary_for("def2-svp"), Some("def2-SVP-RIFIT"));
    assert_eq!(default_auxiliary_for("cc-pVTZ"), Some("cc-pVTZ-RIFIT"));
    assert_eq!(
        basis::default_jk_auxiliary_for("def2-TZVPP"),
        Some("def2-universal-JKFIT")
    );
}

#[test]
fn user_file_round_trip() {
    let w = water();
    let bundled = load("cc-pVTZ", &w, None).unwrap();
    let path = temp_path("cc-pvtz-copy.json");
    std::fs::write(&path, catalog::get("cc-pVTZ").unwrap().to_json()).unwrap();
    let user = load(path.to_str().unwrap(), &w, None).unwrap();
    assert_eq!(user.name, path.to_str().unwrap());
    assert_eq!(user.shells, bundled.shells);
    assert_eq!(user.n_basis, bundled.n_basis);
    let reread = basis::load::read_user_file(&path).unwrap();
    assert_eq!(&reread, catalog::get("cc-pVTZ").unwrap());
    std::fs::remove_file(&path).ok();
}

#[test]
fn malformed_user_files_point_at_the_line() {
    let good = catalog::get("STO-3G").unwrap().to_json();
    let path = temp_path("broken.json");

    // A coefficient dropped from the oxygen 2p shell (third shell; one shell per line in
    // the written layout, so the error must name that line).
    let data: BasisData = catalog::get("STO-3G").unwrap().clone();
    let mut bad = data.clone();
    bad.elements.iter_mut().find(|e| e.z == 8).unwrap().shells[2]
        .coefficients
        .pop();
    std::fs::write(&path, bad.to_json()).unwrap();
    let e = load(path.to_str().unwrap(), &water(), None).unwrap_err();
    let s = e.to_string();
    assert_eq!(e.exit_code(), 2);
    assert!(
        s.contains("O, shell 3") && s.contains("3 exponents but 2 coefficients"),
        "{s}"
    );
    let text = bad.to_json();
    let o_at = text.find("\"O\": [").unwrap();
    let third = text[o_at..].match_indices('{').nth(2).unwrap().0 + o_at;
    let line = text[..third].matches('\n').count() + 1;
    assert!(
        s.starts_with(&format!("{}:{line}:", path.display())),
        "{s} (want {line})"
    );

    // Broken JSON syntax.
    std::fs::write(&path, good.replacen("\"l\": 0", "\"l\" 0", 1)).unwrap();
    let s = load(path.to_str().unwrap(), &water(), None)
        .unwrap_err()
        .to_string();
    assert!(
        s.contains("broken.json:") && s.contains("not a valid basis-set file"),
        "{s}"
    );

    // Wrong convention word.
    std::fs::write(&path, good.replace("\"cartesian\"", "\"spherical\"")).unwrap();
    let s = load(path.to_str().unwrap(), &water(), None)
        .unwrap_err()
        .to_string();
    assert!(s.contains("unknown variant `spherical`"), "{s}");
    std::fs::remove_file(&path).ok();

    // Missing file ending in .json.
    let e = load("/nonexistent/dir/set.json", &water(), None).unwrap_err();
    assert!(e.to_string().contains("cannot read basis-set file"), "{e}");
    assert_eq!(e.exit_code(), 2);
}

#[test]
fn szabo_ostlund_heh_plus_file() {
    // tests/data/heh-szabo-sto3g.json: STO-3G with ζ(He) = 2.0925, ζ(H) = 1.24, exponents
    // ζ² × (2.22766, 0.405771, 0.109818), coefficients 0.154329, 0.535328, 0.444635
    // (Szabo & Ostlund (1989) ch. 3, from memory).
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/heh-szabo-sto3g.json"
    );
    let heh = Molecule::new(vec![atom(2, [0.0; 3]), atom(1, [0.0, 0.0, 1.4632])])
        .with_charge_multiplicity(1, 1)
        .unwrap();
    let b = load(path, &heh, None).unwrap();
    assert_eq!(b.n_basis, 2);
    let base = [2.22766, 0.405771, 0.109818];
    for (shell, zeta) in b.shells.iter().zip([2.0925f64, 1.24]) {
        for (a, s) in shell.exponents.iter().zip(base) {
            assert!((a - zeta * zeta * s).abs() < 1e-12 * a);
        }
        assert_eq!(shell.coefficients, vec![0.154329, 0.535328, 0.444635]);
    }
    // The H shell differs from the standard STO-3G only by the book's rounding of the
    // contraction (Hehre, Stewart & Pople 1969 values: 3.42525091, 0.15432897).
    assert!((b.shells[1].exponents[0] - 3.42525091).abs() < 1e-5);
}

#[test]
fn command_lists_and_shows_sets() {
    let exe = env!("CARGO_BIN_EXE_bandcast");
    let out = std::process::Command::new(exe)
        .arg("basis")
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    for name in catalog::names() {
        assert!(text.contains(name), "listing lacks {name}");
    }
    assert!(text.contains("Dunning 1989"), "{text}");
    let out = std::process::Command::new(exe)
        .args(["basis", "cc-pvdz", "--elements", "O,H"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    // Dunning (1989): O (9s4p1d)/[3s2p1d], 14 functions with 5d.
    assert!(
        text.contains("(9s4p1d)") && text.contains("3s2p1d"),
        "{text}"
    );
    assert!(text.contains("doi:10.1063/1.456153"), "{text}");
    let out = std::process::Command::new(exe)
        .args(["basis", "no-such-set"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
}
