//! Peak detection by topographic prominence.
//!
//! A peak is a local maximum; its prominence is its height above the higher of the two
//! lowest points between it and the nearest higher point (or the trace end) on either side
//! (the usual definition from topography, common practice in signal processing). Peaks
//! whose prominence is below `min_prominence` × (max − min of the trace) are dropped, so
//! noise ripples on a band's flank do not count as bands. The position is refined by the
//! vertex of the parabola through the maximum and its two neighbours (common practice).

use serde::Serialize;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Peak {
    /// Refined position (eV).
    pub energy_ev: f64,
    /// Height of the (smoothed, background-free) trace at the maximum.
    pub height: f64,
    pub prominence: f64,
    /// Full width at half height (eV).
    pub fwhm_ev: f64,
    /// Area estimate, 1.0645 × height × FWHM.
    pub area: f64,
    /// Grid index of the maximum.
    #[serde(skip)]
    pub index: usize,
}

/// Prominence of the local maximum at `i`.
fn prominence(y: &[f64], i: usize) -> f64 {
    let h = y[i];
    let mut left_min = h;
    let mut j = i;
    while j > 0 {
        j -= 1;
        if y[j] > h {
            break;
        }
        left_min = left_min.min(y[j]);
    }
    let mut right_min = h;
    let mut j = i;
    while j + 1 < y.len() {
        j += 1;
        if y[j] > h {
            break;
        }
        right_min = right_min.min(y[j]);
    }
    h - left_min.max(right_min)
}

/// Peaks of `y` on the increasing grid `x`, strongest prominence first in ties of order;
/// returned sorted by energy.
pub fn find_peaks(x: &[f64], y: &[f64], min_prominence: f64, min_abs: f64) -> Vec<Peak> {
    let n = y.len();
    if n < 3 {
        return Vec::new();
    }
    let ymax = y.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
    let ymin = y.iter().cloned().fold(f64::INFINITY, f64::min);
    let range = ymax - ymin;
    if !(range > 0.0) {
        return Vec::new();
    }
    let mut out = Vec::new();
    let mut i = 1;
    while i + 1 < n {
        // a plateau counts once, at its middle
        if y[i] > y[i - 1] {
            let mut j = i;
            while j + 1 < n && y[j + 1] == y[i] {
                j += 1;
            }
            if j + 1 < n && y[j + 1] < y[i] {
                let k = (i + j) / 2;
                let p = prominence(y, k);
                if p >= min_prominence * range && p >= min_abs {
                    let w = half_width(x, y, k, min_abs);
                    out.push(Peak {
                        energy_ev: refine(x, y, k),
                        height: y[k],
                        prominence: p,
                        fwhm_ev: w,
                        area: 1.0645 * y[k].max(0.0) * w,
                        index: k,
                    });
                }
            }
            i = j + 1;
        } else {
            i += 1;
        }
    }
    out
}

/// Full width at half height of the maximum at `k`: walking out on each side to half
/// height; a rise of more than 10 % of the height and more than `noise_rise` (the noise
/// threshold of the prominence) before it is a valley, and that side does not count.
fn half_width(x: &[f64], y: &[f64], k: usize, noise_rise: f64) -> f64 {
    let half = 0.5 * y[k];
    let side = |dir: i64| -> Option<f64> {
        let mut j = k as i64;
        let mut low = y[k];
        loop {
            let nj = j + dir;
            if nj < 0 || nj as usize >= y.len() {
                return None;
            }
            let (a, b) = (j as usize, nj as usize);
            if y[b] <= half {
                // interpolate between a (above) and b (below)
                let t = (y[a] - half) / (y[a] - y[b]).max(1e-300);
                return Some((x[a] + t * (x[b] - x[a]) - x[k]).abs());
            }
            low = low.min(y[b]);
            if y[b] > low + (0.1 * y[k]).max(noise_rise) {
                return None; // a valley before half height (smaller rises are noise)
            }
            j = nj;
        }
    };
    match (side(-1), side(1)) {
        (Some(l), Some(r)) => l + r,
        (Some(l), None) => 2.0 * l,
        (None, Some(r)) => 2.0 * r,
        (None, None) => {
            let step = (x[x.len() - 1] - x[0]) / (x.len() - 1) as f64;
            2.0 * step
        }
    }
}

/// Vertex of the parabola through (x[k−1..=k+1], y[k−1..=k+1]).
fn refine(x: &[f64], y: &[f64], k: usize) -> f64 {
    if k == 0 || k + 1 >= y.len() {
        return x[k];
    }
    let (x0, x1, x2) = (x[k - 1], x[k], x[k + 1]);
    let (y0, y1, y2) = (y[k - 1], y[k], y[k + 1]);
    let d = (x0 - x1) * (x0 - x2) * (x1 - x2);
    if d == 0.0 {
        return x1;
    }
    let a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / d;
    let b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / d;
    if a >= 0.0 {
        return x1;
    }
    let v = -b / (2.0 * a);
    v.clamp(x0, x2)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_two_gaussians_and_ignores_a_ripple() {
        let x: Vec<f64> = (0..1000).map(|i| 10.0 + i as f64 * 0.01).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|&e| {
                (-((e - 12.62) / 0.2).powi(2)).exp()
                    + 0.5 * (-((e - 14.74) / 0.2).powi(2)).exp()
                    + 0.002 * (e * 40.0).sin()
            })
            .collect();
        let p = find_peaks(&x, &y, 0.05, 0.0);
        assert_eq!(p.len(), 2, "{p:?}");
        // exp(−(e/0.2)²) has FWHM 2·0.2·√ln2 = 0.333 eV
        assert!((p[0].fwhm_ev - 0.333).abs() < 0.01, "{p:?}");
        assert!((p[0].energy_ev - 12.62).abs() < 0.01);
        assert!((p[1].energy_ev - 14.74).abs() < 0.01);
    }
}
