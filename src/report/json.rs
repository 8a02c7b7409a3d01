//! JSON printers: serde structs only (keys documented in docs/json.md).

use serde::Serialize;

use super::runs::{AssignRun, InputInfo, SpectrumRun};
use crate::error::{Error, Result};
use crate::ionization::Region;
use crate::spectrum::broaden::Curve;
use crate::spectrum::compare::Comparison;
use crate::spectrum::note::Note;
use crate::spectrum::photon::Axis;
use crate::spectrum::predicted::{Excluded, IntensityModel, Stick};
use crate::spectrum::Shape;

/// Pretty JSON text of any printer struct.
pub fn to_pretty<T: Serialize>(value: &T) -> Result<String> {
    serde_json::to_string_pretty(value).map_err(|e| Error::computation(e.to_string()))
}

fn messages(notes: &[Note]) -> Vec<String> {
    notes.iter().map(Note::to_string).collect()
}

/// Everything `bandcast spectrum --json` prints.
#[derive(Serialize)]
pub struct SpectrumJson<'a> {
    pub photon: String,
    pub photon_energy_ev: f64,
    pub region: Region,
    pub axis: Axis,
    pub shape: Shape,
    pub gaussian_fwhm_ev: f64,
    pub intensity_model: IntensityModel,
    pub method: &'a str,
    pub basis: &'a str,
    pub inputs: &'a [InputInfo],
    pub bands: &'a [Stick],
    pub excluded: &'a [Excluded],
    /// Messages of the notes (as printed).
    pub notes: Vec<String>,
    /// The same notes with their stable codes.
    pub note_details: &'a [Note],
    pub curve: &'a Curve,
}

impl<'a> SpectrumJson<'a> {
    pub fn new(run: &'a SpectrumRun<'a>) -> Self {
        let s = run.spectrum;
        SpectrumJson {
            photon: run.photon.name(),
            photon_energy_ev: run.photon.energy_ev(),
            region: run.region,
            axis: run.axis,
            shape: s.shape,
            gaussian_fwhm_ev: s.fwhm,
            intensity_model: run.intensity,
            method: &run.method,
            basis: &run.basis,
            inputs: &run.inputs,
            bands: &s.sticks,
            excluded: &s.excluded,
            notes: messages(&s.notes),
            note_details: &s.notes,
            curve: &s.curve,
        }
    }
}

/// Everything `bandcast assign --json` prints.
#[derive(Serialize)]
pub struct AssignJson<'a> {
    pub molecule: &'a str,
    pub method: &'a str,
    pub basis: &'a str,
    pub measured_file: &'a str,
    #[serde(flatten)]
    pub comparison: &'a Comparison,
    /// Messages of the notes (as printed).
    pub notes: Vec<String>,
    /// The same notes with their stable codes.
    pub note_details: &'a [Note],
}

impl<'a> AssignJson<'a> {
    pub fn new(run: &'a AssignRun<'a>) -> Self {
        let c = &run.assignment.comparison;
        AssignJson {
            molecule: &run.molecule,
            method: &run.method,
            basis: &run.basis,
            measured_file: &run.measured_file,
            comparison: c,
            notes: messages(&c.notes),
            note_details: &c.notes,
        }
    }
}
