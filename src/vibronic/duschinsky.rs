//! The Duschinsky relation between the normal coordinates of the initial (neutral) and
//! final (ion) states: Q_f = J Q_i + K.
//!
//! With Q_i = L_iᵀ M^{1/2} (x − x_i) and Q_f = L_fᵀ M^{1/2} (x − x_f) (state.rs) one gets
//!   J = L_fᵀ L_i,   K = L_fᵀ M^{1/2} (x_i − x_f),
//! after the ion has been put into the neutral's Eckart frame (align.rs). Sign convention
//! (stated once here, used everywhere in this room): **K is the neutral's equilibrium
//! structure expressed in the ion's normal coordinates**; a positive K_k means the neutral
//! lies on the positive side of the ion's minimum along ion mode k. This is the
//! Sharp–Rosenstock convention (J. Chem. Phys. 41 (1964) 3453). The FC intensities do not
//! depend on the sign of any K_k as long as J and K are built together as here.
//!
//! J is exactly orthogonal only when both states span the same vibrational subspace (same
//! structure up to a rigid motion gives that exactly); for different structures the
//! rotational and translational subspaces differ slightly and JᵀJ deviates from 1 by a small
//! amount (the "axis-switching" effect). The recursion (recursion.rs) assumes an orthogonal
//! J; `orthogonality_defect` reports max |JᵀJ − 1|.

use super::align::best_fit;
use super::state::{dot, HarmonicState};
use crate::{Error, Result};

/// The Duschinsky relation and the two sets of frequencies: everything the
/// Franck–Condon engine needs besides the electronic energy.
#[derive(Debug, Clone, PartialEq)]
pub struct Duschinsky {
    /// J[f][i] = (L_fᵀ L_i)_{fi}: row = ion mode, column = neutral mode.
    pub j: Vec<Vec<f64>>,
    /// K_f (√mₑ·bohr): the neutral's equilibrium in the ion's normal coordinates.
    pub k: Vec<f64>,
    /// Neutral (initial) frequencies, hartree.
    pub initial_frequencies: Vec<f64>,
    /// Ion (final) frequencies, hartree.
    pub final_frequencies: Vec<f64>,
}

impl Duschinsky {
    pub fn n_modes(&self) -> usize {
        self.k.len()
    }

    /// The parallel-mode model: J = 1 with given displacements (no mixing).
    pub fn parallel(initial: Vec<f64>, fin: Vec<f64>, k: Vec<f64>) -> Self {
        let n = k.len();
        assert_eq!(initial.len(), n);
        assert_eq!(fin.len(), n);
        let j = (0..n)
            .map(|a| (0..n).map(|b| if a == b { 1.0 } else { 0.0 }).collect())
            .collect();
        Duschinsky {
            j,
            k,
            initial_frequencies: initial,
            final_frequencies: fin,
        }
    }

    /// Huang–Rhys factors of the ion modes, S_f = ω_f K_f² / 2 (common practice; exact
    /// mean quanta of mode f for J = 1 and equal frequencies).
    pub fn huang_rhys(&self) -> Vec<f64> {
        self.k
            .iter()
            .zip(&self.final_frequencies)
            .map(|(k, w)| 0.5 * w * k * k)
            .collect()
    }

    /// max |JᵀJ − 1| (0 for an exactly orthogonal J).
    pub fn orthogonality_defect(&self) -> f64 {
        let n = self.n_modes();
        let mut worst = 0.0f64;
        for a in 0..n {
            for b in 0..=a {
                let s: f64 = (0..n).map(|f| self.j[f][a] * self.j[f][b]).sum();
                let want = if a == b { 1.0 } else { 0.0 };
                worst = worst.max((s - want).abs());
            }
        }
        worst
    }

    /// Checks shapes and positive frequencies (for hand-made relations, e.g. models).
    pub fn validate(&self) -> Result<()> {
        let n = self.k.len();
        if n == 0 {
            return Err(Error::input("Duschinsky relation without modes"));
        }
        if self.initial_frequencies.len() != n
            || self.final_frequencies.len() != n
            || self.j.len() != n
            || self.j.iter().any(|r| r.len() != n)
        {
            return Err(Error::input(format!(
                "Duschinsky relation: J, K and the frequencies must all have {n} modes"
            )));
        }
        if self
            .initial_frequencies
            .iter()
            .chain(&self.final_frequencies)
            .any(|&w| !(w > 0.0) || !w.is_finite())
        {
            return Err(Error::input(
                "Duschinsky relation: a frequency is not positive",
            ));
        }
        if self.k.iter().any(|k| !k.is_finite()) || self.j.iter().flatten().any(|v| !v.is_finite())
        {
            return Err(Error::input("Duschinsky relation: J or K is not finite"));
        }
        Ok(())
    }
}

