//! The comparison chain: measured trace → smoothing → background → sanity (noise, inverted,
//! negative: trace_check.rs) → peaks above the noise → alignment (with the method's
//! plausible shift, method_error.rs) → assignment with calibrated confidences → verdict.
//! Plain data in, plain data out; printers live in `report`.

use serde::Serialize;

use super::align::{align, AlignOptions};
use super::assign::{
    add_shape_costs, assigned_pairs, intensity_costs, log_intensity_ratios, merge_close, Alignment,
    AssignedPair, MatchOptions, PairContext, PredictedLine,
};
use super::background;
use super::band_shape::{
    compare_shapes, fine_maxima, gaussian_smooth, predicted_fine, Fine, PredictedShape, ShapeCheck,
};
use super::measured::Measured;
use super::method_error::MethodError;
use super::note::Note;
use super::peaks::{find_peaks, Peak};
use super::smooth::savitzky_golay;
use super::trace_check::{check_trace, NOISE_K};
use super::verdict::{verdict, Verdict, VerdictInput};
use crate::error::{Error, Result};
use crate::ionization::Region;

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CompareOptions {
    pub region: Region,
    /// Expected band FWHM (eV): sets the smoothing window (a quarter of it each side).
    pub fwhm_ev: f64,
    /// Minimum peak prominence as a fraction of the trace's range.
    pub min_prominence: f64,
    /// Largest residual of an assigned pair (eV).
    pub cap_ev: f64,
    pub max_shift_ev: f64,
    pub fit_scale: bool,
    /// Predicted bands closer than this (eV) are one line ("a + b").
    pub merge_tol_ev: f64,
    /// τ of the confidence map (assign.rs).
    pub confidence_scale_ev: f64,
    /// λ of the intensity term of the pair cost (eV per factor e; assign.rs).
    pub intensity_ev: f64,
    /// λ_s of the shape term of the pair cost (eV per unit of mismatch; band_shape.rs).
    pub shape_ev: f64,
    /// Error statistics of the prediction method, when known.
    pub method_error: Option<MethodError>,
}

impl CompareOptions {
    /// Defaults for a region (documented in the README: cap 1.5 eV valence / 2 eV core,
    /// max shift 6 eV valence / 25 eV core, prominence 5 %, merge 0.05 eV, τ 0.25 eV).
    pub fn defaults(region: Region, fwhm_ev: f64) -> Self {
        CompareOptions {
            region,
            fwhm_ev,
            min_prominence: 0.05,
            cap_ev: match region {
                Region::Valence => 1.5,
                Region::Core => 2.0,
            },
            max_shift_ev: match region {
                Region::Valence => 6.0,
                Region::Core => 25.0,
            },
            fit_scale: false,
            merge_tol_ev: 0.05,
            confidence_scale_ev: 0.25,
            intensity_ev: 0.1,
            shape_ev: 0.2,
            method_error: None,
        }
    }
}

/// A predicted line no peak was assigned to.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UnseenBand {
    pub label: String,
    pub predicted_ev: f64,
    pub aligned_ev: f64,
    /// Whether the aligned energy lies inside the measured window.
    pub inside_window: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Comparison {
    pub shift_ev: f64,
    /// Standard error of the shift (eV); None with no degree of freedom left.
    pub shift_sd_ev: Option<f64>,
    /// Plausible range of the shift for the method (eV), when the method is known.
    pub shift_bounds_ev: Option<(f64, f64)>,
    /// Pairs minus fitted parameters.
    pub degrees_of_freedom: i64,
    pub scale: f64,
    pub verdict: Verdict,
    pub verdict_reason: String,
    /// Noise standard deviation of the raw trace (trace_check.rs).
    pub noise: f64,
    /// Smallest prominence a peak needed (intensity units).
    pub peak_threshold: f64,
    pub assignments: Vec<AssignedPair>,
    /// Measured peaks with no band.
    pub unassigned_peaks: Vec<Peak>,
    pub unseen_bands: Vec<UnseenBand>,
    pub peaks: Vec<Peak>,
    pub background: String,
    pub smoothing_window: usize,
    /// Typed notes (the printers decide how to show them).
    #[serde(skip)]
    pub notes: Vec<Note>,
    /// Processed trace (binding energy, smoothed, background) for plotting.
    #[serde(skip)]
    pub energy_ev: Vec<f64>,
    #[serde(skip)]
    pub raw: Vec<f64>,
    #[serde(skip)]
    pub smoothed: Vec<f64>,
    #[serde(skip)]
    pub background_curve: Vec<f64>,
}

