//! The spin-blocked reference of the open-shell coupled-cluster code: Fock and
//! antisymmetrized integral blocks ⟨pq||rs⟩ of each spin case, and the particle–particle
//! ladder Σ_ef τ_ij^ef ⟨ab||ef⟩ from the three-index factors.
//!
//! Orbitals, frozen core, excluded virtuals and the ROHF semicanonical rotation come from
//! reference.rs (`prepare`), so they mean exactly what they mean for the spin-orbital code.
//! Within each spin the active occupied orbitals come first, then the kept virtuals.
//!
//! The ladder. With τ antisymmetric in e,f, ½ Σ_ef τ_ij^ef ⟨ab||ef⟩ = Σ_{e∈σa, f∈σb}
//! τ_ij^ef (ae|bf) for every spin block (the exchange half repeats the Coulomb half), so only
//! the (ae|bf) of the spin pairs αα, ββ and αβ are needed, and the blocks βα of a,b follow
//! from antisymmetry. They are either held (when the budget allows) or rebuilt every
//! iteration from the factors in batches of a: (ae|bf) = Σ_Q B^Q_ae B^Q_bf for a in the
//! batch, then one matrix product with τ. The v⁴ blocks are then never stored.
//!
//! The held store (`LadderStore`): the αβ block as (ae|bf), v_α² v_β² words; each same-spin
//! block as ⟨ab||ef⟩ = (ae|bf) − (af|be) over the pairs a<b, e<f only, (v(v−1)/2)² words,
//! since ½ Σ_ef τ_ij^ef ⟨ab||ef⟩ = Σ_{e<f} τ_ij^ef ⟨ab||ef⟩ and the result is antisymmetric
//! in a,b. A quarter of the words and of the multiply-adds of the full same-spin blocks:
//! benzene/def2-TZVPP with 155 virtuals per spin holds 6.9 GB instead of 13.8 GB (23 GB with the
//! old build temporaries). The store
//! is filled batch by batch of a, with no v⁴ temporary.
//!
//! Memory (f64 words; o_σ, v_σ active occupied / virtual orbitals per spin, N_Q factors):
//! factors N_Q Σ_σ (o_σ+v_σ)²; blocks oooo, ooov, oovv, ovov, ovvv of the spin cases
//! (`block_words`); the ladder store (`ladder_words`) or one batch.

use bandcast_linalg::{MatMut, MatRef};
use rayon::prelude::*;

use super::reference::{prepare, Prepared, Selection};
use super::spin_blocks::{conserving, spin, Blocked};
use crate::basis::BasisSet;
use crate::correlation::tensor::{gemm_rm, par_gemm, Tensor};
use crate::correlation::two_electron::Resolved;
use crate::scf::Wavefunction;
use crate::{Error, Result};

/// Per-spin three-index factors over the active orbitals [occupied, virtual].
pub struct ActiveFactors {
    pub naux: usize,
    /// Active orbitals per spin (o_σ + v_σ).
    pub m: [usize; 2],
    pub o: [usize; 2],
    /// [Q][p][r] per spin.
    pub b: [Vec<f64>; 2],
}

impl ActiveFactors {
    /// [Q][p][r] for p, r in the given ranges of spin s.
    fn slab(&self, s: usize, p: (usize, usize), r: (usize, usize)) -> Vec<f64> {
        let m = self.m[s];
        let (np, nr) = (p.1 - p.0, r.1 - r.0);
        let mut out = vec![0.0; self.naux * np * nr];
        if np * nr == 0 {
            return out;
        }
        out.par_chunks_mut(np * nr).enumerate().for_each(|(q, o)| {
            let bq = &self.b[s][q * m * m..];
            for a in 0..np {
                o[a * nr..(a + 1) * nr]
                    .copy_from_slice(&bq[(p.0 + a) * m + r.0..(p.0 + a) * m + r.1]);
            }
        });
        out
    }

    fn range(&self, s: usize, vir: bool) -> (usize, usize) {
        if vir {
            (self.o[s], self.m[s])
        } else {
            (0, self.o[s])
        }
    }

