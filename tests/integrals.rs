//! Integral checks against textbook values, closed forms and independent quadrature.

use bandcast::basis::{BasisSet, Shell};
use bandcast::chem::{Atom, Molecule};
use bandcast::integrals::{dipole, eri_tensor, kinetic, nuclear, overlap, EriEngine};

mod common;
use common::crawford_water as water;

fn shell(
    l: usize,
    pure: bool,
    center: [f64; 3],
    atom: usize,
    exps: &[f64],
    coefs: &[f64],
) -> Shell {
    Shell {
        l,
        pure,
        center,
        atom,
        exponents: exps.to_vec(),
        coefficients: coefs.to_vec(),
    }
}

/// STO-3G 1s for ζ = 1.24 (Szabo & Ostlund, *Modern Quantum Chemistry* (1989), §3.5.2):
/// exponents 3.42525091, 0.62391373, 0.16885540, coefficients for normalised primitives.
fn sto3g_h(center: [f64; 3], atom: usize) -> Shell {
    shell(
        0,
        false,
        center,
        atom,
        &[3.42525091, 0.62391373, 0.16885540],
        &[0.15432897, 0.53532814, 0.44463454],
    )
}

fn h2() -> (BasisSet, Molecule) {
    let r = 1.4;
    let basis = BasisSet::from_shells(
        "STO-3G",
        vec![sto3g_h([0.0; 3], 0), sto3g_h([0.0, 0.0, r], 1)],
    );
    let mol = Molecule::new(vec![
        Atom {
            z: 1,
            position: [0.0; 3],
        },
        Atom {
            z: 1,
            position: [0.0, 0.0, r],
        },
    ]);
    (basis, mol)
}

#[test]
fn h2_sto3g_matches_szabo_ostlund() {
    // Szabo & Ostlund (1989) ch. 3, H2 STO-3G at R = 1.4 bohr (printed 4 digits, from memory).
    let (basis, mol) = h2();
    let s = overlap(&basis);
    let t = kinetic(&basis);
    let v = nuclear(&basis, &mol);
    let g = eri_tensor(&basis);
    let n = 2;
    let e = |i: usize, j: usize, k: usize, l: usize| g[((i * n + j) * n + k) * n + l];
    let tol = 2e-4;
    assert!((s[(0, 0)] - 1.0).abs() < 1e-12);
    assert!((s[(0, 1)] - 0.6593).abs() < tol, "S12 = {}", s[(0, 1)]);
    assert!((t[(0, 0)] - 0.7600).abs() < tol, "T11 = {}", t[(0, 0)]);
    assert!((t[(0, 1)] - 0.2365).abs() < tol, "T12 = {}", t[(0, 1)]);
    // Core Hamiltonian H11 = −1.1204, H12 = −0.9584 (Szabo & Ostlund eq. 3.234, from memory).
    let h11 = t[(0, 0)] + v[(0, 0)];
    let h12 = t[(0, 1)] + v[(0, 1)];
    assert!((h11 + 1.1204).abs() < tol, "H11 = {h11}");
    assert!((h12 + 0.9584).abs() < tol, "H12 = {h12}");
    // Attraction to one nucleus: V11(1) = −1.2266, V11(2) = −0.6538, V12(1) = −0.5974
    // (Szabo & Ostlund eqs. 3.231–3.232, from memory).
    let v1 = bandcast::integrals::nuclear_from_charges(&basis, &[(1.0, [0.0; 3])]);
    let v2 = bandcast::integrals::nuclear_from_charges(&basis, &[(1.0, [0.0, 0.0, 1.4])]);
    assert!((v1[(0, 0)] + 1.2266).abs() < tol, "V11(1) = {}", v1[(0, 0)]);
    assert!((v2[(0, 0)] + 0.6538).abs() < tol, "V11(2) = {}", v2[(0, 0)]);
    assert!((v1[(0, 1)] + 0.5974).abs() < tol, "V12(1) = {}", v1[(0, 1)]);
    assert!(
        (e(0, 0, 0, 0) - 0.7746).abs() < tol,
        "(11|11) = {}",
        e(0, 0, 0, 0)
    );
    assert!(
        (e(0, 0, 1, 1) - 0.5697).abs() < tol,
        "(11|22) = {}",
        e(0, 0, 1, 1)
    );
    assert!(
        (e(1, 0, 0, 0) - 0.4441).abs() < tol,
        "(21|11) = {}",
        e(1, 0, 0, 0)
    );
    assert!(
        (e(1, 0, 1, 0) - 0.2970).abs() < tol,
        "(21|21) = {}",
        e(1, 0, 1, 0)
    );
}

// ---------------------------------------------------------------------------------------
// Independent reference machinery: Gauss quadrature rules from the Golub–Welsch algorithm
// (Golub & Welsch, Math. Comp. 23 (1969) 221), Gaussian-transform of 1/r
// (1/r = 2/√π ∫₀^∞ exp(−t² r²) dt, common practice) and exact Gauss–Hermite quadrature of
// polynomial × Gaussian integrands. Only the normalised contraction coefficients and the
// Cartesian → AO matrices are taken from the library (they are checked on a grid below).

use bandcast::basis::cartesian::components;
use bandcast::basis::evaluate::shell_values;
use bandcast::basis::normalize::contracted_coefficients;
use bandcast::basis::solid_harmonics::transform;
use bandcast_linalg::Mat;

