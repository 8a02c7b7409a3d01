//! Optional relativistic correction to 1s binding energies.
//!
//! Hartree–Fock ΔSCF is non-relativistic. Relativity binds a 1s electron more tightly, so the
//! measured binding energy lies above the non-relativistic one by an amount that is small for
//! light atoms and grows steeply with Z (common practice: a few hundredths of an eV for C 1s,
//! tenths of an eV by O and F). It is nearly independent of the chemical environment, so it
//! shifts every level of an element alike and drops out of chemical shifts.
//!
//! The correction is two power laws in the non-relativistic binding energy I_nr (here the
//! level's ΔSCF value), the form of Takahata & Chong, J. Electron Spectrosc. Relat. Phenom.
//! 133 (2003) 69, both fitted here to computations (I_nr and C in eV):
//!
//! C_rel = K · I_nr^N − K₂ · I_nr^N₂,   K = 7.626 × 10⁻⁷, N = 2.083;  K₂ = 6.594 × 10⁻⁶, N₂ = 1.576.
//!
//! **The scalar part** (K, N): first-order mass-velocity + Darwin energy at the hole atom,
//! ΔSCF cation minus neutral (`pauli.rs`), cc-pCVTZ with s and p split into primitives on
//! the hole atom, cc-pVDZ elsewhere: CH4 C 0.102, NH3 N 0.207, H2O O 0.377, HF F 0.633,
//! Ne 1.001 eV (at ΔSCF 290.6, 405.0, 538.9, 692.8, 868.5 eV); the fit is within 1 % of each.
//! These are the scalar (one-electron) terms, as in the scalar-relativistic corrections of
//! published ΔCC work (Zheng & Cheng 2019 use spin-free X2C). The parameters quoted from
//! memory before (K = 2.198 × 10⁻⁷, N = 2.178) gave half of these values.
//!
//! **The two-electron and radiative part** (K₂, N₂, negative): the Breit–Pauli two-electron
//! contact terms (two-electron Darwin + spin–spin contact) and the one-loop QED shift
//! (self-energy + vacuum polarisation scaled by the density at the nucleus), `breit_qed.rs`,
//! same states and basis: contact −0.033, −0.053, −0.081, −0.117, −0.163 eV and QED −0.018,
//! −0.032, −0.053, −0.081, −0.119 eV for C, N, O, F, Ne; sums −0.050, −0.085, −0.134,
//! −0.198, −0.282 eV, fit within 0.2 %. Both lower the binding energy (a 1s hole removes the
//! 1s² pair's contact energy and one 1s electron's Lamb shift). Left out: the orbit–orbit
//! exchange between the 1s and same-spin valence electrons (its direct part vanishes for s
//! electrons) and higher-order QED.
//!
//! The law is for 1s levels of C–Ne (and, extrapolated, B and Na–Mg 1s); it is not used for
//! other shells.

use crate::chem::elements::symbol;

/// K of the scalar part K · I^N (eV^(1−N)); fitted to the first-order Pauli values (module text).
pub const K: f64 = 7.626e-7;
/// N of the scalar part K · I^N; fitted to the first-order Pauli values (module text).
pub const N: f64 = 2.083;
/// K₂ of the two-electron and radiative part −K₂ · I^N₂ (module text).
pub const K2: f64 = 6.594e-6;
/// N₂ of the two-electron and radiative part (module text).
pub const N2: f64 = 1.576;

/// Citation printed with corrected values.
pub const SOURCE: &str = "power laws of the form of Takahata & Chong, J. Electron Spectrosc. \
                          Relat. Phenom. 133 (2003) 69, C_rel = 7.626e-7 · I^2.083 − 6.594e-6 · \
                          I^1.576 (eV), fitted to first-order mass-velocity + Darwin ΔSCF values \
                          and to the Breit–Pauli two-electron contact + one-loop QED terms";

/// Scalar part (eV, positive): first-order mass-velocity + Darwin, for a 1s level whose
/// non-relativistic binding energy is `i_nr_ev` (eV).
pub fn scalar_ev(i_nr_ev: f64) -> f64 {
    if i_nr_ev <= 0.0 {
        return 0.0;
    }
    K * i_nr_ev.powf(N)
}

