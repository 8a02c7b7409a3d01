//! `bandcast scf`: a Hartree–Fock ground state, printed as a table or as JSON.

use std::io::IsTerminal;

use bandcast::basis::Harmonics;
use bandcast::chem::Molecule;
use bandcast::scf::context::BuilderChoice;
use bandcast::scf::{
    self, DfStart, FockMethod, Guess, IterationInfo, Reference, ScfOptions, Wavefunction,
};
use bandcast::units::HARTREE_TO_EV;
use bandcast::{Error, Result};

use bandcast::report::json::{reference_name, to_pretty, ScfJson};
use bandcast::report::runs::{dipole_debye, scf_channels, ScfRun};

use super::common::MoleculeArgs;

/// Hartree–Fock self-consistent field for one molecule.
///
/// Solves the Roothaan–Hall (RHF), Pople–Nesbet (UHF) or restricted open-shell (ROHF)
/// equations in a Gaussian basis and prints the total energy and its parts, the orbital
/// energies and occupations, and the dipole moment. This is the reference every other
/// bandcast command builds on: check here that it converges to the state you meant
/// (charge, multiplicity, ⟨S²⟩ for open shells) before asking for ionization energies.
///
/// Examples:
///
///   bandcast scf water.xyz --basis cc-pVDZ
///
///   bandcast scf o2.xyz --basis 6-31G* --multiplicity 3 --reference uhf
///
///   bandcast scf benzene.xyz --basis def2-TZVPP --memory 8 --json > benzene-hf.json
///
/// Koopmans' theorem reads −ε of an occupied orbital as an ionization energy; it typically
/// overestimates valence ionization energies by about 1 eV because the other electrons do not
/// relax. Use `bandcast ionize` for better estimates.
///
/// Convergence: |ΔE| < 1e-10 Eh and RMS of the orthogonalised commutator FPS − SPF < 1e-8.
/// DIIS runs from the first iteration; if it stalls, level shifting and then damping are
/// tried. A run that does not converge exits with status 1 and says what was tried; bad
/// input exits with 2.
#[derive(clap::Args, Debug)]
#[command(verbatim_doc_comment)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set: a bundled name (`bandcast basis` lists them; spelling is forgiving) or a
    /// path to a basis file in bandcast's JSON schema.
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// rhf (closed shell), uhf (spin-unrestricted) or rohf (restricted open shell). Default:
    /// rhf for singlets, uhf otherwise.
    #[arg(long, value_name = "REF", value_parser = ["rhf", "uhf", "rohf"])]
    pub reference: Option<String>,
    /// Override the basis set's own convention for d, f, g functions.
    #[arg(long, value_name = "KIND", value_parser = ["cartesian", "pure"])]
    pub harmonics: Option<String>,
    /// Memory for stored two-electron integrals (in-core ERIs or the density-fitting
    /// tensor), in GiB; larger jobs recompute the integrals each iteration (integral-direct).
    /// Default: half of the physical memory, at most three quarters of what is available
    /// at start.
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Starting guess: sad (superposed atomic densities) or core (bare-nucleus orbitals).
    #[arg(long, value_name = "KIND", default_value = "sad", value_parser = ["sad", "core"])]
    pub guess: String,
    /// Maximum number of SCF iterations.
    #[arg(long, value_name = "N", default_value_t = 128)]
    pub max_iter: usize,
    /// Level shift for virtual orbitals (hartree) from the first iteration.
    #[arg(long, value_name = "EH", default_value_t = 0.0)]
    pub level_shift: f64,
    /// Density damping factor in [0, 0.95] from the first iteration.
    #[arg(long, value_name = "D", default_value_t = 0.0)]
    pub damping: f64,
    /// How J and K are built: auto or exact (the same: exact integrals, in-core when they fit
    /// --memory, else integral-direct; large jobs after a density-fitted start), in-core,
    /// direct, or df (density-fitted J and K: fast, but the energy carries the fitting
    /// error, measured 2e-6 to 4e-5 Eh per atom). df and exact mean the same in every
    /// command that takes --fock.
    #[arg(long, value_name = "HOW", default_value = "auto", value_parser = ["auto", "exact", "in-core", "direct", "df"])]
    pub fock: String,
    /// Before the exact iterations, converge with density-fitted J and K (corrected once by
    /// an exact build): auto (from a SAD or core guess, for integral-direct runs and for
    /// in-core runs storing at least 1 GiB), yes or no. The final energy is the
    /// exact-integral one either way.
    #[arg(long, value_name = "WHEN", default_value = "auto", value_parser = ["auto", "yes", "no"])]
    pub df_start: String,
    /// Auxiliary basis for density-fitted J and K (a bundled fitting set or a file).
    #[arg(long, value_name = "NAME", default_value = bandcast::scf::context::DEFAULT_JK_FITTING)]
    pub jk_fitting: String,
    /// Print all virtual orbitals (the table shows the occupied ones and ten virtuals).
    #[arg(long)]
    pub all_orbitals: bool,
    /// Print one line per iteration on stderr even when it is not a terminal.
    #[arg(long)]
    pub verbose: bool,
    /// Write one JSON object to stdout instead of the table.
    #[arg(long)]
    pub json: bool,
}

