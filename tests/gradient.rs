//! Analytic SCF gradients against exact conditions: the derivative equals the limit of the
//! central difference of the energy (checked to 1e-6 Eh/bohr), and the energy of an
//! isolated molecule is invariant under translation and rotation (net force and net torque
//! vanish).

use bandcast::basis;
use bandcast::chem::{Atom, Molecule};
use bandcast::gradient::{net_force, net_torque, scf_gradient, GradientOptions};
use bandcast::scf::{self, Guess, Occupation, Reference, ScfOptions, Wavefunction};

/// Water away from its equilibrium and from C2v (bohr), so that every component is nonzero.
fn distorted_water() -> Molecule {
    Molecule::new(vec![
        Atom {
            z: 8,
            position: [0.05, -0.12, 0.03],
        },
        Atom {
            z: 1,
            position: [1.52, 1.08, 0.11],
        },
        Atom {
            z: 1,
            position: [-1.71, 0.98, -0.17],
        },
    ])
}

fn tight(reference: Reference) -> ScfOptions {
    ScfOptions {
        reference,
        e_tol: 1e-12,
        commutator_tol: 1e-10,
        ..ScfOptions::default()
    }
}

fn with_charge(mol: &Molecule, charge: i32, mult: u32) -> Molecule {
    mol.clone().with_charge_multiplicity(charge, mult).unwrap()
}

/// Ground state of `mol` with `reference`.
fn ground(mol: &Molecule, basis_name: &str, reference: Reference) -> Wavefunction {
    let b = basis::load(basis_name, mol, None).unwrap();
    scf::run(mol, &b, &tight(reference)).unwrap()
}

/// UHF cation of the closed-shell `mol` with the β electron of MO `hole` removed and held
/// there by the maximum overlap method (as ΔSCF does).
fn hole_state(mol: &Molecule, basis_name: &str, hole: usize) -> Wavefunction {
    let b = basis::load(basis_name, mol, None).unwrap();
    let neutral = scf::run(mol, &b, &tight(Reference::Rhf)).unwrap();
    let mut occ_b = neutral.occ_beta.clone();
    occ_b[hole] = 0.0;
    let cation = with_charge(mol, 1, 2);
    let opts = ScfOptions {
        guess: Guess::Orbitals {
            c_alpha: neutral.c_alpha.clone(),
            c_beta: neutral.c_beta.clone(),
        },
        occupation: Occupation::Mom {
            c_alpha_ref: neutral.c_alpha.clone(),
            c_beta_ref: neutral.c_beta.clone(),
            occ_alpha: neutral.occ_alpha.clone(),
            occ_beta: occ_b,
            initial: false,
        },
        ..tight(Reference::Uhf)
    };
    scf::run(&cation, &b, &opts).unwrap()
}

/// Compare the analytic gradient `g` of `mol` with central differences (h = 5e-4 bohr) of
/// `energy` for every coordinate, to 1e-6 Eh/bohr; returns the largest difference.
fn check_central_differences(
    label: &str,
    mol: &Molecule,
    g: &[[f64; 3]],
    energy: impl Fn(&Molecule) -> f64,
) -> f64 {
    let h = 5e-4;
    let mut worst: f64 = 0.0;
    for a in 0..mol.atoms.len() {
        for k in 0..3 {
            let mut p = mol.clone();
            p.atoms[a].position[k] += h;
            let mut m = mol.clone();
            m.atoms[a].position[k] -= h;
            let fd = (energy(&p) - energy(&m)) / (2.0 * h);
            worst = worst.max((fd - g[a][k]).abs());
            // exact condition (derivative = limit of the difference quotient)
            assert!(
                (fd - g[a][k]).abs() < 1e-6,
                "{label}: atom {a} dir {k}: analytic {:.9} vs central difference {fd:.9}",
                g[a][k]
            );
        }
    }
    worst
}

/// Compare the analytic gradient with central differences (h = 5e-4 bohr) of the energy of
/// the state `state(mol)` for every coordinate; check net force and torque.
fn check(label: &str, mol: &Molecule, basis_name: &str, state: impl Fn(&Molecule) -> Wavefunction) {
    let wf = state(mol);
    let b = basis::load(basis_name, mol, None).unwrap();
    let g = scf_gradient(mol, &b, &wf, &GradientOptions::default())
        .unwrap()
        .total;
    let worst = check_central_differences(label, mol, &g, |m| state(m).energy);
    let f = net_force(&g);
    let t = net_torque(mol, &g);
    eprintln!(
        "{label}: max |analytic − difference| = {worst:.2e} Eh/bohr, net force {f:?}, torque {t:?}"
    );
    // exact conditions: translational and rotational invariance
    for k in 0..3 {
        assert!(f[k].abs() < 1e-9, "{label}: net force {f:?}");
        assert!(t[k].abs() < 1e-8, "{label}: net torque {t:?}");
    }
}

