//! A band's vibronic envelope at a given instrument resolution, for comparing a predicted
//! band's shape with a measured trace (`bandcast assign`) or drawing it.
//!
//! The envelope is the band's sticks (`VibronicBand::lines`, eV) broadened by unit-area
//! Gaussians of the given FWHM (`summary::gaussian_envelope`), so its area is the band's
//! captured intensity (1 for a complete band from v = 0), not weighted by degeneracy or by
//! any cross-section: the caller scales it. `band_envelope` samples it on its own grid
//! (lines ± 4 FWHM, FWHM/10 apart); `band_envelope_at` on the caller's energies (a
//! measured trace's grid). `progression_spacing_ev` and `resolved_at` say whether a
//! resolution can show the progression at all.

use crate::error::{Error, Result};
use crate::units::HARTREE_TO_EV;
use crate::units::HARTREE_TO_WAVENUMBER;

use super::band::VibronicBand;
use super::summary::gaussian_envelope;

/// A band's envelope sampled on a grid (eV).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BandEnvelope {
    pub fwhm_ev: f64,
    pub energy_ev: Vec<f64>,
    /// Per eV; the area is the band's captured intensity.
    pub intensity: Vec<f64>,
}

fn check_fwhm(fwhm_ev: f64) -> Result<()> {
    if fwhm_ev.is_finite() && fwhm_ev > 0.0 {
        Ok(())
    } else {
        Err(Error::input(format!(
            "the resolution (FWHM) must be a positive number of eV, not {fwhm_ev}"
        )))
    }
}

/// The band broadened to `fwhm_ev` on its own grid: from the lowest line − 4 FWHM to the
/// highest + 4 FWHM, every FWHM/10 (at most 20 001 points).
pub fn band_envelope(band: &VibronicBand, fwhm_ev: f64) -> Result<BandEnvelope> {
    check_fwhm(fwhm_ev)?;
    let lo = band
        .lines
        .iter()
        .map(|l| l.energy_ev)
        .fold(f64::INFINITY, f64::min);
    let hi = band
        .lines
        .iter()
        .map(|l| l.energy_ev)
        .fold(f64::NEG_INFINITY, f64::max);
    let (lo, hi) = if lo.is_finite() {
        (lo - 4.0 * fwhm_ev, hi + 4.0 * fwhm_ev)
    } else {
        (band.adiabatic_ev - fwhm_ev, band.adiabatic_ev + fwhm_ev)
    };
    let points = (((hi - lo) / (fwhm_ev / 10.0)).ceil() as usize + 1).clamp(2, 20_001);
    let sticks: Vec<(f64, f64)> = band
        .lines
        .iter()
        .map(|l| (l.energy_ev, l.intensity))
        .collect();
    let c = gaussian_envelope(&sticks, fwhm_ev, lo, hi, points);
    Ok(BandEnvelope {
        fwhm_ev,
        energy_ev: c.iter().map(|p| p.0).collect(),
        intensity: c.iter().map(|p| p.1).collect(),
    })
}

/// The band broadened to `fwhm_ev`, evaluated at the given energies (eV, any order).
pub fn band_envelope_at(
    band: &VibronicBand,
    fwhm_ev: f64,
    energies_ev: &[f64],
) -> Result<Vec<f64>> {
    check_fwhm(fwhm_ev)?;
    let sigma = fwhm_ev / (8.0 * std::f64::consts::LN_2).sqrt();
    let norm = 1.0 / (sigma * (2.0 * std::f64::consts::PI).sqrt());
    let reach = 8.0 * sigma;
    Ok(energies_ev
        .iter()
        .map(|&e| {
            band.lines
                .iter()
                .filter(|l| (l.energy_ev - e).abs() <= reach)
                .map(|l| {
                    let x = (e - l.energy_ev) / sigma;
                    l.intensity * norm * (-0.5 * x * x).exp()
                })
                .sum()
        })
        .collect())
}

/// Spacing (eV) of the band's main progression: the ion wavenumber of the progression-
/// forming mode with the most mean quanta; None for a band without one (a single line).
pub fn progression_spacing_ev(band: &VibronicBand) -> Option<f64> {
    band.progression_modes
        .iter()
        .max_by(|a, b| a.mean_quanta.total_cmp(&b.mean_quanta))
        .map(|m| m.wavenumber_cm1 / HARTREE_TO_WAVENUMBER * HARTREE_TO_EV)
}

