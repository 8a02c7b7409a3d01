//! Dense row-major tensors and a small `einsum` that turns every binary contraction into one
//! matrix product (operands used in place when their axes allow, else permuted →
//! `bandcast_linalg::gemm` → permuted back when the output order needs it).
//!
//! Index letters are single characters. A letter present in both operands and absent from the
//! output is summed; a letter in one operand and the output is a free index. Batch letters
//! (in both operands *and* the output) and traces are not supported: the correlated methods
//! never need them, and a wrong spec is a programming error (panic), not a user error.

use bandcast_linalg::{gemm, MatMut, MatRef, Par};

/// A raw output pointer shared by threads that write disjoint positions.
#[derive(Clone, Copy)]
struct SyncPtr(*mut f64);
unsafe impl Send for SyncPtr {}
unsafe impl Sync for SyncPtr {}

#[derive(Debug, Clone, PartialEq)]
pub struct Tensor {
    pub shape: Vec<usize>,
    pub data: Vec<f64>,
}

impl Tensor {
    pub fn zeros(shape: &[usize]) -> Self {
        let n = shape.iter().product();
        Tensor {
            shape: shape.to_vec(),
            data: vec![0.0; n],
        }
    }

    pub fn from_fn(shape: &[usize], mut f: impl FnMut(&[usize]) -> f64) -> Self {
        let mut t = Tensor::zeros(shape);
        let mut idx = vec![0usize; shape.len()];
        for v in t.data.iter_mut() {
            *v = f(&idx);
            for d in (0..shape.len()).rev() {
                idx[d] += 1;
                if idx[d] < shape[d] {
                    break;
                }
                idx[d] = 0;
            }
        }
        t
    }

    pub fn len(&self) -> usize {
        self.data.len()
    }

    pub fn is_empty(&self) -> bool {
        self.data.is_empty()
    }

    fn strides(shape: &[usize]) -> Vec<usize> {
        let mut s = vec![1usize; shape.len()];
        for d in (0..shape.len().saturating_sub(1)).rev() {
            s[d] = s[d + 1] * shape[d + 1];
        }
        s
    }

    pub fn offset(&self, idx: &[usize]) -> usize {
        let mut o = 0;
        for (d, &i) in idx.iter().enumerate() {
            o = o * self.shape[d] + i;
        }
        o
    }

    pub fn get(&self, idx: &[usize]) -> f64 {
        self.data[self.offset(idx)]
    }

