//! The SCF driver on a two-function model whose integrals are given: H2 in STO-3G
//! (ζ = 1.24) at R = 1.4 bohr, integrals as printed in Szabo & Ostlund, *Modern Quantum
//! Chemistry* (1989), ch. 3 worked example (memory; four decimals, so the checks allow 2e-4).

use bandcast_linalg::Mat;

use super::driver::{iterate, Problem, Start};
use super::fock::{FockBuilder, TensorFock};
use super::occupation::aufbau;
use super::options::{Occupation, Reference, ScfOptions};
use super::orthogonalize::Orthogonalizer;

fn h2_model() -> (Mat<f64>, Mat<f64>, Vec<f64>) {
    // Szabo & Ostlund (1989) ch. 3: S12 = 0.6593, H11 = −1.1204, H12 = −0.9584 (memory).
    let s = Mat::<f64>::from_fn(2, 2, |i, j| if i == j { 1.0 } else { 0.6593 });
    let h = Mat::<f64>::from_fn(2, 2, |i, j| if i == j { -1.1204 } else { -0.9584 });
    // (11|11) = 0.7746, (11|22) = 0.5697, (21|11) = 0.4441, (21|21) = 0.2970 (memory).
    let g = |i: usize, j: usize, k: usize, l: usize| -> f64 {
        match (i == j, k == l) {
            (true, true) if i == k => 0.7746,
            (true, true) => 0.5697,
            (false, false) => 0.2970,
            _ => 0.4441,
        }
    };
    let mut eri = vec![0.0; 16];
    for i in 0..2 {
        for j in 0..2 {
            for k in 0..2 {
                for l in 0..2 {
                    eri[((i * 2 + j) * 2 + k) * 2 + l] = g(i, j, k, l);
                }
            }
        }
    }
    (s, h, eri)
}

fn solve(reference: Reference, start_core: bool) -> super::driver::Solution {
    let (s, h, eri) = h2_model();
    let ortho = Orthogonalizer::canonical(&s, 1e-7).unwrap();
    let p = Problem {
        s: &s,
        h: &h,
        e_nuc: 1.0 / 1.4,
        ortho: &ortho,
        n_alpha: 1,
        n_beta: 1,
    };
    let mut b = TensorFock::new(2, eri);
    let opts = ScfOptions {
        reference,
        ..ScfOptions::default()
    };
    let start = if start_core {
        let (_, c) = ortho.solve(&h);
        Start::Orbitals {
            c_alpha: c.clone(),
            c_beta: c,
            occ_alpha: aufbau(2, 1),
            occ_beta: aufbau(2, 1),
        }
    } else {
        Start::Densities {
            alpha: Mat::zeros(2, 2),
            beta: Mat::zeros(2, 2),
        }
    };
    iterate(&p, &mut b, &opts, start, &mut |_| {}).unwrap()
}

#[test]
fn h2_szabo_ostlund_energy_and_orbitals() {
    for reference in [Reference::Rhf, Reference::Uhf, Reference::Rohf] {
        for core in [true, false] {
            let sol = solve(reference, core);
            // Szabo & Ostlund (1989) ch. 3: E = −1.1167, ε = −0.5782, +0.6703 (memory).
            assert!(
                (sol.energy - (-1.1167)).abs() < 2e-4,
                "{reference:?} {}",
                sol.energy
            );
            assert!((sol.eps_alpha[0] - (-0.5782)).abs() < 2e-4);
            assert!((sol.eps_alpha[1] - 0.6703).abs() < 2e-4);
            assert!((sol.eps_beta[0] - (-0.5782)).abs() < 2e-4);
            // Electronic energy −1.8310 (same source, memory) plus 1/R.
            assert!((sol.one_electron + sol.two_electron - (-1.8310)).abs() < 2e-4);
        }
    }
}