/// Nodes and weights of the n-point Gauss–Hermite rule (weight exp(−x²)).
fn gauss_hermite(n: usize) -> (Vec<f64>, Vec<f64>) {
    let mut j = Mat::<f64>::zeros(n, n);
    for k in 1..n {
        let b = (k as f64 / 2.0).sqrt();
        j[(k, k - 1)] = b;
        j[(k - 1, k)] = b;
    }
    let (x, v) = bandcast_linalg::eigh(j.as_ref());
    let w = (0..n)
        .map(|i| std::f64::consts::PI.sqrt() * v[(0, i)].powi(2))
        .collect();
    (x, w)
}

/// Nodes and weights of the n-point Gauss–Legendre rule on [0, 1].
fn gauss_legendre01(n: usize) -> (Vec<f64>, Vec<f64>) {
    let mut j = Mat::<f64>::zeros(n, n);
    for k in 1..n {
        let kf = k as f64;
        let b = kf / (4.0 * kf * kf - 1.0).sqrt();
        j[(k, k - 1)] = b;
        j[(k - 1, k)] = b;
    }
    let (x, v) = bandcast_linalg::eigh(j.as_ref());
    let xs = x.iter().map(|t| 0.5 * (t + 1.0)).collect();
    let w = (0..n).map(|i| v[(0, i)].powi(2)).collect(); // 2 v0² on [−1,1], halved
    (xs, w)
}

struct Quad {
    gh: (Vec<f64>, Vec<f64>),
    gl: (Vec<f64>, Vec<f64>),
}

fn quad() -> Quad {
    Quad {
        gh: gauss_hermite(14),
        gl: gauss_legendre01(120),
    }
}

/// ∫ (x−A)^i (x−B)^j exp(−α(x−A)² − β(x−B)² − τ(x−C)²) dx for all i ≤ li, j ≤ lj.
fn one_d_three_centre(
    li: usize,
    lj: usize,
    a: f64,
    b: f64,
    c: f64,
    al: f64,
    be: f64,
    tau: f64,
    q: &Quad,
) -> Vec<f64> {
    let s = al + be + tau;
    let x0 = (al * a + be * b + tau * c) / s;
    let k = (-(al * a * a + be * b * b + tau * c * c) + s * x0 * x0).exp() / s.sqrt();
    let mut out = vec![0.0; (li + 1) * (lj + 1)];
    for (y, w) in q.gh.0.iter().zip(&q.gh.1) {
        let x = x0 + y / s.sqrt();
        for i in 0..=li {
            for j in 0..=lj {
                out[i * (lj + 1) + j] += w * k * (x - a).powi(i as i32) * (x - b).powi(j as i32);
            }
        }
    }
    out
}

/// ∫∫ (x1−A)^i (x1−B)^j (x2−C)^k (x2−D)^l exp(−α x1A² − β x1B² − γ x2C² − δ x2D² − τ (x1−x2)²).
#[allow(clippy::too_many_arguments)]
fn one_d_four_centre(ls: [usize; 4], cs: [f64; 4], es: [f64; 4], tau: f64, q: &Quad) -> Vec<f64> {
    let [a, b, c, d] = cs;
    let p = es[0] + es[1];
    let qq = es[2] + es[3];
    let pc = (es[0] * a + es[1] * b) / p;
    let qc = (es[2] * c + es[3] * d) / qq;
    let kab = (-es[0] * es[1] / p * (a - b).powi(2)).exp();
    let kcd = (-es[2] * es[3] / qq * (c - d).powi(2)).exp();
    // quadratic form [[p+τ, −τ], [−τ, q+τ]]
    let (m11, m12, m22) = (p + tau, -tau, qq + tau);
    let det = m11 * m22 - m12 * m12;
    let (b1, b2) = (p * pc, qq * qc);
    let mu1 = (m22 * b1 - m12 * b2) / det;
    let mu2 = (m11 * b2 - m12 * b1) / det;
    let v0 = p * pc * pc + qq * qc * qc - (b1 * mu1 + b2 * mu2);
    // Cholesky M = L Lᵀ; x − μ = L^{−T} y
    let l11 = m11.sqrt();
    let l21 = m12 / l11;
    let l22 = (m22 - l21 * l21).sqrt();
    let pref = kab * kcd * (-v0).exp() / det.sqrt();
    let n = [ls[0] + 1, ls[1] + 1, ls[2] + 1, ls[3] + 1];
    let mut out = vec![0.0; n[0] * n[1] * n[2] * n[3]];
    let (gx, gw) = &q.gh;
    for (y1, w1) in gx.iter().zip(gw) {
        for (y2, w2) in gx.iter().zip(gw) {
            // Lᵀ = [[l11, l21], [0, l22]]; solve Lᵀ z = y
            let z2 = y2 / l22;
            let z1 = (y1 - l21 * z2) / l11;
            let x1 = mu1 + z1;
            let x2 = mu2 + z2;
            let w = w1 * w2 * pref;
            let pa: Vec<f64> = (0..n[0]).map(|i| (x1 - a).powi(i as i32)).collect();
            let pb: Vec<f64> = (0..n[1]).map(|i| (x1 - b).powi(i as i32)).collect();
            let pcv: Vec<f64> = (0..n[2]).map(|i| (x2 - c).powi(i as i32)).collect();
            let pd: Vec<f64> = (0..n[3]).map(|i| (x2 - d).powi(i as i32)).collect();
            let mut idx = 0;
            for i in 0..n[0] {
                for j in 0..n[1] {
                    let wij = w * pa[i] * pb[j];
                    for k in 0..n[2] {
                        for l in 0..n[3] {
                            out[idx] += wij * pcv[k] * pd[l];
                            idx += 1;
                        }
                    }
                }
            }
        }
    }
    out
}

