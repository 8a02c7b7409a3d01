//! Printers of vibronic bands (`vibronic::band`): the per-band table of
//! `bandcast ionize --vibronic`, the JSON document of both commands, and the broadened
//! stick spectrum of `bandcast spectrum --vibronic` (curve, text summary, SVG with sticks).

use std::fmt::Write as _;

use crate::report::svg::{Plot, Series, StickMark, PALETTE};
use crate::vibronic::band::{BandLine, VibronicBand};
use crate::vibronic::gaussian_envelope;

/// Default instrument resolution of a vibronic spectrum: a Gaussian of 0.03 eV FWHM (a good
/// He I spectrometer resolves 10–30 meV; common practice).
pub const DEFAULT_VIBRONIC_FWHM_EV: f64 = 0.03;

/// Lines printed per band in the table (strongest first, then shown by energy).
const TABLE_LINES: usize = 8;

/// Sticks drawn per band in the SVG (strongest first); the few strongest are labelled.
const SVG_STICKS: usize = 40;
const SVG_LABELS: usize = 4;

/// What the printers say about the numbers.
pub const VIBRONIC_GUIDANCE: &str = "Harmonic Franck–Condon predictions (Hartree–Fock \
geometries and frequencies) to guide a measurement, not a substitute for one: HF harmonic \
wavenumbers run about 10 % above measured spacings, and positions can be off by a few tenths \
of an eV (HF ΔSCF alone: up to 2 eV).";

/// The electronic-energy method(s) of the bands.
pub fn electronic(bands: &[VibronicBand]) -> String {
    let mut seen: Vec<&str> = Vec::new();
    for b in bands {
        if !seen.contains(&b.electronic_method.as_str()) {
            seen.push(&b.electronic_method);
        }
    }
    if seen.is_empty() {
        "HF ΔSCF".into()
    } else {
        seen.join(", ")
    }
}

fn band_name(b: &VibronicBand) -> String {
    b.label
        .clone()
        .unwrap_or_else(|| format!("orbital {}", b.orbital))
}

/// The line's ion quanta ("0–0", "2ν1 + 1ν3"), and for a hot band the neutral's initial
/// level after a ← ("0–0 ← 1ν2″": from one quantum of the neutral's mode 2).
pub fn quanta_text(l: &BandLine) -> String {
    let ion = if l.quanta.is_empty() {
        "0–0".to_string()
    } else {
        l.quanta
            .iter()
            .map(|q| format!("{}ν{}", q.quanta, q.mode))
            .collect::<Vec<_>>()
            .join(" + ")
    };
    if l.neutral_quanta.is_empty() {
        ion
    } else {
        let from = l
            .neutral_quanta
            .iter()
            .map(|q| format!("{}ν{}″", q.quanta, q.mode))
            .collect::<Vec<_>>()
            .join(" + ");
        format!("{ion} ← {from}")
    }
}

/// The table of `bandcast ionize --vibronic`.
pub fn bands_table(
    molecule: &str,
    basis: &str,
    point_group: &str,
    temperature_k: f64,
    bands: &[VibronicBand],
) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{molecule}: vibronic bands in {basis} (neutral point group {point_group}); \
         energies {}, harmonic modes HF/{basis} (modes counted from the lowest wavenumber); {}",
        electronic(bands),
        temperature_text(temperature_k)
    );
    for b in bands {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "band {} (orbital {}{}): {} model, lines hold {:.1} % of the intensity",
            band_name(b),
            b.orbital,
            if b.degeneracy > 1 {
                format!(", {}-fold", b.degeneracy)
            } else {
                String::new()
            },
            match b.model {
                crate::vibronic::band::BandModel::Duschinsky => "Duschinsky",
                crate::vibronic::band::BandModel::LinearCoupling => "linear coupling",
            },
            100.0 * b.captured_fraction
        );
        let _ = writeln!(
            s,
            "  adiabatic (0–0) {:>9.3} eV   electronic {:.3} eV, zero-point change {:+.3} eV",
            b.adiabatic_ev, b.electronic_adiabatic_ev, b.zero_point_change_ev
        );
        let _ = writeln!(s, "  vertical        {:>9.3} eV", b.vertical_ev);
        if let Some(c) = &b.composite {
            let _ = writeln!(
                s,
                "                               ({} vertical; HF ΔSCF {:.3} eV, shift {:+.3} eV)",
                c.method, c.hf_vertical_ev, c.shift_ev
            );
        }
        let _ = writeln!(s, "  maximum         {:>9.3} eV", b.maximum_ev);
        let _ = writeln!(
            s,
            "  mean quanta     {:>9.2}      (intensity-weighted; long progression ≳ 1)",
            b.mean_total_quanta
        );
        if b.progression_modes.is_empty() {
            let _ = writeln!(s, "  progression modes: none (a single sharp line)");
        } else {
            let _ = writeln!(
                s,
                "  progression modes:  mode  cm⁻¹ (ion)  irrep   quanta at maximum  mean quanta"
            );
            for m in &b.progression_modes {
                let _ = writeln!(
                    s,
                    "                     {:>4}  {:>10.1}  {:<6} {:>18}  {:>11.2}",
                    m.mode, m.wavenumber_cm1, m.irrep, m.quanta_at_maximum, m.mean_quanta
                );
            }
        }
        if !b.bond_changes.is_empty() {
            let bonds: Vec<String> = b
                .bond_changes
                .iter()
                .map(|c| {
                    format!(
                        "{}{}–{}{} {:.3} → {:.3} Å ({:+.3})",
                        c.symbols[0],
                        c.atoms[0],
                        c.symbols[1],
                        c.atoms[1],
                        c.neutral_angstrom,
                        c.ion_angstrom,
                        c.change_angstrom
                    )
                })
                .collect();
            let _ = writeln!(s, "  bonds: {}", bonds.join("; "));
        }
        let mut strongest: Vec<&BandLine> = b.lines.iter().collect();
        strongest.sort_by(|x, y| y.intensity.total_cmp(&x.intensity));
        strongest.truncate(TABLE_LINES);
        strongest.sort_by(|x, y| x.energy_ev.total_cmp(&y.energy_ev));
        let _ = writeln!(s, "  strongest lines:  energy (eV)  intensity  quanta");
        for l in strongest {
            let _ = writeln!(
                s,
                "                   {:>11.3}  {:>9.4}  {}",
                l.energy_ev,
                l.intensity,
                quanta_text(l)
            );
        }
        for n in &b.notes {
            let _ = writeln!(s, "  note: {n}");
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "{VIBRONIC_GUIDANCE}");
    s
}

