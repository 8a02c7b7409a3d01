//! `bandcast spectrum`: a broadened photoelectron spectrum for a photon source, from one
//! molecule or a weighted mixture (`FILE.xyz:WEIGHT`). Arguments and dispatch only: the
//! bands come from `bandcast::predict`, the spectrum from `spectrum::build`, the output
//! from `report` (text table or `--json` on stdout, `--svg` and `--csv` files).

use std::path::{Path, PathBuf};

use bandcast::report::figures::spectrum_figure;
use bandcast::report::html::spectrum_page;
use bandcast::report::json::SpectrumJson;
use bandcast::report::runs::{InputInfo, SpectrumRun};
use bandcast::report::text::spectrum_table;
use bandcast::report::{csv::curve_csv, write_atomic};
use bandcast::spectrum::build::{build_spectrum, Component, SpectrumOptions};
use bandcast::spectrum::lineshape::Shape;
use bandcast::spectrum::mixture::parse_inputs;
use bandcast::spectrum::note::Note;
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::spectrum::predicted::IntensityModel;
use bandcast::Result;

use super::common::{
    check_fwhm, check_output_dir, parse_axis, parse_photon, parse_window, print_json, PredictArgs,
    StateArgs, VibronicArgs,
};

#[derive(clap::Args, Debug)]
#[command(mut_arg("vibronic", |a| a.help(
    "Draw the lowest bands (--vibronic-count, default 3) as broadened vibronic stick \
     spectra (harmonic Franck–Condon with Duschinsky rotation, correlated vertical energy + \
     HF relaxation for the positions); default \
     --fwhm 0.03 eV, a good He I spectrometer's resolution (common practice). One molecule")))]
pub struct Args {
    /// Geometries in XYZ format; `FILE.xyz:WEIGHT` gives a molecule's share in a mixture.
    #[arg(value_name = "FILE.xyz[:WEIGHT]", required = true, num_args = 1..)]
    pub files: Vec<String>,
    #[command(flatten)]
    pub state: StateArgs,
    #[command(flatten)]
    pub predict: PredictArgs,
    /// Photon source: he1, he2, mgka, alka, or an energy in eV.
    #[arg(long, value_name = "he1|he2|mgka|alka|ENERGY_EV", value_parser = parse_photon)]
    pub photon: Photon,
    /// Horizontal axis.
    #[arg(long, value_name = "binding|kinetic", default_value = "binding", value_parser = parse_axis)]
    pub axis: Axis,
    /// Instrument Gaussian FWHM of every band in eV (default: 0.3 for He I/He II, 0.9 for
    /// Mg/Al Kα).
    #[arg(long, value_name = "EV")]
    pub fwhm: Option<f64>,
    /// Line shape (default: gaussian for valence, voigt for core levels).
    #[arg(long, value_name = "gaussian|lorentzian|voigt", value_parser = parse_shape)]
    pub shape: Option<Shape>,
    /// Band intensities: occupation × degeneracy, or the Gelius cross-section model.
    #[arg(long, value_name = "occupation|gelius", default_value = "occupation", value_parser = parse_intensity)]
    pub intensity: IntensityModel,
    /// Only this energy range of the axis in eV: `LO:HI` (e.g. `284:296`) or `HI` (= 0:HI).
    #[arg(long, value_name = "LO:HI|HI", value_parser = parse_window)]
    pub window: Option<(f64, f64)>,
    /// Draw the energy axis the other way round (binding energy increasing to the right,
    /// kinetic energy to the left).
    #[arg(long)]
    pub flip_axis: bool,
    /// Write the plot as SVG.
    #[arg(long, value_name = "OUT.svg")]
    pub svg: Option<PathBuf>,
    /// Write the broadened curve as CSV.
    #[arg(long, value_name = "OUT.csv")]
    pub csv: Option<PathBuf>,
    /// Print bands and curve as JSON on stdout.
    #[arg(long)]
    pub json: bool,
    // --- vibronic bands (cli/vibronic.rs) ---
    #[command(flatten)]
    pub vibronic: VibronicArgs,
    /// Write a self-contained HTML page: the figure (one panel per element for core levels
    /// of several elements) and the bands with their chemical environments; with
    /// --vibronic, the figure with its sticks and a table per band.
    #[arg(long, value_name = "OUT.html")]
    pub html: Option<PathBuf>,
    // --- end vibronic ---
}

