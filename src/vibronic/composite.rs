//! Correlated positions for vibronic bands: the composite
//!   E_vertical = correlated vertical IE at the neutral's minimum (the default valence
//!                method of `bandcast ionize`: EOM-IP-CCSD where it fits, else the chain's
//!                fallback),
//!   E_adiabatic = E_vertical − (E_vertical − E_adiabatic)_HF (the cation's relaxation and
//!                zero-point change along the Hartree–Fock surfaces),
//! i.e. every line of the band is shifted by the difference between the correlated and the
//! HF ΔSCF vertical ionization energy; the band's shape stays that of the HF surfaces.
//! Bands are matched to the correlated ones by their orbital label; a band without a label
//! or without a correlated partner keeps its ΔSCF positions (and says so).
//!
//! **Basis of the vertical energy.** It may differ from the basis of the geometries and
//! Hessians (`basis_name`). It matters more than anything else here: water's 1b1 band
//! (docs/vibronic-bands.md) has EOM-IP-CCSD vertical energies 11.85 (cc-pVDZ), 12.45
//! (cc-pVTZ) and 12.65 eV (aug-cc-pVTZ) at the same HF/cc-pVDZ minimum, while the HF
//! relaxation (0.11 eV) and zero-point change (−0.08 eV) hardly move with the basis. A
//! basis without diffuse functions gets a note (`BandNote::VerticalBasisWithoutDiffuse`).

use crate::basis;
use crate::error::Result;
use crate::ionization::default_method::predict_default;
use crate::ionization::valence::ValenceOptions;

use super::band::{BandNote, Neutral, VibronicBand};

/// The correction applied to one band.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Composite {
    /// Method of the correlated vertical energy ("eom-ccsd", …).
    pub method: String,
    /// Basis of the correlated vertical energy.
    pub basis: String,
    pub correlated_vertical_ev: f64,
    /// HF ΔSCF vertical energy it replaces.
    pub hf_vertical_ev: f64,
    /// Shift applied to every position of the band (correlated − HF vertical).
    pub shift_ev: f64,
}

/// Shift the bands to correlated vertical energies (module docs). `memory_bytes` bounds the
/// correlated calculation as in `bandcast ionize --memory`.
pub fn apply_correlated_vertical(
    n: &Neutral,
    basis_name: &str,
    bands: &mut [VibronicBand],
    memory_bytes: usize,
) -> Result<String> {
    let mol = &n.state.molecule;
    let basis = basis::load(basis_name, mol, None)?;
    let opts = ValenceOptions {
        memory_bytes,
        ..ValenceOptions::default()
    };
    let (res, _) = predict_default(mol, &basis, &opts)?;
    let method = res.method.name().to_string();
    let diffuse = has_diffuse(&basis.name);
    for b in bands.iter_mut() {
        let partner = b
            .label
            .as_deref()
            .and_then(|l| res.bands.iter().find(|x| x.label.eq_ignore_ascii_case(l)));
        let Some(p) = partner else {
            b.notes.push(BandNote::NoCorrelatedPartner);
            continue;
        };
        let shift = p.ie_ev - b.vertical_ev;
        b.composite = Some(Composite {
            method: p.method.clone(),
            basis: basis.name.clone(),
            correlated_vertical_ev: p.ie_ev,
            hf_vertical_ev: b.vertical_ev,
            shift_ev: shift,
        });
        b.electronic_method = format!("{} vertical + HF relaxation", p.method);
        b.vertical_ev += shift;
        b.adiabatic_ev += shift;
        b.electronic_adiabatic_ev += shift;
        b.maximum_ev += shift;
        b.mean_ev += shift;
        for l in &mut b.lines {
            l.energy_ev += shift;
        }
        b.notes.retain(|x| *x != BandNote::HartreeFockEnergies);
        if !diffuse {
            b.notes.push(BandNote::VerticalBasisWithoutDiffuse {
                basis: basis.name.clone(),
            });
        }
    }
    Ok(method)
}

/// Whether a basis name says it carries diffuse functions (aug-…, d-aug-…, 6-31+G…,
/// def2-…D as in def2-SVPD).
pub fn has_diffuse(name: &str) -> bool {
    let l = name.to_ascii_lowercase();
    l.contains("aug-") || l.contains('+') || (l.starts_with("def2-") && l.ends_with('d'))
}
