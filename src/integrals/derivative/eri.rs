//! First derivatives of the two-electron integrals (ab|cd) with respect to the shell
//! centres, and their contraction with a two-particle density (the two-electron part of
//! an SCF gradient), integral-direct with Schwarz screening.
//!
//! Method: ∂/∂A_x of a contracted Cartesian component Σ_i d_i x_A^i … e^{−α_i r_A²} is
//! Σ_i 2α_i d_i x_A^{i+1} … − i Σ_i d_i x_A^{i−1} … (common practice; Helgaker, Jørgensen &
//! Olsen, *Molecular Electronic-Structure Theory*, eq. 9.2.13). For every shell the engine
//! gets two extra Cartesian shells — l+1 with raw coefficients 2α_i d_i and l−1 with d_i —
//! and computes ordinary quartets with one shell replaced ([`crate::integrals::EriEngine`],
//! unchanged); the raw components are then recombined and taken to the final AOs (pure or
//! Cartesian) with the shell's own Cartesian → AO matrix. Translational invariance
//! (Σ over the four centres of ∂/∂R = 0) saves the derivatives of the centre that occurs
//! most often in a quartet.

use crate::basis::cartesian::{components, n_cartesian};
use crate::basis::normalize::contracted_coefficients;
use crate::basis::solid_harmonics;
use crate::basis::{BasisSet, Shell};
use crate::integrals::transform::transform_axis;
use crate::integrals::EriEngine;
use bandcast_linalg::Mat;
use rayon::prelude::*;

use super::one_pass::{quartet_gradient, DerivMaps, QuartetInput, SideDerivs};

/// The engine over a basis and its raised/lowered derivative shells.
pub struct EriDerivative {
    engine: EriEngine,
    n: usize,
    l: Vec<usize>,
    pub(super) nf: Vec<usize>,
    pub(super) atom: Vec<usize>,
    plus: Vec<usize>,
    minus: Vec<Option<usize>>,
    /// Per shell and direction: n_f × n_cart(l+1) and n_f × n_cart(l−1) matrices from the
    /// engine's (component-normalised) raised / lowered Cartesian blocks to ∂/∂A_k of the
    /// final AOs.
    g_plus: Vec<[Vec<f64>; 3]>,
    g_minus: Vec<[Vec<f64>; 3]>,
    /// The same per shell from raw (un-normalised) Cartesian components, for `one_pass`.
    maps: Vec<DerivMaps>,
    /// Use `one_pass` for plain pairs (else the per-centre path for every quartet).
    one_pass: bool,
}

fn comp_index(l: usize, c: [usize; 3]) -> usize {
    components(l)
        .iter()
        .position(|&x| x == c)
        .expect("component exists")
}

impl EriDerivative {
    pub fn new(basis: &BasisSet) -> Self {
        let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
        Self::build(&basis.shells, coefs, &|_, _| true)
    }

