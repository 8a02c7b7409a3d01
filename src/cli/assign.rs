//! `bandcast assign`: align a predicted spectrum with a measured one and say which band is
//! which. Arguments and dispatch only: the bands come from `bandcast::predict`, the
//! assignment from `spectrum::assignment`, the output from `report` (text table or `--json`
//! on stdout, `--html` file).

use std::path::{Path, PathBuf};

use bandcast::ionization::Region;
use bandcast::report::html::assignment_page;
use bandcast::report::json::AssignJson;
use bandcast::report::runs::AssignRun;
use bandcast::report::text::assignment_table;
use bandcast::report::write_atomic;
use bandcast::spectrum::assignment::{assign_bands_with_envelopes, check_trace, AssignmentOptions};
use bandcast::spectrum::measured::{read_measured_with_header, Measured};
use bandcast::spectrum::method_error::BasisClass;
use bandcast::spectrum::note::Note;
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::{Error, Result};

use super::common::{
    check_fwhm, check_output_dir, parse_axis, parse_photon, print_json, MoleculeArgs, PredictArgs,
    VibronicArgs,
};

#[derive(clap::Args, Debug)]
#[command(
    mut_arg("vibronic", |a| a.help(
        "Compute the vibrational structure of the lowest bands (--vibronic-count, default 3; \
         harmonic Franck–Condon with Duschinsky rotation, as in `ionize --vibronic`) and match \
         by shape too: the envelope's width, and where the trace's resolution (--fwhm) resolves \
         the progression, its spacing and number of visible quanta. Valence only")),
    mut_arg("vertical_basis", |a| a.help(
        "With --vibronic: basis of the correlated vertical energies of the vibronic bands \
         (default: --basis; only their shapes are used in the match)")),
)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    #[command(flatten)]
    pub predict: PredictArgs,
    /// Measured spectrum: two columns (energy in eV, intensity), text or CSV.
    #[arg(long, value_name = "DATA")]
    pub measured: PathBuf,
    /// Energy scale of the measured file (default: what its header names, else binding).
    #[arg(long, value_name = "binding|kinetic", value_parser = parse_axis)]
    pub measured_axis: Option<Axis>,
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
    #[command(flatten)]
    pub vibronic: VibronicArgs,
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
    if args.vibronic.vibronic && args.predict.region != Region::Valence {
        return Err(Error::input(
            "--vibronic compares the vibrational structure of valence bands; it does not apply \
             to core levels",
        ));
    }
    // The measured file first: a malformed file is reported before any computation.
    let (raw, header) = read_measured_with_header(&args.measured)?;
    let mut pre_notes = Vec::new();
    let axis = match (args.measured_axis, header) {
        (Some(a), Some(h)) if a != h => {
            pre_notes.push(Note::HeaderAxisOverridden {
                header: axis_name(h).into(),
            });
            a
        }
        (Some(a), _) => a,
        (None, Some(Axis::Kinetic)) => {
            if args.photon.is_none() {
                return Err(Error::input_at(
                    &args.measured,
                    None,
                    "the header names kinetic energy; give the photon source (--photon) to \
                     convert it to binding energy, or --measured-axis binding to read it as \
                     binding energy",
                ));
            }
            Axis::Kinetic
        }
        (None, _) => Axis::Binding,
    };
    let measured = if axis == Axis::Kinetic {
        let Some(p) = args.photon else {
            return Err(Error::input(
                "--measured-axis kinetic needs --photon to convert to binding energy",
            ));
        };
        pre_notes.push(Note::KineticConverted {
            photon_ev: p.energy_ev(),
            reason: if args.measured_axis.is_some() {
                "as asked".into()
            } else {
                "its header names kinetic energy".into()
            },
        });
        raw.kinetic_to_binding(p.energy_ev())
    } else {
        raw
    };
    let opts = AssignmentOptions {
        region: args.predict.region,
        photon: args.photon,
        fwhm_ev: fwhm,
        min_prominence: prominence,
        max_residual_ev: max_residual,
        max_shift_ev: max_shift,
        fit_scale: args.fit_scale,
        basis: BasisClass::of(&args.predict.basis),
    };
    check_trace(&measured, &opts).map_err(|e| with_file(e, &args.measured))?;
    let mol = args.molecule.load()?;
    let prediction = args.predict.predict(&mol)?;
    if args.measured_axis.is_none() && header.is_none() {
        if let Some(p) = args.photon {
            looks_kinetic(&measured, &prediction.bands, p, &args.measured)?;
        }
    }
    // --- vibronic envelopes (cli/vibronic.rs) ---
    let vibronic = if args.vibronic.vibronic {
        let set = args.vibronic.settings(
            &args.predict.basis,
            None,
            args.predict.memory,
            args.predict.verbose,
        );
        super::vibronic::compute(&mol, &set)?.1
    } else {
        Vec::new()
    };
    // --- end vibronic ---
    let mut assignment =
        assign_bands_with_envelopes(&prediction.bands, &vibronic, &measured, &opts)?;
    assignment.comparison.notes.splice(0..0, pre_notes);
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

fn axis_name(a: Axis) -> &'static str {
    match a {
        Axis::Binding => "binding",
        Axis::Kinetic => "kinetic",
    }
}

/// An input error of the trace without a file gets the measured file's name.
fn with_file(e: Error, path: &Path) -> Error {
    match e {
        Error::Input {
            file: None,
            line,
            message,
        } => Error::input_at(path, line, message),
        e => e,
    }
}

/// A trace read as binding energy whose window (± 1 eV) holds fewer than half as many
/// predicted bands as it holds read as kinetic energy for the photon (and at least two that
/// way): refused, naming both readings, rather than aligned by a large shift.
fn looks_kinetic(
    m: &Measured,
    bands: &[bandcast::ionization::Band],
    photon: Photon,
    path: &Path,
) -> Result<()> {
    let hv = photon.energy_ev();
    let lo = m.energy_ev[0];
    let hi = m.energy_ev[m.energy_ev.len() - 1];
    let slack = 1.0;
    let reachable: Vec<f64> = bands.iter().map(|b| b.ie_ev).filter(|&e| e < hv).collect();
    let as_binding = reachable
        .iter()
        .filter(|&&e| e >= lo - slack && e <= hi + slack)
        .count();
    let as_kinetic = reachable
        .iter()
        .filter(|&&e| e >= hv - hi - slack && e <= hv - lo + slack)
        .count();
    if as_kinetic >= 2 && as_kinetic > 2 * as_binding {
        return Err(Error::input_at(
            path,
            None,
            format!(
                "the trace spans {lo:.2}–{hi:.2} eV: as binding energy it holds {as_binding} of \
                 the predicted bands, as kinetic energy for hν = {hv:.3} eV it holds {as_kinetic}; \
                 the file is probably kinetic energy (--measured-axis kinetic converts it; \
                 --measured-axis binding reads it as binding energy anyway)"
            ),
        ));
    }
    Ok(())
}
