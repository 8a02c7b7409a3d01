//! Did the ΔSCF cation keep its hole where it was put?
//!
//! The maximum overlap method (Gilbert, Besley & Gill, J. Phys. Chem. A 112 (2008) 13164)
//! keeps a core hole open by occupying, at each iteration, the orbitals that overlap most
//! with the previous ones. Two failures remain possible and both give a wrong number that
//! looks plausible, so they are detected and reported instead of printed:
//! - *escape*: the hole drifts away from the target atom (onto an equivalent atom's 1s or
//!   spreads over several): measured by the Löwdin population of the final vacant orbital
//!   on the target atom;
//! - *collapse*: the vacancy falls into the valence shell (variational collapse to the
//!   cation ground state); the binding energy then comes out tens or hundreds of eV too low.
//!   Orbital relaxation lowers a 1s binding energy by 10–20 eV relative to Koopmans for
//!   second-row atoms (common practice), about 5 %: anything below `COLLAPSE_FRACTION`
//!   of the Koopmans value is no core hole.
//! - *excited cation*: the SCF settles on a state of the core-ionised cation that lies
//!   above the Koopmans energy (seen with strongly spin-contaminated UHF solutions). The
//!   relaxed hole always lies below Koopmans, since relaxation can only lower the cation's
//!   energy from the frozen-orbital one (variational principle; common practice), so such a
//!   state is not the one a photoelectron line belongs to, and the next start is tried.

/// Least Löwdin population of the final hole on the target atom for a localised hole.
pub const MIN_HOLE_POPULATION: f64 = 0.7;
/// A ΔSCF energy below this fraction of the Koopmans energy is a collapsed hole.
pub const COLLAPSE_FRACTION: f64 = 0.8;
/// |⟨S²⟩ − 3/4| above which the cation is called spin-contaminated (task convention).
pub const S2_WARNING: f64 = 0.1;

#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum HoleStatus {
    /// The hole is a 1s vacancy on the target atom.
    Held,
    /// The vacancy left the target atom.
    Escaped,
    /// The vacancy fell into the valence shell.
    Collapsed,
    /// The cation converged above the Koopmans (frozen-orbital) energy: an excited state.
    Excited,
    /// The SCF did not converge.
    Failed,
    /// The start was not run (it could only have repeated another one).
    Skipped,
}

/// Judge a converged cation: `hole_population` of the final vacant orbital on the target,
/// the ΔSCF and Koopmans energies (same units), and whether the hole was meant to stay on
/// one atom (false for a deliberately delocalised, canonical hole).
pub fn judge(hole_population: f64, dscf: f64, koopmans: f64, localised: bool) -> HoleStatus {
    if dscf < COLLAPSE_FRACTION * koopmans {
        HoleStatus::Collapsed
    } else if dscf > koopmans {
        HoleStatus::Excited
    } else if localised && hole_population < MIN_HOLE_POPULATION {
        HoleStatus::Escaped
    } else {
        HoleStatus::Held
    }
}

/// Whether ⟨S²⟩ of a doublet is far from 3/4.
pub fn spin_contaminated(s2: f64) -> bool {
    (s2 - 0.75).abs() > S2_WARNING
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn verdicts() {
        // C 1s: Koopmans ≈ 305 eV, ΔSCF ≈ 291 eV (common practice: 10–20 eV relaxation).
        assert_eq!(judge(0.98, 291.0, 305.0, true), HoleStatus::Held);
        assert_eq!(judge(0.5, 291.0, 305.0, true), HoleStatus::Escaped);
        assert_eq!(judge(0.5, 414.0, 426.0, false), HoleStatus::Held);
        assert_eq!(judge(0.1, 14.0, 305.0, true), HoleStatus::Collapsed);
        // A ΔSCF above Koopmans cannot be the relaxed hole (variational principle).
        assert_eq!(judge(1.0, 827.6, 305.4, true), HoleStatus::Excited);
        assert!(spin_contaminated(1.8));
        assert!(!spin_contaminated(0.7602));
    }
}
