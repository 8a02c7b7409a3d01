//! Broadening sticks into a continuous spectrum on an energy grid.
//!
//! S(E) = Σ_k I_k · φ(E − E_k; Γ_G, Γ_L), φ a unit-area line shape (lineshape.rs), so the
//! area under each band equals its stick intensity.

use serde::Serialize;

use super::lineshape::{profile, voigt_fwhm, Shape};
use super::photon::Axis;
use super::predicted::Stick;

/// A broadened spectrum on a uniform grid along the chosen axis.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Curve {
    pub axis: Axis,
    /// Grid energies (eV) along `axis`, increasing.
    pub energy_ev: Vec<f64>,
    /// Total intensity at each grid point.
    pub total: Vec<f64>,
    /// Per-component (per input) intensities; same length as `component_names`.
    pub components: Vec<Vec<f64>>,
    pub component_names: Vec<String>,
}

/// Grid limits and spacing.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Grid {
    pub lo: f64,
    pub hi: f64,
    pub step: f64,
}

/// Largest number of grid points we make (beyond this the step grows).
pub const MAX_POINTS: usize = 20_000;

fn position(s: &Stick, axis: Axis) -> f64 {
    match axis {
        Axis::Binding => s.binding_ev,
        Axis::Kinetic => s.kinetic_ev,
    }
}

/// A grid covering every stick with a margin of 4 line widths (at least 1 eV), spaced a
/// tenth of the narrowest width; `window` (lo, hi) overrides the limits.
pub fn auto_grid(sticks: &[Stick], axis: Axis, window: Option<(f64, f64)>) -> Option<Grid> {
    let widths: Vec<f64> = sticks
        .iter()
        .map(|s| voigt_fwhm(s.gaussian_fwhm_ev, s.lorentzian_fwhm_ev))
        .collect();
    let wmin = widths.iter().cloned().fold(f64::INFINITY, f64::min);
    let wmax = widths.iter().cloned().fold(0.0, f64::max);
    let (lo, hi) = match window {
        Some(w) => w,
        None => {
            if sticks.is_empty() {
                return None;
            }
            let margin = (4.0 * wmax).max(1.0);
            let lo = sticks
                .iter()
                .map(|s| position(s, axis))
                .fold(f64::INFINITY, f64::min);
            let hi = sticks
                .iter()
                .map(|s| position(s, axis))
                .fold(f64::NEG_INFINITY, f64::max);
            (lo - margin, hi + margin)
        }
    };
    if !(hi > lo) {
        return None;
    }
    let mut step = if wmin.is_finite() && wmin > 0.0 {
        wmin / 10.0
    } else {
        0.01
    };
    step = step.max((hi - lo) / MAX_POINTS as f64);
    Some(Grid { lo, hi, step })
}

/// Broaden `sticks` on `grid` with `shape`; `n_components` per-input columns.
pub fn broaden(
    sticks: &[Stick],
    shape: Shape,
    axis: Axis,
    grid: Grid,
    component_names: &[String],
) -> Curve {
    let n = ((grid.hi - grid.lo) / grid.step).round() as usize + 1;
    let energy: Vec<f64> = (0..n).map(|i| grid.lo + i as f64 * grid.step).collect();
    let mut components = vec![vec![0.0; n]; component_names.len().max(1)];
    for s in sticks {
        let c = s.component.min(components.len() - 1);
        let e0 = position(s, axis);
        for (i, &e) in energy.iter().enumerate() {
            components[c][i] +=
                s.intensity * profile(shape, e - e0, s.gaussian_fwhm_ev, s.lorentzian_fwhm_ev);
        }
    }
    let total: Vec<f64> = (0..n)
        .map(|i| components.iter().map(|c| c[i]).sum())
        .collect();
    Curve {
        axis,
        energy_ev: energy,
        total,
        components,
        component_names: component_names.to_vec(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn stick(e: f64, i: f64) -> Stick {
        Stick {
            label: "x".into(),
            binding_ev: e,
            kinetic_ev: 21.218 - e,
            intensity: i,
            gaussian_fwhm_ev: 0.3,
            lorentzian_fwhm_ev: 0.0,
            component: 0,
            environment: None,
            core_level: None,
        }
    }

    #[test]
    fn area_equals_intensity() {
        let s = vec![stick(12.6, 2.0), stick(14.7, 4.0)];
        let g = auto_grid(&s, Axis::Binding, None).unwrap();
        let c = broaden(&s, Shape::Gaussian, Axis::Binding, g, &["m".into()]);
        let area: f64 = c.total.iter().sum::<f64>() * g.step;
        assert!((area - 6.0).abs() < 1e-6, "{area}");
    }

    #[test]
    fn kinetic_axis_mirrors() {
        let s = vec![stick(12.6, 1.0)];
        let g = auto_grid(&s, Axis::Kinetic, None).unwrap();
        let c = broaden(&s, Shape::Gaussian, Axis::Kinetic, g, &["m".into()]);
        let imax = (0..c.total.len())
            .max_by(|&a, &b| c.total[a].total_cmp(&c.total[b]))
            .unwrap();
        assert!((c.energy_ev[imax] - (21.218 - 12.6)).abs() < 0.02);
    }
}
