//! MO integral blocks for the correlated methods, assembled from three-index factors.
//!
//! Every (pq|rs) the correlated methods read comes from factors B^Q_pq with
//! (pq|rs) ≈ Σ_Q B^Q_pq B^Q_rs. The factors come from a pivoted Cholesky decomposition of
//! the AO two-electron matrix (cholesky.rs; Beebe & Linderberg, Int. J. Quantum Chem. 12
//! (1977) 683; Koch, Sánchez de Merás & Pedersen, J. Chem. Phys. 118 (2003) 9481), whose
//! threshold bounds the error of every integral, so a tight threshold reproduces the exact
//! integrals. Blocks with at most two virtual indices are stored; the (ov|vv) block is
//! stored when the memory plan allows and otherwise rebuilt in slices over its occupied
//! index; the (vv|vv) block is never stored for large virtual spaces — the
//! particle–particle ladder is contracted batch-wise directly from the factors.
//!
//! Index letters: i,j,k,l active occupied; a,b,c,d virtual. All integrals chemists' notation.

use bandcast_linalg::{gemm, par_for, MatMut, MatRef};

use super::tensor::{gemm_rm, Tensor};

/// Three-index factors in the active MO basis, each stored `[Q][p][q]`.
#[derive(Debug, Clone)]
pub struct MoFactors {
    pub naux: usize,
    pub nocc: usize,
    pub nvir: usize,
    pub b_oo: Vec<f64>,
    pub b_ov: Vec<f64>,
    pub b_vv: Vec<f64>,
}

/// Fock matrix and integral blocks over the active orbitals.
#[derive(Debug, Clone)]
pub struct MoIntegrals {
    pub nocc: usize,
    pub nvir: usize,
    /// Fock blocks (canonical RHF: diagonal, fov = 0; kept general for tests).
    pub foo: Tensor,
    pub fov: Tensor,
    pub fvv: Tensor,
    /// (ij|kl) as [i,j,k,l]
    pub oooo: Tensor,
    /// (ia|jk) as [i,a,j,k]
    pub ovoo: Tensor,
    /// (ia|jb) as [i,a,j,b]
    pub ovov: Tensor,
    /// (ij|ab) as [i,j,a,b]
    pub oovv: Tensor,
    /// 2(ia|jb) − (ib|ja) as [i,a,j,b]
    pub lovov: Tensor,
    /// (ia|bc) as [i,a,b,c] when stored.
    pub ovvv: Option<Tensor>,
    /// (ac|bd) as [a,b,c,d] (ladder order) when stored (small virtual spaces only).
    pub vvvv: Option<Tensor>,
    /// (vv|vv) packed with all its symmetry when stored (`PackedVvvv`).
    pub vvvv_packed: Option<PackedVvvv>,
    pub factors: MoFactors,
}

/// (pq|rs) block = B_pqᵀ B_rs as a row-major [pq][rs] array.
fn assemble(naux: usize, left: &[f64], npq: usize, right: &[f64], nrs: usize) -> Vec<f64> {
    let mut out = vec![0.0; npq * nrs];
    if naux == 0 || npq == 0 || nrs == 0 {
        return out;
    }
    let l = MatRef::from_row_major_slice(left, naux, npq);
    let r = MatRef::from_row_major_slice(right, naux, nrs);
    let c = MatMut::from_row_major_slice_mut(&mut out, npq, nrs);
    gemm(c, false, l, true, r, false, 1.0, par_for(npq.max(nrs)));
    out
}

impl MoFactors {
    /// (kc|ab) for occupied k in k0..k1, as [k,c,a,b].
    pub fn ovvv_slice(&self, k0: usize, k1: usize) -> Tensor {
        let (o, v, naux) = (self.nocc, self.nvir, self.naux);
        let nk = k1 - k0;
        let mut left = vec![0.0; naux * nk * v];
        for q in 0..naux {
            let src = &self.b_ov[q * o * v + k0 * v..q * o * v + k1 * v];
            left[q * nk * v..(q + 1) * nk * v].copy_from_slice(src);
        }
        Tensor {
            shape: vec![nk, v, v, v],
            data: assemble(naux, &left, nk * v, &self.b_vv, v * v),
        }
    }

    /// (ab|cd) as [a,b,c,d] (only for small virtual spaces).
    pub fn vvvv(&self) -> Tensor {
        let v = self.nvir;
        Tensor {
            shape: vec![v, v, v, v],
            data: assemble(self.naux, &self.b_vv, v * v, &self.b_vv, v * v),
        }
    }