/// Apply the AO matrices of the listed shells to a raw Cartesian array (row-major).
fn to_ao(mut data: Vec<f64>, shells: &[&Shell]) -> Vec<f64> {
    let mut dims: Vec<usize> = shells.iter().map(|s| components(s.l).len()).collect();
    for (axis, s) in shells.iter().enumerate() {
        let t = transform(s.l, s.pure);
        let rows = s.n_functions();
        let cols = dims[axis];
        let outer: usize = dims[..axis].iter().product();
        let inner: usize = dims[axis + 1..].iter().product();
        let mut out = vec![0.0; outer * rows * inner];
        for o in 0..outer {
            for r in 0..rows {
                for c in 0..cols {
                    for i in 0..inner {
                        out[(o * rows + r) * inner + i] +=
                            t[r * cols + c] * data[(o * cols + c) * inner + i];
                    }
                }
            }
        }
        data = out;
        dims[axis] = rows;
    }
    data
}

/// Reference ⟨a| Σ_C −Z_C/|r−C| |b⟩ by Gaussian transform + Gauss–Hermite.
fn ref_nuclear(sa: &Shell, sb: &Shell, charges: &[(f64, [f64; 3])], q: &Quad) -> Vec<f64> {
    let (da, db) = (contracted_coefficients(sa), contracted_coefficients(sb));
    let (ca, cb) = (components(sa.l), components(sb.l));
    let mut cart = vec![0.0; ca.len() * cb.len()];
    for (i, &al) in sa.exponents.iter().enumerate() {
        for (j, &be) in sb.exponents.iter().enumerate() {
            for &(z, c) in charges {
                for (s, ws) in q.gl.0.iter().zip(&q.gl.1) {
                    let t = s / (1.0 - s);
                    let dt = ws / (1.0 - s).powi(2);
                    let f: Vec<Vec<f64>> = (0..3)
                        .map(|d| {
                            one_d_three_centre(
                                sa.l,
                                sb.l,
                                sa.center[d],
                                sb.center[d],
                                c[d],
                                al,
                                be,
                                t * t,
                                q,
                            )
                        })
                        .collect();
                    let w = -z * 2.0 / std::f64::consts::PI.sqrt() * dt * da[i] * db[j];
                    let lj = sb.l + 1;
                    for (ia, a) in ca.iter().enumerate() {
                        for (ib, b) in cb.iter().enumerate() {
                            cart[ia * cb.len() + ib] += w
                                * f[0][a[0] * lj + b[0]]
                                * f[1][a[1] * lj + b[1]]
                                * f[2][a[2] * lj + b[2]];
                        }
                    }
                }
            }
        }
    }
    to_ao(cart, &[sa, sb])
}

/// Reference (ab|cd) by Gaussian transform + exact 2-D Gauss–Hermite per direction.
fn ref_eri(sh: [&Shell; 4], q: &Quad) -> Vec<f64> {
    // a shell with exponent 0 is the "unit" function 1 (raw coefficient 1)
    let coefs: Vec<Vec<f64>> = sh
        .iter()
        .map(|s| {
            if s.exponents == [0.0] {
                vec![1.0]
            } else {
                contracted_coefficients(s)
            }
        })
        .collect();
    let comps: Vec<Vec<[usize; 3]>> = sh.iter().map(|s| components(s.l)).collect();
    let ls = [sh[0].l, sh[1].l, sh[2].l, sh[3].l];
    let n1 = [ls[0] + 1, ls[1] + 1, ls[2] + 1, ls[3] + 1];
    let idx1 = |v: [usize; 4]| ((v[0] * n1[1] + v[1]) * n1[2] + v[2]) * n1[3] + v[3];
    let ncart: usize = comps.iter().map(|c| c.len()).product();
    let mut cart = vec![0.0; ncart];
    for (i0, &e0) in sh[0].exponents.iter().enumerate() {
        for (i1, &e1) in sh[1].exponents.iter().enumerate() {
            for (i2, &e2) in sh[2].exponents.iter().enumerate() {
                for (i3, &e3) in sh[3].exponents.iter().enumerate() {
                    let cf = coefs[0][i0] * coefs[1][i1] * coefs[2][i2] * coefs[3][i3];
                    for (s, ws) in q.gl.0.iter().zip(&q.gl.1) {
                        let t = s / (1.0 - s);
                        let w = 2.0 / std::f64::consts::PI.sqrt() * ws / (1.0 - s).powi(2) * cf;
                        let f: Vec<Vec<f64>> = (0..3)
                            .map(|d| {
                                one_d_four_centre(
                                    ls,
                                    [
                                        sh[0].center[d],
                                        sh[1].center[d],
                                        sh[2].center[d],
                                        sh[3].center[d],
                                    ],
                                    [e0, e1, e2, e3],
                                    t * t,
                                    q,
                                )
                            })
                            .collect();
                        let mut idx = 0;
                        for a in &comps[0] {
                            for b in &comps[1] {
                                for c in &comps[2] {
                                    for d in &comps[3] {
                                        let mut v = w;
                                        for k in 0..3 {
                                            v *= f[k][idx1([a[k], b[k], c[k], d[k]])];
                                        }
                                        cart[idx] += v;
                                        idx += 1;
                                    }
                                }
                            }
                        }
                    }
                }
            }
        }
    }
    to_ao(cart, &sh)
}