    /// (pr|qs) as [p,r,q,s]: p, r of spin s1 in spaces x1; q, s of spin s2 in spaces x2.
    fn chem(&self, s1: usize, x1: [bool; 2], s2: usize, x2: [bool; 2]) -> Tensor {
        let (p, r) = (self.range(s1, x1[0]), self.range(s1, x1[1]));
        let (q, s) = (self.range(s2, x2[0]), self.range(s2, x2[1]));
        let shape = vec![p.1 - p.0, r.1 - r.0, q.1 - q.0, s.1 - s.0];
        let (mm, nn) = (shape[0] * shape[1], shape[2] * shape[3]);
        let mut out = vec![0.0; mm * nn];
        if mm > 0 && nn > 0 && self.naux > 0 {
            let left = self.slab(s1, p, r);
            let right = self.slab(s2, q, s);
            let l = MatRef::from_row_major_slice(&left, self.naux, mm);
            let rr = MatRef::from_row_major_slice(&right, self.naux, nn);
            let c = MatMut::from_row_major_slice_mut(&mut out, mm, nn);
            par_gemm(c, false, l.transpose(), rr, 1.0);
        }
        Tensor { shape, data: out }
    }

    /// ⟨pq||rs⟩ = (pr|qs) δ(σp,σr) δ(σq,σs) − (ps|qr) δ(σp,σs) δ(σq,σr), every
    /// spin-conserving block, for p, q, r, s in the spaces x (true = virtual).
    fn antisym(&self, x: [bool; 4]) -> Blocked {
        let dims: Vec<[usize; 2]> = x
            .iter()
            .map(|&v| {
                let r = [self.range(0, v), self.range(1, v)];
                [r[0].1 - r[0].0, r[1].1 - r[1].0]
            })
            .collect();
        let mut out = Blocked::empty(&dims);
        for mask in 0..16 {
            if !conserving(mask, 4) {
                continue;
            }
            let s: Vec<usize> = (0..4).map(|k| spin(mask, k)).collect();
            let mut blk = Tensor::zeros(&out.block_shape(mask));
            if s[0] == s[2] && s[1] == s[3] {
                let g = self.chem(s[0], [x[0], x[2]], s[1], [x[1], x[3]]);
                blk.axpy(1.0, &g.permute(&[0, 2, 1, 3]));
            }
            if s[0] == s[3] && s[1] == s[2] {
                let g = self.chem(s[0], [x[0], x[3]], s[1], [x[1], x[2]]);
                blk.axpy(-1.0, &g.permute(&[0, 2, 3, 1]));
            }
            out.blocks[mask] = Some(blk);
        }
        out
    }
}

/// Fock and integral blocks over the active spin orbitals, per spin case.
pub struct SpinBlockedSystem {
    /// Active occupied and virtual orbitals per spin.
    pub o: [usize; 2],
    pub v: [usize; 2],
    pub foo: Blocked,
    pub fov: Blocked,
    pub fvv: Blocked,
    /// Diagonals of foo and fvv per spin (the denominators).
    pub fo: [Vec<f64>; 2],
    pub fv: [Vec<f64>; 2],
    pub oooo: Blocked,
    pub ooov: Blocked,
    pub oovv: Blocked,
    pub ovov: Blocked,
    pub ovvv: Blocked,
    pub factors: ActiveFactors,
    /// The ladder integrals, when held.
    pub ladder_store: Option<LadderStore>,
    pub semicanonical: bool,
    pub e_determinant_electronic: Option<f64>,
}

/// Words of the integral blocks of every spin case.
pub fn block_words(o: [usize; 2], v: [usize; 2]) -> f64 {
    // Σ over spin-conserving masks of the product of the per-index sizes
    let words = |x: [bool; 4]| -> f64 {
        (0..16usize)
            .filter(|&m| conserving(m, 4))
            .map(|m| {
                (0..4)
                    .map(|k| {
                        let s = spin(m, k);
                        (if x[k] { v[s] } else { o[s] }) as f64
                    })
                    .product::<f64>()
            })
            .sum()
    };
    let (f, t) = (false, true);
    words([f, f, f, f]) + words([f, f, f, t]) + 2.0 * words([f, f, t, t]) + words([f, t, t, t])
}

/// The held ladder integrals (module text): `same[s]` is ⟨ab||ef⟩ of spin s as
/// [pair(e,f), pair(a,b)] over e<f, a<b (`pair`); `mixed` is (ae|bf), a, e α and b, f β,
/// as [e f, a b].
pub struct LadderStore {
    pub same: [Vec<f64>; 2],
    pub mixed: Vec<f64>,
}

/// Number of pairs a<b of v orbitals.
pub fn pairs(v: usize) -> usize {
    v * v.saturating_sub(1) / 2
}

/// The pair (a, b), a<b, of index k (inverse of `pair`).
fn unpair(k: usize, v: usize) -> (usize, usize) {
    let mut a = 0;
    let mut start = 0;
    while start + (v - a - 1) <= k {
        start += v - a - 1;
        a += 1;
    }
    (a, a + 1 + (k - start))
}

