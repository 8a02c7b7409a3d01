//! The shape of a band in the match: its width and, when computed, its vibronic
//! progression, measured on the trace and predicted for a band, and how far apart they are.
//!
//! **Width.** The measured width is the FWHM of a peak of the processed trace (peaks.rs:
//! half height on each side of the maximum). The predicted width is the FWHM of the band
//! at the same resolution R:
//! - without a vibronic envelope, √(R² + w²), w an intrinsic width estimated from the
//!   orbital's bonding character (`intrinsic_fwhm_estimate`);
//! - with one, the FWHM of the band's vibronic sticks broadened by Gaussians of FWHM R
//!   (`vibronic::gaussian_envelope`), found the same way as on the trace.
//!
//! **Progression.** When the trace's resolution separates the main progression
//! (`vibronic::envelope::resolved_at`: spacing > FWHM/√(2 ln 2)), the band is also compared
//! by its fine structure: the maxima inside the band (`fine_maxima`: at least 5 % of the
//! band's height and 3 % prominence, and above the noise on the trace), their number (the
//! visible quanta) and their median spacing, on the trace and on the predicted envelope at
//! the trace's resolution.
//!
//! **Mismatch.** s = max(|ln(W_meas/W_pred)|, |ln(d_meas/d_pred)|, |ln(n_meas/n_pred)|),
//! the spacing and count terms only for a resolved progression (a resolved band whose
//! measured trace shows fewer than two maxima has no spacing term, and its count term says
//! it). The pair cost adds λ_s · min(s, `MAX_SHAPE_LOG`) (assign.rs) and s enters the
//! confidence (confidence.rs).

use serde::Serialize;

use super::peaks::find_peaks;
use crate::vibronic::gaussian_envelope;

/// Largest shape mismatch counted in the cost and the confidence.
pub const MAX_SHAPE_LOG: f64 = 2.0;

/// Intrinsic (vibrational) FWHM (eV) of a valence band estimated from the bonding character
/// of its orbital, when no vibronic envelope is computed: 0.3 eV for a nonbonding orbital,
/// 0.7 eV for a bonding or antibonding one, 0.5 eV when unknown. Set by judgement from the
/// typical He I band widths of small molecules (Turner et al., *Molecular Photoelectron
/// Spectroscopy*, 1970; from memory): lone-pair bands are a few tenths of an eV wide, bands
/// of bond orbitals most of an eV. Good to a factor of about two (water's 3a1 band, broad
/// from a bending progression, has a nonbonding orbital by its bond overlap population).
pub fn intrinsic_fwhm_estimate(character: Option<&str>) -> f64 {
    match character {
        Some("nonbonding") => 0.3,
        Some("bonding") | Some("antibonding") => 0.7,
        _ => 0.5,
    }
}

/// A band's vibronic structure for the match.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VibronicShape {
    /// Sticks: (energy relative to the band's vertical energy, eV; intensity, sum 1).
    pub sticks: Vec<(f64, f64)>,
    /// Spacing of the main progression (eV), if the band has one.
    pub spacing_ev: Option<f64>,
    /// Whether the trace's resolution separates the main progression.
    pub resolved: bool,
}

/// What the match knows of a predicted band's shape.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub enum PredictedShape {
    /// An intrinsic FWHM estimate (eV), combined in quadrature with the resolution.
    Width(f64),
    Vibronic(VibronicShape),
}

/// Maxima of a band on a curve.
#[derive(Debug, Clone, PartialEq)]
pub struct Fine {
    /// FWHM of the band (eV).
    pub fwhm_ev: f64,
    /// Positions of the maxima inside the band (eV, increasing).
    pub maxima: Vec<f64>,
}

impl Fine {
    /// Median spacing of neighbouring maxima, with two maxima or more.
    pub fn spacing_ev(&self) -> Option<f64> {
        let mut d: Vec<f64> = self.maxima.windows(2).map(|w| w[1] - w[0]).collect();
        if d.is_empty() {
            return None;
        }
        d.sort_by(|a, b| a.total_cmp(b));
        Some(d[d.len() / 2])
    }
}

