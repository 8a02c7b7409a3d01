//! The relativistic correction of 1s binding energies (`core_level/relativistic.rs`: two
//! power laws in the ΔSCF energy) checked against computations of the ΔSCF cation minus the
//! neutral at the hole atom: the first-order Pauli mass-velocity + Darwin energy
//! (`core_level/pauli.rs`; Cowan & Griffin, J. Opt. Soc. Am. 66 (1976) 1010), and the
//! Breit–Pauli two-electron contact terms with the one-loop QED shift
//! (`core_level/breit_qed.rs`).

mod common;

use bandcast::basis::BasisSet;
use bandcast::chem::Molecule;
use bandcast::core_level::breit_qed::{beyond_scalar_hartree, qed_hartree};
use bandcast::core_level::flexibility::{flexible_basis, uncontract};
use bandcast::core_level::options::CoreBasis;
use bandcast::core_level::pauli::one_centre;
use bandcast::core_level::relativistic::{breit_qed_ev, scalar_ev};
use bandcast::scf::{self, Guess, Occupation, Reference, ScfOptions, Wavefunction};
use bandcast::units::ev;

use common::gw100_molecule as load;

/// Neutral and 1s-hole cation (UHF held by MOM) of `atom`, whose 1s must be the lowest MO
/// (one heavy atom with hydrogens, or an atom).
fn states(mol: &Molecule, basis: &BasisSet) -> (Wavefunction, Wavefunction) {
    states_with_hole(mol, basis, 0)
}

