//! Argument groups and helpers shared by several subcommands.

use std::path::{Path, PathBuf};

use bandcast::chem::structure::read_one;
use bandcast::chem::xyz::LengthUnit;
use bandcast::chem::Molecule;
use bandcast::ionization::Region;
use bandcast::predict::{predict, MethodChoice, Prediction, Progress, Request, RequestOptions};
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::{Error, Result};

/// The molecule: an XYZ file plus charge and multiplicity.
#[derive(clap::Args, Debug, Clone)]
pub struct MoleculeArgs {
    /// Structure: XYZ (Å unless --bohr), MOL or SD file (record K of an SD file as FILE#K).
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
    #[command(flatten)]
    pub state: StateArgs,
}

/// Charge, multiplicity and length unit, for commands that take several files.
#[derive(clap::Args, Debug, Clone)]
pub struct StateArgs {
    /// Coordinates in the file are in bohr, not Å.
    #[arg(long)]
    pub bohr: bool,
    /// Total charge of the molecule (default: the charge a MOL/SD file writes, else 0).
    #[arg(long, allow_hyphen_values = true)]
    pub charge: Option<i32>,
    /// Spin multiplicity 2S+1 (default: from a MOL/SD file's radical marks, else 1 for an
    /// even electron count and 2 for odd).
    #[arg(long, value_name = "M")]
    pub multiplicity: Option<u32>,
}

impl StateArgs {
    pub fn load(&self, path: &Path) -> Result<Molecule> {
        let unit = if self.bohr {
            LengthUnit::Bohr
        } else {
            LengthUnit::Angstrom
        };
        let record = read_one(path, unit)?;
        let charge = self.charge.or(record.charge).unwrap_or(0);
        let m = record.molecule;
        let nel = m.nuclear_charge() - charge as i64;
        // the file's radical marks describe the file's charge state only
        let from_file = record
            .multiplicity
            .filter(|_| self.charge.is_none() || self.charge == record.charge);
        let mult = self
            .multiplicity
            .or(from_file)
            .unwrap_or(if nel.rem_euclid(2) == 0 { 1 } else { 2 });
        m.with_charge_multiplicity(charge, mult)
            .map_err(|e| match e {
                bandcast::Error::Input {
                    file: None,
                    line: None,
                    message,
                } => bandcast::Error::input_at(path, None, message),
                other => other,
            })
    }
}

impl MoleculeArgs {
    pub fn load(&self) -> Result<Molecule> {
        self.state.load(&self.file)
    }
}

/// `--vibronic` and its options, the same in `ionize`, `spectrum` and `assign` (the work is
/// cli/vibronic.rs). Each command says in its own help what `--vibronic` does there
/// (`mut_arg` on its Args); the other options mean the same everywhere.
#[derive(clap::Args, Debug, Clone)]
pub struct VibronicArgs {
    /// Vibrational structure of the lowest bands (harmonic Franck–Condon with Duschinsky
    /// rotation).
    #[arg(long)]
    pub vibronic: bool,
    /// Number of bands with --vibronic (default 3).
    #[arg(long, value_name = "N", requires = "vibronic")]
    pub vibronic_count: Option<usize>,
    /// With --vibronic: populate the neutral's vibrational levels at this temperature in
    /// kelvin (Boltzmann), adding hot-band lines below the 0–0 line. Default 0 K: the
    /// neutral in its lowest level only (a cold jet, or a good approximation at room
    /// temperature when every mode lies well above kT ≈ 208 cm⁻¹).
    #[arg(long, value_name = "K", requires = "vibronic")]
    pub temperature: Option<f64>,
    /// With --vibronic: basis of the correlated vertical energies (default: --basis). The
    /// lone-pair IEs of first-row molecules need diffuse functions: water's 1b1 in cc-pVDZ
    /// is 0.8 eV below aug-cc-pVTZ (docs/vibronic-bands.md).
    #[arg(long, value_name = "NAME", requires = "vibronic")]
    pub vertical_basis: Option<String>,
}

