//! Applying the per-shell raw-Cartesian → final-AO matrices of
//! `crate::basis::solid_harmonics::transform` to integral blocks.

/// Transform axis `axis` of a row-major array with dimensions `dims` by the matrix `m`
/// (rows × dims[axis], row-major), writing to `dst` (dims[axis] replaced by `rows`).
pub fn transform_axis(
    src: &[f64],
    dims: &[usize],
    axis: usize,
    m: &[f64],
    rows: usize,
    dst: &mut Vec<f64>,
) {
    let cols = dims[axis];
    let outer: usize = dims[..axis].iter().product();
    let inner: usize = dims[axis + 1..].iter().product();
    dst.clear();
    dst.resize(outer * rows * inner, 0.0);
    for o in 0..outer {
        let s_base = o * cols * inner;
        let d_base = o * rows * inner;
        for r in 0..rows {
            let d = &mut dst[d_base + r * inner..d_base + (r + 1) * inner];
            for c in 0..cols {
                let f = m[r * cols + c];
                if f == 0.0 {
                    continue;
                }
                let s = &src[s_base + c * inner..s_base + (c + 1) * inner];
                for (x, y) in d.iter_mut().zip(s) {
                    *x += f * y;
                }
            }
        }
    }
}

/// Whether a transform matrix is the identity (s and p shells), so it can be skipped.
pub fn is_identity(m: &[f64], n: usize) -> bool {
    m.len() == n * n
        && (0..n).all(|i| (0..n).all(|j| m[i * n + j] == if i == j { 1.0 } else { 0.0 }))
}

/// A transform matrix kept as its nonzero entries, row by row: the solid-harmonic matrices
/// are mostly zeros. Every row has at least one entry.
#[derive(Debug, Clone)]
pub struct Sparse {
    pub rows: usize,
    /// Entries of row r: entries[row_start[r]..row_start[r + 1]], as (column, value).
    row_start: Vec<usize>,
    entries: Vec<(usize, f64)>,
}

impl Sparse {
    /// From a dense rows × cols row-major matrix.
    pub fn from_dense(m: &[f64], rows: usize, cols: usize) -> Self {
        let mut entries = Vec::new();
        let mut row_start = vec![0];
        for r in 0..rows {
            for c in 0..cols {
                if m[r * cols + c] != 0.0 {
                    entries.push((c, m[r * cols + c]));
                }
            }
            assert!(entries.len() > row_start[r], "transform row {r} is empty");
            row_start.push(entries.len());
        }
        Sparse {
            rows,
            row_start,
            entries,
        }
    }
}

/// As [`transform_axis`] with a sparse matrix, into `dst[..outer · rows · inner]` (no need to
/// clear it first: the first entry of each row is assigned, the others added).
pub fn transform_axis_sparse(
    src: &[f64],
    dims: [usize; 3],
    axis: usize,
    m: &Sparse,
    dst: &mut [f64],
) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the feature is present.
        unsafe { sparse_avx2(src, dims, axis, m, dst) };
        return;
    }
    sparse_impl(src, dims, axis, m, dst)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn sparse_avx2(src: &[f64], dims: [usize; 3], axis: usize, m: &Sparse, dst: &mut [f64]) {
    sparse_impl(src, dims, axis, m, dst)
}

#[inline(always)]
fn sparse_impl(src: &[f64], dims: [usize; 3], axis: usize, m: &Sparse, dst: &mut [f64]) {
    let cols = dims[axis];
    let outer: usize = dims[..axis].iter().product();
    let inner: usize = dims[axis + 1..].iter().product();
    for o in 0..outer {
        let s_base = o * cols * inner;
        let d_base = o * m.rows * inner;
        for r in 0..m.rows {
            let d = &mut dst[d_base + r * inner..d_base + (r + 1) * inner];
            let ents = &m.entries[m.row_start[r]..m.row_start[r + 1]];
            let (c, f) = ents[0];
            let s = &src[s_base + c * inner..s_base + (c + 1) * inner];
            for (x, y) in d.iter_mut().zip(s) {
                *x = f * y;
            }
            for &(c, f) in &ents[1..] {
                let s = &src[s_base + c * inner..s_base + (c + 1) * inner];
                for (x, y) in d.iter_mut().zip(s) {
                    *x += f * y;
                }
            }
        }
    }
}
