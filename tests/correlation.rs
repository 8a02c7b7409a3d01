//! Correlated ground state and ionization energies (CCSD, MP2, EOM-IP-CCSD, EOM-IP-MBPT2)
//! against published values. Sources are named beside each check value.

use std::path::Path;

mod common;
use common::crawford_water;

use bandcast::basis;
use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::correlation::eom_ip::{
    ionize_report, EomMethod, EomOptions, EomReport, IonizedState, RootSpec,
};
use bandcast::correlation::two_electron::TwoElectron;
use bandcast::scf::{self, ScfOptions, Wavefunction};
use bandcast::units::HARTREE_TO_EV;

fn gw100(name: &str) -> Molecule {
    // GW100 structures (van Setten et al., J. Chem. Theory Comput. 11 (2015) 5665), copied
    // into tests/data/gw100 so the suite runs from any clone.
    let p = format!("{}/tests/data/gw100/{name}.xyz", env!("CARGO_MANIFEST_DIR"));
    read_xyz(Path::new(&p), LengthUnit::Angstrom).unwrap()
}

fn scf_of(mol: &Molecule, basis: &basis::BasisSet) -> Wavefunction {
    scf::run(mol, basis, &ScfOptions::default()).unwrap()
}

fn eom(
    mol: &Molecule,
    b: &basis::BasisSet,
    wfn: &Wavefunction,
    method: EomMethod,
    roots: RootSpec,
) -> EomReport {
    let opts = EomOptions {
        method,
        roots,
        ..Default::default()
    };
    ionize_report(mol, b, wfn, &opts, &mut |_| {}).unwrap()
}

#[test]
fn water_sto3g_ccsd_and_mp2_correlation_energies() {
    let mol = crawford_water();
    let b = basis::load("sto-3g", &mol, None).unwrap();
    let wfn = scf_of(&mol, &b);
    // Crawford group Programming Projects (SCF project): E = −74.942079928192 Eh (published).
    assert!((wfn.energy - -74.942079928192).abs() < 1e-7);
    let opts = EomOptions {
        frozen_core: false,
        two_electron: TwoElectron::Cholesky,
        cholesky_threshold: 1e-10,
        roots: RootSpec::Lowest(1),
        ..Default::default()
    };
    let rep = ionize_report(&mol, &b, &wfn, &opts, &mut |_| {}).unwrap();
    let e_cc = rep.e_ccsd_corr.unwrap();
    println!(
        "water/STO-3G: E(MP2 corr) = {:.12}, E(CCSD corr) = {:.12}",
        rep.e_mp2_corr, e_cc
    );
    // Crawford group Programming Projects #4 (MP2) and #5 (CCSD), all electrons correlated,
    // same geometry: E(MP2 corr) = −0.049149636120 Eh, E(CCSD corr) = −0.070680088376 Eh
    // (from memory: tolerance 1e-6 Eh allows for a slip in the last digits).
    assert!((rep.e_mp2_corr - -0.049149636120).abs() < 1e-6);
    assert!((e_cc - -0.070680088376).abs() < 1e-6);
    assert_eq!(rep.n_frozen, 0);
}

/// ΔCCSD(T)/def2-TZVPP HOMO IEs (eV): Krause, Harding & Klopper, Mol. Phys. 113 (2015)
/// 1952, as listed in docs/reference-data.md §2 (published; F2 from their total energies,
/// 15.7086, not the 15.58481 of the repository's JSON, which they do not support).
const DELTA_CCSDT: &[(&str, f64)] = &[
    ("water", 12.565),
    ("nitrogen", 15.4767),
    ("carbon-monoxide", 14.209),
    ("methane", 14.373),
    ("neon", 21.32107),
    ("fluorine", 15.7086),
];

