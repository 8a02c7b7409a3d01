//! The `bandcast` command: argument parsing and printing only; the work is in the library.

mod cli;

use clap::{Parser, Subcommand};

/// Predict photoelectron spectra (UPS valence bands, XPS core levels) from first principles,
/// and assign measured ones.
///
/// Typical flow: `bandcast scf` to check the Hartree–Fock reference, `bandcast ionize` for
/// valence bands with labels, `bandcast core` for 1s binding energies and shifts,
/// `bandcast spectrum` for a broadened spectrum for a photon source, `bandcast assign` to
/// match a measured trace. Energies are printed in eV; geometries are read in Å.
///
/// Predictions guide a measurement; they do not replace it. Instrument and radiation
/// safety follow your local rules, whatever a number here suggests.
#[derive(Parser)]
#[command(
    name = "bandcast",
    version,
    about,
    long_about,
    propagate_version = true
)]
struct Cli {
    /// Worker threads (default: all cores).
    #[arg(long, global = true, value_name = "N")]
    threads: Option<usize>,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Hartree–Fock ground state: energy, its parts, orbital table, dipole.
    Scf(cli::scf::Args),
    /// Valence ionization energies, labelled bands (Koopmans, ΔSCF, EP2, EOM-IP).
    Ionize(cli::ionize::Args),
    /// Core-level (1s) binding energies and chemical shifts by ΔSCF with a localised hole.
    Core(cli::core::Args),
    /// A broadened photoelectron spectrum for a photon source (SVG, CSV, JSON).
    Spectrum(cli::spectrum::Args),
    /// Align a prediction with a measured spectrum and say which band is which.
    Assign(cli::assign::Args),
    /// Minimum-energy structure of a molecule or of an ion state (analytic HF gradients).
    Optimize(cli::optimize::Args),
    /// Harmonic wavenumbers, normal modes and zero-point energy (HF Hessian).
    Vibrations(cli::vibrations::Args),
    /// List the bundled basis sets and the elements each defines.
    Basis(cli::basis::Args),
    /// Performance workloads (integrals, SCF, correlated methods).
    Bench(cli::bench::Args),
    /// Run ionize, core or spectrum over many molecules (a manifest or an SD file), in shards.
    Batch(cli::batch::Args),
}

fn main() {
    let cli = Cli::parse();
    if let Some(n) = cli.threads {
        if n == 0 {
            eprintln!("error: --threads must be at least 1");
            std::process::exit(2);
        }
        let _ = rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build_global();
    }
    let json = cli.command.wants_json();
    let result = match cli.command {
        Command::Scf(a) => cli::scf::run(a),
        Command::Ionize(a) => cli::ionize::run(a),
        Command::Core(a) => cli::core::run(a),
        Command::Spectrum(a) => cli::spectrum::run(a),
        Command::Assign(a) => cli::assign::run(a),
        Command::Optimize(a) => cli::optimize::run(a),
        Command::Vibrations(a) => cli::vibrations::run(a),
        Command::Basis(a) => cli::basis::run(a),
        Command::Bench(a) => cli::bench::run(a),
        Command::Batch(a) => cli::batch::run(a),
    };
    if let Err(e) = result {
        fail(&e, json);
    }
}

impl Command {
    /// Whether the subcommand was asked for JSON output (`--json`).
    fn wants_json(&self) -> bool {
        match self {
            Command::Scf(a) => a.json,
            Command::Ionize(a) => a.json,
            Command::Core(a) => a.json,
            Command::Spectrum(a) => a.json,
            Command::Assign(a) => a.json,
            Command::Optimize(a) => a.json,
            Command::Vibrations(a) => a.json,
            Command::Batch(a) => a.json,
            Command::Basis(_) | Command::Bench(_) => false,
        }
    }
}

/// Report a failure: the message on stderr, and with `--json` also one JSON object on stdout;
/// then exit with the error's code.
fn fail(err: &bandcast::Error, json: bool) -> ! {
    eprintln!("error: {err}");
    if json {
        println!("{}", err.to_json());
    }
    std::process::exit(err.exit_code());
}
