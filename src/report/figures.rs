//! The plots of `spectrum` and `assign`, as `svg::Plot` values built from the results, and
//! the figures (`spectrum_figure`, `overlay_figure`): one plot, or for XPS of several
//! elements one panel per element and shell, each over its own energy range.

use super::runs::{AssignRun, SpectrumRun};
use super::svg::{render_panels, Plot, Series, StickMark, PALETTE};
use crate::spectrum::broaden::{auto_grid, broaden, Curve};
use crate::spectrum::lineshape::{profile, Shape};
use crate::spectrum::photon::Axis;
use crate::spectrum::predicted::Stick;

/// Height of one element's panel (px).
const PANEL_HEIGHT: f64 = 400.0;

/// The sticks of each core level ("C 1s", "O 1s"), by increasing energy of the level;
/// empty unless there are two levels or more.
fn core_groups(sticks: &[Stick]) -> Vec<(String, Vec<Stick>)> {
    let mut groups: Vec<(String, Vec<Stick>)> = Vec::new();
    for s in sticks {
        let Some(name) = &s.core_level else {
            return Vec::new();
        };
        match groups.iter_mut().find(|g| &g.0 == name) {
            Some(g) => g.1.push(s.clone()),
            None => groups.push((name.clone(), vec![s.clone()])),
        }
    }
    if groups.len() < 2 {
        return Vec::new();
    }
    let low = |g: &(String, Vec<Stick>)| g.1.iter().map(|s| s.binding_ev).fold(f64::MAX, f64::min);
    groups.sort_by(|a, b| low(a).total_cmp(&low(b)));
    groups
}

/// The SVG figure of `spectrum`: one plot, or one panel per core level when the spectrum
/// holds several (each panel broadened on its own grid).
pub fn spectrum_figure(run: &SpectrumRun, flip: bool) -> String {
    let b = run.spectrum;
    let groups = core_groups(&b.sticks);
    if groups.is_empty() {
        return spectrum_plot(run, flip).render();
    }
    let panels: Vec<Plot> = groups
        .iter()
        .filter_map(|(name, sticks)| {
            let grid = auto_grid(sticks, run.axis, None)?;
            let curve = broaden(sticks, b.shape, run.axis, grid, &b.curve.component_names);
            let mut p = plot_of(run, sticks, &curve, flip);
            p.title = name.clone();
            p.height = PANEL_HEIGHT;
            Some(p)
        })
        .collect();
    render_panels(&run.title(), &run.subtitle(), &panels)
}

/// The plot of a spectrum: the total (and each molecule of a mixture, dashed) with a stick
/// per band. `flip` draws the energy axis the other way round.
pub fn spectrum_plot(run: &SpectrumRun, flip: bool) -> Plot {
    let b = run.spectrum;
    plot_of(run, &b.sticks, &b.curve, flip)
}