/// The JSON document: per band the keys of `VibronicBand` (`adiabatic_ev`, `vertical_ev`,
/// `maximum_ev`, `progression_modes`, `lines`, …).
#[derive(serde::Serialize)]
pub struct BandsJson<'a> {
    pub molecule: &'a str,
    pub basis: &'a str,
    pub electronic_method: String,
    pub neutral_point_group: &'a str,
    /// Temperature of the neutral's vibrational population (0 = v = 0 only).
    pub temperature_k: f64,
    pub bands: &'a [VibronicBand],
    /// Present for `spectrum --vibronic`: the broadened curve.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub curve: Option<CurveJson>,
    pub note: &'static str,
}

#[derive(serde::Serialize)]
pub struct CurveJson {
    pub fwhm_ev: f64,
    pub line_shape: &'static str,
    pub band_weights: &'static str,
    pub energy_ev: Vec<f64>,
    pub intensity: Vec<f64>,
}

/// "neutral in v = 0 (0 K)" or "neutral's levels at 300 K (hot bands ← ν″)".
pub fn temperature_text(temperature_k: f64) -> String {
    if temperature_k > 0.0 {
        format!("neutral's levels populated at {temperature_k} K (hot-band lines marked ← ν″)")
    } else {
        "neutral in its lowest vibrational level (0 K)".into()
    }
}

/// Energy window of the bands (lines ± 4 FWHM) or the one asked for.
pub fn curve_window(bands: &[VibronicBand], fwhm: f64, window: Option<(f64, f64)>) -> (f64, f64) {
    if let Some(w) = window {
        return w;
    }
    let lo = bands
        .iter()
        .flat_map(|b| b.lines.iter().map(|l| l.energy_ev))
        .fold(f64::INFINITY, f64::min);
    let hi = bands
        .iter()
        .flat_map(|b| b.lines.iter().map(|l| l.energy_ev))
        .fold(f64::NEG_INFINITY, f64::max);
    if !lo.is_finite() {
        return (0.0, 1.0);
    }
    (lo - 4.0 * fwhm, hi + 4.0 * fwhm)
}

/// The sticks of all bands, each band weighted by its degeneracy (occupation model), as
/// (energy eV, intensity, band index).
pub fn weighted_sticks(bands: &[VibronicBand]) -> Vec<(f64, f64, usize)> {
    bands
        .iter()
        .enumerate()
        .flat_map(|(k, b)| {
            b.lines
                .iter()
                .map(move |l| (l.energy_ev, l.intensity * b.degeneracy as f64, k))
        })
        .collect()
}

