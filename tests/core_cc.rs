//! `bandcast core --method dccsd|dccsd-t` against published gas-phase 1s binding energies
//! (docs/reference-data.md §4).
//!
//! ΔCCSD(T): coupled cluster on the neutral and on the MOM-held core-ionized UHF state, the
//! emptied core orbital removed from the ion's virtual space (core_level/delta_cc.rs). In
//! the test-affordable cc-pVDZ basis (hole atom s and p uncontracted) the values are
//! non-relativistic and basis-limited; docs/core-levels.md has the table in larger sets.

use std::path::{Path, PathBuf};

use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::core_level::delta_cc::DeltaCc;
use bandcast::core_level::{CoreOptions, CoreResult, TargetSelection};

fn gw100(name: &str) -> PathBuf {
    Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/gw100")).join(format!("{name}.xyz"))
}

fn load(name: &str) -> Molecule {
    read_xyz(&gw100(name), LengthUnit::Angstrom).expect("benchmark geometry")
}

fn run(mol: &Molecule, basis: &str, cc: DeltaCc) -> CoreResult {
    let set = bandcast::basis::load(basis, mol, None).unwrap();
    let opts = CoreOptions {
        targets: TargetSelection::AllHeavy,
        thorough: false,
        cc: Some(cc),
        ..CoreOptions::default()
    };
    bandcast::core_level::predict(mol, &set, &opts).expect("core-level run")
}

/// Ne 1s: experiment 870.2 eV (X-ray Data Booklet, docs/reference-data.md §4). Measured
/// here 870.28 eV (ΔCCSD(T), cc-pVDZ with uncontracted s/p, non-relativistic) against ΔSCF
/// 869.05 eV: correlation binds the 1s more strongly (by about 1 eV for Ne; common
/// practice), and the coupled-cluster value stays a core hole (a collapse into the valence
/// would give ≈ 21 eV). Tolerance 0.3 eV for the double-zeta basis.
#[test]
fn neon_1s_dccsd_t() {
    let r = run(&load("neon"), "cc-pVDZ", DeltaCc::CcsdT);
    let l = &r.core_levels[0];
    let t = l.cc.dccsdt_ev.expect("(T) was asked");
    let s = l.cc.dccsd_ev.expect("CCSD ran");
    assert!((t - 870.2).abs() < 0.3, "ΔCCSD(T) Ne 1s {t}");
    assert!(
        t - l.dscf_ev > 0.5 && t - l.dscf_ev < 2.0,
        "ΔSCF {} ΔCCSD(T) {t}",
        l.dscf_ev
    );
    // (T) is a small correction on top of CCSD for a core hole of a closed-shell atom
    assert!((t - s).abs() < 0.3, "ΔCCSD {s} ΔCCSD(T) {t}");
    assert_eq!(l.cc.method, "dccsd-t");
    assert_eq!(l.cc.binding_ev, t);
}

/// H2O O 1s: experiment 539.827 eV vertical (Wang et al. 2021, docs/reference-data.md §4);
/// measured 540.13 eV in cc-pVDZ (uncontracted s/p on O). About 50 s: ignored by default.
#[test]
#[ignore = "about 50 s in release mode on two cores; figure in docs/core-levels.md"]
fn water_o1s_dccsd_t() {
    let r = run(&load("water"), "cc-pVDZ", DeltaCc::CcsdT);
    let t = r.core_levels[0].cc.dccsdt_ev.unwrap();
    assert!((t - 539.827).abs() < 0.4, "ΔCCSD(T) O 1s {t}");
}
