//! From predicted bands to spectral lines ("sticks"): which bands the photon reaches, how
//! intense each is, how wide.

use serde::Serialize;

use super::cross_section::gelius_intensity;
use super::note::Note;
use super::photon::Photon;
use crate::chem::elements::parse_element;
use crate::core_level::lifetime::lifetime_fwhm_ev;
use crate::ionization::{Band, Region};

/// How band intensities are set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum IntensityModel {
    /// occupation × degeneracy (pole strength / one-hole weight applied when present).
    Occupation,
    /// Gelius model with atomic subshell cross sections at the photon energy.
    Gelius,
}

impl IntensityModel {
    pub fn parse(s: &str) -> Option<IntensityModel> {
        match s.to_ascii_lowercase().as_str() {
            "occupation" | "default" => Some(IntensityModel::Occupation),
            "gelius" => Some(IntensityModel::Gelius),
            _ => None,
        }
    }
}

/// One line of a predicted spectrum.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Stick {
    pub label: String,
    /// Binding energy (eV).
    pub binding_ev: f64,
    /// Kinetic energy (eV) for the photon source.
    pub kinetic_ev: f64,
    /// Relative intensity (sum over sticks of one molecule not normalised).
    pub intensity: f64,
    /// Gaussian (instrument + vibrational envelope) FWHM, eV.
    pub gaussian_fwhm_ev: f64,
    /// Lorentzian (lifetime) FWHM, eV; 0 for valence bands.
    pub lorentzian_fwhm_ev: f64,
    /// Index of the input (molecule) this line belongs to.
    pub component: usize,
    /// Chemical environment of a core level's atom ("C=O", `chem::environment`); absent
    /// for valence bands.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub environment: Option<String>,
    /// Element and shell of a core line ("C 1s", "S 2p"; None for valence bands): figures
    /// draw one panel per value, each over its own energy range.
    #[serde(skip)]
    pub core_level: Option<String>,
}

impl Stick {
    /// The label with the environment, as figures and tables show it: "C3 1s (C=O)".
    pub fn display_label(&self) -> String {
        match &self.environment {
            Some(e) if !e.is_empty() => format!("{} ({e})", self.label),
            _ => self.label.clone(),
        }
    }
}

/// A band left out of the spectrum and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Excluded {
    pub label: String,
    pub binding_ev: f64,
    pub component: usize,
    pub reason: String,
}

/// Options for turning bands into sticks.
#[derive(Debug, Clone, Copy)]
pub struct StickOptions {
    pub photon: Photon,
    pub intensity: IntensityModel,
    /// Gaussian FWHM per band (eV).
    pub gaussian_fwhm_ev: f64,
    /// Weight of this input in a mixture (multiplies every intensity).
    pub weight: f64,
    pub component: usize,
}

/// Lines for `bands`, and the bands left out (unreachable by the photon, zero intensity).
/// Notes (e.g. approximate cross sections) are pushed onto `notes`.
pub fn sticks_from_bands(
    bands: &[Band],
    opts: &StickOptions,
    notes: &mut Vec<Note>,
) -> (Vec<Stick>, Vec<Excluded>) {
    let hv = opts.photon.energy_ev();
    let mut sticks = Vec::new();
    let mut excluded = Vec::new();
    let mut approx_noted = false;
    for b in bands {
        if !opts.photon.reaches(b.ie_ev) {
            excluded.push(Excluded {
                label: b.label.clone(),
                binding_ev: b.ie_ev,
                component: opts.component,
                reason: format!(
                    "binding energy {:.2} eV is above the photon energy {:.3} eV",
                    b.ie_ev, hv
                ),
            });
            continue;
        }
        let mut intensity = match opts.intensity {
            IntensityModel::Occupation => b.default_intensity(),
            IntensityModel::Gelius => {
                let g = gelius_intensity(b, hv);
                if g.untabulated_fraction.abs() > 0.2 {
                    notes.push(Note::UntabulatedCrossSection {
                        band: b.label.clone(),
                        percent: 100.0 * g.untabulated_fraction,
                    });
                }
                if b.makeup.is_empty() {
                    notes.push(Note::NoMakeup {
                        band: b.label.clone(),
                    });
                }
                if g.approximate && !approx_noted {
                    notes.push(Note::RoughCrossSections);
                    approx_noted = true;
                }
                g.intensity
            }
        };
        // A propagator pole strength or an EOM one-hole weight moves intensity to satellites.
        if let Some(p) = b.pole_strength.or(b.one_hole_weight) {
            intensity *= p;
        }
        intensity *= opts.weight;
        let lorentz = match b.region {
            Region::Valence => 0.0,
            Region::Core => b
                .lifetime_fwhm_ev
                .or_else(|| core_z(b).and_then(lifetime_fwhm_ev))
                .unwrap_or(0.0),
        };
        sticks.push(Stick {
            label: b.label.clone(),
            binding_ev: b.ie_ev,
            kinetic_ev: opts.photon.kinetic_ev(b.ie_ev),
            intensity,
            gaussian_fwhm_ev: opts.gaussian_fwhm_ev,
            lorentzian_fwhm_ev: lorentz,
            component: opts.component,
            environment: b.environment.clone(),
            core_level: core_level_name(b),
        });
    }
    (sticks, excluded)
}

/// Element and shell of a core band from its label ("C3 1s" → "C 1s", "S1 2p3/2" → "S 2p").
fn core_level_name(b: &Band) -> Option<String> {
    if b.region != Region::Core {
        return None;
    }
    let z = core_z(b)?;
    let shell: String = b
        .label
        .split_whitespace()
        .nth(1)
        .unwrap_or("1s")
        .chars()
        .take(2)
        .collect();
    Some(format!("{} {shell}", crate::chem::elements::symbol(z)))
}

/// Element of a core band from its label ("C3 1s" → 6).
pub fn core_z(b: &Band) -> Option<u32> {
    let sym: String = b
        .label
        .chars()
        .take_while(|c| c.is_ascii_alphabetic())
        .collect();
    parse_element(&sym)
}
