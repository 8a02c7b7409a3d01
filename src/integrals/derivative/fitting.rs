//! First derivatives of the density-fitting integrals — three-centre (P|μν) and the
//! Coulomb metric (P|Q) — contracted with the arrays a density-fitted gradient needs:
//! Σ_Pμν T_P,μν ∂(P|μν)/∂R_A and Σ_PQ M_PQ ∂(P|Q)/∂R_A.
//!
//! Method: the per-centre derivative path of [`EriDerivative`] on shell quartets
//! (P 1|μν) and (P 1|Q 1), where 1 is the "unit" s shell of exponent 0 (as in
//! `integrals::density_fitting`). The unit function is a constant, so its centre carries no
//! derivative and translational invariance gives the auxiliary centre:
//! ∂_P = −(∂_μ + ∂_ν) and ∂_P = −∂_Q (exact conditions). Auxiliary shells in parallel,
//! their contributions summed in shell order (independent of the thread count).

use bandcast_linalg::Mat;
use rayon::prelude::*;

use super::eri::EriDerivative;
use crate::basis::normalize::contracted_coefficients;
use crate::basis::{BasisSet, Shell};

/// Derivative engine over an auxiliary and an orbital basis.
pub struct FittingDerivative {
    d: EriDerivative,
    na: usize,
    no: usize,
    unit: usize,
    aux_off: Vec<usize>,
    orb_off: Vec<usize>,
    n_orb: usize,
}

impl FittingDerivative {
    pub fn new(aux: &BasisSet, orbital: &BasisSet) -> Self {
        let (na, no) = (aux.shells.len(), orbital.shells.len());
        let mut shells: Vec<Shell> = aux.shells.clone();
        shells.extend(orbital.shells.iter().cloned());
        let mut coefs: Vec<Vec<f64>> = shells.iter().map(contracted_coefficients).collect();
        let unit = shells.len();
        shells.push(Shell {
            l: 0,
            pure: false,
            center: [0.0; 3],
            atom: usize::MAX,
            exponents: vec![0.0],
            coefficients: vec![1.0],
        });
        coefs.push(vec![1.0]);
        let is_aux = move |s: usize| s < na;
        let is_orb = move |s: usize| s >= na && s < na + no;
        let wanted = move |x: usize, y: usize| {
            (is_aux(x) && y == unit) || (x == unit && is_aux(y)) || (is_orb(x) && is_orb(y))
        };
        FittingDerivative {
            d: EriDerivative::build(&shells, coefs, &wanted),
            na,
            no,
            unit,
            aux_off: aux.offsets.clone(),
            orb_off: orbital.offsets.clone(),
            n_orb: orbital.n_basis,
        }
    }

    /// Σ_Pμν T_P,μν ∂(P|μν)/∂R for every atom (n_atoms × 3); `t[(P·n + μ)·n + ν]`,
    /// symmetric in μν. Blocks with Schwarz bound × max|T| below `threshold` are skipped.
    pub fn three_centre_gradient(
        &self,
        t: &[f64],
        n_atoms: usize,
        threshold: f64,
    ) -> Vec<[f64; 3]> {
        let (na, n) = (self.na, self.n_orb);
        let pairs: Vec<(usize, usize)> = (0..self.no)
            .flat_map(|a| (0..=a).map(move |b| (a, b)))
            .collect();
        let parts: Vec<Vec<f64>> = (0..na)
            .into_par_iter()
            .map(|p| {
                let mut g = vec![0.0; 3 * n_atoms];
                let mut out: [Vec<f64>; 3] = Default::default();
                let (mut buf, mut tmp, mut blk) = (Vec::new(), Vec::new(), Vec::new());
                let bp = self.d.schwarz(p, self.unit);
                let np = self.d.nf[p];
                for &(a, b) in &pairs {
                    let (sa, sb) = (na + a, na + b);
                    let at = [self.d.atom[p], self.d.atom[sa], self.d.atom[sb]];
                    if at[1] == at[0] && at[2] == at[0] {
                        continue;
                    }
                    let (nfa, nfb) = (self.d.nf[sa], self.d.nf[sb]);
                    blk.clear();
                    let mut tmax: f64 = 0.0;
                    for i in 0..np {
                        for x in 0..nfa {
                            let row = ((self.aux_off[p] + i) * n + self.orb_off[a] + x) * n;
                            for y in 0..nfb {
                                let v = t[row + self.orb_off[b] + y];
                                tmax = tmax.max(v.abs());
                                blk.push(v);
                            }
                        }
                    }
                    if bp * self.d.schwarz(sa, sb) * tmax < threshold {
                        continue;
                    }
                    let deg = if a != b { 2.0 } else { 1.0 };
                    let q = [p, self.unit, sa, sb];
                    for pos in [2, 3] {
                        // on the auxiliary atom: + v and − v cancel
                        if at[pos - 1] == at[0] {
                            continue;
                        }
                        self.d
                            .centre_derivative(q, pos, &mut out, &mut buf, &mut tmp);
                        for k in 0..3 {
                            let v: f64 =
                                out[k].iter().zip(&blk).map(|(x, y)| x * y).sum::<f64>() * deg;
                            g[3 * at[pos - 1] + k] += v;
                            g[3 * at[0] + k] -= v;
                        }
                    }
                }
                g
            })
            .collect();
        sum_parts(&parts, n_atoms)
    }

    /// Σ_PQ M_PQ ∂(P|Q)/∂R for every atom (n_atoms × 3), M symmetric.
    pub fn two_centre_gradient(&self, m: &Mat<f64>, n_atoms: usize) -> Vec<[f64; 3]> {
        let na = self.na;
        let parts: Vec<Vec<f64>> = (0..na)
            .into_par_iter()
            .map(|p| {
                let mut g = vec![0.0; 3 * n_atoms];
                let mut out: [Vec<f64>; 3] = Default::default();
                let (mut buf, mut tmp) = (Vec::new(), Vec::new());
                let (ap, np) = (self.d.atom[p], self.d.nf[p]);
                for q in 0..p {
                    let aq = self.d.atom[q];
                    if aq == ap {
                        continue;
                    }
                    let nq = self.d.nf[q];
                    self.d.centre_derivative(
                        [p, self.unit, q, self.unit],
                        2,
                        &mut out,
                        &mut buf,
                        &mut tmp,
                    );
                    for k in 0..3 {
                        let mut v = 0.0;
                        for i in 0..np {
                            for j in 0..nq {
                                v += out[k][i * nq + j]
                                    * m[(self.aux_off[p] + i, self.aux_off[q] + j)];
                            }
                        }
                        // (p, q) and (q, p)
                        g[3 * aq + k] += 2.0 * v;
                        g[3 * ap + k] -= 2.0 * v;
                    }
                }
                g
            })
            .collect();
        sum_parts(&parts, n_atoms)
    }
}

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
