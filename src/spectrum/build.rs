//! A broadened spectrum from the bands of one molecule or a weighted mixture: sticks, the
//! bands left out, typed notes and the curve. Plain data; the printers live in `report`.

use super::broaden::{auto_grid, broaden, Curve};
use super::lineshape::Shape;
use super::note::Note;
use super::photon::{Axis, Photon};
use super::predicted::{sticks_from_bands, Excluded, IntensityModel, Stick, StickOptions};
use crate::error::{Error, Result};
use crate::ionization::{Band, Region};

/// The bands of one input of a mixture.
#[derive(Debug, Clone)]
pub struct Component<'a> {
    pub bands: &'a [Band],
    /// Share of this molecule in the mixture (multiplies every intensity).
    pub weight: f64,
    /// Name shown in labels, legends and CSV columns (the file stem).
    pub name: String,
}

/// How the sticks are made and broadened.
#[derive(Debug, Clone, Copy)]
pub struct SpectrumOptions {
    pub photon: Photon,
    pub region: Region,
    pub axis: Axis,
    /// Instrument Gaussian FWHM (eV); None: the photon source's default for the region.
    pub fwhm_ev: Option<f64>,
    /// None: the region's default line shape.
    pub shape: Option<Shape>,
    pub intensity: IntensityModel,
    /// Energy range of the axis to show (eV).
    pub window: Option<(f64, f64)>,
}

/// Sticks plus the curve, with everything the printers need.
#[derive(Debug, Clone)]
pub struct Spectrum {
    pub sticks: Vec<Stick>,
    pub excluded: Vec<Excluded>,
    pub notes: Vec<Note>,
    pub curve: Curve,
    pub shape: Shape,
    /// Gaussian FWHM used (eV).
    pub fwhm: f64,
}

/// Turn per-input bands into sticks and a curve.
pub fn build_spectrum(inputs: &[Component], opts: &SpectrumOptions) -> Result<Spectrum> {
    let photon = opts.photon;
    let fwhm = opts
        .fwhm_ev
        .unwrap_or_else(|| photon.default_fwhm_ev(opts.region));
    let shape = opts
        .shape
        .unwrap_or_else(|| Photon::default_shape(opts.region));
    let mut sticks = Vec::new();
    let mut excluded = Vec::new();
    let mut notes = Vec::new();
    let multi = inputs.len() > 1;
    for (k, input) in inputs.iter().enumerate() {
        let so = StickOptions {
            photon,
            intensity: opts.intensity,
            gaussian_fwhm_ev: fwhm,
            weight: input.weight,
            component: k,
        };
        let (mut s, mut e) = sticks_from_bands(input.bands, &so, &mut notes);
        if multi {
            for x in s.iter_mut() {
                x.label = format!("{}: {}", input.name, x.label);
            }
            for x in e.iter_mut() {
                x.label = format!("{}: {}", input.name, x.label);
            }
        }
        sticks.append(&mut s);
        excluded.append(&mut e);
    }
    if let Some((lo, hi)) = opts.window {
        let pos = |s: &Stick| match opts.axis {
            Axis::Binding => s.binding_ev,
            Axis::Kinetic => s.kinetic_ev,
        };
        sticks.retain(|s| pos(s) >= lo - 5.0 * fwhm && pos(s) <= hi + 5.0 * fwhm);
    }
    if !excluded.is_empty() {
        notes.push(Note::BandsAbovePhoton {
            count: excluded.len(),
            photon_ev: photon.energy_ev(),
        });
    }
    let names: Vec<String> = inputs.iter().map(|p| p.name.clone()).collect();
    let grid = auto_grid(&sticks, opts.axis, opts.window).ok_or_else(|| {
        Error::computation(
            "no band of these molecules is reachable with this photon in this window",
        )
    })?;
    let curve = broaden(&sticks, shape, opts.axis, grid, &names);
    Ok(Spectrum {
        sticks,
        excluded,
        notes,
        curve,
        shape,
        fwhm,
    })
}
