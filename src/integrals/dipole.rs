//! Dipole (position) integrals ⟨μ| (r − O)_k |ν⟩, k = x, y, z, about an origin O.
//! Per direction (Helgaker, Jørgensen & Olsen, eq. 9.5.31 with the product x_O = x_P + X_PO):
//! ⟨i| x − O_x |j⟩ = (E^{ij}_1 + X_PO E^{ij}_0) √(π/p).
//! These are matrices of the electron's *position*; the electronic dipole moment is
//! −Σ_μν D_μν ⟨μ|r − O|ν⟩ (electron charge −1).

use crate::basis::cartesian::components;
use crate::basis::BasisSet;
use crate::integrals::hermite_expansion::{e_index, e_len, hermite_e};
use crate::integrals::one_electron::{gaussian_product, symmetric_matrices, PrimPair};
use bandcast_linalg::Mat;
use std::f64::consts::PI;

/// The three position-operator matrices about `origin` (bohr).
pub fn dipole(basis: &BasisSet, origin: [f64; 3]) -> [Mat<f64>; 3] {
    let mut m = symmetric_matrices(basis, 3, |pp: &PrimPair, scale: f64, out: &mut [f64]| {
        dipole_kernel(pp, scale, origin, out)
    });
    let z = m.pop().unwrap();
    let y = m.pop().unwrap();
    let x = m.pop().unwrap();
    [x, y, z]
}

fn dipole_kernel(pp: &PrimPair, scale: f64, origin: [f64; 3], out: &mut [f64]) {
    let (p, pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let l = la + lb;
    let w = lb + 1;
    let n = e_len(la, lb);
    let f = (PI / p).sqrt();
    let mut s = [[0.0; 64]; 3];
    let mut m = [[0.0; 64]; 3];
    let mut e = [0.0; 512];
    for d in 0..3 {
        hermite_e(
            la,
            lb,
            pa[d],
            pb[d],
            0.5 / p,
            if d == 0 { k } else { 1.0 },
            &mut e[..n],
        );
        let xpo = pc[d] - origin[d];
        for i in 0..=la {
            for j in 0..=lb {
                let e0 = e[e_index(lb, i, j, 0, l)];
                let e1 = if i + j >= 1 {
                    e[e_index(lb, i, j, 1, l)]
                } else {
                    0.0
                };
                s[d][i * w + j] = e0 * f;
                m[d][i * w + j] = (e1 + xpo * e0) * f;
            }
        }
    }
    let ca = components(la);
    let cb = components(lb);
    let nab = ca.len() * cb.len();
    let mut idx = 0;
    for a in &ca {
        for b in &cb {
            let x = a[0] * w + b[0];
            let y = a[1] * w + b[1];
            let z = a[2] * w + b[2];
            out[idx] += scale * m[0][x] * s[1][y] * s[2][z];
            out[nab + idx] += scale * s[0][x] * m[1][y] * s[2][z];
            out[2 * nab + idx] += scale * s[0][x] * s[1][y] * m[2][z];
            idx += 1;
        }
    }
}
