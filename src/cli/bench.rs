//! `bandcast bench`: performance workloads. Each workload is a subcommand; its work lives in
//! the library (e.g. `bandcast::bench::integrals`), this file only parses and prints.
//! To add a workload: one variant in `Workload` and one arm in `run`.

use std::path::{Path, PathBuf};

use bandcast::bench::integrals::{all_eris, class_throughput, ClassTiming, MoleculeTiming};
use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::vibronic::FcOptions;
use bandcast::{Error, Result};

#[derive(clap::Args, Debug)]
pub struct Args {
    #[command(subcommand)]
    pub workload: Workload,
}

#[derive(clap::Subcommand, Debug)]
pub enum Workload {
    /// ERI throughput per angular-momentum class and wall time for all ERIs of molecules.
    Integrals(IntegralsArgs),
    /// SCF and EP2 valence IEs of one molecule: wall and CPU time of each step.
    Ep2(super::ionize::Ep2BenchArgs),
    /// SCF wall time, iterations, peak memory and 1→N-thread speed-up (see `bandcast bench scf --help`).
    Scf(super::scf::BenchArgs),
    /// Carbon 1s levels (ΔSCF) of an all-trans n-alkane built from standard geometry (icosane; --small: hexane).
    Core(super::core::BenchArgs),
    /// EOM-IP-CCSD (benzene) and EOM-IP-MBPT2 (guanine) in def2-TZVPP: time per stage, memory.
    Eom(EomArgs),
    /// ΔCCSD(T) valence (water 1b1) and core (water O 1s; --large: ethanol C 1s), with and without frozen natural orbitals: time, memory.
    DeltaCc(DeltaCcArgs),
    /// Franck–Condon lines of seeded random many-mode Duschinsky relations: captured fraction, lines, time.
    FranckCondon(FranckCondonArgs),
    /// One analytic RHF gradient against its SCF (CPU seconds, ratio), and a full harmonic analysis.
    Gradient(GradientArgs),
}

#[derive(clap::Args, Debug)]
pub struct IntegralsArgs {
    /// Molecule/basis runs as FILE.xyz:BASIS (Å). Default: benzene with cc-pVDZ and water
    /// with cc-pVQZ from tests/data/gw100 when those files exist.
    #[arg(value_name = "FILE.xyz:BASIS")]
    pub runs: Vec<String>,
    /// Skip the per-class table.
    #[arg(long)]
    pub no_classes: bool,
    /// Skip the molecule runs.
    #[arg(long)]
    pub classes_only: bool,
    /// Schwarz threshold for skipping quartets in the molecule runs.
    #[arg(long, default_value_t = 1e-12, value_name = "EH")]
    pub threshold: f64,
    /// Compute the molecule runs with the ket shells of each bra pair in one batch instead
    /// of one shell quartet at a time.
    #[arg(long)]
    pub ket_batches: bool,
    /// Seconds spent on each class.
    #[arg(long, default_value_t = 0.3, value_name = "S")]
    pub seconds_per_class: f64,
    /// Print one JSON document instead of tables.
    #[arg(long)]
    pub json: bool,
}

pub fn run(args: Args) -> Result<()> {
    match args.workload {
        Workload::Integrals(a) => integrals(a),
        Workload::Ep2(a) => super::ionize::ep2_bench(a),
        Workload::Scf(a) => super::scf::bench(a),
        Workload::Core(a) => super::core::bench(a),
        Workload::Eom(a) => eom(a),
        Workload::DeltaCc(a) => delta_cc(a),
        Workload::FranckCondon(a) => franck_condon(a),
        Workload::Gradient(a) => gradient(a),
    }
}

/// Printed on stderr when the old spelling `--quick` of `--small` is used.
pub const QUICK_NOTE: &str =
    "note: bench's --quick is now --small (the old spelling is accepted for one release)";

const DEFAULT_DIR: &str = "tests/data/gw100";

/// `bandcast bench integrals --json` (keys in alphabetical order).
#[derive(serde::Serialize)]
struct IntegralsJson<'a> {
    classes: &'a [ClassTiming],
    molecules: Vec<MoleculeRunJson<'a>>,
    workload: &'static str,
}

#[derive(serde::Serialize)]
struct MoleculeRunJson<'a> {
    basis: &'a str,
    file: &'a str,
    timing: &'a MoleculeTiming,
}

