//! The relativistic correction of 1s binding energies (`core_level/relativistic.rs`: a power
//! law in the ΔSCF energy) checked against a computation: the first-order Pauli
//! mass-velocity + Darwin energy (`core_level/pauli.rs`; Cowan & Griffin, J. Opt. Soc. Am.
//! 66 (1976) 1010) of the ΔSCF cation minus that of the neutral, at the hole atom.

mod common;

use bandcast::basis::BasisSet;
use bandcast::chem::Molecule;
use bandcast::core_level::flexibility::{flexible_basis, uncontract};
use bandcast::core_level::options::CoreBasis;
use bandcast::core_level::pauli::one_centre;
use bandcast::core_level::relativistic::correction_ev;
use bandcast::scf::{self, Guess, Occupation, Reference, ScfOptions, Wavefunction};
use bandcast::units::ev;

use common::gw100_molecule as load;

/// Neutral and 1s-hole cation (UHF held by MOM) of `atom`, whose 1s must be the lowest MO
/// (one heavy atom with hydrogens, or an atom).
fn states(mol: &Molecule, basis: &BasisSet) -> (Wavefunction, Wavefunction) {
    let neutral = scf::run(mol, basis, &ScfOptions::default()).expect("neutral SCF");
    let mut occ_b = neutral.occ_alpha.clone();
    occ_b[0] = 0.0;
    let cation = mol
        .clone()
        .with_charge_multiplicity(mol.charge + 1, 2)
        .unwrap();
    let o = ScfOptions {
        reference: Reference::Uhf,
        guess: Guess::Orbitals {
            c_alpha: neutral.c_alpha.clone(),
            c_beta: neutral.c_alpha.clone(),
        },
        occupation: Occupation::Mom {
            c_alpha_ref: neutral.c_alpha.clone(),
            c_beta_ref: neutral.c_alpha.clone(),
            occ_alpha: neutral.occ_alpha.clone(),
            occ_beta: occ_b,
            initial: false,
        },
        ..ScfOptions::default()
    };
    let ion = scf::run(&cation, basis, &o).expect("cation SCF");
    (neutral, ion)
}

/// E_MV + E_D (hartree) of a state at `atom`.
fn pauli(basis: &BasisSet, mol: &Molecule, atom: usize, wf: &Wavefunction) -> f64 {
    let p = &wf.density_alpha() + &wf.density_beta();
    let (mv, d) = one_centre(basis, atom, mol.atoms[atom].z as f64, &p).expect("pure shells");
    mv + d
}

/// (ΔSCF, Pauli relativistic change of the binding energy), eV.
fn delta(mol: &Molecule, atom: usize, basis: &BasisSet) -> (f64, f64) {
    let (n, i) = states(mol, basis);
    (
        ev(i.energy - n.energy),
        ev(pauli(basis, mol, atom, &i) - pauli(basis, mol, atom, &n)),
    )
}

/// The default core basis: cc-pVDZ, s and p split into primitives on the hole atom.
fn dz_u(mol: &Molecule, atom: usize) -> BasisSet {
    uncontract(
        &bandcast::basis::load("cc-pVDZ", mol, None).unwrap(),
        &[atom],
        1,
    )
}

/// The basis the law was fitted in: cc-pCVTZ (s and p split) on the hole atom.
fn cv_u(mol: &Molecule, atom: usize) -> BasisSet {
    let plain = bandcast::basis::load("cc-pVDZ", mol, None).unwrap();
    let cv = flexible_basis(&plain, mol, &[atom], &CoreBasis::Named("cc-pCVTZ".into())).unwrap();
    uncontract(&cv, &[atom], 1)
}

/// Regression (the law was fitted to these first-order values in cc-pCVTZ; here they are
/// recomputed in the default basis): the law of relativistic.rs agrees with them within 3 %
/// for C, N, O, F and Ne 1s. External check: the computed value obeys the exact bounds,
/// positive and below the hydrogen-like Z⁴α²/8 of a bare nucleus (Dirac equation to order
/// α², textbook; screening only lowers it). A few seconds.
#[test]
fn power_law_matches_first_order_pauli_values() {
    let a2 = bandcast::units::FINE_STRUCTURE.powi(2);
    for (name, atom) in [
        ("methane", 0usize),
        ("ammonia", 0),
        ("water", 0),
        ("hydrogen-fluoride", 1),
        ("neon", 0),
    ] {
        let mol = load(name);
        let (dscf, rel) = delta(&mol, atom, &dz_u(&mol, atom));
        let law = correction_ev(dscf);
        assert!(
            (law - rel).abs() < 0.03 * rel,
            "{name}: law {law:.4} Pauli {rel:.4}"
        );
        let z = mol.atoms[atom].z as f64;
        let bare = ev(z.powi(4) * a2 / 8.0);
        assert!(rel > 0.0 && rel < bare, "{name}: {rel} vs bare {bare}");
    }
}

/// Ne atom: the computed total first-order energy lies within 10 % of the Dirac–Fock minus
/// Hartree–Fock total energy of Ne, −0.145 Eh (−128.692 vs −128.547 Eh; from memory), and
/// the 1s correction moves by < 2 % between the default basis and cc-pCVTZ (split) on Ne.
#[test]
fn neon_total_and_basis_stability() {
    let ne = load("neon");
    let b = cv_u(&ne, 0);
    let (n, _) = states(&ne, &b);
    let total = pauli(&b, &ne, 0, &n);
    assert!(
        (total + 0.145).abs() < 0.1 * 0.145,
        "Ne E_MV + E_D = {total}"
    );
    let (_, small) = delta(&ne, 0, &dz_u(&ne, 0));
    let (_, large) = delta(&ne, 0, &b);
    assert!((small - large).abs() < 0.02 * large, "{small} vs {large}");
}

/// The table of docs/core-levels.md (cc-pCVTZ split on the hole atom): prints the values
/// the law was fitted to. About 15 s.
#[test]
#[ignore = "about 15 s in release mode; prints the fitting table of relativistic.rs"]
fn fitting_table() {
    for (name, atom) in [
        ("methane", 0usize),
        ("ammonia", 0),
        ("water", 0),
        ("hydrogen-fluoride", 1),
        ("neon", 0),
    ] {
        let mol = load(name);
        let (dscf, rel) = delta(&mol, atom, &cv_u(&mol, atom));
        println!(
            "{name}: ΔSCF {dscf:.3} eV, Pauli {rel:.4} eV, law {:.4} eV",
            correction_ev(dscf)
        );
        assert!((correction_ev(dscf) - rel).abs() < 0.02 * rel);
    }
}
