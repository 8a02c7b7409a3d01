//! `--vibronic` of `bandcast ionize` and `bandcast spectrum`: the bands with their
//! vibrational structure (`bandcast::vibronic::band`), printed by `report::vibronic`.
//! Before any work: the cost estimate (`vibronic::plan`) and the memory refusal (exit 2);
//! during the run: one progress bar per stage on a terminal.

use std::io::IsTerminal;
use std::path::Path;
use std::time::Instant;

use bandcast::chem::Molecule;
use bandcast::report::html::vibronic_page;
use bandcast::report::vibronic::{
    bands_table, curve_window, spectrum_svg, spectrum_text, vibronic_curve, BandsJson,
    DEFAULT_VIBRONIC_FWHM_EV, VIBRONIC_GUIDANCE,
};
use bandcast::report::write_atomic;
use bandcast::system::format_bytes;
use bandcast::vibronic::band::{vibronic_bands_with_progress, BandOptions, Neutral, VibronicBand};
use bandcast::vibronic::composite::apply_correlated_vertical;
use bandcast::vibronic::plan::{check_memory, estimate, Stage, VibronicEstimate};
use bandcast::{Error, Result};

use super::common::print_json;

/// Bands when `--count` is not given.
pub const DEFAULT_COUNT: usize = 3;

/// The settings shared by both commands.
#[derive(Debug, Clone)]
pub struct Settings<'a> {
    pub basis: &'a str,
    pub count: Option<usize>,
    /// Kelvin; 0 = the neutral in v = 0 only.
    pub temperature_k: f64,
    /// Basis of the correlated vertical energies (default: `basis`).
    pub vertical_basis: Option<&'a str>,
    /// GiB (None: the machine's default budget).
    pub memory_gib: Option<f64>,
    pub verbose: bool,
}

impl Settings<'_> {
    fn memory_bytes(&self) -> Result<usize> {
        match self.memory_gib {
            Some(g) if !(g.is_finite() && g > 0.0) => Err(Error::input(format!(
                "--memory {g}: the budget must be a positive number of GiB"
            ))),
            Some(g) => Ok((g * (1u64 << 30) as f64) as usize),
            None => Ok(bandcast::system::default_memory_budget()),
        }
    }
}

/// Progress on stderr: a bar per stage on a terminal, one line per stage with --verbose
/// otherwise; the time estimate once the neutral's first gradient is timed.
struct Progress {
    bar: Option<indicatif::ProgressBar>,
    verbose: bool,
    started: Instant,
    estimate: VibronicEstimate,
    said_estimate: bool,
    stage: String,
}

impl Progress {
    fn new(estimate: VibronicEstimate, verbose: bool) -> Self {
        Progress {
            bar: None,
            verbose,
            started: Instant::now(),
            estimate,
            said_estimate: false,
            stage: String::new(),
        }
    }

    fn set(&mut self, name: String, pos: u64, len: Option<u64>) {
        if name != self.stage {
            if let Some(b) = self.bar.take() {
                b.finish_and_clear();
            }
            if self.verbose {
                eprintln!(
                    "vibronic: {name} (at {:.1} s)",
                    self.started.elapsed().as_secs_f64()
                );
            }
            if std::io::stderr().is_terminal() {
                let b = match len {
                    Some(l) => {
                        let b = indicatif::ProgressBar::new(l);
                        b.set_style(
                            indicatif::ProgressStyle::with_template(
                                "{msg} [{bar:30}] {pos}/{len} gradients, {eta} left",
                            )
                            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
                        );
                        b
                    }
                    None => {
                        let b = indicatif::ProgressBar::new_spinner();
                        b.set_style(
                            indicatif::ProgressStyle::with_template(if name.ends_with("step") {
                                "{spinner} {msg} {pos}"
                            } else {
                                "{spinner} {msg}"
                            })
                            .unwrap_or_else(|_| indicatif::ProgressStyle::default_spinner()),
                        );
                        b
                    }
                };
                b.set_message(name.clone());
                self.bar = Some(b);
            }
            self.stage = name;
        }
        if let Some(b) = &self.bar {
            b.set_position(pos);
        }
    }

