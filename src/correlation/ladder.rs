//! The particle–particle ladder R_ij^ab = Σ_cd (ac|bd) X_ij^cd of the CCSD doubles residual,
//! for X with the pair symmetry X_ij^cd = X_ji^dc, in symmetric/antisymmetric form.
//!
//! Split X into X⁺ (symmetric in c↔d) and X⁻ (antisymmetric); then
//! R_ij^ab = S_ij^ab + A_ij^ab with
//!   S_ij^ab = Σ_{c≥d} V⁺_{ab,cd} Xs_ij^cd,  V⁺_{ab,cd} = (ac|bd) + (ad|bc),
//!   A_ij^ab = Σ_{c>d} V⁻_{ab,cd} Xa_ij^cd,  V⁻_{ab,cd} = (ac|bd) − (ad|bc),
//! Xs = ½(X^cd + X^dc) (halved again for c = d), Xa = ½(X^cd − X^dc). S is symmetric and A
//! antisymmetric in a↔b and in i↔j, so only i ≥ j, a ≥ b (i > j, a > b for A) are formed:
//! o²v⁴/4 multiply-adds instead of o²v⁴ (Scuseria, Janssen & Schaefer, J. Chem. Phys. 89
//! (1988) 7382, and common practice since).
//!
//! V⁺ and V⁻ are symmetric matrices over index pairs. Pairs are ordered a-major,
//! pk(a,b) = a(a+1)/2 + b (a ≥ b) and pm(a,b) = a(a−1)/2 + b (a > b); the rows of one `a`
//! form a block that holds the columns of every pair (c,d) with c ≤ a, so the blocks tile
//! the lower triangle (plus the small diagonal squares): v⁴/8 words each. A block is either
//! stored (`LadderIntegrals`, built once) or generated from the three-index factors each
//! time it is needed (`ladder_direct`), both at a cost of n_aux v⁴/3 multiply-adds.

use bandcast_linalg::{MatMut, MatRef};
use rayon::prelude::*;

use super::integrals::MoFactors;
use super::tensor::{par_gemm, Tensor};

#[inline]
fn pk(a: usize, b: usize) -> usize {
    a * (a + 1) / 2 + b
}

#[inline]
fn pm(a: usize, b: usize) -> usize {
    a * (a.max(1) - 1) / 2 + b
}

/// Words of block `a` of V⁺ and of V⁻.
fn block_words(a: usize) -> (usize, usize) {
    ((a + 1) * pk(a + 1, 0), a * pk(a, 0))
}

/// Words held by stored V⁺ and V⁻ for `v` virtuals.
pub fn stored_words(v: usize) -> f64 {
    (0..v)
        .map(|a| {
            let (p, m) = block_words(a);
            (p + m) as f64
        })
        .sum()
}

/// Temporary words of generating one block (the largest, a = v − 1).
pub fn block_scratch_words(v: usize) -> f64 {
    let (p, m) = block_words(v.max(1) - 1);
    (v * v * v) as f64 + (p + m) as f64
}

/// Generates the V⁺ and V⁻ blocks of one `a` from the factors.
struct BlockMaker<'f> {
    f: &'f MoFactors,
    /// M[c][b][d] = (ac|bd) for c ≤ a, b ≤ a, all d.
    m: Vec<f64>,
}

impl<'f> BlockMaker<'f> {
    fn new(f: &'f MoFactors) -> Self {
        let v = f.nvir;
        BlockMaker {
            f,
            m: vec![0.0; v * v * v],
        }
    }

    /// Fill `plus` ((a+1) × pk(a+1,0)) and `minus` (a × pk(a,0)) for block `a`.
    fn make(&mut self, a: usize, plus: &mut [f64], minus: &mut [f64]) {
        let (v, naux) = (self.f.nvir, self.f.naux);
        let n = a + 1;
        let m = &mut self.m[..n * n * v];
        if naux == 0 {
            m.iter_mut().for_each(|x| *x = 0.0);
        } else {
            // M[c][(b,d)] = Σ_Q B^Q_ac B^Q_bd
            let left =
                MatRef::from_column_major_slice_with_stride(&self.f.b_vv[a * v..], n, naux, v * v);
            let right = MatRef::from_row_major_slice_with_stride(&self.f.b_vv, naux, n * v, v * v);
            par_gemm(
                MatMut::from_row_major_slice_mut(m, n, n * v),
                false,
                left,
                right,
                1.0,
            );
        }
        let m: &[f64] = m;
        let at = |c: usize, b: usize, d: usize| m[(c * n + b) * v + d];
        let wp = pk(n, 0);
        plus[..n * wp]
            .par_chunks_mut(wp)
            .enumerate()
            .for_each(|(b, row)| {
                for c in 0..n {
                    for d in 0..=c {
                        row[pk(c, d)] = at(c, b, d) + at(d, b, c);
                    }
                }
            });
        let wm = pk(a, 0);
        if wm > 0 {
            minus[..a * wm]
                .par_chunks_mut(wm)
                .enumerate()
                .for_each(|(b, row)| {
                    for c in 1..n {
                        for d in 0..c {
                            row[pm(c, d)] = at(c, b, d) - at(d, b, c);
                        }
                    }
                });
        }
    }
}