/// The trace side of the chain, before any predicted band is needed.
struct Front {
    m: usize,
    smoothed: Vec<f64>,
    bg: Vec<f64>,
    bg_name: &'static str,
    noise: f64,
    /// Smoothed trace minus background.
    signal: Vec<f64>,
    /// Smallest prominence (and height within a band) above the noise.
    min_abs: f64,
    peaks: Vec<Peak>,
    peak_threshold: f64,
    notes: Vec<Note>,
}

fn front(measured: &Measured, opt: &CompareOptions) -> Result<Front> {
    let x = &measured.energy_ev;
    let step = measured.mean_step();
    let m = ((0.25 * opt.fwhm_ev / step).round() as usize).clamp(2, 50);
    let m = m.min((x.len().saturating_sub(1)) / 2).max(1);
    let smoothed = savitzky_golay(&measured.intensity, m, 2);
    let (bg, bg_name) = match opt.region {
        Region::Valence => (background::linear(x, &smoothed), "linear"),
        Region::Core => (background::shirley(x, &smoothed), "shirley"),
    };
    let signal: Vec<f64> = smoothed.iter().zip(&bg).map(|(a, b)| a - b).collect();
    let check = check_trace(&measured.intensity, &signal).map_err(Error::input)?;
    let ymax = measured
        .intensity
        .iter()
        .fold(0.0f64, |m, v| m.max(v.abs()));
    // k × noise, and a floor of 1e-6 of the trace's level below which a ripple is rounding.
    let min_abs = (NOISE_K * check.noise).max(1e-6 * ymax);
    let range = signal.iter().cloned().fold(f64::NEG_INFINITY, f64::max)
        - signal.iter().cloned().fold(f64::INFINITY, f64::min);
    let peak_threshold = min_abs.max(opt.min_prominence * range.max(0.0));
    let peaks = find_peaks(x, &signal, opt.min_prominence, min_abs);
    let mut notes = Vec::new();
    if let Some((count, lowest)) = check.negative {
        notes.push(Note::NegativeIntensities { count, lowest });
    }
    if peaks.is_empty() {
        return Err(Error::computation(format!(
            "no peak stands above the noise, so nothing is assigned: the noise is estimated \
             at σ = {:.3e} (from the second differences of the trace) and a peak needs a \
             prominence of at least {NOISE_K}σ and {} % of the trace's range ({:.3e})",
            check.noise,
            100.0 * opt.min_prominence,
            peak_threshold
        )));
    }
    Ok(Front {
        m,
        smoothed,
        bg,
        bg_name,
        noise: check.noise,
        signal,
        min_abs,
        peaks,
        peak_threshold,
        notes,
    })
}

/// Check a trace on its own (noise, inverted, a peak above the noise): what `compare` would
/// refuse, found before any prediction is computed.
pub fn check_measured(measured: &Measured, opt: &CompareOptions) -> Result<()> {
    front(measured, opt).map(|_| ())
}