impl VibronicArgs {
    /// The run's settings: `basis` and the memory budget are the command's own, `count` the
    /// command's band count when it has one (ionize's `--count`), else `--vibronic-count`.
    pub fn settings<'a>(
        &'a self,
        basis: &'a str,
        count: Option<usize>,
        memory_gib: Option<f64>,
        verbose: bool,
    ) -> super::vibronic::Settings<'a> {
        super::vibronic::Settings {
            basis,
            count: self.vibronic_count.or(count),
            temperature_k: self.temperature.unwrap_or(0.0),
            vertical_basis: self.vertical_basis.as_deref(),
            memory_gib,
            verbose,
        }
    }
}

/// What every command that predicts bands asks: basis, region, method and their options.
/// The work is `bandcast::predict::predict`.
#[derive(clap::Args, Debug, Clone)]
pub struct PredictArgs {
    /// Basis set (name from `bandcast basis` or a path).
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// Ionization method. Valence: koopmans | dscf | ep2 | eom-ccsd | eom-mp2 (default for
    /// closed shells: the most accurate that fits — eom-ccsd up to 300 basis functions,
    /// eom-mp2 up to 450, ep2 beyond, within --memory; dscf for open shells). Core: dscf
    /// (default) | dmp2.
    #[arg(long, value_name = "METHOD")]
    pub method: Option<String>,
    /// Valence bands (UPS) or core levels (XPS).
    #[arg(long, value_name = "valence|core", default_value = "valence", value_parser = parse_region)]
    pub region: Region,
    /// Core levels of one element only, e.g. `--element C` (default: every heavy atom).
    #[arg(long, value_name = "SYMBOL", value_parser = parse_element_arg)]
    pub element: Option<u32>,
    /// Core levels: keep the first SCF start that holds the hole (faster, less safe).
    #[arg(long)]
    pub quick: bool,
    /// Memory in GiB for the valence correlated stages; it also decides the default method
    /// (default: half of the machine's memory, at most three quarters of what is available).
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Say on stderr which method runs, its notes, and the core holes as they finish.
    #[arg(long)]
    pub verbose: bool,
}

impl PredictArgs {
    /// Check the options that need no computation (before any work starts).
    pub fn check(&self) -> Result<()> {
        self.memory_bytes()?;
        MethodChoice::parse(self.region, self.method.as_deref())?;
        Ok(())
    }

    fn memory_bytes(&self) -> Result<Option<usize>> {
        memory_gib_to_bytes(self.memory)
    }

    /// Load the basis for `mol`, predict its bands, and (with --verbose) say on stderr what ran.
    pub fn predict(&self, mol: &Molecule) -> Result<Prediction> {
        self.predict_for(mol, None)
    }

    /// As `predict`, for photons of `photon_ev` (core levels: the shell each atom gets).
    pub fn predict_for(&self, mol: &Molecule, photon_ev: Option<f64>) -> Result<Prediction> {
        let basis = bandcast::basis::load(&self.basis, mol, None)?;
        let request = Request {
            molecule: mol,
            basis: &basis,
            region: self.region,
            method: MethodChoice::parse(self.region, self.method.as_deref())?,
            options: RequestOptions {
                element: self.element,
                quick: self.quick,
                memory_bytes: self.memory_bytes()?,
                photon_ev,
                ..RequestOptions::default()
            },
        };
        let verbose = self.verbose;
        if verbose {
            print_estimates(
                &mol.name,
                &bandcast::predict::memory_estimates(&request)?,
                request.memory_bytes() as f64,
            );
        }
        let started = std::time::Instant::now();
        let p = predict(&request, &|event| {
            if verbose {
                match event {
                    Progress::CoreHoles { done, total } => {
                        eprintln!("{}: core hole {done} of {total} done", mol.name)
                    }
                }
            }
        })?;
        if verbose {
            eprintln!(
                "{}: {} / {} ({} basis functions), {:.1} s",
                mol.name,
                p.method,
                p.basis,
                p.n_basis,
                started.elapsed().as_secs_f64()
            );
            for n in &p.notes {
                eprintln!("{}: note: {n}", mol.name);
            }
        }
        Ok(p)
    }
}