/// The progression part of a pair's comparison.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ProgressionCheck {
    /// The trace's resolution separates the predicted main progression.
    pub resolved: bool,
    /// Spacing of the predicted main progression (eV).
    pub predicted_spacing_ev: Option<f64>,
    /// Median spacing of the maxima inside the measured band (eV); None with fewer than two.
    pub measured_spacing_ev: Option<f64>,
    /// Maxima of the predicted envelope at the trace's resolution (visible quanta).
    pub predicted_maxima: usize,
    /// Maxima inside the measured band.
    pub measured_maxima: usize,
}

/// The shape comparison of one pair.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ShapeCheck {
    /// FWHM of the measured peak (eV).
    pub width_measured_ev: f64,
    /// FWHM of the predicted band at the trace's resolution (eV).
    pub width_predicted_ev: f64,
    /// ln(measured / predicted width).
    pub width_log_ratio: f64,
    /// The vibronic comparison, when the band's envelope was computed.
    pub progression: Option<ProgressionCheck>,
    /// s (module text): the largest |ln ratio| of width, spacing and visible quanta.
    pub mismatch: f64,
}

/// FWHM of the maximum of `y` (same grid as `x`): half height reached walking outwards
/// from the highest point (linear interpolation); the whole range when not reached.
pub fn fwhm_of(x: &[f64], y: &[f64]) -> f64 {
    let Some((k, &top)) = y.iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1)) else {
        return 0.0;
    };
    let half = 0.5 * top;
    let mut lo = x[0];
    for j in (0..k).rev() {
        if y[j] <= half {
            let t = (y[j + 1] - half) / (y[j + 1] - y[j]).max(1e-300);
            lo = x[j + 1] + t * (x[j] - x[j + 1]);
            break;
        }
    }
    let mut hi = x[x.len() - 1];
    for j in k + 1..y.len() {
        if y[j] <= half {
            let t = (y[j - 1] - half) / (y[j - 1] - y[j]).max(1e-300);
            hi = x[j - 1] + t * (x[j] - x[j - 1]);
            break;
        }
    }
    hi - lo
}

/// Maxima inside one band of a curve: at least 5 % of the curve's highest point and 3 %
/// prominence, and `min_abs` (the noise threshold) high and prominent.
pub fn fine_maxima(x: &[f64], y: &[f64], min_abs: f64) -> Vec<f64> {
    let top = y.iter().cloned().fold(0.0, f64::max);
    if !(top > 0.0) || x.len() < 3 {
        return Vec::new();
    }
    let min_prom = (0.03 * top).max(min_abs);
    find_peaks(x, y, 0.0, min_prom)
        .into_iter()
        .filter(|p| p.height >= 0.05 * top)
        .map(|p| p.energy_ev)
        .collect()
}

/// The predicted band at resolution `resolution_ev` on a grid of step `step_ev` about its
/// position 0: (FWHM at `band_resolution_ev`, maxima at `resolution_ev`).
pub fn predicted_fine(
    shape: &PredictedShape,
    resolution_ev: f64,
    band_resolution_ev: f64,
    step_ev: f64,
) -> Fine {
    match shape {
        PredictedShape::Width(w) => Fine {
            fwhm_ev: (band_resolution_ev.powi(2) + w * w).sqrt(),
            maxima: vec![0.0],
        },
        PredictedShape::Vibronic(v) => {
            let curve = |r: f64| -> (Vec<f64>, Vec<f64>) {
                let lo = v.sticks.iter().map(|s| s.0).fold(0.0, f64::min) - 3.0 * r;
                let hi = v.sticks.iter().map(|s| s.0).fold(0.0, f64::max) + 3.0 * r;
                let step = step_ev.min(r / 8.0).max(1e-4);
                let n = (((hi - lo) / step).ceil() as usize + 1).clamp(3, 40_001);
                gaussian_envelope(&v.sticks, r, lo, hi, n)
                    .into_iter()
                    .unzip()
            };
            let (bx, by) = curve(band_resolution_ev);
            let (fx, fy) = curve(resolution_ev);
            Fine {
                fwhm_ev: fwhm_of(&bx, &by),
                maxima: fine_maxima(&fx, &fy, 0.0),
            }
        }
    }
}

