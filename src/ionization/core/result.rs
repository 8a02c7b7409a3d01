//! What a core-level run returns: one record per ionised atom, plus how each hole was
//! searched for. Plain data; printers (text, JSON) live in the CLI, bands for the spectrum
//! module come from `CoreResult::bands`.

use serde::Serialize;

use crate::ionization::band::{Band, MakeupEntry, Region};

use super::hole_check::HoleStatus;

/// One SCF search for the core-ionised state of one atom.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HoleAttempt {
    /// Start used: "mom" (MOM from the localised neutral orbitals), "imom" (initial MOM),
    /// "rohf" (ROHF cation with MOM), "rohf→uhf" (UHF + MOM from the ROHF orbitals).
    pub start: String,
    pub status: HoleStatus,
    /// ΔSCF binding energy of this attempt (eV), when it converged.
    pub dscf_ev: Option<f64>,
    pub s2: Option<f64>,
    /// Löwdin population of the final vacancy on the target atom.
    pub hole_population: Option<f64>,
    pub iterations: Option<usize>,
    /// Why it failed, when it did.
    pub message: Option<String>,
}

/// The 1s level of one atom.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CoreLevel {
    /// Atom number, from 1 in input order.
    pub atom: usize,
    pub element: String,
    /// Printed label: "C2 1s".
    pub label: String,
    pub shell: String,
    /// −ε of the canonical 1s orbital with most weight on the atom (eV).
    pub koopmans_ev: f64,
    /// E(cation with the 1s hole) − E(neutral), both Hartree–Fock (eV).
    pub dscf_ev: f64,
    /// ΔSCF plus the change of the second-order correlation energy (eV), when asked.
    pub dmp2_ev: Option<f64>,
    /// ⟨S²⟩ of the core-ionised cation (0.75 for a pure doublet).
    pub s2: f64,
    /// ΔSCF minus the reference's ΔSCF (eV), when a reference was given.
    pub shift_ev: Option<f64>,
    /// The same shift at ΔMP2 level.
    pub shift_dmp2_ev: Option<f64>,
    /// True when the hole was localised on this atom by rotating the core orbitals of
    /// equivalent atoms (false when the canonical 1s was already on one atom or when a
    /// canonical hole was asked for).
    pub localised: bool,
    /// Löwdin population of the final hole on this atom.
    pub hole_population: f64,
    /// Which attempt was kept (the lowest energy that still holds the hole).
    pub start: String,
    pub attempts: Vec<HoleAttempt>,
    /// Lifetime width (Lorentzian FWHM, eV) where known.
    pub lifetime_fwhm_ev: Option<f64>,
    /// Total energy of the kept cation (hartree).
    pub cation_energy_hartree: f64,
    pub notes: Vec<String>,
}

/// The reference a shift is measured from.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ShiftReferenceLevel {
    /// "molecule" or "atom".
    pub kind: String,
    /// Reference molecule's name (or this molecule's), and the atom used (from 1).
    pub molecule: String,
    pub atom: usize,
    pub element: String,
    pub dscf_ev: f64,
    pub dmp2_ev: Option<f64>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CoreResult {
    pub molecule: String,
    /// Main basis set name as asked for.
    pub basis: String,
    /// Flexibility given to the hole atoms ("uncontracted s on hole atoms", …).
    pub core_basis: String,
    /// Number of AO functions of the basis actually used.
    pub n_basis: usize,
    pub neutral_energy_hartree: f64,
    /// Second-order correlation energy of the neutral, when ΔMP2 was asked.
    pub neutral_mp2_hartree: Option<f64>,
    pub core_levels: Vec<CoreLevel>,
    pub references: Vec<ShiftReferenceLevel>,
    pub notes: Vec<String>,
}

impl CoreResult {
    /// Core-level bands for the spectrum module: one per atom, at the ΔSCF energy (ΔMP2 when
    /// it was computed), two electrons per 1s level.
    pub fn bands(&self) -> Vec<Band> {
        self.core_levels
            .iter()
            .map(|l| Band {
                label: l.label.clone(),
                symmetry: None,
                ie_ev: l.dmp2_ev.unwrap_or(l.dscf_ev),
                degeneracy: 1,
                occupation: 2.0,
                pole_strength: None,
                one_hole_weight: None,
                character: None,
                character_note: None,
                makeup: vec![MakeupEntry {
                    atom: format!("{}{}", l.element, l.atom),
                    shell: l.shell.clone(),
                    fraction: l.hole_population.clamp(0.0, 1.0),
                }],
                method: if l.dmp2_ev.is_some() {
                    "dmp2".into()
                } else {
                    "dscf".into()
                },
                region: Region::Core,
                atom: Some(l.atom - 1),
                lifetime_fwhm_ev: l.lifetime_fwhm_ev,
            })
            .collect()
    }
}

impl From<&CoreResult> for Vec<Band> {
    fn from(r: &CoreResult) -> Self {
        r.bands()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn level(atom: usize, dscf: f64, dmp2: Option<f64>) -> CoreLevel {
        CoreLevel {
            atom,
            element: "C".into(),
            label: format!("C{atom} 1s"),
            shell: "1s".into(),
            koopmans_ev: dscf + 14.0,
            dscf_ev: dscf,
            dmp2_ev: dmp2,
            s2: 0.76,
            shift_ev: None,
            shift_dmp2_ev: None,
            localised: true,
            hole_population: 0.99,
            start: "mom".into(),
            attempts: vec![],
            lifetime_fwhm_ev: Some(0.1),
            cation_energy_hartree: -28.0,
            notes: vec![],
        }
    }

    #[test]
    fn bands_carry_label_region_atom_and_energy() {
        let r = CoreResult {
            molecule: "x".into(),
            basis: "b".into(),
            core_basis: "plain".into(),
            n_basis: 10,
            neutral_energy_hartree: -40.0,
            neutral_mp2_hartree: None,
            core_levels: vec![level(2, 290.5, None), level(3, 291.0, Some(291.3))],
            references: vec![],
            notes: vec![],
        };
        let b: Vec<Band> = (&r).into();
        assert_eq!(b.len(), 2);
        assert_eq!(b[0].label, "C2 1s");
        assert_eq!(b[0].region, Region::Core);
        assert_eq!(b[0].atom, Some(1));
        assert_eq!(b[0].ie_ev, 290.5);
        assert_eq!(b[0].method, "dscf");
        assert_eq!(b[1].ie_ev, 291.3);
        assert_eq!(b[1].method, "dmp2");
        assert_eq!(b[1].lifetime_fwhm_ev, Some(0.1));
        let j = serde_json::to_value(&r).unwrap();
        assert_eq!(j["core_levels"][0]["shift_ev"], serde_json::Value::Null);
        assert_eq!(j["core_levels"][0]["shell"], "1s");
    }
}