/// EOM-IP-CCSD and EOM-IP-MBPT2 HOMO IEs of small GW100 molecules in def2-TZVPP (each a
/// few seconds) against ΔCCSD(T)/def2-TZVPP. Published expectation (Lange & Berkelbach,
/// J. Chem. Theory Comput. 14 (2018) 4224, GW100 set): mean absolute deviation from
/// ΔCCSD(T) ≈ 0.07 eV for EOM-IP-CCSD and ≈ 0.15 eV for EOM-IP-MBPT2 (from memory). On
/// these six molecules we require MAD ≤ 0.15 / 0.30 eV and every single error ≤ 0.30 /
/// 0.45 eV: individual molecules scatter around the mean, N2 and F2 are hard cases.
#[test]
fn gw100_homo_ionization_energies() {
    let mut errs_cc = Vec::new();
    let mut errs_mp = Vec::new();
    let mut errs_k = Vec::new();
    for &(name, reference) in DELTA_CCSDT {
        let mol = gw100(name);
        let b = basis::load("def2-tzvpp", &mol, None).unwrap();
        let wfn = scf_of(&mol, &b);
        let homo = -wfn.eps_alpha[wfn.n_alpha() - 1] * HARTREE_TO_EV;
        let cc = eom(&mol, &b, &wfn, EomMethod::Ccsd, RootSpec::Lowest(1));
        let mp = eom(&mol, &b, &wfn, EomMethod::Mbpt2, RootSpec::Lowest(1));
        let (e_cc, e_mp) = (cc.states[0].ie_ev, mp.states[0].ie_ev);
        println!(
            "{name:16} Koopmans {homo:8.3} ({:+.3})  EOM-IP-MBPT2 {e_mp:8.3} ({:+.3})  \
             EOM-IP-CCSD {e_cc:8.3} ({:+.3})  ΔCCSD(T) {reference:.3}  [h {:.3}]",
            homo - reference,
            e_mp - reference,
            e_cc - reference,
            cc.states[0].one_hole_weight
        );
        assert!(cc.states[0].converged && mp.states[0].converged);
        assert!((e_cc - reference).abs() < 0.30, "{name} EOM-IP-CCSD");
        assert!((e_mp - reference).abs() < 0.45, "{name} EOM-IP-MBPT2");
        errs_cc.push(e_cc - reference);
        errs_mp.push(e_mp - reference);
        errs_k.push(homo - reference);
    }
    let mad = |v: &[f64]| v.iter().map(|x| x.abs()).sum::<f64>() / v.len() as f64;
    println!(
        "mean absolute deviation from ΔCCSD(T): Koopmans {:.3} eV, EOM-IP-MBPT2 {:.3} eV, \
         EOM-IP-CCSD {:.3} eV",
        mad(&errs_k),
        mad(&errs_mp),
        mad(&errs_cc)
    );
    assert!(mad(&errs_cc) < 0.15);
    assert!(mad(&errs_mp) < 0.30);
    // Koopmans is far worse on this set (F2 alone is off by > 2 eV, docs/reference-data.md §2).
    assert!(mad(&errs_k) > 3.0 * mad(&errs_cc));
}

/// Inversion parity of an MO of a homonuclear diatomic (+1 gerade, −1 ungerade): the AOs
/// of the two atoms come in the same order, and inversion maps an AO of angular momentum l
/// on one atom to (−1)^l times the same AO on the other.
fn parity(b: &basis::BasisSet, c: &bandcast_linalg::Mat<f64>, mo: usize) -> f64 {
    let map = b.ao_map();
    let a0: Vec<usize> = (0..b.n_basis).filter(|&m| map[m].0 == 0).collect();
    let a1: Vec<usize> = (0..b.n_basis).filter(|&m| map[m].0 == 1).collect();
    let mut s = 0.0;
    let mut nn = 0.0;
    for (&p, &q) in a0.iter().zip(&a1) {
        let sign = if map[p].2.is_multiple_of(2) {
            1.0
        } else {
            -1.0
        };
        s += c[(p, mo)] * sign * c[(q, mo)];
        nn += c[(p, mo)] * c[(p, mo)];
    }
    s / nn
}

