//! The command line: one file per subcommand, shared argument groups in `common`, the
//! top-level parser and dispatch here. It lives in the library so that the binary
//! (`src/main.rs`) and the Python module call the same code: `run` for the binary,
//! `run_capturing_json` for callers that want a command's `--json` output as a string.
pub mod assign;
pub mod basis;
pub mod batch;
pub mod bench;
pub mod common;
pub mod core;
pub mod geometry_common;
pub mod ionize;
pub mod optimize;
pub mod output;
pub mod scf;
pub mod spectrum;
pub mod vibrations;
pub mod vibronic;

use clap::{Parser, Subcommand};

use crate::Result;

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
pub struct Cli {
    /// Worker threads (default: all cores).
    #[arg(long, global = true, value_name = "N")]
    pub threads: Option<usize>,
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Subcommand)]
pub enum Command {
    /// Hartree–Fock ground state: energy, its parts, orbital table, dipole.
    Scf(scf::Args),
    /// Valence ionization energies, labelled bands (Koopmans, ΔSCF, EP2, EOM-IP).
    Ionize(ionize::Args),
    /// Core-level (1s) binding energies and chemical shifts by ΔSCF with a localized hole.
    Core(core::Args),
    /// A broadened photoelectron spectrum for a photon source (SVG, CSV, JSON).
    Spectrum(spectrum::Args),
    /// Align a prediction with a measured spectrum and say which band is which.
    Assign(assign::Args),
    /// Minimum-energy structure of a molecule or of an ion state (analytic HF gradients).
    Optimize(optimize::Args),
    /// Harmonic wavenumbers, normal modes and zero-point energy (HF Hessian).
    Vibrations(vibrations::Args),
    /// List the bundled basis sets and the elements each defines.
    Basis(basis::Args),
    /// Performance workloads (integrals, SCF, correlated methods).
    Bench(bench::Args),
    /// Run ionize, core or spectrum over many molecules (a manifest or an SD file), in shards.
    Batch(batch::Args),
}

impl Command {
    /// Whether the subcommand was asked for JSON output (`--json`).
    pub fn wants_json(&self) -> bool {
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

/// Run a parsed command line (threads already set by the caller).
pub fn run(cli: Cli) -> Result<()> {
    match cli.command {
        Command::Scf(a) => scf::run(a),
        Command::Ionize(a) => ionize::run(a),
        Command::Core(a) => core::run(a),
        Command::Spectrum(a) => spectrum::run(a),
        Command::Assign(a) => assign::run(a),
        Command::Optimize(a) => optimize::run(a),
        Command::Vibrations(a) => vibrations::run(a),
        Command::Basis(a) => basis::run(a),
        Command::Bench(a) => bench::run(a),
        Command::Batch(a) => batch::run(a),
    }
}

/// Parse `args` (without the program name) as the command line would and run the command,
/// returning what it prints as JSON on stdout instead of printing it. Bad arguments are an
/// input error with clap's message. `--json` must be among the arguments.
pub fn run_capturing_json(args: &[String]) -> Result<String> {
    let argv = std::iter::once("bandcast".to_string()).chain(args.iter().cloned());
    let cli = Cli::try_parse_from(argv).map_err(|e| {
        let msg = e.to_string();
        crate::Error::input(msg.trim().trim_start_matches("error: ").to_string())
    })?;
    output::capture(|| run(cli))
}