/// Compare predicted `lines` (binding energies) with the `measured` trace (binding-energy
/// axis, increasing).
pub fn compare(
    lines: &[PredictedLine],
    measured: &Measured,
    opt: &CompareOptions,
) -> Result<Comparison> {
    let x = &measured.energy_ev;
    let Front {
        m,
        smoothed,
        bg,
        bg_name,
        noise,
        signal,
        min_abs,
        peaks,
        peak_threshold,
        mut notes,
    } = front(measured, opt)?;
    let groups = merge_close(lines, opt.merge_tol_ev);
    if groups.is_empty() {
        return Err(Error::computation("no predicted bands to compare with"));
    }
    let mut bl = band_level(
        &groups,
        x,
        &signal,
        peaks,
        min_abs,
        opt,
        measured.mean_step(),
    );
    notes.append(&mut bl.notes);
    let shapes = shape_matrix(&groups, x, &signal, min_abs, &bl);
    let peaks = bl.peaks;
    let peak_e: Vec<f64> = peaks.iter().map(|p| p.energy_ev).collect();
    let areas: Vec<f64> = peaks.iter().map(|p| p.area).collect();
    let window = (x[0], x[x.len() - 1]);
    let mopt = MatchOptions {
        cap_ev: opt.cap_ev,
        intensity_ev: opt.intensity_ev,
        shape_ev: opt.shape_ev,
    };
    let mut extra = intensity_costs(&log_intensity_ratios(&groups, &areas), opt.intensity_ev);
    add_shape_costs(&mut extra, &shapes, opt.shape_ev);
    let aopt = AlignOptions {
        max_shift_ev: opt.max_shift_ev,
        step_ev: 0.02,
        fit_scale: opt.fit_scale,
    };
    let ar = align(&groups, &peak_e, Some(&extra), &mopt, &aopt);
    if let Some(n) = &ar.note {
        notes.push(n.clone());
    }
    let a: Alignment = ar.alignment;
    if (a.shift_ev.abs() - opt.max_shift_ev).abs() < 0.05 {
        notes.push(Note::ShiftAtSearchEdge {
            limit_ev: opt.max_shift_ev,
        });
    }
    let params = if a.scale != 1.0 { 2 } else { 1 };
    if ar.dof < 2 {
        notes.push(Note::FewDegreesOfFreedom {
            pairs: ar.n_pairs,
            parameters: params,
        });
    }
    let shift_bounds = opt.method_error.map(|m| m.shift_bounds_ev());
    // the shift at the pairs' mean energy (with a scale the intercept alone means little)
    let mut shift_plausible = true;
    if let (Some(me), Some((lo, hi))) = (opt.method_error, shift_bounds) {
        let mean_pred = if groups.is_empty() {
            0.0
        } else {
            groups.iter().map(|g| g.energy_ev).sum::<f64>() / groups.len() as f64
        };
        let eff = a.apply(mean_pred) - mean_pred;
        if eff < lo || eff > hi {
            shift_plausible = opt.region == Region::Core;
            notes.push(Note::ShiftImplausible {
                shift_ev: eff,
                method: me.method.to_string(),
                low_ev: lo,
                high_ev: hi,
            });
        }
    }
    let ctx = PairContext {
        areas: &areas,
        sigma_ev: opt.method_error.map(|m| m.sd_ev),
        tau_ev: opt.confidence_scale_ev,
        shapes: &shapes,
    };
    let (pairs, best) = assigned_pairs(&groups, &peak_e, a, &mopt, &ctx);
    let matched_bands: Vec<usize> = best.pairs.iter().map(|p| p.0).collect();
    let matched_peaks: Vec<usize> = best.pairs.iter().map(|p| p.1).collect();
    let unassigned_peaks: Vec<Peak> = peaks
        .iter()
        .enumerate()
        .filter(|(j, _)| !matched_peaks.contains(j))
        .map(|(_, p)| p.clone())
        .collect();
    let unseen_bands: Vec<UnseenBand> = groups
        .iter()
        .enumerate()
        .filter(|(i, _)| !matched_bands.contains(i))
        .map(|(_, g)| {
            let al = a.apply(g.energy_ev);
            UnseenBand {
                label: g.label.clone(),
                predicted_ev: g.energy_ev,
                aligned_ev: al,
                inside_window: al >= window.0 && al <= window.1,
            }
        })
        .collect();
    let area_of = |e: f64| {
        peaks
            .iter()
            .find(|p| p.energy_ev == e)
            .map_or(0.0, |p| p.area)
    };
    let vin = VerdictInput {
        pairs: pairs
            .iter()
            .map(|p| {
                (
                    p.confidence,
                    p.low_confidence,
                    area_of(p.measured_ev),
                    p.intensity_log_ratio.map(f64::abs),
                )
            })
            .collect(),
        unassigned_areas: unassigned_peaks.iter().map(|p| p.area).collect(),
        unseen_inside: unseen_bands
            .iter()
            .filter(|u| u.inside_window)
            .map(|u| u.label.clone())
            .collect(),
        shift_plausible,
        dof: ar.dof,
    };
    let (verdict, verdict_reason) = verdict(&vin);
    Ok(Comparison {
        shift_ev: a.shift_ev,
        shift_sd_ev: ar.shift_sd_ev,
        shift_bounds_ev: shift_bounds,
        degrees_of_freedom: ar.dof,
        scale: a.scale,
        verdict,
        verdict_reason,
        noise,
        peak_threshold,
        assignments: pairs,
        unassigned_peaks,
        unseen_bands,
        peaks,
        background: bg_name.into(),
        smoothing_window: 2 * m + 1,
        notes,
        energy_ev: x.clone(),
        raw: measured.intensity.clone(),
        smoothed,
        background_curve: bg,
    })
}

/// The peaks the bands are matched with, and the resolutions the shapes are compared at.
struct BandLevel {
    peaks: Vec<Peak>,
    /// The curve the band-level peaks were found on (the processed trace, or it smoothed
    /// further when a progression is resolved).
    band_signal: Vec<f64>,
    /// Instrument FWHM (eV).
    resolution_ev: f64,
    /// Resolution of `band_signal`: √(instrument² + further smoothing²) (eV).
    band_resolution_ev: f64,
    step_ev: f64,
    notes: Vec<Note>,
}