    /// New tensor with axes reordered: `out.shape[k] = self.shape[perm[k]]`.
    ///
    /// When the source's innermost axis stays innermost, rows are copied whole; otherwise
    /// each 2-D slab spanned by the output's innermost axis and the source's innermost axis
    /// is transposed in 16 × 16 tiles (both sides stay in cache). Slabs run in parallel.
    pub fn permute(&self, perm: &[usize]) -> Tensor {
        use rayon::prelude::*;
        assert_eq!(perm.len(), self.shape.len());
        if perm.iter().enumerate().all(|(k, &p)| k == p) {
            return self.clone();
        }
        let nd = self.shape.len();
        let shape: Vec<usize> = perm.iter().map(|&p| self.shape[p]).collect();
        let src_strides = Self::strides(&self.shape);
        // source stride of each output axis, and output strides
        let s: Vec<usize> = perm.iter().map(|&p| src_strides[p]).collect();
        let os = Self::strides(&shape);
        let total = self.data.len();
        let mut out = vec![0.0; total];
        if total == 0 {
            return Tensor { shape, data: out };
        }
        let src = &self.data;
        let inner = shape[nd - 1];
        let q = perm.iter().position(|&p| p == nd - 1).unwrap();
        if q == nd - 1 {
            // contiguous rows
            out.par_chunks_mut(inner)
                .enumerate()
                .for_each(|(row, chunk)| {
                    let mut rest = row;
                    let mut base = 0;
                    for d in (0..nd - 1).rev() {
                        base += (rest % shape[d]) * s[d];
                        rest /= shape[d];
                    }
                    chunk.copy_from_slice(&src[base..base + inner]);
                });
            return Tensor { shape, data: out };
        }
        // slabs: all output axes except q and nd−1
        let others: Vec<usize> = (0..nd - 1).filter(|&d| d != q).collect();
        let n_slabs: usize = others.iter().map(|&d| shape[d]).product();
        let (na, nb) = (shape[q], inner);
        let (oq, sb) = (os[q], s[nd - 1]);
        let slab_base = |k: usize| -> (usize, usize) {
            let (mut rest, mut bo, mut bs) = (k, 0, 0);
            for &d in others.iter().rev() {
                let i = rest % shape[d];
                rest /= shape[d];
                bo += i * os[d];
                bs += i * s[d];
            }
            (bo, bs)
        };
        const T: usize = 16;
        let out_ptr = SyncPtr(out.as_mut_ptr());
        let work = |k: usize| {
            let (bo, bs) = slab_base(k);
            let op = out_ptr;
            for x0 in (0..na).step_by(T) {
                let x1 = (x0 + T).min(na);
                for y0 in (0..nb).step_by(T) {
                    let y1 = (y0 + T).min(nb);
                    for x in x0..x1 {
                        for y in y0..y1 {
                            // SAFETY: every output position bo + x·oq + y belongs to exactly
                            // one slab k and one (x, y), so writes never overlap.
                            unsafe {
                                *op.0.add(bo + x * oq + y) = src[bs + x + y * sb];
                            }
                        }
                    }
                }
            }
        };
        if n_slabs * na * nb >= 1 << 16 {
            (0..n_slabs).into_par_iter().for_each(work);
        } else {
            (0..n_slabs).for_each(work);
        }
        Tensor { shape, data: out }
    }

    /// self += alpha * other (same shape).
    pub fn axpy(&mut self, alpha: f64, other: &Tensor) {
        assert_eq!(self.shape, other.shape, "axpy shape mismatch");
        for (a, b) in self.data.iter_mut().zip(&other.data) {
            *a += alpha * b;
        }
    }

    pub fn scale(&mut self, alpha: f64) {
        for a in self.data.iter_mut() {
            *a *= alpha;
        }
    }

    pub fn dot(&self, other: &Tensor) -> f64 {
        assert_eq!(self.shape, other.shape);
        self.data.iter().zip(&other.data).map(|(a, b)| a * b).sum()
    }

    pub fn norm(&self) -> f64 {
        self.dot(self).sqrt()
    }

    /// Row-major matrix view with the first `split` axes as rows.
    pub fn as_mat(&self, split: usize) -> MatRef<'_, f64> {
        let m: usize = self.shape[..split].iter().product();
        let n: usize = self.shape[split..].iter().product();
        MatRef::from_row_major_slice(&self.data, m, n)
    }
}

/// c = alpha · a · b (+ c when `accumulate`), for views of any layout (transpose a view to
/// multiply by its transpose). The output is cut into independent row or column blocks —
/// a few per thread, the longer side halved each time — and each block is one sequential
/// faer product on the rayon pool. Measured on 2 cores (`cargo run --release --example`
/// style probes, README "Benchmarks: EOM"): for the shapes of the correlated methods (one
/// dimension ≤ a few hundred, another up to 10⁵) this runs 1.1–6× faster than faer's own
/// threading and wastes no CPU time in barriers when the machine is shared.
pub fn par_gemm(
    c: MatMut<'_, f64>,
    accumulate: bool,
    a: MatRef<'_, f64>,
    b: MatRef<'_, f64>,
    alpha: f64,
) {
    let (m, n, k) = (c.nrows(), c.ncols(), a.ncols());
    debug_assert_eq!(a.nrows(), m);
    debug_assert_eq!(b.nrows(), k);
    debug_assert_eq!(b.ncols(), n);
    let threads = rayon::current_num_threads();
    let pieces = if threads == 1 || (m * n * k) < (1 << 21) {
        1
    } else {
        4 * threads
    };
    split_gemm(c, accumulate, a, b, alpha, pieces);
}

