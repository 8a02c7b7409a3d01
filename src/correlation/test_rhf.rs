//! Test-only closed-shell Hartree–Fock for tiny molecules (full ERI array, Löwdin
//! orthogonalisation, DIIS on FDS − SDF), so the correlated methods can be unit-tested
//! before and independently of the project's SCF module.

use bandcast_linalg::{eigh, mul, Mat};

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::integrals::{eri_tensor, kinetic, nuclear, overlap};
use crate::scf::{Reference, Wavefunction};

pub fn rhf(mol: &Molecule, basis: &BasisSet) -> Wavefunction {
    let n = basis.n_basis;
    let s = overlap(basis);
    let mut h = kinetic(basis);
    let v = nuclear(basis, mol);
    for i in 0..n {
        for j in 0..n {
            h[(i, j)] += v[(i, j)];
        }
    }
    let g = eri_tensor(basis);
    let (w, u) = eigh(s.as_ref());
    let x = Mat::<f64>::from_fn(n, n, |i, j| u[(i, j)] / w[j].sqrt());
    let nocc = mol.n_electrons() / 2;
    let solve = |f: &Mat<f64>| -> (Vec<f64>, Mat<f64>) {
        let fp = mul(
            x.as_ref(),
            true,
            mul(f.as_ref(), false, x.as_ref(), false).as_ref(),
            false,
        );
        let (e, cp) = eigh(fp.as_ref());
        (e, mul(x.as_ref(), false, cp.as_ref(), false))
    };
    let (mut eps, mut c) = solve(&h);
    let mut e_old = 0.0;
    let mut fs: Vec<Mat<f64>> = Vec::new();
    let mut es: Vec<Mat<f64>> = Vec::new();
    let mut energy = 0.0;
    for _ in 0..200 {
        let d = Mat::<f64>::from_fn(n, n, |i, j| (0..nocc).map(|k| c[(i, k)] * c[(j, k)]).sum());
        let mut f = h.clone();
        for p in 0..n {
            for q in 0..n {
                let mut acc = 0.0;
                for r in 0..n {
                    for t in 0..n {
                        acc += d[(r, t)]
                            * (2.0 * g[((p * n + q) * n + r) * n + t]
                                - g[((p * n + r) * n + q) * n + t]);
                    }
                }
                f[(p, q)] += acc;
            }
        }
        energy = (0..n)
            .flat_map(|i| (0..n).map(move |j| (i, j)))
            .map(|(i, j)| d[(i, j)] * (h[(i, j)] + f[(i, j)]))
            .sum::<f64>();
        let fds = mul(
            mul(f.as_ref(), false, d.as_ref(), false).as_ref(),
            false,
            s.as_ref(),
            false,
        );
        let err = Mat::<f64>::from_fn(n, n, |i, j| fds[(i, j)] - fds[(j, i)]);
        let en = (0..n)
            .flat_map(|i| (0..n).map(move |j| (i, j)))
            .map(|(i, j)| err[(i, j)].powi(2))
            .sum::<f64>()
            .sqrt();
        if (energy - e_old).abs() < 1e-12 && en < 1e-10 {
            break;
        }
        e_old = energy;
        fs.push(f.clone());
        es.push(err);
        if fs.len() > 8 {
            fs.remove(0);
            es.remove(0);
        }
        let m = fs.len();
        let mut a = vec![vec![0.0; m + 1]; m + 1];
        for i in 0..m {
            for j in 0..m {
                a[i][j] = (0..n)
                    .flat_map(|p| (0..n).map(move |q| (p, q)))
                    .map(|(p, q)| es[i][(p, q)] * es[j][(p, q)])
                    .sum();
            }
            a[i][m] = -1.0;
            a[m][i] = -1.0;
        }
        let mut b = vec![0.0; m + 1];
        b[m] = -1.0;
        let fx = match bandcast_linalg::solve_small(&a, &b) {
            Some(cf) => {
                Mat::<f64>::from_fn(n, n, |i, j| (0..m).map(|k| cf[k] * fs[k][(i, j)]).sum())
            }
            None => f,
        };
        let (e2, c2) = solve(&fx);
        eps = e2;
        c = c2;
    }
    let enuc = mol.nuclear_repulsion();
    let occ: Vec<f64> = (0..n).map(|i| if i < nocc { 1.0 } else { 0.0 }).collect();
    Wavefunction {
        reference: Reference::Rhf,
        energy: energy + enuc,
        nuclear_repulsion: enuc,
        one_electron: 0.0,
        two_electron: 0.0,
        converged: true,
        iterations: 0,
        c_alpha: c.clone(),
        c_beta: c,
        eps_alpha: eps.clone(),
        eps_beta: eps,
        occ_alpha: occ.clone(),
        occ_beta: occ,
        s2: 0.0,
        n_basis: n,
        n_independent: n,
        dipole: [0.0; 3],
    }
}