pub fn parse_region(s: &str) -> std::result::Result<Region, String> {
    match s.to_ascii_lowercase().as_str() {
        "valence" => Ok(Region::Valence),
        "core" => Ok(Region::Core),
        _ => Err(format!("'{s}' is not valence or core")),
    }
}

pub fn parse_element_arg(s: &str) -> std::result::Result<u32, String> {
    bandcast::chem::elements::parse_element(s)
        .ok_or_else(|| format!("'{s}' is not an element symbol"))
}

/// `--fno PERCENT`: the percentage of the MP2 virtual population the frozen natural
/// orbitals keep, returned as a fraction.
pub fn parse_fno(s: &str) -> std::result::Result<f64, String> {
    let x: f64 = s
        .trim()
        .trim_end_matches('%')
        .parse()
        .map_err(|_| format!("'{s}' is not a percentage (e.g. 99.5)"))?;
    if !(x > 0.0 && x <= 100.0) {
        return Err(format!(
            "'{s}': the kept share of the virtual population must be above 0 and at most 100 \
             per cent (99.5 is a common choice)"
        ));
    }
    Ok(x / 100.0)
}

pub fn parse_photon(s: &str) -> std::result::Result<Photon, String> {
    Photon::parse(s)
}

pub fn parse_axis(s: &str) -> std::result::Result<Axis, String> {
    Axis::parse(s).ok_or_else(|| format!("'{s}' is not binding or kinetic"))
}

/// `--window LO:HI` or `--window HI` (= 0:HI): an energy range in eV.
pub fn parse_window(s: &str) -> std::result::Result<(f64, f64), String> {
    let num = |t: &str| -> std::result::Result<f64, String> {
        t.trim()
            .parse::<f64>()
            .map_err(|_| format!("'{t}' is not a number"))
    };
    let (lo, hi) = match s.split_once(':') {
        Some((a, b)) => (num(a)?, num(b)?),
        None => (0.0, num(s)?),
    };
    if !(lo.is_finite() && hi.is_finite() && hi > lo) {
        return Err(format!(
            "window '{s}' needs LO < HI (LO:HI, or HI for 0:HI, in eV)"
        ));
    }
    Ok((lo, hi))
}

/// Check an instrument width given with --fwhm.
pub fn check_fwhm(v: Option<f64>) -> Result<Option<f64>> {
    match v {
        Some(f) if !(f.is_finite() && f > 0.0 && f < 100.0) => Err(Error::input(format!(
            "--fwhm {f}: a width must be a positive number of eV below 100"
        ))),
        other => Ok(other),
    }
}

/// Refuse an output path whose folder does not exist before any computation starts.
pub fn check_output_dir(path: Option<&Path>) -> Result<()> {
    if let Some(p) = path {
        let dir = p
            .parent()
            .filter(|d| !d.as_os_str().is_empty())
            .unwrap_or(Path::new("."));
        if !dir.is_dir() {
            return Err(Error::input_at(
                p,
                None,
                "the folder for this output file does not exist",
            ));
        }
    }
    Ok(())
}

/// `--verbose`: each stage's memory estimate (made before any work) on stderr, in GiB.
/// `--memory GIB` (one unit in every command) as bytes; None when not given.
pub fn memory_gib_to_bytes(gib: Option<f64>) -> Result<Option<usize>> {
    match gib {
        Some(g) if !(g.is_finite() && g > 0.0) => Err(Error::input(format!(
            "--memory {g}: the budget must be a positive number of GiB"
        ))),
        Some(g) => Ok(Some((g * (1u64 << 30) as f64) as usize)),
        None => Ok(None),
    }
}

/// Refuse (exit 2) before any work when a stage that must run does not fit the budget.
pub fn refuse_if_over(
    name: &str,
    estimates: &[bandcast::system::StageEstimate],
    budget: f64,
    cheaper: &str,
) -> Result<()> {
    if let Some(e) = estimates.iter().find(|e| !e.optional && e.bytes > budget) {
        return Err(Error::TooLarge(format!(
            "{name}: {} needs about {}, more than the memory budget of {}; {cheaper}",
            e.stage,
            bandcast::system::format_gib(e.bytes),
            bandcast::system::format_gib(budget)
        )));
    }
    Ok(())
}