/// V⁺ and V⁻ stored block by block (see the module header).
#[derive(Debug, Clone)]
pub struct LadderIntegrals {
    pub nvir: usize,
    plus: Vec<f64>,
    minus: Vec<f64>,
    off_plus: Vec<usize>,
    off_minus: Vec<usize>,
}

impl LadderIntegrals {
    pub fn build(f: &MoFactors) -> Self {
        let v = f.nvir;
        let mut off_plus = Vec::with_capacity(v + 1);
        let mut off_minus = Vec::with_capacity(v + 1);
        let (mut sp, mut sm) = (0, 0);
        for a in 0..v {
            off_plus.push(sp);
            off_minus.push(sm);
            let (p, m) = block_words(a);
            sp += p;
            sm += m;
        }
        off_plus.push(sp);
        off_minus.push(sm);
        let mut plus = vec![0.0; sp];
        let mut minus = vec![0.0; sm];
        let mut maker = BlockMaker::new(f);
        for a in 0..v {
            let (p0, p1) = (off_plus[a], off_plus[a + 1]);
            let (m0, m1) = (off_minus[a], off_minus[a + 1]);
            maker.make(a, &mut plus[p0..p1], &mut minus[m0..m1]);
        }
        LadderIntegrals {
            nvir: v,
            plus,
            minus,
            off_plus,
            off_minus,
        }
    }

    /// Σ_cd (ac|bd) X_ij^cd.
    pub fn ladder(&self, x: &Tensor) -> Tensor {
        let v = self.nvir;
        contract(x, v, &mut |a, f: &mut dyn FnMut(&[f64], &[f64])| {
            f(
                &self.plus[self.off_plus[a]..self.off_plus[a + 1]],
                &self.minus[self.off_minus[a]..self.off_minus[a + 1]],
            )
        })
    }
}

/// Σ_cd (ac|bd) X_ij^cd with every block generated from the factors (nothing v⁴ stored).
pub fn ladder_direct(f: &MoFactors, x: &Tensor) -> Tensor {
    let v = f.nvir;
    let mut maker = BlockMaker::new(f);
    let (wp, wm) = block_words(v.max(1) - 1);
    let mut plus = vec![0.0; wp];
    let mut minus = vec![0.0; wm];
    contract(x, v, &mut |a, g: &mut dyn FnMut(&[f64], &[f64])| {
        let (p, m) = block_words(a);
        maker.make(a, &mut plus[..p], &mut minus[..m]);
        g(&plus[..p], &minus[..m])
    })
}

/// Block callback: `blocks(a, use)` hands the V⁺ and V⁻ blocks of `a` to `use`.
type BlockSource<'a> = dyn FnMut(usize, &mut dyn FnMut(&[f64], &[f64])) + 'a;

