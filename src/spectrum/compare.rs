//! The comparison chain: measured trace → smoothing → background → peaks → alignment →
//! assignment. Plain data in, plain data out; printers live in `report`.

use serde::Serialize;

use super::align::{align, AlignOptions};
use super::assign::{
    assigned_pairs, merge_close, Alignment, AssignedPair, MatchOptions, PredictedLine,
};
use super::background;
use super::measured::Measured;
use super::note::Note;
use super::peaks::{find_peaks, Peak};
use super::smooth::savitzky_golay;
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
    pub scale: f64,
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
    pub smoothed: Vec<f64>,
    #[serde(skip)]
    pub background_curve: Vec<f64>,
}

/// Compare predicted `lines` (binding energies) with the `measured` trace (binding-energy
/// axis, increasing).
pub fn compare(
    lines: &[PredictedLine],
    measured: &Measured,
    opt: &CompareOptions,
) -> Result<Comparison> {
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
    let peaks = find_peaks(x, &signal, opt.min_prominence);
    let mut notes = Vec::new();
    if peaks.is_empty() {
        return Err(Error::computation(format!(
            "no peaks found in the measured spectrum at a minimum prominence of {} % of \
                 its range; a lower minimum prominence may find some",
            100.0 * opt.min_prominence
        )));
    }
    let groups = merge_close(lines, opt.merge_tol_ev);
    if groups.is_empty() {
        return Err(Error::computation("no predicted bands to compare with"));
    }
    let peak_e: Vec<f64> = peaks.iter().map(|p| p.energy_ev).collect();
    let window = (x[0], x[x.len() - 1]);
    let mopt = MatchOptions { cap_ev: opt.cap_ev };
    let aopt = AlignOptions {
        max_shift_ev: opt.max_shift_ev,
        step_ev: 0.02,
        fit_scale: opt.fit_scale,
    };
    let ar = align(&groups, &peak_e, &mopt, &aopt);
    if let Some(n) = &ar.note {
        notes.push(n.clone());
    }
    let a: Alignment = ar.alignment;
    if (a.shift_ev.abs() - opt.max_shift_ev).abs() < 0.05 {
        notes.push(Note::ShiftAtSearchEdge {
            limit_ev: opt.max_shift_ev,
        });
    }
    let (pairs, best) = assigned_pairs(&groups, &peak_e, a, &mopt, opt.confidence_scale_ev);
    let matched_bands: Vec<usize> = best.pairs.iter().map(|p| p.0).collect();
    let matched_peaks: Vec<usize> = best.pairs.iter().map(|p| p.1).collect();
    let unassigned_peaks = peaks
        .iter()
        .enumerate()
        .filter(|(j, _)| !matched_peaks.contains(j))
        .map(|(_, p)| p.clone())
        .collect();
    let unseen_bands = groups
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
    Ok(Comparison {
        shift_ev: a.shift_ev,
        scale: a.scale,
        assignments: pairs,
        unassigned_peaks,
        unseen_bands,
        peaks,
        background: bg_name.into(),
        smoothing_window: 2 * m + 1,
        notes,
        energy_ev: x.clone(),
        smoothed,
        background_curve: bg,
    })
}
