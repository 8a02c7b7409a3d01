//! JSON printers: serde structs only (keys documented in docs/json.md).

use serde::Serialize;

use super::runs::{AssignRun, InputInfo, SpectrumRun};
use crate::error::{Error, Result};
use crate::ionization::notice::ValenceNotice;
use crate::ionization::valence::ValenceResult;
use crate::ionization::Region;
use crate::spectrum::broaden::Curve;
use crate::spectrum::compare::Comparison;
use crate::spectrum::note::Note;
use crate::spectrum::photon::Axis;
use crate::spectrum::predicted::{Excluded, IntensityModel, Stick};
use crate::spectrum::Shape;

/// Pretty JSON text of any printer struct.
pub fn to_pretty<T: Serialize>(value: &T) -> Result<String> {
    serde_json::to_string_pretty(value).map_err(|e| Error::computation(e.to_string()))
}

fn messages(notes: &[Note]) -> Vec<String> {
    notes.iter().map(Note::to_string).collect()
}

/// Everything `bandcast spectrum --json` prints.
#[derive(Serialize)]
pub struct SpectrumJson<'a> {
    pub photon: String,
    pub photon_energy_ev: f64,
    pub region: Region,
    pub axis: Axis,
    pub shape: Shape,
    pub gaussian_fwhm_ev: f64,
    pub intensity_model: IntensityModel,
    pub method: &'a str,
    pub basis: &'a str,
    pub inputs: &'a [InputInfo],
    pub bands: &'a [Stick],
    pub excluded: &'a [Excluded],
    /// Messages of the notes (as printed).
    pub notes: Vec<String>,
    /// The same notes with their stable codes.
    pub note_details: &'a [Note],
    pub curve: &'a Curve,
}

impl<'a> SpectrumJson<'a> {
    pub fn new(run: &'a SpectrumRun<'a>) -> Self {
        let s = run.spectrum;
        SpectrumJson {
            photon: run.photon.name(),
            photon_energy_ev: run.photon.energy_ev(),
            region: run.region,
            axis: run.axis,
            shape: s.shape,
            gaussian_fwhm_ev: s.fwhm,
            intensity_model: run.intensity,
            method: &run.method,
            basis: &run.basis,
            inputs: &run.inputs,
            bands: &s.sticks,
            excluded: &s.excluded,
            notes: messages(&s.notes),
            note_details: &s.notes,
            curve: &s.curve,
        }
    }
}

/// Everything `bandcast assign --json` prints.
#[derive(Serialize)]
pub struct AssignJson<'a> {
    pub molecule: &'a str,
    pub method: &'a str,
    pub basis: &'a str,
    pub measured_file: &'a str,
    #[serde(flatten)]
    pub comparison: &'a Comparison,
    /// Messages of the notes (as printed).
    pub notes: Vec<String>,
    /// The same notes with their stable codes.
    pub note_details: &'a [Note],
    /// Chemical environment of each core-level band, from its atom's bonded neighbours
    /// (`chem::environment`); empty for valence bands.
    pub environments: Vec<EnvironmentJson<'a>>,
}

/// A band and the chemical environment of its atom.
#[derive(Serialize)]
pub struct EnvironmentJson<'a> {
    pub band: &'a str,
    pub environment: &'a str,
}

impl<'a> AssignJson<'a> {
    pub fn new(run: &'a AssignRun<'a>) -> Self {
        let c = &run.assignment.comparison;
        AssignJson {
            molecule: &run.molecule,
            method: &run.method,
            basis: &run.basis,
            measured_file: &run.measured_file,
            comparison: c,
            notes: messages(&c.notes),
            note_details: &c.notes,
            environments: run
                .assignment
                .sticks
                .iter()
                .filter_map(|s| {
                    s.environment.as_deref().map(|e| EnvironmentJson {
                        band: &s.label,
                        environment: e,
                    })
                })
                .collect(),
        }
    }
}

/// Printed under every ionize table and in its JSON: the numbers are predictions.
pub const GUIDANCE: &str = "These are computed predictions to guide a measurement, not a \
substitute for one; check assignments against a measured spectrum before relying on them.";

