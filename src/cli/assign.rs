//! `bandcast assign`: align a predicted spectrum with a measured one and say which band is
//! which. Printers: text table (stdout), `--json` (stdout), `--html` (file).

use std::path::PathBuf;

use serde::Serialize;

use bandcast::ionization::Region;
use bandcast::report::html::{assignment_report, ReportContext};
use bandcast::report::svg::{Plot, Series, StickMark, PALETTE};
use bandcast::report::write_atomic;
use bandcast::spectrum::assign::PredictedLine;
use bandcast::spectrum::compare::{compare, CompareOptions, Comparison};
use bandcast::spectrum::lineshape::profile;
use bandcast::spectrum::measured::read_measured;
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::spectrum::predicted::{sticks_from_bands, IntensityModel, Stick, StickOptions};
use bandcast::{Error, Result};

use super::common::MoleculeArgs;
use super::spectrum::{
    check_fwhm, check_output_dir, parse_axis, parse_element_arg, parse_photon, parse_region,
    predict_bands,
};

#[derive(clap::Args, Debug)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set (name from `bandcast basis` or a path).
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// Ionization method (as for `bandcast spectrum`).
    #[arg(long, value_name = "METHOD")]
    pub method: Option<String>,
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
    #[arg(long, value_name = "valence|core", default_value = "valence", value_parser = parse_region)]
    pub region: Region,
    /// Core levels of one element only, e.g. `--element C` (default: every heavy atom).
    #[arg(long, value_name = "SYMBOL", value_parser = parse_element_arg)]
    pub element: Option<u32>,
    /// Core levels: stop at the first SCF start that holds the hole (faster, less safe).
    #[arg(long)]
    pub quick: bool,
    /// Fit a linear scale as well as a shift (needs three assigned peaks or more).
    #[arg(long)]
    pub fit_scale: bool,
    /// Band width expected in the measured trace (eV); sets the smoothing window.
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

#[derive(Serialize)]
struct AssignJson<'a> {
    molecule: String,
    method: &'a str,
    basis: &'a str,
    measured_file: String,
    #[serde(flatten)]
    comparison: &'a Comparison,
}

fn positive(name: &str, v: Option<f64>) -> Result<Option<f64>> {
    match v {
        Some(x) if !(x.is_finite() && x > 0.0) => Err(Error::input(format!(
            "{name} {x}: must be a positive number"
        ))),
        o => Ok(o),
    }
}

pub fn run(args: Args) -> Result<()> {
    let fwhm_arg = check_fwhm(args.fwhm)?;
    check_output_dir(args.html.as_deref())?;
    let prominence = positive("--prominence", args.prominence)?;
    if prominence.is_some_and(|p| p >= 1.0) {
        return Err(Error::input(
            "--prominence is a fraction of the trace's range, below 1",
        ));
    }
    let cap = positive("--max-residual", args.max_residual)?;
    let max_shift = positive("--max-shift", args.max_shift)?;
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
    let (bands, method) = predict_bands(
        &mol,
        &args.basis,
        args.method.as_deref(),
        args.region,
        args.element,
        args.quick,
    )?;
    let photon = args.photon.unwrap_or(match args.region {
        Region::Valence => Photon::He1,
        Region::Core => Photon::AlKa,
    });
    let fwhm = fwhm_arg.unwrap_or_else(|| photon.default_fwhm_ev(args.region));
    let mut notes = Vec::new();
    let opts = StickOptions {
        photon: if args.photon.is_some() {
            photon
        } else {
            Photon::Custom(f64::MAX)
        },
        intensity: IntensityModel::Occupation,
        gaussian_fwhm_ev: fwhm,
        weight: 1.0,
        component: 0,
    };
    let (sticks, excluded) = sticks_from_bands(&bands, &opts, &mut notes);
    let lines: Vec<PredictedLine> = sticks
        .iter()
        .map(|s| PredictedLine {
            label: s.label.clone(),
            energy_ev: s.binding_ev,
            intensity: s.intensity,
        })
        .collect();
    let mut copt = CompareOptions::defaults(args.region, fwhm);
    if let Some(p) = prominence {
        copt.min_prominence = p;
    }
    if let Some(c) = cap {
        copt.cap_ev = c;
    }
    if let Some(s) = max_shift {
        copt.max_shift_ev = s;
    }
    copt.fit_scale = args.fit_scale;
    let mut cmp = compare(&lines, &measured, &copt)?;
    if !excluded.is_empty() {
        cmp.notes.push(format!(
            "{} band(s) above the photon energy left out",
            excluded.len()
        ));
    }
    cmp.notes.extend(notes);
    let measured_file = args.measured.display().to_string();
    if let Some(path) = &args.html {
        let plot = overlay_plot(&cmp, &sticks, fwhm, &mol.name, &method, &args.basis);
        let ctx = ReportContext {
            molecule: molecule_name(&args),
            method: method.clone(),
            basis: args.basis.clone(),
            photon: args
                .photon
                .map(|p| p.name())
                .unwrap_or_else(|| "not given".into()),
            measured_file: match first_comment(&args.measured) {
                Some(c) => format!("{measured_file} — its header says: {c}"),
                None => measured_file.clone(),
            },
            region: match args.region {
                Region::Valence => "valence".into(),
                Region::Core => "core".into(),
            },
        };
        write_atomic(
            path,
            assignment_report(&ctx, &cmp, &plot.render()).as_bytes(),
        )?;
    }
    if args.json {
        let j = AssignJson {
            molecule: molecule_name(&args),
            method: &method,
            basis: &args.basis,
            measured_file,
            comparison: &cmp,
        };
        println!(
            "{}",
            serde_json::to_string_pretty(&j).map_err(|e| Error::computation(e.to_string()))?
        );
        return Ok(());
    }
    print_table(&cmp, &args, &method);
    Ok(())
}

