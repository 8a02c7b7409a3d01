//! `bandcast assign`: align a predicted spectrum with a measured one and say which band is
//! which. Arguments and dispatch only: the bands come from `bandcast::predict`, the
//! assignment from `spectrum::assignment`, the output from `report` (text table or `--json`
//! on stdout, `--html` file).

use std::path::{Path, PathBuf};

use bandcast::report::html::assignment_page;
use bandcast::report::json::AssignJson;
use bandcast::report::runs::AssignRun;
use bandcast::report::text::assignment_table;
use bandcast::report::write_atomic;
use bandcast::spectrum::assignment::{assign_bands, AssignmentOptions};
use bandcast::spectrum::measured::read_measured;
use bandcast::spectrum::note::Note;
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::{Error, Result};

use super::common::{
    check_fwhm, check_output_dir, parse_axis, parse_photon, print_json, MoleculeArgs, PredictArgs,
};

#[derive(clap::Args, Debug)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    #[command(flatten)]
    pub predict: PredictArgs,
    /// Measured spectrum: two columns (energy in eV, intensity), text or CSV.
    #[arg(long, value_name = "DATA")]
    pub measured: PathBuf,
    /// Energy scale of the measured file.
    #[arg(long, value_name = "binding|kinetic", default_value = "binding", value_parser = parse_axis)]
    pub measured_axis: Axis,
    /// Photon source of the measurement (needed for a kinetic-energy file; bands it cannot
    /// reach are left out).
    #[arg(long, value_name = "he1|he2|mgka|alka|ENERGY_EV", value_parser = parse_photon)]
    pub photon: Option<Photon>,
    /// Fit a linear scale as well as a shift (needs three assigned peaks or more).
    #[arg(long)]
    pub fit_scale: bool,
    /// Instrument Gaussian FWHM of the bands in eV (default: 0.3 valence, 0.9 core, or the
    /// source's own); it also sets the smoothing window of the measured trace.
    #[arg(long, value_name = "EV")]
    pub fwhm: Option<f64>,
    /// Smallest peak prominence, as a fraction of the trace's range (default 0.05).
    #[arg(long, value_name = "FRACTION")]
    pub prominence: Option<f64>,
    /// Largest residual (eV) of an assigned pair (default 1.5 valence, 2 core).
    #[arg(long, value_name = "EV")]
    pub max_residual: Option<f64>,
    /// Largest global shift searched (eV; default 6 valence, 25 core).
    #[arg(long, value_name = "EV")]
    pub max_shift: Option<f64>,
    /// Print the result as JSON on stdout.
    #[arg(long)]
    pub json: bool,
    /// Write a self-contained HTML report.
    #[arg(long, value_name = "OUT.html")]
    pub html: Option<PathBuf>,
}

fn positive(name: &str, v: Option<f64>) -> Result<Option<f64>> {
    match v {
        Some(x) if !(x.is_finite() && x > 0.0) => Err(Error::input(format!(
            "{name} {x}: must be a positive number"
        ))),
        o => Ok(o),
    }
}

/// Which option changes what a note is about.
fn hint(n: &Note) -> Option<String> {
    match n {
        Note::ShiftAtSearchEdge { .. } => Some("(--max-shift)".into()),
        _ => None,
    }
}

pub fn run(args: Args) -> Result<()> {
    let fwhm = check_fwhm(args.fwhm)?;
    check_output_dir(args.html.as_deref())?;
    let prominence = positive("--prominence", args.prominence)?;
    if prominence.is_some_and(|p| p >= 1.0) {
        return Err(Error::input(
            "--prominence is a fraction of the trace's range, below 1",
        ));
    }
    let max_residual = positive("--max-residual", args.max_residual)?;
    let max_shift = positive("--max-shift", args.max_shift)?;
    args.predict.check()?;
    // The measured file first: a malformed file is reported before any computation.
    let mut measured = read_measured(&args.measured)?;
    if args.measured_axis == Axis::Kinetic {
        let Some(p) = args.photon else {
            return Err(Error::input(
                "--measured-axis kinetic needs --photon to convert to binding energy",
            ));
        };
        measured = measured.kinetic_to_binding(p.energy_ev());
    }
    let mol = args.molecule.load()?;
    let prediction = args.predict.predict(&mol)?;
    let opts = AssignmentOptions {
        region: args.predict.region,
        photon: args.photon,
        fwhm_ev: fwhm,
        min_prominence: prominence,
        max_residual_ev: max_residual,
        max_shift_ev: max_shift,
        fit_scale: args.fit_scale,
    };
    let mut assignment = assign_bands(&prediction.bands, &measured, &opts)?;
    assignment
        .comparison
        .notes
        .extend(Note::from_prediction(&prediction));
    let run = AssignRun {
        assignment: &assignment,
        molecule: mol.name.clone(),
        method: prediction.method.clone(),
        basis: args.predict.basis.clone(),
        region: args.predict.region,
        photon: args.photon,
        measured_file: args.measured.display().to_string(),
        measured_comment: first_comment(&args.measured),
    };
    if let Some(path) = &args.html {
        write_atomic(path, assignment_page(&run).as_bytes())?;
    }
    if args.json {
        return print_json(&AssignJson::new(&run));
    }
    print!("{}", assignment_table(&run, &hint));
    Ok(())
}

/// The first `#` comment of the measured file (so a report says when data are synthetic).
fn first_comment(path: &Path) -> Option<String> {
    let text = std::fs::read_to_string(path).ok()?;
    text.lines()
        .map(str::trim)
        .find(|l| l.starts_with('#'))
        .map(|l| l.trim_start_matches('#').trim().to_string())
        .filter(|l| !l.is_empty())
}
