//! MO integral blocks for the correlated methods, assembled from three-index factors.
//!
//! Every (pq|rs) the correlated methods read comes from factors B^Q_pq with
//! (pq|rs) ≈ Σ_Q B^Q_pq B^Q_rs. The factors come from a pivoted Cholesky decomposition of
//! the AO two-electron matrix (cholesky.rs; Beebe & Linderberg, Int. J. Quantum Chem. 12
//! (1977) 683; Koch, Sánchez de Merás & Pedersen, J. Chem. Phys. 118 (2003) 9481), whose
//! threshold bounds the error of every integral, so a tight threshold reproduces the exact
//! integrals. Blocks with at most two virtual indices are stored; the (ov|vv) block is
//! stored when the memory plan allows and otherwise rebuilt in slices over its occupied
//! index; the particle–particle ladder uses (vv|vv) in the symmetric/antisymmetric form of
//! ladder.rs, stored when the memory plan allows and otherwise generated from the factors.
//!
//! Index letters: i,j,k,l active occupied; a,b,c,d virtual. All integrals chemists' notation.

use bandcast_linalg::{MatMut, MatRef};

use super::ladder::{ladder_direct, LadderIntegrals};
use super::tensor::{par_gemm, Tensor};

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
    /// (vv|vv) as the ladder's V⁺/V⁻ blocks when stored (ladder.rs).
    pub vvvv: Option<LadderIntegrals>,
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
    par_gemm(c, false, l.transpose(), r, 1.0);
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

    /// (ab|cd) as [a,b,c,d] (tests on tiny cases).
    #[cfg(test)]
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
        let vvvv = store_vvvv.then(|| LadderIntegrals::build(&factors));
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
            factors,
        }
    }

    /// Occupied-index batches of (kc|ab): (k0, slice [k,c,a,b]).
    /// `batch` = 0 picks a batch size keeping each slice within `memory::OVVV_SLICE_WORDS`.
    pub fn ovvv_batches(&self, batch: usize) -> Vec<(usize, usize)> {
        let o = self.nocc;
        let v = self.nvir.max(1);
        let b = if batch == 0 {
            (super::memory::OVVV_SLICE_WORDS / (v * v * v)).clamp(1, o.max(1))
        } else {
            batch
        };
        (0..o.div_ceil(b))
            .map(|k| (k * b, ((k + 1) * b).min(o)))
            .collect()
    }

    /// Call `f(k0, k1, s)` for every occupied batch with s = (kc|ab) as [k,c,a,b] for k in
    /// k0..k1: borrowed from the stored block, or rebuilt from the factors.
    pub fn for_each_ovvv_slice(&self, f: &mut dyn FnMut(usize, usize, &[f64])) {
        let inner = self.nvir.pow(3);
        for (k0, k1) in self.ovvv_batches(0) {
            match &self.ovvv {
                Some(t) => f(k0, k1, &t.data[k0 * inner..k1 * inner]),
                None => f(k0, k1, &self.factors.ovvv_slice(k0, k1).data),
            }
        }
    }

    /// Σ_cd (ac|bd) X_ij^cd for X with the pair symmetry X_ij^cd = X_ji^dc.
    pub fn ladder(&self, x: &Tensor) -> Tensor {
        match &self.vvvv {
            Some(l) => l.ladder(x),
            None => ladder_direct(&self.factors, x),
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

    /// Stored and rebuilt (ov|vv) slices agree, and the stored/direct ladders agree.
    #[test]
    fn stored_and_rebuilt_blocks_agree() {
        let (f, fock) = toy_system(3, 5, 7, 11, 1.0);
        let ints_s = MoIntegrals::new(f.clone(), &fock, true, true);
        let ints_d = MoIntegrals::new(f, &fock, false, false);
        let mut stored = Vec::new();
        ints_s.for_each_ovvv_slice(&mut |_, _, s| stored.extend_from_slice(s));
        let mut rebuilt = Vec::new();
        ints_d.for_each_ovvv_slice(&mut |_, _, s| rebuilt.extend_from_slice(s));
        assert_eq!(stored.len(), 3 * 125);
        for (a, b) in stored.iter().zip(&rebuilt) {
            assert!((a - b).abs() < 1e-14);
        }
        // (kc|ab) = Σ_Q B^Q_kc B^Q_ab
        let f = &ints_s.factors;
        let want: f64 = (0..7)
            .map(|q| f.get(q, 2, 3 + 1) * f.get(q, 3 + 3, 3 + 4))
            .sum();
        assert!((stored[((2 * 5 + 1) * 5 + 3) * 5 + 4] - want).abs() < 1e-14);
        let x = Tensor::from_fn(&[3, 3, 5, 5], |i| {
            let (a, b) = (i[0] * 5 + i[2], i[1] * 5 + i[3]);
            ((a * 7 + b * 3) % 11) as f64 * 0.1 + ((b * 7 + a * 3) % 11) as f64 * 0.1
        });
        let (l1, l2) = (ints_s.ladder(&x), ints_d.ladder(&x));
        for k in 0..l1.len() {
            assert!((l1.data[k] - l2.data[k]).abs() < 1e-12);
        }
    }
}