fn max_abs_diff(a: &[f64], b: &[f64]) -> f64 {
    assert_eq!(a.len(), b.len());
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).abs())
        .fold(0.0, f64::max)
}

/// A small mixed basis: contracted and single-primitive shells s … g, pure and Cartesian,
/// on three centres.
fn mixed_shells() -> Vec<Shell> {
    let a = [0.0, 0.0, 0.0];
    let b = [0.3, -0.4, 0.5];
    let c = [-0.6, 0.2, -0.1];
    vec![
        shell(0, false, a, 0, &[3.0, 0.7], &[0.4, 0.7]),
        shell(1, false, b, 1, &[1.3, 0.5], &[0.5, 0.6]),
        shell(2, true, c, 2, &[0.9], &[1.0]),
        shell(2, false, a, 0, &[1.1, 0.6], &[0.6, 0.5]),
        shell(3, true, b, 1, &[0.8], &[1.0]),
        shell(3, false, c, 2, &[0.7], &[1.0]),
        shell(4, true, a, 0, &[0.9, 0.55], &[0.5, 0.6]),
        shell(4, false, b, 1, &[0.75], &[1.0]),
    ]
}

fn block(m: &Mat<f64>, basis: &BasisSet, a: usize, b: usize) -> Vec<f64> {
    let (oa, ob) = (basis.offsets[a], basis.offsets[b]);
    let (na, nb) = (basis.shells[a].n_functions(), basis.shells[b].n_functions());
    let mut v = Vec::new();
    for i in 0..na {
        for j in 0..nb {
            v.push(m[(oa + i, ob + j)]);
        }
    }
    v
}

#[test]
fn overlap_kinetic_dipole_match_a_3d_grid() {
    // Trapezoid rule on a uniform grid (spectrally accurate for Gaussians; common practice),
    // with AO values from `shell_values` and gradients by central differences:
    // S_ab = ∫ φa φb, T_ab = ½ ∫ ∇φa·∇φb (Green's identity), μ_ab = ∫ φa x φb.
    let shells = mixed_shells();
    let basis = BasisSet::from_shells("mixed", shells.clone());
    let s = overlap(&basis);
    let t = kinetic(&basis);
    let dip = dipole(&basis, [0.1, 0.2, -0.3]);
    let n = basis.n_basis;
    let h = 0.25;
    let half = 30i32; // box ±7.5 bohr
    let fd = 1e-4;
    let mut gs = vec![0.0; n * n];
    let mut gt = vec![0.0; n * n];
    let mut gx = vec![0.0; n * n];
    let mut vals = vec![0.0; n];
    let mut grads = vec![[0.0; 3]; n];
    let eval = |p: [f64; 3], out: &mut [f64]| {
        let mut k = 0;
        for sh in &shells {
            for v in shell_values(sh, p) {
                out[k] = v;
                k += 1;
            }
        }
    };
    let mut plus = vec![0.0; n];
    let mut minus = vec![0.0; n];
    for ix in -half..=half {
        for iy in -half..=half {
            for iz in -half..=half {
                let p = [ix as f64 * h, iy as f64 * h, iz as f64 * h];
                eval(p, &mut vals);
                if vals.iter().all(|v| v.abs() < 1e-13) {
                    continue;
                }
                for d in 0..3 {
                    let mut pp = p;
                    pp[d] += fd;
                    eval(pp, &mut plus);
                    pp[d] -= 2.0 * fd;
                    eval(pp, &mut minus);
                    for k in 0..n {
                        grads[k][d] = (plus[k] - minus[k]) / (2.0 * fd);
                    }
                }
                for i in 0..n {
                    for j in 0..=i {
                        gs[i * n + j] += vals[i] * vals[j];
                        gt[i * n + j] += 0.5
                            * (grads[i][0] * grads[j][0]
                                + grads[i][1] * grads[j][1]
                                + grads[i][2] * grads[j][2]);
                        gx[i * n + j] += vals[i] * (p[0] - 0.1) * vals[j];
                    }
                }
            }
        }
    }
    let w = h * h * h;
    let (mut es, mut et, mut ex) = (0.0f64, 0.0f64, 0.0f64);
    for i in 0..n {
        for j in 0..=i {
            es = es.max((gs[i * n + j] * w - s[(i, j)]).abs());
            et = et.max((gt[i * n + j] * w - t[(i, j)]).abs());
            ex = ex.max((gx[i * n + j] * w - dip[0][(i, j)]).abs());
        }
    }
    eprintln!("grid errors S {es:e} T {et:e} x {ex:e}");
    assert!(es < 1e-9, "overlap vs grid: {es}");
    assert!(et < 1e-6, "kinetic vs grid: {et}");
    assert!(ex < 1e-9, "dipole x vs grid: {ex}");
    for i in 0..n {
        assert!(
            (s[(i, i)] - 1.0).abs() < 1e-13,
            "S[{i},{i}] = {}",
            s[(i, i)]
        );
    }
}

