//! Notes of a core-level run as typed values: each has a stable `code` (for programs) and a
//! `message` (its `Display`, for people). Messages describe the computation; they never name
//! command-line options (the CLI adds those where it helps).
//!
//! In JSON a list of notes appears as two keys (`Notes`): `notes`, the messages (as before
//! typed notes existed), and `note_details`, one `{code, message}` object per note.

use std::fmt;

use serde::ser::{SerializeMap, SerializeStruct};
use serde::{Serialize, Serializer};

/// One note about a run or about one level.
#[derive(Debug, Clone, PartialEq)]
pub enum CoreNote {
    // --- about the run ---
    /// The reference molecule lacks the element of a level: that level gets no shift.
    ReferenceLacksElement { element: String, level: String },
    /// Holes on atoms with equivalent partners were localised before the SCF.
    HolesLocalised,
    /// The method was not asked for: what the default is and why.
    DefaultMethod(super::default_method::DefaultChoice),
    /// The relativistic correction was added (shifts left non-relativistic).
    RelativisticAdded { source: String },
    /// Coupled-cluster 1s levels in a minimal or double-zeta basis: what that basis was
    /// measured to do to absolute values (docs/core-levels.md).
    BasisLimitsAbsolute { kind: &'static str },
    /// Atoms equivalent by symmetry were computed once.
    EquivalentComputedOnce {
        group: String,
        tolerance_bohr: f64,
        computed: usize,
        levels: usize,
    },
    /// The input was symmetric within the tolerance and its atoms were moved onto exactly
    /// symmetric positions (largest displacement in Å).
    Symmetrised {
        group: String,
        max_displacement_angstrom: f64,
    },
    // --- about one level ---
    /// This level copies the numbers of an equivalent atom.
    EquivalentTo { atom: String, group: String },
    /// The hole was localised on this atom (percent of the 1s weight there before/after).
    HoleLocalised {
        atom: String,
        equivalent: Vec<String>,
        canonical_percent: f64,
        localised_percent: f64,
    },
    /// The delocalised (symmetry-kept) hole, beside the localised one.
    DelocalisedHole {
        group: String,
        dscf_ev: f64,
        above_localised_ev: f64,
        shares: String,
    },
    /// No delocalised hole state converged.
    NoDelocalisedHole,
    /// Started canonical; the SCF localised the hole by itself.
    SelfLocalised { atom: String, percent: f64 },
    /// Started canonical and the hole stayed spread.
    CanonicalHoleKept { atom: String, percent: f64 },
    /// ⟨S²⟩ far from 3/4.
    SpinContaminated { s2: f64 },
    /// ΔMP2 needs a UHF cation and none held the hole.
    NoUhfForMp2,
    /// The default coupled cluster was refused for memory at run time: ΔSCF kept.
    CoupledClusterSkipped { reason: String },
    /// The coupled cluster ran on frozen natural orbitals (what was kept, and what the MP2
    /// energy of the cut orbitals adds to the binding energy).
    NaturalVirtuals(crate::correlation::open_shell::CutPair),
    // --- second-shell (2s, 2p) levels (two_p.rs) ---
    /// How the 2p spin–orbit splitting was computed (run note).
    SpinOrbitModel { source: String },
    /// A 2p hole turned away from the axis it was put on (overlap with the start orbital).
    HoleTurned { axis: usize, overlap: f64 },
    /// No ΔMP2 for a 2s/2p level: an orbital-energy denominator of a hole's cation came near
    /// zero, or the three 2p holes' corrections disagree (`two_p::MP2_SPREAD_EV`).
    Mp2Intruder { axis: usize, reason: String },
    /// The level lies above the photon energy given: the sources that reach it.
    BeyondPhoton {
        level: String,
        energy_ev: f64,
        photon_ev: f64,
        reached_by: Vec<String>,
    },
}

impl CoreNote {
    /// Stable identifier of the kind of note.
    pub fn code(&self) -> &'static str {
        match self {
            CoreNote::ReferenceLacksElement { .. } => "reference_lacks_element",
            CoreNote::HolesLocalised => "holes_localised",
            CoreNote::Symmetrised { .. } => "symmetrised",
            CoreNote::DefaultMethod(_) => "default_method_chosen",
            CoreNote::RelativisticAdded { .. } => "relativistic_added",
            CoreNote::BasisLimitsAbsolute { .. } => "basis_limits_absolute",
            CoreNote::EquivalentComputedOnce { .. } => "equivalent_computed_once",
            CoreNote::EquivalentTo { .. } => "equivalent_to",
            CoreNote::HoleLocalised { .. } => "hole_localised",
            CoreNote::DelocalisedHole { .. } => "delocalised_hole",
            CoreNote::NoDelocalisedHole => "no_delocalised_hole",
            CoreNote::SelfLocalised { .. } => "self_localised",
            CoreNote::CanonicalHoleKept { .. } => "canonical_hole_kept",
            CoreNote::SpinContaminated { .. } => "spin_contaminated",
            CoreNote::NoUhfForMp2 => "no_uhf_for_mp2",
            CoreNote::CoupledClusterSkipped { .. } => "coupled_cluster_skipped",
            CoreNote::NaturalVirtuals(_) => "natural_virtuals",
            CoreNote::SpinOrbitModel { .. } => "spin_orbit_model",
            CoreNote::HoleTurned { .. } => "hole_turned",
            CoreNote::Mp2Intruder { .. } => "mp2_intruder",
            CoreNote::BeyondPhoton { .. } => "beyond_photon",
        }
    }