/// The first `#` comment of the measured file (so a report says when data are synthetic).
fn first_comment(path: &std::path::Path) -> Option<String> {
    let text = std::fs::read_to_string(path).ok()?;
    text.lines()
        .map(str::trim)
        .find(|l| l.starts_with('#'))
        .map(|l| l.trim_start_matches('#').trim().to_string())
        .filter(|l| !l.is_empty())
}

fn molecule_name(args: &Args) -> String {
    args.molecule
        .file
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default()
}

/// Measured trace and aligned prediction, both scaled to a maximum of 1.
fn overlay_plot(
    cmp: &Comparison,
    sticks: &[Stick],
    fwhm: f64,
    _name: &str,
    method: &str,
    basis: &str,
) -> Plot {
    let x = cmp.energy_ev.clone();
    let raw_max = cmp
        .smoothed
        .iter()
        .zip(&cmp.background_curve)
        .map(|(a, b)| a - b)
        .fold(0.0, f64::max);
    let norm = if raw_max > 0.0 { 1.0 / raw_max } else { 1.0 };
    let meas: Vec<f64> = cmp
        .smoothed
        .iter()
        .zip(&cmp.background_curve)
        .map(|(a, b)| (a - b) * norm)
        .collect();
    let align = |e: f64| cmp.scale * e + cmp.shift_ev;
    let pred_raw: Vec<f64> = x
        .iter()
        .map(|&e| {
            sticks
                .iter()
                .map(|s| {
                    s.intensity
                        * profile(
                            bandcast::spectrum::Shape::Voigt,
                            e - align(s.binding_ev),
                            fwhm,
                            s.lorentzian_fwhm_ev,
                        )
                })
                .sum()
        })
        .collect();
    let pmax = pred_raw.iter().cloned().fold(0.0, f64::max);
    let pnorm = if pmax > 0.0 { 1.0 / pmax } else { 1.0 };
    let pred: Vec<f64> = pred_raw.iter().map(|v| v * pnorm).collect();
    let marks = sticks
        .iter()
        .map(|s| StickMark {
            x: align(s.binding_ev),
            height: s.intensity
                * profile(
                    bandcast::spectrum::Shape::Voigt,
                    0.0,
                    fwhm,
                    s.lorentzian_fwhm_ev,
                )
                * pnorm,
            label: s.label.clone(),
            color: PALETTE[0].into(),
        })
        .collect();
    Plot {
        title: "Measured and predicted (aligned)".into(),
        subtitle: format!(
            "prediction {method} / {basis}, shifted by {:+.2} eV, scale {:.4}; measured: smoothed, background removed",
            cmp.shift_ev, cmp.scale
        ),
        x_label: "Binding energy (eV)".into(),
        y_label: "Intensity (normalised)".into(),
        series: vec![
            Series {
                name: "measured".into(),
                x: x.clone(),
                y: meas,
                color: "#333333".into(),
                stroke_width: 1.4,
                fill: false,
                dashed: false,
            },
            Series {
                name: "predicted, aligned".into(),
                x,
                y: pred,
                color: PALETTE[0].into(),
                stroke_width: 1.8,
                fill: true,
                dashed: true,
            },
        ],
        sticks: marks,
        increase_left: true,
        x_range: Some((cmp.energy_ev[0], *cmp.energy_ev.last().unwrap())),
        width: 900.0,
        height: 520.0,
    }
}

fn print_table(cmp: &Comparison, args: &Args, method: &str) {
    println!(
        "Assignment of {} against {} ({} / {})",
        molecule_name(args),
        args.measured.display(),
        method,
        args.basis
    );
    println!(
        "alignment: aligned = {:.4} × predicted {} {:.3} eV;  {} peaks found ({} background, Savitzky–Golay {} points)",
        cmp.scale,
        if cmp.shift_ev < 0.0 { "−" } else { "+" },
        cmp.shift_ev.abs(),
        cmp.peaks.len(),
        cmp.background,
        cmp.smoothing_window
    );
    println!();
    let w = cmp
        .assignments
        .iter()
        .map(|a| a.label.chars().count())
        .chain(
            cmp.unseen_bands
                .iter()
                .map(|b| b.label.chars().count() + 10),
        )
        .max()
        .unwrap_or(8)
        .max(8);
    println!(
        "  {:>9}  {:<w$}  {:>9}  {:>9}  {:>8}  {:>10}",
        "measured", "band(s)", "predicted", "aligned", "residual", "confidence"
    );
    for a in &cmp.assignments {
        let flag = if a.low_confidence {
            match &a.alternative {
                Some(alt) => format!("  LOW (or {alt})"),
                None => "  LOW".into(),
            }
        } else {
            String::new()
        };
        println!(
            "  {:>9.2}  {:<w$}  {:>9.2}  {:>9.2}  {:>+8.2}  {:>10.2}{flag}",
            a.measured_ev,
            a.label,
            a.predicted_ev,
            a.aligned_ev,
            bandcast::report::html::tidy(a.residual_ev),
            a.confidence
        );
    }
    for p in &cmp.unassigned_peaks {
        println!("  {:>9.2}  {:<w$}", p.energy_ev, "(no band)");
    }
    for b in cmp.unseen_bands.iter().filter(|b| b.inside_window) {
        println!(
            "  {:>9}  {:<w$}  {:>9.2}  {:>9.2}",
            "",
            format!("{} (no peak)", b.label),
            b.predicted_ev,
            b.aligned_ev
        );
    }
    for n in &cmp.notes {
        println!("note: {n}");
    }
    println!("Predictions guide a measurement; they do not replace it.");
}