fn parse_shape(s: &str) -> std::result::Result<Shape, String> {
    Shape::parse(s).ok_or_else(|| format!("'{s}' is not gaussian, lorentzian or voigt"))
}
fn parse_intensity(s: &str) -> std::result::Result<IntensityModel, String> {
    IntensityModel::parse(s).ok_or_else(|| format!("'{s}' is not occupation or gelius"))
}

/// The methods used, in input order without repeats ("eom-ccsd", or "eom-ccsd, ep2" when the
/// default rule chose differently for the molecules of a mixture).
fn methods_used(methods: &[String]) -> String {
    let mut seen: Vec<&str> = Vec::new();
    for m in methods {
        if !seen.contains(&m.as_str()) {
            seen.push(m);
        }
    }
    seen.join(", ")
}

pub fn run(args: Args) -> Result<()> {
    let fwhm = check_fwhm(args.fwhm)?;
    check_output_dir(args.svg.as_deref())?;
    check_output_dir(args.csv.as_deref())?;
    check_output_dir(args.html.as_deref())?;
    args.predict.check()?;
    let inputs = parse_inputs(&args.files)?;
    // --- vibronic bands (cli/vibronic.rs) ---
    if args.vibronic.vibronic {
        if inputs.len() != 1 {
            return Err(bandcast::Error::input(
                "--vibronic draws one molecule: give one file",
            ));
        }
        let mol = args.state.load(&inputs[0].path)?;
        let set = args.vibronic.settings(
            &args.predict.basis,
            None,
            args.predict.memory,
            args.predict.verbose,
        );
        return super::vibronic::spectrum(
            &mol,
            &inputs[0].path,
            &set,
            fwhm,
            args.window,
            super::vibronic::Outputs {
                svg: args.svg.as_deref(),
                csv: args.csv.as_deref(),
                html: args.html.as_deref(),
            },
            args.json,
        );
    }
    // --- end vibronic ---
    let mut predictions = Vec::new();
    let mut infos = Vec::new();
    for inp in &inputs {
        let mol = args.state.load(&inp.path)?;
        predictions.push(
            args.predict
                .predict_for(&mol, Some(args.photon.energy_ev()))?,
        );
        infos.push(InputInfo {
            file: inp.path.display().to_string(),
            name: mol.name.clone(),
            weight: inp.weight,
        });
    }
    let components: Vec<Component> = predictions
        .iter()
        .zip(&infos)
        .map(|(p, i)| Component {
            bands: &p.bands,
            weight: i.weight,
            name: i.name.clone(),
        })
        .collect();
    let opts = SpectrumOptions {
        photon: args.photon,
        region: args.predict.region,
        axis: args.axis,
        fwhm_ev: fwhm,
        shape: args.shape,
        intensity: args.intensity,
        window: args.window,
    };
    let mut spectrum = build_spectrum(&components, &opts)?;
    for p in &predictions {
        for n in Note::from_prediction(p) {
            if !spectrum.notes.contains(&n) {
                spectrum.notes.push(n);
            }
        }
    }
    let methods: Vec<String> = predictions.iter().map(|p| p.method.clone()).collect();
    let run = SpectrumRun {
        spectrum: &spectrum,
        photon: args.photon,
        region: args.predict.region,
        axis: args.axis,
        intensity: args.intensity,
        method: methods_used(&methods),
        basis: args.predict.basis.clone(),
        inputs: infos,
    };
    if let Some(p) = &args.svg {
        write_atomic(p, spectrum_figure(&run, args.flip_axis).as_bytes())?;
    }
    if let Some(p) = &args.html {
        write_atomic(p, spectrum_page(&run, args.flip_axis).as_bytes())?;
    }
    if let Some(p) = &args.csv {
        write_atomic(p, curve_csv(&spectrum.curve).as_bytes())?;
    }
    if args.json {
        return print_json(&SpectrumJson::new(&run));
    }
    let written: Vec<(&str, &Path)> =
        [("svg", &args.svg), ("csv", &args.csv), ("html", &args.html)]
            .into_iter()
            .filter_map(|(w, p)| p.as_deref().map(|p| (w, p)))
            .collect();
    print!("{}", spectrum_table(&run, &written, &|_| None));
    Ok(())
}