    /// Whether the note describes the hole search of the atom it was computed for (and so
    /// does not carry over to a symmetry-equivalent atom that copies the numbers).
    pub fn is_about_the_computed_atom(&self) -> bool {
        matches!(
            self,
            CoreNote::HoleLocalised { .. }
                | CoreNote::DelocalisedHole { .. }
                | CoreNote::SelfLocalised { .. }
                | CoreNote::CanonicalHoleKept { .. }
        )
    }
}

impl fmt::Display for CoreNote {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            CoreNote::DefaultMethod(choice) => write!(f, "{choice}"),
            CoreNote::ReferenceLacksElement { element, level } => write!(
                f,
                "the reference molecule has no {element}: no shift for {level}"
            ),
            CoreNote::Symmetrised {
                group,
                max_displacement_angstrom,
            } => {
                let d = if *max_displacement_angstrom >= 1e-3 {
                    format!("{max_displacement_angstrom:.4}")
                } else {
                    format!("{max_displacement_angstrom:.1e}")
                };
                write!(
                    f,
                    "the structure is {group} within the symmetry tolerance; its atoms were \
                     moved onto exact {group} positions (largest displacement {d} Å) so that \
                     equivalent atoms get identical numbers"
                )
            }
            CoreNote::HolesLocalised => write!(
                f,
                "holes on atoms with symmetry-equivalent partners were localised on the chosen \
                 atom before the SCF (core flexibility on that atom alone, core orbitals rotated \
                 onto it); a hole shared by equivalent atoms lies several eV higher"
            ),
            CoreNote::BasisLimitsAbsolute { kind } => write!(
                f,
                "{kind} basis: absolute coupled-cluster 1s binding energies were measured 0.07–0.36 \
                 eV above experiment in cc-pVDZ (Ne, H2O, N2, CH4, CO, CO2, relativistic \
                 correction included) and within 0.1 eV in cc-pVTZ; use a triple-zeta basis \
                 for absolute values; shifts are less affected"
            ),
            CoreNote::RelativisticAdded { source } => write!(
                f,
                "relativistic correction added from {source} (shifts are left non-relativistic: \
                 the correction of one element changes by < 0.01 eV over its chemical shifts)"
            ),
            CoreNote::EquivalentComputedOnce {
                group,
                tolerance_bohr,
                computed,
                levels,
            } => write!(
                f,
                "atoms equivalent by symmetry ({group}, within {tolerance_bohr} bohr) were \
                 computed once ({computed} of {levels} levels needed a hole search)"
            ),
            CoreNote::EquivalentTo { atom, group } => write!(
                f,
                "equivalent to {atom} by symmetry ({group}): its numbers, not computed again"
            ),
            CoreNote::HoleLocalised {
                atom,
                equivalent,
                canonical_percent,
                localised_percent,
            } => write!(
                f,
                "hole localised on {atom} (equivalent atoms: {}): the canonical 1s had \
                 {canonical_percent:.0} % of its weight there, the localised one \
                 {localised_percent:.0} %",
                equivalent.join(", ")
            ),
            CoreNote::DelocalisedHole {
                group,
                dscf_ev,
                above_localised_ev,
                shares,
            } => write!(
                f,
                "delocalised hole (densities kept {group}-symmetric): ΔSCF {dscf_ev:.2} eV, \
                 {above_localised_ev:+.2} eV from the localised hole; vacancy shared {shares}"
            ),
            CoreNote::NoDelocalisedHole => write!(
                f,
                "no delocalised hole state converged (or the geometry has no usable symmetry)"
            ),
            CoreNote::SelfLocalised { atom, percent } => write!(
                f,
                "started from the canonical (delocalised) 1s, the SCF localised the hole on \
                 {atom} by itself ({percent:.0} % there): a hole spread over equivalent atoms \
                 is not a stable Hartree–Fock solution"
            ),
            CoreNote::CanonicalHoleKept { atom, percent } => write!(
                f,
                "canonical (delocalised) hole kept: {percent:.0} % on {atom}"
            ),
            CoreNote::SpinContaminated { s2 } => write!(
                f,
                "⟨S²⟩ = {s2:.3} is far from 0.75: the cation is spin-contaminated"
            ),
            CoreNote::SpinOrbitModel { source } => write!(f, "2p spin–orbit splitting: {source}"),
            CoreNote::HoleTurned { axis, overlap } => write!(
                f,
                "the hole put on 2p axis {axis} turned away from it (overlap {overlap:.2} with \
                 the start orbital): the molecular-field substructure of this level is uncertain"
            ),
            CoreNote::Mp2Intruder { axis, reason } => write!(
                f,
                "no ΔMP2 for this level (hole on axis {axis}: {reason}): a second-shell hole \
                 lies among occupied orbitals of its own shell, so second-order theory can meet \
                 vanishing or near-vanishing denominators; the level keeps its ΔSCF value"
            ),
            CoreNote::BeyondPhoton {
                level,
                energy_ev,
                photon_ev,
                reached_by,
            } => write!(
                f,
                "{level} at {energy_ev:.1} eV lies above the {photon_ev:.1} eV photons{}",
                if reached_by.is_empty() {
                    ": none of He I, He II, Mg Kα, Al Kα reaches it (a synchrotron or hard \
                     X-ray source does)"
                        .to_string()
                } else {
                    format!("; sources that reach it: {}", reached_by.join(", "))
                }
            ),
            CoreNote::NoUhfForMp2 => {
                write!(f, "no UHF cation held the hole: ΔMP2 not computed")
            }
            CoreNote::CoupledClusterSkipped { reason } => write!(
                f,
                "coupled cluster not run for this level ({reason}); the recommended value is \
                 ΔSCF"
            ),
            CoreNote::NaturalVirtuals(cut) => write!(f, "{cut}"),
        }
    }
}

