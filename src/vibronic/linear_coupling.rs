//! The vertical-gradient (linear coupling) model: the ion's surface is taken to be the
//! neutral's harmonic surface shifted by the ion's gradient at the neutral's geometry,
//! V_ion(Q) = E_vertical + Σ_k g_k Q_k + ½ Σ_k ω_k² Q_k²
//! (same modes and frequencies: J = 1, ω′ = ω). Its minimum lies at Q_k = −g_k/ω_k², so in
//! the convention of duschinsky.rs (K = the neutral's equilibrium in the ion's
//! coordinates) K_k = g_k / ω_k², the Huang–Rhys factors are S_k = ω_k K_k²/2 =
//! g_k²/(2ω_k³), and the relaxation energy E_vertical − E_adiabatic = Σ_k g_k²/(2ω_k²) =
//! Σ_k S_k ω_k (common practice: the linear term of the linear vibronic coupling model of
//! Köppel, Domcke & Cederbaum, Adv. Chem. Phys. 57 (1984) 59, from memory).
//!
//! Use it when the ion cannot be optimised or the molecule is too big for the ion's
//! Hessian; it misses frequency changes and mode mixing.

use super::duschinsky::Duschinsky;
use super::state::HarmonicState;
use crate::{Error, Result};

/// The model's displacements and energies.
#[derive(Debug, Clone, PartialEq)]
pub struct LinearCoupling {
    /// J = 1, K_k = g_k/ω_k², ω′ = ω.
    pub duschinsky: Duschinsky,
    /// S_k = g_k²/(2ω_k³).
    pub huang_rhys: Vec<f64>,
    /// E_vertical − E_adiabatic = Σ g_k²/(2ω_k²), hartree.
    pub relaxation_energy: f64,
}

/// Projects a Cartesian gradient (hartree/bohr, length 3N, component 3a+c) on the neutral's
/// normal modes: g_k = Σ_a L_ak g_a / √m_a (hartree per √mₑ·bohr).
pub fn project_gradient(neutral: &HarmonicState, cartesian: &[f64]) -> Result<Vec<f64>> {
    let n = neutral.n_atoms();
    if cartesian.len() != 3 * n {
        return Err(Error::input(format!(
            "gradient has {} components, the neutral has {n} atoms ({} expected)",
            cartesian.len(),
            3 * n
        )));
    }
    Ok(neutral
        .modes
        .iter()
        .map(|l| {
            (0..3 * n)
                .map(|x| l[x] * cartesian[x] / neutral.masses[x / 3].sqrt())
                .sum()
        })
        .collect())
}

/// The model from the neutral's frequencies (hartree) and the ion's gradient along the
/// neutral's modes (`project_gradient`).
pub fn linear_coupling(frequencies: &[f64], gradient: &[f64]) -> Result<LinearCoupling> {
    if frequencies.len() != gradient.len() || frequencies.is_empty() {
        return Err(Error::input(format!(
            "{} frequencies but {} gradient components",
            frequencies.len(),
            gradient.len()
        )));
    }
    if frequencies.iter().any(|&w| !(w > 0.0) || !w.is_finite()) {
        return Err(Error::input(
            "a frequency of the neutral is not positive: not a minimum",
        ));
    }
    let k: Vec<f64> = gradient
        .iter()
        .zip(frequencies)
        .map(|(g, w)| g / (w * w))
        .collect();
    let huang_rhys: Vec<f64> = gradient
        .iter()
        .zip(frequencies)
        .map(|(g, w)| g * g / (2.0 * w * w * w))
        .collect();
    let relaxation_energy = gradient
        .iter()
        .zip(frequencies)
        .map(|(g, w)| g * g / (2.0 * w * w))
        .sum();
    Ok(LinearCoupling {
        duschinsky: Duschinsky::parallel(frequencies.to_vec(), frequencies.to_vec(), k),
        huang_rhys,
        relaxation_energy,
    })
}

#[cfg(test)]
mod tests {
    use super::super::progression::{progression, FcOptions};
    use super::super::summary::band_shape;
    use super::*;

    #[test]
    fn shifted_parabola_gives_its_minimum_and_relaxation_energy() {
        // Exact for a quadratic surface: V(Q) = g Q + ½ω²Q² has its minimum at −g/ω² and
        // lies g²/(2ω²) below V(0) there; the band's first moment (summary.rs) equals it.
        let w = [0.004, 0.011];
        let g = [1.5e-5, -4.0e-5];
        let lc = linear_coupling(&w, &g).unwrap();
        for k in 0..2 {
            let qmin = -g[k] / (w[k] * w[k]);
            let v = |q: f64| g[k] * q + 0.5 * w[k] * w[k] * q * q;
            assert!(v(qmin) < v(qmin + 1e-3) && v(qmin) < v(qmin - 1e-3));
            // K = 0 − Q_min (stated convention)
            assert!((lc.duschinsky.k[k] + qmin).abs() < 1e-12 * qmin.abs());
        }
        let lam: f64 = (0..2).map(|k| g[k] * g[k] / (2.0 * w[k] * w[k])).sum();
        assert!((lc.relaxation_energy - lam).abs() < 1e-18);
        for (s, h) in lc.huang_rhys.iter().zip(lc.duschinsky.huang_rhys()) {
            assert!((s - h).abs() < 1e-12 * s);
        }
        let opt = FcOptions {
            target_fraction: 0.999999,
            mode_tail: 1e-12,
            ..FcOptions::default()
        };
        let p = progression(&lc.duschinsky, 0.3, &opt).unwrap();
        let b = band_shape(&p, &lc.duschinsky, 0.1);
        assert!((b.mean_of_lines - (0.3 + lam)).abs() < 1e-8 * lam.max(1e-6) + 1e-9);
    }

    #[test]
    fn projection_uses_mass_weighting() {
        // One mode along z of atom 2 only: g_k = g_z / √m.
        let st = HarmonicState {
            geometry: vec![[0.0; 3], [0.0, 0.0, 2.0]],
            masses: vec![4.0, 9.0],
            modes: vec![vec![0.0, 0.0, 0.0, 0.0, 0.0, 1.0]],
            frequencies: vec![0.01],
        };
        let g = project_gradient(&st, &[0.1, 0.2, 0.3, 0.4, 0.5, 0.6]).unwrap();
        assert!((g[0] - 0.6 / 3.0).abs() < 1e-15);
        assert!(project_gradient(&st, &[0.0; 5]).is_err());
    }
}
