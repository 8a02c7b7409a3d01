//! First derivatives of the one-electron integrals with respect to nuclear positions,
//! contracted at once with a symmetric AO matrix (what a gradient needs):
//! G_A = Σ_μν M_μν ∂X_μν/∂R_A for X = S, T, V.
//!
//! Method: a Cartesian Gaussian's derivative with respect to its own centre is
//! ∂/∂A_x [x_A^i e^{−α x_A²}] = 2α x_A^{i+1} e^{−α x_A²} − i x_A^{i−1} e^{−α x_A²}
//! (common practice; Helgaker, Jørgensen & Olsen, *Molecular Electronic-Structure Theory*,
//! eq. 9.2.13), so every derivative is a combination of the plain McMurchie–Davidson
//! integrals of `crate::integrals` with the angular momentum raised and lowered by one.
//! Translational invariance gives ∂/∂B = −∂/∂A for S and T; for the nuclear attraction of
//! one nucleus C, ∂/∂C = −(∂/∂A + ∂/∂B) (the operator derivative, the Hellmann–Feynman
//! term).
//!
//! Pairs of shells run in parallel; each pair returns its own small vector and the vectors
//! are added in pair order, so the result does not depend on the thread count.

use crate::basis::cartesian::components;
use crate::basis::normalize::contracted_coefficients;
use crate::basis::BasisSet;
use crate::integrals::hermite_coulomb::{hermite_r, r_index, RScratch};
use crate::integrals::hermite_expansion::{e_index, e_len, hermite_e};
use crate::integrals::one_electron::{gaussian_product, shell_pair_block, PrimPair};
use crate::integrals::overlap::overlap_1d;
use bandcast_linalg::Mat;
use rayon::prelude::*;
use std::cell::RefCell;
use std::f64::consts::PI;

/// A point charge (charge in e, position in bohr) and the atom whose gradient it enters.
#[derive(Debug, Clone, Copy)]
pub struct ChargeSite {
    pub charge: f64,
    pub position: [f64; 3],
    pub atom: usize,
}

/// Σ_μν M_μν ∂S_μν/∂R_A for every atom A (n_atoms × [x, y, z]).
pub fn overlap_gradient(basis: &BasisSet, n_atoms: usize, m: &Mat<f64>) -> Vec<[f64; 3]> {
    bra_translational(basis, n_atoms, m, &overlap_bra_kernel)
}

/// Σ_μν M_μν ∂T_μν/∂R_A for every atom A.
pub fn kinetic_gradient(basis: &BasisSet, n_atoms: usize, m: &Mat<f64>) -> Vec<[f64; 3]> {
    bra_translational(basis, n_atoms, m, &kinetic_bra_kernel)
}

/// Σ_μν M_μν ∂V_μν/∂R_A for every atom A, V = −Σ_C q_C ⟨μ|1/|r − C||ν⟩ over `sites`;
/// the derivative with respect to each site's position goes to its `atom`.
pub fn nuclear_gradient(
    basis: &BasisSet,
    n_atoms: usize,
    sites: &[ChargeSite],
    m: &Mat<f64>,
) -> Vec<[f64; 3]> {
    thread_local! {
        static SCRATCH: RefCell<RScratch> = RefCell::new(RScratch::default());
    }
    let ns = basis.shells.len();
    let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
    let pairs: Vec<(usize, usize)> = (0..ns).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
    let nc = sites.len();
    let parts: Vec<Vec<f64>> = pairs
        .par_iter()
        .map(|&(a, b)| {
            let (sa, sb) = (&basis.shells[a], &basis.shells[b]);
            let kernel = |pp: &PrimPair, scale: f64, out: &mut [f64]| {
                SCRATCH.with(|s| nuclear_deriv_kernel(pp, scale, sites, out, &mut s.borrow_mut()))
            };
            let blk = shell_pair_block(sa, sb, &coefs[a], &coefs[b], 6 * nc, &kernel);
            let f = if a == b { 1.0 } else { 2.0 };
            let mut g = vec![0.0; 3 * n_atoms];
            let (na, nb) = (sa.n_functions(), sb.n_functions());
            let (oa, ob) = (basis.offsets[a], basis.offsets[b]);
            for (ic, site) in sites.iter().enumerate() {
                for comp in 0..6 {
                    let blk = &blk[(ic * 6 + comp) * na * nb..(ic * 6 + comp + 1) * na * nb];
                    let mut v = 0.0;
                    for i in 0..na {
                        for j in 0..nb {
                            v += m[(oa + i, ob + j)] * blk[i * nb + j];
                        }
                    }
                    v *= f;
                    let (atom, k) = if comp < 3 {
                        (sa.atom, comp)
                    } else {
                        (sb.atom, comp - 3)
                    };
                    g[3 * atom + k] += v;
                    g[3 * site.atom + k] -= v;
                }
            }
            g
        })
        .collect();
    sum_parts(&parts, n_atoms)
}