/// How the ion structure was laid onto the neutral's before building J and K.
#[derive(Debug, Clone, PartialEq)]
pub struct Alignment {
    /// Mass-weighted rms distance between the aligned structures, bohr (a measure of the
    /// geometry change on ionization).
    pub rms_bohr: f64,
    /// The ion's equilibrium structure in the neutral's frame, bohr.
    pub ion_geometry: Vec<[f64; 3]>,
}

/// Builds J and K from the two harmonic states (module comment), aligning the ion's
/// structure and modes onto the neutral's Eckart frame first. Both states must list the
/// same atoms in the same order with the same masses and have the same number of modes.
pub fn build(neutral: &HarmonicState, ion: &HarmonicState) -> Result<(Duschinsky, Alignment)> {
    neutral.validate("neutral")?;
    ion.validate("ion")?;
    let n = neutral.n_atoms();
    if ion.n_atoms() != n {
        return Err(Error::input(format!(
            "neutral has {n} atoms, ion has {}",
            ion.n_atoms()
        )));
    }
    for a in 0..n {
        let (m1, m2) = (neutral.masses[a], ion.masses[a]);
        if (m1 - m2).abs() > 1e-9 * m1.max(m2) {
            return Err(Error::input(format!(
                "atom {}: mass {m1} in the neutral but {m2} in the ion (same isotopes needed)",
                a + 1
            )));
        }
    }
    if neutral.n_modes() != ion.n_modes() {
        return Err(Error::input(format!(
            "neutral has {} modes, ion has {} (a linear/bent change needs a different model)",
            neutral.n_modes(),
            ion.n_modes()
        )));
    }
    let motion = best_fit(&ion.geometry, &neutral.geometry, &neutral.masses);
    let ion_geometry: Vec<[f64; 3]> = ion
        .geometry
        .iter()
        .map(|&x| motion.apply_point(x))
        .collect();
    let ion_modes: Vec<Vec<f64>> = ion.modes.iter().map(|c| motion.apply_vector(c)).collect();
    // M^{1/2} (x_i − x_f)
    let mut dx = vec![0.0; 3 * n];
    for a in 0..n {
        let s = neutral.masses[a].sqrt();
        for c in 0..3 {
            dx[3 * a + c] = s * (neutral.geometry[a][c] - ion_geometry[a][c]);
        }
    }
    let j: Vec<Vec<f64>> = ion_modes
        .iter()
        .map(|lf| neutral.modes.iter().map(|li| dot(lf, li)).collect())
        .collect();
    let k: Vec<f64> = ion_modes.iter().map(|lf| dot(lf, &dx)).collect();
    Ok((
        Duschinsky {
            j,
            k,
            initial_frequencies: neutral.frequencies.clone(),
            final_frequencies: ion.frequencies.clone(),
        },
        Alignment {
            rms_bohr: motion.rms,
            ion_geometry,
        },
    ))
}

#[cfg(test)]
mod tests {
    use super::super::align::tests::axis_angle;
    use super::*;

    /// A bent triatomic (water-like shape, invented masses) with modes from a made-up but
    /// orthonormal set: the three internal directions orthogonalised against the six
    /// rigid-body directions. Only orthonormality matters for these tests.
    fn triatomic(geom: Vec<[f64; 3]>, masses: Vec<f64>) -> HarmonicState {
        let n = geom.len();
        let c = super::super::align::centre_of_mass(&geom, &masses);
        let mut basis: Vec<Vec<f64>> = Vec::new();
        // translations and rotations (mass-weighted)
        for ax in 0..3 {
            let mut v = vec![0.0; 3 * n];
            for a in 0..n {
                v[3 * a + ax] = masses[a].sqrt();
            }
            basis.push(v);
        }
        for ax in 0..3 {
            let e = [
                (ax == 0) as i32 as f64,
                (ax == 1) as i32 as f64,
                (ax == 2) as i32 as f64,
            ];
            let mut v = vec![0.0; 3 * n];
            for a in 0..n {
                let r = [geom[a][0] - c[0], geom[a][1] - c[1], geom[a][2] - c[2]];
                let x = [
                    e[1] * r[2] - e[2] * r[1],
                    e[2] * r[0] - e[0] * r[2],
                    e[0] * r[1] - e[1] * r[0],
                ];
                for q in 0..3 {
                    v[3 * a + q] = masses[a].sqrt() * x[q];
                }
            }
            basis.push(v);
        }
        let mut seed = 0.37f64;
        for _ in 0..3 * n {
            let v: Vec<f64> = (0..3 * n)
                .map(|_| {
                    seed = (seed * 7.13 + 0.219).fract();
                    seed - 0.5
                })
                .collect();
            basis.push(v);
        }
        // Gram–Schmidt, keep 3N − 6 vibrational directions
        let mut ortho: Vec<Vec<f64>> = Vec::new();
        for mut v in basis {
            for o in &ortho {
                let p = dot(&v, o);
                for (x, y) in v.iter_mut().zip(o) {
                    *x -= p * y;
                }
            }
            let nv = dot(&v, &v).sqrt();
            if nv > 1e-8 {
                ortho.push(v.iter().map(|x| x / nv).collect());
            }
            if ortho.len() == 3 * n {
                break;
            }
        }
        let modes: Vec<Vec<f64>> = ortho[6..].to_vec();
        let nm = modes.len();
        HarmonicState {
            geometry: geom,
            masses,
            modes,
            frequencies: (0..nm).map(|k| 0.005 + 0.003 * k as f64).collect(),
        }
    }

