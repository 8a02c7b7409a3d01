//! Putting the ion's equilibrium structure (and its normal modes) into the frame of the
//! neutral's, so that an overall translation or rotation does not show up as displacement.
//!
//! Both structures are centred on their centres of mass; the ion is then turned by the
//! proper rotation R that minimises the mass-weighted squared distance
//! Σ_a m_a |R (x_a^ion − c^ion) − (x_a^neu − c^neu)|².
//! R comes from the quaternion method (Horn, J. Opt. Soc. Am. A 4 (1987) 629; the same
//! 4 × 4 eigenproblem as Kearsley, Acta Cryst. A45 (1989) 208): with the mass-weighted
//! correlation S_ij = Σ_a m_a y_ai z_aj (y = centred ion, z = centred neutral), the unit
//! eigenvector of the largest eigenvalue of the symmetric 4 × 4 matrix N(S) is the
//! quaternion of R. A stationary point of that distance satisfies
//! Σ_a m_a (x_a^neu − c^neu) × R (x_a^ion − c^ion) = 0, which is the Eckart rotational
//! condition with the neutral as reference: the aligned ion is in the neutral's Eckart
//! frame (common practice for Duschinsky analyses).

use bandcast_linalg::{eigh, Mat};

/// The rigid motion found: x_aligned = R (x − c_from) + c_to.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RigidMotion {
    pub rotation: [[f64; 3]; 3],
    pub centre_from: [f64; 3],
    pub centre_to: [f64; 3],
    /// Mass-weighted root-mean-square distance after alignment,
    /// √(Σ m_a |…|² / Σ m_a), bohr.
    pub rms: f64,
}

impl RigidMotion {
    pub fn apply_point(&self, x: [f64; 3]) -> [f64; 3] {
        let d = [
            x[0] - self.centre_from[0],
            x[1] - self.centre_from[1],
            x[2] - self.centre_from[2],
        ];
        let r = rotate(&self.rotation, d);
        [
            r[0] + self.centre_to[0],
            r[1] + self.centre_to[1],
            r[2] + self.centre_to[2],
        ]
    }
    /// Rotates a 3N vector (a displacement or a normal mode) atom by atom.
    pub fn apply_vector(&self, v: &[f64]) -> Vec<f64> {
        let mut out = vec![0.0; v.len()];
        for (o, c) in out.chunks_exact_mut(3).zip(v.chunks_exact(3)) {
            o.copy_from_slice(&rotate(&self.rotation, [c[0], c[1], c[2]]));
        }
        out
    }
}

fn rotate(r: &[[f64; 3]; 3], x: [f64; 3]) -> [f64; 3] {
    [
        r[0][0] * x[0] + r[0][1] * x[1] + r[0][2] * x[2],
        r[1][0] * x[0] + r[1][1] * x[1] + r[1][2] * x[2],
        r[2][0] * x[0] + r[2][1] * x[1] + r[2][2] * x[2],
    ]
}

/// Centre of mass (bohr).
pub fn centre_of_mass(geometry: &[[f64; 3]], masses: &[f64]) -> [f64; 3] {
    let total: f64 = masses.iter().sum();
    let mut c = [0.0; 3];
    for (x, &m) in geometry.iter().zip(masses) {
        for i in 0..3 {
            c[i] += m * x[i];
        }
    }
    c.map(|v| v / total)
}

