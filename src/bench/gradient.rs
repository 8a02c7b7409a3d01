//! The `gradient` workload of `bandcast bench`: the CPU cost of one analytic RHF gradient
//! against the SCF it differentiates (same molecule, basis and thread pool), and the wall
//! and CPU time of a full harmonic analysis (6N gradients by central differences).
//! Speed is measured here, never in tests.
//!
//! Cases: benzene/def2-TZVPP gradient (the target: at most 2× the SCF on 2 cores)
//! and benzene/cc-pVDZ harmonic analysis (12 atoms, 72 gradients; target under 10 minutes
//! on 2 cores); `small`: water/cc-pVTZ gradient and water/cc-pVDZ harmonic analysis.
//! Structures are the GW100 files (not optimised: the timing does not depend on it).

use std::path::Path;
use std::time::Instant;

use crate::analysis::symmetry::{detect_point_group, DEFAULT_TOLERANCE};
use crate::basis;
use crate::chem::xyz::{read_xyz, LengthUnit};
use crate::error::Result;
use crate::geometry::StateSpec;
use crate::gradient::{net_force, scf_gradient, GradientOptions};
use crate::scf::{self, Reference, ScfOptions};
use crate::system::{peak_memory_mib, process_cpu_seconds, reset_peak_memory};
use crate::vibrations::{harmonic_analysis, hessian_by_gradients};

/// One gradient case: SCF then gradient.
#[derive(Debug, Clone, serde::Serialize)]
pub struct GradientCase {
    pub molecule: String,
    pub basis: String,
    pub n_basis: usize,
    pub threads: usize,
    pub energy: f64,
    pub scf_iterations: usize,
    /// The SCF's Fock builder (default options), as the SCF describes it.
    pub scf_builder: String,
    pub scf_seconds: f64,
    pub scf_cpu_seconds: Option<f64>,
    pub gradient_seconds: f64,
    pub gradient_cpu_seconds: Option<f64>,
    /// Gradient CPU seconds over SCF CPU seconds (wall ratio when CPU time is unreadable).
    pub ratio: f64,
    /// Wall seconds per part of the gradient.
    pub gradient_parts: Vec<(String, f64)>,
    /// Largest |component| of the gradient and of the net force (exact condition: 0).
    pub largest_gradient: f64,
    pub net_force: f64,
    pub peak_mib: Option<f64>,
}

/// One harmonic-analysis case.
#[derive(Debug, Clone, serde::Serialize)]
pub struct HarmonicCase {
    pub molecule: String,
    pub basis: String,
    pub n_atoms: usize,
    pub n_basis: usize,
    pub threads: usize,
    pub gradients: usize,
    pub seconds: f64,
    pub cpu_seconds: Option<f64>,
    pub lowest_cm1: f64,
    pub highest_cm1: f64,
    pub peak_mib: Option<f64>,
}

fn cpu_since(c0: Option<f64>) -> Option<f64> {
    match (c0, process_cpu_seconds()) {
        (Some(a), Some(b)) => Some(b - a),
        _ => None,
    }
}

/// SCF (default options) then the analytic gradient of `molecule` in `basis_name`.
pub fn gradient_case(dir: &Path, molecule: &str, basis_name: &str) -> Result<GradientCase> {
    let mol = read_xyz(&dir.join(format!("{molecule}.xyz")), LengthUnit::Angstrom)?;
    let b = basis::load(basis_name, &mol, None)?;
    let can_reset = reset_peak_memory();
    let opts = ScfOptions::default();
    let (t0, c0) = (Instant::now(), process_cpu_seconds());
    let mut ctx = scf::ScfContext::new(&mol, &b, opts.lindep_threshold)?;
    let wf = ctx.run(&mol, &opts, &mut |_| {})?;
    let (scf_seconds, scf_cpu) = (t0.elapsed().as_secs_f64(), cpu_since(c0));
    let (t1, c1) = (Instant::now(), process_cpu_seconds());
    let g = scf_gradient(&mol, &b, &wf, &GradientOptions::default())?;
    let (gradient_seconds, gradient_cpu) = (t1.elapsed().as_secs_f64(), cpu_since(c1));
    let ratio = match (gradient_cpu, scf_cpu) {
        (Some(g), Some(s)) if s > 0.0 => g / s,
        _ => gradient_seconds / scf_seconds.max(1e-9),
    };
    let nf = net_force(&g.total);
    Ok(GradientCase {
        molecule: molecule.into(),
        basis: basis_name.into(),
        n_basis: b.n_basis,
        threads: rayon::current_num_threads(),
        energy: wf.energy,
        scf_iterations: wf.iterations,
        scf_builder: ctx.last_run.builder.clone(),
        scf_seconds,
        scf_cpu_seconds: scf_cpu,
        gradient_seconds,
        gradient_cpu_seconds: gradient_cpu,
        ratio,
        gradient_parts: g.timings.clone(),
        largest_gradient: crate::gradient::scf::max_abs(&g.total),
        net_force: nf.iter().fold(0.0f64, |m, x| m.max(x.abs())),
        peak_mib: if can_reset { peak_memory_mib() } else { None },
    })
}