    fn stage(&mut self, s: Stage) {
        let band = |b: usize, n: usize| format!("band {} of {n}", b + 1);
        match s {
            Stage::NeutralOptimisation { step } => {
                if step == 0 && !self.said_estimate {
                    self.said_estimate = true;
                    let per = self.started.elapsed().as_secs_f64();
                    let msg = format!(
                        "vibronic: the first gradient took {per:.2} s; about {} gradients in \
                         all: roughly {} (an upper-side guess: later gradients start from a \
                         converged guess)",
                        self.estimate.gradients(),
                        duration(self.estimate.seconds(per))
                    );
                    if let Some(b) = &self.bar {
                        b.println(&msg);
                    } else {
                        eprintln!("{msg}");
                    }
                }
                self.set("neutral: optimisation, step".into(), step as u64, None)
            }
            Stage::NeutralHessian { done, total } => {
                self.set("neutral: Hessian".into(), done as u64, Some(total as u64))
            }
            Stage::IonVertical { band: b, bands } => self.set(
                format!("{}: cation at the neutral's minimum", band(b, bands)),
                0,
                None,
            ),
            Stage::IonOptimisation {
                band: b,
                bands,
                step,
            } => self.set(
                format!("{}: cation optimisation, step", band(b, bands)),
                step as u64,
                None,
            ),
            Stage::IonHessian {
                band: b,
                bands,
                done,
                total,
            } => self.set(
                format!("{}: cation Hessian", band(b, bands)),
                done as u64,
                Some(total as u64),
            ),
            Stage::FranckCondon { band: b, bands } => {
                self.set(format!("{}: Franck–Condon sum", band(b, bands)), 0, None)
            }
        }
    }

    fn finish(&mut self) {
        if let Some(b) = self.bar.take() {
            b.finish_and_clear();
        }
    }
}

fn duration(s: f64) -> String {
    if s < 90.0 {
        format!("{s:.0} s")
    } else if s < 5400.0 {
        format!("{:.0} min", s / 60.0)
    } else {
        format!("{:.1} h", s / 3600.0)
    }
}

/// The vibronic bands of `mol` with the cost estimate, memory refusal and progress of every
/// command that computes them (ionize, spectrum, assign).
pub fn compute(mol: &Molecule, set: &Settings) -> Result<(Neutral, Vec<VibronicBand>)> {
    let n = set.count.unwrap_or(DEFAULT_COUNT);
    if n == 0 {
        return Err(Error::input("--count must be at least 1"));
    }
    let opts = BandOptions::default().with_temperature(set.temperature_k)?;
    let memory = set.memory_bytes()?;
    if let Some(vb) = set.vertical_basis {
        // load it now so that a wrong name fails before any work
        bandcast::basis::load(vb, mol, None)?;
    }
    let est = estimate(mol, set.basis, n, &opts.fc)?;
    check_memory(&est, memory as f64)?;
    eprintln!(
        "vibronic: {} cation state(s) of {} ({} atoms, {} basis functions): neutral and cation \
         optimisations and Hessians, about {} gradients ({} for the Hessians, {} assumed for \
         the optimisations); peak memory about {} of {}{}",
        n,
        if mol.name.is_empty() {
            "the molecule"
        } else {
            &mol.name
        },
        est.atoms,
        est.basis_functions,
        est.gradients(),
        est.hessian_gradients,
        est.optimisation_gradients,
        format_bytes(est.peak_bytes),
        format_bytes(memory as f64),
        if set.temperature_k > 0.0 {
            format!("; neutral's levels populated at {} K", set.temperature_k)
        } else {
            String::new()
        }
    );
    let mut progress = Progress::new(est, set.verbose);
    let result = vibronic_bands_with_progress(mol, set.basis, n, &opts, &mut |s| progress.stage(s));
    progress.finish();
    let (neutral, mut bands) = result?;
    // best positions the molecule affords: correlated vertical + HF relaxation
    let t = Instant::now();
    if let Err(e) = apply_correlated_vertical(
        &neutral,
        set.vertical_basis.unwrap_or(set.basis),
        &mut bands,
        memory,
    ) {
        eprintln!("note: the correlated vertical energies failed ({e}); positions are HF ΔSCF");
    }
    if set.verbose {
        eprintln!(
            "vibronic: correlated vertical energies {:.1} s; total {:.1} s",
            t.elapsed().as_secs_f64(),
            progress.started.elapsed().as_secs_f64()
        );
    }
    Ok((neutral, bands))
}