/// The plot of `sticks` and their `curve` (all of a spectrum, or one panel's).
fn plot_of(run: &SpectrumRun, sticks: &[Stick], curve: &Curve, flip: bool) -> Plot {
    let b = run.spectrum;
    let axis = run.axis;
    let multi = curve.components.len() > 1;
    let mut series = Vec::new();
    if multi {
        for (k, c) in curve.components.iter().enumerate() {
            series.push(Series {
                name: curve.component_names[k].clone(),
                x: curve.energy_ev.clone(),
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
        x: curve.energy_ev.clone(),
        y: curve.total.clone(),
        color: PALETTE[0].into(),
        stroke_width: 2.0,
        fill: true,
        dashed: false,
    });
    let sticks = sticks
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
                let l = s.display_label();
                l.split_once(": ").map(|x| x.1.to_string()).unwrap_or(l)
            } else {
                s.display_label()
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
        title: run.title(),
        subtitle: run.subtitle(),
        x_label: axis.title().into(),
        y_label: "Intensity (arb. units)".into(),
        series,
        sticks,
        increase_left,
        x_range: Some((curve.energy_ev[0], *curve.energy_ev.last().unwrap())),
        width: 900.0,
        height: 560.0,
    }
}

/// Measured trace and aligned prediction, both scaled to a maximum of 1.
pub fn overlay_plot(run: &AssignRun) -> Plot {
    let cmp = &run.assignment.comparison;
    let sticks = &run.assignment.sticks;
    let fwhm = run.assignment.fwhm;
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
    // Each assigned band is drawn with the width of its measured peak (the prediction has
    // no vibrational envelope); others with the instrument width.
    let width_of = |label: &str| -> f64 {
        cmp.assignments
            .iter()
            .find(|a| a.label.split(" + ").any(|l| l == label))
            .and_then(|a| cmp.peaks.iter().find(|p| p.energy_ev == a.measured_ev))
            .map_or(fwhm, |p| p.fwhm_ev.max(fwhm))
    };
    let widths: Vec<f64> = sticks.iter().map(|s| width_of(&s.label)).collect();
    let pred_raw: Vec<f64> = x
        .iter()
        .map(|&e| {
            sticks
                .iter()
                .zip(&widths)
                .map(|(s, &w)| {
                    s.intensity
                        * profile(
                            Shape::Voigt,
                            e - align(s.binding_ev),
                            w,
                            s.lorentzian_fwhm_ev,
                        )
                })
                .sum()
        })
        .collect();
    let pmax = pred_raw.iter().cloned().fold(0.0, f64::max);
    let pnorm = if pmax > 0.0 { 1.0 / pmax } else { 1.0 };
    let pred: Vec<f64> = pred_raw.iter().map(|v| v * pnorm).collect();
    // Coincident lines (within 0.05 eV) are one stick with their heights added, so two
    // equivalent atoms make a stick twice as high.
    let mut marks: Vec<StickMark> = Vec::new();
    for s in sticks {
        let x = align(s.binding_ev);
        let h = s.intensity
            * profile(Shape::Voigt, 0.0, width_of(&s.label), s.lorentzian_fwhm_ev)
            * pnorm;
        if let Some(m) = marks.iter_mut().find(|m| (m.x - x).abs() <= 0.05) {
            m.height += h;
            m.label = format!("{} + {}", m.label, s.display_label());
        } else {
            marks.push(StickMark {
                x,
                height: h,
                label: s.display_label(),
                color: PALETTE[0].into(),
            });
        }
    }
    Plot {
        title: "Measured and predicted (aligned)".into(),
        subtitle: format!(
            "prediction {} / {}, shifted by {:+.2} eV, scale {:.4}, bands drawn at their measured peak's width; measured: raw, fitted background, and smoothed minus background · verdict: {}",
            run.method, run.basis, cmp.shift_ev, cmp.scale, cmp.verdict.name()
        ),
        x_label: "Binding energy (eV)".into(),
        y_label: "Intensity (normalised)".into(),
        series: vec![
            Series {
                name: "raw trace".into(),
                x: x.clone(),
                y: cmp.raw.iter().map(|v| v * norm).collect(),
                color: "#aaaaaa".into(),
                stroke_width: 0.8,
                fill: false,
                dashed: false,
            },
            Series {
                name: "fitted background".into(),
                x: x.clone(),
                y: cmp.background_curve.iter().map(|v| v * norm).collect(),
                color: "#888888".into(),
                stroke_width: 1.0,
                fill: false,
                dashed: true,
            },
            Series {
                name: "measured (processed)".into(),
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

/// The SVG figure of `assign`: the overlay, or one panel per core level when the prediction
/// holds several, each over its own aligned lines (± 4 FWHM, at least 3 eV) within the trace.
pub fn overlay_figure(run: &AssignRun) -> String {
    let groups = core_groups(&run.assignment.sticks);
    let whole = overlay_plot(run);
    if groups.is_empty() {
        return whole.render();
    }
    let cmp = &run.assignment.comparison;
    let (t0, t1) = (cmp.energy_ev[0], *cmp.energy_ev.last().unwrap());
    let margin = (4.0 * run.assignment.fwhm).max(3.0);
    let panels: Vec<Plot> = groups
        .iter()
        .map(|(name, sticks)| {
            let aligned = sticks
                .iter()
                .map(|s| cmp.scale * s.binding_ev + cmp.shift_ev);
            let lo = aligned.clone().fold(f64::MAX, f64::min) - margin;
            let hi = aligned.fold(f64::MIN, f64::max) + margin;
            let (lo, hi) = if lo.max(t0) < hi.min(t1) {
                (lo.max(t0), hi.min(t1))
            } else {
                (lo, hi)
            };
            Plot {
                title: name.clone(),
                x_range: Some((lo, hi)),
                height: PANEL_HEIGHT,
                ..whole.clone()
            }
        })
        .collect();
    render_panels(&whole.title, &whole.subtitle, &panels)
}
