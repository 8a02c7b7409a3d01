//! Savitzky–Golay smoothing: A. Savitzky & M. J. E. Golay, "Smoothing and differentiation
//! of data by simplified least squares procedures", Anal. Chem. 36 (1964) 1627.
//!
//! Each point is replaced by the value at its centre of the least-squares polynomial of
//! degree `order` through the 2m+1 points around it; that value is a fixed linear
//! combination of the points (the convolution weights of the paper's tables). The weights
//! are computed here from the normal equations rather than typed from the tables. Near
//! the ends the polynomial of the first (last) full window is evaluated at the end points.
//! The method assumes equally spaced points (measured traces are).

use bandcast_linalg::solve_small;

/// Least-squares polynomial weights: row k gives the value at offset (k − m) of the
/// polynomial fitted to offsets −m..=m.
fn weights(m: usize, order: usize) -> Vec<Vec<f64>> {
    let np = 2 * m + 1;
    let nc = order + 1;
    // Normal matrix G = AᵀA, A[i][j] = x_i^j with x_i = i − m.
    let x: Vec<f64> = (0..np).map(|i| i as f64 - m as f64).collect();
    let g: Vec<Vec<f64>> = (0..nc)
        .map(|a| {
            (0..nc)
                .map(|b| x.iter().map(|&xi| xi.powi((a + b) as i32)).sum())
                .collect()
        })
        .collect();
    // Value at offset t of the fit = Σ_i c_i(t) y_i with c(t) = A G⁻¹ [t^0 … t^p].
    (0..np)
        .map(|k| {
            let t = x[k];
            let rhs: Vec<f64> = (0..nc).map(|j| t.powi(j as i32)).collect();
            let u = solve_small(&g, &rhs).expect("Savitzky-Golay normal matrix is regular");
            x.iter()
                .map(|&xi| (0..nc).map(|j| u[j] * xi.powi(j as i32)).sum())
                .collect()
        })
        .collect()
}

/// Weights of the central point (the published convolution integers over their norm).
pub fn central_weights(m: usize, order: usize) -> Vec<f64> {
    weights(m, order)[m].clone()
}

/// Smooth `y` with a window of 2m+1 points and polynomial degree `order` (< 2m+1).
/// Returns `y` unchanged when it is shorter than the window.
pub fn savitzky_golay(y: &[f64], m: usize, order: usize) -> Vec<f64> {
    let np = 2 * m + 1;
    if m == 0 || y.len() < np || order >= np {
        return y.to_vec();
    }
    let w = weights(m, order);
    let n = y.len();
    let mut out = vec![0.0; n];
    for i in 0..n {
        let (start, k) = if i < m {
            (0, i)
        } else if i + m >= n {
            (n - np, i - (n - np))
        } else {
            (i - m, m)
        };
        out[i] = w[k]
            .iter()
            .zip(&y[start..start + np])
            .map(|(a, b)| a * b)
            .sum();
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn five_point_quadratic_matches_the_paper() {
        // Savitzky & Golay (1964) Table I, 5-point quadratic/cubic smoothing:
        // (−3, 12, 17, 12, −3)/35 (common practice; the table is widely reprinted).
        let w = central_weights(2, 2);
        let want = [-3.0, 12.0, 17.0, 12.0, -3.0];
        for (a, b) in w.iter().zip(want) {
            assert!((a - b / 35.0).abs() < 1e-12);
        }
        // 7-point quadratic: (−2, 3, 6, 7, 6, 3, −2)/21, same table.
        let w = central_weights(3, 2);
        let want = [-2.0, 3.0, 6.0, 7.0, 6.0, 3.0, -2.0];
        for (a, b) in w.iter().zip(want) {
            assert!((a - b / 21.0).abs() < 1e-12);
        }
    }

    #[test]
    fn keeps_polynomials() {
        let y: Vec<f64> = (0..30)
            .map(|i| 1.0 + 0.5 * i as f64 - 0.02 * (i * i) as f64)
            .collect();
        let s = savitzky_golay(&y, 3, 2);
        for (a, b) in s.iter().zip(&y) {
            assert!((a - b).abs() < 1e-9);
        }
    }
}
