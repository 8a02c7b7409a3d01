//! Kinetic-energy integrals T_μν = −½ ⟨μ|∇²|ν⟩.
//!
//! Per direction, acting on the ket (Helgaker, Jørgensen & Olsen, eq. 9.3.40–9.3.41):
//! ⟨i| ∂²/∂x² |j⟩ = j(j−1) S_{i,j−2} − 2β(2j+1) S_{i,j} + 4β² S_{i,j+2},
//! T = −½ (D_x S_y S_z + S_x D_y S_z + S_x S_y D_z).

use crate::basis::cartesian::components;
use crate::basis::BasisSet;
use crate::integrals::one_electron::{gaussian_product, symmetric_matrices, PrimPair};
use crate::integrals::overlap::overlap_1d;
use bandcast_linalg::Mat;

/// The AO kinetic-energy matrix.
pub fn kinetic(basis: &BasisSet) -> Mat<f64> {
    symmetric_matrices(basis, 1, kinetic_kernel).pop().unwrap()
}

fn kinetic_kernel(pp: &PrimPair, scale: f64, out: &mut [f64]) {
    let (p, _pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let lb2 = lb + 2;
    let w2 = lb2 + 1;
    let w = lb + 1;
    let beta = pp.beta;
    let mut s2 = [0.0; 96];
    let mut s = [[0.0; 64]; 3];
    let mut dd = [[0.0; 64]; 3];
    for d in 0..3 {
        overlap_1d(
            la,
            lb2,
            pa[d],
            pb[d],
            p,
            if d == 0 { k } else { 1.0 },
            &mut s2,
        );
        for i in 0..=la {
            for j in 0..=lb {
                let sij = s2[i * w2 + j];
                let mut v =
                    -2.0 * beta * (2 * j + 1) as f64 * sij + 4.0 * beta * beta * s2[i * w2 + j + 2];
                if j >= 2 {
                    v += (j * (j - 1)) as f64 * s2[i * w2 + j - 2];
                }
                s[d][i * w + j] = sij;
                dd[d][i * w + j] = v;
            }
        }
    }
    let cb = components(lb);
    let mut idx = 0;
    for a in components(la) {
        for b in &cb {
            let x = a[0] * w + b[0];
            let y = a[1] * w + b[1];
            let z = a[2] * w + b[2];
            let t = dd[0][x] * s[1][y] * s[2][z]
                + s[0][x] * dd[1][y] * s[2][z]
                + s[0][x] * s[1][y] * dd[2][z];
            out[idx] += -0.5 * scale * t;
            idx += 1;
        }
    }
}
