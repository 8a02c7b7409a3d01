//! `bandcast optimize`: a minimum-energy structure of a molecule or of one of its ion
//! states; prints the steps, the final structure and forces; writes the XYZ.

use std::io::IsTerminal;
use std::path::PathBuf;

use bandcast::geometry::{optimize, OptStep, OptimizeOptions};
use bandcast::report::write_atomic;
use bandcast::units::ANGSTROM_TO_BOHR;
use bandcast::{Error, Result};

use super::geometry_common::{xyz_text, GeometryStateArgs};

/// Minimum-energy structure (Hartree–Fock) of a molecule or of an ion state.
///
/// Quasi-Newton (BFGS) steps in Cartesian coordinates from the Lindh model Hessian, with
/// analytic gradients; the point group of the start is kept. Converged when the largest
/// force component is below 4.5e-4 Eh/bohr, the RMS force below 3.0e-4, the largest step
/// component below 1.8e-3 bohr and the RMS step below 1.2e-3 (common-practice thresholds).
///
/// With --hole the structure is that of the cation with one electron missing from the
/// named orbital (a UHF state held by the maximum overlap method). If the hole moves to
/// another orbital on the way, the run stops with status 1 instead of optimising another
/// state.
///
/// Examples:
///
///   bandcast optimize water.xyz --basis 6-31G* --out water-opt.xyz
///
///   bandcast optimize water.xyz --basis 6-31G* --hole 1b1 --json
///
/// A run that does not converge exits with status 1, says where it stalled and writes no
/// file; bad input exits with 2. Hartree–Fock bond lengths are typically 0.01–0.03 Å short
/// of experiment: use the structure as a starting point, not as a measured one.
#[derive(clap::Args, Debug)]
#[command(verbatim_doc_comment)]
pub struct Args {
    #[command(flatten)]
    pub state: GeometryStateArgs,
    /// Where to write the optimised structure (XYZ, Å). Default: FILE-opt.xyz beside the input.
    #[arg(long, value_name = "OPT.xyz")]
    pub out: Option<PathBuf>,
    /// Do not impose the point group of the start. Use it when the symmetric structure of
    /// an ion is a saddle point (`bandcast vibrations` shows an imaginary mode, e.g. the
    /// ethylene cation): give a start slightly distorted along that mode, since an exactly
    /// symmetric start has a symmetric gradient and stays symmetric.
    #[arg(long)]
    pub no_symmetry: bool,
    /// Memory budget in GiB (SCF, gradient and the quasi-Newton Hessian); a run that cannot
    /// fit is refused before any work; what is left goes to stored integrals (default: half
    /// of the machine's memory, at most three quarters of what is available).
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Memory estimate before any work and each step (energy, largest force) on stderr.
    #[arg(long)]
    pub verbose: bool,
    /// Print JSON instead of text.
    #[arg(long)]
    pub json: bool,
}

#[derive(serde::Serialize)]
struct JsonOut<'a> {
    molecule: &'a str,
    basis: &'a str,
    converged: bool,
    energy_hartree: f64,
    point_group: &'a str,
    gradients: usize,
    steps: &'a [OptStep],
    /// Å.
    positions_angstrom: Vec<[f64; 3]>,
    symbols: Vec<&'static str>,
    /// Eh/bohr (forces = −gradient).
    forces_hartree_per_bohr: Vec<[f64; 3]>,
    hole_orbital: Option<usize>,
    output: String,
}

