//! Shared driver for one-electron matrices: loops over shell pairs (in parallel with rayon),
//! contracts primitive blocks supplied by a kernel, transforms both indices to the final
//! AO basis and fills the symmetric (or, for `antisymmetric == false` only, plain) matrix.

use crate::basis::cartesian::n_cartesian;
use crate::basis::normalize::contracted_coefficients;
use crate::basis::solid_harmonics;
use crate::basis::{BasisSet, Shell};
use crate::integrals::transform::transform_axis;
use bandcast_linalg::Mat;
use rayon::prelude::*;

/// One primitive pair handed to a kernel.
pub struct PrimPair {
    pub la: usize,
    pub lb: usize,
    pub a: [f64; 3],
    pub b: [f64; 3],
    pub alpha: f64,
    pub beta: f64,
}

/// Build `n_comp` symmetric matrices. `kernel(pp, scale, out)` must add `scale` × the
/// primitive integrals over raw Cartesian components to `out`, laid out
/// [comp][ia][ib] with ia, ib in AO component order.
pub fn symmetric_matrices<K>(basis: &BasisSet, n_comp: usize, kernel: K) -> Vec<Mat<f64>>
where
    K: Fn(&PrimPair, f64, &mut [f64]) + Sync,
{
    let ns = basis.shells.len();
    let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
    let pairs: Vec<(usize, usize)> = (0..ns).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
    let blocks: Vec<Vec<f64>> = pairs
        .par_iter()
        .map(|&(a, b)| {
            shell_pair_block(
                &basis.shells[a],
                &basis.shells[b],
                &coefs[a],
                &coefs[b],
                n_comp,
                &kernel,
            )
        })
        .collect();
    let n = basis.n_basis;
    let mut mats: Vec<Mat<f64>> = (0..n_comp).map(|_| Mat::zeros(n, n)).collect();
    for (&(a, b), blk) in pairs.iter().zip(&blocks) {
        let (oa, ob) = (basis.offsets[a], basis.offsets[b]);
        let (na, nb) = (basis.shells[a].n_functions(), basis.shells[b].n_functions());
        for (c, m) in mats.iter_mut().enumerate() {
            for i in 0..na {
                for j in 0..nb {
                    let v = blk[(c * na + i) * nb + j];
                    m[(oa + i, ob + j)] = v;
                    m[(ob + j, oa + i)] = v;
                }
            }
        }
    }
    mats
}

/// The final-basis block (n_comp × n_a × n_b) of one shell pair.
pub fn shell_pair_block<K>(
    sa: &Shell,
    sb: &Shell,
    ca: &[f64],
    cb: &[f64],
    n_comp: usize,
    kernel: &K,
) -> Vec<f64>
where
    K: Fn(&PrimPair, f64, &mut [f64]),
{
    let (nca, ncb) = (n_cartesian(sa.l), n_cartesian(sb.l));
    let mut cart = vec![0.0; n_comp * nca * ncb];
    for (i, &alpha) in sa.exponents.iter().enumerate() {
        for (j, &beta) in sb.exponents.iter().enumerate() {
            let pp = PrimPair {
                la: sa.l,
                lb: sb.l,
                a: sa.center,
                b: sb.center,
                alpha,
                beta,
            };
            kernel(&pp, ca[i] * cb[j], &mut cart);
        }
    }
    let ta = solid_harmonics::transform(sa.l, sa.pure);
    let tb = solid_harmonics::transform(sb.l, sb.pure);
    let (na, nb) = (sa.n_functions(), sb.n_functions());
    let mut tmp = Vec::new();
    transform_axis(&cart, &[n_comp, nca, ncb], 2, tb, nb, &mut tmp);
    let mut out = Vec::new();
    transform_axis(&tmp, &[n_comp, nca, nb], 1, ta, na, &mut out);
    out
}

/// Gaussian product data of a primitive pair: (p, P, X_PA, X_PB, exp(−μ|AB|²)).
#[inline]
pub fn gaussian_product(pp: &PrimPair) -> (f64, [f64; 3], [f64; 3], [f64; 3], f64) {
    let p = pp.alpha + pp.beta;
    let mu = pp.alpha * pp.beta / p;
    let mut pc = [0.0; 3];
    let mut pa = [0.0; 3];
    let mut pb = [0.0; 3];
    let mut r2 = 0.0;
    for k in 0..3 {
        pc[k] = (pp.alpha * pp.a[k] + pp.beta * pp.b[k]) / p;
        pa[k] = pc[k] - pp.a[k];
        pb[k] = pc[k] - pp.b[k];
        r2 += (pp.a[k] - pp.b[k]).powi(2);
    }
    (p, pc, pa, pb, (-mu * r2).exp())
}