/// When the trace resolves a predicted progression, every member of it would be a peak of
/// its own: the bands are then found on the trace smoothed by a Gaussian 1.25 × the
/// largest resolved spacing wide (two equal lines d apart merge below FWHM d/0.849;
/// band_shape.rs), and the fine structure is read inside each band on the processed trace.
fn band_level(
    groups: &[PredictedLine],
    x: &[f64],
    signal: &[f64],
    peaks: Vec<Peak>,
    min_abs: f64,
    opt: &CompareOptions,
    step_ev: f64,
) -> BandLevel {
    let mut resolved = Vec::new();
    let mut unresolved = Vec::new();
    let mut spacing: f64 = 0.0;
    for g in groups {
        if let Some(PredictedShape::Vibronic(v)) = &g.shape {
            match (v.resolved, v.spacing_ev) {
                (true, Some(d)) => {
                    resolved.push(g.label.clone());
                    spacing = spacing.max(d);
                }
                _ => unresolved.push(g.label.clone()),
            }
        }
    }
    let mut notes = Vec::new();
    if !unresolved.is_empty() {
        notes.push(Note::ProgressionsUnresolved {
            bands: unresolved,
            fwhm_ev: opt.fwhm_ev,
        });
    }
    let plain = |peaks| BandLevel {
        peaks,
        band_signal: signal.to_vec(),
        resolution_ev: opt.fwhm_ev,
        band_resolution_ev: opt.fwhm_ev,
        step_ev,
        notes: Vec::new(),
    };
    if resolved.is_empty() {
        return BandLevel {
            notes,
            ..plain(peaks)
        };
    }
    let kernel = 1.25 * spacing;
    let smooth = gaussian_smooth(signal, step_ev, kernel);
    let band_peaks = find_peaks(x, &smooth, opt.min_prominence, min_abs);
    if band_peaks.is_empty() {
        return BandLevel {
            notes,
            ..plain(peaks)
        };
    }
    notes.push(Note::ProgressionsResolved {
        bands: resolved,
        smoothing_ev: kernel,
    });
    BandLevel {
        peaks: band_peaks,
        band_signal: smooth,
        resolution_ev: opt.fwhm_ev,
        band_resolution_ev: (opt.fwhm_ev.powi(2) + kernel * kernel).sqrt(),
        step_ev,
        notes,
    }
}

/// Grid range of the band whose maximum is at `k` on `y`: outwards until the curve falls
/// below a fifth of the maximum or turns up again (a valley).
fn band_range(y: &[f64], k: usize) -> (usize, usize) {
    let floor = 0.2 * y[k];
    let mut lo = k;
    while lo > 0 && y[lo - 1] > floor && y[lo - 1] <= y[lo] {
        lo -= 1;
    }
    let mut hi = k;
    while hi + 1 < y.len() && y[hi + 1] > floor && y[hi + 1] <= y[hi] {
        hi += 1;
    }
    (lo, hi)
}

/// The shape comparison of every band with a shape against every peak (band_shape.rs).
fn shape_matrix(
    groups: &[PredictedLine],
    x: &[f64],
    signal: &[f64],
    min_abs: f64,
    bl: &BandLevel,
) -> Vec<Vec<Option<ShapeCheck>>> {
    if groups.iter().all(|g| g.shape.is_none()) {
        return Vec::new();
    }
    let vibronic = groups
        .iter()
        .any(|g| matches!(g.shape, Some(PredictedShape::Vibronic(_))));
    let measured: Vec<Fine> = bl
        .peaks
        .iter()
        .map(|p| Fine {
            fwhm_ev: p.fwhm_ev,
            maxima: if vibronic {
                let (lo, hi) = band_range(&bl.band_signal, p.index);
                fine_maxima(&x[lo..=hi], &signal[lo..=hi], min_abs)
            } else {
                vec![p.energy_ev]
            },
        })
        .collect();
    groups
        .iter()
        .map(|g| {
            let shape = g.shape.as_ref();
            let pred = shape
                .map(|s| predicted_fine(s, bl.resolution_ev, bl.band_resolution_ev, bl.step_ev));
            measured
                .iter()
                .map(|m| Some(compare_shapes(shape?, pred.as_ref()?, m)))
                .collect()
        })
        .collect()
}