/// The rigid motion that best lays `from` onto `to` (same atoms in the same order, masses
/// `masses`), by the quaternion method described in the module comment.
pub fn best_fit(from: &[[f64; 3]], to: &[[f64; 3]], masses: &[f64]) -> RigidMotion {
    assert_eq!(from.len(), to.len());
    assert_eq!(from.len(), masses.len());
    let cf = centre_of_mass(from, masses);
    let ct = centre_of_mass(to, masses);
    let mut s = [[0.0f64; 3]; 3];
    for ((y, z), &m) in from.iter().zip(to).zip(masses) {
        for i in 0..3 {
            for j in 0..3 {
                s[i][j] += m * (y[i] - cf[i]) * (z[j] - ct[j]);
            }
        }
    }
    let (sxx, sxy, sxz) = (s[0][0], s[0][1], s[0][2]);
    let (syx, syy, syz) = (s[1][0], s[1][1], s[1][2]);
    let (szx, szy, szz) = (s[2][0], s[2][1], s[2][2]);
    let n = [
        [sxx + syy + szz, syz - szy, szx - sxz, sxy - syx],
        [syz - szy, sxx - syy - szz, sxy + syx, szx + sxz],
        [szx - sxz, sxy + syx, -sxx + syy - szz, syz + szy],
        [sxy - syx, szx + sxz, syz + szy, -sxx - syy + szz],
    ];
    let nm = Mat::<f64>::from_fn(4, 4, |i, j| n[i][j]);
    let (_w, v) = eigh(nm.as_ref());
    // largest eigenvalue is last (ascending order)
    let q = [v[(0, 3)], v[(1, 3)], v[(2, 3)], v[(3, 3)]];
    let qn = (q.iter().map(|x| x * x).sum::<f64>()).sqrt();
    let (q0, qx, qy, qz) = (q[0] / qn, q[1] / qn, q[2] / qn, q[3] / qn);
    let rotation = [
        [
            q0 * q0 + qx * qx - qy * qy - qz * qz,
            2.0 * (qx * qy - q0 * qz),
            2.0 * (qx * qz + q0 * qy),
        ],
        [
            2.0 * (qy * qx + q0 * qz),
            q0 * q0 - qx * qx + qy * qy - qz * qz,
            2.0 * (qy * qz - q0 * qx),
        ],
        [
            2.0 * (qz * qx - q0 * qy),
            2.0 * (qz * qy + q0 * qx),
            q0 * q0 - qx * qx - qy * qy + qz * qz,
        ],
    ];
    let mut motion = RigidMotion {
        rotation,
        centre_from: cf,
        centre_to: ct,
        rms: 0.0,
    };
    let mut sum = 0.0;
    for ((y, z), &m) in from.iter().zip(to).zip(masses) {
        let a = motion.apply_point(*y);
        sum += m * ((a[0] - z[0]).powi(2) + (a[1] - z[1]).powi(2) + (a[2] - z[2]).powi(2));
    }
    motion.rms = (sum / masses.iter().sum::<f64>()).sqrt();
    motion
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    /// Rotation about a unit axis by an angle (Rodrigues' formula).
    pub(crate) fn axis_angle(axis: [f64; 3], angle: f64) -> [[f64; 3]; 3] {
        let n = (axis[0] * axis[0] + axis[1] * axis[1] + axis[2] * axis[2]).sqrt();
        let (x, y, z) = (axis[0] / n, axis[1] / n, axis[2] / n);
        let (s, c) = angle.sin_cos();
        let t = 1.0 - c;
        [
            [t * x * x + c, t * x * y - s * z, t * x * z + s * y],
            [t * x * y + s * z, t * y * y + c, t * y * z - s * x],
            [t * x * z - s * y, t * y * z + s * x, t * z * z + c],
        ]
    }

    #[test]
    fn recovers_a_known_rigid_motion_exactly() {
        // Exact condition: a rotated and translated copy is laid back with rms 0 and the
        // rotation found is the inverse of the one applied.
        let geom = vec![
            [0.1, -0.3, 0.2],
            [1.9, 0.4, -0.5],
            [-1.2, 1.7, 0.8],
            [0.4, -1.1, 2.2],
        ];
        let masses = [12.0, 1.0, 16.0, 14.0];
        let r = axis_angle([0.3, -0.5, 0.8], 2.1);
        let moved: Vec<[f64; 3]> = geom
            .iter()
            .map(|&x| {
                let y = rotate(&r, x);
                [y[0] + 3.0, y[1] - 1.0, y[2] + 0.5]
            })
            .collect();
        let m = best_fit(&moved, &geom, &masses);
        assert!(m.rms < 1e-12, "rms {}", m.rms);
        for (a, b) in moved.iter().zip(&geom) {
            let c = m.apply_point(*a);
            for i in 0..3 {
                assert!((c[i] - b[i]).abs() < 1e-12);
            }
        }
        // R_found · R = 1
        for i in 0..3 {
            for j in 0..3 {
                let p: f64 = (0..3).map(|k| m.rotation[i][k] * r[k][j]).sum();
                assert!((p - if i == j { 1.0 } else { 0.0 }).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn aligned_structure_satisfies_the_eckart_rotational_condition() {
        // Exact condition (module comment): Σ m (z − c) × (aligned y − c) = 0 for a
        // distorted, rotated copy.
        let geom = vec![
            [0.0, 0.0, 0.0],
            [1.8, 0.0, 0.0],
            [-0.5, 1.7, 0.0],
            [0.3, 0.2, 1.5],
        ];
        let masses = [16.0, 1.0, 1.0, 12.0];
        let r = axis_angle([1.0, 1.0, 0.2], 0.7);
        let distorted: Vec<[f64; 3]> = geom
            .iter()
            .enumerate()
            .map(|(a, &x)| {
                let d = [0.05 * a as f64, -0.07 * (a % 2) as f64, 0.03];
                rotate(&r, [x[0] + d[0], x[1] + d[1], x[2] + d[2]])
            })
            .collect();
        let m = best_fit(&distorted, &geom, &masses);
        let c = centre_of_mass(&geom, &masses);
        let mut torque = [0.0; 3];
        for ((y, z), &w) in distorted.iter().zip(&geom).zip(&masses) {
            let a = m.apply_point(*y);
            let p = [z[0] - c[0], z[1] - c[1], z[2] - c[2]];
            let q = [a[0] - c[0], a[1] - c[1], a[2] - c[2]];
            torque[0] += w * (p[1] * q[2] - p[2] * q[1]);
            torque[1] += w * (p[2] * q[0] - p[0] * q[2]);
            torque[2] += w * (p[0] * q[1] - p[1] * q[0]);
        }
        for t in torque {
            assert!(t.abs() < 1e-10, "{torque:?}");
        }
        assert!(m.rms > 0.01);
    }
}
