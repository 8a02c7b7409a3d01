//! `bandcast spectrum`: a broadened photoelectron spectrum for a photon source, from one
//! molecule or a weighted mixture (`FILE.xyz:WEIGHT`). Printers: text table (stdout),
//! `--json` (stdout), `--svg`, `--csv` (files).

use std::path::{Path, PathBuf};

use serde::Serialize;

use bandcast::chem::Molecule;
use bandcast::ionization::{Band, Region};
use bandcast::report::svg::{Plot, Series, StickMark, PALETTE};
use bandcast::report::{csv::curve_csv, write_atomic};
use bandcast::spectrum::broaden::{auto_grid, broaden, Curve};
use bandcast::spectrum::lineshape::{profile, Shape};
use bandcast::spectrum::mixture::{component_name, parse_inputs};
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::spectrum::predicted::{
    sticks_from_bands, Excluded, IntensityModel, Stick, StickOptions,
};
use bandcast::{Error, Result};

use super::common::StateArgs;

#[derive(clap::Args, Debug)]
pub struct Args {
    /// Geometries in XYZ format; `FILE.xyz:WEIGHT` gives a molecule's share in a mixture.
    #[arg(value_name = "FILE.xyz[:WEIGHT]", required = true, num_args = 1..)]
    pub files: Vec<String>,
    #[command(flatten)]
    pub state: StateArgs,
    /// Basis set (name from `bandcast basis` or a path).
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// Ionization method (valence: as `bandcast ionize --method`; core: as `bandcast core`).
    #[arg(long, value_name = "METHOD")]
    pub method: Option<String>,
    /// Valence bands (UPS) or core levels (XPS).
    #[arg(long, value_name = "valence|core", default_value = "valence", value_parser = parse_region)]
    pub region: Region,
    /// Core levels of one element only, e.g. `--element C` (default: every heavy atom).
    #[arg(long, value_name = "SYMBOL", value_parser = parse_element_arg)]
    pub element: Option<u32>,
    /// Core levels: stop at the first SCF start that holds the hole (faster, less safe).
    #[arg(long)]
    pub quick: bool,
    /// Photon source: he1, he2, mgka, alka, or an energy in eV.
    #[arg(long, value_name = "he1|he2|mgka|alka|ENERGY_EV", value_parser = parse_photon)]
    pub photon: Photon,
    /// Horizontal axis.
    #[arg(long, value_name = "binding|kinetic", default_value = "binding", value_parser = parse_axis)]
    pub axis: Axis,
    /// Gaussian FWHM of every band in eV (default: 0.3 for He I/He II, 0.9 for Mg/Al Kα).
    #[arg(long, value_name = "EV")]
    pub fwhm: Option<f64>,
    /// Line shape (default: gaussian for valence, voigt for core levels).
    #[arg(long, value_name = "gaussian|lorentzian|voigt", value_parser = parse_shape)]
    pub shape: Option<Shape>,
    /// Band intensities: occupation × degeneracy, or the Gelius cross-section model.
    #[arg(long, value_name = "occupation|gelius", default_value = "occupation", value_parser = parse_intensity)]
    pub intensity: IntensityModel,
    /// Only this energy range of the axis, e.g. `--window 284:296`.
    #[arg(long, value_name = "LO:HI", value_parser = parse_window)]
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
pub fn parse_photon(s: &str) -> std::result::Result<Photon, String> {
    Photon::parse(s)
}
pub fn parse_axis(s: &str) -> std::result::Result<Axis, String> {
    Axis::parse(s).ok_or_else(|| format!("'{s}' is not binding or kinetic"))
}
fn parse_shape(s: &str) -> std::result::Result<Shape, String> {
    Shape::parse(s).ok_or_else(|| format!("'{s}' is not gaussian, lorentzian or voigt"))
}
fn parse_intensity(s: &str) -> std::result::Result<IntensityModel, String> {
    IntensityModel::parse(s).ok_or_else(|| format!("'{s}' is not occupation or gelius"))
}
fn parse_window(s: &str) -> std::result::Result<(f64, f64), String> {
    let (a, b) = s
        .split_once(':')
        .ok_or_else(|| format!("'{s}' is not LO:HI (two energies in eV)"))?;
    let lo: f64 = a
        .trim()
        .parse()
        .map_err(|_| format!("'{a}' is not a number"))?;
    let hi: f64 = b
        .trim()
        .parse()
        .map_err(|_| format!("'{b}' is not a number"))?;
    if !(lo.is_finite() && hi.is_finite() && hi > lo) {
        return Err(format!("window '{s}' needs LO < HI"));
    }
    Ok((lo, hi))
}

/// Check a width given on the command line.
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

/// Predicted bands of one molecule for a region, and the name of the method used.
///
/// Valence: `ionization::valence::predict` with `--method` (default: the module's default
/// for the molecule, EP2 for closed shells). Core: `core_level::predict` by ΔSCF
/// (`--method dscf`, default) or ΔMP2 (`--method dmp2`), for every heavy atom or the atoms
/// of one element (`element`).
pub fn predict_bands(
    mol: &Molecule,
    basis: &str,
    method: Option<&str>,
    region: Region,
    element: Option<u32>,
    quick: bool,
) -> Result<(Vec<Band>, String)> {
    match region {
        Region::Valence => {
            use bandcast::ionization::valence::{default_method, predict, ValenceOptions};
            use bandcast::ionization::Method;
            let m = match method {
                Some(name) => Method::parse(name)?,
                None => default_method(mol),
            };
            let set = bandcast::basis::load(basis, mol, None)?;
            let opts = ValenceOptions {
                method: m,
                ..ValenceOptions::default()
            };
            let r = predict(mol, &set, &opts)?;
            Ok((r.bands, m.name().to_string()))
        }
        Region::Core => {
            use bandcast::core_level::{predict, CoreOptions, TargetSelection};
            let mut opts = CoreOptions::default();
            match method.map(|m| m.to_ascii_lowercase()) {
                None => {}
                Some(m) if m == "dscf" => {}
                Some(m) if m == "dmp2" => opts.mp2 = true,
                Some(m) => {
                    return Err(Error::input(format!(
                        "core levels are computed by dscf or dmp2, not '{m}'"
                    )))
                }
            }
            if let Some(z) = element {
                opts.targets = TargetSelection::Element(z);
            }
            opts.thorough = !quick;
            let set = bandcast::basis::load(basis, mol, None)?;
            let r = predict(mol, &set, &opts)?;
            let name = if opts.mp2 { "dmp2" } else { "dscf" };
            Ok((r.bands(), name.to_string()))
        }
    }
}

/// Everything `bandcast spectrum` prints in `--json`.
#[derive(Serialize)]
struct SpectrumJson<'a> {
    photon: &'a str,
    photon_energy_ev: f64,
    region: Region,
    axis: Axis,
    shape: Shape,
    gaussian_fwhm_ev: f64,
    intensity_model: IntensityModel,
    method: &'a str,
    basis: &'a str,
    inputs: Vec<InputJson>,
    bands: &'a [Stick],
    excluded: &'a [Excluded],
    notes: &'a [String],
    curve: &'a Curve,
}

