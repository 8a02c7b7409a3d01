//! What a band's vibronic lines say in a few numbers: adiabatic and vertical ionization
//! energies, the strongest line, the progression-forming modes; and the sticks broadened
//! into an envelope.
//!
//! **Vertical = mean.** The intensity-weighted mean of the Franck–Condon distribution from
//! the neutral's v = 0 is ⟨0|H_ion|0⟩ (first-moment theorem: Σ_v′ |⟨0|v′⟩|² E_v′ =
//! ⟨0|H|0⟩ by completeness), i.e. the vertical ionization energy of the harmonic model.
//! With Q′ = JQ + K and ⟨QQᵀ⟩ = ½Γ⁻¹, ⟨PPᵀ⟩ = ½Γ in the neutral's ground level, the mean
//! number of quanta in ion mode k is
//!   ⟨n′_k⟩ = ¼ [ (JΓJᵀ)_kk / ω′_k + ω′_k (JΓ⁻¹Jᵀ)_kk ] + ½ ω′_k K_k² − ½,
//! and E_vertical − E_adiabatic = Σ_k ω′_k ⟨n′_k⟩ (0 K). For J = 1 and ω = ω′ this is the
//! Huang–Rhys factor S_k = ω_k K_k²/2 and the reorganisation energy Σ S_k ω_k.
//!
//! Note that the vertical energy of an electronic-structure calculation at the neutral's
//! geometry equals this mean only as far as the ion's surface is harmonic between the two
//! structures; the difference is a measure of anharmonicity, not an error of either.

use super::duschinsky::Duschinsky;
use super::progression::Progression;

/// Exact mean quanta ⟨n′_k⟩ per ion mode from the neutral's v = 0 (module comment).
pub fn mean_quanta(d: &Duschinsky) -> Vec<f64> {
    let n = d.n_modes();
    let (w, wp) = (&d.initial_frequencies, &d.final_frequencies);
    (0..n)
        .map(|k| {
            let mut jgj = 0.0;
            let mut jgij = 0.0;
            for i in 0..n {
                let j2 = d.j[k][i] * d.j[k][i];
                jgj += j2 * w[i];
                jgij += j2 / w[i];
            }
            0.25 * (jgj / wp[k] + wp[k] * jgij) + 0.5 * wp[k] * d.k[k] * d.k[k] - 0.5
        })
        .collect()
}

/// E_vertical − E_adiabatic of the harmonic model (hartree, 0 K): Σ_k ω′_k ⟨n′_k⟩.
pub fn vertical_minus_adiabatic(d: &Duschinsky) -> f64 {
    mean_quanta(d)
        .iter()
        .zip(&d.final_frequencies)
        .map(|(n, w)| n * w)
        .sum()
}

/// One mode that shapes the band.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ProgressionMode {
    /// Ion mode (0-based).
    pub mode: usize,
    /// Its harmonic frequency in the ion, hartree.
    pub frequency: f64,
    /// Huang–Rhys factor ω′K²/2 (displacement only).
    pub huang_rhys: f64,
    /// Exact mean quanta ⟨n′⟩ (displacement, frequency change and mixing).
    pub mean_quanta: f64,
    /// Quanta of this mode in the strongest line.
    pub quanta_at_maximum: u32,
}

/// The band's shape in numbers (hartree).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BandShape {
    /// 0–0 line position.
    pub adiabatic: f64,
    /// Vertical energy of the harmonic model: adiabatic + Σ ω′⟨n′⟩ (exact, 0 K).
    pub vertical: f64,
    /// Intensity-weighted mean of the kept lines (→ `vertical` as the band converges, for
    /// the neutral in v = 0).
    pub mean_of_lines: f64,
    /// Position and intensity of the strongest line, and its ion quanta.
    pub maximum: f64,
    pub maximum_intensity: f64,
    pub maximum_quanta: Vec<(usize, u32)>,
    /// Modes excited in the strongest line or with ⟨n′⟩ ≥ the threshold, largest ⟨n′⟩ first.
    pub progression_modes: Vec<ProgressionMode>,
    pub captured_fraction: f64,
}

/// Summarises a computed band. `min_mean_quanta` selects the progression-forming modes
/// (e.g. 0.1; modes excited in the strongest line are always listed).
pub fn band_shape(p: &Progression, d: &Duschinsky, min_mean_quanta: f64) -> BandShape {
    let nbar = mean_quanta(d);
    let hr = d.huang_rhys();
    let strongest = p
        .lines
        .iter()
        .max_by(|a, b| a.intensity.total_cmp(&b.intensity));
    let (maximum, maximum_intensity, maximum_quanta) = match strongest {
        Some(l) => (l.energy, l.intensity, l.quanta.clone()),
        None => (p.adiabatic, 0.0, Vec::new()),
    };
    let at_max = |k: usize| -> u32 {
        maximum_quanta
            .iter()
            .find(|&&(m, _)| m == k)
            .map(|&(_, q)| q)
            .unwrap_or(0)
    };
    let mut modes: Vec<ProgressionMode> = (0..d.n_modes())
        .filter(|&k| nbar[k] >= min_mean_quanta || at_max(k) > 0)
        .map(|k| ProgressionMode {
            mode: k,
            frequency: d.final_frequencies[k],
            huang_rhys: hr[k],
            mean_quanta: nbar[k],
            quanta_at_maximum: at_max(k),
        })
        .collect();
    modes.sort_by(|a, b| b.mean_quanta.total_cmp(&a.mean_quanta));
    let total: f64 = p.lines.iter().map(|l| l.intensity).sum();
    let mean_of_lines = if total > 0.0 {
        p.lines.iter().map(|l| l.intensity * l.energy).sum::<f64>() / total
    } else {
        p.adiabatic
    };
    BandShape {
        adiabatic: p.adiabatic,
        vertical: p.adiabatic + vertical_minus_adiabatic(d),
        mean_of_lines,
        maximum,
        maximum_intensity,
        maximum_quanta,
        progression_modes: modes,
        captured_fraction: p.captured_fraction,
    }
}