/// Whether a Gaussian resolution of `fwhm_ev` separates neighbouring members of the main
/// progression: two equal Gaussians a spacing d apart show two maxima only when d exceeds
/// FWHM/√(2 ln 2) ≈ 0.849 FWHM (exact for equal Gaussians: the midpoint turns from a
/// maximum into a minimum at d = 2σ).
pub fn resolved_at(band: &VibronicBand, fwhm_ev: f64) -> bool {
    let sigma = fwhm_ev / (8.0 * std::f64::consts::LN_2).sqrt();
    progression_spacing_ev(band).is_some_and(|d| d > 2.0 * sigma)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::vibronic::band::{BandLine, BandMode, BandModel, ModeQuanta};

    fn band(lines: &[(f64, f64)], spacing_cm1: f64) -> VibronicBand {
        VibronicBand {
            orbital: 1,
            label: None,
            degeneracy: 1,
            model: BandModel::Duschinsky,
            electronic_method: "test".into(),
            composite: None,
            adiabatic_ev: lines[0].0,
            electronic_adiabatic_ev: lines[0].0,
            zero_point_change_ev: 0.0,
            vertical_ev: lines[0].0,
            maximum_ev: lines[0].0,
            mean_ev: lines[0].0,
            mean_total_quanta: 1.0,
            captured_fraction: lines.iter().map(|l| l.1).sum(),
            thermal_population: None,
            progression_modes: vec![BandMode {
                mode: 1,
                wavenumber_cm1: spacing_cm1,
                irrep: "a1".into(),
                quanta_at_maximum: 1,
                mean_quanta: 1.0,
            }],
            ion_modes: vec![(spacing_cm1, "a1".into())],
            bond_changes: vec![],
            ion_point_group: None,
            lines: lines
                .iter()
                .enumerate()
                .map(|(q, &(e, i))| BandLine {
                    energy_ev: e,
                    intensity: i,
                    quanta: if q == 0 {
                        vec![]
                    } else {
                        vec![ModeQuanta {
                            mode: 1,
                            quanta: q as u32,
                        }]
                    },
                    neutral_quanta: vec![],
                })
                .collect(),
            notes: vec![],
        }
    }

    #[test]
    fn envelope_area_is_the_band_intensity_and_grids_agree() {
        // Exact: unit-area Gaussians keep the sticks' total (0.9 here) as the area.
        let b = band(&[(12.0, 0.5), (12.2, 0.3), (12.4, 0.1)], 1613.0);
        let e = band_envelope(&b, 0.03).unwrap();
        let step = e.energy_ev[1] - e.energy_ev[0];
        let area: f64 = e.intensity.iter().sum::<f64>() * step;
        assert!((area - 0.9).abs() < 1e-9, "area {area}");
        // the same curve evaluated at the caller's energies
        let at = band_envelope_at(&b, 0.03, &e.energy_ev).unwrap();
        for (x, y) in at.iter().zip(&e.intensity) {
            assert!((x - y).abs() < 1e-9 * (1.0 + y.abs()));
        }
        assert!(band_envelope(&b, 0.0).is_err() && band_envelope_at(&b, -1.0, &[]).is_err());
    }

    #[test]
    fn a_resolution_separates_the_progression_only_below_its_spacing() {
        // 1613 cm⁻¹ = 0.200 eV (CODATA conversion); two equal Gaussians are resolved when
        // their distance exceeds 2σ = FWHM/√(2 ln 2) (exact).
        let b = band(&[(12.0, 0.5), (12.2, 0.5)], 1613.0);
        let d = progression_spacing_ev(&b).unwrap();
        assert!((d - 0.19999).abs() < 1e-3);
        assert!(resolved_at(&b, 0.03) && resolved_at(&b, 0.2));
        assert!(!resolved_at(&b, 0.25));
        // and the envelope shows it: a dip between the two lines at 0.2 eV FWHM, none at 0.25
        let dip = |f: f64| {
            let v = band_envelope_at(&b, f, &[12.0, 12.1]).unwrap();
            v[1] < v[0]
        };
        assert!(dip(0.2) && !dip(0.25));
    }
}
