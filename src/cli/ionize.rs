//! `bandcast ionize`: valence ionization energies as labelled bands.
//!
//! Parsing and printing only; the work is `bandcast::ionization::valence::predict`.

use bandcast::ionization::default_method;
use bandcast::ionization::method::Method;
use bandcast::ionization::notice::ValenceNotice;
use bandcast::ionization::valence::{predict, ValenceOptions};
use bandcast::report::json::{to_pretty, IonizeJson};
use bandcast::report::text::ionize_table;
use bandcast::{Error, Result};

use super::common::{parse_window, MoleculeArgs, VibronicArgs};

/// Valence ionization energies with band labels, degeneracies, make-up and bonding character.
#[derive(clap::Args, Debug)]
#[command(
    mut_arg("vibronic", |a| a
        .help(
            "Vibrational structure of the --count (default 3) lowest bands: optimise the \
             neutral and each cation (hole held by the maximum overlap method), both harmonic \
             analyses, Franck–Condon progression with Duschinsky rotation; adiabatic, vertical \
             and maximum positions (correlated vertical energy + HF relaxation) and the \
             progression-forming modes. --memory bounds it (refused before any work when it \
             cannot fit)")
        .conflicts_with_all(["method", "window", "integrals", "correlate_core"])),
    mut_arg("vibronic_count", |a| a
        .help("Number of bands with --vibronic (default 3; the same as --count here)")
        .conflicts_with("count")),
)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set: a bundled name (see `bandcast basis`) or a basis file.
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// koopmans | dscf | ep2 | eom-ccsd | eom-mp2 | dccsd-t (default for closed shells: the
    /// most accurate that fits — eom-ccsd up to 300 basis functions, eom-mp2 up to 450, ep2
    /// beyond, within --memory; dscf for open shells). dccsd-t is never the default: each
    /// band gets its own cation SCF and coupled cluster.
    #[arg(long, value_name = "METHOD")]
    pub method: Option<String>,
    /// Frozen natural orbitals for the coupled cluster (dccsd-t): keep the MP2 natural
    /// virtual orbitals that hold PERCENT of the virtual population (99.5 is a common
    /// choice; 100 keeps them all) and add the MP2 energy of the rest. Cuts the time and
    /// memory of large bases by several times; the error it adds is measured in
    /// docs/valence-methods.md and docs/core-levels.md. Default: every virtual orbital.
    #[arg(long, value_name = "PERCENT", value_parser = super::common::parse_fno)]
    pub fno: Option<f64>,
    /// Report the N bands of lowest ionization energy. Correlated methods compute up to 2
    /// more in Koopmans' order, in case correlation moves one of them below a counted band
    /// (N2's 3σg); dccsd-t, at a cation SCF and coupled cluster per band, only those within
    /// 3 eV (Koopmans) of the last counted band.
    #[arg(long, value_name = "N", conflicts_with = "window")]
    pub count: Option<usize>,
    /// Report the bands with ionization energy in this range in eV: `LO:HI` (e.g. `12:21.2`)
    /// or `HI` (= 0:HI, e.g. 21.2 for He I).
    #[arg(long, value_name = "LO:HI|HI", value_parser = parse_window)]
    pub window: Option<(f64, f64)>,
    /// Correlate the core electrons too in EP2 and EOM (default: frozen core).
    #[arg(long, alias = "all-electron")]
    pub correlate_core: bool,
    /// Memory in GiB for the MO integrals and the correlated stages (default: half of the
    /// machine's memory, at most three quarters of what is available — the rule of
    /// `bandcast scf --memory`). It also decides the default method.
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Two-electron integrals of eom-ccsd / eom-mp2: ri (density fitting with the fitting
    /// set made for the basis; the default when one is bundled, Cholesky otherwise) or
    /// cholesky (pivoted Cholesky decomposition, threshold 1e-5 Eh).
    #[arg(long, value_name = "ri|cholesky")]
    pub integrals: Option<String>,
    /// One JSON object on stdout instead of the table.
    #[arg(long)]
    pub json: bool,
    /// Say on stderr which method runs (and, by default, why), its notes, and the time of
    /// each stage.
    #[arg(long)]
    pub verbose: bool,
    #[command(flatten)]
    pub vibronic: VibronicArgs,
}

