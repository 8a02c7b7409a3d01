//! A harmonic vibrational state of one electronic state, as plain data in atomic units:
//! what the vibrations room produces and the Franck–Condon engine consumes.
//!
//! Units: geometry in bohr, masses in electron masses (the atomic unit of mass, so that
//! mass-weighted coordinates are √mₑ·bohr and ω = √(k/m) comes out in hartree), harmonic
//! frequencies ω in hartree (ħ = 1). Mass-weighted normal modes are the columns of L
//! (3N × nvib, orthonormal): the normal coordinate of mode k is
//! Q_k = Σ_a L_{ak} √m_a (x_a − x_a^eq), with a running over the 3N Cartesian components.

use crate::{Error, Result};

/// Tolerance on LᵀL = 1 when checking the modes (the vibrations room diagonalises a
/// symmetric matrix, so its eigenvectors are orthonormal to ~1e-12).
pub const ORTHONORMAL_TOL: f64 = 1e-6;

/// One electronic state's harmonic analysis.
#[derive(Debug, Clone, PartialEq)]
pub struct HarmonicState {
    /// Equilibrium geometry, bohr, one row per atom.
    pub geometry: Vec<[f64; 3]>,
    /// Atomic masses in electron masses (mₑ), one per atom.
    pub masses: Vec<f64>,
    /// Mass-weighted normal modes: `modes[k]` is column k of L (length 3N, component 3a+c
    /// is atom a, Cartesian c). Orthonormal.
    pub modes: Vec<Vec<f64>>,
    /// Harmonic frequencies ω_k in hartree (ħω), positive, one per mode.
    pub frequencies: Vec<f64>,
}

impl HarmonicState {
    pub fn n_atoms(&self) -> usize {
        self.geometry.len()
    }
    pub fn n_modes(&self) -> usize {
        self.modes.len()
    }

    /// Checks shapes, positive masses and frequencies (an imaginary frequency means the
    /// geometry is not a minimum: the harmonic model does not apply), and LᵀL = 1.
    /// `what` names the state in messages ("neutral", "ion").
    pub fn validate(&self, what: &str) -> Result<()> {
        let n = self.geometry.len();
        if n == 0 {
            return Err(Error::input(format!("{what}: no atoms")));
        }
        if self.masses.len() != n {
            return Err(Error::input(format!(
                "{what}: {} masses for {n} atoms",
                self.masses.len()
            )));
        }
        if let Some(a) = self
            .masses
            .iter()
            .position(|&m| !(m > 0.0) || !m.is_finite())
        {
            return Err(Error::input(format!(
                "{what}: mass of atom {} is not positive",
                a + 1
            )));
        }
        if self.frequencies.len() != self.modes.len() {
            return Err(Error::input(format!(
                "{what}: {} frequencies for {} modes",
                self.frequencies.len(),
                self.modes.len()
            )));
        }
        if self.modes.is_empty() {
            return Err(Error::input(format!("{what}: no vibrational modes")));
        }
        if self.modes.len() > 3 * n {
            return Err(Error::input(format!(
                "{what}: {} modes for {n} atoms (at most {})",
                self.modes.len(),
                3 * n
            )));
        }
        if let Some(k) = self
            .frequencies
            .iter()
            .position(|&w| !(w > 0.0) || !w.is_finite())
        {
            return Err(Error::input(format!(
                "{what}: frequency of mode {} is not positive ({:e} hartree): not a minimum, \
                 the harmonic Franck–Condon model does not apply",
                k + 1,
                self.frequencies[k]
            )));
        }
        for (k, col) in self.modes.iter().enumerate() {
            if col.len() != 3 * n {
                return Err(Error::input(format!(
                    "{what}: mode {} has {} components, expected {}",
                    k + 1,
                    col.len(),
                    3 * n
                )));
            }
        }
        for k in 0..self.modes.len() {
            for l in 0..=k {
                let s = dot(&self.modes[k], &self.modes[l]);
                let want = if k == l { 1.0 } else { 0.0 };
                if (s - want).abs() > ORTHONORMAL_TOL {
                    return Err(Error::input(format!(
                        "{what}: normal modes {} and {} are not orthonormal (overlap {s:.3e})",
                        l + 1,
                        k + 1
                    )));
                }
            }
        }
        Ok(())
    }

    /// Zero-point energy ½ Σ ω_k (hartree).
    pub fn zero_point_energy(&self) -> f64 {
        0.5 * self.frequencies.iter().sum::<f64>()
    }
}

pub(crate) fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn diatomic() -> HarmonicState {
        // A diatomic along z: one stretching mode, mass-weighted (√m1, −√m2)/√(m1+m2) on z.
        let (m1, m2) = (2.0, 3.0);
        let t = (m1 + m2 as f64).sqrt();
        HarmonicState {
            geometry: vec![[0.0, 0.0, 0.0], [0.0, 0.0, 2.0]],
            masses: vec![m1, m2],
            modes: vec![vec![0.0, 0.0, m2.sqrt() / t, 0.0, 0.0, -m1.sqrt() / t]],
            frequencies: vec![0.01],
        }
    }

    #[test]
    fn accepts_orthonormal_modes_and_rejects_bad_input() {
        let s = diatomic();
        s.validate("neutral").unwrap();
        let mut bad = s.clone();
        bad.frequencies[0] = -0.001;
        let e = bad.validate("ion").unwrap_err();
        assert_eq!(e.exit_code(), 2);
        assert!(e.to_string().contains("ion"));
        let mut bad = s.clone();
        bad.modes[0][2] *= 1.1;
        assert!(bad.validate("neutral").is_err());
        let mut bad = s;
        bad.masses.pop();
        assert!(bad.validate("neutral").is_err());
    }
}