/// Bands as (IE, degeneracy, parity of dominant orbital), merging degenerate roots.
fn bands(
    states: &[IonizedState],
    b: &basis::BasisSet,
    wfn: &Wavefunction,
) -> Vec<(f64, usize, f64)> {
    let mut out: Vec<(f64, usize, f64)> = Vec::new();
    for s in states {
        let p = parity(b, &wfn.c_alpha, s.dominant_orbital);
        match out.last_mut() {
            Some(last) if (last.0 - s.ie_ev).abs() < 1e-3 => last.1 += 1,
            _ => out.push((s.ie_ev, 1, p)),
        }
    }
    out
}

/// N2: EOM-IP-CCSD restores the order 3σg < 1πu < 2σu that Koopmans' theorem gets wrong,
/// each band within 0.3 eV of He I vertical IEs 15.58, 16.93, 18.75 eV (Kimura et al.,
/// Handbook of HeI Photoelectron Spectra (1981); Turner et al. (1970); 3σg published, the
/// others from memory — docs/reference-data.md §3).
#[test]
fn nitrogen_band_order() {
    let mol = gw100("nitrogen");
    let b = basis::load("def2-tzvpp", &mol, None).unwrap();
    let wfn = scf_of(&mol, &b);
    let rep = eom(&mol, &b, &wfn, EomMethod::Ccsd, RootSpec::Lowest(4));
    let bd = bands(&rep.states, &b, &wfn);
    for (e, d, p) in &bd {
        println!("N2 band {e:.3} eV, degeneracy {d}, parity {p:+.2}");
    }
    assert_eq!(bd.len(), 3);
    let expect = [(15.58, 1usize, 1.0), (16.93, 2, -1.0), (18.75, 1, -1.0)];
    for (k, &(e, d, p)) in expect.iter().enumerate() {
        assert_eq!(bd[k].1, d, "degeneracy of band {k}");
        assert!((bd[k].2 - p).abs() < 0.05, "parity of band {k}");
        assert!((bd[k].0 - e).abs() < 0.3, "band {k}: {} vs {e}", bd[k].0);
    }
    // Koopmans has 1πu as the HOMO: the first EOM band is not the HOMO.
    assert_ne!(rep.states[0].dominant_orbital, wfn.n_alpha() - 1);
}

/// F2: 1πg, 1πu, 3σg within 0.3 eV of He I 15.7, 18.8, 21.1 eV (15.7: docs/reference-data.md
/// §2 experiment column, published; 18.8 and 21.1 from memory).
#[test]
fn fluorine_bands() {
    let mol = gw100("fluorine");
    let b = basis::load("def2-tzvpp", &mol, None).unwrap();
    let wfn = scf_of(&mol, &b);
    let rep = eom(&mol, &b, &wfn, EomMethod::Ccsd, RootSpec::Lowest(5));
    let bd = bands(&rep.states, &b, &wfn);
    for (e, d, p) in &bd {
        println!("F2 band {e:.3} eV, degeneracy {d}, parity {p:+.2}");
    }
    assert_eq!(bd.len(), 3);
    let expect = [(15.7, 2usize, 1.0), (18.8, 2, -1.0), (21.1, 1, 1.0)];
    for (k, &(e, d, p)) in expect.iter().enumerate() {
        assert_eq!(bd[k].1, d, "degeneracy of band {k}");
        assert!((bd[k].2 - p).abs() < 0.05, "parity of band {k}");
        assert!((bd[k].0 - e).abs() < 0.3, "band {k}: {} vs {e}", bd[k].0);
    }
}