/// Kernels adding scale × ∂/∂A_k of the primitive integrals (bra centre only), layout
/// [k][ia][ib].
type BraKernel = dyn Fn(&PrimPair, f64, &mut [f64]) + Sync;

/// Contraction for an integral class that only depends on the two orbital centres.
fn bra_translational(
    basis: &BasisSet,
    n_atoms: usize,
    m: &Mat<f64>,
    kernel: &BraKernel,
) -> Vec<[f64; 3]> {
    let ns = basis.shells.len();
    let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
    // pairs on one atom contribute nothing (∂/∂A + ∂/∂B = 0)
    let pairs: Vec<(usize, usize)> = (0..ns)
        .flat_map(|a| (0..a).map(move |b| (a, b)))
        .filter(|&(a, b)| basis.shells[a].atom != basis.shells[b].atom)
        .collect();
    let parts: Vec<Vec<f64>> = pairs
        .par_iter()
        .map(|&(a, b)| {
            let (sa, sb) = (&basis.shells[a], &basis.shells[b]);
            let blk = shell_pair_block(sa, sb, &coefs[a], &coefs[b], 3, &kernel);
            let (na, nb) = (sa.n_functions(), sb.n_functions());
            let (oa, ob) = (basis.offsets[a], basis.offsets[b]);
            let mut g = vec![0.0; 3 * n_atoms];
            for k in 0..3 {
                let blk = &blk[k * na * nb..(k + 1) * na * nb];
                let mut v = 0.0;
                for i in 0..na {
                    for j in 0..nb {
                        v += m[(oa + i, ob + j)] * blk[i * nb + j];
                    }
                }
                g[3 * sa.atom + k] += 2.0 * v;
                g[3 * sb.atom + k] -= 2.0 * v;
            }
            g
        })
        .collect();
    sum_parts(&parts, n_atoms)
}

/// Add per-pair vectors in order (deterministic).
fn sum_parts(parts: &[Vec<f64>], n_atoms: usize) -> Vec<[f64; 3]> {
    let mut g = vec![[0.0; 3]; n_atoms];
    for p in parts {
        for (a, ga) in g.iter_mut().enumerate() {
            for k in 0..3 {
                ga[k] += p[3 * a + k];
            }
        }
    }
    g
}

/// ∂/∂A of a one-dimensional bra index: 2α X[i+1][j] − i X[i−1][j], for a table `x` with
/// rows 0..=la+1 and row width `w`.
#[inline]
fn bra_deriv(x: &[f64], w: usize, alpha: f64, i: usize, j: usize) -> f64 {
    let mut v = 2.0 * alpha * x[(i + 1) * w + j];
    if i > 0 {
        v -= i as f64 * x[(i - 1) * w + j];
    }
    v
}