/// The broadened spectrum: unit-area Gaussians of `fwhm` eV on every stick, sampled every
/// fwhm/10 over `lo..hi` (at most 20 001 points).
pub fn vibronic_curve(bands: &[VibronicBand], fwhm: f64, lo: f64, hi: f64) -> CurveJson {
    let points = (((hi - lo) / (fwhm / 10.0)).ceil() as usize + 1).clamp(2, 20_001);
    let sticks: Vec<(f64, f64)> = weighted_sticks(bands).iter().map(|s| (s.0, s.1)).collect();
    let c = gaussian_envelope(&sticks, fwhm, lo, hi, points);
    CurveJson {
        fwhm_ev: fwhm,
        line_shape: "gaussian",
        band_weights: "degeneracy (occupation model)",
        energy_ev: c.iter().map(|p| p.0).collect(),
        intensity: c.iter().map(|p| p.1).collect(),
    }
}

/// Text summary of `spectrum --vibronic`.
pub fn spectrum_text(molecule: &str, bands: &[VibronicBand], curve: &CurveJson) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{molecule}: vibronic photoelectron spectrum, Gaussian {:.3} eV FWHM, bands weighted \
         by degeneracy; energies {}",
        curve.fwhm_ev,
        electronic(bands)
    );
    if let Some(p) = bands.iter().find_map(|b| b.thermal_population) {
        let _ = writeln!(
            s,
            "neutral's vibrational levels thermally populated ({:.1} % of the population \
             followed): hot-band lines lie below each 0–0 line",
            100.0 * p
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "  {:<10} {:>10} {:>10} {:>10} {:>8}  progression modes (cm⁻¹ × quanta at maximum)",
        "band", "adiabatic", "vertical", "maximum", "quanta"
    );
    for b in bands {
        let modes: Vec<String> = b
            .progression_modes
            .iter()
            .map(|m| {
                format!(
                    "{:.0} {} ×{}",
                    m.wavenumber_cm1, m.irrep, m.quanta_at_maximum
                )
            })
            .collect();
        let _ = writeln!(
            s,
            "  {:<10} {:>10.3} {:>10.3} {:>10.3} {:>8.2}  {}",
            band_name(b),
            b.adiabatic_ev,
            b.vertical_ev,
            b.maximum_ev,
            b.mean_total_quanta,
            if modes.is_empty() {
                "-".into()
            } else {
                modes.join(", ")
            }
        );
    }
    let notes: Vec<String> = bands
        .iter()
        .flat_map(|b| {
            b.notes
                .iter()
                .map(move |n| format!("{}: {n}", band_name(b)))
        })
        .collect();
    if !notes.is_empty() {
        let _ = writeln!(s);
        for n in notes {
            let _ = writeln!(s, "note: {n}");
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "{VIBRONIC_GUIDANCE}");
    s
}

/// SVG: the envelope with the strongest sticks of each band under it (stick height = the
/// peak height a lone line of that intensity would have), the strongest labelled by band
/// and quanta.
pub fn spectrum_svg(molecule: &str, bands: &[VibronicBand], curve: &CurveJson) -> String {
    vibronic_plot(molecule, bands, curve).render()
}

/// The figure of `spectrum_svg` (shared with the HTML page, `report::html::vibronic_page`).
pub fn vibronic_plot(molecule: &str, bands: &[VibronicBand], curve: &CurveJson) -> Plot {
    let sigma = curve.fwhm_ev / (8.0 * std::f64::consts::LN_2).sqrt();
    let peak = 1.0 / (sigma * (2.0 * std::f64::consts::PI).sqrt());
    let mut sticks = Vec::new();
    for (k, b) in bands.iter().enumerate() {
        let mut ls: Vec<&BandLine> = b.lines.iter().collect();
        ls.sort_by(|x, y| y.intensity.total_cmp(&x.intensity));
        for (i, l) in ls.iter().take(SVG_STICKS).enumerate() {
            sticks.push(StickMark {
                x: l.energy_ev,
                height: l.intensity * b.degeneracy as f64 * peak,
                label: if i < SVG_LABELS {
                    format!("{} {}", band_name(b), quanta_text(l))
                } else {
                    String::new()
                },
                color: PALETTE[(k + 1) % PALETTE.len()].into(),
            });
        }
    }
    let lo = curve.energy_ev.first().copied().unwrap_or(0.0);
    let hi = curve.energy_ev.last().copied().unwrap_or(1.0);
    Plot {
        title: format!("{molecule}: vibronic photoelectron bands"),
        subtitle: format!(
            "harmonic Franck–Condon, energies {}, Gaussian {:.3} eV FWHM",
            electronic(bands),
            curve.fwhm_ev
        ),
        x_label: "Binding energy (eV)".into(),
        y_label: "Intensity (arb. units)".into(),
        series: vec![Series {
            name: String::new(),
            x: curve.energy_ev.clone(),
            y: curve.intensity.clone(),
            color: PALETTE[0].into(),
            stroke_width: 2.0,
            fill: true,
            dashed: false,
        }],
        sticks,
        increase_left: true,
        x_range: Some((lo, hi)),
        width: 900.0,
        height: 560.0,
    }
}
