//! A model Hessian to start quasi-Newton optimisations in Cartesian coordinates:
//! R. Lindh, A. Bernhardsson, G. Karlström & P.-Å. Malmqvist, Chem. Phys. Lett. 241
//! (1995) 423. Every pair, triple and quadruple of atoms contributes a stretch, bend and
//! torsion with force constants k_r = 0.45, k_φ = 0.15, k_τ = 0.005 (hartree, bohr,
//! radian) damped by ρ_ij = exp(α_ij (r_ref,ij² − r_ij²)), with α and r_ref by the rows of
//! the periodic table of the two atoms (values from the paper, from memory):
//!
//! | rows | α (bohr⁻²) | r_ref (bohr) |
//! |---|---|---|
//! | 1–1 | 1.0000 | 1.35 |
//! | 1–2 | 0.3949 | 2.10 |
//! | 1–3 | 0.3949 | 2.53 |
//! | 2–2 | 0.2800 | 2.87 |
//! | 2–3 | 0.2800 | 3.40 |
//! | 3–3 | 0.2800 | 3.40 |
//!
//! (rows beyond the third use the third-row values). H = Σ_q k_q b_q b_qᵀ with b_q = ∂q/∂x
//! (Wilson B rows, here by central differences of q, which needs no special formulas);
//! bends within 5° of linear and torsions over such bends are left out.

use crate::chem::Molecule;

fn row(z: u32) -> usize {
    match z {
        1..=2 => 0,
        3..=10 => 1,
        _ => 2,
    }
}

fn params(za: u32, zb: u32) -> (f64, f64) {
    const ALPHA: [[f64; 3]; 3] = [
        [1.0000, 0.3949, 0.3949],
        [0.3949, 0.2800, 0.2800],
        [0.3949, 0.2800, 0.2800],
    ];
    const RREF: [[f64; 3]; 3] = [[1.35, 2.10, 2.53], [2.10, 2.87, 3.40], [2.53, 3.40, 3.40]];
    let (i, j) = (row(za), row(zb));
    (ALPHA[i][j], RREF[i][j])
}

fn sub(a: &[f64; 3], b: &[f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
fn dot(a: &[f64; 3], b: &[f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}
fn cross(a: &[f64; 3], b: &[f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}
fn norm(a: &[f64; 3]) -> f64 {
    dot(a, a).sqrt()
}

/// Bond angle at j (radian).
fn angle(x: &[[f64; 3]], i: usize, j: usize, k: usize) -> f64 {
    let (u, v) = (sub(&x[i], &x[j]), sub(&x[k], &x[j]));
    (dot(&u, &v) / (norm(&u) * norm(&v)))
        .clamp(-1.0, 1.0)
        .acos()
}

/// Dihedral i-j-k-l (radian).
fn dihedral(x: &[[f64; 3]], i: usize, j: usize, k: usize, l: usize) -> f64 {
    let (b1, b2, b3) = (sub(&x[j], &x[i]), sub(&x[k], &x[j]), sub(&x[l], &x[k]));
    let (n1, n2) = (cross(&b1, &b2), cross(&b2, &b3));
    let m = cross(&n1, &b2);
    let y = dot(&m, &n2) / norm(&b2);
    dot(&n1, &n2).atan2(y)
}

/// ∂q/∂x over the atoms in `atoms` by central differences (h = 1e-5 bohr), as a dense
/// 3N vector. Dihedral jumps of 2π are unwrapped.
fn b_row(x: &[[f64; 3]], atoms: &[usize], q: &dyn Fn(&[[f64; 3]]) -> f64) -> Vec<f64> {
    let h = 1e-5;
    let mut b = vec![0.0; 3 * x.len()];
    let mut y = x.to_vec();
    for &a in atoms {
        for k in 0..3 {
            y[a][k] = x[a][k] + h;
            let p = q(&y);
            y[a][k] = x[a][k] - h;
            let m = q(&y);
            y[a][k] = x[a][k];
            let mut d = p - m;
            if d > std::f64::consts::PI {
                d -= 2.0 * std::f64::consts::PI;
            } else if d < -std::f64::consts::PI {
                d += 2.0 * std::f64::consts::PI;
            }
            b[3 * a + k] = d / (2.0 * h);
        }
    }
    b
}

/// The Lindh model Hessian (3N × 3N, row-major) of `mol`.
pub fn lindh_hessian(mol: &Molecule) -> Vec<f64> {
    let x: Vec<[f64; 3]> = mol.atoms.iter().map(|a| a.position).collect();
    let n = x.len();
    let z: Vec<u32> = mol.atoms.iter().map(|a| a.z).collect();
    let rho = |i: usize, j: usize| -> f64 {
        let (a, r0) = params(z[i], z[j]);
        let r = norm(&sub(&x[i], &x[j]));
        (a * (r0 * r0 - r * r)).exp()
    };
    let dim = 3 * n;
    let mut h = vec![0.0; dim * dim];
    let mut add = |k: f64, b: &[f64]| {
        for p in 0..dim {
            if b[p] == 0.0 {
                continue;
            }
            for q in 0..dim {
                h[p * dim + q] += k * b[p] * b[q];
            }
        }
    };
    const K_R: f64 = 0.45;
    const K_PHI: f64 = 0.15;
    const K_TAU: f64 = 0.005;
    const MIN_WEIGHT: f64 = 1e-8;
    let linear = 175f64.to_radians();
    for i in 0..n {
        for j in 0..i {
            let k = K_R * rho(i, j);
            if k > K_R * MIN_WEIGHT {
                let b = b_row(&x, &[i, j], &|y| norm(&sub(&y[i], &y[j])));
                add(k, &b);
            }
        }
    }
    for j in 0..n {
        for i in 0..n {
            for k in 0..i {
                if i == j || k == j {
                    continue;
                }
                let w = K_PHI * rho(i, j) * rho(j, k);
                if w < K_PHI * MIN_WEIGHT || angle(&x, i, j, k) > linear {
                    continue;
                }
                let b = b_row(&x, &[i, j, k], &|y| angle(y, i, j, k));
                add(w, &b);
            }
        }
    }
    for j in 0..n {
        for k in 0..n {
            if k == j {
                continue;
            }
            for i in 0..n {
                for l in 0..n {
                    if i == j || i == k || l == j || l == k || i == l || (j > k) {
                        continue;
                    }
                    let w = K_TAU * rho(i, j) * rho(j, k) * rho(k, l);
                    if w < K_TAU * MIN_WEIGHT
                        || angle(&x, i, j, k) > linear
                        || angle(&x, j, k, l) > linear
                    {
                        continue;
                    }
                    let b = b_row(&x, &[i, j, k, l], &|y| dihedral(y, i, j, k, l));
                    add(w, &b);
                }
            }
        }
    }
    h
}
