//! Photon sources and the binding ↔ kinetic energy relation.
//!
//! Line energies (eV):
//! - He I α (1s2p ¹P₁ → 1s² ¹S₀, 58.4334 nm): 21.218 eV — NIST Atomic Spectra Database
//!   (Kramida et al.), He I line list (from memory of the tabulated wavelength).
//! - He II Lyman α (2p → 1s of He⁺, 30.378 nm): 40.814 eV — NIST Atomic Spectra Database,
//!   He II line list (from memory).
//! - Mg Kα₁,₂ 1253.6 eV and Al Kα₁,₂ 1486.6 eV — J. A. Bearden, "X-ray wavelengths",
//!   Rev. Mod. Phys. 39 (1967) 78, as quoted in the X-ray Data Booklet (LBNL), Table 1-2
//!   (from memory; these are the values every XPS laboratory uses).
//!
//! Kinetic energy of the photoelectron: E_kin = hν − E_bind (Einstein's photoelectric
//! relation for a free molecule; no work function in the gas phase, common practice).

use serde::Serialize;

use super::lineshape::Shape;
use crate::ionization::Region;

#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", content = "energy_ev", rename_all = "lowercase")]
pub enum Photon {
    He1,
    He2,
    MgKa,
    AlKa,
    /// Any other photon energy in eV (synchrotron, laser harmonics).
    Custom(f64),
}

impl Photon {
    /// Parse "he1", "he2", "mgka", "alka" (any case) or a positive energy in eV.
    pub fn parse(s: &str) -> Result<Photon, String> {
        let t = s.trim().to_ascii_lowercase();
        match t.as_str() {
            "he1" | "hei" => return Ok(Photon::He1),
            "he2" | "heii" => return Ok(Photon::He2),
            "mgka" => return Ok(Photon::MgKa),
            "alka" => return Ok(Photon::AlKa),
            _ => {}
        }
        let t = t.strip_suffix("ev").unwrap_or(&t).trim();
        match t.parse::<f64>() {
            Ok(e) if e.is_finite() && e > 0.0 => Ok(Photon::Custom(e)),
            _ => Err(format!(
                "photon '{s}' is not one of he1, he2, mgka, alka or a positive energy in eV"
            )),
        }
    }

    /// Photon energy hν in eV.
    pub fn energy_ev(self) -> f64 {
        match self {
            Photon::He1 => 21.218,
            Photon::He2 => 40.814,
            Photon::MgKa => 1253.6,
            Photon::AlKa => 1486.6,
            Photon::Custom(e) => e,
        }
    }

    pub fn name(self) -> String {
        match self {
            Photon::He1 => "He I (21.218 eV)".into(),
            Photon::He2 => "He II (40.814 eV)".into(),
            Photon::MgKa => "Mg Kα (1253.6 eV)".into(),
            Photon::AlKa => "Al Kα (1486.6 eV)".into(),
            Photon::Custom(e) => format!("{e} eV photons"),
        }
    }

    /// Default Gaussian FWHM (eV) of a band for this source, common practice:
    /// - He I / He II valence spectra of molecules: ~0.3 eV, an envelope that stands in for
    ///   the unresolved vibrational progression plus the analyser resolution (~20 meV);
    /// - non-monochromated Mg Kα / Al Kα: ~0.9 eV (the Kα₁,₂ doublet and its natural width
    ///   give 0.7–0.85 eV, plus the analyser);
    /// - other energies (synchrotron): 0.3 eV for valence bands, 0.5 eV for core levels.
    pub fn default_fwhm_ev(self, region: Region) -> f64 {
        match (self, region) {
            (Photon::He1 | Photon::He2, _) => 0.3,
            (Photon::MgKa | Photon::AlKa, _) => 0.9,
            (Photon::Custom(_), Region::Valence) => 0.3,
            (Photon::Custom(_), Region::Core) => 0.5,
        }
    }

    /// Default line shape: Gaussian for valence bands, Voigt (Gaussian instrument ⊗
    /// Lorentzian lifetime) for core levels.
    pub fn default_shape(region: Region) -> Shape {
        match region {
            Region::Valence => Shape::Gaussian,
            Region::Core => Shape::Voigt,
        }
    }

    /// Kinetic energy (eV) of an electron leaving a level of binding energy `be_ev`.
    pub fn kinetic_ev(self, be_ev: f64) -> f64 {
        self.energy_ev() - be_ev
    }

    /// Binding energy (eV) of a level whose electrons leave with kinetic energy `ke_ev`.
    pub fn binding_ev(self, ke_ev: f64) -> f64 {
        self.energy_ev() - ke_ev
    }

    /// Whether the photon can ionize a level of binding energy `be_ev`.
    pub fn reaches(self, be_ev: f64) -> bool {
        be_ev < self.energy_ev()
    }
}

/// Which energy the horizontal axis shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Axis {
    Binding,
    Kinetic,
}

impl Axis {
    pub fn parse(s: &str) -> Option<Axis> {
        match s.to_ascii_lowercase().as_str() {
            "binding" => Some(Axis::Binding),
            "kinetic" => Some(Axis::Kinetic),
            _ => None,
        }
    }
    pub fn title(self) -> &'static str {
        match self {
            Axis::Binding => "Binding energy (eV)",
            Axis::Kinetic => "Kinetic energy (eV)",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parse_sources() {
        assert_eq!(Photon::parse("He1").unwrap(), Photon::He1);
        assert_eq!(Photon::parse("ALKA").unwrap(), Photon::AlKa);
        assert_eq!(Photon::parse("60").unwrap(), Photon::Custom(60.0));
        assert_eq!(Photon::parse("60 eV").unwrap(), Photon::Custom(60.0));
        assert!(Photon::parse("-3").is_err());
        assert!(Photon::parse("xray").is_err());
    }

    #[test]
    fn round_trip() {
        let p = Photon::MgKa;
        assert!((p.binding_ev(p.kinetic_ev(290.0)) - 290.0).abs() < 1e-12);
    }
}
