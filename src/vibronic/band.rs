//! One photoelectron band with its vibrational structure, from first principles: the
//! pipeline that joins the geometry, vibrations and Franck–Condon rooms.
//!
//! 1. The neutral (closed-shell RHF) is optimised and its harmonic analysis taken
//!    (`geometry::optimize`, `vibrations::hessian_by_gradients`).
//! 2. For each hole: the cation with one β electron taken from that orbital and held by the
//!    maximum overlap method (`geometry::state`, UHF) is solved at the neutral's minimum
//!    (vertical ionization energy), optimised from there, and its harmonic analysis taken.
//! 3. The Duschinsky relation between the two (`duschinsky::build`) and the progression
//!    from the neutral's v = 0 (`progression`), with the 0–0 line at the adiabatic
//!    ionization energy E_ion(min) − E_neutral(min) + ZPE_ion − ZPE_neutral.
//!
//! When the cation cannot be optimised (the optimiser fails or stalls, the hole moves to
//! another orbital, or the cation's minimum has an imaginary mode), the band falls back to
//! the vertical-gradient (linear coupling) model (`linear_coupling`): the cation's gradient
//! at the neutral's minimum along the neutral's modes, same frequencies; the band says so.
//!
//! Electronic energies are Hartree–Fock ΔSCF (both states' SCF energies) in this version;
//! no correlated composite is applied. ΔSCF misses the correlation change on ionization
//! (typically a few tenths of an eV, sign depending on the orbital), so the absolute
//! positions are guides; the band shapes depend on the geometry change and the frequencies.

use crate::analysis::symmetry::{detect_point_group, label_orbitals, DEFAULT_TOLERANCE};
use crate::chem::bonds::bonded_pairs;
use crate::chem::masses::most_abundant_isotope_mass;
use crate::chem::molecule::distance;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::geometry::state::hole_lost;
use crate::geometry::{optimize, OptimizeOptions, SolvedState, StateSpec};
use crate::gradient::{scf_gradient, GradientOptions};
use crate::scf::{Reference, ScfOptions};
use crate::units::{
    BOHR_TO_ANGSTROM, BOLTZMANN_HARTREE_PER_KELVIN, DALTON_TO_ELECTRON_MASS, HARTREE_TO_EV,
    HARTREE_TO_WAVENUMBER,
};
use crate::vibrations::{harmonic_analysis, hessian_by_gradients, HarmonicAnalysis};

use super::duschinsky::build as build_duschinsky;
use super::linear_coupling::{linear_coupling, project_gradient};
use super::notes::VibronicNote;
use super::plan::Stage;
use super::progression::{progression, FcOptions, Progression};
use super::state::HarmonicState;
use super::summary::band_shape;

/// Modes with at least this exact mean number of quanta count as progression-forming
/// (besides those excited in the strongest line).
pub const PROGRESSION_MEAN_QUANTA: f64 = 0.1;

/// The captured fraction below which a band says its line list is incomplete.
pub const CAPTURED_TARGET: f64 = 0.95;

/// Largest deviation of the Duschinsky matrix from orthogonality (max |JᵀJ − 1|) accepted
/// for the full model; beyond it the two minima are too far apart (axis switching, a change
/// of shape) and the band falls back to the linear coupling model. The engine itself notes
/// deviations above 1e-3.
pub const MAX_DUSCHINSKY_DEFECT: f64 = 0.2;

/// Lines summing to more than 1 + this mean the overlaps are not to be trusted (fall back).
const CAPTURED_EXCESS: f64 = 0.02;

/// Orbital energies (hartree) closer than this form one degenerate set (one band).
const DEGENERATE_EH: f64 = 1e-4;

/// Settings of the pipeline.
#[derive(Debug, Clone)]
pub struct BandOptions {
    /// Franck–Condon generation (target fraction, bounds).
    pub fc: FcOptions,
    /// Geometry optimisation of both states.
    pub optimize: OptimizeOptions,
    /// SCF thresholds (reference, guess and occupation are set by the states).
    pub scf: ScfOptions,
    /// Skip the cation's optimisation and use the vertical-gradient model directly.
    pub linear_coupling_only: bool,
}