/// Name of a wavefunction type as printed ("rhf", "uhf", "rohf").
pub fn reference_name(r: crate::scf::Reference) -> &'static str {
    use crate::scf::Reference;
    match r {
        Reference::Rhf => "rhf",
        Reference::Uhf => "uhf",
        Reference::Rohf => "rohf",
    }
}

/// Everything `bandcast ionize --json` prints (fields in alphabetical order, the order of
/// the key listing in docs/json.md).
#[derive(Serialize)]
pub struct IonizeJson<'a> {
    pub bands: Vec<IonizeBandJson<'a>>,
    pub basis: &'a str,
    pub method: &'static str,
    pub molecule: &'a str,
    /// The guidance sentence.
    pub note: &'static str,
    /// The notes with their stable codes.
    pub note_details: &'a [ValenceNotice],
    /// Messages of the notes (as printed).
    pub notes: Vec<String>,
    pub order_uncertain: Vec<UncertainPairJson<'a>>,
    pub point_group: &'a Option<String>,
    pub reference: ReferenceJson,
    /// The warnings with their stable codes.
    pub warning_details: &'a [ValenceNotice],
    /// Messages of the warnings (as printed).
    pub warnings: Vec<String>,
}

/// One band of `bandcast ionize --json`.
#[derive(Serialize)]
pub struct IonizeBandJson<'a> {
    pub character: &'a Option<String>,
    pub character_note: &'a Option<String>,
    pub degeneracy: usize,
    pub ie_ev: f64,
    pub koopmans_ie_ev: f64,
    pub label: &'a str,
    pub makeup: Vec<MakeupJson<'a>>,
    pub method: &'a str,
    pub occupation: f64,
    pub one_hole_weight: Option<f64>,
    /// Labels of the bands this one may be in the wrong order with.
    pub order_uncertain_with: Vec<&'a str>,
    pub pole_strength: Option<f64>,
    pub symmetry: &'a Option<String>,
}

/// One atom-and-shell share of a band (keys in alphabetical order).
#[derive(Serialize)]
pub struct MakeupJson<'a> {
    pub atom: &'a str,
    pub fraction: f64,
    pub shell: &'a str,
}

/// A pair of bands whose order is in doubt.
#[derive(Serialize)]
pub struct UncertainPairJson<'a> {
    pub bands: &'a [String; 2],
    pub doubt: &'a crate::ionization::uncertainty::Doubt,
    pub gap_ev: f64,
    pub reason: &'a str,
}

/// The SCF reference of a prediction.
#[derive(Serialize)]
pub struct ReferenceJson {
    pub energy_hartree: f64,
    pub kind: &'static str,
}

impl<'a> IonizeJson<'a> {
    pub fn new(r: &'a ValenceResult, molecule: &'a str) -> Self {
        let bands = r
            .bands
            .iter()
            .enumerate()
            .map(|(k, b)| IonizeBandJson {
                character: &b.character,
                character_note: &b.character_note,
                degeneracy: b.degeneracy,
                ie_ev: b.ie_ev,
                koopmans_ie_ev: r.koopmans_ev[k],
                label: &b.label,
                makeup: b
                    .makeup
                    .iter()
                    .map(|m| MakeupJson {
                        atom: &m.atom,
                        fraction: m.fraction,
                        shell: &m.shell,
                    })
                    .collect(),
                method: &b.method,
                occupation: b.occupation,
                one_hole_weight: b.one_hole_weight,
                order_uncertain_with: r
                    .uncertain_pairs
                    .iter()
                    .filter_map(|p| {
                        if p.first == k {
                            Some(p.labels[1].as_str())
                        } else if p.second == k {
                            Some(p.labels[0].as_str())
                        } else {
                            None
                        }
                    })
                    .collect(),
                pole_strength: b.pole_strength,
                symmetry: &b.symmetry,
            })
            .collect();
        IonizeJson {
            bands,
            basis: &r.basis,
            method: r.method.name(),
            molecule,
            note: GUIDANCE,
            note_details: &r.notes,
            notes: r.notes.iter().map(ToString::to_string).collect(),
            order_uncertain: r
                .uncertain_pairs
                .iter()
                .map(|p| UncertainPairJson {
                    bands: &p.labels,
                    doubt: &p.doubt,
                    gap_ev: p.gap_ev,
                    reason: &p.reason,
                })
                .collect(),
            point_group: &r.point_group,
            reference: ReferenceJson {
                energy_hartree: r.reference_energy,
                kind: reference_name(r.reference),
            },
            warning_details: &r.warnings,
            warnings: r.warnings.iter().map(ToString::to_string).collect(),
        }
    }
}

