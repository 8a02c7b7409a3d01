//! `bandcast vibrations`: harmonic wavenumbers, normal modes and zero-point energy at the
//! geometry given.

use std::io::IsTerminal;

use bandcast::analysis::symmetry::symmetrize::{symmetrize, MOVED_BOHR};
use bandcast::analysis::symmetry::{detect_point_group, DEFAULT_TOLERANCE};
use bandcast::gradient::GradientOptions;
use bandcast::system::format_bytes;
use bandcast::units::BOHR_TO_ANGSTROM;
use bandcast::vibrations::{
    harmonic_analysis, hessian_by_gradients_with, hessian_estimate, Mode, HESSIAN_STEP,
};
use bandcast::{Error, Result};

use super::geometry_common::GeometryStateArgs;

/// Largest gradient component (Eh/bohr) above which the geometry is called not stationary.
const STATIONARY_GRADIENT: f64 = 1e-3;

/// Harmonic vibrational analysis (Hartree–Fock) at the geometry given.
///
/// The Hessian comes from central differences (±0.005 bohr) of analytic gradients, 6N
/// gradients in all; rigid translations and rotations are projected out and the masses are
/// those of the most abundant isotopes. Prints harmonic wavenumbers (cm⁻¹; imaginary ones
/// as negative numbers), the irrep of each mode, the normal-mode displacements and the
/// zero-point energy.
///
/// Run it on an optimised structure (`bandcast optimize`): away from a stationary point
/// the numbers have no meaning, and the command says so. Hartree–Fock harmonic wavenumbers
/// are typically 10 % above measured fundamentals; the common scale factor for
/// HF/6-31G* is 0.8953 (Scott & Radom 1996). The numbers guide an assignment; they are not
/// measurements.
///
/// Examples:
///
///   bandcast vibrations water-opt.xyz --basis 6-31G*
///
///   bandcast vibrations ion.xyz --basis 6-31G* --hole 1b1 --json
#[derive(clap::Args, Debug)]
#[command(verbatim_doc_comment)]
pub struct Args {
    #[command(flatten)]
    pub state: GeometryStateArgs,
    /// Memory in GiB for the whole run (default: the SCF's usual budget). The displaced
    /// gradients run as many at a time as fit (at most one per thread) and share it; the
    /// run is refused before any work when even one does not fit.
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// On stderr: the memory and time estimates, and the stage timings.
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
    point_group: &'a str,
    energy_hartree: f64,
    largest_gradient_hartree_per_bohr: f64,
    frequencies_cm1: Vec<f64>,
    modes: &'a [Mode],
    zero_point_ev: f64,
    imaginary: bool,
    /// Largest displacement (Å) made to symmetrise the input within the detection
    /// tolerance; null when no atom moved.
    symmetrised_displacement_angstrom: Option<f64>,
}