/// (energy, intensity) of every kept line.
pub fn sticks(p: &Progression) -> Vec<(f64, f64)> {
    p.lines.iter().map(|l| (l.energy, l.intensity)).collect()
}

/// Sticks broadened by unit-area Gaussians of full width at half maximum `fwhm`, sampled
/// at `points` evenly spaced energies from `lo` to `hi` (same unit as the sticks). The area
/// under the curve equals the sum of the stick intensities inside the window.
pub fn gaussian_envelope(
    sticks: &[(f64, f64)],
    fwhm: f64,
    lo: f64,
    hi: f64,
    points: usize,
) -> Vec<(f64, f64)> {
    assert!(fwhm > 0.0 && hi > lo && points >= 2);
    let sigma = fwhm / (8.0 * std::f64::consts::LN_2).sqrt();
    let norm = 1.0 / (sigma * (2.0 * std::f64::consts::PI).sqrt());
    let reach = 8.0 * sigma;
    let step = (hi - lo) / (points - 1) as f64;
    let mut curve: Vec<(f64, f64)> = (0..points).map(|p| (lo + p as f64 * step, 0.0)).collect();
    for &(e, inten) in sticks {
        let first = (((e - reach - lo) / step).floor().max(0.0)) as usize;
        let last = (((e + reach - lo) / step).ceil()).min((points - 1) as f64);
        if last < 0.0 {
            continue;
        }
        for pt in curve.iter_mut().take(last as usize + 1).skip(first) {
            let x = (pt.0 - e) / sigma;
            pt.1 += inten * norm * (-0.5 * x * x).exp();
        }
    }
    curve
}

/// Position of the highest point of a sampled curve (None if empty).
pub fn envelope_maximum(curve: &[(f64, f64)]) -> Option<(f64, f64)> {
    curve.iter().copied().max_by(|a, b| a.1.total_cmp(&b.1))
}

#[cfg(test)]
mod tests {
    use super::super::progression::{progression, FcOptions};
    use super::*;

    #[test]
    fn mean_of_lines_equals_the_exact_vertical_energy() {
        // First-moment theorem (module comment; exact): for a converged band the
        // intensity-weighted mean equals adiabatic + Σ ω′⟨n′⟩, here with Duschinsky mixing
        // and frequency changes.
        let th: f64 = 0.4;
        let d = Duschinsky {
            j: vec![vec![th.cos(), -th.sin()], vec![th.sin(), th.cos()]],
            k: vec![9.0, 14.0],
            initial_frequencies: vec![0.005, 0.009],
            final_frequencies: vec![0.0042, 0.0097],
        };
        let opt = FcOptions {
            target_fraction: 1.0,
            mode_tail: 1e-14,
            subset_threshold: 0.0,
            tail_threshold: 0.0,
            line_floor: 0.0,
            ..FcOptions::default()
        };
        let p = progression(&d, 0.4, &opt).unwrap();
        assert!((p.captured_fraction - 1.0).abs() < 1e-9);
        let s = band_shape(&p, &d, 0.1);
        assert!(
            (s.mean_of_lines - s.vertical).abs() < 1e-9,
            "{} vs {}",
            s.mean_of_lines,
            s.vertical
        );
        assert!(s.vertical > s.adiabatic);
    }

    #[test]
    fn poisson_band_has_its_maximum_where_the_poisson_law_puts_it() {
        // Displaced oscillator, S = 2.5: Poisson maximum at n = floor(S) = 2 (exact), mean
        // quanta = S, vertical − adiabatic = S ω.
        let w = 0.01f64;
        let s = 2.5f64;
        let kk = (2.0 * s / w).sqrt();
        let d = Duschinsky::parallel(vec![w], vec![w], vec![kk]);
        let p = progression(&d, 0.55, &FcOptions::default()).unwrap();
        let b = band_shape(&p, &d, 0.1);
        assert_eq!(b.maximum_quanta, vec![(0, 2)]);
        assert!((b.maximum - (0.55 + 2.0 * w)).abs() < 1e-15);
        assert!((b.progression_modes[0].mean_quanta - s).abs() < 1e-12);
        assert!((b.progression_modes[0].huang_rhys - s).abs() < 1e-12);
        assert_eq!(b.progression_modes[0].quanta_at_maximum, 2);
        assert!((b.vertical - b.adiabatic - s * w).abs() < 1e-14);
    }

    #[test]
    fn envelope_keeps_area_and_width() {
        // Unit-area Gaussian of FWHM f: area = intensity, half maximum at ±f/2 (definition).
        let f = 0.004;
        let c = gaussian_envelope(&[(0.5, 2.0)], f, 0.45, 0.55, 10001);
        let step = c[1].0 - c[0].0;
        let area: f64 = c.iter().map(|p| p.1).sum::<f64>() * step;
        assert!((area - 2.0).abs() < 1e-9);
        let (emax, ymax) = envelope_maximum(&c).unwrap();
        assert!((emax - 0.5).abs() < 1e-12);
        let half = c
            .iter()
            .find(|p| (p.0 - (0.5 + f / 2.0)).abs() < step / 2.0)
            .unwrap();
        assert!((half.1 / ymax - 0.5).abs() < 1e-3);
    }
}