#[test]
fn nuclear_matches_gaussian_transform_quadrature() {
    let q = quad();
    let shells = mixed_shells();
    let basis = BasisSet::from_shells("mixed", shells.clone());
    let charges = [(8.0, [0.1, 0.0, -0.2]), (1.0, [1.2, 0.8, 0.3])];
    let v = bandcast::integrals::nuclear_from_charges(&basis, &charges);
    let mut worst = 0.0f64;
    for a in 0..shells.len() {
        for b in 0..=a {
            let r = ref_nuclear(&shells[a], &shells[b], &charges, &q);
            worst = worst.max(max_abs_diff(&block(&v, &basis, a, b), &r));
        }
    }
    eprintln!("nuclear worst {worst:e}");
    assert!(worst < 1e-9, "nuclear vs quadrature: {worst}");
}

#[test]
fn eri_match_gaussian_transform_quadrature() {
    let q = quad();
    let shells = mixed_shells();
    let basis = BasisSet::from_shells("mixed", shells.clone());
    let engine = EriEngine::new(&basis);
    let mut out = Vec::new();
    // (ss|ss), (ps|sp), (dp|ds) mixed harmonics, (fd|gp), (gg|gg) pure/Cartesian
    for &(a, b, c, d) in &[
        (0, 0, 0, 0),
        (1, 0, 0, 1),
        (2, 1, 3, 0),
        (4, 3, 6, 1),
        (6, 7, 5, 2),
        (6, 6, 7, 7),
    ] {
        engine.shell_quartet(a, b, c, d, &mut out);
        let r = ref_eri([&shells[a], &shells[b], &shells[c], &shells[d]], &q);
        let scale = r.iter().fold(0.0f64, |m, x| m.max(x.abs()));
        let err = max_abs_diff(&out, &r);
        eprintln!("({a}{b}|{c}{d}): error {err:e}, scale {scale:e}");
        assert!(
            err < 1e-9 * scale.max(1.0),
            "({a}{b}|{c}{d}): error {err}, scale {scale}"
        );
    }
}

/// erf by Maclaurin series / Laplace continued fraction (Abramowitz & Stegun 7.1.5, 7.1.14).
fn erf(x: f64) -> f64 {
    if x < 1.6 {
        let (mut term, mut sum, mut n) = (x, x, 0.0);
        loop {
            n += 1.0;
            term *= -x * x / n;
            let add = term / (2.0 * n + 1.0);
            sum += add;
            if add.abs() < 1e-18 * sum.abs() {
                break;
            }
        }
        sum * 2.0 / std::f64::consts::PI.sqrt()
    } else {
        let mut f = x;
        for k in (1..4000).rev() {
            f = x + (k as f64 / 2.0) / f;
        }
        1.0 - (-x * x).exp() / std::f64::consts::PI.sqrt() / f
    }
}

fn f0(t: f64) -> f64 {
    if t < 1e-12 {
        1.0 - t / 3.0
    } else {
        0.5 * (std::f64::consts::PI / t).sqrt() * erf(t.sqrt())
    }
}

#[test]
fn s_functions_match_closed_forms() {
    // Szabo & Ostlund (1989) appendix A, eqs. A.9, A.11, A.33, A.41 for unnormalised 1s
    // Gaussians, times the normalisation (2α/π)^{3/4} (common practice).
    let (al, be, ga, de) = (0.9, 0.35, 1.7, 0.5);
    let (a, b, c, d) = (
        [0.0, 0.1, 0.2],
        [0.9, -0.3, 0.4],
        [-0.5, 0.6, 0.0],
        [0.2, 0.2, -0.8],
    );
    let shells = vec![
        shell(0, false, a, 0, &[al], &[1.0]),
        shell(0, false, b, 1, &[be], &[1.0]),
        shell(0, false, c, 2, &[ga], &[1.0]),
        shell(0, false, d, 3, &[de], &[1.0]),
    ];
    let basis = BasisSet::from_shells("s", shells);
    let nrm = |x: f64| (2.0 * x / std::f64::consts::PI).powf(0.75);
    let d2 = |x: [f64; 3], y: [f64; 3]| (0..3).map(|k| (x[k] - y[k]).powi(2)).sum::<f64>();
    let pi = std::f64::consts::PI;
    let p = al + be;
    let ab2 = d2(a, b);
    let s_ref = (pi / p).powf(1.5) * (-al * be / p * ab2).exp() * nrm(al) * nrm(be);
    let t_ref = al * be / p * (3.0 - 2.0 * al * be / p * ab2) * s_ref;
    let cpos = [0.3, 0.3, 0.3];
    let pc: Vec<f64> = (0..3).map(|k| (al * a[k] + be * b[k]) / p).collect();
    let pc2: f64 = (0..3).map(|k| (pc[k] - cpos[k]).powi(2)).sum();
    let v_ref = -2.0 * pi / p * 2.0 * (-al * be / p * ab2).exp() * f0(p * pc2) * nrm(al) * nrm(be);
    let q = ga + de;
    let qc: Vec<f64> = (0..3).map(|k| (ga * c[k] + de * d[k]) / q).collect();
    let pq2: f64 = (0..3).map(|k| (pc[k] - qc[k]).powi(2)).sum();
    let g_ref = 2.0 * pi.powf(2.5) / (p * q * (p + q).sqrt())
        * (-al * be / p * ab2 - ga * de / q * d2(c, d)).exp()
        * f0(p * q / (p + q) * pq2)
        * nrm(al)
        * nrm(be)
        * nrm(ga)
        * nrm(de);
    let s = overlap(&basis);
    let t = kinetic(&basis);
    let v = bandcast::integrals::nuclear_from_charges(&basis, &[(2.0, cpos)]);
    let mut out = Vec::new();
    EriEngine::new(&basis).shell_quartet(0, 1, 2, 3, &mut out);
    assert!((s[(0, 1)] - s_ref).abs() < 1e-14);
    assert!((t[(0, 1)] - t_ref).abs() < 1e-14);
    assert!(
        (v[(0, 1)] - v_ref).abs() < 1e-13,
        "{} vs {v_ref}",
        v[(0, 1)]
    );
    assert!((out[0] - g_ref).abs() < 1e-13, "{} vs {g_ref}", out[0]);
}