/// The contraction over blocks, shared by the stored and direct variants.
fn contract(x: &Tensor, v: usize, blocks: &mut BlockSource<'_>) -> Tensor {
    let o = x.shape[0];
    assert_eq!(x.shape, vec![o, o, v, v]);
    let (mp, mm) = (pk(o, 0), pm(o, 0));
    let (np, nm) = (pk(v, 0), pm(v, 0));
    let xd = &x.data;
    let at = |i: usize, j: usize, c: usize, d: usize| xd[((i * o + j) * v + c) * v + d];
    // Xs[ij][cd], Xa[ij][cd]
    let mut xs = vec![0.0; mp * np];
    let mut xa = vec![0.0; mm * nm];
    for i in 0..o {
        for j in 0..=i {
            let rs = &mut xs[pk(i, j) * np..(pk(i, j) + 1) * np];
            for c in 0..v {
                for d in 0..c {
                    rs[pk(c, d)] = 0.5 * (at(i, j, c, d) + at(i, j, d, c));
                }
                rs[pk(c, c)] = 0.5 * at(i, j, c, c);
            }
            if j < i {
                let ra = &mut xa[pm(i, j) * nm..(pm(i, j) + 1) * nm];
                for c in 1..v {
                    for d in 0..c {
                        ra[pm(c, d)] = 0.5 * (at(i, j, c, d) - at(i, j, d, c));
                    }
                }
            }
        }
    }
    let mut s = vec![0.0; mp * np];
    let mut an = vec![0.0; mm * nm];
    for a in 0..v {
        blocks(a, &mut |plus: &[f64], minus: &[f64]| {
            tile(&xs, &mut s, mp, np, plus, pk(a, 0), a + 1);
            if a > 0 {
                tile(&xa, &mut an, mm, nm, minus, pm(a, 0), a);
            }
        });
    }
    let mut out = Tensor::zeros(&[o, o, v, v]);
    for i in 0..o {
        for j in 0..o {
            let (hi, lo) = if i >= j { (i, j) } else { (j, i) };
            let sij = if i > j {
                1.0
            } else if i < j {
                -1.0
            } else {
                0.0
            };
            let srow = &s[pk(hi, lo) * np..(pk(hi, lo) + 1) * np];
            let arow = (sij != 0.0).then(|| &an[pm(hi, lo) * nm..(pm(hi, lo) + 1) * nm]);
            let dst = &mut out.data[(i * o + j) * v * v..(i * o + j + 1) * v * v];
            for a in 0..v {
                for b in 0..=a {
                    let sv = srow[pk(a, b)];
                    let av = match arow {
                        Some(r) if b < a => sij * r[pm(a, b)],
                        _ => 0.0,
                    };
                    dst[a * v + b] = sv + av;
                    dst[b * v + a] = sv - av;
                }
            }
        }
    }
    out
}

/// One block of a symmetric matrix W over pairs: rows r0..r0+nr, columns 0..r0+nr
/// (row-major `blk`). out[:, rows] += X[:, cols] Wᵀ_blk and out[:, 0..r0] += X[:, rows] W_blk[:, 0..r0].
fn tile(x: &[f64], out: &mut [f64], m: usize, n: usize, blk: &[f64], r0: usize, nr: usize) {
    if m == 0 || nr == 0 {
        return;
    }
    let nc = r0 + nr;
    let xm = MatRef::from_row_major_slice(x, m, n);
    let w = MatRef::from_row_major_slice(&blk[..nr * nc], nr, nc);
    {
        let om = MatMut::from_row_major_slice_mut(out, m, n);
        par_gemm(
            om.subcols_mut(r0, nr),
            true,
            xm.subcols(0, nc),
            w.transpose(),
            1.0,
        );
    }
    if r0 > 0 {
        let om = MatMut::from_row_major_slice_mut(out, m, n);
        par_gemm(
            om.subcols_mut(0, r0),
            true,
            xm.subcols(r0, nr),
            w.subcols(0, r0),
            1.0,
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::correlation::integrals::toy::{toy_system, Lcg};

    /// Stored and direct variants equal the literal Σ_cd (ac|bd) X_ij^cd.
    #[test]
    fn ladder_matches_loops() {
        for &(o, v) in &[(3usize, 5usize), (1, 1), (2, 7)] {
            let (f, _) = toy_system(o, v, 7, 11 + v as u64, 1.0);
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
            let li = LadderIntegrals::build(&f);
            // the memory plan's count is what is allocated
            assert_eq!((li.plus.len() + li.minus.len()) as f64, stored_words(v));
            let stored = li.ladder(&x);
            let direct = ladder_direct(&f, &x);
            let vv = f.vvvv();
            for i in 0..o {
                for j in 0..o {
                    for a in 0..v {
                        for b in 0..v {
                            let mut s = 0.0;
                            for c in 0..v {
                                for d in 0..v {
                                    s += vv.get(&[a, c, b, d]) * x.get(&[i, j, c, d]);
                                }
                            }
                            assert!((stored.get(&[i, j, a, b]) - s).abs() < 1e-12);
                            assert!((direct.get(&[i, j, a, b]) - s).abs() < 1e-12);
                        }
                    }
                }
            }
        }
    }
}
