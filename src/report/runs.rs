//! What the printers of `spectrum`, `assign` and `scf` are given: the plain result plus how
//! it was asked for (method, basis, inputs), with the titles every format shares.

use serde::Serialize;

use crate::ionization::Region;
use crate::scf::{Reference, Wavefunction};
use crate::spectrum::assignment::Assignment;
use crate::spectrum::build::Spectrum;
use crate::spectrum::photon::{Axis, Photon};
use crate::spectrum::predicted::IntensityModel;

/// One input of a spectrum (a molecule of a mixture).
#[derive(Debug, Clone, Serialize)]
pub struct InputInfo {
    pub file: String,
    pub name: String,
    pub weight: f64,
}

/// A broadened spectrum and how it was made.
#[derive(Debug, Clone)]
pub struct SpectrumRun<'a> {
    pub spectrum: &'a Spectrum,
    pub photon: Photon,
    pub region: Region,
    pub axis: Axis,
    pub intensity: IntensityModel,
    /// Method name (several joined by ", " when the inputs of a mixture differ).
    pub method: String,
    pub basis: String,
    pub inputs: Vec<InputInfo>,
}

impl SpectrumRun<'_> {
    pub fn title(&self) -> String {
        let names: Vec<&str> = self.inputs.iter().map(|i| i.name.as_str()).collect();
        format!(
            "{} photoelectron spectrum of {}",
            if self.region == Region::Core {
                "Core-level"
            } else {
                "Valence"
            },
            names.join(" + ")
        )
    }

    pub fn subtitle(&self) -> String {
        format!(
            "predicted: {} / {} · {} · {} FWHM {:.2} eV · intensities: {} · a prediction, not a measurement",
            self.method,
            self.basis,
            self.photon.name(),
            self.spectrum.shape.name(),
            self.spectrum.fwhm,
            match self.intensity {
                IntensityModel::Occupation => "occupation × degeneracy",
                IntensityModel::Gelius => "Gelius model",
            }
        )
    }
}

/// An assignment against a measured trace and how it was made.
#[derive(Debug, Clone)]
pub struct AssignRun<'a> {
    pub assignment: &'a Assignment,
    /// Molecule name (the file stem).
    pub molecule: String,
    pub method: String,
    pub basis: String,
    pub region: Region,
    /// Photon source given for the measurement, if any.
    pub photon: Option<Photon>,
    pub measured_file: String,
    /// The first `#` comment of the measured file (so a report says when data are synthetic).
    pub measured_comment: Option<String>,
}

impl AssignRun<'_> {
    /// A pair's label with the chemical environment of each core level in it:
    /// "C3 1s + C4 1s" → "C3 1s (C=O) + C4 1s (C–O)". Valence labels are unchanged.
    pub fn display_label(&self, label: &str) -> String {
        label
            .split(" + ")
            .map(|part| {
                self.assignment
                    .sticks
                    .iter()
                    .find(|s| s.label == part)
                    .map_or_else(|| part.to_string(), |s| s.display_label())
            })
            .collect::<Vec<_>>()
            .join(" + ")
    }
}

pub fn region_name(r: Region) -> &'static str {
    match r {
        Region::Valence => "valence",
        Region::Core => "core",
    }
}

/// What `bandcast scf` prints besides the wavefunction: the basis and how the Fock
/// matrices were built.
pub struct ScfRun {
    pub basis_name: String,
    pub harmonics: &'static str,
    pub n_dropped: usize,
    pub smallest_kept: f64,
    pub builder: String,
    pub density_fitted: bool,
    pub df_start: Option<crate::scf::context::DfStartRecord>,
    pub jk_fitting: String,
}

/// (spin label, energies, occupations) per channel as printed.
pub fn scf_channels(wf: &Wavefunction) -> Vec<(&'static str, &[f64], Vec<f64>)> {
    match wf.reference {
        Reference::Rhf => vec![(
            "restricted",
            &wf.eps_alpha[..],
            wf.occ_alpha.iter().map(|o| 2.0 * o).collect(),
        )],
        _ => vec![
            ("alpha", &wf.eps_alpha[..], wf.occ_alpha.clone()),
            ("beta", &wf.eps_beta[..], wf.occ_beta.clone()),
        ],
    }
}

/// Dipole moment in debye: x, y, z and the length.
pub fn dipole_debye(wf: &Wavefunction) -> [f64; 4] {
    let d = wf.dipole.map(|v| v * crate::units::AU_TO_DEBYE);
    [
        d[0],
        d[1],
        d[2],
        (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt(),
    ]
}