impl BandOptions {
    /// Populate the neutral's vibrational levels at `kelvin` (Boltzmann; 0 = the neutral in
    /// v = 0 only, the default): hot-band lines appear below the 0–0 line. Err for a
    /// negative or non-finite temperature.
    pub fn with_temperature(mut self, kelvin: f64) -> Result<Self> {
        if !(kelvin.is_finite() && kelvin >= 0.0) {
            return Err(Error::input(format!(
                "the temperature must be a finite number of kelvin ≥ 0, not {kelvin}"
            )));
        }
        self.fc.thermal_energy = (kelvin > 0.0).then(|| kelvin * BOLTZMANN_HARTREE_PER_KELVIN);
        Ok(self)
    }

    /// The temperature in kelvin the neutral's levels are populated at (0 = v = 0 only).
    pub fn temperature_k(&self) -> f64 {
        self.fc
            .thermal_energy
            .map(|kt| kt / BOLTZMANN_HARTREE_PER_KELVIN)
            .unwrap_or(0.0)
    }
}

/// The band's `thermal_population` is only meaningful for a thermal run.
fn thermal_or_none(mut b: VibronicBand, opts: &BandOptions) -> VibronicBand {
    if opts.temperature_k() <= 0.0 {
        b.thermal_population = None;
    }
    b
}

impl Default for BandOptions {
    fn default() -> Self {
        BandOptions {
            fc: FcOptions {
                target_fraction: 0.99,
                ..FcOptions::default()
            },
            optimize: OptimizeOptions::default(),
            scf: ScfOptions {
                e_tol: 1e-11,
                commutator_tol: 1e-9,
                ..ScfOptions::default()
            },
            linear_coupling_only: false,
        }
    }
}

/// The neutral's minimum and harmonic analysis, shared by all bands of a molecule.
#[derive(Debug, Clone)]
pub struct Neutral {
    pub spec: StateSpec,
    pub state: SolvedState,
    pub energy: f64,
    pub analysis: HarmonicAnalysis,
    pub harmonic: HarmonicState,
    pub point_group: String,
    pub optimisation_converged: bool,
}

/// How the band's vibrational structure was obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum BandModel {
    /// Both states optimised, both harmonic analyses, Duschinsky rotation and frequency
    /// changes.
    Duschinsky,
    /// Vertical gradient along the neutral's modes (no frequency change, no mixing).
    LinearCoupling,
}

/// Typed notes of a band.
#[derive(Debug, Clone, PartialEq)]
pub enum BandNote {
    /// The cation could not be optimised or its minimum is out of the harmonic model's reach;
    /// the linear coupling model was used.
    LinearCouplingFallback { reason: String },
    /// The computed lines hold less than 95 % of the band's intensity.
    Incomplete { captured: f64 },
    /// Electronic energies are Hartree–Fock ΔSCF.
    HartreeFockEnergies,
    /// No correlated vertical energy matched this band: its positions stay HF ΔSCF.
    NoCorrelatedPartner,
    /// The correlated vertical energy came from a basis without diffuse functions.
    VerticalBasisWithoutDiffuse { basis: String },
    /// A note of the Franck–Condon engine.
    Engine(VibronicNote),
}

impl BandNote {
    pub fn code(&self) -> &'static str {
        match self {
            BandNote::LinearCouplingFallback { .. } => "band-linear-coupling-fallback",
            BandNote::Incomplete { .. } => "band-incomplete",
            BandNote::HartreeFockEnergies => "band-hartree-fock-energies",
            BandNote::NoCorrelatedPartner => "band-no-correlated-partner",
            BandNote::VerticalBasisWithoutDiffuse { .. } => "band-vertical-basis-without-diffuse",
            BandNote::Engine(n) => n.code(),
        }
    }
}