/// Two-electron contact (Breit–Pauli) + one-loop QED part (eV, negative).
pub fn breit_qed_ev(i_nr_ev: f64) -> f64 {
    if i_nr_ev <= 0.0 {
        return 0.0;
    }
    -K2 * i_nr_ev.powf(N2)
}

/// Relativistic correction (eV, positive: the level is bound more tightly) for a 1s level
/// whose non-relativistic binding energy is `i_nr_ev` (eV): both parts.
pub fn correction_ev(i_nr_ev: f64) -> f64 {
    scalar_ev(i_nr_ev) + breit_qed_ev(i_nr_ev)
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
    use crate::core_level::breit_qed::qed_hartree;
    use crate::units::{ev, FINE_STRUCTURE};

    #[test]
    fn values_at_typical_energies() {
        // Regression: the law at the measured 1s energies (C 290.8, N 409.9, O 539.8,
        // F 694, Ne 870.2 eV) against the first-order Pauli values it was fitted to
        // (tests/core_relativistic.rs recomputes those): C 0.10, N 0.21, O 0.38, F 0.63,
        // Ne 1.00 eV. The scalar corrections of published ΔCC work are of this size
        // (from memory: C ≈ 0.1, N ≈ 0.2, O ≈ 0.35, Ne ≈ 0.8–0.9 eV). The two-electron and
        // radiative part against its computed values (tests/core_relativistic.rs):
        // −0.05, −0.085, −0.134, −0.198, −0.283 eV.
        let c = typical_corrections();
        let want = [0.10, 0.21, 0.38, 0.63, 1.00];
        let beyond = [-0.050, -0.085, -0.134, -0.198, -0.283];
        for (((el, i, v), w), b) in c.iter().zip(want).zip(beyond) {
            let s = scalar_ev(*i);
            assert!((s - w).abs() < 0.02, "{el} at {i} eV: {s:.4} vs {w}");
            assert!(
                (breit_qed_ev(*i) - b).abs() < 0.005,
                "{el}: {}",
                breit_qed_ev(*i)
            );
            assert!((v - s - breit_qed_ev(*i)).abs() < 1e-12);
        }
        // Tenths of an eV by O and F (docs/reference-data.md §4, common practice).
        assert!((0.1..0.5).contains(&c[2].2) && (0.1..1.0).contains(&c[3].2));
    }

    #[test]
    fn grows_steeply_and_stays_below_the_bare_nucleus_value() {
        // Positive and steeper than linear in the binding energy.
        assert_eq!(correction_ev(0.0), 0.0);
        let (a, b) = (scalar_ev(300.0), scalar_ev(600.0));
        assert!(a > 0.0 && b / a > 4.0 && b / a < 4.5, "{a} {b}");
        // A 1s electron of a bare nucleus: E = −Z²/2 − Z⁴α²/8 hartree to order α² (Dirac
        // equation, textbook result; common practice). Screening by the other electrons makes
        // the many-electron correction smaller, never larger. The two-electron and radiative
        // part is bounded the same way by the hydrogen-like values: the contact energy of a
        // 1s² pair, Z³α²/8 (⟨δ(r₁₂)⟩ = Z³/8π, textbook), plus one 1s Lamb shift; and, as a
        // guard on the fit, it keeps more than half of that bound (screening and relaxation
        // remove 14–21 % of it for C–Ne in the computed values).
        for &(z, i) in &TYPICAL_1S_EV {
            let zf = z as f64;
            let bare = ev(zf.powi(4) * FINE_STRUCTURE * FINE_STRUCTURE / 8.0);
            let c = correction_ev(i);
            assert!(c < bare && c > 0.1 * bare, "Z = {z}: {c} vs bare {bare}");
            let pair = ev(zf.powi(3) * FINE_STRUCTURE * FINE_STRUCTURE / 8.0);
            let lamb = ev(qed_hartree(zf, zf.powi(3) / std::f64::consts::PI));
            let q = breit_qed_ev(i);
            assert!(
                q < 0.0 && -q < pair + lamb && -q > 0.5 * (pair + lamb),
                "Z = {z}: {q}"
            );
        }
    }
}
