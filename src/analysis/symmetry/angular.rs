//! How a point operation acts on the AOs of one shell: the matrix D(R) with
//! f_m(R⁻¹ u) = Σ_n f_n(u) D_nm for the shell's functions f (same radial factor, so only the
//! angular polynomials matter).
//!
//! The angular polynomials are the integral engine's own: raw Cartesian monomials
//! (`basis::cartesian::components`) times `basis::solid_harmonics::transform`, i.e. the
//! same order, normalisation and real-solid-harmonic phases as the AOs in S and C (no second
//! copy of the conventions). D is obtained exactly, up to rounding, by least squares over a
//! fixed set of points on the unit sphere: the shell's function space is closed under
//! rotations, so the fit has zero residual.

use super::ops::{self, Mat3};
use crate::basis::cartesian::components;
use crate::basis::solid_harmonics;

/// Values of a shell's angular functions (AO order of `basis::shell`) at `u`.
pub fn angular_values(l: usize, pure: bool, u: &[f64; 3]) -> Vec<f64> {
    let comps = components(l);
    let raw: Vec<f64> = comps
        .iter()
        .map(|c| u[0].powi(c[0] as i32) * u[1].powi(c[1] as i32) * u[2].powi(c[2] as i32))
        .collect();
    let t = solid_harmonics::transform(l, pure);
    let nc = raw.len();
    let nf = t.len() / nc;
    (0..nf)
        .map(|k| (0..nc).map(|c| t[k * nc + c] * raw[c]).sum())
        .collect()
}

/// Points on the unit sphere (golden-angle spiral), deterministic.
fn sphere_points(k: usize) -> Vec<[f64; 3]> {
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    (0..k)
        .map(|i| {
            let z = 1.0 - 2.0 * (i as f64 + 0.5) / k as f64;
            let r = (1.0 - z * z).sqrt();
            let phi = golden * i as f64;
            [r * phi.cos(), r * phi.sin(), z]
        })
        .collect()
}

/// D(R) of an (l, pure) shell, row-major n×n: entry [n * nf + m] = D_nm.
pub fn shell_rotation(l: usize, pure: bool, r: &Mat3) -> Vec<f64> {
    if l == 0 {
        return vec![1.0];
    }
    if l == 1 {
        // p functions are (x, y, z) times the radial part: D = R.
        return r.iter().flat_map(|row| row.iter().copied()).collect();
    }
    let nf = angular_values(l, pure, &[0.0, 0.0, 1.0]).len();
    let pts = sphere_points(4 * nf + 8);
    let rt = ops::transpose(r);
    let f: Vec<Vec<f64>> = pts.iter().map(|u| angular_values(l, pure, u)).collect();
    let g: Vec<Vec<f64>> = pts
        .iter()
        .map(|u| angular_values(l, pure, &ops::apply(&rt, u)))
        .collect();
    // Normal equations (FᵀF) D = FᵀG.
    let mut ftf = vec![vec![0.0; nf]; nf];
    for row in &f {
        for a in 0..nf {
            for b in 0..nf {
                ftf[a][b] += row[a] * row[b];
            }
        }
    }
    let mut d = vec![0.0; nf * nf];
    for m in 0..nf {
        let mut rhs = vec![0.0; nf];
        for (fr, gr) in f.iter().zip(&g) {
            for a in 0..nf {
                rhs[a] += fr[a] * gr[m];
            }
        }
        let col = bandcast_linalg::solve_small(&ftf, &rhs)
            .expect("angular functions of a shell are linearly independent on the sphere");
        for n in 0..nf {
            d[n * nf + m] = col[n];
        }
    }
    d
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::evaluate::shell_values;
    use crate::basis::Shell;

    fn matmul(a: &[f64], b: &[f64], n: usize) -> Vec<f64> {
        let mut c = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..n {
                c[i * n + j] = (0..n).map(|k| a[i * n + k] * b[k * n + j]).sum();
            }
        }
        c
    }

    #[test]
    fn representation_property_and_exactness() {
        let r1 = ops::rotation(&ops::unit(&[1.0, 2.0, 3.0], 1e-9).unwrap(), 0.7);
        let r2 = ops::improper(&ops::unit(&[-1.0, 0.5, 0.2], 1e-9).unwrap(), 1.1);
        for l in 0..=4 {
            for pure in [false, true] {
                let d1 = shell_rotation(l, pure, &r1);
                let d2 = shell_rotation(l, pure, &r2);
                let d12 = shell_rotation(l, pure, &ops::mul(&r1, &r2));
                let n = (d1.len() as f64).sqrt() as usize;
                let p = matmul(&d1, &d2, n);
                let err = p
                    .iter()
                    .zip(&d12)
                    .map(|(a, b)| (a - b).abs())
                    .fold(0.0, f64::max);
                assert!(err < 1e-10, "l={l} pure={pure}: {err}");
                // Identity gives the unit matrix.
                let e = shell_rotation(l, pure, &ops::IDENTITY);
                for i in 0..n {
                    for j in 0..n {
                        let want = if i == j { 1.0 } else { 0.0 };
                        assert!((e[i * n + j] - want).abs() < 1e-10);
                    }
                }
            }
        }
    }

    /// The fitted D reproduces the engine's AO values (with radial part) at rotated points.
    #[test]
    fn matches_the_engine_ao_values() {
        let r = ops::rotation(&ops::unit(&[0.2, -1.0, 0.4], 1e-9).unwrap(), 2.1);
        for l in 2..=4 {
            for pure in [false, true] {
                let shell = Shell {
                    l,
                    pure,
                    center: [0.3, -0.2, 0.1],
                    atom: 0,
                    exponents: vec![1.3, 0.4],
                    coefficients: vec![0.6, 0.5],
                };
                let d = shell_rotation(l, pure, &r);
                let nf = shell.n_functions();
                let rt = ops::transpose(&r);
                for u in [[0.3, 0.8, -0.5], [1.1, -0.2, 0.4]] {
                    let at = |v: [f64; 3]| shell_values(&shell, ops::add(&shell.center, &v));
                    let lhs = at(ops::apply(&rt, &u));
                    let f = at(u);
                    for m in 0..nf {
                        let rhs: f64 = (0..nf).map(|n| f[n] * d[n * nf + m]).sum();
                        assert!((lhs[m] - rhs).abs() < 1e-10, "l={l} pure={pure} m={m}");
                    }
                }
            }
        }
    }
}