#[test]
fn eri_have_eightfold_permutational_symmetry() {
    // (ab|cd) = (ba|cd) = (ab|dc) = (cd|ab) for real functions (common practice).
    let shells = mixed_shells();
    let basis = BasisSet::from_shells("mixed", shells);
    let e = EriEngine::new(&basis);
    let nf = |s: usize| e.n_functions(s);
    let (a, b, c, d) = (2, 4, 7, 1);
    let mut abcd = Vec::new();
    e.shell_quartet(a, b, c, d, &mut abcd);
    let mut worst = 0.0f64;
    let mut other = Vec::new();
    for perm in 0..8 {
        let (w, x, y, z) = match perm {
            0 => (a, b, c, d),
            1 => (b, a, c, d),
            2 => (a, b, d, c),
            3 => (b, a, d, c),
            4 => (c, d, a, b),
            5 => (d, c, a, b),
            6 => (c, d, b, a),
            _ => (d, c, b, a),
        };
        e.shell_quartet(w, x, y, z, &mut other);
        for i in 0..nf(a) {
            for j in 0..nf(b) {
                for k in 0..nf(c) {
                    for l in 0..nf(d) {
                        let (ii, jj, kk, ll) = match perm {
                            0 => (i, j, k, l),
                            1 => (j, i, k, l),
                            2 => (i, j, l, k),
                            3 => (j, i, l, k),
                            4 => (k, l, i, j),
                            5 => (l, k, i, j),
                            6 => (k, l, j, i),
                            _ => (l, k, j, i),
                        };
                        let v = other[((ii * nf(x) + jj) * nf(y) + kk) * nf(z) + ll];
                        worst =
                            worst.max((v - abcd[((i * nf(b) + j) * nf(c) + k) * nf(d) + l]).abs());
                    }
                }
            }
        }
    }
    assert!(worst < 1e-14, "{worst}");
    assert!(
        abcd.iter().any(|v| v.abs() > 1e-3),
        "the quartet must not vanish"
    );
}

/// Small pure basis on a bent triatomic (s, p, pure d and pure f), for invariance tests.
fn triatomic(rot: &dyn Fn([f64; 3]) -> [f64; 3]) -> (BasisSet, Molecule) {
    let pos = [[0.0, 0.0, 0.2], [1.4, 0.0, -0.9], [-1.3, 0.3, -1.0]];
    let pos: Vec<[f64; 3]> = pos.iter().map(|&p| rot(p)).collect();
    let mut shells = Vec::new();
    for (i, &p) in pos.iter().enumerate() {
        shells.push(shell(0, true, p, i, &[5.0, 1.2, 0.35], &[0.2, 0.5, 0.5]));
        shells.push(shell(1, true, p, i, &[0.9], &[1.0]));
        if i == 0 {
            shells.push(shell(2, true, p, i, &[1.1], &[1.0]));
            shells.push(shell(3, true, p, i, &[0.8], &[1.0]));
            shells.push(shell(4, true, p, i, &[0.9], &[1.0]));
        }
    }
    let mol = Molecule::new(vec![
        Atom {
            z: 8,
            position: pos[0],
        },
        Atom {
            z: 1,
            position: pos[1],
        },
        Atom {
            z: 1,
            position: pos[2],
        },
    ]);
    (BasisSet::from_shells("tri", shells), mol)
}

fn eigenvalues(m: &Mat<f64>) -> Vec<f64> {
    bandcast_linalg::eigh(m.as_ref()).0
}

#[test]
fn integrals_are_invariant_under_translation_and_rotation() {
    // Physical invariance (common practice): translation leaves every integral unchanged;
    // a rotation acts orthogonally within each pure shell, so eigenvalues of S, T, V and
    // the Frobenius norm of the ERI array are unchanged.
    let id = |p: [f64; 3]| p;
    let shift = |p: [f64; 3]| [p[0] + 0.7, p[1] - 1.9, p[2] + 3.1];
    let (c, s) = (0.6f64.cos(), 0.6f64.sin());
    let (c2, s2) = (1.1f64.cos(), 1.1f64.sin());
    let rot = move |p: [f64; 3]| {
        // R_x(1.1) · R_z(0.6)
        let q = [c * p[0] - s * p[1], s * p[0] + c * p[1], p[2]];
        [q[0], c2 * q[1] - s2 * q[2], s2 * q[1] + c2 * q[2]]
    };
    let (b0, m0) = triatomic(&id);
    let (b1, m1) = triatomic(&shift);
    let (b2, m2) = triatomic(&rot);
    let mats = |b: &BasisSet, m: &Molecule| (overlap(b), kinetic(b), nuclear(b, m), eri_tensor(b));
    let (s0, t0, v0, g0) = mats(&b0, &m0);
    let (s1, t1, v1, g1) = mats(&b1, &m1);
    let (s2m, t2, v2, g2) = mats(&b2, &m2);
    let n = b0.n_basis;
    let mut worst = 0.0f64;
    for i in 0..n {
        for j in 0..n {
            worst = worst.max((s0[(i, j)] - s1[(i, j)]).abs());
            worst = worst.max((t0[(i, j)] - t1[(i, j)]).abs());
            worst = worst.max((v0[(i, j)] - v1[(i, j)]).abs());
        }
    }
    worst = worst.max(max_abs_diff(&g0, &g1));
    assert!(worst < 1e-11, "translation: {worst}");
    for (a, b) in [(&s0, &s2m), (&t0, &t2), (&v0, &v2)] {
        let d = max_abs_diff(&eigenvalues(a), &eigenvalues(b));
        assert!(d < 1e-10, "rotation changed eigenvalues by {d}");
    }
    let fro = |g: &[f64]| g.iter().map(|x| x * x).sum::<f64>().sqrt();
    assert!((fro(&g0) - fro(&g2)).abs() < 1e-10 * fro(&g0));
    // and the rotation does change individual elements (the test is not vacuous)
    assert!(max_abs_diff(&g0, &g2) > 1e-3);
}