    /// Full (pq|rs) over all active orbitals (occupied first), for tests on tiny cases.
    pub fn full_mo(&self) -> Tensor {
        let (o, v, naux) = (self.nocc, self.nvir, self.naux);
        let n = o + v;
        let mut b = vec![0.0; naux * n * n];
        for q in 0..naux {
            for p in 0..n {
                for r in 0..n {
                    b[q * n * n + p * n + r] = self.get(q, p, r);
                }
            }
        }
        Tensor {
            shape: vec![n, n, n, n],
            data: assemble(naux, &b, n * n, &b, n * n),
        }
    }

    /// B^Q_pq with p,q over occupied-then-virtual indices.
    pub fn get(&self, q: usize, p: usize, r: usize) -> f64 {
        let (o, v) = (self.nocc, self.nvir);
        match (p < o, r < o) {
            (true, true) => self.b_oo[q * o * o + p * o + r],
            (true, false) => self.b_ov[q * o * v + p * v + (r - o)],
            (false, true) => self.b_ov[q * o * v + r * v + (p - o)],
            (false, false) => self.b_vv[q * v * v + (p - o) * v + (r - o)],
        }
    }

    /// Particle–particle ladder Σ_cd (ac|bd) X_ij^cd, for X with X_ij^cd = X_ji^dc, from
    /// the factors in batches of `a` (never storing (vv|vv)). The result has the same
    /// symmetry, so only b ≤ a is computed and mirrored.
    pub fn ladder_direct(&self, x: &Tensor) -> Tensor {
        let (v, naux) = (self.nvir, self.naux);
        let mut xcbd = vec![0.0; v * v * v];
        ladder_rows(self.nocc, v, x, &mut |a, xt| {
            let nb = a + 1;
            // X[c][b d] = Σ_Q B^Q_ac B^Q_bd
            {
                let ba = MatRef::from_column_major_slice_with_stride(
                    &self.b_vv[a * v..],
                    v,
                    naux,
                    v * v,
                );
                let bvv = MatRef::from_row_major_slice_with_stride(&self.b_vv, naux, nb * v, v * v);
                let c = MatMut::from_row_major_slice_mut(&mut xcbd[..v * nb * v], v, nb * v);
                gemm(c, false, ba, false, bvv, false, 1.0, par_for(v * nb));
            }
            // to [b][c d]
            for c in 0..v {
                for b in 0..nb {
                    let src = &xcbd[c * nb * v + b * v..c * nb * v + (b + 1) * v];
                    xt[b * v * v + c * v..b * v * v + (c + 1) * v].copy_from_slice(src);
                }
            }
        })
    }
}

/// The ladder loop shared by the direct and packed variants: `row(a, xt)` fills
/// xt[b][c][d] = (ac|bd) for b ≤ a; the result R_ij^ab = Σ_cd (ac|bd) X_ij^cd is formed
/// for b ≤ a and mirrored (R_ji^ba = R_ij^ab).
fn ladder_rows(o: usize, v: usize, x: &Tensor, row: &mut dyn FnMut(usize, &mut [f64])) -> Tensor {
    {
        let mut out = Tensor::zeros(&[o, o, v, v]);
        let oo = o * o;
        let mut xt = vec![0.0; v * v * v];
        let mut ra = vec![0.0; oo * v];
        for a in 0..v {
            let nb = a + 1;
            row(a, &mut xt[..nb * v * v]);
            // R[ij][b] = Σ_cd X_ij^cd Y[b][cd]
            {
                let xm = MatRef::from_row_major_slice(&x.data, oo, v * v);
                let ym = MatRef::from_row_major_slice(&xt[..nb * v * v], nb, v * v);
                let c = MatMut::from_row_major_slice_mut(&mut ra[..oo * nb], oo, nb);
                gemm(c, false, xm, false, ym, true, 1.0, par_for(oo.max(nb)));
            }
            for i in 0..o {
                for j in 0..o {
                    let ij = i * o + j;
                    for b in 0..nb {
                        let val = ra[ij * nb + b];
                        out.data[((i * o + j) * v + a) * v + b] += val;
                        if b != a {
                            out.data[((j * o + i) * v + b) * v + a] += val;
                        }
                    }
                }
            }
        }
        out
    }
}

