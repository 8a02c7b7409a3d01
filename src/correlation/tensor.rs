//! Dense row-major tensors and a small `einsum` that turns every binary contraction into one
//! matrix product (permute → `bandcast_linalg::gemm` → permute back).
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

fn permuted<'a>(t: &'a Tensor, perm: &[usize]) -> std::borrow::Cow<'a, Tensor> {
    if perm.iter().enumerate().all(|(k, &p)| k == p) {
        std::borrow::Cow::Borrowed(t)
    } else {
        std::borrow::Cow::Owned(t.permute(perm))
    }
}

pub static TRACE: std::sync::Mutex<Vec<(String, f64, f64, f64)>> =
    std::sync::Mutex::new(Vec::new());
fn now_cpu() -> f64 {
    crate::system::process_cpu_seconds().unwrap_or(0.0)
}
/// Binary contraction, e.g. `einsum("kcld,ilcd->ki", &a, &b)`.
pub fn einsum(spec: &str, a: &Tensor, b: &Tensor) -> Tensor {
    let t0 = std::time::Instant::now();
    let c0 = now_cpu();
    let (r, tp) = einsum_inner(spec, a, b);
    let dt = t0.elapsed().as_secs_f64();
    if dt > 0.01 {
        TRACE
            .lock()
            .unwrap()
            .push((spec.to_string(), dt, now_cpu() - c0, tp));
    }
    r
}
fn einsum_inner(spec: &str, a: &Tensor, b: &Tensor) -> (Tensor, f64) {
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
    let contracted: Vec<char> = ia
        .iter()
        .copied()
        .filter(|c| ib.contains(c) && !io.contains(c))
        .collect();
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
    // A → (free_a, contracted), B → (contracted, free_b).
    let pa: Vec<usize> = free_a
        .iter()
        .chain(contracted.iter())
        .map(|c| ia.iter().position(|x| x == c).unwrap())
        .collect();
    let pb: Vec<usize> = contracted
        .iter()
        .chain(free_b.iter())
        .map(|c| ib.iter().position(|x| x == c).unwrap())
        .collect();
    let tq = std::time::Instant::now();
    let ap = permuted(a, &pa);
    let bp = permuted(b, &pb);
    let mut tperm = tq.elapsed().as_secs_f64();
    let m: usize = free_a.iter().map(|&c| dim(c)).product();
    let k: usize = contracted.iter().map(|&c| dim(c)).product();
    let n: usize = free_b.iter().map(|&c| dim(c)).product();
    let mid: Vec<char> = free_a.iter().chain(free_b.iter()).copied().collect();
    let mid_shape: Vec<usize> = mid.iter().map(|&c| dim(c)).collect();
    let mut c = Tensor::zeros(&mid_shape);
    gemm_rm(&mut c.data, false, &ap.data, &bp.data, m, k, n, 1.0);
    let po: Vec<usize> = io
        .iter()
        .map(|ch| mid.iter().position(|x| x == ch).expect("output index"))
        .collect();
    if po.iter().enumerate().all(|(k, &p)| k == p) {
        (c, tperm)
    } else {
        let tq = std::time::Instant::now();
        let r = c.permute(&po);
        tperm += tq.elapsed().as_secs_f64();
        (r, tperm)
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
