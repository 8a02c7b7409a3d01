//! Two-electron integrals over molecular orbitals, (pq|rs) in chemists' notation, for chosen
//! ranges of MO coefficients, computed directly from AO shell quartets.
//!
//! (pq|rs) = Σ_μνλσ C1_μp C2_νq C3_λr C4_σs (μν|λσ)
//!
//! The AO integrals are produced one ket shell pair (CD), C ≥ D, at a time, for all bra shell
//! pairs A ≥ B (four-fold permutational symmetry (μν|λσ) = (νμ|λσ) = (μν|σλ) is used; the
//! bra–ket swap is not, so each unique AO integral is computed twice). For every ket function
//! pair the bra is transformed at once (Y_λσ = C1ᵀ X_λσ C2), then the third index is
//! accumulated into a three-quarter array H[pq][σ][r] = Σ_λ C3_λr Y_λσ[pq], and the last index
//! is transformed at the end, (pq|rs) = Σ_σ H[pq][σ][r] C4_σs. Memory is therefore the result
//! plus n1·n2·n3·n_ao doubles, never the full four-index AO or MO array. Before running, the
//! index pairs are swapped (bra ↔ ket, r ↔ s) to make that intermediate as small as possible;
//! the result is always returned in the caller's index order.
//!
//! Several blocks can share one pass over the AO integrals ([`mo_eri_blocks`]); callers that
//! must refuse jobs that do not fit ask [`estimate_bytes`] first.
//!
//! Determinism: the AO integrals of a chunk of ket pairs are computed in parallel, but every
//! accumulation into H runs over the ket pairs in a fixed order (threads split the pq rows),
//! so the result does not depend on the number of threads.

use bandcast_linalg::{gemm, Mat, MatMut, MatRef, Par};
use rayon::prelude::*;

use crate::basis::BasisSet;
use crate::error::{Error, Result};

/// Where AO shell quartets come from: the integral engine, or a dense tensor in tests.
pub trait AoQuartets: Sync {
    /// Fill `out` with (ab|cd) for shells a, b, c, d: out[((i*nb + j)*nc + k)*nd + l].
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>);
    /// Per shell pair Schwarz bound sqrt(max |(ab|ab)|), n_shell × n_shell, if known.
    fn pair_bounds(&self) -> Option<&[f64]>;
}

impl AoQuartets for crate::integrals::EriEngine {
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        self.shell_quartet(a, b, c, d, out);
    }
    fn pair_bounds(&self) -> Option<&[f64]> {
        Some(self.schwarz())
    }
}

/// Quartets whose Schwarz bound lies below this are skipped (hartree).
pub const SCREEN_THRESHOLD: f64 = 1e-12;

/// Ket shell pairs whose bra transforms are computed together before they are accumulated.
const KET_CHUNK: usize = 32;

/// One requested block: four AO × MO coefficient matrices (same AO dimension).
#[derive(Clone, Copy)]
pub struct BlockSpec<'a> {
    pub c1: MatRef<'a, f64>,
    pub c2: MatRef<'a, f64>,
    pub c3: MatRef<'a, f64>,
    pub c4: MatRef<'a, f64>,
}

impl<'a> BlockSpec<'a> {
    pub fn new(c1: &'a Mat<f64>, c2: &'a Mat<f64>, c3: &'a Mat<f64>, c4: &'a Mat<f64>) -> Self {
        BlockSpec {
            c1: c1.as_ref(),
            c2: c2.as_ref(),
            c3: c3.as_ref(),
            c4: c4.as_ref(),
        }
    }
    fn dims(&self) -> [usize; 4] {
        [
            self.c1.ncols(),
            self.c2.ncols(),
            self.c3.ncols(),
            self.c4.ncols(),
        ]
    }
}

/// How a block is computed internally: which caller index sits in which internal slot.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Plan {
    /// perm[k] = caller index (0..4) placed in internal slot k.
    perm: [usize; 4],
}

