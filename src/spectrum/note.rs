//! Notes of a spectrum or an assignment as typed values: a stable `code` for programs, a
//! `message` for people. None of them names a command-line option (a printer may add a hint).

use std::fmt;

use serde::ser::SerializeStruct;
use serde::{Serialize, Serializer};

use crate::predict::{Notice, Prediction};

#[derive(Debug, Clone, PartialEq)]
pub enum Note {
    /// A band whose make-up is largely without a tabulated cross section (Gelius model).
    UntabulatedCrossSection { band: String, percent: f64 },
    /// A band without orbital make-up: its Gelius intensity is zero.
    NoMakeup { band: String },
    /// The cross sections used are typed from memory, scaled or interpolated.
    RoughCrossSections,
    /// Bands beyond the photon energy, left out.
    BandsAbovePhoton { count: usize, photon_ev: f64 },
    /// A scale was asked for but too few pairs were matched to fit one.
    ScaleNotFitted { pairs: usize },
    /// The fitted shift sits at the edge of the searched range.
    ShiftAtSearchEdge { limit_ev: f64 },
    /// Raw intensities well below zero (beyond the noise).
    NegativeIntensities { count: usize, lowest: f64 },
    /// The fitted shift lies outside what the method's error statistics make plausible.
    ShiftImplausible {
        shift_ev: f64,
        method: String,
        low_ev: f64,
        high_ev: f64,
    },
    /// Fewer than two degrees of freedom left after the alignment fit.
    FewDegreesOfFreedom { pairs: usize, parameters: usize },
    /// A kinetic-energy trace was converted to binding energy with the photon energy.
    KineticConverted { photon_ev: f64, reason: String },
    /// The header names one axis, the command was told another.
    HeaderAxisOverridden { header: String },
    /// Progressions the trace resolves: the bands were found on the trace smoothed further
    /// (a Gaussian of `smoothing_ev`) and compared by their fine structure too.
    ProgressionsResolved {
        bands: Vec<String>,
        smoothing_ev: f64,
    },
    /// Vibronic envelopes whose progression the trace's resolution does not separate: only
    /// the envelope's width is compared.
    ProgressionsUnresolved { bands: Vec<String>, fwhm_ev: f64 },
    /// Core-level (XPS) assignment: the confidence model was fitted on He I valence traces
    /// only (confidence.rs), so on this trace it is used outside its calibration.
    ConfidenceUncalibratedForCore,
    /// A note or warning of the prediction itself.
    Prediction(Notice),
}

impl Note {
    /// What a spectrum or an assignment reports of a prediction: which method the default
    /// rule chose, and every warning (the method's other notes are for verbose output).
    pub fn from_prediction(p: &Prediction) -> Vec<Note> {
        p.notes
            .iter()
            .filter(|n| matches!(n, Notice::DefaultMethodChosen { .. }))
            .chain(&p.warnings)
            .cloned()
            .map(Note::Prediction)
            .collect()
    }

    /// Stable identifier for programs reading the JSON.
    pub fn code(&self) -> &'static str {
        match self {
            Note::UntabulatedCrossSection { .. } => "untabulated_cross_section",
            Note::NoMakeup { .. } => "no_makeup",
            Note::RoughCrossSections => "rough_cross_sections",
            Note::BandsAbovePhoton { .. } => "bands_above_photon",
            Note::ScaleNotFitted { .. } => "scale_not_fitted",
            Note::ShiftAtSearchEdge { .. } => "shift_at_search_edge",
            Note::NegativeIntensities { .. } => "negative_intensities",
            Note::ShiftImplausible { .. } => "shift_implausible",
            Note::FewDegreesOfFreedom { .. } => "few_degrees_of_freedom",
            Note::KineticConverted { .. } => "kinetic_converted",
            Note::HeaderAxisOverridden { .. } => "header_axis_overridden",
            Note::ProgressionsResolved { .. } => "progressions_resolved",
            Note::ProgressionsUnresolved { .. } => "progressions_unresolved",
            Note::ConfidenceUncalibratedForCore => "confidence_uncalibrated_for_core",
            Note::Prediction(n) => n.code(),
        }
    }
}