fn split_gemm(
    c: MatMut<'_, f64>,
    accumulate: bool,
    a: MatRef<'_, f64>,
    b: MatRef<'_, f64>,
    alpha: f64,
    pieces: usize,
) {
    let (m, n) = (c.nrows(), c.ncols());
    if m == 0 || n == 0 {
        return;
    }
    if pieces <= 1 || (m < 64 && n < 64) {
        gemm(c, accumulate, a, false, b, false, alpha, Par::Seq);
        return;
    }
    let (p0, p1) = (pieces / 2, pieces - pieces / 2);
    if m >= n {
        let h = m / 2;
        let (c0, c1) = c.split_at_row_mut(h);
        let (a0, a1) = a.split_at_row(h);
        rayon::join(
            || split_gemm(c0, accumulate, a0, b, alpha, p0),
            || split_gemm(c1, accumulate, a1, b, alpha, p1),
        );
    } else {
        let h = n / 2;
        let (c0, c1) = c.split_at_col_mut(h);
        let (b0, b1) = b.split_at_col(h);
        rayon::join(
            || split_gemm(c0, accumulate, a, b0, alpha, p0),
            || split_gemm(c1, accumulate, a, b1, alpha, p1),
        );
    }
}

/// c (m×n, row-major) += Σ_e A_e B_e over `count` pairs of row-major blocks A_e (m×k,
/// `a[e·m·k..]`) and B_e (k×n, `b[e·k·n..]`). The pairs are shared out among the threads,
/// each summing sequential products into its own copy of c (c is small: the blocks are
/// many and each product alone is too small to split well).
#[allow(clippy::too_many_arguments)]
pub fn sum_of_products(
    c: &mut [f64],
    a: &[f64],
    b: &[f64],
    m: usize,
    k: usize,
    n: usize,
    count: usize,
) {
    use rayon::prelude::*;
    if m == 0 || n == 0 || k == 0 || count == 0 {
        return;
    }
    let one = |acc: &mut Vec<f64>, e: usize| {
        gemm(
            MatMut::from_row_major_slice_mut(acc, m, n),
            true,
            MatRef::from_row_major_slice(&a[e * m * k..(e + 1) * m * k], m, k),
            false,
            MatRef::from_row_major_slice(&b[e * k * n..(e + 1) * k * n], k, n),
            false,
            1.0,
            Par::Seq,
        );
    };
    let total = (0..count)
        .into_par_iter()
        .with_min_len(count.div_ceil(4 * rayon::current_num_threads()))
        .fold(
            || vec![0.0; m * n],
            |mut acc, e| {
                one(&mut acc, e);
                acc
            },
        )
        .reduce(
            || vec![0.0; m * n],
            |mut x, y| {
                x.iter_mut().zip(&y).for_each(|(p, q)| *p += q);
                x
            },
        );
    c.iter_mut().zip(&total).for_each(|(p, q)| *p += q);
}

/// Row-major matrix product c (m×n) = alpha a (m×k) b (k×n), accumulating when asked.
#[allow(clippy::too_many_arguments)]
pub fn gemm_rm(
    c: &mut [f64],
    accumulate: bool,
    a: &[f64],
    b: &[f64],
    m: usize,
    k: usize,
    n: usize,
    alpha: f64,
) {
    if m == 0 || n == 0 {
        return;
    }
    if k == 0 {
        if !accumulate {
            c.iter_mut().for_each(|x| *x = 0.0);
        }
        return;
    }
    let am = MatRef::from_row_major_slice(&a[..m * k], m, k);
    let bm = MatRef::from_row_major_slice(&b[..k * n], k, n);
    let cm = MatMut::from_row_major_slice_mut(&mut c[..m * n], m, n);
    par_gemm(cm, accumulate, am, bm, alpha);
}