impl Serialize for CoreNote {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut st = s.serialize_struct("CoreNote", 2)?;
        st.serialize_field("code", self.code())?;
        st.serialize_field("message", &self.to_string())?;
        st.end()
    }
}

/// The notes of a run or of one level. Serialised (flattened into its owner) as `notes`
/// (the messages) and `note_details` (`{code, message}` each).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Notes(pub Vec<CoreNote>);

impl std::ops::Deref for Notes {
    type Target = Vec<CoreNote>;
    fn deref(&self) -> &Vec<CoreNote> {
        &self.0
    }
}

impl std::ops::DerefMut for Notes {
    fn deref_mut(&mut self) -> &mut Vec<CoreNote> {
        &mut self.0
    }
}

impl Serialize for Notes {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let messages: Vec<String> = self.0.iter().map(|n| n.to_string()).collect();
        let mut m = s.serialize_map(Some(2))?;
        m.serialize_entry("notes", &messages)?;
        m.serialize_entry("note_details", &self.0)?;
        m.end()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn notes_serialise_as_messages_and_details() {
        #[derive(Serialize)]
        struct Owner {
            x: u32,
            #[serde(flatten)]
            notes: Notes,
        }
        let o = Owner {
            x: 1,
            notes: Notes(vec![CoreNote::SpinContaminated { s2: 0.912 }]),
        };
        let j = serde_json::to_value(&o).unwrap();
        assert_eq!(
            j["notes"][0],
            "⟨S²⟩ = 0.912 is far from 0.75: the cation is spin-contaminated"
        );
        assert_eq!(j["note_details"][0]["code"], "spin_contaminated");
        assert_eq!(j["note_details"][0]["message"], j["notes"][0]);
        assert_eq!(j["x"], 1);
    }