/// Full harmonic analysis (RHF ground state) of `molecule` in `basis_name`.
pub fn harmonic_case(dir: &Path, molecule: &str, basis_name: &str) -> Result<HarmonicCase> {
    let mol = read_xyz(&dir.join(format!("{molecule}.xyz")), LengthUnit::Angstrom)?;
    let can_reset = reset_peak_memory();
    let spec = StateSpec {
        basis: basis_name.into(),
        charge: mol.charge,
        multiplicity: mol.multiplicity,
        reference: Reference::Rhf,
        hole: None,
        scf: ScfOptions::default(),
    };
    let (t0, c0) = (Instant::now(), process_cpu_seconds());
    let st = spec.solve(&mol, None)?;
    let mut count = 0;
    let h = hessian_by_gradients(&st, &spec, &mut |done, _| count = done)?;
    let pg = detect_point_group(&st.molecule, DEFAULT_TOLERANCE);
    let an = harmonic_analysis(&st.molecule, &h, Some(&pg));
    let seconds = t0.elapsed().as_secs_f64();
    let w: Vec<f64> = an.modes.iter().map(|m| m.wavenumber_cm1).collect();
    Ok(HarmonicCase {
        molecule: molecule.into(),
        basis: basis_name.into(),
        n_atoms: mol.atoms.len(),
        n_basis: st.basis.n_basis,
        threads: rayon::current_num_threads(),
        gradients: count,
        seconds,
        cpu_seconds: cpu_since(c0),
        lowest_cm1: w.iter().cloned().fold(f64::INFINITY, f64::min),
        highest_cm1: w.iter().cloned().fold(f64::NEG_INFINITY, f64::max),
        peak_mib: if can_reset { peak_memory_mib() } else { None },
    })
}

/// The cases (module docs): (gradient cases, harmonic cases) as (molecule, basis).
pub fn cases(
    small: bool,
) -> (
    Vec<(&'static str, &'static str)>,
    Vec<(&'static str, &'static str)>,
) {
    if small {
        (vec![("water", "cc-pVTZ")], vec![("water", "cc-pVDZ")])
    } else {
        (
            vec![("water", "cc-pVTZ"), ("benzene", "def2-TZVPP")],
            vec![("benzene", "cc-pVDZ")],
        )
    }
}

/// One text line for a gradient case.
pub fn format_gradient(r: &GradientCase) -> String {
    let parts: Vec<String> = r
        .gradient_parts
        .iter()
        .map(|(n, s)| format!("{n} {s:.2}"))
        .collect();
    format!(
        "gradient {:<8} {:<11} {:>4} fn  SCF {:>7.2} s / {:>7.1} CPU-s ({} it, {})\n  \
         gradient {:>7.2} s / {:>7.1} CPU-s on {} threads  ratio {:.2}  (parts, wall s: {})\n  \
         E = {:.8}  max|g| {:.2e}  net force {:.1e}  peak {}",
        r.molecule,
        r.basis,
        r.n_basis,
        r.scf_seconds,
        r.scf_cpu_seconds.unwrap_or(f64::NAN),
        r.scf_iterations,
        r.scf_builder,
        r.gradient_seconds,
        r.gradient_cpu_seconds.unwrap_or(f64::NAN),
        r.threads,
        r.ratio,
        parts.join(", "),
        r.energy,
        r.largest_gradient,
        r.net_force,
        r.peak_mib
            .map_or("not readable".into(), |p| format!("{p:.0} MiB")),
    )
}

/// One text line for a harmonic case.
pub fn format_harmonic(r: &HarmonicCase) -> String {
    format!(
        "harmonic {:<8} {:<11} {:>2} atoms {:>4} fn  {} gradients  {:>8.1} s / {:>8.1} CPU-s on {} threads  \
         wavenumbers {:.0}…{:.0} cm⁻¹  peak {}",
        r.molecule,
        r.basis,
        r.n_atoms,
        r.n_basis,
        r.gradients,
        r.seconds,
        r.cpu_seconds.unwrap_or(f64::NAN),
        r.threads,
        r.lowest_cm1,
        r.highest_cm1,
        r.peak_mib
            .map_or("not readable".into(), |p| format!("{p:.0} MiB")),
    )
}