/// (ac|bd) stored once with its 8-fold symmetry: rows and columns are packed pairs
/// p = pk(a,c) (a ≥ c), and only the triangle G[p][q], p ≥ q, is kept — v⁴/8 words
/// instead of v⁴ (benzene/def2-TZVPP, 249 virtuals: 3.9 GB instead of 31 GB).
#[derive(Debug, Clone)]
pub struct PackedVvvv {
    pub nvir: usize,
    pub data: Vec<f64>,
}

#[inline]
fn pk(a: usize, c: usize) -> usize {
    if a >= c {
        a * (a + 1) / 2 + c
    } else {
        c * (c + 1) / 2 + a
    }
}

impl PackedVvvv {
    /// Words needed for `v` virtuals.
    pub fn words(v: usize) -> f64 {
        let p = (v * (v + 1) / 2) as f64;
        p * (p + 1.0) / 2.0
    }

    pub fn build(f: &MoFactors) -> Self {
        use rayon::prelude::*;
        let (v, naux) = (f.nvir, f.naux);
        let np = v * (v + 1) / 2;
        // B_p[Q][pk(a,c)]
        let mut bp = vec![0.0; naux * np];
        for q in 0..naux {
            for a in 0..v {
                for c in 0..=a {
                    bp[q * np + pk(a, c)] = f.b_vv[q * v * v + a * v + c];
                }
            }
        }
        let mut data = vec![0.0; np * (np + 1) / 2];
        let block = 256usize;
        let mut r0 = 0;
        while r0 < np {
            let r1 = (r0 + block).min(np);
            let nr = r1 - r0;
            // G[r0..r1][0..r1] = B_pᵀ[rows] B_p[cols]
            let mut g = vec![0.0; nr * r1];
            let left = MatRef::from_row_major_slice_with_stride(&bp[r0..], naux, nr, np);
            let right = MatRef::from_row_major_slice_with_stride(&bp, naux, r1, np);
            gemm(
                MatMut::from_row_major_slice_mut(&mut g, nr, r1),
                false,
                left,
                true,
                right,
                false,
                1.0,
                par_for(r1),
            );
            let start = r0 * (r0 + 1) / 2;
            let end = r1 * (r1 + 1) / 2;
            let dst = &mut data[start..end];
            // rows r0..r1 of the triangle are contiguous: row p holds q = 0..=p
            let mut chunks: Vec<&mut [f64]> = Vec::with_capacity(nr);
            let mut rest = dst;
            for p in r0..r1 {
                let (h, t) = rest.split_at_mut(p + 1);
                chunks.push(h);
                rest = t;
            }
            chunks.into_par_iter().enumerate().for_each(|(k, row)| {
                row.copy_from_slice(&g[k * r1..k * r1 + r0 + k + 1]);
            });
            r0 = r1;
        }
        PackedVvvv { nvir: v, data }
    }

    #[inline]
    pub fn get(&self, a: usize, c: usize, b: usize, d: usize) -> f64 {
        let (p, q) = (pk(a, c), pk(b, d));
        let (hi, lo) = if p >= q { (p, q) } else { (q, p) };
        self.data[hi * (hi + 1) / 2 + lo]
    }

    /// Σ_cd (ac|bd) X_ij^cd from the packed block.
    pub fn ladder(&self, o: usize, x: &Tensor) -> Tensor {
        use rayon::prelude::*;
        let v = self.nvir;
        ladder_rows(o, v, x, &mut |a, xt| {
            xt.par_chunks_mut(v * v).enumerate().for_each(|(b, blk)| {
                for c in 0..v {
                    let p = pk(a, c);
                    for d in 0..v {
                        let q = pk(b, d);
                        let (hi, lo) = if p >= q { (p, q) } else { (q, p) };
                        blk[c * v + d] = self.data[hi * (hi + 1) / 2 + lo];
                    }
                }
            });
        })
    }
}

