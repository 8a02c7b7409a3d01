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

/// A transform matrix kept as its nonzero entries (row, column, value) in row-major order:
/// the solid-harmonic matrices are mostly zeros.
#[derive(Debug, Clone)]
pub struct Sparse {
    pub rows: usize,
    pub entries: Vec<(u32, u32, f64)>,
}

impl Sparse {
    /// From a dense rows × cols row-major matrix.
    pub fn from_dense(m: &[f64], rows: usize, cols: usize) -> Self {
        let mut entries = Vec::new();
        for r in 0..rows {
            for c in 0..cols {
                if m[r * cols + c] != 0.0 {
                    entries.push((r as u32, c as u32, m[r * cols + c]));
                }
            }
        }
        Sparse { rows, entries }
    }
}

/// As [`transform_axis`] with a sparse matrix: same result, same summation order.
pub fn transform_axis_sparse(
    src: &[f64],
    dims: &[usize],
    axis: usize,
    m: &Sparse,
    dst: &mut Vec<f64>,
) {
    let cols = dims[axis];
    let outer: usize = dims[..axis].iter().product();
    let inner: usize = dims[axis + 1..].iter().product();
    dst.clear();
    dst.resize(outer * m.rows * inner, 0.0);
    for o in 0..outer {
        let s_base = o * cols * inner;
        let d_base = o * m.rows * inner;
        for &(r, c, f) in &m.entries {
            let (r, c) = (r as usize, c as usize);
            let d = &mut dst[d_base + r * inner..d_base + (r + 1) * inner];
            let s = &src[s_base + c * inner..s_base + (c + 1) * inner];
            for (x, y) in d.iter_mut().zip(s) {
                *x += f * y;
            }
        }
    }
}