    /// The engine over `originals` with normalised coefficients `coefs` (see
    /// `crate::basis::normalize`) and their raised/lowered shells, keeping the pairs of
    /// original shells (x, y) with `wanted(x, y)` (symmetric) and every pair of a derived
    /// shell with an original y whose source x has `wanted(x, y)`.
    pub(crate) fn build(
        originals: &[Shell],
        coefs: Vec<Vec<f64>>,
        wanted: &(dyn Fn(usize, usize) -> bool + Sync),
    ) -> Self {
        let n = originals.len();
        let mut shells: Vec<Shell> = originals.to_vec();
        let mut coefs = coefs;
        let mut source: Vec<usize> = (0..n).collect();
        let mut plus = Vec::with_capacity(n);
        let mut minus = Vec::with_capacity(n);
        for s in 0..n {
            let sh = &originals[s];
            let d = coefs[s].clone();
            plus.push(shells.len());
            source.push(s);
            shells.push(Shell {
                l: sh.l + 1,
                pure: false,
                ..sh.clone()
            });
            coefs.push(
                d.iter()
                    .zip(&sh.exponents)
                    .map(|(&c, &a)| 2.0 * a * c)
                    .collect(),
            );
            if sh.l > 0 {
                minus.push(Some(shells.len()));
                source.push(s);
                shells.push(Shell {
                    l: sh.l - 1,
                    pure: false,
                    ..sh.clone()
                });
                coefs.push(d);
            } else {
                minus.push(None);
            }
        }
        // pairs with at least one original shell (a ≥ b, so b must be original)
        let keep = |a: usize, b: usize| b < n && wanted(source[a], b);
        let engine = EriEngine::build(&shells, &coefs, &keep);
        let mut g_plus = Vec::with_capacity(n);
        let mut g_minus = Vec::with_capacity(n);
        let mut maps = Vec::with_capacity(n);
        for sh in originals {
            let l = sh.l;
            let t = solid_harmonics::transform(l, sh.pure);
            let nf = sh.n_functions();
            let nc = n_cartesian(l);
            let (ncp, ncm) = (
                n_cartesian(l + 1),
                if l > 0 { n_cartesian(l - 1) } else { 0 },
            );
            let tp = solid_harmonics::transform(l + 1, false);
            let tm = if l > 0 {
                solid_harmonics::transform(l - 1, false)
            } else {
                &[][..]
            };
            let mut gp: [Vec<f64>; 3] = std::array::from_fn(|_| vec![0.0; nf * ncp]);
            let mut gm: [Vec<f64>; 3] = std::array::from_fn(|_| vec![0.0; nf * ncm]);
            let mut raised: [Vec<(usize, usize)>; 3] = Default::default();
            let mut lowered: [Vec<(usize, usize, f64)>; 3] = Default::default();
            for (iq, q) in components(l).iter().enumerate() {
                for k in 0..3 {
                    let mut up = *q;
                    up[k] += 1;
                    let iu = comp_index(l + 1, up);
                    let cf_up = tp[iu * ncp + iu];
                    for mu in 0..nf {
                        gp[k][mu * ncp + iu] += t[mu * nc + iq] / cf_up;
                    }
                    raised[k].push((iq, iu));
                    if q[k] > 0 {
                        let mut dn = *q;
                        dn[k] -= 1;
                        let id = comp_index(l - 1, dn);
                        let cf_dn = tm[id * ncm + id];
                        for mu in 0..nf {
                            gm[k][mu * ncm + id] -= q[k] as f64 * t[mu * nc + iq] / cf_dn;
                        }
                        lowered[k].push((iq, id, -(q[k] as f64)));
                    }
                }
            }
            g_plus.push(gp);
            g_minus.push(gm);
            let identity = nf == nc
                && (0..nf)
                    .all(|i| (0..nc).all(|j| t[i * nc + j] == if i == j { 1.0 } else { 0.0 }));
            let back =
                (!identity).then(|| (0..nc * nf).map(|x| t[(x % nf) * nc + x / nf]).collect());
            maps.push(DerivMaps {
                back,
                raised,
                lowered,
            });
        }
        EriDerivative {
            engine,
            n,
            l: originals.iter().map(|s| s.l).collect(),
            nf: originals.iter().map(|s| s.n_functions()).collect(),
            atom: originals.iter().map(|s| s.atom).collect(),
            plus,
            minus,
            g_plus,
            g_minus,
            maps,
            one_pass: true,
        }
    }

    /// Compute every quartet by the per-centre path (`centre_derivative`), not by
    /// `one_pass`; for checks.
    pub fn per_centre_only(mut self) -> Self {
        self.one_pass = false;
        self
    }

    /// Schwarz bound √max|(ab|ab)| of the original shell pair (a, b).
    pub fn schwarz(&self, a: usize, b: usize) -> f64 {
        self.engine.schwarz()[a * self.engine.n_shells() + b]
    }

    /// ∂(q0 q1|q2 q3)/∂(centre of the shell at position `pos`)_k for k = x, y, z into
    /// `out[k]` (layout of `EriEngine::shell_quartet`, final AOs).
    pub fn centre_derivative(
        &self,
        q: [usize; 4],
        pos: usize,
        out: &mut [Vec<f64>; 3],
        buf: &mut Vec<f64>,
        tmp: &mut Vec<f64>,
    ) {
        let s = q[pos];
        let mut dims = q.map(|x| self.nf[x]);
        let nf = dims[pos];
        let mut qp = q;
        qp[pos] = self.plus[s];
        self.engine.shell_quartet(qp[0], qp[1], qp[2], qp[3], buf);
        dims[pos] = n_cartesian(self.l[s] + 1);
        for k in 0..3 {
            transform_axis(buf, &dims, pos, &self.g_plus[s][k], nf, &mut out[k]);
        }
        if let Some(m) = self.minus[s] {
            qp[pos] = m;
            self.engine.shell_quartet(qp[0], qp[1], qp[2], qp[3], buf);
            dims[pos] = n_cartesian(self.l[s] - 1);
            for (k, o) in out.iter_mut().enumerate() {
                transform_axis(buf, &dims, pos, &self.g_minus[s][k], nf, tmp);
                for (x, y) in o.iter_mut().zip(tmp.iter()) {
                    *x += y;
                }
            }
        }
    }