#[test]
fn h2_fock_matrix_of_converged_density() {
    // Szabo & Ostlund (1989) ch. 3: converged F11 = −0.3655, F12 = −0.5939 (memory).
    let sol = solve(Reference::Rhf, true);
    assert!((sol.fock_alpha[(0, 0)] - (-0.3655)).abs() < 3e-4);
    assert!((sol.fock_alpha[(0, 1)] - (-0.5939)).abs() < 3e-4);
    // Symmetric orbital: equal coefficients 1/sqrt(2(1+S12)) (same source, eq. 3.263).
    let c = 1.0 / (2.0f64 * 1.6593).sqrt();
    assert!((sol.c_alpha[(0, 0)].abs() - c).abs() < 1e-6);
    assert!((sol.c_alpha[(1, 0)].abs() - c).abs() < 1e-6);
}

#[test]
fn mom_holds_an_excited_configuration() {
    // Doubly excited H2 (σu²): from the σu reference orbital, MOM must keep the electron pair in
    // the antibonding orbital; aufbau would fall back to the ground state. Its energy lies
    // above the ground state; σg and σu are fixed by symmetry in this two-function model, so
    // the excited energy is ⟨σu²|H|σu²⟩ from the same integrals (checked against a direct
    // evaluation below).
    let (s, h, eri) = h2_model();
    let ortho = Orthogonalizer::canonical(&s, 1e-7).unwrap();
    let (_, c) = ortho.solve(&h);
    let p = Problem {
        s: &s,
        h: &h,
        e_nuc: 1.0 / 1.4,
        ortho: &ortho,
        n_alpha: 1,
        n_beta: 1,
    };
    let occ = vec![0.0, 1.0];
    for initial in [false, true] {
        let opts = ScfOptions {
            occupation: Occupation::Mom {
                c_alpha_ref: c.clone(),
                c_beta_ref: c.clone(),
                occ_alpha: occ.clone(),
                occ_beta: occ.clone(),
                initial,
            },
            ..ScfOptions::default()
        };
        let mut b = TensorFock::new(2, eri.clone());
        let start = Start::Orbitals {
            c_alpha: c.clone(),
            c_beta: c.clone(),
            occ_alpha: occ.clone(),
            occ_beta: occ.clone(),
        };
        let sol = iterate(&p, &mut b, &opts, start, &mut |_| {}).unwrap();
        assert_eq!(sol.occ_alpha, vec![0.0, 1.0]);
        // Direct evaluation: E = 2 h_uu + (uu|uu) + 1/R with the σu orbital u.
        let u = [sol.c_alpha[(0, 1)], sol.c_alpha[(1, 1)]];
        let mut huu = 0.0;
        let mut guu = 0.0;
        for i in 0..2 {
            for j in 0..2 {
                huu += u[i] * u[j] * h[(i, j)];
                for k in 0..2 {
                    for l in 0..2 {
                        guu += u[i] * u[j] * u[k] * u[l] * eri[((i * 2 + j) * 2 + k) * 2 + l];
                    }
                }
            }
        }
        let e = 2.0 * huu + guu + 1.0 / 1.4;
        assert!((sol.energy - e).abs() < 1e-10);
        assert!(sol.energy > -1.1167 + 0.5);
    }
}

#[test]
fn too_few_iterations_is_an_error_that_says_what_was_tried() {
    let (s, h, eri) = h2_model();
    let ortho = Orthogonalizer::canonical(&s, 1e-7).unwrap();
    let p = Problem {
        s: &s,
        h: &h,
        e_nuc: 1.0 / 1.4,
        ortho: &ortho,
        n_alpha: 1,
        n_beta: 1,
    };
    let mut b = TensorFock::new(2, eri);
    let opts = ScfOptions {
        max_iter: 1,
        ..ScfOptions::default()
    };
    let start = Start::Densities {
        alpha: Mat::zeros(2, 2),
        beta: Mat::zeros(2, 2),
    };
    let err = iterate(&p, &mut b, &opts, start, &mut |_| {}).unwrap_err();
    let msg = err.to_string();
    assert!(
        msg.contains("did not converge") && msg.contains("DIIS"),
        "{msg}"
    );
    assert_eq!(err.exit_code(), 1);
    let _ = b.describe();
}