impl Plan {
    /// Choose bra/ket and r/s order minimising the three-quarter array n1·n2·n3·n.
    fn choose(d: [usize; 4]) -> Plan {
        let candidates = [[0, 1, 2, 3], [0, 1, 3, 2], [2, 3, 0, 1], [2, 3, 1, 0]];
        let cost = |p: &[usize; 4]| {
            let mem = d[p[0]] * d[p[1]] * d[p[2]];
            // tie-break: smaller bra product, then caller order
            (mem, d[p[0]] * d[p[1]])
        };
        let mut best = candidates[0];
        for c in &candidates[1..] {
            if cost(c) < cost(&best) {
                best = *c;
            }
        }
        Plan { perm: best }
    }
    fn internal_dims(&self, d: [usize; 4]) -> [usize; 4] {
        [
            d[self.perm[0]],
            d[self.perm[1]],
            d[self.perm[2]],
            d[self.perm[3]],
        ]
    }
}

/// Largest number of functions in any shell of the basis.
pub fn max_shell_functions(basis: &BasisSet) -> usize {
    basis
        .shells
        .iter()
        .map(|s| s.n_functions())
        .max()
        .unwrap_or(1)
}

/// Bytes the transformation of blocks with these MO dimensions ([n1, n2, n3, n4] each) needs
/// at its peak over a basis of `n_ao` functions with at most `max_shell` functions per shell,
/// on `threads` worker threads: results, three-quarter arrays, per-thread AO scratch.
pub fn estimate_bytes_for(
    n_ao: usize,
    max_shell: usize,
    blocks: &[[usize; 4]],
    threads: usize,
) -> usize {
    let ncd = max_shell * max_shell;
    let mut doubles = 0usize;
    let mut chunk = 0usize;
    let mut final_scratch = 0usize;
    for &d in blocks {
        let id = Plan::choose(d).internal_dims(d);
        let n12 = id[0] * id[1];
        doubles += d.iter().product::<usize>(); // result
        doubles += n12 * id[2] * n_ao; // three-quarter array
        chunk += KET_CHUNK * ncd * n12; // bra transforms of one chunk
        final_scratch = final_scratch.max(id[2] * id[3]);
    }
    // per-thread AO block, one bra half transform, final product
    let per_thread = n_ao * n_ao * ncd + n_ao * n_ao + final_scratch + 4096;
    (doubles + chunk + per_thread * threads.max(1)) * std::mem::size_of::<f64>()
}