#[test]
fn every_cartesian_and_pure_shell_has_unit_norm() {
    // Convention of src/basis/shell.rs: every AO normalised to 1.
    let mut shells = Vec::new();
    for l in 0..=4 {
        for pure in [false, true] {
            shells.push(shell(
                l,
                pure,
                [0.1 * l as f64, 0.0, 0.0],
                0,
                &[7.0, 1.5, 0.3],
                &[0.1, 0.5, 0.6],
            ));
        }
    }
    let basis = BasisSet::from_shells("norm", shells);
    let s = overlap(&basis);
    for i in 0..basis.n_basis {
        assert!(
            (s[(i, i)] - 1.0).abs() < 1e-13,
            "S[{i},{i}] = {}",
            s[(i, i)]
        );
    }
}

#[test]
fn dipole_origin_shift_is_exact() {
    // ⟨a|x − O'|b⟩ = ⟨a|x − O|b⟩ − (O' − O)_x S_ab (common practice).
    let basis = BasisSet::from_shells("mixed", mixed_shells());
    let s = overlap(&basis);
    let d0 = dipole(&basis, [0.0; 3]);
    let d1 = dipole(&basis, [0.5, -1.0, 2.0]);
    let shift = [0.5, -1.0, 2.0];
    for k in 0..3 {
        for i in 0..basis.n_basis {
            for j in 0..basis.n_basis {
                assert!((d1[k][(i, j)] - (d0[k][(i, j)] - shift[k] * s[(i, j)])).abs() < 1e-12);
            }
        }
    }
}

fn unit_shell() -> Shell {
    shell(0, false, [0.0; 3], 0, &[0.0], &[1.0])
}

#[test]
fn density_fitting_integrals_match_quadrature_and_closed_form() {
    use bandcast::integrals::{eri2c, eri3c, DfEngine};
    let q = quad();
    // Two s functions: (P|Q) = 2π^{5/2}/(αβ√(α+β)) F0(αβ/(α+β) R²) N_α N_β
    // (Szabo & Ostlund eq. A.41 with the partner exponents set to zero; common practice).
    let (al, be) = (1.3, 0.45);
    let (a, b) = ([0.0, 0.0, 0.0], [0.4, -0.8, 1.1]);
    let aux_s = BasisSet::from_shells(
        "aux",
        vec![
            shell(0, false, a, 0, &[al], &[1.0]),
            shell(0, false, b, 1, &[be], &[1.0]),
        ],
    );
    let m = eri2c(&aux_s);
    let pi = std::f64::consts::PI;
    let r2: f64 = (0..3).map(|k| (a[k] - b[k]).powi(2)).sum();
    let nrm = |x: f64| (2.0 * x / pi).powf(0.75);
    let want = 2.0 * pi.powf(2.5) / (al * be * (al + be).sqrt())
        * f0(al * be / (al + be) * r2)
        * nrm(al)
        * nrm(be);
    assert!((m[(0, 1)] - want).abs() < 1e-13, "{} vs {want}", m[(0, 1)]);
    assert!((m[(0, 1)] - m[(1, 0)]).abs() == 0.0);

    // Higher l against the Gaussian-transform quadrature with a unit function.
    let shells = mixed_shells();
    let aux = BasisSet::from_shells(
        "aux",
        vec![shells[4].clone(), shells[2].clone(), shells[7].clone()],
    );
    let orb = BasisSet::from_shells(
        "orb",
        vec![shells[0].clone(), shells[3].clone(), shells[5].clone()],
    );
    let unit = unit_shell();
    let m = eri2c(&aux);
    let r = ref_eri([&aux.shells[0], &unit, &aux.shells[2], &unit], &q);
    let got = block(&m, &aux, 0, 2);
    assert!(
        max_abs_diff(&got, &r) < 1e-10,
        "(f|g) metric: {}",
        max_abs_diff(&got, &r)
    );
    let b3 = eri3c(&aux, &orb);
    let n = orb.n_basis;
    let e = DfEngine::new(&aux, Some(&orb));
    let mut out = Vec::new();
    for (p, x, y) in [(0, 1, 2), (1, 2, 0), (2, 2, 2)] {
        let r = ref_eri([&aux.shells[p], &unit, &orb.shells[x], &orb.shells[y]], &q);
        e.three_centre(p, x, y, &mut out);
        let err = max_abs_diff(&out, &r);
        assert!(err < 1e-10, "(P|μν) block {p},{x},{y}: {err}");
        // the packed array holds the same numbers at the documented positions
        let (np, nx, ny) = (
            aux.shells[p].n_functions(),
            orb.shells[x].n_functions(),
            orb.shells[y].n_functions(),
        );
        for i in 0..np {
            for u in 0..nx {
                for v in 0..ny {
                    let idx =
                        ((aux.offsets[p] + i) * n + orb.offsets[x] + u) * n + orb.offsets[y] + v;
                    let idx_t =
                        ((aux.offsets[p] + i) * n + orb.offsets[y] + v) * n + orb.offsets[x] + u;
                    assert!((b3[idx] - r[(i * nx + u) * ny + v]).abs() < 1e-10);
                    assert_eq!(b3[idx], b3[idx_t]);
                }
            }
        }
    }
}