#[derive(Serialize)]
struct InputJson {
    file: String,
    name: String,
    weight: f64,
}

/// Sticks plus the curve, with everything the printers need.
pub struct Built {
    pub sticks: Vec<Stick>,
    pub excluded: Vec<Excluded>,
    pub notes: Vec<String>,
    pub curve: Curve,
    pub shape: Shape,
    pub fwhm: f64,
}

/// Turn per-input bands into sticks and a curve.
#[allow(clippy::too_many_arguments)]
pub fn build_spectrum(
    per_input: &[(Vec<Band>, f64, String)],
    photon: Photon,
    region: Region,
    axis: Axis,
    fwhm: Option<f64>,
    shape: Option<Shape>,
    intensity: IntensityModel,
    window: Option<(f64, f64)>,
) -> Result<Built> {
    let fwhm = fwhm.unwrap_or_else(|| photon.default_fwhm_ev(region));
    let shape = shape.unwrap_or_else(|| Photon::default_shape(region));
    let mut sticks = Vec::new();
    let mut excluded = Vec::new();
    let mut notes = Vec::new();
    let multi = per_input.len() > 1;
    for (k, (bands, weight, name)) in per_input.iter().enumerate() {
        let opts = StickOptions {
            photon,
            intensity,
            gaussian_fwhm_ev: fwhm,
            weight: *weight,
            component: k,
        };
        let (mut s, mut e) = sticks_from_bands(bands, &opts, &mut notes);
        if multi {
            for x in s.iter_mut() {
                x.label = format!("{name}: {}", x.label);
            }
            for x in e.iter_mut() {
                x.label = format!("{name}: {}", x.label);
            }
        }
        sticks.append(&mut s);
        excluded.append(&mut e);
    }
    if let Some((lo, hi)) = window {
        let pos = |s: &Stick| match axis {
            Axis::Binding => s.binding_ev,
            Axis::Kinetic => s.kinetic_ev,
        };
        sticks.retain(|s| pos(s) >= lo - 5.0 * fwhm && pos(s) <= hi + 5.0 * fwhm);
    }
    if !excluded.is_empty() {
        notes.push(format!(
            "{} band(s) lie above the photon energy ({:.3} eV) and are left out",
            excluded.len(),
            photon.energy_ev()
        ));
    }
    let names: Vec<String> = per_input.iter().map(|p| p.2.clone()).collect();
    let grid = auto_grid(&sticks, axis, window).ok_or_else(|| {
        Error::computation(
            "no band of these molecules is reachable with this photon in this window",
        )
    })?;
    let curve = broaden(&sticks, shape, axis, grid, &names);
    Ok(Built {
        sticks,
        excluded,
        notes,
        curve,
        shape,
        fwhm,
    })
}

