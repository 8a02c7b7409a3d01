//! Nuclear-attraction integrals V_μν = −Σ_C Z_C ⟨μ| 1/|r − C| |ν⟩ for point nuclei, by the
//! Hermite expansion (Helgaker, Jørgensen & Olsen, eq. 9.9.32):
//! V_ab = −Z_C (2π/p) Σ_{tuv} E^{ab}_{tuv} R_{tuv}(p, R_PC).

use crate::basis::cartesian::components;
use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::integrals::hermite_coulomb::{hermite_r, r_index, RScratch};
use crate::integrals::hermite_expansion::{e_index, e_len, hermite_e};
use crate::integrals::one_electron::{gaussian_product, symmetric_matrices, PrimPair};
use bandcast_linalg::Mat;
use std::cell::RefCell;
use std::f64::consts::PI;

/// Electron–nuclear attraction matrix for the molecule's point nuclei.
pub fn nuclear(basis: &BasisSet, mol: &Molecule) -> Mat<f64> {
    let charges: Vec<(f64, [f64; 3])> =
        mol.atoms.iter().map(|a| (a.z as f64, a.position)).collect();
    nuclear_from_charges(basis, &charges)
}

/// Attraction to arbitrary point charges (charge, position in bohr): −Σ q ⟨μ|1/|r−C||ν⟩.
pub fn nuclear_from_charges(basis: &BasisSet, charges: &[(f64, [f64; 3])]) -> Mat<f64> {
    thread_local! {
        static SCRATCH: RefCell<RScratch> = RefCell::new(RScratch::default());
    }
    symmetric_matrices(basis, 1, |pp: &PrimPair, scale: f64, out: &mut [f64]| {
        SCRATCH.with(|s| nuclear_kernel(pp, scale, charges, out, &mut s.borrow_mut()))
    })
    .pop()
    .unwrap()
}

fn nuclear_kernel(
    pp: &PrimPair,
    scale: f64,
    charges: &[(f64, [f64; 3])],
    out: &mut [f64],
    rs: &mut RScratch,
) {
    let (p, pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let l = la + lb;
    let n = e_len(la, lb);
    let mut e = [[0.0; 512]; 3];
    for d in 0..3 {
        hermite_e(
            la,
            lb,
            pa[d],
            pb[d],
            0.5 / p,
            if d == 0 { k } else { 1.0 },
            &mut e[d][..n],
        );
    }
    let ca = components(la);
    let cb = components(lb);
    let dim = l + 1;
    for &(q, c) in charges {
        let rpc = [pc[0] - c[0], pc[1] - c[1], pc[2] - c[2]];
        let r = hermite_r(l, p, rpc, -q * 2.0 * PI / p * scale, rs);
        let mut idx = 0;
        for a in &ca {
            for b in &cb {
                let mut v = 0.0;
                for t in 0..=a[0] + b[0] {
                    let ex = e[0][e_index(lb, a[0], b[0], t, l)];
                    for u in 0..=a[1] + b[1] {
                        let exy = ex * e[1][e_index(lb, a[1], b[1], u, l)];
                        for w in 0..=a[2] + b[2] {
                            v += exy
                                * e[2][e_index(lb, a[2], b[2], w, l)]
                                * r[r_index(dim, t, u, w)];
                        }
                    }
                }
                out[idx] += v;
                idx += 1;
            }
        }
    }
}
