//! `bandcast bench`: performance workloads. Each workload is a subcommand; its work lives in
//! the library (e.g. `bandcast::bench::integrals`), this file only parses and prints.
//! To add a workload: one variant in `Workload` and one arm in `run`.

use std::path::{Path, PathBuf};

use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::bench::integrals::{all_eris, class_throughput};
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
    /// Carbon 1s levels (ΔSCF) of an all-trans n-alkane built from standard geometry.
    Core(super::core::BenchArgs),
    /// EOM-IP-CCSD (benzene) and EOM-IP-MBPT2 (guanine) in def2-TZVPP: time per stage, memory.
    Eom(super::eom_bench::BenchArgs),
    /// Franck–Condon lines of seeded random many-mode Duschinsky relations: captured fraction, lines, time.
    FranckCondon(super::vibronic_bench::BenchArgs),
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
        Workload::Eom(a) => super::eom_bench::bench(a),
        Workload::FranckCondon(a) => super::vibronic_bench::bench(a),
    }
}

/// Printed on stderr when the old spelling `--quick` of `--small` is used.
pub const QUICK_NOTE: &str =
    "note: bench's --quick is now --small (the old spelling is accepted for one release)";

const DEFAULT_DIR: &str = "tests/data/gw100";

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
        let j = serde_json::json!({
            "workload": "integrals",
            "classes": classes,
            "molecules": mols.iter().map(|(f, b, t)| serde_json::json!({"file": f, "basis": b, "timing": t})).collect::<Vec<_>>(),
        });
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