/// The SVG plot of a built spectrum.
pub fn spectrum_plot(b: &Built, axis: Axis, flip: bool, title: String, subtitle: String) -> Plot {
    let multi = b.curve.components.len() > 1;
    let mut series = Vec::new();
    if multi {
        for (k, c) in b.curve.components.iter().enumerate() {
            series.push(Series {
                name: b.curve.component_names[k].clone(),
                x: b.curve.energy_ev.clone(),
                y: c.clone(),
                color: PALETTE[(k + 1) % PALETTE.len()].into(),
                stroke_width: 1.2,
                fill: false,
                dashed: true,
            });
        }
    }
    series.push(Series {
        name: if multi { "total".into() } else { String::new() },
        x: b.curve.energy_ev.clone(),
        y: b.curve.total.clone(),
        color: PALETTE[0].into(),
        stroke_width: 2.0,
        fill: true,
        dashed: false,
    });
    let sticks = b
        .sticks
        .iter()
        .map(|s| StickMark {
            x: match axis {
                Axis::Binding => s.binding_ev,
                Axis::Kinetic => s.kinetic_ev,
            },
            // the peak height of this band alone, so a stick meets its own envelope
            height: s.intensity * profile(b.shape, 0.0, s.gaussian_fwhm_ev, s.lorentzian_fwhm_ev),
            // in a mixture the colour tells the molecule (legend); the label keeps the band
            label: if multi {
                s.label
                    .split_once(": ")
                    .map(|x| x.1.to_string())
                    .unwrap_or_else(|| s.label.clone())
            } else {
                s.label.clone()
            },
            color: if multi {
                PALETTE[(s.component + 1) % PALETTE.len()].into()
            } else {
                "#444".into()
            },
        })
        .collect();
    let increase_left = match axis {
        Axis::Binding => !flip,
        Axis::Kinetic => flip,
    };
    Plot {
        title,
        subtitle,
        x_label: axis.title().into(),
        y_label: "Intensity (arb. units)".into(),
        series,
        sticks,
        increase_left,
        x_range: Some((b.curve.energy_ev[0], *b.curve.energy_ev.last().unwrap())),
        width: 900.0,
        height: 560.0,
    }
}

fn region_name(r: Region) -> &'static str {
    match r {
        Region::Valence => "valence",
        Region::Core => "core",
    }
}

