//! Cartesian → real solid harmonic transformation.
//!
//! Real solid harmonics S_lm, m = −l..+l (m > 0 cos-type, m < 0 sin-type, no Condon–Shortley
//! phase), written as polynomials in x, y, z with the closed form of Helgaker, Jørgensen &
//! Olsen, *Molecular Electronic-Structure Theory* (2000), eq. 6.4.48:
//!
//! S_lm ∝ Σ_{t=0}^{⌊(l−|m|)/2⌋} Σ_{u=0}^{t} Σ_{v} C^{lm}_{tuv} x^{2t+|m|−2(u+v)} y^{2(u+v)} z^{l−2t−|m|},
//! C^{lm}_{tuv} = (−1)^{t+v−v_m} (1/4)^t binom(l,t) binom(l−t,|m|+t) binom(t,u) binom(|m|,2v),
//!
//! with v = v_m, v_m + 1, …, ⌊|m|/2 − v_m⌋ + v_m and v_m = 0 (m ≥ 0) or 1/2 (m < 0).
//! The overall factor is fixed numerically so that each function has unit norm.
//!
//! The matrices here act on *raw* Cartesian components: the polynomial x^a y^b z^c times
//! the contracted radial part normalised for the axial component x^l (see
//! `crate::basis::normalize`). For Cartesian shells the matrix is diagonal (the component
//! factors); for s and p it is the identity.

use crate::basis::cartesian::{components, double_factorial, n_cartesian, MAX_L};
use crate::basis::normalize::component_factor;
use std::sync::OnceLock;

fn binom(n: i64, k: i64) -> f64 {
    if k < 0 || k > n {
        return 0.0;
    }
    let mut r = 1.0;
    for i in 0..k {
        r = r * (n - i) as f64 / (i + 1) as f64;
    }
    r
}

/// Unnormalised polynomial coefficients of S_lm over the Cartesian components of `l`.
pub fn solid_harmonic_polynomial(l: usize, m: i64) -> Vec<f64> {
    let comps = components(l);
    let mut c = vec![0.0; comps.len()];
    let am = m.unsigned_abs() as i64;
    let li = l as i64;
    let vm2 = if m < 0 { 1 } else { 0 }; // 2 v_m
    for t in 0..=((li - am) / 2) {
        for u in 0..=t {
            // k = 2v runs over vm2, vm2 + 2, … ≤ |m|
            let mut k = vm2;
            while k <= am {
                let sign = if (t + (k - vm2) / 2) % 2 == 0 {
                    1.0
                } else {
                    -1.0
                };
                let coef = sign
                    * 0.25f64.powi(t as i32)
                    * binom(li, t)
                    * binom(li - t, am + t)
                    * binom(t, u)
                    * binom(am, k);
                let px = 2 * t + am - 2 * u - k;
                let py = 2 * u + k;
                let pz = li - 2 * t - am;
                if px >= 0 && pz >= 0 {
                    let idx = comps
                        .iter()
                        .position(|cc| {
                            cc[0] as i64 == px && cc[1] as i64 == py && cc[2] as i64 == pz
                        })
                        .expect("component exists");
                    c[idx] += coef;
                }
                k += 2;
            }
        }
    }
    c
}

/// Angular overlap Ω_ij = Π_k (a_ik + a_jk − 1)!! (zero if any sum is odd): the overlap of
/// two raw components of one shell up to a factor common to the whole shell.
fn angular_overlap(a: [usize; 3], b: [usize; 3]) -> f64 {
    let mut r = 1.0;
    for k in 0..3 {
        let s = a[k] + b[k];
        if s % 2 == 1 {
            return 0.0;
        }
        r *= double_factorial(s as i64 - 1);
    }
    r
}

fn build(l: usize, pure: bool) -> Vec<f64> {
    let comps = components(l);
    let nc = comps.len();
    if !pure || l < 2 {
        let mut t = vec![0.0; nc * nc];
        for (i, c) in comps.iter().enumerate() {
            t[i * nc + i] = component_factor(*c);
        }
        return t;
    }
    let axial = double_factorial(2 * l as i64 - 1);
    let mut t = Vec::with_capacity((2 * l + 1) * nc);
    for m in -(l as i64)..=(l as i64) {
        let c = solid_harmonic_polynomial(l, m);
        let mut n2 = 0.0;
        for i in 0..nc {
            for j in 0..nc {
                n2 += c[i] * c[j] * angular_overlap(comps[i], comps[j]);
            }
        }
        let f = 1.0 / (n2 / axial).sqrt();
        t.extend(c.iter().map(|x| x * f));
    }
    t
}

/// Row-major matrix (n_functions × n_cartesian) from raw Cartesian components of a shell
/// with angular momentum `l` to its final, normalised AOs.
pub fn transform(l: usize, pure: bool) -> &'static [f64] {
    static TABLE: OnceLock<Vec<[Vec<f64>; 2]>> = OnceLock::new();
    let t = TABLE.get_or_init(|| {
        (0..=MAX_L)
            .map(|l| [build(l, false), build(l, true)])
            .collect()
    });
    assert!(
        l <= MAX_L,
        "angular momentum {l} above the supported maximum {MAX_L}"
    );
    &t[l][pure as usize]
}

/// Number of final functions for (l, pure).
pub fn n_functions(l: usize, pure: bool) -> usize {
    if pure && l >= 2 {
        2 * l + 1
    } else {
        n_cartesian(l)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn d_functions_have_textbook_form() {
        // Real d harmonics (common practice): d0 ∝ 2z² − x² − y², d2 ∝ x² − y², d−2 ∝ xy.
        let d0 = solid_harmonic_polynomial(2, 0);
        // order xx, xy, xz, yy, yz, zz
        assert!((d0[0] / d0[5] + 0.5).abs() < 1e-14 && (d0[3] / d0[5] + 0.5).abs() < 1e-14);
        let d2 = solid_harmonic_polynomial(2, 2);
        assert!((d2[0] + d2[3]).abs() < 1e-14 && d2[1] == 0.0);
        let dm2 = solid_harmonic_polynomial(2, -2);
        assert!(dm2[1] != 0.0 && dm2[0] == 0.0 && dm2[3] == 0.0);
    }

    #[test]
    fn pure_functions_are_orthonormal() {
        // T Ω' Tᵀ = 1 where Ω' is the raw-component overlap over the axial norm.
        for l in 2..=MAX_L {
            let comps = components(l);
            let nc = comps.len();
            let t = transform(l, true);
            let axial = double_factorial(2 * l as i64 - 1);
            for a in 0..2 * l + 1 {
                for b in 0..2 * l + 1 {
                    let mut s = 0.0;
                    for i in 0..nc {
                        for j in 0..nc {
                            s +=
                                t[a * nc + i] * t[b * nc + j] * angular_overlap(comps[i], comps[j])
                                    / axial;
                        }
                    }
                    let want = if a == b { 1.0 } else { 0.0 };
                    assert!((s - want).abs() < 1e-12, "l={l} a={a} b={b} s={s}");
                }
            }
        }
    }
}