/// As [`states`] with the hole in canonical MO `hole` (a 1s that is already localised on
/// one atom, e.g. the C 1s of CO or CO2).
fn states_with_hole(mol: &Molecule, basis: &BasisSet, hole: usize) -> (Wavefunction, Wavefunction) {
    let neutral = scf::run(mol, basis, &ScfOptions::default()).expect("neutral SCF");
    let mut occ_b = neutral.occ_alpha.clone();
    occ_b[hole] = 0.0;
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

/// Changes of the binding energy (eV) of `atom`'s 1s, cation minus neutral.
struct Delta {
    dscf: f64,
    /// First-order mass-velocity + Darwin (`pauli.rs`).
    pauli: f64,
    /// Breit–Pauli two-electron contact terms (`breit_qed.rs`).
    contact: f64,
    /// One-loop QED (`breit_qed.rs`).
    qed: f64,
}

fn delta(mol: &Molecule, atom: usize, basis: &BasisSet) -> Delta {
    let (n, i) = states(mol, basis);
    let (c, z) = (mol.atoms[atom].position, mol.atoms[atom].z as f64);
    let (cn, qn) = beyond_scalar_hartree(basis, c, z, &n.density_alpha(), &n.density_beta());
    let (ci, qi) = beyond_scalar_hartree(basis, c, z, &i.density_alpha(), &i.density_beta());
    Delta {
        dscf: ev(i.energy - n.energy),
        pauli: ev(pauli(basis, mol, atom, &i) - pauli(basis, mol, atom, &n)),
        contact: ev(ci - cn),
        qed: ev(qi - qn),
    }
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

/// Regression (the laws were fitted to these first-order values in cc-pCVTZ; here they are
/// recomputed in the default basis): the scalar law of relativistic.rs agrees with the
/// mass-velocity + Darwin values within 3 %, and the two-electron and radiative law with
/// the contact + QED values within 3 %, for C, N, O, F and Ne 1s. External checks: the
/// scalar value is positive and below the hydrogen-like Z⁴α²/8 of a bare nucleus (Dirac
/// equation to order α², textbook; screening only lowers it); the contact change is negative
/// and below the hydrogen-like 1s² pair's Z³α²/8 in size (⟨δ(r₁₂)⟩ = Z³/8π, textbook); the
/// QED change is negative and below one hydrogen-like 1s Lamb shift in size. A few seconds.
#[test]
fn power_laws_match_first_order_values() {
    let a2 = bandcast::units::FINE_STRUCTURE.powi(2);
    for (name, atom) in [
        ("methane", 0usize),
        ("ammonia", 0),
        ("water", 0),
        ("hydrogen-fluoride", 1),
        ("neon", 0),
    ] {
        let mol = load(name);
        let d = delta(&mol, atom, &dz_u(&mol, atom));
        let law = scalar_ev(d.dscf);
        assert!(
            (law - d.pauli).abs() < 0.03 * d.pauli,
            "{name}: law {law:.4} Pauli {:.4}",
            d.pauli
        );
        let z = mol.atoms[atom].z as f64;
        let bare = ev(z.powi(4) * a2 / 8.0);
        assert!(
            d.pauli > 0.0 && d.pauli < bare,
            "{name}: {} vs bare {bare}",
            d.pauli
        );
        let beyond = d.contact + d.qed;
        let law2 = breit_qed_ev(d.dscf);
        assert!(
            (law2 - beyond).abs() < 0.03 * beyond.abs(),
            "{name}: law {law2:.4} contact + QED {beyond:.4}"
        );
        let pair = ev(z.powi(3) * a2 / 8.0);
        let lamb = ev(qed_hartree(z, z.powi(3) / std::f64::consts::PI));
        assert!(
            d.contact < 0.0 && -d.contact < pair,
            "{name}: contact {}",
            d.contact
        );
        assert!(d.qed < 0.0 && -d.qed < lamb, "{name}: QED {}", d.qed);
    }
}

/// Ne atom: the computed total first-order energy lies within 10 % of the Dirac–Fock minus
/// Hartree–Fock total energy of Ne, −0.145 Eh (−128.692 vs −128.547 Eh; from memory), and
/// both parts of the 1s correction move by < 2 % between the default basis and cc-pCVTZ
/// (split) on Ne.
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
    let small = delta(&ne, 0, &dz_u(&ne, 0));
    let large = delta(&ne, 0, &b);
    assert!(
        (small.pauli - large.pauli).abs() < 0.02 * large.pauli,
        "{} vs {}",
        small.pauli,
        large.pauli
    );
    let (bs, bl) = (small.contact + small.qed, large.contact + large.qed);
    assert!((bs - bl).abs() < 0.02 * bl.abs(), "{bs} vs {bl}");
}

/// The table of docs/core-levels.md (cc-pCVTZ split on the hole atom): prints the values
/// the laws were fitted to. About 25 s.
#[test]
#[ignore = "about 25 s in release mode; prints the fitting table of relativistic.rs"]
fn fitting_table() {
    for (name, atom) in [
        ("methane", 0usize),
        ("ammonia", 0),
        ("water", 0),
        ("hydrogen-fluoride", 1),
        ("neon", 0),
    ] {
        let mol = load(name);
        let d = delta(&mol, atom, &cv_u(&mol, atom));
        println!(
            "{name}: ΔSCF {:.3} eV, Pauli {:.4} eV (law {:.4}), contact {:.4} + QED {:.4} eV \
             (law {:.4})",
            d.dscf,
            d.pauli,
            scalar_ev(d.dscf),
            d.contact,
            d.qed,
            breit_qed_ev(d.dscf)
        );
        assert!((scalar_ev(d.dscf) - d.pauli).abs() < 0.02 * d.pauli);
        assert!((breit_qed_ev(d.dscf) - d.contact - d.qed).abs() < 0.02 * d.qed.abs());
    }
}

/// The two-electron and radiative part is a property of the hole atom, not of its
/// neighbours: for C 1s in CH4, CO and CO2 (default basis; the C 1s is canonical MO 0, 1
/// and 2) the computed contact + QED changes agree with each other within 0.005 eV (measured
/// −0.0503, −0.0511, −0.0509 eV), so the part drops out of chemical shifts as the scalar
/// part does (common practice for relativistic corrections of light elements), and with
/// the law at each level's ΔSCF value within 5 % (the law, fitted across elements, moves by
/// 0.002 eV over these 8.5 eV of shift: −0.050 … −0.053). About 10 s.
#[test]
fn two_electron_and_radiative_part_does_not_depend_on_the_neighbours() {
    let co = bandcast::chem::xyz::read_xyz(
        std::path::Path::new(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/tests/data/core/carbon-monoxide.xyz"
        )),
        bandcast::chem::xyz::LengthUnit::Angstrom,
    )
    .unwrap();
    let mut seen = Vec::new();
    for (mol, hole) in [
        (load("methane"), 0usize),
        (co, 1),
        (load("carbon-dioxide"), 2),
    ] {
        let atom = mol.atoms.iter().position(|a| a.z == 6).unwrap();
        let b = dz_u(&mol, atom);
        let (n, i) = states_with_hole(&mol, &b, hole);
        let (c, z) = (mol.atoms[atom].position, 6.0);
        let (cn, qn) = beyond_scalar_hartree(&b, c, z, &n.density_alpha(), &n.density_beta());
        let (ci, qi) = beyond_scalar_hartree(&b, c, z, &i.density_alpha(), &i.density_beta());
        let (dscf, beyond) = (ev(i.energy - n.energy), ev(ci - cn + qi - qn));
        println!(
            "{}: ΔSCF {dscf:.3} eV, contact + QED {beyond:.4} eV",
            mol.name
        );
        let law = breit_qed_ev(dscf);
        assert!(
            (law - beyond).abs() < 0.05 * beyond.abs(),
            "{}: {law} {beyond}",
            mol.name
        );
        seen.push(beyond);
    }
    let spread = seen.iter().cloned().fold(f64::MIN, f64::max)
        - seen.iter().cloned().fold(f64::MAX, f64::min);
    assert!(spread < 0.005, "{seen:?}");
}