impl std::fmt::Display for BandNote {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            BandNote::LinearCouplingFallback { reason } => write!(
                f,
                "the full Duschinsky model was not used ({reason}); the band uses the \
                 vertical-gradient (linear coupling) model with the neutral's modes: no \
                 frequency changes, no mode mixing"
            ),
            BandNote::Incomplete { captured } => write!(
                f,
                "the listed lines hold {:.1} % of the band's intensity (less than 95 %): the \
                 band shape is incomplete",
                100.0 * captured
            ),
            BandNote::HartreeFockEnergies => write!(
                f,
                "ionization energies are Hartree–Fock ΔSCF (no correlation correction): \
                 expect errors of a few tenths of an eV in the positions"
            ),
            BandNote::NoCorrelatedPartner => write!(
                f,
                "no correlated vertical energy matched this band: its positions are HF ΔSCF"
            ),
            BandNote::VerticalBasisWithoutDiffuse { basis } => write!(
                f,
                "the correlated vertical energy is in {basis}, which has no diffuse functions: \
                 ionization energies of lone pairs come out low (water 1b1 in cc-pVDZ: 0.8 eV \
                 below aug-cc-pVTZ); an augmented basis for the vertical energy fixes most of it"
            ),
            BandNote::Engine(n) => write!(f, "{n}"),
        }
    }
}

impl serde::Serialize for BandNote {
    fn serialize<S: serde::Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("BandNote", 2)?;
        st.serialize_field("code", self.code())?;
        st.serialize_field("message", &self.to_string())?;
        st.end()
    }
}

/// Quanta of one ion mode in a line (mode counted from 1 as printed).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ModeQuanta {
    pub mode: usize,
    pub quanta: u32,
}

/// One vibronic line, eV at the edge.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BandLine {
    pub energy_ev: f64,
    /// Franck–Condon factor (the band's total is 1).
    pub intensity: f64,
    /// Ion quanta per excited mode (modes not listed have 0).
    pub quanta: Vec<ModeQuanta>,
    /// Hot bands (`--temperature` above 0 K): the neutral's quanta per excited mode of the
    /// initial level (neutral modes counted from 1, ascending wavenumber); empty (and left
    /// out of the JSON) for lines from the neutral's v = 0.
    #[serde(skip_serializing_if = "Vec::is_empty", default)]
    pub neutral_quanta: Vec<ModeQuanta>,
}

/// One progression-forming mode of the ion.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BandMode {
    /// Ion mode counted from 1 (ascending wavenumber).
    pub mode: usize,
    pub wavenumber_cm1: f64,
    pub irrep: String,
    pub quanta_at_maximum: u32,
    /// Exact mean quanta from the neutral's v = 0 (displacement, frequency change, mixing).
    pub mean_quanta: f64,
}

/// Change of one bond length on ionization (Å).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BondChange {
    /// Atoms counted from 1.
    pub atoms: [usize; 2],
    pub symbols: [String; 2],
    pub neutral_angstrom: f64,
    pub ion_angstrom: f64,
    pub change_angstrom: f64,
}

/// A band with its vibrational structure.
#[derive(Debug, Clone, serde::Serialize)]
pub struct VibronicBand {
    /// Parent orbital emptied (counted from 1) and its label when one fits.
    pub orbital: usize,
    pub label: Option<String>,
    /// Occupied orbitals of the neutral degenerate with the one emptied (1 or 2, 3 …).
    pub degeneracy: usize,
    pub model: BandModel,
    /// "HF ΔSCF", or "eom-ccsd vertical + HF relaxation" after `composite`.
    pub electronic_method: String,
    /// The correlated correction applied (`composite::apply_correlated_vertical`).
    pub composite: Option<super::composite::Composite>,
    /// 0–0 line: electronic difference at the two minima + zero-point difference.
    pub adiabatic_ev: f64,
    /// Electronic difference at the two minima alone.
    pub electronic_adiabatic_ev: f64,
    /// ZPE(ion) − ZPE(neutral).
    pub zero_point_change_ev: f64,
    /// Electronic energy difference at the neutral's minimum.
    pub vertical_ev: f64,
    /// Position of the strongest line.
    pub maximum_ev: f64,
    /// Intensity-weighted mean of the lines (the harmonic model's vertical energy as the
    /// band converges).
    pub mean_ev: f64,
    /// Intensity-weighted mean of the total ion quanta: a number for the progression's
    /// length.
    pub mean_total_quanta: f64,
    pub captured_fraction: f64,
    /// With a temperature above 0 K: the Boltzmann population of the neutral's levels
    /// followed (the captured fraction can reach at most this); None at 0 K.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub thermal_population: Option<f64>,
    pub progression_modes: Vec<BandMode>,
    /// Ion harmonic wavenumbers (cm⁻¹) and irreps, mode 1 first.
    pub ion_modes: Vec<(f64, String)>,
    pub bond_changes: Vec<BondChange>,
    pub ion_point_group: Option<String>,
    pub lines: Vec<BandLine>,
    pub notes: Vec<BandNote>,
}

