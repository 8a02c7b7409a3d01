//! Natural (Auger + radiative) lifetime widths of 1s holes, Lorentzian FWHM in eV, where a
//! value is known to the project; others are left unknown (None) rather than guessed. The
//! one table of these widths: core levels carry it on each level, and the spectrum uses it
//! for core bands that do not carry their own.
//!
//! Values **from memory**, not re-read: the K-level widths of J. L. Campbell & T. Papp,
//! "Widths of the atomic K–N7 levels", At. Data Nucl. Data Tables 77 (2001) 1, and the
//! gas-phase molecular values of high-resolution core-level photoemission (C 1s of CH4 near
//! 0.1 eV is quoted widely; common practice). Treat each as ±20 %. Light-element 1s holes
//! decay almost only by Auger emission, so the width grows smoothly with Z (common practice).

/// Lifetime FWHM (eV) of a 1s hole on element `z`, None when not tabulated.
pub fn lifetime_fwhm_ev(z: u32) -> Option<f64> {
    match z {
        3 => Some(0.03),  // Li, from memory
        4 => Some(0.04),  // Be, from memory
        5 => Some(0.07),  // B, from memory
        6 => Some(0.10),  // C, from memory
        7 => Some(0.12),  // N, from memory
        8 => Some(0.16),  // O, from memory
        9 => Some(0.20),  // F, from memory
        10 => Some(0.25), // Ne, from memory
        _ => None,
    }
}