    #[test]
    fn no_message_names_a_command_line_option() {
        let all = [
            CoreNote::ReferenceLacksElement {
                element: "N".into(),
                level: "C1 1s".into(),
            },
            CoreNote::HolesLocalised,
            CoreNote::Symmetrised {
                group: "C2v".into(),
                max_displacement_angstrom: 0.01,
            },
            CoreNote::RelativisticAdded { source: "x".into() },
            CoreNote::BasisLimitsAbsolute {
                kind: "double-zeta",
            },
            CoreNote::EquivalentComputedOnce {
                group: "C2v".into(),
                tolerance_bohr: 0.01,
                computed: 1,
                levels: 2,
            },
            CoreNote::EquivalentTo {
                atom: "C1".into(),
                group: "C2v".into(),
            },
            CoreNote::HoleLocalised {
                atom: "C1".into(),
                equivalent: vec!["C1".into(), "C2".into()],
                canonical_percent: 50.0,
                localised_percent: 99.0,
            },
            CoreNote::DelocalisedHole {
                group: "C2v".into(),
                dscf_ev: 300.0,
                above_localised_ev: 2.0,
                shares: "C1 0.50, C2 0.50".into(),
            },
            CoreNote::NoDelocalisedHole,
            CoreNote::SelfLocalised {
                atom: "C1".into(),
                percent: 90.0,
            },
            CoreNote::CanonicalHoleKept {
                atom: "C1".into(),
                percent: 50.0,
            },
            CoreNote::SpinContaminated { s2: 0.9 },
            CoreNote::NoUhfForMp2,
            CoreNote::SpinOrbitModel { source: "x".into() },
            CoreNote::HoleTurned {
                axis: 1,
                overlap: 0.5,
            },
            CoreNote::Mp2Intruder {
                axis: 1,
                reason: "x".into(),
            },
            CoreNote::BeyondPhoton {
                level: "S1 1s".into(),
                energy_ev: 2478.0,
                photon_ev: 1486.6,
                reached_by: vec![],
            },
        ];
        let mut codes: Vec<&str> = all.iter().map(|n| n.code()).collect();
        codes.sort_unstable();
        codes.dedup();
        assert_eq!(codes.len(), all.len(), "codes are distinct");
        for n in &all {
            assert!(!n.to_string().contains("--"), "{n}");
        }
    }
}