pub fn run(args: Args) -> Result<()> {
    let started = std::time::Instant::now();
    let mol = args.molecule.load()?;
    // --- vibronic bands (cli/vibronic.rs) ---
    if args.vibronic.vibronic {
        let set = args
            .vibronic
            .settings(&args.basis, args.count, args.memory, args.verbose);
        return super::vibronic::ionize(&mol, &args.molecule.file, &set, args.json);
    }
    // --- end vibronic ---
    const GIB: f64 = (1u64 << 30) as f64;
    let memory_bytes = match args.memory {
        Some(gib) if !(gib > 0.0) => {
            return Err(Error::input("--memory must be a positive number of GiB"))
        }
        Some(gib) => gib * GIB,
        None => bandcast::system::default_memory_budget() as f64,
    };
    let basis = bandcast::basis::load(&args.basis, &mol, None)?;
    // symmetric within the tolerance → exactly symmetric (the detection `core` uses too)
    use bandcast::analysis::symmetry::{symmetrize_job, DEFAULT_TOLERANCE};
    let job = symmetrize_job(&mol, &basis, DEFAULT_TOLERANCE);
    let symmetrised = ValenceNotice::for_symmetrised(&job, DEFAULT_TOLERANCE);
    let (mol, basis) = (job.molecule, job.basis);
    let loaded_s = started.elapsed().as_secs_f64();
    let defaulted = args.method.is_none();
    let method = match &args.method {
        Some(m) => Method::parse(m)?,
        // decided below, before any work, from the full options
        None => Method::Koopmans,
    };
    use bandcast::correlation::two_electron::TwoElectron;
    let eom_integrals = match args.integrals.as_deref() {
        None => TwoElectron::Auto,
        Some(x) if x.eq_ignore_ascii_case("ri") => {
            match bandcast::basis::default_auxiliary_for(&basis.name) {
                Some(aux) => TwoElectron::Fitted(aux.to_string()),
                None => {
                    return Err(Error::input(format!(
                        "--integrals ri: no fitting set is bundled for the basis {}; use \
                     --integrals cholesky",
                        basis.name
                    )))
                }
            }
        }
        Some(x) if x.eq_ignore_ascii_case("cholesky") => TwoElectron::Cholesky,
        Some(x) => {
            return Err(Error::input(format!(
                "--integrals: '{x}' is not one of ri, cholesky"
            )))
        }
    };
    if args.fno.is_some() && method != Method::DccsdT {
        return Err(Error::input(
            "--fno applies to --method dccsd-t (the frozen natural orbitals of its coupled \
             cluster); drop it or ask for dccsd-t",
        ));
    }
    let mut opts = ValenceOptions {
        method,
        count: args.count,
        window_ev: args.window.map(|w| w.1),
        window_min_ev: args.window.map(|w| w.0).filter(|&lo| lo > 0.0),
        frozen_core: !args.correlate_core,
        memory_bytes: memory_bytes as usize,
        eom_integrals,
        natural_virtuals: args.fno,
        progress: args.verbose,
        ..Default::default()
    };
    // every stage's memory estimate before any work: the default chain's choice, or the
    // asked method's stages (refused by `predict` before its SCF when they cannot fit)
    let estimates = if defaulted {
        let plan = default_method::plan_before_work(&mol, &basis, &opts)?;
        opts.method = plan.choice.method;
        if args.verbose {
            eprintln!("{}: {}", mol.name, plan.choice);
        }
        plan.estimates
    } else {
        default_method::stage_estimates(&mol, &basis, &opts, method)
    };
    let method = opts.method;
    if args.verbose {
        super::common::print_estimates(&mol.name, &estimates, memory_bytes);
        eprintln!(
            "{}: {} / {} ({} basis functions){}",
            mol.name,
            method,
            basis.name,
            basis.n_basis,
            if defaulted {
                ", first choice of the default rule"
            } else {
                ""
            }
        );
        eprintln!("  molecule and basis: {loaded_s:.2} s");
    }
    let predict_started = std::time::Instant::now();
    let mut result = if defaulted {
        default_method::predict_default(&mol, &basis, &opts)?.0
    } else {
        predict(&mol, &basis, &opts)?
    };
    result.notes.extend(symmetrised);
    if args.verbose {
        eprintln!(
            "  SCF and {}: {:.2} s",
            result.method,
            predict_started.elapsed().as_secs_f64()
        );
        for n in &result.notes {
            eprintln!("  note [{}]: {n}", n.code());
        }
        for w in &result.warnings {
            eprintln!("  warning [{}]: {w}", w.code());
        }
    }
    let name = if mol.name.is_empty() {
        args.molecule.file.display().to_string()
    } else {
        mol.name.clone()
    };
    if args.json {
        super::output::emit_json(&to_pretty(&IonizeJson::new(&result, &name))?);
    } else {
        print!("{}", ionize_table(&result, &name));
    }
    Ok(())
}

/// `bandcast bench ep2 FILE.xyz --basis NAME`: time the SCF and EP2 for all valence bands.
#[derive(clap::Args, Debug)]
pub struct Ep2BenchArgs {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set (default def2-TZVPP).
    #[arg(long, value_name = "NAME", default_value = "def2-TZVPP")]
    pub basis: String,
}

pub fn ep2_bench(args: Ep2BenchArgs) -> Result<()> {
    let mol = args.molecule.load()?;
    let basis = bandcast::basis::load(&args.basis, &mol, None)?;
    let r = bandcast::bench::ep2::run_ep2_bench(&mol, &basis)?;
    println!("{} / {}: {r}", args.molecule.file.display(), basis.name);
    Ok(())
}
