//! Assigning a predicted spectrum to a measured trace: the bands the photon reaches become
//! lines, which `compare` aligns and matches with the measured peaks. Plain data in and
//! out; the printers live in `report`.
//!
//! Line intensities: valence, occupation × degeneracy × pole strength or one-hole weight
//! (the model the confidence is calibrated with); core levels, the same times the atomic
//! subshell cross section per electron at the photon energy (Gelius model,
//! cross_section.rs; Yeh & Lindau 1985), so that an O 1s line is expected stronger than a
//! C 1s line of the same count — when every core band has a tabulated cross section, else
//! occupation alone for all. Line shapes (valence only; band_shape.rs): the band's
//! vibronic envelope when one was computed for it, else an intrinsic width estimated from
//! its bonding character.

use super::assign::PredictedLine;
use super::band_shape::{intrinsic_fwhm_estimate, PredictedShape, VibronicShape};
use super::compare::{check_measured, compare, CompareOptions, Comparison};
use super::cross_section::gelius_intensity;
use super::measured::Measured;
use super::method_error::{BasisClass, MethodError};
use super::note::Note;
use super::photon::Photon;
use super::predicted::{core_z, sticks_from_bands, IntensityModel, Stick, StickOptions};
use crate::error::Result;
use crate::ionization::{Band, Region};
use crate::vibronic::band::VibronicBand;
use crate::vibronic::envelope::{progression_spacing_ev, resolved_at};

/// How an assignment is made. Unset fields take the region's defaults (`CompareOptions`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AssignmentOptions {
    pub region: Region,
    /// Photon source of the measurement; None: no band is left out for its energy, and the
    /// default width is that of the region's usual source (He I valence, Al Kα core).
    pub photon: Option<Photon>,
    /// Instrument Gaussian FWHM (eV) of the bands; it also sets the smoothing window.
    pub fwhm_ev: Option<f64>,
    /// Smallest peak prominence, a fraction of the trace's range.
    pub min_prominence: Option<f64>,
    /// Largest residual of an assigned pair (eV).
    pub max_residual_ev: Option<f64>,
    /// Largest global shift searched (eV).
    pub max_shift_ev: Option<f64>,
    /// Fit a linear scale as well as a shift.
    pub fit_scale: bool,
    /// Which error statistics the prediction's basis set gets (`method_error.rs`).
    pub basis: BasisClass,
}

impl AssignmentOptions {
    pub fn new(region: Region) -> Self {
        AssignmentOptions {
            region,
            photon: None,
            fwhm_ev: None,
            min_prominence: None,
            max_residual_ev: None,
            max_shift_ev: None,
            fit_scale: false,
            basis: BasisClass::Larger,
        }
    }

    /// The source used for default widths.
    pub fn photon_or_default(&self) -> Photon {
        self.photon.unwrap_or(match self.region {
            Region::Valence => Photon::He1,
            Region::Core => Photon::AlKa,
        })
    }
}

/// The comparison with the sticks it was made from.
#[derive(Debug, Clone)]
pub struct Assignment {
    /// Alignment, pairs, unmatched bands and peaks, and every note.
    pub comparison: Comparison,
    /// The predicted lines before alignment.
    pub sticks: Vec<Stick>,
    /// Gaussian FWHM used (eV).
    pub fwhm: f64,
}

impl AssignmentOptions {
    /// The comparison options these give (the region's defaults where unset).
    pub fn compare_options(&self) -> CompareOptions {
        let photon = self.photon_or_default();
        let fwhm = self
            .fwhm_ev
            .unwrap_or_else(|| photon.default_fwhm_ev(self.region));
        let mut copt = CompareOptions::defaults(self.region, fwhm);
        if let Some(p) = self.min_prominence {
            copt.min_prominence = p;
        }
        if let Some(c) = self.max_residual_ev {
            copt.cap_ev = c;
        }
        if let Some(s) = self.max_shift_ev {
            copt.max_shift_ev = s;
        }
        copt.fit_scale = self.fit_scale;
        copt
    }
}

/// What `assign_bands` would refuse in the trace alone (inverted, no peak above the noise),
/// before the prediction is computed.
pub fn check_trace(measured: &Measured, opts: &AssignmentOptions) -> Result<()> {
    check_measured(measured, &opts.compare_options())
}

/// Assign `bands` to the peaks of `measured` (binding-energy axis, increasing).
pub fn assign_bands(
    bands: &[Band],
    measured: &Measured,
    opts: &AssignmentOptions,
) -> Result<Assignment> {
    assign_bands_with_envelopes(bands, &[], measured, opts)
}

/// The vibronic band computed for `band`, if any: same label, else same position within
/// 0.05 eV (a band without a label).
fn vibronic_of<'a>(band: &Band, vibronic: &'a [VibronicBand]) -> Option<&'a VibronicBand> {
    vibronic
        .iter()
        .find(|v| v.label.as_deref() == Some(band.label.as_str()))
        .or_else(|| {
            vibronic
                .iter()
                .find(|v| v.label.is_none() && (v.vertical_ev - band.ie_ev).abs() < 0.05)
        })
}