/// Everything `bandcast scf --json` prints (keys in alphabetical order).
#[derive(Serialize)]
pub struct ScfJson<'a> {
    pub basis: &'a str,
    pub charge: i32,
    pub converged: bool,
    pub density_fitted: bool,
    pub density_fitted_start: Option<DfStartJson>,
    pub dipole_debye: DipoleJson,
    pub dipole_origin: &'static str,
    pub energy_hartree: f64,
    pub fock_builder: &'a str,
    pub harmonics: &'a str,
    pub iterations: usize,
    pub jk_fitting_basis: Option<&'a str>,
    pub molecule: &'a str,
    pub multiplicity: u32,
    pub n_atoms: usize,
    pub n_basis: usize,
    pub n_dropped_linear_dependencies: usize,
    pub n_electrons: usize,
    pub n_independent: usize,
    pub nuclear_repulsion_hartree: f64,
    pub one_electron_hartree: f64,
    pub orbitals: Vec<OrbitalJson>,
    pub reference: &'static str,
    pub s2: f64,
    pub two_electron_hartree: f64,
}

/// The density-fitted start of an SCF.
#[derive(Serialize)]
pub struct DfStartJson {
    pub corrected_iterations: usize,
    pub energy_hartree: f64,
    pub iterations: usize,
}

/// A dipole moment in debye.
#[derive(Serialize)]
pub struct DipoleJson {
    pub total: f64,
    pub x: f64,
    pub y: f64,
    pub z: f64,
}

/// One orbital (index from 1 within its spin channel).
#[derive(Serialize)]
pub struct OrbitalJson {
    pub energy_ev: f64,
    pub energy_hartree: f64,
    pub index: usize,
    pub occupation: f64,
    pub spin: &'static str,
}

impl<'a> ScfJson<'a> {
    pub fn new(
        mol: &'a crate::chem::Molecule,
        wf: &'a crate::scf::Wavefunction,
        info: &'a super::runs::ScfRun,
    ) -> Self {
        use crate::units::HARTREE_TO_EV;
        let mut orbitals = Vec::new();
        for (spin, eps, occ) in super::runs::scf_channels(wf) {
            for (i, (&e, &o)) in eps.iter().zip(&occ).enumerate() {
                orbitals.push(OrbitalJson {
                    energy_ev: e * HARTREE_TO_EV,
                    energy_hartree: e,
                    index: i + 1,
                    occupation: o,
                    spin,
                });
            }
        }
        let d = super::runs::dipole_debye(wf);
        ScfJson {
            basis: &info.basis_name,
            charge: mol.charge,
            converged: wf.converged,
            density_fitted: info.density_fitted,
            density_fitted_start: info.df_start.as_ref().map(|d| DfStartJson {
                corrected_iterations: d.corrected_iterations,
                energy_hartree: d.energy,
                iterations: d.iterations,
            }),
            dipole_debye: DipoleJson {
                total: d[3],
                x: d[0],
                y: d[1],
                z: d[2],
            },
            dipole_origin: "origin of the input coordinates",
            energy_hartree: wf.energy,
            fock_builder: &info.builder,
            harmonics: info.harmonics,
            iterations: wf.iterations,
            jk_fitting_basis: (info.density_fitted || info.df_start.is_some())
                .then_some(info.jk_fitting.as_str()),
            molecule: &mol.name,
            multiplicity: mol.multiplicity,
            n_atoms: mol.atoms.len(),
            n_basis: wf.n_basis,
            n_dropped_linear_dependencies: info.n_dropped,
            n_electrons: mol.n_electrons(),
            n_independent: wf.n_independent,
            nuclear_repulsion_hartree: wf.nuclear_repulsion,
            one_electron_hartree: wf.one_electron,
            orbitals,
            reference: reference_name(wf.reference),
            s2: wf.s2,
            two_electron_hartree: wf.two_electron,
        }
    }
}