pub fn run(args: Args) -> Result<()> {
    let mol = args.molecule.load()?;
    let harmonics = match args.harmonics.as_deref() {
        Some("cartesian") => Some(Harmonics::Cartesian),
        Some("pure") => Some(Harmonics::Pure),
        _ => None,
    };
    let basis = bandcast::basis::load(&args.basis, &mol, harmonics)?;
    let reference = match args.reference.as_deref() {
        Some("rhf") => Reference::Rhf,
        Some("uhf") => Reference::Uhf,
        Some("rohf") => Reference::Rohf,
        _ if mol.multiplicity == 1 => Reference::Rhf,
        _ => Reference::Uhf,
    };
    if let Some(m) = args.memory {
        if !(m.is_finite() && m >= 0.0) {
            return Err(Error::input(
                "--memory must be a non-negative number of GiB",
            ));
        }
    }
    if !(0.0..=0.95).contains(&args.damping) {
        return Err(Error::input("--damping must lie between 0 and 0.95"));
    }
    if !(args.level_shift.is_finite() && args.level_shift >= 0.0) {
        return Err(Error::input(
            "--level-shift must be a non-negative number of hartree",
        ));
    }
    if args.max_iter == 0 {
        return Err(Error::input("--max-iter must be at least 1"));
    }
    let opts = ScfOptions {
        reference,
        max_iter: args.max_iter,
        memory_budget_bytes: match args.memory {
            Some(m) => (m * (1u64 << 30) as f64) as usize,
            None => bandcast::system::default_memory_budget(),
        },
        guess: if args.guess == "core" {
            Guess::Core
        } else {
            Guess::Sad
        },
        level_shift: args.level_shift,
        damping: args.damping,
        fock: match args.fock.as_str() {
            "in-core" => FockMethod::InCore,
            "direct" => FockMethod::Direct,
            "df" => FockMethod::DensityFitted,
            _ => FockMethod::Auto,
        },
        df_start: match args.df_start.as_str() {
            "yes" => DfStart::Always,
            "no" => DfStart::Never,
            _ => DfStart::Auto,
        },
        jk_fitting: Some(args.jk_fitting.clone()),
        ..ScfOptions::default()
    };
    let show = args.verbose || std::io::stderr().is_terminal();
    if args.verbose {
        super::common::print_estimates(
            &mol.name,
            &scf::memory::estimates(basis.n_basis, basis.shells.len(), &opts),
            opts.memory_budget_bytes as f64,
        );
    }
    // refuse before the one-electron integrals and Schwarz bounds when even the matrices
    // cannot fit --memory
    scf::memory::check(basis.n_basis, &opts)?;
    let mut ctx = scf::ScfContext::new(&mol, &basis, opts.lindep_threshold)?;
    if show {
        let gib = |b: usize| bandcast::system::format_gib(b as f64);
        let need = ctx.in_core_bytes(opts.screening);
        eprintln!(
            "scf: {} functions; in-core ERIs would need {} of the {} budget; \
             Fock build {}",
            basis.n_basis,
            gib(need),
            gib(opts.memory_budget_bytes),
            match ctx.choose_builder(&opts) {
                BuilderChoice::InCore { df_start: false } => "in-core".to_string(),
                BuilderChoice::InCore { df_start: true } =>
                    format!("in-core after a density-fitted start ({})", args.jk_fitting),
                BuilderChoice::DensityFitted => format!("density-fitted ({})", args.jk_fitting),
                BuilderChoice::Direct { df_start: true } => format!(
                    "integral-direct after a density-fitted start ({})",
                    args.jk_fitting
                ),
                BuilderChoice::Direct { df_start: false } => "integral-direct".to_string(),
            }
        );
        for (what, secs) in &ctx.setup_timings {
            eprintln!("scf: {what}: {secs:.2} s");
        }
    }
    let t0 = std::time::Instant::now();
    let mut log = |i: &IterationInfo| {
        if show {
            eprintln!(
                "{}  [{:.2} s]",
                progress_line(i),
                t0.elapsed().as_secs_f64()
            );
        }
    };
    let wf = ctx.run(&mol, &opts, &mut log)?;
    if show {
        for (what, secs) in &ctx.last_run.timings {
            eprintln!("scf: {what}: {secs:.2} s");
        }
        if let Some(why) = &ctx.last_run.df_start_skipped {
            eprintln!("scf: no density-fitted start: {why}");
        }
    }
    let info = ScfRun {
        basis_name: basis.name.clone(),
        harmonics: describe_harmonics(&basis),
        n_dropped: ctx.ortho.n_dropped,
        smallest_kept: ctx.ortho.smallest_kept,
        builder: ctx.last_builder.clone(),
        density_fitted: ctx.last_run.density_fitted,
        df_start: ctx.last_run.df_start.clone(),
        jk_fitting: args.jk_fitting.clone(),
    };
    if args.json {
        super::output::emit_json(&to_pretty(&ScfJson::new(&mol, &wf, &info))?);
    } else {
        print!("{}", to_text(&mol, &wf, &info, args.all_orbitals));
    }
    Ok(())
}

