//! Orbital make-up (Mulliken populations) and bonding character on HF orbitals.

use bandcast::analysis::bonding::{bonding_character, Character};
use bandcast::analysis::population::{merge_by_element, orbital_makeup};
use bandcast::analysis::symmetry::{
    degenerate_sets, detect_point_group, label_orbitals, OrbitalLabel, DEFAULT_TOLERANCE,
};
use bandcast::basis::BasisSet;
use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::scf::{run, ScfOptions, Wavefunction};
use bandcast_linalg::Mat;

struct Case {
    mol: Molecule,
    basis: BasisSet,
    s: Mat<f64>,
    wf: Wavefunction,
    labels: Vec<OrbitalLabel>,
}

fn case(file: &str, basis: &str) -> Case {
    let p = std::path::Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/gw100"))
        .join(format!("{file}.xyz"));
    let mol = read_xyz(&p, LengthUnit::Angstrom).unwrap();
    let basis = bandcast::basis::load(basis, &mol, None).unwrap();
    let wf = run(&mol, &basis, &ScfOptions::default()).unwrap();
    let s = bandcast::integrals::overlap(&basis);
    let pg = detect_point_group(&mol, DEFAULT_TOLERANCE);
    let labels = label_orbitals(&pg, &mol, &basis, &s, &wf.c_alpha, &wf.eps_alpha, 1e-5);
    Case {
        mol,
        basis,
        s,
        wf,
        labels,
    }
}

impl Case {
    /// MO columns of the occupied set labelled `label`.
    fn set(&self, label: &str) -> Vec<usize> {
        degenerate_sets(&self.labels)
            .into_iter()
            .find(|s| self.labels[s[0]].label.as_deref() == Some(label))
            .unwrap_or_else(|| panic!("no {label}"))
    }
    fn character(&self, label: &str) -> (Character, f64) {
        let (ch, q, _) = bonding_character(
            &self.mol,
            &self.basis,
            &self.s,
            &self.wf.c_alpha,
            &self.set(label),
        );
        (ch, q)
    }
}

/// Water's out-of-plane lone pair 1b1 is almost pure O 2p and nonbonding; 1b2 is the O–H
/// bonding combination of O 2p and H 1s; 2a1 mostly O 2s (textbook MO diagram of water,
/// common practice).
#[test]
fn water_makeup_and_character() {
    let w = case("water", "cc-pvdz");
    let homo = w.set("1b1");
    let mk = merge_by_element(&orbital_makeup(
        &w.mol,
        &w.basis,
        &w.s,
        &w.wf.c_alpha,
        &homo,
    ));
    assert_eq!((mk[0].atom.as_str(), mk[0].shell.as_str()), ("O", "2p"));
    assert!(mk[0].fraction > 0.9, "{mk:?}");
    assert_eq!(w.character("1b1").0, Character::Nonbonding);
    assert_eq!(w.character("1b2").0, Character::Bonding);
    assert_eq!(w.character("2a1").0, Character::Bonding);
    let mk = orbital_makeup(&w.mol, &w.basis, &w.s, &w.wf.c_alpha, &w.set("1b2"));
    // Per atom: the two hydrogens carry equal shares.
    let h: Vec<f64> = mk
        .iter()
        .filter(|e| e.shell == "1s")
        .map(|e| e.fraction)
        .collect();
    assert_eq!(h.len(), 2);
    assert!((h[0] - h[1]).abs() < 1e-6);
    let mk = merge_by_element(&orbital_makeup(
        &w.mol,
        &w.basis,
        &w.s,
        &w.wf.c_alpha,
        &w.set("2a1"),
    ));
    assert_eq!((mk[0].atom.as_str(), mk[0].shell.as_str()), ("O", "2s"));
    // The core orbital 1a1 is O 1s.
    let mk = orbital_makeup(&w.mol, &w.basis, &w.s, &w.wf.c_alpha, &w.set("1a1"));
    assert_eq!((mk[0].atom.as_str(), mk[0].shell.as_str()), ("O1", "1s"));
    assert!(mk[0].fraction > 0.99);
    // Kept entries lie between the cut-off and 1 (Mulliken shares can exceed 1 slightly
    // when another share is negative).
    assert!(mk.iter().all(|e| e.fraction >= 0.02 && e.fraction < 1.01));
}

/// N2 (textbook MO diagram, common practice): 1πu bonding; 3σg essentially nonbonding
/// (short progression of the N2⁺ X band); both 1s core orbitals labelled N 1s.
#[test]
fn nitrogen_characters() {
    let n = case("nitrogen", "cc-pvdz");
    assert_eq!(n.character("1πu").0, Character::Bonding);
    assert_eq!(n.character("3σg").0, Character::Nonbonding);
    assert_eq!(n.character("2σg").0, Character::Bonding);
    for set in ["1σg", "1σu"] {
        let mk = merge_by_element(&orbital_makeup(
            &n.mol,
            &n.basis,
            &n.s,
            &n.wf.c_alpha,
            &n.set(set),
        ));
        assert_eq!((mk[0].atom.as_str(), mk[0].shell.as_str()), ("N", "1s"));
    }
    let mk = merge_by_element(&orbital_makeup(
        &n.mol,
        &n.basis,
        &n.s,
        &n.wf.c_alpha,
        &n.set("1πu"),
    ));
    assert_eq!(mk[0].shell, "2p");
    assert!(mk[0].fraction > 0.95);
}

/// CO: the HOMO 5σ is the carbon lone pair (C 2s/2p, nonbonding); 1π is bonding and
/// polarised towards O (textbook, common practice). HF: 1π is the F 2p lone pair.
#[test]
fn carbon_monoxide_and_hydrogen_fluoride() {
    let co = case("carbon-monoxide", "cc-pvdz");
    let homo = co.wf.n_alpha() - 1;
    assert_eq!(co.labels[homo].label.as_deref(), Some("5σ"));
    assert_eq!(co.character("5σ").0, Character::Nonbonding);
    let mk = merge_by_element(&orbital_makeup(
        &co.mol,
        &co.basis,
        &co.s,
        &co.wf.c_alpha,
        &co.set("5σ"),
    ));
    let c_share: f64 = mk
        .iter()
        .filter(|e| e.atom == "C")
        .map(|e| e.fraction)
        .sum();
    assert!(c_share > 0.6, "{mk:?}");
    assert_eq!(co.character("1π").0, Character::Bonding);
    let mk = merge_by_element(&orbital_makeup(
        &co.mol,
        &co.basis,
        &co.s,
        &co.wf.c_alpha,
        &co.set("1π"),
    ));
    assert_eq!((mk[0].atom.as_str(), mk[0].shell.as_str()), ("O", "2p"));

    let hf = case("hydrogen-fluoride", "cc-pvdz");
    assert_eq!(hf.character("1π").0, Character::Nonbonding);
    assert_eq!(hf.character("3σ").0, Character::Bonding);
}

/// F2: the HOMO 1πg is antibonding (F2⁺ has the shorter bond; common practice).
#[test]
fn fluorine_homo_is_antibonding() {
    let f = case("fluorine", "cc-pvdz");
    let homo = f.wf.n_alpha() - 1;
    assert_eq!(f.labels[homo].irrep.as_deref(), Some("πg"));
    assert_eq!(f.character("1πg").0, Character::Antibonding);
    assert_eq!(f.character("1πu").0, Character::Bonding);
}