pub fn run(args: Args) -> Result<()> {
    let fwhm = check_fwhm(args.fwhm)?;
    check_output_dir(args.svg.as_deref())?;
    check_output_dir(args.csv.as_deref())?;
    let inputs = parse_inputs(&args.files)?;
    let mut per_input = Vec::new();
    let mut method_used = String::new();
    for inp in &inputs {
        let mol = args.state.load(&inp.path)?;
        let (bands, method) = predict_bands(
            &mol,
            &args.basis,
            args.method.as_deref(),
            args.region,
            args.element,
            args.quick,
        )?;
        method_used = method;
        per_input.push((bands, inp.weight, component_name(&inp.path)));
    }
    let built = build_spectrum(
        &per_input,
        args.photon,
        args.region,
        args.axis,
        fwhm,
        args.shape,
        args.intensity,
        args.window,
    )?;
    let names: Vec<String> = per_input.iter().map(|p| p.2.clone()).collect();
    let title = format!(
        "{} photoelectron spectrum of {}",
        if args.region == Region::Core {
            "Core-level"
        } else {
            "Valence"
        },
        names.join(" + ")
    );
    let subtitle = format!(
        "predicted: {} / {} · {} · {} FWHM {:.2} eV · intensities: {} · a prediction, not a measurement",
        method_used,
        args.basis,
        args.photon.name(),
        built.shape.name(),
        built.fwhm,
        match args.intensity {
            IntensityModel::Occupation => "occupation × degeneracy",
            IntensityModel::Gelius => "Gelius model",
        }
    );
    if let Some(p) = &args.svg {
        let plot = spectrum_plot(
            &built,
            args.axis,
            args.flip_axis,
            title.clone(),
            subtitle.clone(),
        );
        write_atomic(p, plot.render().as_bytes())?;
    }
    if let Some(p) = &args.csv {
        write_atomic(p, curve_csv(&built.curve).as_bytes())?;
    }
    if args.json {
        let photon_name = args.photon.name();
        let j = SpectrumJson {
            photon: &photon_name,
            photon_energy_ev: args.photon.energy_ev(),
            region: args.region,
            axis: args.axis,
            shape: built.shape,
            gaussian_fwhm_ev: built.fwhm,
            intensity_model: args.intensity,
            method: &method_used,
            basis: &args.basis,
            inputs: inputs
                .iter()
                .map(|i| InputJson {
                    file: i.path.display().to_string(),
                    name: component_name(&i.path),
                    weight: i.weight,
                })
                .collect(),
            bands: &built.sticks,
            excluded: &built.excluded,
            notes: &built.notes,
            curve: &built.curve,
        };
        println!(
            "{}",
            serde_json::to_string_pretty(&j).map_err(|e| Error::computation(e.to_string()))?
        );
        return Ok(());
    }
    print_table(&built, &args, &title, &subtitle);
    Ok(())
}

fn print_table(b: &Built, args: &Args, title: &str, subtitle: &str) {
    println!("{title}");
    println!("{subtitle}");
    println!();
    let imax = b.sticks.iter().map(|s| s.intensity).fold(0.0, f64::max);
    let wlabel = b
        .sticks
        .iter()
        .map(|s| s.label.chars().count())
        .max()
        .unwrap_or(4)
        .max(4);
    println!(
        "  {:<wlabel$}  {:>10}  {:>10}  {:>9}  {:>9}",
        "band", "BE (eV)", "KE (eV)", "rel. int.", "Γ_L (eV)"
    );
    let mut sorted: Vec<&Stick> = b.sticks.iter().collect();
    sorted.sort_by(|x, y| x.binding_ev.total_cmp(&y.binding_ev));
    for s in sorted {
        println!(
            "  {:<wlabel$}  {:>10.2}  {:>10.2}  {:>9.1}  {:>9.2}",
            s.label,
            s.binding_ev,
            s.kinetic_ev,
            if imax > 0.0 {
                100.0 * s.intensity / imax
            } else {
                0.0
            },
            s.lorentzian_fwhm_ev
        );
    }
    for e in &b.excluded {
        println!(
            "  {:<wlabel$}  {:>10.2}  (not reached: {})",
            e.label, e.binding_ev, e.reason
        );
    }
    for n in &b.notes {
        println!("note: {n}");
    }
    println!(
        "region: {}; curve: {} points, {:.2}–{:.2} eV",
        region_name(args.region),
        b.curve.energy_ev.len(),
        b.curve.energy_ev[0],
        b.curve.energy_ev.last().unwrap()
    );
    for (what, p) in [("svg", &args.svg), ("csv", &args.csv)] {
        if let Some(p) = p {
            println!("wrote {what}: {}", show(p));
        }
    }
}

fn show(p: &Path) -> String {
    p.display().to_string()
}