fn progress_line(i: &IterationInfo) -> String {
    let mut extras = Vec::new();
    if i.step.diis {
        extras.push(format!("diis {}", i.diis_size));
    }
    if i.step.level_shift > 0.0 {
        extras.push(format!("shift {:.2}", i.step.level_shift));
    }
    if i.step.damping > 0.0 {
        extras.push(format!("damp {:.2}", i.step.damping));
    }
    if !i.note.is_empty() {
        extras.push(i.note.clone());
    }
    format!(
        "scf {:>4}  E = {:>20.12}  dE = {:>10.2e}  rms[F,P] = {:>9.2e}  {}",
        i.iteration,
        i.energy,
        if i.delta_e.is_nan() { 0.0 } else { i.delta_e },
        i.rms_commutator,
        extras.join(", ")
    )
}

fn describe_harmonics(b: &bandcast::basis::BasisSet) -> &'static str {
    let high: Vec<bool> = b
        .shells
        .iter()
        .filter(|s| s.l >= 2)
        .map(|s| s.pure)
        .collect();
    if high.is_empty() {
        "s and p only"
    } else if high.iter().all(|&p| p) {
        "pure"
    } else if high.iter().all(|&p| !p) {
        "cartesian"
    } else {
        "mixed"
    }
}

/// The molecule's name (XYZ comment line) cut to 40 characters for the header.
fn short_name(name: &str) -> String {
    if name.trim().is_empty() {
        return "molecule".into();
    }
    let mut n: String = name.trim().chars().take(40).collect();
    if name.trim().chars().count() > 40 {
        n.push('…');
    }
    n
}