/// Index of the pair a<b among the pairs of v orbitals (row-major over a, then b).
#[inline]
pub fn pair(a: usize, b: usize, v: usize) -> usize {
    debug_assert!(a < b && b < v);
    a * (2 * v - a - 1) / 2 + (b - a - 1)
}

/// Words of the held ladder integrals.
pub fn ladder_words(v: [usize; 2]) -> f64 {
    let (a, b) = (v[0] as f64, v[1] as f64);
    (pairs(v[0]) as f64).powi(2) + (pairs(v[1]) as f64).powi(2) + a * a * b * b
}

/// Words of one batch of (ae|bf) while the store is filled or the ladder rebuilt.
pub fn ladder_batch_words(v: [usize; 2]) -> f64 {
    let v3 = v[0].max(v[1]).pow(3);
    (batch_rows(v[0].max(v[1]), v3) * v3) as f64
}

/// Words of integrals per batch (at least one row of a). The unit tests use a tiny cap so
/// that the batch loops run more than once on their small molecules.
#[cfg(not(test))]
const BATCH_WORDS: usize = 1 << 25;
#[cfg(test)]
const BATCH_WORDS: usize = 64;

/// Rows of a per batch: at most max(v³, `BATCH_WORDS`) words of integrals at once.
fn batch_rows(va: usize, ef_vb: usize) -> usize {
    (BATCH_WORDS / ef_vb.max(1)).clamp(1, va.max(1))
}

/// Build the spin-blocked system. `hold_ladder` keeps the (ae|bf) blocks in memory.
#[allow(clippy::too_many_arguments)]
pub fn build(
    basis: &BasisSet,
    h_ao: &bandcast_linalg::Mat<f64>,
    wfn: &Wavefunction,
    sel: &Selection,
    how: &Resolved,
    max_cholesky_vectors: usize,
    hold_ladder: bool,
    log: &mut dyn FnMut(&str),
) -> Result<(SpinBlockedSystem, String)> {
    let p = prepare(basis, h_ao, wfn, sel, how, max_cholesky_vectors, log)?;
    build_prepared(p, sel, hold_ladder)
}

/// The spin-blocked system from prepared factors and Fock matrices (after any change to
/// the orbital spaces, such as the natural-virtual cut).
pub(super) fn build_prepared(
    p: Prepared,
    sel: &Selection,
    hold_ladder: bool,
) -> Result<(SpinBlockedSystem, String)> {
    let naux = p.fac[0].naux;
    let mut o = [0; 2];
    let mut v = [0; 2];
    let mut m = [0; 2];
    let mut b = [Vec::new(), Vec::new()];
    for s in 0..2 {
        let f = &p.fac[s];
        let nf = sel.n_frozen[s];
        o[s] = f.nocc - nf;
        v[s] = f.m - f.nocc;
        m[s] = o[s] + v[s];
        let (ms, fm) = (m[s], f.m);
        let mut bs = vec![0.0; naux * ms * ms];
        bs.par_chunks_mut(ms * ms.max(1))
            .enumerate()
            .for_each(|(q, bq)| {
                for r in 0..ms {
                    let src = (q * fm + nf + r) * fm + nf;
                    bq[r * ms..(r + 1) * ms].copy_from_slice(&f.b[src..src + ms]);
                }
            });
        b[s] = bs;
    }
    if o[0] + o[1] == 0 || v[0] + v[1] == 0 {
        return Err(Error::input(
            "coupled cluster needs at least one correlated occupied and one virtual orbital",
        ));
    }
    let fock = |s: usize, r: usize, c: usize| {
        let fm = p.fac[s].m;
        p.fock[s][r * fm + c]
    };
    let nf = sel.n_frozen;
    let nocc = [p.fac[0].nocc, p.fac[1].nocc];
    let foo = Blocked::from_fn(&[o, o], |mk, x| {
        let s = spin(mk, 0);
        fock(s, nf[s] + x[0], nf[s] + x[1])
    });
    let fov = Blocked::from_fn(&[o, v], |mk, x| {
        let s = spin(mk, 0);
        fock(s, nf[s] + x[0], nocc[s] + x[1])
    });
    let fvv = Blocked::from_fn(&[v, v], |mk, x| {
        let s = spin(mk, 0);
        fock(s, nocc[s] + x[0], nocc[s] + x[1])
    });
    let fo = [0, 1].map(|s| (0..o[s]).map(|i| fock(s, nf[s] + i, nf[s] + i)).collect());
    let fv = [0, 1].map(|s| {
        (0..v[s])
            .map(|a| fock(s, nocc[s] + a, nocc[s] + a))
            .collect()
    });
    let (e_det, rohf, note) = (p.e_det, p.rohf, p.note);
    drop(p.fac);
    let factors = ActiveFactors { naux, m, o, b };
    let (f, t) = (false, true);
    let mut sys = SpinBlockedSystem {
        o,
        v,
        foo,
        fov,
        fvv,
        fo,
        fv,
        oooo: factors.antisym([f, f, f, f]),
        ooov: factors.antisym([f, f, f, t]),
        oovv: factors.antisym([f, f, t, t]),
        ovov: factors.antisym([f, t, f, t]),
        ovvv: factors.antisym([f, t, t, t]),
        factors,
        ladder_store: None,
        semicanonical: rohf,
        e_determinant_electronic: e_det,
    };
    if hold_ladder {
        sys.ladder_store = Some(LadderStore {
            same: [sys.same_spin_store(0), sys.same_spin_store(1)],
            mixed: sys.mixed_store(),
        });
    }
    Ok((sys, note))
}