pub fn print_estimates(name: &str, estimates: &[bandcast::system::StageEstimate], budget: f64) {
    eprintln!(
        "{name}: memory estimates before any work (budget {}):",
        bandcast::system::format_gib(budget)
    );
    for e in estimates {
        eprintln!("  {e}");
    }
}

/// Print a printer's JSON text on stdout.
pub fn print_json<T: serde::Serialize>(value: &T) -> Result<()> {
    super::output::emit_json(&bandcast::report::json::to_pretty(value)?);
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(args: &[&str]) -> std::result::Result<super::super::Cli, clap::Error> {
        use clap::Parser;
        super::super::Cli::try_parse_from(std::iter::once("bandcast").chain(args.iter().copied()))
    }

    /// The vibronic options are one group in ionize, spectrum and assign: same names, same
    /// defaults (3 bands, 0 K, --basis), and `--vibronic` required by each (regression test of
    /// the argument definitions; clap's own consistency check included).
    #[test]
    fn vibronic_options_are_one_group_in_three_commands() {
        use super::super::Command;
        use clap::CommandFactory;
        super::super::Cli::command().debug_assert();
        let tail = [
            "--vibronic-count",
            "2",
            "--temperature",
            "300",
            "--vertical-basis",
            "B2",
        ];
        let runs: [&[&str]; 3] = [
            &["ionize", "m.xyz", "--basis", "B", "--vibronic"],
            &[
                "spectrum",
                "m.xyz",
                "--basis",
                "B",
                "--photon",
                "he1",
                "--vibronic",
            ],
            &[
                "assign",
                "m.xyz",
                "--basis",
                "B",
                "--measured",
                "t.txt",
                "--vibronic",
            ],
        ];
        for head in runs {
            let v = |cli: super::super::Cli| match cli.command {
                Command::Ionize(a) => a.vibronic,
                Command::Spectrum(a) => a.vibronic,
                Command::Assign(a) => a.vibronic,
                _ => unreachable!(),
            };
            let full: Vec<&str> = head.iter().chain(tail.iter()).copied().collect();
            let set = v(parse(&full).unwrap());
            let s = set.settings("B", None, None, false);
            assert_eq!(
                (s.count, s.temperature_k, s.vertical_basis),
                (Some(2), 300.0, Some("B2"))
            );
            // defaults: count left to cli/vibronic.rs (3), 0 K, the vertical basis = --basis
            let set = v(parse(head).unwrap());
            let s = set.settings("B", None, None, false);
            assert_eq!(
                (s.count, s.temperature_k, s.vertical_basis),
                (None, 0.0, None)
            );
            // the options need --vibronic
            let without: Vec<&str> = head[..head.len() - 1]
                .iter()
                .chain(["--temperature", "5"].iter())
                .copied()
                .collect();
            assert!(parse(&without).is_err(), "{without:?}");
        }
        // ionize: --count gives the vibronic band count too; not both
        let ionize = |more: &[&str]| {
            let mut v = vec!["ionize", "m.xyz", "--basis", "B", "--vibronic"];
            v.extend_from_slice(more);
            parse(&v)
        };
        let Command::Ionize(a) = ionize(&["--count", "4"]).unwrap().command else {
            unreachable!()
        };
        assert_eq!(
            a.vibronic.settings("B", a.count, None, false).count,
            Some(4)
        );
        assert!(ionize(&["--count", "4", "--vibronic-count", "2"]).is_err());
        assert!(ionize(&["--method", "ep2"]).is_err());
    }

    #[test]
    fn window_is_lo_hi_or_hi() {
        assert_eq!(parse_window("284:296"), Ok((284.0, 296.0)));
        // `--window HI` means 0:HI (RULES.md option vocabulary)
        assert_eq!(parse_window("21.2"), Ok((0.0, 21.2)));
        assert!(parse_window("296:284").is_err());
        assert!(parse_window("a:3").is_err());
        assert!(parse_window("0").is_err());
    }
}