/// [`estimate_bytes_for`] for a basis set and coefficient blocks, on the current rayon pool.
pub fn estimate_bytes(basis: &BasisSet, blocks: &[BlockSpec<'_>]) -> usize {
    let dims: Vec<[usize; 4]> = blocks.iter().map(|b| b.dims()).collect();
    estimate_bytes_for(
        basis.n_basis,
        max_shell_functions(basis),
        &dims,
        rayon::current_num_threads(),
    )
}

/// Refuse with [`Error::TooLarge`] when the estimate exceeds `budget_bytes`.
pub fn check_budget(basis: &BasisSet, blocks: &[BlockSpec<'_>], budget_bytes: usize) -> Result<()> {
    let need = estimate_bytes(basis, blocks);
    if need > budget_bytes {
        return Err(Error::TooLarge(format!(
            "the MO integral transformation needs about {} but the memory budget is {} \
             (raise the budget, choose fewer orbitals, or a smaller basis set)",
            crate::system::format_bytes(need as f64),
            crate::system::format_bytes(budget_bytes as f64)
        )));
    }
    Ok(())
}

/// (pq|rs) for p, q, r, s running over the columns of c1, c2, c3, c4 (AO × MO each), in the
/// layout out[((p*n2 + q)*n3 + r)*n4 + s].
pub fn mo_eri_block<E: AoQuartets + ?Sized>(
    engine: &E,
    basis: &BasisSet,
    c1: &Mat<f64>,
    c2: &Mat<f64>,
    c3: &Mat<f64>,
    c4: &Mat<f64>,
) -> Vec<f64> {
    mo_eri_blocks(engine, basis, &[BlockSpec::new(c1, c2, c3, c4)])
        .pop()
        .expect("one block requested")
}

/// Internal state of one block during the pass.
struct Work<'a> {
    plan: Plan,
    dims: [usize; 4],
    c1: MatRef<'a, f64>,
    c2: MatRef<'a, f64>,
    /// C3 stored row-wise: c3rows[λ*n3 + r].
    c3rows: Vec<f64>,
    c4: MatRef<'a, f64>,
    /// H[pq][σ][r], pq = p*n2 + q.
    h: Vec<f64>,
}

/// Several MO blocks from one pass over the AO integrals; results in request order, each in
/// the layout of [`mo_eri_block`].
pub fn mo_eri_blocks<E: AoQuartets + ?Sized>(
    engine: &E,
    basis: &BasisSet,
    blocks: &[BlockSpec<'_>],
) -> Vec<Vec<f64>> {
    let n = basis.n_basis;
    let nsh = basis.shells.len();
    for b in blocks {
        for c in [b.c1, b.c2, b.c3, b.c4] {
            assert_eq!(c.nrows(), n, "MO coefficients must have one row per AO");
        }
    }
    let mut work: Vec<Work<'_>> = blocks
        .iter()
        .map(|b| {
            let d = b.dims();
            let plan = Plan::choose(d);
            let cs = [b.c1, b.c2, b.c3, b.c4];
            let id = plan.internal_dims(d);
            let c3 = cs[plan.perm[2]];
            let mut c3rows = vec![0.0; n * id[2]];
            for lam in 0..n {
                for r in 0..id[2] {
                    c3rows[lam * id[2] + r] = c3[(lam, r)];
                }
            }
            Work {
                plan,
                dims: id,
                c1: cs[plan.perm[0]],
                c2: cs[plan.perm[1]],
                c3rows,
                c4: cs[plan.perm[3]],
                h: vec![0.0; id[0] * id[1] * n * id[2]],
            }
        })
        .collect();
    let active: Vec<bool> = work.iter().map(|w| w.dims.iter().all(|&x| x > 0)).collect();

    // Ket shell pairs C ≥ D that survive screening, in a fixed order.
    let bounds = engine.pair_bounds();
    let max_bound = bounds
        .map(|q| q.iter().cloned().fold(0.0f64, f64::max))
        .unwrap_or(f64::INFINITY);
    let mut kets = Vec::new();
    for c in 0..nsh {
        for d in 0..=c {
            let keep = match bounds {
                Some(q) => q[c * nsh + d] * max_bound >= SCREEN_THRESHOLD,
                None => true,
            };
            if keep {
                kets.push((c, d));
            }
        }
    }

    if active.iter().any(|&a| a) {
        for chunk in kets.chunks(KET_CHUNK) {
            // Bra transforms of every ket pair in the chunk, in parallel.
            let ys: Vec<Vec<Vec<f64>>> = chunk
                .par_iter()
                .map(|&(c, d)| ket_pair_bra_transforms(engine, basis, bounds, c, d, &work, &active))
                .collect();
            // Accumulate the third index, ket pairs in order, threads over pq rows.
            for (w_idx, w) in work.iter_mut().enumerate() {
                if !active[w_idx] {
                    continue;
                }
                accumulate_third_index(basis, chunk, &ys, w_idx, w);
            }
        }
    }

    work.iter()
        .zip(blocks)
        .enumerate()
        .map(|(i, (w, b))| {
            if !active[i] {
                return vec![0.0; b.dims().iter().product()];
            }
            finish_block(w, n, b.dims())
        })
        .collect()
}

/// All AO integrals (μν|λσ) for one ket shell pair (C, D) and every bra, transformed over the
/// bra for each block: returns per block Y[kl][pq] with kl = l*nc + k (σ-major), pq = p*n2+q.
fn ket_pair_bra_transforms<E: AoQuartets + ?Sized>(
    engine: &E,
    basis: &BasisSet,
    bounds: Option<&[f64]>,
    c: usize,
    d: usize,
    work: &[Work<'_>],
    active: &[bool],
) -> Vec<Vec<f64>> {
    let n = basis.n_basis;
    let nsh = basis.shells.len();
    let nc = basis.shells[c].n_functions();
    let nd = basis.shells[d].n_functions();
    let ncd = nc * nd;
    // X[kl][ν][μ]: column-major n × n matrix per ket function pair.
    let mut x = vec![0.0; ncd * n * n];
    let mut buf = Vec::new();
    let qcd = bounds.map(|q| q[c * nsh + d]).unwrap_or(1.0);
    for a in 0..nsh {
        let na = basis.shells[a].n_functions();
        let oa = basis.offsets[a];
        for b in 0..=a {
            if let Some(q) = bounds {
                if q[a * nsh + b] * qcd < SCREEN_THRESHOLD {
                    continue;
                }
            }
            let nb = basis.shells[b].n_functions();
            let ob = basis.offsets[b];
            buf.clear();
            buf.resize(na * nb * ncd, 0.0);
            engine.quartet(a, b, c, d, &mut buf);
            for i in 0..na {
                for j in 0..nb {
                    let base = (i * nb + j) * ncd;
                    let (mu, nu) = (oa + i, ob + j);
                    for k in 0..nc {
                        for l in 0..nd {
                            let v = buf[base + k * nd + l];
                            let kl = l * nc + k;
                            x[(kl * n + nu) * n + mu] = v;
                            x[(kl * n + mu) * n + nu] = v;
                        }
                    }
                }
            }
        }
    }
    // Blocks that share their first factor (X·C1 when n1 ≤ n2, C2ᵀ·X otherwise; EP2's two
    // blocks share C1 = the targets) compute it once per ket function pair.
    let firsts: Vec<Option<(bool, MatRef<'_, f64>)>> = work
        .iter()
        .enumerate()
        .map(|(i, w)| {
            active[i].then(|| {
                if w.dims[0] <= w.dims[1] {
                    (true, w.c1)
                } else {
                    (false, w.c2)
                }
            })
        })
        .collect();
    let mut group_of = vec![usize::MAX; work.len()];
    let mut groups: Vec<(bool, MatRef<'_, f64>)> = Vec::new();
    for (i, f) in firsts.iter().enumerate() {
        if let Some((right, m)) = *f {
            let found = groups.iter().position(|(r, g)| {
                *r == right
                    && g.as_ptr() == m.as_ptr()
                    && g.ncols() == m.ncols()
                    && g.col_stride() == m.col_stride()
            });
            group_of[i] = match found {
                Some(k) => k,
                None => {
                    groups.push((right, m));
                    groups.len() - 1
                }
            };
        }
    }
    let mut scratch: Vec<Mat<f64>> = groups
        .iter()
        .map(|(right, m)| {
            if *right {
                Mat::<f64>::zeros(n, m.ncols())
            } else {
                Mat::<f64>::zeros(m.ncols(), n)
            }
        })
        .collect();
    let mut ys: Vec<Vec<f64>> = work
        .iter()
        .enumerate()
        .map(|(i, w)| {
            if active[i] {
                vec![0.0; ncd * w.dims[0] * w.dims[1]]
            } else {
                Vec::new()
            }
        })
        .collect();
    for kl in 0..ncd {
        let xk = MatRef::from_column_major_slice(&x[kl * n * n..(kl + 1) * n * n], n, n);
        for (g, (right, m)) in groups.iter().enumerate() {
            if *right {
                gemm(
                    scratch[g].as_mut(),
                    false,
                    xk,
                    false,
                    *m,
                    false,
                    1.0,
                    Par::Seq,
                );
            } else {
                gemm(
                    scratch[g].as_mut(),
                    false,
                    *m,
                    true,
                    xk,
                    false,
                    1.0,
                    Par::Seq,
                );
            }
        }
        for (w_idx, w) in work.iter().enumerate() {
            if !active[w_idx] {
                continue;
            }
            let [n1, n2, _, _] = w.dims;
            let n12 = n1 * n2;
            // Y (n2 × n1, column-major, so element (q, p) sits at p*n2 + q) = C2ᵀ X C1
            let yk = MatMut::from_column_major_slice_mut(
                &mut ys[w_idx][kl * n12..(kl + 1) * n12],
                n2,
                n1,
            );
            let sc = scratch[group_of[w_idx]].as_ref();
            if groups[group_of[w_idx]].0 {
                gemm(yk, false, w.c2, true, sc, false, 1.0, Par::Seq);
            } else {
                gemm(yk, false, sc, false, w.c1, false, 1.0, Par::Seq);
            }
        }
    }
    ys
}

/// H[pq][σ][r] += Σ_λ C3_λr Y_λσ[pq] over the ket pairs of one chunk, in order.
fn accumulate_third_index(
    basis: &BasisSet,
    chunk: &[(usize, usize)],
    ys: &[Vec<Vec<f64>>],
    w_idx: usize,
    w: &mut Work<'_>,
) {
    let n = basis.n_basis;
    let [n1, n2, n3, _] = w.dims;
    let n12 = n1 * n2;
    let row = n * n3;
    let c3rows = &w.c3rows;
    let rows_per_task = (n12 / (4 * rayon::current_num_threads().max(1))).max(1);
    w.h.par_chunks_mut(row * rows_per_task)
        .enumerate()
        .for_each(|(task, hrows)| {
            let pq0 = task * rows_per_task;
            for (ket_idx, &(c, d)) in chunk.iter().enumerate() {
                let y = &ys[ket_idx][w_idx];
                let nc = basis.shells[c].n_functions();
                let nd = basis.shells[d].n_functions();
                let (oc, od) = (basis.offsets[c], basis.offsets[d]);
                for (local, hrow) in hrows.chunks_mut(row).enumerate() {
                    let pq = pq0 + local;
                    for l in 0..nd {
                        for k in 0..nc {
                            let v = y[(l * nc + k) * n12 + pq];
                            if v == 0.0 {
                                continue;
                            }
                            let (lam, sig) = (oc + k, od + l);
                            // (μν|λσ): H[pq][σ][r] += C3_λr v
                            axpy(
                                &mut hrow[sig * n3..(sig + 1) * n3],
                                v,
                                &c3rows[lam * n3..(lam + 1) * n3],
                            );
                            if c != d {
                                // mirrored ket (μν|σλ): H[pq][λ][r] += C3_σr v
                                axpy(
                                    &mut hrow[lam * n3..(lam + 1) * n3],
                                    v,
                                    &c3rows[sig * n3..(sig + 1) * n3],
                                );
                            }
                        }
                    }
                }
            }
        });
}

#[inline]
fn axpy(y: &mut [f64], a: f64, x: &[f64]) {
    for (yi, xi) in y.iter_mut().zip(x) {
        *yi += a * xi;
    }
}

/// Last index: (pq|rs) = Σ_σ H[pq][σ][r] C4_σs, then back to the caller's index order.
fn finish_block(w: &Work<'_>, n: usize, caller_dims: [usize; 4]) -> Vec<f64> {
    let [n1, n2, n3, n4] = w.dims;
    let n12 = n1 * n2;
    let row = n * n3;
    let mut internal = vec![0.0; n12 * n3 * n4];
    internal
        .par_chunks_mut(n3 * n4)
        .zip(w.h.par_chunks(row))
        .for_each(|(out, h)| {
            // h as column-major n3 × n (element (r, σ) at σ*n3 + r); out (n4 × n3 column-major,
            // element (s, r) at r*n4 + s) = C4ᵀ hᵀ
            let hm = MatRef::from_column_major_slice(h, n3, n);
            let om = MatMut::from_column_major_slice_mut(out, n4, n3);
            gemm(om, false, w.c4, true, hm, true, 1.0, Par::Seq);
        });
    if w.plan.perm == [0, 1, 2, 3] {
        return internal;
    }
    // Scatter back to caller order.
    let d = caller_dims;
    let perm = w.plan.perm;
    let mut out = vec![0.0; internal.len()];
    let mut idx = [0usize; 4];
    let mut pos = 0;
    for i0 in 0..n1 {
        idx[perm[0]] = i0;
        for i1 in 0..n2 {
            idx[perm[1]] = i1;
            for i2 in 0..n3 {
                idx[perm[2]] = i2;
                for i3 in 0..n4 {
                    idx[perm[3]] = i3;
                    let o = ((idx[0] * d[1] + idx[1]) * d[2] + idx[2]) * d[3] + idx[3];
                    out[o] = internal[pos];
                    pos += 1;
                }
            }
        }
    }
    out
}

/// A dense AO tensor served as shell quartets (tests and very small systems).
pub struct DenseAoEri<'a> {
    pub basis: &'a BasisSet,
    /// (μν|λσ) at ((μ*n + ν)*n + λ)*n + σ.
    pub tensor: &'a [f64],
}

impl AoQuartets for DenseAoEri<'_> {
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        let n = self.basis.n_basis;
        let sh = &self.basis.shells;
        let o = &self.basis.offsets;
        let (na, nb, nc, nd) = (
            sh[a].n_functions(),
            sh[b].n_functions(),
            sh[c].n_functions(),
            sh[d].n_functions(),
        );
        out.clear();
        out.reserve(na * nb * nc * nd);
        for i in 0..na {
            for j in 0..nb {
                for k in 0..nc {
                    for l in 0..nd {
                        let (p, q, r, s) = (o[a] + i, o[b] + j, o[c] + k, o[d] + l);
                        out.push(self.tensor[((p * n + q) * n + r) * n + s]);
                    }
                }
            }
        }
    }
    fn pair_bounds(&self) -> Option<&[f64]> {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;

    fn toy_basis() -> BasisSet {
        let mk = |l: usize, atom: usize| Shell {
            l,
            pure: true,
            center: [0.0, 0.0, atom as f64],
            atom,
            exponents: vec![1.0],
            coefficients: vec![1.0],
        };
        BasisSet::from_shells(
            "toy",
            vec![mk(0, 0), mk(1, 0), mk(0, 1), mk(2, 1), mk(0, 2)],
        )
    }

    /// Deterministic pseudo-random numbers in [-0.5, 0.5).
    fn lcg(seed: &mut u64) -> f64 {
        *seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((*seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
    }

    /// An eight-fold symmetric toy tensor Σ_k A_k(μν) A_k(λσ) with symmetric A_k.
    fn toy_tensor(n: usize) -> Vec<f64> {
        let mut seed = 7u64;
        let nk = 4;
        let mut a = vec![0.0; nk * n * n];
        for k in 0..nk {
            for i in 0..n {
                for j in 0..=i {
                    let v = lcg(&mut seed);
                    a[(k * n + i) * n + j] = v;
                    a[(k * n + j) * n + i] = v;
                }
            }
        }
        let mut t = vec![0.0; n * n * n * n];
        for p in 0..n * n {
            for q in 0..n * n {
                let mut s = 0.0;
                for k in 0..nk {
                    s += a[k * n * n + p] * a[k * n * n + q];
                }
                t[p * n * n + q] = s;
            }
        }
        t
    }

    fn brute(t: &[f64], n: usize, c: [&Mat<f64>; 4]) -> Vec<f64> {
        let d: Vec<usize> = c.iter().map(|m| m.ncols()).collect();
        let mut out = vec![0.0; d.iter().product()];
        for p in 0..d[0] {
            for q in 0..d[1] {
                for r in 0..d[2] {
                    for s in 0..d[3] {
                        let mut v = 0.0;
                        for a in 0..n {
                            for b in 0..n {
                                for e in 0..n {
                                    for f in 0..n {
                                        v += c[0][(a, p)]
                                            * c[1][(b, q)]
                                            * c[2][(e, r)]
                                            * c[3][(f, s)]
                                            * t[((a * n + b) * n + e) * n + f];
                                    }
                                }
                            }
                        }
                        out[((p * d[1] + q) * d[2] + r) * d[3] + s] = v;
                    }
                }
            }
        }
        out
    }

    fn coeffs(n: usize, m: usize, seed: u64) -> Mat<f64> {
        let mut s = seed;
        Mat::from_fn(n, m, |_, _| lcg(&mut s))
    }

    #[test]
    fn blocks_match_brute_force_in_every_shape() {
        let basis = toy_basis();
        let n = basis.n_basis;
        assert_eq!(n, 1 + 3 + 1 + 5 + 1);
        let t = toy_tensor(n);
        let eng = DenseAoEri {
            basis: &basis,
            tensor: &t,
        };
        let shapes: [[usize; 4]; 5] = [
            [2, 3, 4, 5],
            [5, 4, 3, 2],
            [1, 7, 2, 7],
            [3, 1, 6, 2],
            [n, n, 1, 1],
        ];
        for (si, sh) in shapes.iter().enumerate() {
            let c: Vec<Mat<f64>> = sh
                .iter()
                .enumerate()
                .map(|(k, &m)| coeffs(n, m, 100 + 10 * si as u64 + k as u64))
                .collect();
            let got = mo_eri_block(&eng, &basis, &c[0], &c[1], &c[2], &c[3]);
            let want = brute(&t, n, [&c[0], &c[1], &c[2], &c[3]]);
            assert_eq!(got.len(), want.len());
            for (g, w) in got.iter().zip(&want) {
                assert!((g - w).abs() < 1e-12, "shape {sh:?}: {g} vs {w}");
            }
        }
    }

    #[test]
    fn several_blocks_in_one_pass_equal_single_blocks() {
        let basis = toy_basis();
        let n = basis.n_basis;
        let t = toy_tensor(n);
        let eng = DenseAoEri {
            basis: &basis,
            tensor: &t,
        };
        let a = coeffs(n, 2, 1);
        let b = coeffs(n, 5, 2);
        let e = coeffs(n, 3, 3);
        let both = mo_eri_blocks(
            &eng,
            &basis,
            &[
                BlockSpec::new(&a, &b, &e, &b),
                BlockSpec::new(&a, &e, &b, &e),
            ],
        );
        let one = mo_eri_block(&eng, &basis, &a, &b, &e, &b);
        let two = mo_eri_block(&eng, &basis, &a, &e, &b, &e);
        assert_eq!(both[0], one);
        assert_eq!(both[1], two);
    }

    /// Quarter-by-quarter transform of a dense tensor (n⁵ work; reference for real engines).
    fn quarter_transform(t: &[f64], n: usize, c: [&Mat<f64>; 4]) -> Vec<f64> {
        let mut cur = t.to_vec();
        let mut dims = [n, n, n, n];
        // transform the first index each time, then rotate indices (p q r s) -> (q r s p')
        for k in 0..4 {
            let m = c[k].ncols();
            let rest = dims[1] * dims[2] * dims[3];
            let mut next = vec![0.0; rest * m];
            for p in 0..m {
                for mu in 0..dims[0] {
                    let w = c[k][(mu, p)];
                    if w == 0.0 {
                        continue;
                    }
                    for x in 0..rest {
                        next[x * m + p] += w * cur[mu * rest + x];
                    }
                }
            }
            cur = next;
            dims = [dims[1], dims[2], dims[3], m];
        }
        cur
    }

    #[test]
    fn real_engine_blocks_match_the_full_ao_tensor() {
        use crate::chem::xyz::{parse_xyz, LengthUnit};
        // water, a basis with d functions (pure)
        let mol = parse_xyz(
            "3\nwater\nO 0 0 0\nH 0.7571 0 0.5861\nH -0.7571 0 0.5861\n",
            LengthUnit::Angstrom,
        )
        .unwrap();
        let basis = crate::basis::load("cc-pVDZ", &mol, None).unwrap();
        let n = basis.n_basis;
        let t = crate::integrals::eri_tensor(&basis);
        let eng = crate::integrals::EriEngine::new(&basis);
        let c1 = coeffs(n, 2, 41);
        let c2 = coeffs(n, 9, 42);
        let c3 = coeffs(n, 3, 43);
        let c4 = coeffs(n, 9, 44);
        let got = mo_eri_block(&eng, &basis, &c1, &c2, &c3, &c4);
        let want = quarter_transform(&t, n, [&c1, &c2, &c3, &c4]);
        let scale = want.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        for (g, w) in got.iter().zip(&want) {
            assert!((g - w).abs() < 1e-11 * scale.max(1.0), "{g} vs {w}");
        }
    }

    #[test]
    fn result_does_not_depend_on_thread_count() {
        let basis = toy_basis();
        let n = basis.n_basis;
        let t = toy_tensor(n);
        let eng = DenseAoEri {
            basis: &basis,
            tensor: &t,
        };
        let (a, b, c) = (coeffs(n, 3, 7), coeffs(n, 6, 8), coeffs(n, 2, 9));
        let run = |threads: usize| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap()
                .install(|| mo_eri_block(&eng, &basis, &a, &b, &c, &b))
        };
        assert_eq!(run(1), run(3));
    }

    #[test]
    fn plan_puts_the_small_pair_first_and_memory_estimate_grows() {
        // (p v | o v) with 1 target, 20 virtuals, 5 occupied
        let p = Plan::choose([1, 20, 5, 20]);
        assert_eq!(p.perm, [0, 1, 2, 3]);
        let p = Plan::choose([5, 20, 1, 20]);
        assert_eq!(p.perm, [2, 3, 0, 1]);
        let small = estimate_bytes_for(100, 5, &[[1, 20, 5, 20]], 2);
        let big = estimate_bytes_for(100, 5, &[[10, 20, 5, 20]], 2);
        assert!(big > small);
        // the full (vv|vv) array is 8·n⁴ bytes
        let full = estimate_bytes_for(100, 5, &[[100, 100, 100, 100]], 1);
        assert!(full >= 8 * 100usize.pow(4));
    }
}