impl MoIntegrals {
    /// Assemble the stored blocks. `fock` is the active-space Fock matrix (occupied first).
    pub fn new(factors: MoFactors, fock: &Tensor, store_ovvv: bool, store_vvvv: bool) -> Self {
        let (o, v, naux) = (factors.nocc, factors.nvir, factors.naux);
        let n = o + v;
        assert_eq!(fock.shape, vec![n, n]);
        let foo = Tensor::from_fn(&[o, o], |x| fock.get(&[x[0], x[1]]));
        let fov = Tensor::from_fn(&[o, v], |x| fock.get(&[x[0], o + x[1]]));
        let fvv = Tensor::from_fn(&[v, v], |x| fock.get(&[o + x[0], o + x[1]]));
        let f = &factors;
        let oooo = Tensor {
            shape: vec![o, o, o, o],
            data: assemble(naux, &f.b_oo, o * o, &f.b_oo, o * o),
        };
        let ovoo = Tensor {
            shape: vec![o, v, o, o],
            data: assemble(naux, &f.b_ov, o * v, &f.b_oo, o * o),
        };
        let ovov = Tensor {
            shape: vec![o, v, o, v],
            data: assemble(naux, &f.b_ov, o * v, &f.b_ov, o * v),
        };
        let oovv = Tensor {
            shape: vec![o, o, v, v],
            data: assemble(naux, &f.b_oo, o * o, &f.b_vv, v * v),
        };
        let mut lovov = ovov.permute(&[0, 3, 2, 1]);
        lovov.scale(-1.0);
        lovov.axpy(2.0, &ovov);
        let ovvv = store_ovvv.then(|| factors.ovvv_slice(0, o));
        let vvvv = store_vvvv.then(|| factors.vvvv().permute(&[0, 2, 1, 3]));
        let vvvv_packed = None;
        MoIntegrals {
            nocc: o,
            nvir: v,
            foo,
            fov,
            fvv,
            oooo,
            ovoo,
            ovov,
            oovv,
            lovov,
            ovvv,
            vvvv,
            vvvv_packed,
            factors,
        }
    }

    /// Occupied-index batches of (kc|ab): (k0, slice [k,c,a,b]).
    /// `batch` = 0 picks a batch size keeping each slice near 64 M words.
    pub fn ovvv_batches(&self, batch: usize) -> Vec<(usize, usize)> {
        let o = self.nocc;
        let v = self.nvir.max(1);
        let b = if batch == 0 {
            ((1usize << 26) / (v * v * v)).clamp(1, o.max(1))
        } else {
            batch
        };
        (0..o.div_ceil(b))
            .map(|k| (k * b, ((k + 1) * b).min(o)))
            .collect()
    }

    pub fn ovvv_slice(&self, k0: usize, k1: usize) -> std::borrow::Cow<'_, Tensor> {
        match &self.ovvv {
            Some(t) if k0 == 0 && k1 == self.nocc => std::borrow::Cow::Borrowed(t),
            Some(t) => {
                let inner = self.nvir.pow(3);
                std::borrow::Cow::Owned(Tensor {
                    shape: vec![k1 - k0, self.nvir, self.nvir, self.nvir],
                    data: t.data[k0 * inner..k1 * inner].to_vec(),
                })
            }
            None => std::borrow::Cow::Owned(self.factors.ovvv_slice(k0, k1)),
        }
    }

    /// Σ_cd (ac|bd) X_ij^cd for X with the pair symmetry X_ij^cd = X_ji^dc.
    pub fn ladder(&self, x: &Tensor) -> Tensor {
        match &self.vvvv {
            Some(vv) => {
                let (o, v) = (self.nocc, self.nvir);
                let w = vv;
                let mut out = Tensor::zeros(&[o, o, v, v]);
                gemm_rm(
                    &mut out.data,
                    false,
                    &x.data,
                    &w.data,
                    o * o,
                    v * v,
                    v * v,
                    1.0,
                );
                // out[ij][ab] = Σ_cd X[ij][cd] W[cd][ab] needs W transposed: (ab|cd)-pair
                // symmetry makes W symmetric, so W = Wᵀ.
                out
            }
            None => match &self.vvvv_packed {
                Some(p) => p.ladder(self.nocc, x),
                None => self.factors.ladder_direct(x),
            },
        }
    }

    /// Diagonal orbital energies (occupied, virtual) from the Fock diagonal.
    pub fn eps(&self) -> (Vec<f64>, Vec<f64>) {
        let eo = (0..self.nocc).map(|i| self.foo.get(&[i, i])).collect();
        let ev = (0..self.nvir).map(|a| self.fvv.get(&[a, a])).collect();
        (eo, ev)
    }
}

#[cfg(test)]
pub(crate) mod toy {
    //! Random but physically shaped toy integrals: factors B^Q_pq symmetric in p,q give
    //! (pq|rs) with the full 8-fold permutational symmetry of real orbitals.
    use super::*;