impl VibronicBand {
    /// Quanta of `mode` (1-based) in the line.
    pub fn line_quanta(line: &BandLine, mode: usize) -> u32 {
        line.quanta
            .iter()
            .find(|q| q.mode == mode)
            .map(|q| q.quanta)
            .unwrap_or(0)
    }
}

fn masses(mol: &Molecule) -> Vec<f64> {
    mol.atoms
        .iter()
        .map(|a| most_abundant_isotope_mass(a.z) * DALTON_TO_ELECTRON_MASS)
        .collect()
}

/// HarmonicState (mass-weighted orthonormal modes, ω in hartree) from an analysis whose
/// modes are unit Cartesian displacements: L ∝ M^{1/2} d.
pub fn harmonic_state(mol: &Molecule, an: &HarmonicAnalysis) -> HarmonicState {
    let m = masses(mol);
    let modes: Vec<Vec<f64>> = an
        .modes
        .iter()
        .map(|md| {
            let mut l: Vec<f64> = md
                .displacement
                .iter()
                .enumerate()
                .flat_map(|(a, d)| d.map(|x| x * m[a].sqrt()))
                .collect();
            let n = l.iter().map(|x| x * x).sum::<f64>().sqrt();
            l.iter_mut().for_each(|x| *x /= n);
            l
        })
        .collect();
    HarmonicState {
        geometry: mol.atoms.iter().map(|a| a.position).collect(),
        masses: m,
        modes,
        frequencies: an
            .modes
            .iter()
            .map(|md| md.wavenumber_cm1 / HARTREE_TO_WAVENUMBER)
            .collect(),
    }
}

