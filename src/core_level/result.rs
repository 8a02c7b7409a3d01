//! What a core-level run returns: one record per ionised atom, plus how each hole was
//! searched for. Plain data; the text printer lives in the CLI, JSON is serde of these, bands for the spectrum
//! module come from `CoreResult::bands`.

use serde::Serialize;

use crate::ionization::band::{Band, MakeupEntry, Region};

use super::delocalised::DelocalisedHole;
use super::delta_cc::CcEnergies;
use super::hole_check::HoleStatus;
use super::notes::Notes;
use super::shell_hole::SpatialHole;
use super::spin_orbit::LevelComponent;

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
    /// Chemical environment of the atom from its bonded neighbours ("O–C(=O)–O", "CH3";
    /// `chem::environment`).
    pub environment: String,
    pub shell: String,
    /// −ε of the canonical 1s orbital with most weight on the atom (eV).
    pub koopmans_ev: f64,
    /// E(cation with the 1s hole) − E(neutral), both Hartree–Fock (eV).
    pub dscf_ev: f64,
    /// ΔSCF plus the change of the second-order correlation energy (eV), when asked.
    pub dmp2_ev: Option<f64>,
    /// ⟨S²⟩ of the core-ionised cation (0.75 for a pure doublet).
    pub s2: f64,
    /// Relativistic correction (eV) computed from the ΔSCF value, when asked
    /// (`relativistic.rs`; null otherwise).
    pub relativistic_correction_ev: Option<f64>,
    /// ΔSCF plus the relativistic correction (eV), when asked.
    pub dscf_relativistic_ev: Option<f64>,
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
    /// Energy of the neutral in the basis of this hole (hartree).
    pub neutral_energy_hartree: f64,
    /// Functions of the basis of this hole (the basis as named plus the core flexibility
    /// on the hole atom).
    pub n_basis: usize,
    /// When this atom is symmetry-equivalent to an atom computed in the same run, that
    /// atom's number (from 1): the numbers are copied from it, no SCF was run for this one.
    pub same_as_atom: Option<usize>,
    /// The delocalised (symmetry-constrained) hole, when asked and the atom has equivalent
    /// partners; null otherwise.
    pub delocalised: Option<DelocalisedHole>,
    /// 2p levels: the spin–orbit splitting E(2p1/2) − E(2p3/2) of this atom (eV); null for s.
    pub spin_orbit_ev: Option<f64>,
    /// 2p levels: the Kramers doublets that make up the line (molecular-field substructure,
    /// two electrons each); absent for s levels.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub components: Vec<LevelComponent>,
    /// 2p levels: the three spatial ΔSCF holes along the principal axes of the field at the
    /// atom; absent for s levels.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub spatial_holes: Vec<SpatialHole>,
    /// ΔCCSD, ΔCCSD(T) and the recommended value (`delta_cc.rs`; JSON: flattened).
    #[serde(flatten)]
    pub cc: CcEnergies,
    /// JSON: `notes` (messages) and `note_details` (`{code, message}`).
    #[serde(flatten)]
    pub notes: Notes,
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
    /// The reference level's shell ("1s", "2p3/2", …): shifts compare like shells.
    pub shell: String,
    pub dscf_ev: f64,
    pub dmp2_ev: Option<f64>,
    /// The reference's recommended (non-relativistic) value, as `binding_ev` of a level.
    pub binding_ev: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CoreResult {
    pub molecule: String,
    /// Main basis set name as asked for.
    pub basis: String,
    /// Flexibility given to the hole atoms ("uncontracted s on hole atoms", …).
    pub core_basis: String,
    /// Largest number of AO functions of the bases used (each hole has its own basis unless
    /// the core basis is plain).
    pub n_basis: usize,
    /// Neutral Hartree–Fock energy when every level used one basis (plain core basis or a
    /// single hole), otherwise null: each level then carries its own.
    pub neutral_energy_hartree: Option<f64>,
    /// Second-order correlation energy of the neutral, when ΔMP2 was asked and one basis
    /// served every level.
    pub neutral_mp2_hartree: Option<f64>,
    pub core_levels: Vec<CoreLevel>,
    pub references: Vec<ShiftReferenceLevel>,
    /// Source of the relativistic correction when it was applied, else null.
    pub relativistic_source: Option<String>,
    /// How J and K were built in the SCFs (density-fitted or exact; `fitting.rs`).
    pub integrals: super::fitting::IntegralsUsed,
    /// JSON: `notes` (messages) and `note_details` (`{code, message}`).
    #[serde(flatten)]
    pub notes: Notes,
    /// Where the time went (not part of the JSON output: it differs from run to run).
    #[serde(skip)]
    pub timings: CoreTimings,
}