/// The spin pairs of the ladder store and their 4-index masks (ij spins = ab spins = ef).
const PAIRS: [(usize, usize, usize); 3] = [(0, 0, 0b0000), (1, 1, 0b1111), (0, 1, 0b1010)];

impl SpinBlockedSystem {
    /// (ae|bf) as [a, e, b, f] for a in a0..a1 of spin sa and every e of spin sa, b, f of
    /// spin sb; `right` is the factor slab B^Q_bf of spin sb.
    fn ladder_raw(&self, sa: usize, sb: usize, a0: usize, a1: usize, right: &[f64]) -> Vec<f64> {
        let f = &self.factors;
        let oa = f.o[sa];
        let (va, vb) = (self.v[sa], self.v[sb]);
        let left = f.slab(sa, (oa + a0, oa + a1), (oa, oa + va));
        let (mm, nn) = ((a1 - a0) * va, vb * vb);
        let mut out = vec![0.0; mm * nn];
        if mm > 0 && nn > 0 && f.naux > 0 {
            let l = MatRef::from_row_major_slice(&left, f.naux, mm);
            let r = MatRef::from_row_major_slice(right, f.naux, nn);
            let c = MatMut::from_row_major_slice_mut(&mut out, mm, nn);
            par_gemm(c, false, l.transpose(), r, 1.0);
        }
        out
    }

    /// The factor slab B^Q_bf over the virtuals of spin s.
    fn virtual_slab(&self, s: usize) -> Vec<f64> {
        let o = self.factors.o[s];
        self.factors.slab(s, (o, o + self.v[s]), (o, o + self.v[s]))
    }

    /// (ae|bf) as [e,f,a,b] for a in a0..a1 of spin sa and every b of spin sb.
    fn ladder_batch(&self, sa: usize, sb: usize, a0: usize, a1: usize, right: &[f64]) -> Tensor {
        let (va, vb) = (self.v[sa], self.v[sb]);
        Tensor {
            shape: vec![a1 - a0, va, vb, vb],
            data: self.ladder_raw(sa, sb, a0, a1, right),
        }
        .permute(&[1, 3, 0, 2])
    }

    /// ⟨ab||ef⟩ of spin s over the pairs e<f (rows) and a<b (columns), filled batch by batch
    /// of a.
    fn same_spin_store(&self, s: usize) -> Vec<f64> {
        let v = self.v[s];
        let np = pairs(v);
        let mut store = vec![0.0; np * np];
        if np == 0 {
            return store;
        }
        let right = self.virtual_slab(s);
        let nb = batch_rows(v, v * v * v);
        let mut a0 = 0;
        while a0 < v {
            let a1 = (a0 + nb).min(v);
            let x = self.ladder_raw(s, s, a0, a1, &right);
            // x[(a − a0), e, b, f] = (ae|bf)
            let at =
                |a: usize, e: usize, b: usize, f: usize| x[(((a - a0) * v + e) * v + b) * v + f];
            store.par_chunks_mut(np).enumerate().for_each(|(ef, row)| {
                let (e, f) = unpair(ef, v);
                for a in a0..a1 {
                    for b in a + 1..v {
                        row[pair(a, b, v)] = at(a, e, b, f) - at(a, f, b, e);
                    }
                }
            });
            a0 = a1;
        }
        store
    }

