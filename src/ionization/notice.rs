//! Notes and warnings of a valence prediction as typed values: a stable `code` for programs
//! and a `message` for people (the `Display` text). None of them names a command-line option.

use std::fmt;

use serde::ser::SerializeStruct;
use serde::{Serialize, Serializer};

use crate::ionization::default_method::{DefaultChoice, SkipReason};
use crate::ionization::method::Method;

#[derive(Debug, Clone, PartialEq)]
pub enum ValenceNotice {
    /// The UHF reference's ⟨S²⟩ exceeds the exact value by more than 0.1 (warning).
    SpinContaminated { s2: f64, exact: f64 },
    /// A note of the orbital analysis (labels, make-up), in its own words (warning).
    Analysis(String),
    /// A note of the method stage that ran (integrals, frozen core, correlation energies).
    MethodNote(String),
    /// A warning of the method stage that ran (an unconverged root, …), in its own words.
    MethodWarning(String),
    /// ΔSCF: the hole of MO `mo` (1-based) moved; only `percent` % of it is empty (warning).
    HoleMoved { mo: usize, percent: f64 },
    /// ΔSCF: the cation of MO `mo` (1-based) lies below the neutral by `ie_ev` ≤ 0 (warning).
    CationBelowNeutral { mo: usize, ie_ev: f64 },
    /// ΔSCF/ΔCCSD(T): the cation of MO `mo` (1-based) has ⟨S²⟩ more than 0.1 above the
    /// exact S(S+1) of its spin state (warning).
    CationSpinContaminated { mo: usize, s2: f64, exact: f64 },
    /// ΔSCF/ΔCCSD(T): the UHF cation of MO `mo` did not converge; the ROHF cation was
    /// used (note).
    CationRohf { mo: usize },
    /// ΔCCSD(T): the three levels of one band, eV, with the cation's ⟨S²⟩ (note).
    DeltaCcLevels {
        mo: usize,
        dscf_ev: f64,
        dccsd_ev: f64,
        dccsdt_ev: f64,
        s2: f64,
        /// Total CCSD(T) energies of the neutral and the cation (hartree).
        neutral_eh: f64,
        cation_eh: f64,
    },
    /// ΔCCSD(T) of band MO `mo` ran on frozen natural orbitals (note).
    NaturalVirtuals {
        mo: usize,
        cut: crate::correlation::open_shell::CutPair,
    },
    /// A band's pole strength is below `ionization::valence::LOW_POLE_STRENGTH` (warning).
    LowPoleStrength { band: String, pole_strength: f64 },
    /// The default rule chose the method (note).
    DefaultMethodChosen(DefaultChoice),
    /// The default chain tried `method`, which failed, and went on to the next (warning).
    DefaultFellBack { method: Method, reason: SkipReason },
    /// The input was symmetric within `tolerance_bohr` and its atoms were moved onto exactly
    /// symmetric positions (note).
    Symmetrised {
        group: String,
        max_displacement_angstrom: f64,
        tolerance_bohr: f64,
    },
}

impl ValenceNotice {
    /// The note for a symmetrised job (None when no atom moved).
    pub fn for_symmetrised(
        job: &crate::analysis::symmetry::SymmetrisedJob,
        tolerance_bohr: f64,
    ) -> Option<ValenceNotice> {
        job.moved.then(|| ValenceNotice::Symmetrised {
            group: job.group.clone(),
            max_displacement_angstrom: job.max_displacement_bohr * crate::units::BOHR_TO_ANGSTROM,
            tolerance_bohr,
        })
    }

    /// Stable identifier for programs reading the JSON.
    pub fn code(&self) -> &'static str {
        match self {
            ValenceNotice::SpinContaminated { .. } => "spin_contaminated",
            ValenceNotice::Analysis(_) => "analysis",
            ValenceNotice::MethodNote(_) => "method_note",
            ValenceNotice::MethodWarning(_) => "method_warning",
            ValenceNotice::HoleMoved { .. } => "hole_moved",
            ValenceNotice::CationBelowNeutral { .. } => "cation_below_neutral",
            ValenceNotice::LowPoleStrength { .. } => "low_pole_strength",
            ValenceNotice::CationSpinContaminated { .. } => "cation_spin_contaminated",
            ValenceNotice::CationRohf { .. } => "cation_rohf",
            ValenceNotice::DeltaCcLevels { .. } => "delta_cc_levels",
            ValenceNotice::NaturalVirtuals { .. } => "natural_virtuals",
            ValenceNotice::DefaultMethodChosen(_) => "default_method_chosen",
            ValenceNotice::DefaultFellBack { .. } => "default_method_fell_back",
            ValenceNotice::Symmetrised { .. } => "symmetrised",
        }
    }
}

