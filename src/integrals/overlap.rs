//! Overlap integrals S_μν = ⟨μ|ν⟩ by the Hermite expansion: per Cartesian direction
//! S_ij = E^{ij}_0 √(π/p) (Helgaker, Jørgensen & Olsen, eq. 9.5.41), S = S_x S_y S_z.

use crate::basis::cartesian::components;
use crate::basis::BasisSet;
use crate::integrals::hermite_expansion::{e_index, e_len, hermite_e};
use crate::integrals::one_electron::{gaussian_product, symmetric_matrices, PrimPair};
use bandcast_linalg::Mat;
use std::f64::consts::PI;

/// The AO overlap matrix (unit diagonal by construction of the normalisation).
pub fn overlap(basis: &BasisSet) -> Mat<f64> {
    symmetric_matrices(basis, 1, overlap_kernel).pop().unwrap()
}

/// One-dimensional overlaps S[i][j] (i ≤ la, j ≤ lb) for direction k, flat (la+1)×(lb+1),
/// without the exp(−μ X²) factor unless `e00` carries it.
pub fn overlap_1d(la: usize, lb: usize, xpa: f64, xpb: f64, p: f64, e00: f64, out: &mut [f64]) {
    let mut e = [0.0; 1024];
    hermite_e(la, lb, xpa, xpb, 0.5 / p, e00, &mut e[..e_len(la, lb)]);
    let f = (PI / p).sqrt();
    for i in 0..=la {
        for j in 0..=lb {
            out[i * (lb + 1) + j] = e[e_index(lb, i, j, 0, la + lb)] * f;
        }
    }
}

pub(crate) fn overlap_kernel(pp: &PrimPair, scale: f64, out: &mut [f64]) {
    let (p, _pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let w = lb + 1;
    let mut s = [[0.0; 64]; 3];
    for d in 0..3 {
        overlap_1d(
            la,
            lb,
            pa[d],
            pb[d],
            p,
            if d == 0 { k } else { 1.0 },
            &mut s[d],
        );
    }
    let cb = components(lb);
    let mut idx = 0;
    for a in components(la) {
        for b in &cb {
            out[idx] +=
                scale * s[0][a[0] * w + b[0]] * s[1][a[1] * w + b[1]] * s[2][a[2] * w + b[2]];
            idx += 1;
        }
    }
}
