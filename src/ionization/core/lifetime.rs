//! Natural (Auger + radiative) lifetime widths of 1s holes, Lorentzian FWHM in eV, where a
//! value is known to the project. Others are left unknown (None) rather than guessed.

/// Lifetime FWHM (eV) of a 1s hole on element `z`.
pub fn lifetime_fwhm_ev(z: u32) -> Option<f64> {
    match z {
        // C 1s lifetime broadening ≈ 0.1 eV FWHM: common practice, from memory
        // (REFERENCE-DATA.md §4 "facts of the trade").
        6 => Some(0.1),
        _ => None,
    }
}