pub fn run(a: Args) -> Result<()> {
    if let Some(m) = a.memory {
        if !(m.is_finite() && m > 0.0) {
            return Err(Error::input(format!(
                "--memory {m}: the budget must be a positive number of GiB"
            )));
        }
    }
    let (mol, mut spec) = a.state.state()?;
    // A structure symmetric within the tolerance `core` and `ionize` use is made exactly
    // symmetric, so the modes carry clean irreps and equivalent displacements agree.
    let (mol, symmetrised) = {
        let (sym, disp, group) = symmetrize(&mol, DEFAULT_TOLERANCE);
        if disp > MOVED_BOHR {
            eprintln!(
                "note: symmetrised to {} (tolerance {DEFAULT_TOLERANCE} bohr): largest \
                 displacement {:.1e} Å",
                group.name,
                disp * BOHR_TO_ANGSTROM
            );
            (sym, Some(disp * BOHR_TO_ANGSTROM))
        } else {
            (mol, None)
        }
    };
    // memory before any work: Hessian plus the working set of each displaced gradient
    let n_basis = bandcast::basis::load(&spec.basis, &spec.molecule_at(&mol)?, None)?.n_basis;
    let threads = rayon::current_num_threads();
    let mut concurrency = threads;
    let fitted = spec.gradient_bytes(&mol)?;
    let fitted_note = if fitted > 0.0 {
        format!(
            ", of which the density-fitted gradient's arrays {}",
            format_bytes(fitted)
        )
    } else {
        String::new()
    };
    let mut est = hessian_estimate(mol.atoms.len(), n_basis, concurrency, 0.0, fitted);
    if let Some(gib) = a.memory {
        let budget = gib * (1u64 << 30) as f64;
        while concurrency > 1 && est.minimum_bytes > budget {
            concurrency -= 1;
            est = hessian_estimate(mol.atoms.len(), n_basis, concurrency, 0.0, fitted);
        }
        if est.minimum_bytes > budget {
            return Err(Error::input(format!(
                "--memory {gib} GiB is too small for this harmonic analysis: it needs at least \
                 {} (Hessian and gradients {}, one displaced SCF and gradient {} for {n_basis} \
                 basis functions{fitted_note})",
                format_bytes(est.minimum_bytes),
                format_bytes(est.hessian_bytes),
                format_bytes(est.per_gradient_bytes)
            )));
        }
        // what is left goes to stored integrals, shared by the SCFs running at once
        spec.scf.memory_budget_bytes = (budget - est.minimum_bytes) as usize;
    }
    if a.verbose {
        eprintln!(
            "estimate: {n_basis} basis functions, {} gradients, {concurrency} at a time; memory \
             at least {} (Hessian and gradients {}, {} per displaced SCF and gradient{fitted_note}) \
             plus stored integrals up to {}",
            est.gradients,
            format_bytes(est.minimum_bytes),
            format_bytes(est.hessian_bytes),
            format_bytes(est.per_gradient_bytes),
            format_bytes(spec.scf.memory_budget_bytes as f64)
        );
    }
    let clock = std::time::Instant::now();
    let st = spec.solve(&mol, None)?;
    if let Some(reason) = st
        .hole
        .as_ref()
        .and_then(bandcast::geometry::state::hole_lost)
    {
        return Err(Error::computation(format!(
            "the hole state could not be made: {reason}"
        )));
    }
    let g = st.gradient(&spec, &GradientOptions::default())?;
    let gmax = g.iter().flatten().fold(0.0f64, |m, x| m.max(x.abs()));
    let total = 6 * mol.atoms.len();
    let reference_seconds = clock.elapsed().as_secs_f64();
    if a.verbose {
        let e = hessian_estimate(
            mol.atoms.len(),
            n_basis,
            concurrency,
            reference_seconds,
            fitted,
        );
        eprintln!(
            "reference SCF and gradient: {reference_seconds:.2} s; Hessian: about {:.0} s wall \
             ({} gradients, {concurrency} at a time; displaced SCFs start from the reference \
             orbitals, so usually less)",
            e.seconds, e.gradients
        );
    }
    let bar = std::io::stderr().is_terminal().then(|| {
        let b = indicatif::ProgressBar::new(total as u64);
        b.set_style(
            indicatif::ProgressStyle::with_template(
                "Hessian [{bar:30}] {pos}/{len} gradients, {eta} left",
            )
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        b
    });
    let clock = std::time::Instant::now();
    let h = hessian_by_gradients_with(&st, &spec, concurrency, &mut |done, _| {
        if let Some(b) = &bar {
            b.set_position(done as u64);
        }
    });
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let h = h?;
    if a.verbose {
        eprintln!(
            "Hessian: {total} gradients in {:.2} s wall",
            clock.elapsed().as_secs_f64()
        );
    }
    let pg = detect_point_group(&st.molecule, DEFAULT_TOLERANCE);
    let an = harmonic_analysis(&st.molecule, &h, Some(&pg));
    let name = mol.name.clone();
    if a.json {
        let j = JsonOut {
            molecule: &name,
            basis: &spec.basis,
            point_group: &pg.name,
            energy_hartree: st.wavefunction.energy,
            largest_gradient_hartree_per_bohr: gmax,
            frequencies_cm1: an.modes.iter().map(|m| m.wavenumber_cm1).collect(),
            modes: &an.modes,
            zero_point_ev: an.zero_point_ev,
            imaginary: an.n_imaginary > 0,
            symmetrised_displacement_angstrom: symmetrised,
        };
        super::output::emit_json(
            &serde_json::to_string_pretty(&j).map_err(|e| Error::computation(e.to_string()))?,
        );
    } else {
        println!(
            "{name}: HF/{} harmonic analysis, point group {}, {} gradients (±{HESSIAN_STEP} bohr)",
            spec.basis, pg.name, total
        );
        println!();
        println!(" mode   irrep   wavenumber (cm⁻¹)");
        for (i, m) in an.modes.iter().enumerate() {
            let w = if m.wavenumber_cm1 < 0.0 {
                format!("{:.1}i", -m.wavenumber_cm1)
            } else {
                format!("{:.1}", m.wavenumber_cm1)
            };
            println!("{:5}   {:<6} {:>14}", i + 1, m.irrep, w);
        }
        println!();
        println!(
            "zero-point energy: {:.4} eV (harmonic, unscaled)",
            an.zero_point_ev
        );
        println!();
        println!("normal modes (Cartesian displacements, unit length):");
        for (i, m) in an.modes.iter().enumerate() {
            println!(
                "  mode {} ({:.1} cm⁻¹, {})",
                i + 1,
                m.wavenumber_cm1,
                m.irrep
            );
            for (at, d) in st.molecule.atoms.iter().zip(&m.displacement) {
                println!(
                    "    {:<2} {:9.5} {:9.5} {:9.5}",
                    at.symbol(),
                    d[0],
                    d[1],
                    d[2]
                );
            }
        }
    }
    if gmax > STATIONARY_GRADIENT {
        eprintln!(
            "warning: the largest gradient component is {gmax:.1e} Eh/bohr: this is not a \
             stationary point and the wavenumbers have no meaning; optimise the structure first"
        );
    }
    if an.n_imaginary > 0 {
        eprintln!(
            "warning: {} imaginary mode(s): the structure is not a minimum",
            an.n_imaginary
        );
    }
    Ok(())
}
