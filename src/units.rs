//! Physical constants (CODATA 2018) and unit conversions. Nothing else lives here.
//!
//! Inside bandcast everything is in atomic units (hartree, bohr); eV and Å appear only at
//! the edges (input parsing, printers).

/// 1 hartree in electronvolts (CODATA 2018).
pub const HARTREE_TO_EV: f64 = 27.211386245988;
/// 1 bohr in ångström (CODATA 2018).
pub const BOHR_TO_ANGSTROM: f64 = 0.529177210903;
/// 1 ångström in bohr.
pub const ANGSTROM_TO_BOHR: f64 = 1.0 / BOHR_TO_ANGSTROM;
/// Atomic unit of electric dipole moment (e·a0) in debye (CODATA 2018: e a0 = 8.4783536255e-30 C m;
/// 1 D = 1e-21/c C m with c = 299792458 m/s).
pub const AU_TO_DEBYE: f64 = 2.541746473;
/// Fine-structure constant α (CODATA 2018).
pub const FINE_STRUCTURE: f64 = 7.2973525693e-3;

/// hartree → eV
pub fn ev(hartree: f64) -> f64 {
    hartree * HARTREE_TO_EV
}

/// eV → hartree
pub fn hartree(ev: f64) -> f64 {
    ev / HARTREE_TO_EV
}

#[cfg(test)]
mod tests {
    use super::*;
    #[test]
    fn round_trips() {
        assert!((hartree(ev(1.234)) - 1.234).abs() < 1e-15);
        assert!((ANGSTROM_TO_BOHR * BOHR_TO_ANGSTROM - 1.0).abs() < 1e-15);
    }
}
/// Atomic mass constant m_u in electron masses (CODATA 2018: m_u/m_e = 1822.888486209).
pub const DALTON_TO_ELECTRON_MASS: f64 = 1822.888486209;
/// 1 hartree in wavenumbers, cm⁻¹ (CODATA 2018: 2.1947463136320e5).
pub const HARTREE_TO_WAVENUMBER: f64 = 219474.63136320;
/// Boltzmann constant in hartree per kelvin (CODATA 2018: k_B = 3.1668115634556e-6 Eh/K).
pub const BOLTZMANN_HARTREE_PER_KELVIN: f64 = 3.1668115634556e-6;