/// Wall and CPU seconds of the stages of a run (`bandcast bench core` prints them).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CoreTimings {
    /// How J and K were built in the last SCF ("in-core (… MiB …)" or "direct").
    pub fock_builder: String,
    /// The quartets shared by the holes' bases (`shared_eri.rs`): time and bytes (0 when
    /// not used).
    pub shared_s: f64,
    pub shared_cpu_s: Option<f64>,
    pub shared_bytes: usize,
    /// One entry per neutral SCF (one per basis), including ΔMP2 of the neutral when asked.
    pub neutrals: Vec<StageTiming>,
    /// One entry per computed hole, in order: every SCF start (and ΔMP2 when asked).
    pub holes: Vec<StageTiming>,
    pub total_s: f64,
    pub total_cpu_s: Option<f64>,
}

/// Time spent on one stage: a neutral (integrals included) or one hole (all its starts).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct StageTiming {
    /// "C1" (the hole atoms of the basis) for a neutral, "C1 1s" for a hole.
    pub label: String,
    pub n_basis: usize,
    pub seconds: f64,
    pub cpu_seconds: Option<f64>,
    /// Fock builds (over all starts for a hole).
    pub iterations: usize,
}

impl CoreResult {
    /// Core-level bands for the spectrum module: one per atom, at the ΔSCF energy (ΔMP2 when
    /// it was computed) plus the relativistic correction when it was asked, two electrons
    /// per 1s level.
    pub fn bands(&self) -> Vec<Band> {
        self.core_levels
            .iter()
            .flat_map(|l| {
                if l.components.is_empty() {
                    vec![level_band(l)]
                } else {
                    super::two_p::component_bands(l, level_band(l))
                }
            })
            .collect()
    }
}

/// The band of one level: at the ΔSCF energy (ΔMP2 when computed) plus the relativistic
/// correction when asked, two electrons.
fn level_band(l: &CoreLevel) -> Band {
    {
        {
            Band {
                label: l.label.clone(),
                symmetry: None,
                ie_ev: l.dmp2_ev.unwrap_or(l.dscf_ev) + l.relativistic_correction_ev.unwrap_or(0.0),
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
                environment: Some(l.environment.clone()),
                lifetime_fwhm_ev: l.lifetime_fwhm_ev,
            }
        }
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
            environment: "CH4".into(),
            shell: "1s".into(),
            koopmans_ev: dscf + 14.0,
            dscf_ev: dscf,
            dmp2_ev: dmp2,
            s2: 0.76,
            relativistic_correction_ev: None,
            dscf_relativistic_ev: None,
            shift_ev: None,
            shift_dmp2_ev: None,
            localised: true,
            hole_population: 0.99,
            start: "mom".into(),
            attempts: vec![],
            lifetime_fwhm_ev: Some(0.1),
            cation_energy_hartree: -28.0,
            neutral_energy_hartree: -39.0,
            n_basis: 10,
            same_as_atom: None,
            delocalised: None,
            spin_orbit_ev: None,
            components: vec![],
            spatial_holes: vec![],
            cc: Default::default(),
            notes: Notes::default(),
        }
    }

    #[test]
    fn bands_carry_label_region_atom_and_energy() {
        let r = CoreResult {
            molecule: "x".into(),
            basis: "b".into(),
            core_basis: "plain".into(),
            n_basis: 10,
            neutral_energy_hartree: Some(-40.0),
            neutral_mp2_hartree: None,
            core_levels: vec![level(2, 290.5, None), level(3, 291.0, Some(291.3))],
            references: vec![],
            relativistic_source: None,
            integrals: Default::default(),
            notes: Notes::default(),
            timings: CoreTimings::default(),
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