    /// The contribution of the quartet `q` (a ≥ b, c ≥ d) to the gradient `g`
    /// (3 n_atoms), derivative integrals from one primitive pass (`one_pass`), when both its
    /// pairs are plain pairs; false (nothing done) otherwise.
    fn one_pass_quartet(
        &self,
        q: [usize; 4],
        off: &[usize],
        coulomb: &Mat<f64>,
        exchange: &[(f64, &Mat<f64>)],
        scale: f64,
        g: &mut [f64],
    ) -> bool {
        // the higher angular momentum first in each pair (the recurrences cost less)
        let orient = |x: usize, y: usize| {
            if self.l[x] < self.l[y] {
                (y, x)
            } else {
                (x, y)
            }
        };
        let (a, b) = orient(q[0], q[1]);
        let (c, d) = orient(q[2], q[3]);
        if !self.one_pass {
            return false;
        }
        let (Some(pb), Some(pk)) = (self.engine.plain_pair(a, b), self.engine.plain_pair(c, d))
        else {
            return false;
        };
        let q2 = [a, b, c, d];
        let at = q2.map(|x| self.atom[x]);
        let (bra, ket) = match (pb.ab != [0.0; 3], pk.ab != [0.0; 3]) {
            (false, false) => (SideDerivs::Combined, SideDerivs::No),
            (true, false) => (SideDerivs::Both, SideDerivs::No),
            (false, true) => (SideDerivs::No, SideDerivs::Both),
            (true, true) => (SideDerivs::Both, SideDerivs::First),
        };
        // atoms of the groups computed, and the atom that takes minus their sum
        let (targets, rest): (&[usize], usize) = match (bra, ket) {
            (SideDerivs::Combined, _) => (&[0], 2),
            (SideDerivs::Both, SideDerivs::No) => (&[0, 1], 2),
            (SideDerivs::No, _) => (&[2, 3], 0),
            _ => (&[0, 1, 2], 3),
        };
        let input = QuartetInput {
            metas: q2.map(|x| self.engine.meta(x)),
            maps: q2.map(|x| &self.maps[x]),
            pb,
            pk,
            tau: self.engine.tau(),
        };
        GROUPS.with(|cell| {
            let (gam, gc) = &mut *cell.borrow_mut();
            let mut dims = q2.map(|x| self.nf[x]);
            gamma_block(q2, dims, off, coulomb, exchange, gam);
            // Γ to raw Cartesian components on every axis (see `DerivMaps`)
            for pos in 0..4 {
                if let Some(m) = &self.maps[q2[pos]].back {
                    let ncart = n_cartesian(self.l[q2[pos]]);
                    transform_axis(gam, &dims, pos, m, ncart, gc);
                    dims[pos] = ncart;
                    std::mem::swap(gam, gc);
                }
            }
            let mut vals = [[0.0; 3]; 4];
            quartet_gradient(&input, bra, ket, gam, &mut vals);
            for (gi, &pos) in targets.iter().enumerate() {
                for k in 0..3 {
                    let v = vals[gi][k] * scale;
                    g[3 * at[pos] + k] += v;
                    g[3 * at[rest] + k] -= v;
                }
            }
        });
        true
    }