pub fn run(a: Args) -> Result<()> {
    let budget_bytes = super::common::memory_gib_to_bytes(a.memory)?;
    let (mol, mut spec) = a.state.state()?;
    // memory before any work: one SCF and gradient working set (the estimate of the
    // harmonic analysis for one displacement) plus the quasi-Newton Hessian and its update
    let n_basis = bandcast::basis::load(&spec.basis, &spec.molecule_at(&mol)?, None)?.n_basis;
    let n3 = 3 * mol.atoms.len();
    let fitted = spec.gradient_bytes(&mol)?;
    let per_gradient =
        bandcast::vibrations::hessian_estimate(mol.atoms.len(), n_basis, 1, 0.0, fitted)
            .per_gradient_bytes;
    let minimum = per_gradient + 8.0 * (3 * n3 * n3) as f64;
    let budget = budget_bytes.unwrap_or_else(bandcast::system::default_memory_budget) as f64;
    if a.verbose {
        eprintln!(
            "{}: memory estimate before any work (budget {}): {n_basis} basis functions; SCF \
             and gradient working set {} (density-fitted gradient arrays {}), quasi-Newton \
             Hessian {}; stored integrals use what is left when they fit",
            mol.name,
            bandcast::system::format_gib(budget),
            bandcast::system::format_gib(per_gradient),
            bandcast::system::format_gib(fitted),
            bandcast::system::format_gib(8.0 * (3 * n3 * n3) as f64),
        );
    }
    if minimum > budget {
        return Err(Error::TooLarge(format!(
            "{}: an optimisation needs at least {} for {n_basis} basis functions, more than \
             the memory budget of {}; a smaller basis needs less",
            mol.name,
            bandcast::system::format_gib(minimum),
            bandcast::system::format_gib(budget)
        )));
    }
    spec.scf.memory_budget_bytes = (budget - minimum) as usize;
    let verbose = a.verbose;
    let out = a.out.clone().unwrap_or_else(|| {
        let f = &a.state.molecule.file;
        let stem = f
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default();
        f.with_file_name(format!("{stem}-opt.xyz"))
    });
    let bar = std::io::stderr().is_terminal().then(|| {
        let b = indicatif::ProgressBar::new_spinner();
        b.enable_steady_tick(std::time::Duration::from_millis(200));
        b.set_message("first energy and gradient");
        b
    });
    let mut progress = |s: &OptStep| {
        if verbose {
            eprintln!(
                "step {}: E = {:.10} Eh, largest force {:.2e} Eh/bohr",
                s.iteration, s.energy, s.max_force
            );
        }
        if let Some(b) = &bar {
            b.set_message(format!(
                "step {} E = {:.8} Eh, largest force {:.1e} Eh/bohr",
                s.iteration, s.energy, s.max_force
            ));
        }
    };
    let opts = OptimizeOptions {
        keep_symmetry: !a.no_symmetry,
        ..OptimizeOptions::default()
    };
    let res = optimize(&mol, &spec, &opts, &mut progress);
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let r = res?;
    let name = mol.name.clone();
    if !r.converged {
        let mut msg = r.stalled.clone().unwrap_or_default();
        msg.push_str(&format!(
            "\nlast structure (Å), not written:\n{}",
            xyz_text(&r.molecule, &name)
        ));
        return Err(Error::computation(msg));
    }
    let comment = format!(
        "{name} optimised, HF/{} E = {:.10} Eh, {}",
        spec.basis, r.energy, r.point_group
    );
    write_atomic(&out, xyz_text(&r.molecule, &comment).as_bytes())?;
    let forces: Vec<[f64; 3]> = r.gradient.iter().map(|g| g.map(|x| -x)).collect();
    if a.json {
        let j = JsonOut {
            molecule: &name,
            basis: &spec.basis,
            converged: r.converged,
            energy_hartree: r.energy,
            point_group: &r.point_group,
            gradients: r.n_gradients,
            steps: &r.steps,
            positions_angstrom: r
                .molecule
                .atoms
                .iter()
                .map(|x| x.position.map(|v| v / ANGSTROM_TO_BOHR))
                .collect(),
            symbols: r.molecule.atoms.iter().map(|x| x.symbol()).collect(),
            forces_hartree_per_bohr: forces,
            hole_orbital: spec.hole.map(|h| h + 1),
            output: out.display().to_string(),
        };
        super::output::emit_json(
            &serde_json::to_string_pretty(&j).map_err(|e| Error::computation(e.to_string()))?,
        );
        return Ok(());
    }
    println!(
        "{name}: HF/{} structure, point group {}",
        spec.basis, r.point_group
    );
    if let Some(h) = spec.hole {
        println!(
            "state: cation with a hole in orbital {} (held by MOM)",
            h + 1
        );
    }
    println!();
    println!(" step      energy (Eh)      ΔE (Eh)   max force   RMS force    max step");
    let mut prev = None;
    for s in &r.steps {
        let de = prev
            .map(|p: f64| format!("{:+.2e}", s.energy - p))
            .unwrap_or_else(|| "".into());
        println!(
            "{:5} {:16.10} {:>12} {:11.2e} {:11.2e} {:11.2e}",
            s.iteration, s.energy, de, s.max_force, s.rms_force, s.max_step
        );
        prev = Some(s.energy);
    }
    println!();
    println!(
        "converged after {} gradients: E = {:.10} Eh",
        r.n_gradients, r.energy
    );
    println!();
    println!("atom        x (Å)        y (Å)        z (Å)    Fx (Eh/bohr)   Fy          Fz");
    for (i, (at, f)) in r.molecule.atoms.iter().zip(&forces).enumerate() {
        let p = at.position.map(|v| v / ANGSTROM_TO_BOHR);
        println!(
            "{:<2}{:<3} {:12.6} {:12.6} {:12.6} {:12.2e} {:11.2e} {:11.2e}",
            at.symbol(),
            i + 1,
            p[0],
            p[1],
            p[2],
            f[0],
            f[1],
            f[2]
        );
    }
    println!();
    println!("written: {}", out.display());
    Ok(())
}