fn name(mol: &Molecule, file: &Path) -> String {
    if mol.name.is_empty() {
        file.display().to_string()
    } else {
        mol.name.clone()
    }
}

/// `bandcast ionize FILE --basis B --vibronic [--count N] [--temperature K] [--json]`.
pub fn ionize(mol: &Molecule, file: &Path, set: &Settings, json: bool) -> Result<()> {
    let (n, bands) = compute(mol, set)?;
    let name = name(mol, file);
    if json {
        return print_json(&BandsJson {
            molecule: &name,
            basis: set.basis,
            electronic_method: bandcast::report::vibronic::electronic(&bands),
            neutral_point_group: &n.point_group,
            temperature_k: set.temperature_k,
            bands: &bands,
            curve: None,
            note: VIBRONIC_GUIDANCE,
        });
    }
    print!(
        "{}",
        bands_table(&name, set.basis, &n.point_group, set.temperature_k, &bands)
    );
    Ok(())
}

/// Files `spectrum --vibronic` may write.
#[derive(Debug, Clone, Copy, Default)]
pub struct Outputs<'a> {
    pub svg: Option<&'a Path>,
    pub csv: Option<&'a Path>,
    pub html: Option<&'a Path>,
}

/// `bandcast spectrum FILE --basis B --vibronic [--fwhm EV] [--window LO:HI] [--svg] [--csv]
/// [--html] [--json]`.
pub fn spectrum(
    mol: &Molecule,
    file: &Path,
    set: &Settings,
    fwhm: Option<f64>,
    window: Option<(f64, f64)>,
    out: Outputs,
    json: bool,
) -> Result<()> {
    let (n, bands) = compute(mol, set)?;
    let name = name(mol, file);
    let fwhm = fwhm.unwrap_or(DEFAULT_VIBRONIC_FWHM_EV);
    let (lo, hi) = curve_window(&bands, fwhm, window);
    let curve = vibronic_curve(&bands, fwhm, lo, hi);
    if let Some(p) = out.svg {
        write_atomic(p, spectrum_svg(&name, &bands, &curve).as_bytes())?;
    }
    if let Some(p) = out.csv {
        let c: Vec<(f64, f64)> = curve
            .energy_ev
            .iter()
            .copied()
            .zip(curve.intensity.iter().copied())
            .collect();
        write_atomic(p, curve_csv_pairs(&c).as_bytes())?;
    }
    if let Some(p) = out.html {
        write_atomic(
            p,
            vibronic_page(
                &name,
                set.basis,
                &n.point_group,
                set.temperature_k,
                &bands,
                &curve,
            )
            .as_bytes(),
        )?;
    }
    if json {
        return print_json(&BandsJson {
            molecule: &name,
            basis: set.basis,
            electronic_method: bandcast::report::vibronic::electronic(&bands),
            neutral_point_group: &n.point_group,
            temperature_k: set.temperature_k,
            bands: &bands,
            curve: Some(curve),
            note: VIBRONIC_GUIDANCE,
        });
    }
    print!("{}", spectrum_text(&name, &bands, &curve));
    Ok(())
}

fn curve_csv_pairs(c: &[(f64, f64)]) -> String {
    let mut s = String::from("energy_ev,intensity\n");
    for (e, i) in c {
        s.push_str(&format!("{e:.6},{i:.6e}\n"));
    }
    s
}