impl fmt::Display for Note {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Note::UntabulatedCrossSection { band, percent } => write!(
                f,
                "{band}: {percent:.0} % of its make-up has no tabulated cross section"
            ),
            Note::NoMakeup { band } => {
                write!(f, "{band}: no orbital make-up, Gelius intensity is zero")
            }
            Note::RoughCrossSections => f.write_str(
                "Gelius intensities use cross sections typed from memory, scaled or \
                 interpolated at this photon energy: relative intensities are rough",
            ),
            Note::BandsAbovePhoton { count, photon_ev } => write!(
                f,
                "{count} band(s) lie above the photon energy ({photon_ev:.3} eV) and are left out"
            ),
            Note::ScaleNotFitted { pairs } => write!(
                f,
                "scale not fitted: {pairs} matched pair(s), three or more are needed"
            ),
            Note::ShiftAtSearchEdge { limit_ev } => write!(
                f,
                "the shift sits at the edge of the search range (±{limit_ev} eV): widen the range"
            ),
            Note::NegativeIntensities { count, lowest } => write!(
                f,
                "{count} point(s) of the trace lie well below zero (lowest {lowest:.3e}): an \
                 offset or a background subtracted twice? Peak heights and areas are affected"
            ),
            Note::ShiftImplausible {
                shift_ev,
                method,
                low_ev,
                high_ev,
            } => write!(
                f,
                "the fitted shift {shift_ev:+.2} eV lies outside {low_ev:+.2} … {high_ev:+.2} eV, \
                 the range {method}'s measured errors make plausible: the bands may be matched \
                 to the wrong peaks, the trace may belong to another molecule, or its energy \
                 scale is off (charging, reference)"
            ),
            Note::FewDegreesOfFreedom { pairs, parameters } => write!(
                f,
                "the alignment fits {parameters} parameter(s) to {pairs} pair(s): fewer than two \
                 degrees of freedom are left, so the residuals say little about the match"
            ),
            Note::KineticConverted { photon_ev, reason } => write!(
                f,
                "the trace was read as kinetic energy ({reason}) and converted to binding \
                 energy = {photon_ev:.3} eV − kinetic energy"
            ),
            Note::HeaderAxisOverridden { header } => write!(
                f,
                "the file's header names {header} energy, but the trace was read as asked"
            ),
            Note::ProgressionsResolved {
                bands,
                smoothing_ev,
            } => write!(
                f,
                "the trace resolves the vibrational progression of {}: bands were located on \
                 the trace smoothed by a further {smoothing_ev:.3} eV Gaussian, and their \
                 spacing and number of visible quanta are part of the match",
                bands.join(", ")
            ),
            Note::ProgressionsUnresolved { bands, fwhm_ev } => write!(
                f,
                "at {fwhm_ev:.3} eV resolution the trace cannot resolve the vibrational \
                 progression of {}: only the envelope's width is compared",
                bands.join(", ")
            ),
            Note::ConfidenceUncalibratedForCore => f.write_str(
                "the confidences come from a model fitted on He I valence traces only; on a \
                 core-level trace they are used outside that calibration: they rank the pairs \
                 but are not tested probabilities, and the verdict's confidence criterion \
                 shares that limit",
            ),
            Note::Prediction(n) => n.fmt(f),
        }
    }
}

impl Serialize for Note {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut st = s.serialize_struct("Note", 2)?;
        st.serialize_field("code", self.code())?;
        st.serialize_field("message", &self.to_string())?;
        st.end()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_stable_and_messages_name_no_option() {
        let notes = [
            Note::BandsAbovePhoton {
                count: 2,
                photon_ev: 21.218,
            },
            Note::ShiftAtSearchEdge { limit_ev: 6.0 },
            Note::ScaleNotFitted { pairs: 2 },
        ];
        let v = serde_json::to_value(&notes).unwrap();
        assert_eq!(v[0]["code"], "bands_above_photon");
        assert_eq!(
            v[0]["message"],
            "2 band(s) lie above the photon energy (21.218 eV) and are left out"
        );
        assert_eq!(v[1]["code"], "shift_at_search_edge");
        for n in &notes {
            assert!(!n.to_string().contains("--"), "{n}");
        }
    }
}
