//! Typed notes of the Franck–Condon engine: each has a stable `code` and a `message`, and
//! serialises as `{"code": …, "message": …}`. Printers choose the wording at the edges.

use serde::ser::{Serialize, SerializeStruct, Serializer};
use std::fmt;

#[derive(Debug, Clone, PartialEq)]
pub enum VibronicNote {
    /// The computed lines hold less than the target fraction of the total intensity.
    TargetNotReached { captured: f64, target: f64 },
    /// A mode's one-mode progression still had intensity at the quanta cap.
    QuantaCap { mode: usize, cap: u32 },
    /// More lines than the storage bound: the weakest were dropped (their intensity is
    /// still counted in the captured fraction).
    LinesDropped { kept: usize, dropped_intensity: f64 },
    /// The bound on evaluated overlaps stopped the generation.
    WorkLimit { overlaps: u64 },
    /// A block exceeded the memory bound and its quanta were trimmed.
    BlockTrimmed { modes: usize, points: usize },
    /// The bound on combinations per class dropped the weakest candidates.
    CombinationsDropped { class: usize, dropped: usize },
    /// The class bound (number of simultaneously excited modes) stopped the generation.
    ClassLimit { class: usize },
    /// J is not orthogonal (the recursion assumes it is).
    NonOrthogonalDuschinsky { defect: f64 },
    /// Only part of the thermal population of the neutral was followed.
    InitialPopulation { included: f64, states: usize },
}

impl VibronicNote {
    pub fn code(&self) -> &'static str {
        match self {
            VibronicNote::TargetNotReached { .. } => "fc-target-not-reached",
            VibronicNote::QuantaCap { .. } => "fc-quanta-cap",
            VibronicNote::LinesDropped { .. } => "fc-lines-dropped",
            VibronicNote::WorkLimit { .. } => "fc-work-limit",
            VibronicNote::BlockTrimmed { .. } => "fc-block-trimmed",
            VibronicNote::CombinationsDropped { .. } => "fc-combinations-dropped",
            VibronicNote::ClassLimit { .. } => "fc-class-limit",
            VibronicNote::NonOrthogonalDuschinsky { .. } => "fc-duschinsky-not-orthogonal",
            VibronicNote::InitialPopulation { .. } => "fc-initial-population",
        }
    }
    pub fn message(&self) -> String {
        self.to_string()
    }
}

impl fmt::Display for VibronicNote {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            VibronicNote::TargetNotReached { captured, target } => write!(
                f,
                "the computed vibronic lines hold {:.1} % of the band's intensity, less than \
                 the {:.1} % aimed at: the band shape is incomplete",
                100.0 * captured,
                100.0 * target
            ),
            VibronicNote::QuantaCap { mode, cap } => write!(
                f,
                "ion mode {} still carries intensity at {cap} quanta (the per-mode bound): \
                 its progression is cut",
                mode + 1
            ),
            VibronicNote::LinesDropped {
                kept,
                dropped_intensity,
            } => write!(
                f,
                "only the {kept} strongest lines are kept; the dropped ones hold {:.2e} of the \
                 intensity",
                dropped_intensity
            ),
            VibronicNote::WorkLimit { overlaps } => write!(
                f,
                "stopped after {overlaps} Franck–Condon overlaps (the work bound)"
            ),
            VibronicNote::BlockTrimmed { modes, points } => write!(
                f,
                "a combination of {modes} modes needed more than {points} overlaps at once: \
                 its quanta were reduced"
            ),
            VibronicNote::CombinationsDropped { class, dropped } => write!(
                f,
                "{dropped} of the weakest combinations of {class} excited modes were not \
                 computed (bound on combinations per class)"
            ),
            VibronicNote::ClassLimit { class } => write!(
                f,
                "stopped at combinations of {class} simultaneously excited modes (the bound)"
            ),
            VibronicNote::NonOrthogonalDuschinsky { defect } => write!(
                f,
                "the Duschinsky matrix deviates from orthogonality by {defect:.1e}: the \
                 intensities are approximate beyond that"
            ),
            VibronicNote::InitialPopulation { included, states } => write!(
                f,
                "{states} thermally populated levels of the neutral followed, holding {:.1} % \
                 of its population",
                100.0 * included
            ),
        }
    }
}

impl Serialize for VibronicNote {
    fn serialize<S: Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        let mut st = s.serialize_struct("VibronicNote", 2)?;
        st.serialize_field("code", self.code())?;
        st.serialize_field("message", &self.message())?;
        st.end()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    #[test]
    fn serialises_code_and_message() {
        let n = VibronicNote::TargetNotReached {
            captured: 0.9,
            target: 0.95,
        };
        let j = serde_json::to_value(&n).unwrap();
        assert_eq!(j["code"], "fc-target-not-reached");
        assert!(j["message"].as_str().unwrap().contains("90.0 %"));
    }
}