fn to_text(mol: &Molecule, wf: &Wavefunction, info: &ScfRun, all: bool) -> String {
    use std::fmt::Write;
    let mut s = String::new();
    let spin_word = match mol.multiplicity {
        1 => "singlet".to_string(),
        2 => "doublet".to_string(),
        3 => "triplet".to_string(),
        m => format!("multiplicity {m}"),
    };
    let _ = writeln!(
        s,
        "Hartree–Fock ({}) · {} · {} atoms, {} electrons, charge {}, {}",
        reference_name(wf.reference).to_uppercase(),
        short_name(&mol.name),
        mol.atoms.len(),
        mol.n_electrons(),
        mol.charge,
        spin_word
    );
    let _ = writeln!(
        s,
        "basis {} ({}): {} functions, {} kept after removing {} near-linear dependencies \
         (smallest overlap eigenvalue kept {:.2e})",
        info.basis_name,
        info.harmonics,
        wf.n_basis,
        wf.n_independent,
        info.n_dropped,
        info.smallest_kept
    );
    let _ = writeln!(
        s,
        "converged in {} iterations · two-electron integrals {}",
        wf.iterations, info.builder
    );
    if let Some(d) = &info.df_start {
        let _ = writeln!(
            s,
            "started from {} density-fitted iterations and {} with the fit corrected by one \
             exact build ({}); the energy below is the exact-integral one",
            d.iterations, d.corrected_iterations, info.jk_fitting
        );
    }
    if info.density_fitted {
        let _ = writeln!(
            s,
            "J and K are density-fitted ({}): the total energy differs from the exact-integral \
             energy by the fitting error (measured 2e-6 to 4e-5 Eh per atom), orbital \
             energies by up to ~1e-3 eV",
            info.jk_fitting
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "  Energy (hartree)");
    let _ = writeln!(s, "    total               {:>20.10}", wf.energy);
    let _ = writeln!(s, "    nuclear repulsion   {:>20.10}", wf.nuclear_repulsion);
    let _ = writeln!(s, "    one-electron        {:>20.10}", wf.one_electron);
    let _ = writeln!(s, "    two-electron        {:>20.10}", wf.two_electron);
    if wf.reference != Reference::Rhf {
        let sz = 0.5 * (wf.n_alpha() as f64 - wf.n_beta() as f64);
        let _ = writeln!(
            s,
            "    <S^2>               {:>20.6}   (exact for this spin: {:.4})",
            wf.s2,
            sz * (sz + 1.0)
        );
    }
    let _ = writeln!(s);
    for (spin, eps, occ) in scf_channels(wf) {
        let title = match spin {
            "restricted" => "Orbitals".to_string(),
            other => format!("Orbitals, {other} spin"),
        };
        let _ = writeln!(s, "  {title}");
        let _ = writeln!(s, "      #   occ      energy/Eh      energy/eV");
        let last_occ = occ.iter().rposition(|&o| o > 0.0).unwrap_or(0);
        let shown = if all {
            eps.len()
        } else {
            (last_occ + 11).min(eps.len())
        };
        for i in 0..shown {
            let tag = if i == last_occ {
                "  <- HOMO"
            } else if i == last_occ + 1 {
                "  <- LUMO"
            } else {
                ""
            };
            let _ = writeln!(
                s,
                "   {:>4}   {:>3.1}  {:>13.6}  {:>13.4}{}",
                i + 1,
                occ[i],
                eps[i],
                eps[i] * HARTREE_TO_EV,
                tag
            );
        }
        if shown < eps.len() {
            let _ = writeln!(
                s,
                "    … {} more virtual orbitals (--all-orbitals or --json lists them)",
                eps.len() - shown
            );
        }
        let _ = writeln!(s);
    }
    if wf.reference == Reference::Rohf {
        let _ = writeln!(
            s,
            "  (ROHF orbital energies are the diagonal elements of the alpha and beta Fock \
             matrices in the canonical ROHF orbitals.)"
        );
        let _ = writeln!(s);
    }
    let d = dipole_debye(wf);
    let _ = writeln!(
        s,
        "  Dipole moment (debye, about the origin of the input coordinates{})",
        if mol.charge == 0 {
            "; origin-independent for a neutral molecule"
        } else {
            "; an ion's dipole depends on the origin"
        }
    );
    let _ = writeln!(
        s,
        "    x {:>9.4}   y {:>9.4}   z {:>9.4}   |μ| {:>9.4}",
        d[0], d[1], d[2], d[3]
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "  −ε of occupied orbitals (Koopmans) overestimates valence ionization energies, \
         typically by ~1 eV; a prediction guides a measurement, it does not replace it."
    );
    s
}

/// SCF benchmark: water/cc-pVTZ, benzene/cc-pVDZ, benzene/def2-TZVPP (default builder,
/// integral-direct after a density-fitted start, density-fitted J/K), optionally
/// guanine/def2-TZVPP.
///
/// For each case: the Fock builder used, wall time of the whole SCF (one-electron
/// integrals, SAD guess, ERIs, iterations) on the current thread pool (set it with the
/// global --threads), the CPU time of all threads, the number of iterations, peak resident
/// memory during the case, and (except the direct benzene/def2-TZVPP and the guanine cases)
/// the wall time on one thread and the speed-up. The energies on one and on all threads
/// must agree to 1e-10 Eh or the benchmark fails. The memory budget for stored integrals
/// is printed in the header.
#[derive(clap::Args, Debug)]
#[command(verbatim_doc_comment)]
pub struct BenchArgs {
    /// Only the small cases (water/cc-pVTZ and benzene/cc-pVDZ).
    #[arg(long)]
    pub small: bool,
    /// Old spelling of --small, kept for one release.
    #[arg(long, hide = true)]
    pub quick: bool,
    /// Add guanine/def2-TZVPP (exact: integral-direct after a density-fitted start unless
    /// ~20 GiB are available, about 100 CPU-s on 2 cores; and
    /// density-fitted).
    #[arg(long)]
    pub guanine: bool,
    /// Memory budget for stored integrals in GiB (default: the rule of `bandcast scf
    /// --memory`).
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Directory holding water.xyz, benzene.xyz and guanine.xyz (GW100 structures, Å).
    #[arg(long, value_name = "DIR", default_value = "tests/data/gw100")]
    pub dir: std::path::PathBuf,
}

pub fn bench(a: BenchArgs) -> Result<()> {
    let small = a.small || a.quick;
    if a.quick {
        eprintln!("{}", super::bench::QUICK_NOTE);
    }
    let budget = match a.memory {
        Some(m) if m.is_finite() && m >= 0.0 => (m * (1u64 << 30) as f64) as usize,
        Some(_) => {
            return Err(Error::input(
                "--memory must be a non-negative number of GiB",
            ))
        }
        None => bandcast::system::default_memory_budget(),
    };
    println!(
        "SCF benchmark ({} threads; RHF, SAD guess, default thresholds; memory budget for \
         stored integrals {:.2} GiB)",
        rayon::current_num_threads(),
        budget as f64 / (1u64 << 30) as f64
    );
    bandcast::bench::scf::run_scf_bench(&a.dir, small, a.guanine, budget, &mut |r| {
        println!("{}", bandcast::bench::scf::format_result(r));
    })?;
    Ok(())
}