    #[test]
    fn rigid_motion_is_not_displacement() {
        // Exact condition: an "ion" that is the neutral rotated and translated, with the
        // modes turned along, gives J = 1 and K = 0.
        let neutral = triatomic(
            vec![
                [0.0, 0.0, 0.2],
                [1.4, 0.0, -0.9],
                [-1.4, 0.0, -0.9],
                [0.0, 1.1, 0.6],
            ],
            vec![29000.0, 1837.0, 1837.0, 25000.0],
        );
        let r = axis_angle([0.2, 0.9, -0.4], 1.3);
        let rot = |x: [f64; 3]| -> [f64; 3] {
            [
                r[0][0] * x[0] + r[0][1] * x[1] + r[0][2] * x[2],
                r[1][0] * x[0] + r[1][1] * x[1] + r[1][2] * x[2],
                r[2][0] * x[0] + r[2][1] * x[1] + r[2][2] * x[2],
            ]
        };
        let mut ion = neutral.clone();
        ion.geometry = neutral
            .geometry
            .iter()
            .map(|&x| {
                let y = rot(x);
                [y[0] - 2.0, y[1] + 0.3, y[2] + 1.0]
            })
            .collect();
        ion.modes = neutral
            .modes
            .iter()
            .map(|c| c.chunks(3).flat_map(|v| rot([v[0], v[1], v[2]])).collect())
            .collect();
        let (d, al) = build(&neutral, &ion).unwrap();
        assert!(al.rms_bohr < 1e-10);
        for (f, row) in d.j.iter().enumerate() {
            for (i, &v) in row.iter().enumerate() {
                assert!(
                    (v - if f == i { 1.0 } else { 0.0 }).abs() < 1e-10,
                    "J {f} {i} = {v}"
                );
            }
        }
        for &k in &d.k {
            assert!(k.abs() < 1e-8, "K = {k}");
        }
        assert!(d.orthogonality_defect() < 1e-10);
    }

    #[test]
    fn displacement_sign_follows_the_stated_convention() {
        // Stated convention: K = L_fᵀ M^{1/2} (x_i − x_f). Move the ion along its own mode
        // 0 by +δ (mass-weighted): the neutral sits at −δ in ion coordinates.
        let neutral = triatomic(
            vec![
                [0.0, 0.0, 0.2],
                [1.4, 0.0, -0.9],
                [-1.4, 0.0, -0.9],
                [0.0, 1.1, 0.6],
            ],
            vec![29000.0, 1837.0, 1837.0, 25000.0],
        );
        let delta = 3.0;
        let mut ion = neutral.clone();
        for a in 0..ion.n_atoms() {
            for c in 0..3 {
                ion.geometry[a][c] +=
                    delta * neutral.modes[0][3 * a + c] / neutral.masses[a].sqrt();
            }
        }
        let (d, _) = build(&neutral, &ion).unwrap();
        assert!((d.k[0] + delta).abs() < 1e-6, "K0 = {}", d.k[0]);
        for &k in &d.k[1..] {
            assert!(k.abs() < 1e-6);
        }
    }

    #[test]
    fn mismatched_atoms_are_input_errors() {
        let neutral = triatomic(
            vec![
                [0.0, 0.0, 0.2],
                [1.4, 0.0, -0.9],
                [-1.4, 0.0, -0.9],
                [0.0, 1.1, 0.6],
            ],
            vec![29000.0, 1837.0, 1837.0, 25000.0],
        );
        let mut ion = neutral.clone();
        ion.masses[1] = 3670.0;
        assert_eq!(build(&neutral, &ion).unwrap_err().exit_code(), 2);
    }
}