fn integrals(a: IntegralsArgs) -> Result<()> {
    let mut runs: Vec<(PathBuf, String)> = Vec::new();
    for r in &a.runs {
        let (file, basis) = r.rsplit_once(':').ok_or_else(|| {
            Error::input(format!(
                "run '{r}' should read FILE.xyz:BASIS (e.g. water.xyz:cc-pVDZ)"
            ))
        })?;
        runs.push((PathBuf::from(file), basis.to_string()));
    }
    if runs.is_empty() && !a.classes_only {
        for (f, b) in [("benzene.xyz", "cc-pVDZ"), ("water.xyz", "cc-pVQZ")] {
            let p = Path::new(DEFAULT_DIR).join(f);
            if p.exists() {
                eprintln!("using default run {}:{b}", p.display());
                runs.push((p, b.to_string()));
            } else {
                eprintln!("default geometry {} not found; skipping it", p.display());
            }
        }
    }
    let mut classes = Vec::new();
    if !a.no_classes {
        let list: [[usize; 4]; 14] = [
            [0, 0, 0, 0],
            [1, 0, 0, 0],
            [1, 0, 1, 0],
            [1, 1, 0, 0],
            [1, 1, 1, 1],
            [2, 0, 0, 0],
            [2, 1, 1, 0],
            [2, 1, 2, 1],
            [2, 2, 2, 2],
            [3, 0, 3, 0],
            [3, 2, 2, 1],
            [3, 3, 0, 0],
            [3, 3, 3, 3],
            [4, 4, 4, 4],
        ];
        for ls in list {
            for k in [1usize, 3] {
                if k == 3 && ls.iter().sum::<usize>() > 6 {
                    continue;
                }
                classes.push(class_throughput(ls, k, a.seconds_per_class));
            }
        }
    }
    let mut mols = Vec::new();
    for (file, basis_name) in &runs {
        let mol = read_xyz(file, LengthUnit::Angstrom)?;
        let basis = bandcast::basis::load(basis_name, &mol, None)?;
        let t = all_eris(&basis, a.threshold, a.ket_batches);
        mols.push((file.display().to_string(), basis_name.clone(), t));
    }
    if a.json {
        let j = IntegralsJson {
            classes: &classes,
            molecules: mols
                .iter()
                .map(|(f, b, t)| MoleculeRunJson {
                    basis: b,
                    file: f,
                    timing: t,
                })
                .collect(),
            workload: "integrals",
        };
        println!(
            "{}",
            serde_json::to_string_pretty(&j).map_err(|e| Error::computation(e.to_string()))?
        );
        return Ok(());
    }
    if !classes.is_empty() {
        println!("ERI throughput per class (one thread, pure shells, K primitives per shell)");
        println!("(rates per wall second; the last column per CPU second of the timing thread)");
        println!(
            "{:<9} {:>2} {:>10} {:>14} {:>16} {:>16}",
            "class", "K", "quartets", "integrals/s", "prim. ints/s", "prim. ints/CPU-s"
        );
        for c in &classes {
            let per_cpu = c
                .cpu_seconds
                .filter(|&x| x > 0.0)
                .map(|x| format!("{:.3e}", c.primitive_integrals_per_s * c.seconds / x))
                .unwrap_or_else(|| "-".into());
            println!(
                "{:<9} {:>2} {:>10} {:>14.3e} {:>16.3e} {:>16}",
                c.label,
                c.primitives_per_shell,
                c.quartets,
                c.integrals_per_s,
                c.primitive_integrals_per_s,
                per_cpu
            );
        }
    }
    for (f, b, t) in &mols {
        println!();
        println!("all unique ERIs: {f} / {b}");
        println!(
            "  {} basis functions, {} shells, {} threads, Schwarz threshold {:.0e}{}",
            t.n_basis,
            t.n_shells,
            t.threads,
            a.threshold,
            if a.ket_batches {
                ", kets batched per bra pair"
            } else {
                ""
            }
        );
        println!(
            "  setup {:.3} s; {} quartets computed, {} screened out",
            t.setup_seconds, t.quartets_computed, t.quartets_screened
        );
        println!(
            "  {} integrals in {:.3} s wall = {:.3e} integrals/s (checksum Σ|g| = {:.10e})",
            t.integrals, t.seconds, t.integrals_per_s, t.checksum
        );
        if let Some(c) = t.cpu_seconds {
            println!("  CPU time of all threads during the run: {c:.2} s");
        }
    }
    Ok(())
}