/// Compare a predicted band (`pred`, from `predicted_fine`) with a measured one (`meas`).
pub fn compare_shapes(shape: &PredictedShape, pred: &Fine, meas: &Fine) -> ShapeCheck {
    let wr = (meas.fwhm_ev.max(1e-6) / pred.fwhm_ev.max(1e-6)).ln();
    let mut mismatch = wr.abs();
    let progression = match shape {
        PredictedShape::Width(_) => None,
        PredictedShape::Vibronic(v) => {
            let measured_spacing = meas.spacing_ev();
            if v.resolved {
                if let (Some(dm), Some(dp)) = (measured_spacing, v.spacing_ev) {
                    mismatch = mismatch.max((dm / dp).ln().abs());
                }
                let (nm, np) = (meas.maxima.len().max(1), pred.maxima.len().max(1));
                mismatch = mismatch.max((nm as f64 / np as f64).ln().abs());
            }
            Some(ProgressionCheck {
                resolved: v.resolved,
                predicted_spacing_ev: v.spacing_ev,
                measured_spacing_ev: measured_spacing,
                predicted_maxima: pred.maxima.len(),
                measured_maxima: meas.maxima.len(),
            })
        }
    };
    ShapeCheck {
        width_measured_ev: meas.fwhm_ev,
        width_predicted_ev: pred.fwhm_ev,
        width_log_ratio: wr,
        progression,
        mismatch,
    }
}

/// `y` on the uniform grid of step `step_ev` convolved with a unit-area Gaussian of FWHM
/// `fwhm_ev` (the ends padded with the end values).
pub fn gaussian_smooth(y: &[f64], step_ev: f64, fwhm_ev: f64) -> Vec<f64> {
    let sigma = fwhm_ev / (8.0 * std::f64::consts::LN_2).sqrt() / step_ev;
    let half = (4.0 * sigma).ceil() as i64;
    if half < 1 || y.is_empty() {
        return y.to_vec();
    }
    let w: Vec<f64> = (-half..=half)
        .map(|k| (-0.5 * (k as f64 / sigma).powi(2)).exp())
        .collect();
    let norm: f64 = w.iter().sum();
    let n = y.len() as i64;
    (0..n)
        .map(|i| {
            (-half..=half)
                .zip(&w)
                .map(|(k, wk)| wk * y[(i + k).clamp(0, n - 1) as usize])
                .sum::<f64>()
                / norm
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fwhm_of_a_gaussian() {
        // exp(−x²/(2σ²)) has FWHM 2√(2 ln 2) σ (exact).
        let x: Vec<f64> = (0..2001).map(|i| -1.0 + i as f64 * 0.001).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|v| (-0.5 * (v / 0.1f64).powi(2)).exp())
            .collect();
        assert!((fwhm_of(&x, &y) - 0.235482).abs() < 1e-4);
        // smoothing by a Gaussian of FWHM f adds in quadrature (exact for Gaussians)
        let s = gaussian_smooth(&y, 0.001, 0.2);
        let expect = (0.235482f64.powi(2) + 0.04).sqrt();
        assert!(
            (fwhm_of(&x, &s) - expect).abs() < 2e-3,
            "{}",
            fwhm_of(&x, &s)
        );
    }

    #[test]
    fn a_resolved_progression_is_counted_and_spaced() {
        // Poisson progression S = 1 (Franck–Condon factors of a displaced oscillator,
        // exact): e^{-1}/v! for v = 0..5, 0.2 eV apart, at 0.05 eV resolution.
        let mut f = 1.0;
        let sticks: Vec<(f64, f64)> = (0..6)
            .map(|v| {
                if v > 0 {
                    f *= v as f64;
                }
                (0.2 * v as f64 - 0.2, (-1.0f64).exp() / f)
            })
            .collect();
        let shape = PredictedShape::Vibronic(VibronicShape {
            sticks,
            spacing_ev: Some(0.2),
            resolved: true,
        });
        let p = predicted_fine(&shape, 0.05, 0.3, 0.005);
        // maxima ≥ 5 % of the highest (e^{-1}): v = 0..3 (1/6 = 17 %); v = 4 is 4 %
        assert_eq!(p.maxima.len(), 4, "{p:?}");
        assert!((p.spacing_ev().unwrap() - 0.2).abs() < 0.005);
        // a measured band twice as wide with half the spacing is a mismatch of ln 2
        let meas = Fine {
            fwhm_ev: 2.0 * p.fwhm_ev,
            maxima: vec![0.0, 0.1, 0.2, 0.3],
        };
        let c = compare_shapes(&shape, &p, &meas);
        assert!((c.mismatch - 2f64.ln()).abs() < 1e-9, "{c:?}");
        let same = compare_shapes(&shape, &p, &p);
        assert!(same.mismatch < 1e-12);
    }
}
