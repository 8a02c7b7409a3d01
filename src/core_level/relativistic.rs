//! Optional relativistic correction to 1s binding energies.
//!
//! Hartree–Fock ΔSCF is non-relativistic. Relativity binds a 1s electron more tightly, so the
//! measured binding energy lies above the non-relativistic one by an amount that is small for
//! light atoms and grows steeply with Z (common practice: a few hundredths of an eV for C 1s,
//! tenths of an eV by O and F). It is nearly independent of the chemical environment, so it
//! shifts every level of an element alike and drops out of chemical shifts.
//!
//! The correction is the power law of Takahata & Chong, J. Electron Spectrosc. Relat.
//! Phenom. 133 (2003) 69, in the non-relativistic binding energy I_nr (here the level's
//! ΔSCF value):
//!
//! C_rel = K · I_nr^N,   K = 7.626 × 10⁻⁷, N = 2.083, I_nr and C_rel in eV.
//!
//! K and N are fitted here, not quoted: the law with the parameters quoted from memory
//! before (K = 2.198 × 10⁻⁷, N = 2.178) gave C 0.05, N 0.11, O 0.20, F 0.34, Ne 0.55 eV,
//! half of what a computation gives. The computation (`pauli.rs`, tests/core_relativistic.rs):
//! first-order mass-velocity + Darwin energy at the hole atom, ΔSCF cation minus neutral,
//! cc-pCVTZ with s and p split into primitives on the hole atom, cc-pVDZ elsewhere, gives
//! CH4 C 0.102, NH3 N 0.207, H2O O 0.377, HF F 0.633, Ne 1.001 eV (at ΔSCF 290.6, 405.0,
//! 538.9, 692.8, 868.5 eV); the fit through them is within 1 % of each. These are the scalar
//! (one-electron) terms, as in the scalar-relativistic corrections of published ΔCC work
//! (Zheng & Cheng 2019 use spin-free X2C); the two-electron Breit term, which lowers 1s
//! binding energies, is not included. The law is for 1s levels of C–Ne (and, extrapolated,
//! B and Na–Mg 1s); it is not used for other shells.

use crate::chem::elements::symbol;

/// K of C_rel = K · I^N (eV^(1−N)); fitted to the first-order Pauli values (module text).
pub const K: f64 = 7.626e-7;
/// N of C_rel = K · I^N; fitted to the first-order Pauli values (module text).
pub const N: f64 = 2.083;

/// Citation printed with corrected values.
pub const SOURCE: &str = "power law of Takahata & Chong, J. Electron Spectrosc. Relat. Phenom. \
                          133 (2003) 69, C_rel = 7.626e-7 · I^2.083 (eV), parameters fitted to \
                          first-order mass-velocity + Darwin ΔSCF values (scalar terms, no Breit)";

/// Relativistic correction (eV, positive: the level is bound more tightly) for a 1s level
/// whose non-relativistic binding energy is `i_nr_ev` (eV).
pub fn correction_ev(i_nr_ev: f64) -> f64 {
    if i_nr_ev <= 0.0 {
        return 0.0;
    }
    K * i_nr_ev.powf(N)
}

/// Typical gas-phase 1s binding energies (eV) at which the correction is quoted per element:
/// CH4 C 1s 290.8 (Thomas, J. Chem. Phys. 53 (1970) 1744), N2 N 1s 409.9 and Ne 1s 870.2
/// (X-ray Data Booklet), H2O O 1s 539.8 (Wang et al., J. Electron Spectrosc. Relat.
/// Phenom. 251 (2021) 147103), F 1s ≈ 694 (a typical fluorocarbon value, from memory).
pub const TYPICAL_1S_EV: [(u32, f64); 5] =
    [(6, 290.8), (7, 409.9), (8, 539.8), (9, 694.0), (10, 870.2)];

/// (element symbol, typical 1s energy, correction) for README and `--help` style listings.
pub fn typical_corrections() -> Vec<(&'static str, f64, f64)> {
    TYPICAL_1S_EV
        .iter()
        .map(|&(z, i)| (symbol(z), i, correction_ev(i)))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::{ev, FINE_STRUCTURE};

    #[test]
    fn values_at_typical_energies() {
        // Regression: the law at the measured 1s energies (C 290.8, N 409.9, O 539.8,
        // F 694, Ne 870.2 eV) against the first-order Pauli values it was fitted to
        // (tests/core_relativistic.rs recomputes those): C 0.10, N 0.21, O 0.38, F 0.63,
        // Ne 1.00 eV. The scalar corrections of published ΔCC work are of this size
        // (from memory: C ≈ 0.1, N ≈ 0.2, O ≈ 0.35, Ne ≈ 0.8–0.9 eV).
        let c = typical_corrections();
        let want = [0.10, 0.21, 0.38, 0.63, 1.00];
        for ((el, i, v), w) in c.iter().zip(want) {
            assert!((v - w).abs() < 0.02, "{el} at {i} eV: {v:.4} vs {w}");
        }
        // Tenths of an eV by O and F (docs/reference-data.md §4, common practice).
        assert!((0.1..0.5).contains(&c[2].2) && (0.1..1.0).contains(&c[3].2));
    }

    #[test]
    fn grows_steeply_and_stays_below_the_bare_nucleus_value() {
        // Positive and steeper than linear in the binding energy.
        assert_eq!(correction_ev(0.0), 0.0);
        let (a, b) = (correction_ev(300.0), correction_ev(600.0));
        assert!(a > 0.0 && b / a > 4.0 && b / a < 4.5, "{a} {b}");
        // A 1s electron of a bare nucleus: E = −Z²/2 − Z⁴α²/8 hartree to order α² (Dirac
        // equation, textbook result; common practice). Screening by the other electrons makes
        // the many-electron correction smaller, never larger.
        for &(z, i) in &TYPICAL_1S_EV {
            let bare = ev((z as f64).powi(4) * FINE_STRUCTURE * FINE_STRUCTURE / 8.0);
            let c = correction_ev(i);
            assert!(c < bare && c > 0.1 * bare, "Z = {z}: {c} vs bare {bare}");
        }
    }
}