/// `bandcast bench eom`: the EOM-IP workload (library: `bandcast::bench::eom`).
#[derive(clap::Args, Debug)]
pub struct EomArgs {
    /// Small stand-ins only (water/def2-TZVPP and benzene/def2-SVP).
    #[arg(long)]
    pub small: bool,
    /// Old spelling of --small, kept for one release.
    #[arg(long, hide = true)]
    pub quick: bool,
    /// Run only the cases of these molecules (e.g. --only benzene).
    #[arg(long, value_name = "NAME")]
    pub only: Vec<String>,
    /// Memory budget in GiB for the correlated stages.
    #[arg(long, value_name = "GIB", default_value_t = 14.0)]
    pub memory: f64,
    /// Directory holding benzene.xyz and guanine.xyz (GW100 structures, Å).
    #[arg(long, value_name = "DIR", default_value = "tests/data/gw100")]
    pub dir: std::path::PathBuf,
}

fn eom(a: EomArgs) -> Result<()> {
    if a.quick {
        eprintln!("{}", QUICK_NOTE);
    }
    if !(a.memory > 0.0) {
        return Err(Error::input("--memory must be a positive number of GiB"));
    }
    println!(
        "EOM-IP benchmark ({} threads): EOM-IP-CCSD benzene/def2-TZVPP (5 states), \
         EOM-IP-MBPT2 guanine/def2-TZVPP (5 states); per stage: wall time, CPU time of \
         all threads, peak resident memory (VmHWM) within the stage",
        rayon::current_num_threads()
    );
    bandcast::bench::eom::run_eom_bench(
        &a.dir,
        a.small || a.quick,
        &a.only,
        a.memory * 1024.0 * 1024.0 * 1024.0,
        &mut |l| eprintln!("{l}"),
        &mut |r| print!("{}", bandcast::bench::eom::format_result(r)),
    )?;
    Ok(())
}

/// `bandcast bench delta-cc`: state-specific coupled cluster (library:
/// `bandcast::bench::delta_cc`).
#[derive(clap::Args, Debug)]
pub struct DeltaCcArgs {
    /// Add ethanol C 1s (CH2OH carbon) in cc-pCVTZ on the hole / cc-pVTZ with --fno 99.5
    /// (about 7 min on two cores; docs/benchmarks.md).
    #[arg(long)]
    pub large: bool,
    /// Memory budget in GiB for the coupled cluster (ethanol holds its ladder integrals
    /// within about 5.4 GiB; below that they are rebuilt every iteration, several times
    /// slower).
    #[arg(long, value_name = "GIB", default_value_t = 12.0)]
    pub memory: f64,
    /// Directory holding water.xyz and ethanol.xyz (GW100 structures, Å).
    #[arg(long, value_name = "DIR", default_value = "tests/data/gw100")]
    pub dir: std::path::PathBuf,
    /// Print the coupled-cluster iterations on stderr.
    #[arg(long)]
    pub verbose: bool,
}

fn delta_cc(a: DeltaCcArgs) -> Result<()> {
    if !(a.memory > 0.0) {
        return Err(Error::input("--memory must be a positive number of GiB"));
    }
    println!(
        "ΔCCSD(T) benchmark ({} threads): energy (eV; core levels non-relativistic), wall \
         time, CPU time of all threads, peak resident memory (VmHWM) of each case",
        rayon::current_num_threads()
    );
    bandcast::bench::delta_cc::run(
        &a.dir,
        a.large,
        a.memory * 1024.0 * 1024.0 * 1024.0,
        a.verbose,
        &mut |r| println!("{r}"),
    )?;
    Ok(())
}

/// `bandcast bench franck-condon`: Franck–Condon lines of seeded random Duschinsky relations
/// (library: `bandcast::bench::franck_condon`).
#[derive(clap::Args, Debug)]
pub struct FranckCondonArgs {
    /// Number of vibrational modes of each seeded relation.
    #[arg(long, default_value_t = 30, value_name = "N")]
    pub modes: usize,
    /// Seeds of the random relations, one run each.
    #[arg(long, value_delimiter = ',', default_values_t = vec![1u64, 2, 3, 7], value_name = "S,S,…")]
    pub seeds: Vec<u64>,
    /// Fraction of the band's intensity to capture.
    #[arg(long, default_value_t = 0.95, value_name = "F")]
    pub target: f64,
    /// Most lines kept per band.
    #[arg(long, default_value_t = 50_000, value_name = "N")]
    pub max_lines: usize,
    /// Screening threshold: a combination of excited modes opens larger ones only when its
    /// lines hold at least this intensity (band total 1).
    #[arg(long, value_name = "I")]
    pub subset_threshold: Option<f64>,
    /// Work bound: most recursion steps per band.
    #[arg(long, value_name = "N")]
    pub max_overlaps: Option<u64>,
    /// Print one JSON document instead of a table.
    #[arg(long)]
    pub json: bool,
}

