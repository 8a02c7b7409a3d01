//! MOL and SD files written by a general-purpose chemistry library (RDKit 2026.09.1, from
//! PyPI; tests/data/sdf/PROVENANCE, tools/make_sdf_fixtures.py) read to the same geometry as
//! the XYZ files the same library wrote for the same molecules, with the charge and radical
//! marks it wrote.

use std::path::Path;

use bandcast::chem::structure::read_structures;
use bandcast::chem::xyz::LengthUnit;
use bandcast::chem::Molecule;

fn read(name: &str) -> Vec<bandcast::chem::sdf::Record> {
    read_structures(
        &Path::new("tests/data/sdf").join(name),
        LengthUnit::Angstrom,
    )
    .unwrap_or_else(|e| panic!("{name}: {e}"))
}

fn xyz(name: &str) -> Molecule {
    read(name).remove(0).molecule
}

/// Same elements in the same order, positions equal to the 1e-4 Å the molfile columns carry.
fn assert_same_geometry(a: &Molecule, b: &Molecule, what: &str) {
    assert_eq!(a.atoms.len(), b.atoms.len(), "{what}: atom count");
    for (i, (x, y)) in a.atoms.iter().zip(&b.atoms).enumerate() {
        assert_eq!(x.z, y.z, "{what}: element of atom {}", i + 1);
        for k in 0..3 {
            let d = (x.position[k] - y.position[k]).abs() / bandcast::units::ANGSTROM_TO_BOHR;
            assert!(
                d <= 1.01e-4,
                "{what}: atom {} coordinate {k} differs by {d} Å",
                i + 1
            );
        }
    }
}

#[test]
fn v2000_and_v3000_records_match_the_xyz_of_the_same_molecule() {
    assert_same_geometry(
        &read("water-v2000.mol")[0].molecule,
        &xyz("water.xyz"),
        "water V2000",
    );
    // benzene is planar (every z = 0) but its header says 3D: a structure, not a drawing
    assert_same_geometry(
        &read("benzene-v3000.mol")[0].molecule,
        &xyz("benzene.xyz"),
        "benzene V3000",
    );
    for n in ["ammonium", "acetate"] {
        let x = xyz(&format!("{n}.xyz"));
        let v2 = read(&format!("{n}-v2000.mol")).remove(0);
        let v3 = read(&format!("{n}-v3000.mol")).remove(0);
        assert_same_geometry(&v2.molecule, &x, n);
        assert_same_geometry(&v3.molecule, &x, n);
    }
}

#[test]
fn charges_and_radicals_come_from_the_file() {
    // NH4+ and CH3COO− as the library wrote them (M  CHG in V2000, CHG= in V3000)
    for (n, q) in [("ammonium", 1), ("acetate", -1)] {
        for v in ["v2000", "v3000"] {
            let r = read(&format!("{n}-{v}.mol")).remove(0);
            assert_eq!(r.charge, Some(q), "{n} {v}");
            assert_eq!(r.molecule.charge, q, "{n} {v}");
            assert_eq!(r.molecule.multiplicity, 1, "{n} {v}: closed shell");
        }
    }
    // the methyl radical: M  RAD 2 (doublet) on the carbon
    let r = read("methyl-v2000.mol").remove(0);
    assert_eq!(r.multiplicity, Some(2));
    assert_eq!(r.molecule.multiplicity, 2);
    assert_eq!(r.molecule.charge, 0);
    assert_same_geometry(&r.molecule, &xyz("methyl.xyz"), "methyl");
}

#[test]
fn an_sd_file_with_several_records_is_several_molecules() {
    let recs = read("three.sdf");
    assert_eq!(recs.len(), 3);
    let names: Vec<&str> = recs.iter().map(|r| r.molecule.name.as_str()).collect();
    assert_eq!(names, ["water", "ammonia", "ethanol"]);
    assert_same_geometry(&recs[0].molecule, &xyz("water.xyz"), "record 1");
    assert_same_geometry(&recs[1].molecule, &xyz("ammonia.xyz"), "record 2");
    assert_same_geometry(&recs[2].molecule, &xyz("ethanol.xyz"), "record 3");
    assert!(recs[1].line > recs[0].line && recs[2].line > recs[1].line);
}

#[test]
fn a_2d_drawing_is_refused_with_its_line() {
    let e = read_structures(
        Path::new("tests/data/sdf/phenol-2d.mol"),
        LengthUnit::Angstrom,
    )
    .unwrap_err();
    let msg = e.to_string();
    assert_eq!(e.exit_code(), 2);
    assert!(msg.starts_with("tests/data/sdf/phenol-2d.mol:2:"), "{msg}");
    assert!(msg.contains("2D"), "{msg}");
}

#[test]
fn bohr_is_refused_for_molfiles() {
    let e = read_structures(
        Path::new("tests/data/sdf/water-v2000.mol"),
        LengthUnit::Bohr,
    )
    .unwrap_err();
    assert_eq!(e.exit_code(), 2);
    assert!(e.to_string().contains("Å by definition"), "{e}");
}