#[test]
fn every_bundled_set_gives_unit_overlap_diagonal() {
    // Convention of src/basis/shell.rs (every AO normalised); checks the normalisation of
    // every shell of every bundled set, for every element it defines (one atom each).
    for name in bandcast::basis::catalog::names() {
        let elements = bandcast::basis::catalog::elements_of(name).unwrap();
        assert!(!elements.is_empty(), "{name} defines no element");
        for z in elements {
            let mol = Molecule::new(vec![Atom {
                z,
                position: [0.0; 3],
            }]);
            let basis = bandcast::basis::load_auxiliary(name, &mol).unwrap();
            let s = overlap(&basis);
            for i in 0..basis.n_basis {
                assert!(
                    (s[(i, i)] - 1.0).abs() < 1e-10,
                    "{name} Z={z} AO {i}: S = {}",
                    s[(i, i)]
                );
            }
        }
    }
}

#[test]
fn fitting_metric_is_positive_definite_for_water() {
    // The Coulomb metric is positive definite (common practice); Cholesky must succeed.
    let mol = water();
    let aux = bandcast::basis::load_auxiliary("def2-universal-JKFIT", &mol).unwrap();
    let m = bandcast::integrals::eri2c(&aux);
    assert!(bandcast_linalg::cholesky_lower(m.as_ref()).is_some());
}

#[test]
fn general_contraction_families_match_quadrature_in_any_order() {
    // Shells sharing centre, l and exponents (split general contractions) take the
    // family path of the engine; every quartet must still match the independent
    // Gaussian-transform quadrature, whatever order the quartets are asked in.
    let q = quad();
    let a = [0.0, 0.0, 0.0];
    let b = [0.0, 1.1, 0.9];
    let e = [9.0, 2.0, 0.5];
    let shells = vec![
        shell(0, true, a, 0, &e, &[0.3, 0.6, 0.2]),
        shell(0, true, a, 0, &e, &[-0.1, -0.2, 0.9]),
        shell(1, true, a, 0, &[3.0, 0.7], &[0.4, 0.7]),
        shell(1, true, a, 0, &[3.0, 0.7], &[-0.5, 1.0]),
        shell(0, true, b, 1, &[1.5, 0.3], &[0.5, 0.5]),
        shell(2, true, b, 1, &[0.8], &[1.0]),
    ];
    let basis = BasisSet::from_shells("family", shells.clone());
    let engine = EriEngine::new(&basis);
    let mut out = Vec::new();
    let order = [
        (0, 0, 1, 0),
        (2, 1, 3, 2),
        (0, 0, 0, 0),
        (5, 4, 1, 1),
        (3, 0, 3, 3),
        (1, 0, 1, 0),
        (4, 4, 3, 2),
        (0, 0, 1, 1),
        (3, 3, 3, 3),
        (5, 1, 2, 3),
    ];
    for &(i, j, k, l) in &order {
        engine.shell_quartet(i, j, k, l, &mut out);
        let r = ref_eri([&shells[i], &shells[j], &shells[k], &shells[l]], &q);
        let err = max_abs_diff(&out, &r);
        assert!(err < 1e-11, "({i}{j}|{k}{l}): {err}");
    }
}

#[test]
fn ket_batches_equal_single_quartets_bit_for_bit() {
    // `shell_quartets` promises exactly the numbers of `shell_quartet` (a property of the
    // engine, no external value needed). Water in cc-pVTZ (Cartesian and pure variants):
    // general contractions, contracted and uncontracted shells s–f.
    let water = water();
    for harmonics in [None, Some(bandcast::basis::Harmonics::Cartesian)] {
        let basis = bandcast::basis::load("cc-pVTZ", &water, harmonics).unwrap();
        let e = EriEngine::new(&basis);
        let n = e.n_shells();
        let pairs: Vec<(usize, usize)> =
            (0..n).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
        let (mut batch, mut one) = (Vec::new(), Vec::new());
        let mut compared = 0;
        for (i, &(a, b)) in pairs.iter().enumerate() {
            // kets in an order unlike the engine's grouping, with repeats
            let mut kets: Vec<(usize, usize)> = pairs[..=i].iter().rev().copied().collect();
            kets.push(pairs[i / 2]);
            e.shell_quartets(a, b, &kets, &mut batch);
            let mut off = 0;
            for &(c, d) in &kets {
                e.shell_quartet(a, b, c, d, &mut one);
                let got = &batch[off..off + one.len()];
                assert!(
                    got.iter()
                        .zip(&one)
                        .all(|(x, y)| x.to_bits() == y.to_bits()),
                    "({a}{b}|{c}{d}) differs"
                );
                off += one.len();
                compared += 1;
            }
            assert_eq!(off, batch.len());
        }
        assert!(compared > 10000);
    }
}