    /// (ae|bf) with a, e α and b, f β as [e f, a b], filled batch by batch of a.
    fn mixed_store(&self) -> Vec<f64> {
        let (va, vb) = (self.v[0], self.v[1]);
        let n = va * vb;
        let mut store = vec![0.0; n * n];
        if n == 0 {
            return store;
        }
        let right = self.virtual_slab(1);
        let nb = batch_rows(va, va * vb * vb);
        let mut a0 = 0;
        while a0 < va {
            let a1 = (a0 + nb).min(va);
            let x = self.ladder_raw(0, 1, a0, a1, &right);
            store.par_chunks_mut(n).enumerate().for_each(|(ef, row)| {
                let (e, f) = (ef / vb, ef % vb);
                for a in a0..a1 {
                    for b in 0..vb {
                        row[a * vb + b] = x[(((a - a0) * va + e) * vb + b) * vb + f];
                    }
                }
            });
            a0 = a1;
        }
        store
    }

    /// R_ij^ab = Σ_{e<f} τ_ij^ef ⟨ab||ef⟩ for one same-spin block from the packed store.
    fn same_spin_ladder(t: &Tensor, store: &[f64], v: usize) -> Tensor {
        let no2 = t.shape[0] * t.shape[1];
        let np = pairs(v);
        let mut r = Tensor::zeros(&[t.shape[0], t.shape[1], v, v]);
        if no2 == 0 || np == 0 {
            return r;
        }
        let mut tp = vec![0.0; no2 * np];
        tp.par_chunks_mut(np).enumerate().for_each(|(ij, row)| {
            let src = &t.data[ij * v * v..(ij + 1) * v * v];
            for e in 0..v {
                for f in e + 1..v {
                    row[pair(e, f, v)] = src[e * v + f];
                }
            }
        });
        let mut rp = vec![0.0; no2 * np];
        gemm_rm(&mut rp, false, &tp, store, no2, np, np, 1.0);
        r.data
            .par_chunks_mut(v * v)
            .zip(rp.par_chunks(np))
            .for_each(|(dst, src)| {
                for a in 0..v {
                    for b in a + 1..v {
                        let x = src[pair(a, b, v)];
                        dst[a * v + b] = x;
                        dst[b * v + a] = -x;
                    }
                }
            });
        r
    }

    /// Σ_ef τ_ij^ef ⟨ab||ef⟩ / 2 for every spin block (see the module text).
    pub fn ladder(&self, tau: &Blocked) -> Blocked {
        let mut out = Blocked::empty(&tau.dims);
        for &(sa, sb, mask) in PAIRS.iter() {
            let t = tau.block(mask).expect("τ block");
            let (no2, va, vb) = (t.shape[0] * t.shape[1], self.v[sa], self.v[sb]);
            let mut r = Tensor::zeros(&[t.shape[0], t.shape[1], va, vb]);
            if no2 > 0 && va > 0 && vb > 0 {
                let ef = va * vb;
                match &self.ladder_store {
                    Some(st) if sa == sb => r = Self::same_spin_ladder(t, &st.same[sa], va),
                    Some(st) => gemm_rm(
                        &mut r.data,
                        false,
                        &t.data,
                        &st.mixed,
                        no2,
                        ef,
                        va * vb,
                        1.0,
                    ),
                    None => {
                        // batches of a: at most max(v³, 2^25) words of integrals at once
                        let nb = batch_rows(va, ef * vb);
                        let right = self.virtual_slab(sb);
                        let mut buf = vec![0.0; no2 * nb * vb];
                        let mut a0 = 0;
                        while a0 < va {
                            let a1 = (a0 + nb).min(va);
                            let g = self.ladder_batch(sa, sb, a0, a1, &right);
                            let w = (a1 - a0) * vb;
                            gemm_rm(
                                &mut buf[..no2 * w],
                                false,
                                &t.data,
                                &g.data,
                                no2,
                                ef,
                                w,
                                1.0,
                            );
                            for ij in 0..no2 {
                                r.data[ij * va * vb + a0 * vb..ij * va * vb + a1 * vb]
                                    .copy_from_slice(&buf[ij * w..(ij + 1) * w]);
                            }
                            a0 = a1;
                        }
                    }
                }
            }
            out.blocks[mask] = Some(r);
        }
        // βα blocks from antisymmetry of the αβ one
        out.restore_mixed_images();
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `pair` numbers the pairs a<b consecutively from 0 and `unpair` inverts it.
    #[test]
    fn pair_indices_are_consecutive_and_invertible() {
        for v in [2usize, 3, 7] {
            let mut k = 0;
            for a in 0..v {
                for b in a + 1..v {
                    assert_eq!(pair(a, b, v), k);
                    assert_eq!(unpair(k, v), (a, b));
                    k += 1;
                }
            }
            assert_eq!(k, pairs(v));
        }
    }
}