fn hessian_analysis(
    st: &SolvedState,
    spec: &StateSpec,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<(HarmonicAnalysis, String)> {
    let h = hessian_by_gradients(st, spec, progress)?;
    let pg = detect_point_group(&st.molecule, DEFAULT_TOLERANCE);
    Ok((harmonic_analysis(&st.molecule, &h, Some(&pg)), pg.name))
}

/// Optimise the closed-shell neutral and take its harmonic analysis.
pub fn neutral(mol: &Molecule, basis: &str, opts: &BandOptions) -> Result<Neutral> {
    neutral_with_progress(mol, basis, opts, &mut |_| {})
}

/// `neutral`, reporting its stages (`plan::Stage`) as they advance.
pub fn neutral_with_progress(
    mol: &Molecule,
    basis: &str,
    opts: &BandOptions,
    progress: &mut dyn FnMut(Stage),
) -> Result<Neutral> {
    if mol.multiplicity != 1 {
        return Err(Error::input(
            "vibronic bands start from a closed-shell neutral: multiplicity must be 1",
        ));
    }
    let spec = StateSpec {
        basis: basis.to_string(),
        charge: mol.charge,
        multiplicity: 1,
        reference: Reference::Rhf,
        hole: None,
        scf: opts.scf.clone(),
    };
    spec.validate(mol)?;
    let opt = optimize(mol, &spec, &opts.optimize, &mut |st| {
        progress(Stage::NeutralOptimisation { step: st.iteration })
    })?;
    let (analysis, pg) = hessian_analysis(&opt.state, &spec, &mut |done, total| {
        progress(Stage::NeutralHessian { done, total })
    })?;
    if analysis.n_imaginary > 0 {
        return Err(Error::computation(format!(
            "the neutral's optimised structure has {} imaginary mode(s): not a minimum, the \
             Franck–Condon model does not apply",
            analysis.n_imaginary
        )));
    }
    let harmonic = harmonic_state(&opt.state.molecule, &analysis);
    harmonic.validate("neutral")?;
    Ok(Neutral {
        energy: opt.state.wavefunction.energy,
        state: opt.state,
        spec,
        analysis,
        harmonic,
        point_group: pg,
        optimisation_converged: opt.converged,
    })
}

/// The orbitals to empty for the `count` lowest ion states (one per degenerate set, from
/// the highest occupied down), 0-based, with their labels.
pub fn outer_holes(n: &Neutral, count: usize) -> Vec<(usize, Option<String>)> {
    let wf = &n.state.wavefunction;
    let n_occ = wf.n_beta();
    let labels = orbital_labels(n);
    let mut out: Vec<(usize, Option<String>)> = Vec::new();
    let mut last: Option<f64> = None;
    for mo in (0..n_occ).rev() {
        let e = wf.eps_alpha[mo];
        if last.is_some_and(|l| (l - e).abs() < DEGENERATE_EH) {
            // same set: keep the lowest-index member (the first of the set)
            if let Some(x) = out.last_mut() {
                x.0 = mo;
                x.1 = labels.get(mo).cloned().flatten().or(x.1.clone());
            }
            continue;
        }
        if out.len() == count {
            break;
        }
        out.push((mo, labels.get(mo).cloned().flatten()));
        last = Some(e);
    }
    out
}

fn orbital_labels(n: &Neutral) -> Vec<Option<String>> {
    let st = &n.state;
    let s = crate::integrals::overlap(&st.basis);
    let pg = detect_point_group(&st.molecule, DEFAULT_TOLERANCE);
    let wf = &st.wavefunction;
    let mut out = vec![None; wf.eps_alpha.len()];
    for l in label_orbitals(
        &pg,
        &st.molecule,
        &st.basis,
        &s,
        &wf.c_alpha,
        &wf.eps_alpha,
        1e-5,
    ) {
        if l.mo < out.len() {
            out[l.mo] = l.label;
        }
    }
    out
}

/// One band (hole in the 0-based parent orbital `hole`) from a solved neutral.
pub fn band(
    n: &Neutral,
    hole: usize,
    label: Option<String>,
    opts: &BandOptions,
) -> Result<VibronicBand> {
    band_with_progress(n, hole, label, opts, (0, 1), &mut |_| {})
}

/// `band`, reporting its stages as band `at.0` of `at.1`.
pub fn band_with_progress(
    n: &Neutral,
    hole: usize,
    label: Option<String>,
    opts: &BandOptions,
    at: (usize, usize),
    progress: &mut dyn FnMut(Stage),
) -> Result<VibronicBand> {
    let (bi, bn) = at;
    progress(Stage::IonVertical {
        band: bi,
        bands: bn,
    });
    let spec = StateSpec {
        reference: Reference::Uhf,
        hole: Some(hole),
        ..n.spec.clone()
    };
    spec.validate(&n.state.molecule)?;
    // vertical: the cation at the neutral's minimum
    let vert = spec.solve(&n.state.molecule, None)?;
    if let Some(reason) = vert.hole.as_ref().and_then(hole_lost) {
        return Err(Error::computation(format!(
            "the hole in orbital {} could not be made at the neutral's geometry: {reason}",
            hole + 1
        )));
    }
    let vertical = vert.wavefunction.energy - n.energy;
    let notes = vec![BandNote::HartreeFockEnergies];

    let ion = if opts.linear_coupling_only {
        Err("the linear coupling model was asked for".to_string())
    } else {
        ion_minimum(n, &spec, opts, at, progress)
    };
    progress(Stage::FranckCondon {
        band: bi,
        bands: bn,
    });
    let (prog, dus, model, ion_geometry, ion_modes, ion_pg, el_adiabatic, dzpe) = match ion {
        Ok((ion_state, an, pg)) => {
            let ion_h = harmonic_state(&ion_state.molecule, &an);
            let (dus, _align) = build_duschinsky(&n.harmonic, &ion_h)?;
            let el = ion_state.wavefunction.energy - n.energy;
            let dzpe = ion_h.zero_point_energy() - n.harmonic.zero_point_energy();
            let p = progression(&dus, el + dzpe, &opts.fc)?;
            let defect = dus.orthogonality_defect();
            if defect > MAX_DUSCHINSKY_DEFECT || p.captured_fraction > 1.0 + CAPTURED_EXCESS {
                let reason = format!(
                    "the cation's minimum is too far from the neutral's for the harmonic \
                     Duschinsky model (J deviates from orthogonality by {defect:.2}, lines sum \
                     to {:.2}): a large-amplitude change such as a bent molecule becoming linear",
                    p.captured_fraction
                );
                return linear_coupling_band(n, hole, label, &vert, vertical, notes, reason, opts);
            }
            let modes = an
                .modes
                .iter()
                .map(|m| (m.wavenumber_cm1, m.irrep.clone()))
                .collect();
            (
                p,
                dus,
                BandModel::Duschinsky,
                ion_state.molecule.clone(),
                modes,
                Some(pg),
                el,
                dzpe,
            )
        }
        Err(reason) => {
            return linear_coupling_band(n, hole, label, &vert, vertical, notes, reason, opts);
        }
    };
    Ok(thermal_or_none(
        assemble(
            n,
            hole,
            label,
            prog,
            &dus,
            model,
            ion_geometry,
            ion_modes,
            ion_pg,
            el_adiabatic,
            dzpe,
            vertical,
            notes,
        ),
        opts,
    ))
}

/// The band in the vertical-gradient model (the cation's gradient at the neutral's minimum,
/// the neutral's modes), with the reason the full model was not used.
#[allow(clippy::too_many_arguments)]
fn linear_coupling_band(
    n: &Neutral,
    hole: usize,
    label: Option<String>,
    vert: &SolvedState,
    vertical: f64,
    mut notes: Vec<BandNote>,
    reason: String,
    opts: &BandOptions,
) -> Result<VibronicBand> {
    notes.push(BandNote::LinearCouplingFallback { reason });
    let g = scf_gradient(
        &vert.molecule,
        &vert.basis,
        &vert.wavefunction,
        &GradientOptions::default(),
    )?;
    let flat: Vec<f64> = g.total.iter().flatten().copied().collect();
    let gq = project_gradient(&n.harmonic, &flat)?;
    let lc = linear_coupling(&n.harmonic.frequencies, &gq)?;
    let el = vertical - lc.relaxation_energy;
    let p = progression(&lc.duschinsky, el, &opts.fc)?;
    // the model's ion minimum: x = x0 − M^{-1/2} L K
    let mut mol = n.state.molecule.clone();
    for (k, l) in n.harmonic.modes.iter().enumerate() {
        for (x, lx) in l.iter().enumerate() {
            mol.atoms[x / 3].position[x % 3] -=
                lx * lc.duschinsky.k[k] / n.harmonic.masses[x / 3].sqrt();
        }
    }
    let modes = n
        .analysis
        .modes
        .iter()
        .map(|m| (m.wavenumber_cm1, m.irrep.clone()))
        .collect();
    Ok(thermal_or_none(
        assemble(
            n,
            hole,
            label,
            p,
            &lc.duschinsky,
            BandModel::LinearCoupling,
            mol,
            modes,
            None,
            el,
            0.0,
            vertical,
            notes,
        ),
        opts,
    ))
}

/// Optimise the cation from the neutral's minimum and take its harmonic analysis; Err with a
/// reason when that cannot be done (the caller falls back to linear coupling).
fn ion_minimum(
    n: &Neutral,
    spec: &StateSpec,
    opts: &BandOptions,
    (band, bands): (usize, usize),
    progress: &mut dyn FnMut(Stage),
) -> std::result::Result<(SolvedState, HarmonicAnalysis, String), String> {
    let opt = optimize(&n.state.molecule, spec, &opts.optimize, &mut |st| {
        progress(Stage::IonOptimisation {
            band,
            bands,
            step: st.iteration,
        })
    })
    .map_err(|e| format!("optimisation failed: {e}"))?;
    if !opt.converged {
        return Err(format!(
            "optimisation did not converge{}",
            opt.stalled.map(|s| format!(": {s}")).unwrap_or_default()
        ));
    }
    if let Some(reason) = opt.state.hole.as_ref().and_then(hole_lost) {
        return Err(format!("the hole was lost: {reason}"));
    }
    let (an, pg) = hessian_analysis(&opt.state, spec, &mut |done, total| {
        progress(Stage::IonHessian {
            band,
            bands,
            done,
            total,
        })
    })
    .map_err(|e| format!("ion Hessian: {e}"))?;
    if an.n_imaginary > 0 {
        return Err(format!(
            "the cation's optimised structure has {} imaginary mode(s)",
            an.n_imaginary
        ));
    }
    if an.modes.len() != n.analysis.modes.len() {
        return Err(format!(
            "the cation has {} modes, the neutral {} (linearity changed)",
            an.modes.len(),
            n.analysis.modes.len()
        ));
    }
    Ok((opt.state, an, pg))
}

#[allow(clippy::too_many_arguments)]
fn assemble(
    n: &Neutral,
    hole: usize,
    label: Option<String>,
    p: Progression,
    dus: &super::duschinsky::Duschinsky,
    model: BandModel,
    ion_geometry: Molecule,
    ion_modes: Vec<(f64, String)>,
    ion_pg: Option<String>,
    el_adiabatic: f64,
    dzpe: f64,
    vertical: f64,
    mut notes: Vec<BandNote>,
) -> VibronicBand {
    let shape = band_shape(&p, dus, PROGRESSION_MEAN_QUANTA);
    let total: f64 = p
        .lines
        .iter()
        .map(|l| l.intensity)
        .sum::<f64>()
        .max(f64::MIN_POSITIVE);
    let mean_total_quanta = p
        .lines
        .iter()
        .map(|l| l.intensity * l.quanta.iter().map(|q| q.1 as f64).sum::<f64>())
        .sum::<f64>()
        / total;
    let progression_modes = shape
        .progression_modes
        .iter()
        .map(|m| BandMode {
            mode: m.mode + 1,
            wavenumber_cm1: m.frequency * HARTREE_TO_WAVENUMBER,
            irrep: ion_modes
                .get(m.mode)
                .map(|x| x.1.clone())
                .unwrap_or_default(),
            quanta_at_maximum: m.quanta_at_maximum,
            mean_quanta: m.mean_quanta,
        })
        .collect();
    let mut lines: Vec<BandLine> = p
        .lines
        .iter()
        .map(|l| BandLine {
            energy_ev: l.energy * HARTREE_TO_EV,
            intensity: l.intensity,
            quanta: l
                .quanta
                .iter()
                .filter(|q| q.1 > 0)
                .map(|q| ModeQuanta {
                    mode: q.0 + 1,
                    quanta: q.1,
                })
                .collect(),
            neutral_quanta: l
                .initial_quanta
                .iter()
                .filter(|q| q.1 > 0)
                .map(|q| ModeQuanta {
                    mode: q.0 + 1,
                    quanta: q.1,
                })
                .collect(),
        })
        .collect();
    lines.sort_by(|a, b| a.energy_ev.total_cmp(&b.energy_ev));
    let bond_changes = bonded_pairs(&n.state.molecule)
        .into_iter()
        .map(|(a, b)| {
            let r0 = distance(
                &n.state.molecule.atoms[a].position,
                &n.state.molecule.atoms[b].position,
            ) * BOHR_TO_ANGSTROM;
            let r1 = distance(
                &ion_geometry.atoms[a].position,
                &ion_geometry.atoms[b].position,
            ) * BOHR_TO_ANGSTROM;
            BondChange {
                atoms: [a + 1, b + 1],
                symbols: [
                    n.state.molecule.atoms[a].symbol().to_string(),
                    n.state.molecule.atoms[b].symbol().to_string(),
                ],
                neutral_angstrom: r0,
                ion_angstrom: r1,
                change_angstrom: r1 - r0,
            }
        })
        .collect();
    if p.captured_fraction < CAPTURED_TARGET {
        notes.push(BandNote::Incomplete {
            captured: p.captured_fraction,
        });
    }
    notes.extend(
        p.notes
            .iter()
            .filter(|x| !matches!(x, VibronicNote::TargetNotReached { .. }))
            .cloned()
            .map(BandNote::Engine),
    );
    let wf = &n.state.wavefunction;
    let degeneracy = (0..wf.n_beta())
        .filter(|&m| (wf.eps_alpha[m] - wf.eps_alpha[hole]).abs() < DEGENERATE_EH)
        .count()
        .max(1);
    VibronicBand {
        orbital: hole + 1,
        label,
        degeneracy,
        model,
        electronic_method: "HF ΔSCF".to_string(),
        composite: None,
        adiabatic_ev: p.adiabatic * HARTREE_TO_EV,
        electronic_adiabatic_ev: el_adiabatic * HARTREE_TO_EV,
        zero_point_change_ev: dzpe * HARTREE_TO_EV,
        vertical_ev: vertical * HARTREE_TO_EV,
        maximum_ev: shape.maximum * HARTREE_TO_EV,
        mean_ev: shape.mean_of_lines * HARTREE_TO_EV,
        mean_total_quanta,
        captured_fraction: p.captured_fraction,
        // kept only for a thermal run (`thermal_or_none`)
        thermal_population: Some(p.initial_population),
        progression_modes,
        ion_modes,
        bond_changes,
        ion_point_group: ion_pg,
        lines,
        notes,
    }
}

/// The `count` lowest bands of `mol` (closed-shell neutral) in `basis`.
pub fn vibronic_bands(
    mol: &Molecule,
    basis: &str,
    count: usize,
    opts: &BandOptions,
) -> Result<(Neutral, Vec<VibronicBand>)> {
    vibronic_bands_with_progress(mol, basis, count, opts, &mut |_| {})
}

/// `vibronic_bands`, reporting every stage (`plan::Stage`) as it starts or advances.
pub fn vibronic_bands_with_progress(
    mol: &Molecule,
    basis: &str,
    count: usize,
    opts: &BandOptions,
    progress: &mut dyn FnMut(Stage),
) -> Result<(Neutral, Vec<VibronicBand>)> {
    let n = neutral_with_progress(mol, basis, opts, progress)?;
    let holes = outer_holes(&n, count);
    let total = holes.len();
    let mut bands = Vec::with_capacity(total);
    for (k, (h, label)) in holes.into_iter().enumerate() {
        bands.push(band_with_progress(
            &n,
            h,
            label,
            opts,
            (k, total),
            progress,
        )?);
    }
    Ok((n, bands))
}

/// One band: the hole in the 0-based parent orbital `hole` of `mol`'s RHF ground state.
pub fn vibronic_band(
    mol: &Molecule,
    basis: &str,
    hole: usize,
    opts: &BandOptions,
) -> Result<VibronicBand> {
    let n = neutral(mol, basis, opts)?;
    let label = orbital_labels(&n).get(hole).cloned().flatten();
    band(&n, hole, label, opts)
}

/// The 0-based occupied orbital of the neutral labelled `label` ("1b1", "3σg"; the first of
/// a degenerate set), if any.
pub fn hole_by_label(n: &Neutral, label: &str) -> Option<usize> {
    let n_occ = n.state.wavefunction.n_beta();
    orbital_labels(n)
        .iter()
        .enumerate()
        .take(n_occ)
        .find(|(_, l)| l.as_deref().map(|x| x.eq_ignore_ascii_case(label)) == Some(true))
        .map(|(mo, _)| mo)
}

/// The neutral's occupied-orbital labels (index = MO).
pub fn occupied_labels(n: &Neutral) -> Vec<Option<String>> {
    let n_occ = n.state.wavefunction.n_beta();
    let mut l = orbital_labels(n);
    l.truncate(n_occ);
    l
}