/// A vibronic band as a shape for the match: its lines relative to its vertical energy,
/// intensities summing to 1, and whether `fwhm_ev` resolves its main progression.
pub fn vibronic_shape(v: &VibronicBand, fwhm_ev: f64) -> VibronicShape {
    let total: f64 = v.lines.iter().map(|l| l.intensity).sum::<f64>().max(1e-300);
    VibronicShape {
        sticks: v
            .lines
            .iter()
            .map(|l| (l.energy_ev - v.vertical_ev, l.intensity / total))
            .collect(),
        spacing_ev: progression_spacing_ev(v),
        resolved: resolved_at(v, fwhm_ev),
    }
}

/// The shape the match uses for a band (module text).
fn shape_of(band: &Band, vibronic: &[VibronicBand], fwhm_ev: f64) -> Option<PredictedShape> {
    if band.region != Region::Valence {
        return None;
    }
    Some(match vibronic_of(band, vibronic) {
        Some(v) if !v.lines.is_empty() => PredictedShape::Vibronic(vibronic_shape(v, fwhm_ev)),
        _ => PredictedShape::Width(intrinsic_fwhm_estimate(band.character.as_deref())),
    })
}

/// Per core band, the Gelius cross section per electron relative to the occupation model
/// (module text); None when any core band lacks a tabulated value.
fn core_cross_sections(bands: &[Band], hv_ev: f64) -> Option<Vec<f64>> {
    bands
        .iter()
        .map(|b| {
            let shares: f64 = b.makeup.iter().map(|m| m.fraction).sum();
            let g = gelius_intensity(b, hv_ev);
            let f = g.intensity / (b.default_intensity() * shares);
            (f.is_finite() && f > 0.0 && g.untabulated_fraction.abs() < 0.2).then_some(f)
        })
        .collect()
}

/// `assign_bands` with the vibronic envelopes computed for some of the bands (matched by
/// label): their shapes, and where the trace resolves them their progressions, enter the
/// match (band_shape.rs).
pub fn assign_bands_with_envelopes(
    bands: &[Band],
    vibronic: &[VibronicBand],
    measured: &Measured,
    opts: &AssignmentOptions,
) -> Result<Assignment> {
    let photon = opts.photon_or_default();
    let fwhm = opts
        .fwhm_ev
        .unwrap_or_else(|| photon.default_fwhm_ev(opts.region));
    let mut stick_notes = Vec::new();
    let so = StickOptions {
        photon: opts.photon.unwrap_or(Photon::Custom(f64::MAX)),
        intensity: IntensityModel::Occupation,
        gaussian_fwhm_ev: fwhm,
        weight: 1.0,
        component: 0,
    };
    let (sticks, excluded) = sticks_from_bands(bands, &so, &mut stick_notes);
    let band_of = |s: &Stick| {
        bands
            .iter()
            .find(|b| b.label == s.label && b.ie_ev == s.binding_ev)
    };
    let sigma = match opts.region {
        Region::Core => core_cross_sections(bands, photon.energy_ev()),
        Region::Valence => None,
    };
    let lines: Vec<PredictedLine> = sticks
        .iter()
        .map(|s| {
            let b = band_of(s);
            let factor = match (&sigma, b) {
                (Some(f), Some(b)) => bands
                    .iter()
                    .position(|x| std::ptr::eq(x, b))
                    .map_or(1.0, |k| f[k]),
                _ => 1.0,
            };
            PredictedLine {
                label: s.label.clone(),
                energy_ev: s.binding_ev,
                intensity: s.intensity * factor,
                shape: b.and_then(|b| shape_of(b, vibronic, fwhm)),
            }
        })
        .collect();
    let mut copt = opts.compare_options();
    // the error statistics of the method that made the bands (all bands share one), in
    // the prediction's class of basis set and for the elements of its core levels
    let mut elements: Vec<u32> = bands.iter().filter_map(core_z).collect();
    elements.sort_unstable();
    elements.dedup();
    copt.method_error = bands
        .first()
        .and_then(|b| MethodError::for_basis(&b.method, opts.region, opts.basis, &elements));
    let mut comparison = compare(&lines, measured, &copt)?;
    if !excluded.is_empty() {
        comparison.notes.push(Note::BandsAbovePhoton {
            count: excluded.len(),
            photon_ev: photon.energy_ev(),
        });
    }
    comparison.notes.extend(stick_notes);
    // the confidence model is fitted on He I valence traces only (confidence.rs)
    if opts.region == Region::Core && !comparison.assignments.is_empty() {
        comparison.notes.push(Note::ConfidenceUncalibratedForCore);
    }
    Ok(Assignment {
        comparison,
        sticks,
        fwhm,
    })
}