    /// The two-electron part of an energy gradient, ½ Σ_μνλσ ∂(μν|λσ)/∂R_A Γ_μνλσ with
    /// Γ_μνλσ = J_μν J_λσ − Σ_s c_s ½ (X^s_μλ X^s_νσ + X^s_μσ X^s_νλ), for every atom A
    /// (n_atoms × 3). RHF: J = P, one exchange term (½, P); UHF/ROHF: J = P^α + P^β,
    /// exchange terms (1, P^α) and (1, P^β). Quartets with Schwarz bound × max|Γ| below
    /// `threshold` are skipped. Bra pairs run in parallel; their contributions are added in
    /// pair order (the result does not depend on the thread count).
    pub fn contract(
        &self,
        basis: &BasisSet,
        n_atoms: usize,
        coulomb: &Mat<f64>,
        exchange: &[(f64, &Mat<f64>)],
        threshold: f64,
    ) -> Vec<[f64; 3]> {
        let n = self.n;
        let off = &basis.offsets;
        let pmax = |m: &Mat<f64>| -> Vec<f64> {
            let mut v = vec![0.0; n * n];
            for a in 0..n {
                for b in 0..n {
                    let mut x: f64 = 0.0;
                    for i in 0..self.nf[a] {
                        for j in 0..self.nf[b] {
                            x = x.max(m[(off[a] + i, off[b] + j)].abs());
                        }
                    }
                    v[a * n + b] = x;
                }
            }
            v
        };
        let jmax = pmax(coulomb);
        let xmax: Vec<(f64, Vec<f64>)> = exchange.iter().map(|(c, m)| (*c, pmax(m))).collect();
        let pairs: Vec<(usize, usize)> =
            (0..n).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
        let parts: Vec<Vec<f64>> = pairs
            .par_iter()
            .enumerate()
            .map(|(iab, &(a, b))| {
                let mut g = vec![0.0; 3 * n_atoms];
                let mut out: [Vec<f64>; 3] = Default::default();
                let (mut buf, mut tmp, mut gam) = (Vec::new(), Vec::new(), Vec::new());
                let qab = self.schwarz(a, b);
                for &(c, d) in &pairs[..=iab] {
                    let atoms = [self.atom[a], self.atom[b], self.atom[c], self.atom[d]];
                    if atoms.iter().all(|&x| x == atoms[0]) {
                        continue;
                    }
                    let mut dm = jmax[a * n + b] * jmax[c * n + d];
                    for (cs, xm) in &xmax {
                        dm += cs.abs()
                            * 0.5
                            * (xm[a * n + c] * xm[b * n + d] + xm[a * n + d] * xm[b * n + c]);
                    }
                    if qab * self.schwarz(c, d) * dm < threshold {
                        continue;
                    }
                    let deg = if a != b { 2.0 } else { 1.0 }
                        * if c != d { 2.0 } else { 1.0 }
                        * if iab != pairs_index(c, d) { 2.0 } else { 1.0 };
                    let scale = 0.5 * deg;
                    if self.one_pass_quartet([a, b, c, d], off, coulomb, exchange, scale, &mut g) {
                        continue;
                    }
                    let q = [a, b, c, d];
                    gamma_block(q, q.map(|x| self.nf[x]), off, coulomb, exchange, &mut gam);
                    // the atom occurring most often takes minus the sum of the others
                    let count = |x: usize| atoms.iter().filter(|&&y| y == x).count();
                    let skip = (0..4)
                        .rev()
                        .max_by_key(|&p| count(atoms[p]))
                        .map(|p| atoms[p])
                        .unwrap();
                    for pos in 0..4 {
                        if atoms[pos] == skip {
                            continue;
                        }
                        self.centre_derivative(q, pos, &mut out, &mut buf, &mut tmp);
                        for k in 0..3 {
                            let v: f64 =
                                out[k].iter().zip(&gam).map(|(x, y)| x * y).sum::<f64>() * scale;
                            g[3 * atoms[pos] + k] += v;
                            g[3 * skip + k] -= v;
                        }
                    }
                }
                g
            })
            .collect();
        let mut g = vec![[0.0; 3]; n_atoms];
        for p in &parts {
            for (a, ga) in g.iter_mut().enumerate() {
                for k in 0..3 {
                    ga[k] += p[3 * a + k];
                }
            }
        }
        g
    }
}

thread_local! {
    /// Γ of the quartet in hand and a work array for its transforms (per thread).
    static GROUPS: std::cell::RefCell<(Vec<f64>, Vec<f64>)> =
        std::cell::RefCell::new((Vec::new(), Vec::new()));
}

/// Index of the pair (a ≥ b) in the list (0,0), (1,0), (1,1), (2,0), …
#[inline]
fn pairs_index(a: usize, b: usize) -> usize {
    a * (a + 1) / 2 + b
}