fn overlap_bra_kernel(pp: &PrimPair, scale: f64, out: &mut [f64]) {
    let (p, _pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let w = lb + 1;
    let mut s = [[0.0; 64]; 3];
    for d in 0..3 {
        overlap_1d(
            la + 1,
            lb,
            pa[d],
            pb[d],
            p,
            if d == 0 { k } else { 1.0 },
            &mut s[d],
        );
    }
    let ca = components(la);
    let cb = components(lb);
    let n = ca.len() * cb.len();
    let mut idx = 0;
    for a in &ca {
        for b in &cb {
            let sx = s[0][a[0] * w + b[0]];
            let sy = s[1][a[1] * w + b[1]];
            let sz = s[2][a[2] * w + b[2]];
            let dx = bra_deriv(&s[0], w, pp.alpha, a[0], b[0]);
            let dy = bra_deriv(&s[1], w, pp.alpha, a[1], b[1]);
            let dz = bra_deriv(&s[2], w, pp.alpha, a[2], b[2]);
            out[idx] += scale * dx * sy * sz;
            out[n + idx] += scale * sx * dy * sz;
            out[2 * n + idx] += scale * sx * sy * dz;
            idx += 1;
        }
    }
}

fn kinetic_bra_kernel(pp: &PrimPair, scale: f64, out: &mut [f64]) {
    let (p, _pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let w2 = lb + 3;
    let w = lb + 1;
    let beta = pp.beta;
    let mut s2 = [0.0; 64];
    // 1-D overlaps S and second-derivative integrals D for bra rows 0..=la+1
    let mut s = [[0.0; 64]; 3];
    let mut dd = [[0.0; 64]; 3];
    for d in 0..3 {
        overlap_1d(
            la + 1,
            lb + 2,
            pa[d],
            pb[d],
            p,
            if d == 0 { k } else { 1.0 },
            &mut s2,
        );
        for i in 0..=la + 1 {
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
    let ca = components(la);
    let cb = components(lb);
    let n = ca.len() * cb.len();
    let alpha = pp.alpha;
    let mut idx = 0;
    for a in &ca {
        for b in &cb {
            let ix = [a[0] * w + b[0], a[1] * w + b[1], a[2] * w + b[2]];
            let sv = [s[0][ix[0]], s[1][ix[1]], s[2][ix[2]]];
            let dv = [dd[0][ix[0]], dd[1][ix[1]], dd[2][ix[2]]];
            for kd in 0..3 {
                // derivative of direction kd's factors
                let ds = bra_deriv(&s[kd], w, alpha, a[kd], b[kd]);
                let ddd = bra_deriv(&dd[kd], w, alpha, a[kd], b[kd]);
                let (o1, o2) = ((kd + 1) % 3, (kd + 2) % 3);
                // T = −½ Σ_d D_d Π_{e≠d} S_e
                let t = ddd * sv[o1] * sv[o2] + ds * (dv[o1] * sv[o2] + sv[o1] * dv[o2]);
                out[kd * n + idx] += -0.5 * scale * t;
            }
            idx += 1;
        }
    }
}

/// Per site: [∂/∂A_x, ∂/∂A_y, ∂/∂A_z, ∂/∂B_x, ∂/∂B_y, ∂/∂B_z] of −q⟨a|1/r_C|b⟩, layout
/// [site][comp][ia][ib].
fn nuclear_deriv_kernel(
    pp: &PrimPair,
    scale: f64,
    sites: &[ChargeSite],
    out: &mut [f64],
    rs: &mut RScratch,
) {
    let (p, pc, pa, pb, k) = gaussian_product(pp);
    let (la, lb) = (pp.la, pp.lb);
    let (la1, lb1) = (la + 1, lb + 1);
    let lt = la1 + lb1; // table maxima
    let n = e_len(la1, lb1);
    let mut e = [[0.0; 512]; 3];
    for d in 0..3 {
        hermite_e(
            la1,
            lb1,
            pa[d],
            pb[d],
            0.5 / p,
            if d == 0 { k } else { 1.0 },
            &mut e[d][..n],
        );
    }
    let ca = components(la);
    let cb = components(lb);
    let nblk = ca.len() * cb.len();
    let l = la + lb + 1;
    let dim = l + 1;
    for (ic, site) in sites.iter().enumerate() {
        let c = site.position;
        let rpc = [pc[0] - c[0], pc[1] - c[1], pc[2] - c[2]];
        let r = hermite_r(l, p, rpc, -site.charge * 2.0 * PI / p * scale, rs);
        let v = |a: [usize; 3], b: [usize; 3]| -> f64 {
            let mut v = 0.0;
            for t in 0..=a[0] + b[0] {
                let ex = e[0][e_index(lb1, a[0], b[0], t, lt)];
                for u in 0..=a[1] + b[1] {
                    let exy = ex * e[1][e_index(lb1, a[1], b[1], u, lt)];
                    for w in 0..=a[2] + b[2] {
                        v += exy * e[2][e_index(lb1, a[2], b[2], w, lt)] * r[r_index(dim, t, u, w)];
                    }
                }
            }
            v
        };
        let base = ic * 6 * nblk;
        let mut idx = 0;
        for a in &ca {
            for b in &cb {
                for kd in 0..3 {
                    let mut up = *a;
                    up[kd] += 1;
                    let mut da = 2.0 * pp.alpha * v(up, *b);
                    if a[kd] > 0 {
                        let mut dn = *a;
                        dn[kd] -= 1;
                        da -= a[kd] as f64 * v(dn, *b);
                    }
                    let mut upb = *b;
                    upb[kd] += 1;
                    let mut db = 2.0 * pp.beta * v(*a, upb);
                    if b[kd] > 0 {
                        let mut dn = *b;
                        dn[kd] -= 1;
                        db -= b[kd] as f64 * v(*a, dn);
                    }
                    out[base + kd * nblk + idx] += da;
                    out[base + (3 + kd) * nblk + idx] += db;
                }
                idx += 1;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{central_difference, mixed_basis, random_symmetric};
    use super::*;
    use crate::integrals::{kinetic, nuclear_from_charges, overlap};

    fn sites_of(centres: &[[f64; 3]]) -> Vec<ChargeSite> {
        centres
            .iter()
            .enumerate()
            .map(|(i, &c)| ChargeSite {
                charge: 1.0 + i as f64,
                position: c,
                atom: i,
            })
            .collect()
    }

    /// Exact condition: the analytic derivative equals the limit of the central difference
    /// of tr(M X(R)); s to g shells, pure and Cartesian, on three centres.
    #[test]
    fn one_electron_derivatives_match_finite_differences() {
        for pure in [true, false] {
            let centres = [[0.0, 0.1, -0.2], [1.3, -0.4, 0.5], [-0.6, 1.1, 0.9]];
            let basis = mixed_basis(&centres, pure);
            let m = random_symmetric(basis.n_basis, 7);
            let tr = |x: &Mat<f64>| -> f64 {
                let mut s = 0.0;
                for i in 0..x.nrows() {
                    for j in 0..x.ncols() {
                        s += m[(i, j)] * x[(i, j)];
                    }
                }
                s
            };
            let gs = overlap_gradient(&basis, 3, &m);
            let gt = kinetic_gradient(&basis, 3, &m);
            let gv = nuclear_gradient(&basis, 3, &sites_of(&centres), &m);
            for atom in 0..3 {
                for k in 0..3 {
                    let fs = central_difference(&centres, atom, k, |c| {
                        tr(&overlap(&mixed_basis(c, pure)))
                    });
                    let ft = central_difference(&centres, atom, k, |c| {
                        tr(&kinetic(&mixed_basis(c, pure)))
                    });
                    let fv = central_difference(&centres, atom, k, |c| {
                        let q: Vec<(f64, [f64; 3])> =
                            sites_of(c).iter().map(|s| (s.charge, s.position)).collect();
                        tr(&nuclear_from_charges(&mixed_basis(c, pure), &q))
                    });
                    for (name, a, f) in [
                        ("S", gs[atom][k], fs),
                        ("T", gt[atom][k], ft),
                        ("V", gv[atom][k], fv),
                    ] {
                        assert!(
                            (a - f).abs() < 2e-7 * (1.0 + f.abs()),
                            "{name} pure={pure} atom {atom} dir {k}: analytic {a} vs difference {f}"
                        );
                    }
                }
            }
        }
    }
}