/// An operand as a (free × contracted) matrix view: borrowed when its axes are already
/// [free…, contracted…] or [contracted…, free…] (a transposed view), permuted otherwise.
fn as_operand<'a>(
    t: &'a Tensor,
    letters: &[char],
    free: &[char],
    contracted: &[char],
) -> (std::borrow::Cow<'a, Tensor>, bool) {
    use std::borrow::Cow;
    let fk: Vec<char> = free.iter().chain(contracted).copied().collect();
    if letters == fk.as_slice() {
        return (Cow::Borrowed(t), false);
    }
    let kf: Vec<char> = contracted.iter().chain(free).copied().collect();
    if letters == kf.as_slice() {
        return (Cow::Borrowed(t), true);
    }
    let perm: Vec<usize> = fk
        .iter()
        .map(|c| letters.iter().position(|x| x == c).unwrap())
        .collect();
    (Cow::Owned(t.permute(&perm)), false)
}

/// The (f × k) matrix of an operand stored [free, contracted], or [contracted, free] when
/// `transposed`.
fn matrix(t: &Tensor, transposed: bool, f: usize, k: usize) -> MatRef<'_, f64> {
    if transposed {
        MatRef::from_row_major_slice(&t.data, k, f).transpose()
    } else {
        MatRef::from_row_major_slice(&t.data, f, k)
    }
}

/// Binary contraction, e.g. `einsum("kcld,ilcd->ki", &a, &b)`: one matrix product. The
/// summed letters are taken in the order of the larger operand, and an operand whose axes
/// are already [free, summed] or [summed, free] is used in place (a transposed view for
/// the latter), so the large integral blocks are seldom copied; the product is formed as
/// C or Cᵀ, whichever is already in the output's order.
pub fn einsum(spec: &str, a: &Tensor, b: &Tensor) -> Tensor {
    let (lhs, out) = spec.split_once("->").expect("einsum spec needs ->");
    let (sa, sb) = lhs.split_once(',').expect("einsum spec needs two operands");
    let ia: Vec<char> = sa.chars().collect();
    let ib: Vec<char> = sb.chars().collect();
    let io: Vec<char> = out.chars().collect();
    assert_eq!(
        ia.len(),
        a.shape.len(),
        "einsum {spec}: rank of first operand"
    );
    assert_eq!(
        ib.len(),
        b.shape.len(),
        "einsum {spec}: rank of second operand"
    );
    let dim = |c: char| -> usize {
        if let Some(p) = ia.iter().position(|&x| x == c) {
            a.shape[p]
        } else {
            b.shape[ib.iter().position(|&x| x == c).unwrap()]
        }
    };
    let summed = |l: &[char], other: &[char]| -> Vec<char> {
        l.iter()
            .copied()
            .filter(|c| other.contains(c) && !io.contains(c))
            .collect()
    };
    let contracted = if b.data.len() > a.data.len() {
        summed(&ib, &ia)
    } else {
        summed(&ia, &ib)
    };
    let free_a: Vec<char> = ia.iter().copied().filter(|c| io.contains(c)).collect();
    let free_b: Vec<char> = ib.iter().copied().filter(|c| io.contains(c)).collect();
    for c in &free_a {
        assert!(
            !ib.contains(c),
            "einsum {spec}: batch index {c} unsupported"
        );
    }
    for c in ia.iter().chain(ib.iter()) {
        assert!(
            io.contains(c) || contracted.contains(c),
            "einsum {spec}: index {c} summed in one operand only"
        );
    }
    for c in &contracted {
        let pa = ia.iter().position(|x| x == c).unwrap();
        let pb = ib.iter().position(|x| x == c).unwrap();
        assert_eq!(a.shape[pa], b.shape[pb], "einsum {spec}: dimension of {c}");
    }
    let m: usize = free_a.iter().map(|&c| dim(c)).product();
    let k: usize = contracted.iter().map(|&c| dim(c)).product();
    let n: usize = free_b.iter().map(|&c| dim(c)).product();
    let ab: Vec<char> = free_a.iter().chain(free_b.iter()).copied().collect();
    let ba: Vec<char> = free_b.iter().chain(free_a.iter()).copied().collect();
    // Cᵀ when that is the output's order (and C is not)
    let flip = io != ab && io == ba;
    let mid = if flip { ba } else { ab };
    let mid_shape: Vec<usize> = mid.iter().map(|&c| dim(c)).collect();
    let mut c = Tensor::zeros(&mid_shape);
    if m > 0 && n > 0 && k > 0 {
        let (ap, at) = as_operand(a, &ia, &free_a, &contracted);
        let (bp, bt) = as_operand(b, &ib, &free_b, &contracted);
        let am = matrix(&ap, at, m, k);
        let bm = matrix(&bp, bt, n, k);
        if flip {
            let cm = MatMut::from_row_major_slice_mut(&mut c.data, n, m);
            par_gemm(cm, false, bm, am.transpose(), 1.0);
        } else {
            let cm = MatMut::from_row_major_slice_mut(&mut c.data, m, n);
            par_gemm(cm, false, am, bm.transpose(), 1.0);
        }
    }
    if io == mid {
        c
    } else {
        let po: Vec<usize> = io
            .iter()
            .map(|ch| mid.iter().position(|x| x == ch).expect("output index"))
            .collect();
        c.permute(&po)
    }
}