/// Γ over one shell quartet (see [`EriDerivative::contract`]), layout of the quartet.
fn gamma_block(
    q: [usize; 4],
    dims: [usize; 4],
    off: &[usize],
    coulomb: &Mat<f64>,
    exchange: &[(f64, &Mat<f64>)],
    out: &mut Vec<f64>,
) {
    let [na, nb, nc, nd] = dims;
    let (oa, ob, oc, od) = (off[q[0]], off[q[1]], off[q[2]], off[q[3]]);
    out.clear();
    out.resize(na * nb * nc * nd, 0.0);
    let mut idx = 0;
    for i in 0..na {
        let mu = oa + i;
        for j in 0..nb {
            let nu = ob + j;
            let jmn = coulomb[(mu, nu)];
            for k in 0..nc {
                let la = oc + k;
                for l in 0..nd {
                    let si = od + l;
                    let mut v = jmn * coulomb[(la, si)];
                    for (c, x) in exchange {
                        v -= 0.5 * c * (x[(mu, la)] * x[(nu, si)] + x[(mu, si)] * x[(nu, la)]);
                    }
                    out[idx] = v;
                    idx += 1;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{basis_with, central_difference, random_symmetric};
    use super::*;
    use crate::integrals::eri_tensor;

    /// ½ Σ (μν|λσ) Γ_μνλσ from the full tensor.
    fn energy(basis: &BasisSet, j: &Mat<f64>, x: &[(f64, &Mat<f64>)]) -> f64 {
        let n = basis.n_basis;
        let g = eri_tensor(basis);
        let mut e = 0.0;
        for m in 0..n {
            for v in 0..n {
                for l in 0..n {
                    for s in 0..n {
                        let mut gam = j[(m, v)] * j[(l, s)];
                        for (c, d) in x {
                            gam -= 0.5 * c * (d[(m, l)] * d[(v, s)] + d[(m, s)] * d[(v, l)]);
                        }
                        e += 0.5 * g[((m * n + v) * n + l) * n + s] * gam;
                    }
                }
            }
        }
        e
    }

    /// Exact condition: the analytic two-electron gradient equals the limit of the central
    /// difference of ½ Σ (μν|λσ) Γ; shells s to g on three centres, pure and Cartesian, a
    /// Coulomb and two exchange densities (the UHF form).
    #[test]
    fn two_electron_derivatives_match_finite_differences() {
        for pure in [true, false] {
            let centres = [[0.0, 0.1, -0.2], [1.3, -0.4, 0.5], [-0.6, 1.1, 0.9]];
            let ls: [&[usize]; 3] = [&[0, 1, 4], &[2, 3], &[0, 2]];
            let mk = |c: &[[f64; 3]]| basis_with(c, pure, &ls);
            let basis = mk(&centres);
            let n = basis.n_basis;
            let pa = random_symmetric(n, 3);
            let pb = random_symmetric(n, 5);
            let j = &pa + &pb;
            let x = [(1.0, &pa), (1.0, &pb)];
            let d = EriDerivative::new(&basis);
            let g = d.contract(&basis, 3, &j, &x, 0.0);
            let mut sum = [0.0; 3];
            for atom in 0..3 {
                for k in 0..3 {
                    sum[k] += g[atom][k];
                    let f = central_difference(&centres, atom, k, |c| energy(&mk(c), &j, &x));
                    assert!(
                        (g[atom][k] - f).abs() < 1e-6 * (1.0 + f.abs()),
                        "pure={pure} atom {atom} dir {k}: analytic {} vs difference {f}",
                        g[atom][k]
                    );
                }
            }
            // translational invariance (exact condition)
            for s in sum {
                assert!(s.abs() < 1e-9, "sum of components {s}");
            }
            // the one-pass and the per-centre derivatives agree (two routes to the same
            // integrals; regression)
            let per = EriDerivative::new(&basis)
                .per_centre_only()
                .contract(&basis, 3, &j, &x, 0.0);
            for atom in 0..3 {
                for k in 0..3 {
                    assert!(
                        (g[atom][k] - per[atom][k]).abs() < 1e-11,
                        "pure={pure} atom {atom} dir {k}: one pass {} vs per centre {}",
                        g[atom][k],
                        per[atom][k]
                    );
                }
            }
        }
    }
}