#[test]
fn rhf_water_cc_pvdz_pure() {
    let mol = distorted_water();
    check("RHF water cc-pVDZ", &mol, "cc-pVDZ", |m| {
        ground(m, "cc-pVDZ", Reference::Rhf)
    });
}

#[test]
fn rhf_water_6_31gstar_cartesian() {
    let mol = distorted_water();
    check("RHF water 6-31G*", &mol, "6-31G*", |m| {
        ground(m, "6-31G*", Reference::Rhf)
    });
}

#[test]
fn uhf_water_cation() {
    let mol = with_charge(&distorted_water(), 1, 2);
    check("UHF H2O+ cc-pVDZ", &mol, "cc-pVDZ", |m| {
        ground(m, "cc-pVDZ", Reference::Uhf)
    });
}

#[test]
fn rohf_water_cation() {
    let mol = with_charge(&distorted_water(), 1, 2);
    check("ROHF H2O+ 6-31G*", &mol, "6-31G*", |m| {
        ground(m, "6-31G*", Reference::Rohf)
    });
}

#[test]
fn uhf_mom_inner_valence_hole() {
    // hole in MO 2 (2a1, inner valence) of water: not the cation ground state, held by MOM
    let mol = distorted_water();
    check("UHF/MOM H2O+ 2a1⁻¹ 6-31G", &mol, "6-31G", |m| {
        hole_state(m, "6-31G", 1)
    });
}

/// Density-fitted SCF (J and K fitted with def2-universal-JKFIT) of `mol`.
fn fitted(mol: &Molecule, basis_name: &str, reference: Reference) -> Wavefunction {
    let b = basis::load(basis_name, mol, None).unwrap();
    let opts = ScfOptions {
        fock: scf::FockMethod::DensityFitted,
        ..tight(reference)
    };
    scf::run(mol, &b, &opts).unwrap()
}

/// Exact condition: the density-fitted gradient equals the limit of the central difference
/// of the density-fitted energy (to 1e-6 Eh/bohr), and the net force vanishes. RHF water and
/// the UHF water cation (both exchange terms), cc-pVDZ.
#[test]
fn density_fitted_gradient_matches_differences_of_the_fitted_energy() {
    let mol = distorted_water();
    for (label, m, reference) in [
        ("DF-RHF water", mol.clone(), Reference::Rhf),
        (
            "DF-UHF water cation",
            with_charge(&mol, 1, 2),
            Reference::Uhf,
        ),
    ] {
        let wf = fitted(&m, "cc-pVDZ", reference);
        let b = basis::load("cc-pVDZ", &m, None).unwrap();
        let aux = basis::load_auxiliary("def2-universal-JKFIT", &m).unwrap();
        let g =
            bandcast::gradient::scf_gradient_fitted(&m, &b, &aux, &wf, &GradientOptions::default())
                .unwrap()
                .total;
        let worst =
            check_central_differences(label, &m, &g, |x| fitted(x, "cc-pVDZ", reference).energy);
        let f = net_force(&g);
        eprintln!("{label}: max |analytic − difference| = {worst:.2e} Eh/bohr, net force {f:?}");
        for x in f {
            assert!(x.abs() < 1e-9, "{label}: net force {f:?}");
        }
    }
}

/// W from the orbital energies (no Fock rebuild) against W from Fock matrices rebuilt at the
/// converged density: the same gradient to the SCF's convergence (two routes to one
/// quantity; regression). RHF and UHF.
#[test]
fn energy_weighted_density_from_orbital_energies_matches_fock_route() {
    let mol = distorted_water();
    for (m, reference) in [
        (mol.clone(), Reference::Rhf),
        (with_charge(&mol, 1, 2), Reference::Uhf),
    ] {
        let wf = ground(&m, "cc-pVDZ", reference);
        let b = basis::load("cc-pVDZ", &m, None).unwrap();
        let g1 = scf_gradient(&m, &b, &wf, &GradientOptions::default())
            .unwrap()
            .total;
        let opts = GradientOptions {
            w_from_fock: true,
            ..GradientOptions::default()
        };
        let g2 = scf_gradient(&m, &b, &wf, &opts).unwrap().total;
        for a in 0..m.atoms.len() {
            for k in 0..3 {
                assert!(
                    (g1[a][k] - g2[a][k]).abs() < 1e-8,
                    "{reference:?} atom {a} dir {k}: {} vs {}",
                    g1[a][k],
                    g2[a][k]
                );
            }
        }
    }
}