    /// Small deterministic pseudo-random generator (tests only).
    pub struct Lcg(pub u64);
    impl Lcg {
        pub fn next(&mut self) -> f64 {
            self.0 = self
                .0
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((self.0 >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        }
    }

    /// Toy factors and a Fock matrix with well separated occupied/virtual diagonals;
    /// `offdiag` scales non-diagonal Fock elements (0 gives canonical orbitals).
    pub fn toy_system(
        o: usize,
        v: usize,
        naux: usize,
        seed: u64,
        offdiag: f64,
    ) -> (MoFactors, Tensor) {
        let n = o + v;
        let mut rng = Lcg(seed);
        let mut full = vec![0.0; naux * n * n];
        for q in 0..naux {
            for p in 0..n {
                for r in 0..=p {
                    let x = 0.3 * rng.next() / (1.0 + q as f64 * 0.3);
                    full[q * n * n + p * n + r] = x;
                    full[q * n * n + r * n + p] = x;
                }
            }
        }
        let mut b_oo = vec![0.0; naux * o * o];
        let mut b_ov = vec![0.0; naux * o * v];
        let mut b_vv = vec![0.0; naux * v * v];
        for q in 0..naux {
            for p in 0..n {
                for r in 0..n {
                    let x = full[q * n * n + p * n + r];
                    match (p < o, r < o) {
                        (true, true) => b_oo[q * o * o + p * o + r] = x,
                        (true, false) => b_ov[q * o * v + p * v + r - o] = x,
                        (false, false) => b_vv[q * v * v + (p - o) * v + r - o] = x,
                        _ => {}
                    }
                }
            }
        }
        let mut fock = Tensor::zeros(&[n, n]);
        for p in 0..n {
            for r in 0..=p {
                let x = offdiag * 0.05 * rng.next();
                fock.data[p * n + r] = x;
                fock.data[r * n + p] = x;
            }
            fock.data[p * n + p] = if p < o {
                -1.2 + 0.25 * p as f64 + 0.05 * rng.next()
            } else {
                0.4 + 0.3 * (p - o) as f64 + 0.05 * rng.next()
            };
        }
        (
            MoFactors {
                naux,
                nocc: o,
                nvir: v,
                b_oo,
                b_ov,
                b_vv,
            },
            fock,
        )
    }

    #[test]
    fn direct_ladder_matches_stored() {
        let (f, fock) = toy_system(3, 5, 7, 11, 1.0);
        let ints_s = MoIntegrals::new(f.clone(), &fock, true, true);
        let ints_d = MoIntegrals::new(f, &fock, false, false);
        let (o, v) = (3, 5);
        let mut rng = Lcg(5);
        let mut x = Tensor::zeros(&[o, o, v, v]);
        for i in 0..o {
            for j in 0..o {
                for a in 0..v {
                    for b in 0..v {
                        let val = rng.next();
                        x.data[((i * o + j) * v + a) * v + b] += val;
                        x.data[((j * o + i) * v + b) * v + a] += val;
                    }
                }
            }
        }
        let a = ints_s.ladder(&x);
        let b = ints_d.ladder(&x);
        let mut ints_p = ints_d.clone();
        ints_p.vvvv_packed = Some(PackedVvvv::build(&ints_p.factors));
        let c = ints_p.ladder(&x);
        for k in 0..c.len() {
            assert!((c.data[k] - a.data[k]).abs() < 1e-12);
        }
        let vv = &ints_s.factors.vvvv();
        for i in 0..o {
            for j in 0..o {
                for aa in 0..v {
                    for bb in 0..v {
                        let mut s = 0.0;
                        for c in 0..v {
                            for d in 0..v {
                                s += vv.get(&[aa, c, bb, d]) * x.get(&[i, j, c, d]);
                            }
                        }
                        assert!((a.get(&[i, j, aa, bb]) - s).abs() < 1e-12);
                        assert!((b.get(&[i, j, aa, bb]) - s).abs() < 1e-12);
                    }
                }
            }
        }
        let s1 = ints_d.ovvv_slice(1, 3);
        let s0 = ints_s.ovvv.as_ref().unwrap();
        assert!((s1.get(&[1, 2, 3, 4]) - s0.get(&[2, 2, 3, 4])).abs() < 1e-14);
    }
}