fn franck_condon(a: FranckCondonArgs) -> Result<()> {
    if a.modes == 0 || !(a.target > 0.0 && a.target <= 1.0) {
        return Err(Error::input("--modes must be ≥ 1 and --target in (0, 1]"));
    }
    let mut opt = FcOptions {
        target_fraction: a.target,
        max_lines: a.max_lines,
        ..FcOptions::default()
    };
    if let Some(t) = a.subset_threshold {
        opt.subset_threshold = t;
    }
    if let Some(m) = a.max_overlaps {
        opt.max_overlaps = m;
    }
    let rows = bandcast::bench::franck_condon::run(a.modes, &a.seeds, &opt)?;
    if a.json {
        println!(
            "{}",
            serde_json::to_string_pretty(&rows).map_err(|e| Error::computation(e.to_string()))?
        );
        return Ok(());
    }
    println!(
        "Franck–Condon lines from v = 0, {} modes, seeded random Duschinsky relations \
         (one thread; wall time)",
        a.modes
    );
    println!(
        "{:>6} {:>8} {:>9} {:>7} {:>8} {:>6} {:>12} {:>9}  notes",
        "seed", "ΣS", "captured", "target", "lines", "class", "overlaps", "wall s"
    );
    for r in rows {
        println!(
            "{:>6} {:>8.2} {:>9.4} {:>7} {:>8} {:>6} {:>12} {:>9.2}  {}",
            r.seed,
            r.total_huang_rhys,
            r.captured_fraction,
            if r.target_reached { "yes" } else { "no" },
            r.lines_kept,
            r.highest_class,
            r.overlaps_evaluated,
            r.wall_seconds,
            r.notes.join(",")
        );
    }
    Ok(())
}

/// `bandcast bench gradient` (library: `bandcast::bench::gradient`).
#[derive(clap::Args, Debug)]
pub struct GradientArgs {
    /// Small stand-ins only (water/cc-pVTZ gradient, water/cc-pVDZ harmonic analysis).
    #[arg(long)]
    pub small: bool,
    /// Skip the harmonic analysis.
    #[arg(long)]
    pub no_harmonic: bool,
    /// Directory holding water.xyz and benzene.xyz (GW100 structures, Å).
    #[arg(long, value_name = "DIR", default_value = DEFAULT_DIR)]
    pub dir: PathBuf,
    /// Print one JSON document instead of text.
    #[arg(long)]
    pub json: bool,
}

#[derive(serde::Serialize)]
struct GradientJson {
    gradients: Vec<bandcast::bench::gradient::GradientCase>,
    harmonic: Vec<bandcast::bench::gradient::HarmonicCase>,
    workload: &'static str,
}

fn gradient(a: GradientArgs) -> Result<()> {
    use bandcast::bench::gradient as g;
    let (gc, hc) = g::cases(a.small);
    if !a.json {
        println!(
            "Gradient benchmark ({} threads): SCF (default options) then one analytic RHF \
             gradient; CPU seconds of all threads; ratio = gradient CPU / SCF CPU",
            rayon::current_num_threads()
        );
    }
    let mut out = GradientJson {
        gradients: Vec::new(),
        harmonic: Vec::new(),
        workload: "gradient",
    };
    for (m, b) in gc {
        let r = g::gradient_case(&a.dir, m, b)?;
        if !a.json {
            println!("{}", g::format_gradient(&r));
        }
        out.gradients.push(r);
    }
    if !a.no_harmonic {
        for (m, b) in hc {
            let r = g::harmonic_case(&a.dir, m, b)?;
            if !a.json {
                println!("{}", g::format_harmonic(&r));
            }
            out.harmonic.push(r);
        }
    }
    if a.json {
        println!(
            "{}",
            serde_json::to_string_pretty(&out).map_err(|e| Error::computation(e.to_string()))?
        );
    }
    Ok(())
}