impl fmt::Display for ValenceNotice {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ValenceNotice::SpinContaminated { s2, exact } => write!(
                f,
                "the UHF reference is spin-contaminated (<S²> = {s2:.3}, exact {exact:.3}): IEs \
                 are less reliable"
            ),
            ValenceNotice::Analysis(m)
            | ValenceNotice::MethodNote(m)
            | ValenceNotice::MethodWarning(m) => f.write_str(m),
            ValenceNotice::HoleMoved { mo, percent } => write!(
                f,
                "ΔSCF for MO {mo}: the hole moved to another orbital (only {percent:.0} % of the \
                 target orbital is empty in the cation); that band's IE belongs to a different \
                 cation state"
            ),
            ValenceNotice::CationBelowNeutral { mo, ie_ev } => write!(
                f,
                "ΔSCF for MO {mo}: the cation lies below the neutral ({ie_ev:.2} eV)"
            ),
            ValenceNotice::CationSpinContaminated { mo, s2, exact } => write!(
                f,
                "the cation with a hole in MO {mo} is spin-contaminated (<S²> = {s2:.3}, exact \
                 {exact:.3}): its IE is less reliable"
            ),
            ValenceNotice::CationRohf { mo } => write!(
                f,
                "the UHF cation with a hole in MO {mo} did not converge; the spin-restricted \
                 (ROHF) cation was used (ΔSCF lies higher on it; coupled cluster removes most \
                 of the difference)"
            ),
            ValenceNotice::DeltaCcLevels {
                mo,
                dscf_ev,
                dccsd_ev,
                dccsdt_ev,
                s2,
                neutral_eh,
                cation_eh,
            } => write!(
                f,
                "MO {mo}: ΔSCF {dscf_ev:.3} eV, ΔCCSD {dccsd_ev:.3} eV, ΔCCSD(T) {dccsdt_ev:.3} \
                 eV (cation <S²> {s2:.3}; CCSD(T) totals: neutral {neutral_eh:.6} Eh, cation \
                 {cation_eh:.6} Eh)"
            ),
            ValenceNotice::NaturalVirtuals { mo, cut } => write!(f, "MO {mo}: {cut}"),
            ValenceNotice::LowPoleStrength {
                band,
                pole_strength,
            } => write!(
                f,
                "{band}: pole strength {pole_strength:.2} — the one-hole picture is breaking \
                 down here (satellites share the intensity; expect a larger error)"
            ),
            ValenceNotice::DefaultMethodChosen(choice) => write!(f, "{choice}"),
            ValenceNotice::DefaultFellBack { method, reason } => {
                write!(f, "the default method fell back from {method}: {reason}")
            }
            ValenceNotice::Symmetrised {
                group,
                max_displacement_angstrom,
                tolerance_bohr,
            } => {
                let d = if *max_displacement_angstrom >= 1e-3 {
                    format!("{max_displacement_angstrom:.4}")
                } else {
                    format!("{max_displacement_angstrom:.1e}")
                };
                write!(
                    f,
                    "the structure is {group} within the symmetry tolerance ({tolerance_bohr} \
                     bohr); its atoms were moved onto exact {group} positions (largest \
                     displacement {d} Å) so that equivalent orbitals get identical numbers"
                )
            }
        }
    }
}

impl Serialize for ValenceNotice {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut st = s.serialize_struct("ValenceNotice", 2)?;
        st.serialize_field("code", self.code())?;
        st.serialize_field("message", &self.to_string())?;
        st.end()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Regression test: the JSON form carries the stable code beside the printed message.
    #[test]
    fn regression_serialises_code_and_message() {
        let n = ValenceNotice::CationBelowNeutral { mo: 3, ie_ev: -0.5 };
        let v = serde_json::to_value(&n).unwrap();
        assert_eq!(v["code"], "cation_below_neutral");
        assert_eq!(
            v["message"],
            "ΔSCF for MO 3: the cation lies below the neutral (-0.50 eV)"
        );
    }
}