/// Water's four valence bands 1b1, 3a1, 1b2, 2a1 against 12.62, 14.74, 18.51, 32.2 eV
/// (Kimura et al. 1981; 2a1 from X-ray PES; 1b1 published, the rest from memory —
/// docs/reference-data.md §3). Tolerance 0.5 eV: the 1b2 band is broad and 2a1 is a
/// satellite-split inner-valence band. The inner-valence 2a1 state, targeted from its
/// Koopmans orbital, carries clearly less one-hole weight than the outer-valence bands
/// (intensity borrowed by 2h1p satellites; common practice).
#[test]
fn water_valence_bands_and_inner_valence_weight() {
    let mol = gw100("water");
    let b = basis::load("def2-tzvpp", &mol, None).unwrap();
    let wfn = scf_of(&mol, &b);
    // MOs 2..5 (0-based 1..4) are 2a1, 1b2, 3a1, 1b1 in Aufbau order.
    let rep = eom(
        &mol,
        &b,
        &wfn,
        EomMethod::Ccsd,
        RootSpec::Orbitals(vec![4, 3, 2, 1]),
    );
    let expect = [12.62, 14.74, 18.51, 32.2];
    for (s, e) in rep.states.iter().zip(expect) {
        println!(
            "water band {:.3} eV (He I {e}), orbital {}, one-hole weight {:.3}",
            s.ie_ev,
            s.dominant_orbital + 1,
            s.one_hole_weight
        );
        assert!((s.ie_ev - e).abs() < 0.5);
    }
    let dom: Vec<usize> = rep.states.iter().map(|s| s.dominant_orbital).collect();
    assert_eq!(dom, vec![4, 3, 2, 1]);
    let outer = rep.states[..3]
        .iter()
        .map(|s| s.one_hole_weight)
        .fold(1.0, f64::min);
    let inner = rep.states[3].one_hole_weight;
    assert!(outer > 0.9, "outer-valence one-hole weights {outer}");
    assert!(
        inner < 0.85 && inner < outer - 0.1,
        "2a1 one-hole weight {inner}"
    );
}

/// A job that cannot fit is refused before anything large is allocated, with the cheaper
/// method named (exit code 2 through Error::TooLarge).
#[test]
fn too_large_is_refused() {
    let mol = gw100("water");
    let b = basis::load("def2-tzvpp", &mol, None).unwrap();
    let wfn = scf_of(&mol, &b);
    let opts = EomOptions {
        memory_budget: Some(1e6),
        ..Default::default()
    };
    let err = ionize_report(&mol, &b, &wfn, &opts, &mut |_| {}).unwrap_err();
    assert_eq!(err.exit_code(), 2);
    assert!(err.to_string().contains("eom-mp2"));
}

/// Density fitting with the def2-TZVPP-RIFIT set against Cholesky-decomposed integrals at
/// 1e-8 Eh (within 1e-8 Eh of the exact integrals, cholesky.rs): the fitting error of
/// ionization energies is at the meV level (common practice; Weigend, Häser, Patzelt &
/// Ahlrichs, Chem. Phys. Lett. 294 (1998) 143 for the fitting sets — from memory), so the
/// three lowest EOM-IP-CCSD states of water agree within 5 meV, and the default route is
/// density fitting.
#[test]
fn density_fitting_error_on_ionization_energies_is_mev() {
    let mol = gw100("water");
    let b = basis::load("def2-tzvpp", &mol, None).unwrap();
    let wfn = scf_of(&mol, &b);
    let run = |two_electron| {
        let opts = EomOptions {
            roots: RootSpec::Lowest(3),
            two_electron,
            cholesky_threshold: 1e-8,
            ..Default::default()
        };
        ionize_report(&mol, &b, &wfn, &opts, &mut |_| {}).unwrap()
    };
    let ri = run(TwoElectron::Auto);
    let cd = run(TwoElectron::Cholesky);
    assert!(ri.density_fitted && !cd.density_fitted);
    assert!(ri.notes[0].contains("def2-TZVPP-RIFIT"), "{}", ri.notes[0]);
    for (a, c) in ri.states.iter().zip(&cd.states) {
        let d = a.ie_ev - c.ie_ev;
        println!(
            "water IE: RI {:.4} eV, Cholesky 1e-8 {:.4} eV, difference {:+.1} meV",
            a.ie_ev,
            c.ie_ev,
            1e3 * d
        );
        assert!(d.abs() < 0.005);
        assert_eq!(a.dominant_orbital, c.dominant_orbital);
    }
    let de = ri.e_ccsd_corr.unwrap() - cd.e_ccsd_corr.unwrap();
    println!("CCSD correlation energy: RI − Cholesky = {de:+.2e} Eh");
    assert!(de.abs() < 1e-3);
}