/// One amplitude update of a coupled-cluster iteration (closed- and open-shell alike): the
/// quasi-Newton step r/D of singles and doubles, extrapolated by DIIS over the joined
/// amplitude vector.
pub fn diis_amplitude_step(
    diis: &mut crate::scf::diis::VectorDiis,
    t1: &mut Tensor,
    t2: &mut Tensor,
    r: [&Tensor; 2],
    d: [&Tensor; 2],
) {
    let n1 = t1.data.len();
    let mut step = Vec::with_capacity(n1 + t2.data.len());
    step.extend(r[0].data.iter().zip(&d[0].data).map(|(r, d)| r / d));
    step.extend(r[1].data.iter().zip(&d[1].data).map(|(r, d)| r / d));
    let mut x = Vec::with_capacity(step.len());
    x.extend_from_slice(&t1.data);
    x.extend_from_slice(&t2.data);
    let xn = diis.extrapolate(x, step);
    t1.data.copy_from_slice(&xn[..n1]);
    t2.data.copy_from_slice(&xn[n1..]);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn einsum_matches_loops() {
        let a2 = Tensor::from_fn(&[3, 4, 5], |i| (i[0] * 7 + i[1] * 3 + i[2]) as f64 * 0.01);
        let b2 = Tensor::from_fn(&[5, 3, 2], |i| (i[0] + 2 * i[1]) as f64 - 0.5 * i[2] as f64);
        let c2 = einsum("kcd,dkl->lc", &a2, &b2);
        assert_eq!(c2.shape, vec![2, 4]);
        for l in 0..2 {
            for cc in 0..4 {
                let mut s = 0.0;
                for k in 0..3 {
                    for d in 0..5 {
                        s += a2.get(&[k, cc, d]) * b2.get(&[d, k, l]);
                    }
                }
                assert!((c2.get(&[l, cc]) - s).abs() < 1e-12);
            }
        }
    }

    /// Every layout path of `einsum` (operand in place, as a transposed view, permuted;
    /// product as C or Cᵀ; output permuted or not; either operand the larger) against a
    /// direct sum over all letters.
    #[test]
    fn einsum_layouts_match_direct_sums() {
        use std::collections::HashMap;
        let size: HashMap<char, usize> = [('i', 3), ('j', 4), ('a', 5), ('b', 2), ('c', 6)]
            .into_iter()
            .collect();
        let make = |letters: &str, seed: f64| {
            let shape: Vec<usize> = letters.chars().map(|c| size[&c]).collect();
            Tensor::from_fn(&shape, |x| {
                x.iter()
                    .enumerate()
                    .map(|(k, &v)| ((k + 2) * (v + 1)) as f64 * seed)
                    .sum::<f64>()
                    .sin()
            })
        };
        for spec in [
            "iac,cb->iab",   // in place, C
            "ci,cab->iab",   // A transposed view
            "ic,abc->iab",   // B in place as [free, summed]
            "cab,ic->abi",   // Cᵀ (larger operand first)
            "ic,cab->bai",   // output permuted
            "acib,cj->jiab", // A permuted
            "ja,jb->ab",     // [summed, free] on both sides
            "ia,jb->ijab",   // outer product
        ] {
            let (lhs, out) = spec.split_once("->").unwrap();
            let (sa, sb) = lhs.split_once(',').unwrap();
            let (a, b) = (make(sa, 0.3), make(sb, 0.7));
            let c = einsum(spec, &a, &b);
            let letters: Vec<char> = {
                let mut l: Vec<char> = sa.chars().chain(sb.chars()).collect();
                l.sort();
                l.dedup();
                l
            };
            let mut direct = Tensor::zeros(&c.shape);
            let total: usize = letters.iter().map(|c| size[c]).product();
            for flat in 0..total {
                let mut rest = flat;
                let mut val = HashMap::new();
                for l in &letters {
                    val.insert(*l, rest % size[l]);
                    rest /= size[l];
                }
                let idx = |s: &str| -> Vec<usize> { s.chars().map(|c| val[&c]).collect() };
                let o = direct.offset(&idx(out));
                direct.data[o] += a.get(&idx(sa)) * b.get(&idx(sb));
            }
            for (x, y) in c.data.iter().zip(&direct.data) {
                assert!((x - y).abs() < 1e-12, "{spec}: {x} vs {y}");
            }
        }
    }

    #[test]
    fn permute_round_trip() {
        let a = Tensor::from_fn(&[2, 3, 4, 5], |i| {
            (i[0] * 60 + i[1] * 20 + i[2] * 5 + i[3]) as f64
        });
        let p = a.permute(&[2, 0, 3, 1]);
        assert_eq!(p.shape, vec![4, 2, 5, 3]);
        assert_eq!(p.get(&[3, 1, 4, 2]), a.get(&[1, 2, 3, 4]));
        // inverse of [2,0,3,1] is [1,3,0,2]
        assert_eq!(p.permute(&[1, 3, 0, 2]), a);
    }

    /// Both permutation paths (whole rows, tiled slabs), serial and parallel sizes.
    #[test]
    fn permute_matches_indexing() {
        let a = Tensor::from_fn(&[7, 40, 33, 9], |i| {
            (i[0] * 11880 + i[1] * 297 + i[2] * 9 + i[3]) as f64
        });
        let perms: [[usize; 4]; 5] = [
            [1, 0, 2, 3],
            [0, 3, 2, 1],
            [3, 2, 1, 0],
            [2, 0, 3, 1],
            [1, 3, 0, 2],
        ];
        for perm in perms {
            let p = a.permute(&perm);
            let mut idx = [0usize; 4];
            for i0 in 0..p.shape[0] {
                for i1 in 0..p.shape[1] {
                    for i2 in 0..p.shape[2] {
                        for i3 in 0..p.shape[3] {
                            let o = [i0, i1, i2, i3];
                            for k in 0..4 {
                                idx[perm[k]] = o[k];
                            }
                            assert_eq!(p.get(&o), a.get(&idx), "{perm:?}");
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn outer_product() {
        let a = Tensor::from_fn(&[2, 3], |i| (i[0] + 1) as f64 * (i[1] + 2) as f64);
        let b = Tensor::from_fn(&[4], |i| i[0] as f64 - 1.0);
        let c = einsum("ia,j->jai", &a, &b);
        assert_eq!(c.get(&[3, 2, 1]), a.get(&[1, 2]) * b.get(&[3]));
    }
}
