//! Dense row-major tensors and a small `einsum` that turns every binary contraction into one
//! matrix product (permute → `bandcast_linalg::gemm` → permute back).
//!
//! Index letters are single characters. A letter present in both operands and absent from the
//! output is summed; a letter in one operand and the output is a free index. Batch letters
//! (in both operands *and* the output) and traces are not supported: the correlated methods
//! never need them, and a wrong spec is a programming error (panic), not a user error.

use bandcast_linalg::{gemm, par_for, MatMut, MatRef};

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
    pub fn permute(&self, perm: &[usize]) -> Tensor {
        assert_eq!(perm.len(), self.shape.len());
        if perm.iter().enumerate().all(|(k, &p)| k == p) {
            return self.clone();
        }
        let shape: Vec<usize> = perm.iter().map(|&p| self.shape[p]).collect();
        let src_strides = Self::strides(&self.shape);
        let s: Vec<usize> = perm.iter().map(|&p| src_strides[p]).collect();
        let mut out = vec![0.0; self.data.len()];
        let nd = shape.len();
        if nd == 0 {
            return self.clone();
        }
        // Innermost axis handled in a tight loop.
        let inner = shape[nd - 1];
        let sin = s[nd - 1];
        let outer: usize = shape[..nd - 1].iter().product();
        let mut idx = vec![0usize; nd - 1];
        for (blk, chunk) in out.chunks_mut(inner.max(1)).enumerate().take(outer) {
            let _ = blk;
            let base: usize = idx.iter().zip(&s).map(|(&i, &st)| i * st).sum();
            for (x, v) in chunk.iter_mut().enumerate() {
                *v = self.data[base + x * sin];
            }
            for d in (0..nd - 1).rev() {
                idx[d] += 1;
                if idx[d] < shape[d] {
                    break;
                }
                idx[d] = 0;
            }
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
    gemm(
        cm,
        accumulate,
        am,
        false,
        bm,
        false,
        alpha,
        par_for(m.max(n).max(k)),
    );
}

fn permuted<'a>(t: &'a Tensor, perm: &[usize]) -> std::borrow::Cow<'a, Tensor> {
    if perm.iter().enumerate().all(|(k, &p)| k == p) {
        std::borrow::Cow::Borrowed(t)
    } else {
        std::borrow::Cow::Owned(t.permute(perm))
    }
}

/// Binary contraction, e.g. `einsum("kcld,ilcd->ki", &a, &b)`.
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
    let ap = permuted(a, &pa);
    let bp = permuted(b, &pb);
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
        c
    } else {
        c.permute(&po)
    }
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

    #[test]
    fn outer_product() {
        let a = Tensor::from_fn(&[2, 3], |i| (i[0] + 1) as f64 * (i[1] + 2) as f64);
        let b = Tensor::from_fn(&[4], |i| i[0] as f64 - 1.0);
        let c = einsum("ia,j->jai", &a, &b);
        assert_eq!(c.get(&[3, 2, 1]), a.get(&[1, 2]) * b.get(&[3]));
    }
}
