//! Point operations as 3×3 orthogonal matrices: construction (rotations, reflections,
//! improper rotations), products, and a geometric description (Schoenflies symbol).
//!
//! A matrix `R` acts on a displacement from the molecule's fixed point: r' = c + R (r − c).

use std::f64::consts::PI;

/// A 3×3 matrix, row-major: `m[i][j]` is row i, column j.
pub type Mat3 = [[f64; 3]; 3];

pub const IDENTITY: Mat3 = [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
pub const INVERSION: Mat3 = [[-1.0, 0.0, 0.0], [0.0, -1.0, 0.0], [0.0, 0.0, -1.0]];

pub fn mul(a: &Mat3, b: &Mat3) -> Mat3 {
    let mut c = [[0.0; 3]; 3];
    for (i, row) in c.iter_mut().enumerate() {
        for (j, cij) in row.iter_mut().enumerate() {
            *cij = (0..3).map(|k| a[i][k] * b[k][j]).sum();
        }
    }
    c
}

pub fn transpose(a: &Mat3) -> Mat3 {
    let mut t = [[0.0; 3]; 3];
    for (i, row) in a.iter().enumerate() {
        for (j, v) in row.iter().enumerate() {
            t[j][i] = *v;
        }
    }
    t
}

pub fn apply(a: &Mat3, v: &[f64; 3]) -> [f64; 3] {
    [
        a[0][0] * v[0] + a[0][1] * v[1] + a[0][2] * v[2],
        a[1][0] * v[0] + a[1][1] * v[1] + a[1][2] * v[2],
        a[2][0] * v[0] + a[2][1] * v[1] + a[2][2] * v[2],
    ]
}

pub fn trace(a: &Mat3) -> f64 {
    a[0][0] + a[1][1] + a[2][2]
}

pub fn det(a: &Mat3) -> f64 {
    a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1])
        - a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0])
        + a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0])
}

pub fn scale(a: &Mat3, s: f64) -> Mat3 {
    let mut b = *a;
    for row in b.iter_mut() {
        for v in row.iter_mut() {
            *v *= s;
        }
    }
    b
}

/// Largest element-wise difference.
pub fn max_diff(a: &Mat3, b: &Mat3) -> f64 {
    let mut d: f64 = 0.0;
    for i in 0..3 {
        for j in 0..3 {
            d = d.max((a[i][j] - b[i][j]).abs());
        }
    }
    d
}

pub fn dot(a: &[f64; 3], b: &[f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

pub fn cross(a: &[f64; 3], b: &[f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

pub fn norm(a: &[f64; 3]) -> f64 {
    dot(a, a).sqrt()
}

pub fn sub(a: &[f64; 3], b: &[f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

pub fn add(a: &[f64; 3], b: &[f64; 3]) -> [f64; 3] {
    [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
}

/// Unit vector along `a`, None when |a| < `min_len`.
pub fn unit(a: &[f64; 3], min_len: f64) -> Option<[f64; 3]> {
    let n = norm(a);
    (n >= min_len).then(|| [a[0] / n, a[1] / n, a[2] / n])
}

/// Rotation by `angle` (radians, counter-clockwise looking down the axis) about the unit
/// vector `u` (Rodrigues' formula).
pub fn rotation(u: &[f64; 3], angle: f64) -> Mat3 {
    let (s, c) = angle.sin_cos();
    let t = 1.0 - c;
    let [x, y, z] = *u;
    [
        [t * x * x + c, t * x * y - s * z, t * x * z + s * y],
        [t * x * y + s * z, t * y * y + c, t * y * z - s * x],
        [t * x * z - s * y, t * y * z + s * x, t * z * z + c],
    ]
}

/// Reflection through the plane with unit normal `n`: 1 − 2 n nᵀ.
pub fn reflection(n: &[f64; 3]) -> Mat3 {
    let mut m = IDENTITY;
    for (i, row) in m.iter_mut().enumerate() {
        for (j, v) in row.iter_mut().enumerate() {
            *v -= 2.0 * n[i] * n[j];
        }
    }
    m
}

/// Improper rotation S(angle) = σ(u) · C(u, angle).
pub fn improper(u: &[f64; 3], angle: f64) -> Mat3 {
    mul(&reflection(u), &rotation(u, angle))
}

/// Geometric kind of an orthogonal matrix.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum OpKind {
    Identity,
    /// Proper rotation by `angle` ∈ (0, π] about unit `axis`.
    Rotation {
        axis: [f64; 3],
        angle: f64,
    },
    Inversion,
    /// Reflection through the plane with unit `normal`.
    Reflection {
        normal: [f64; 3],
    },
    /// σ(axis)·C(axis, angle) with angle ∈ (0, π).
    Improper {
        axis: [f64; 3],
        angle: f64,
    },
}

/// Axis and angle ∈ [0, π] of a proper rotation matrix.
fn axis_angle(r: &Mat3) -> ([f64; 3], f64) {
    let cos = ((trace(r) - 1.0) / 2.0).clamp(-1.0, 1.0);
    let angle = cos.acos();
    // Antisymmetric part gives sin(θ)·u; near θ = π use the symmetric part instead.
    let a = [r[2][1] - r[1][2], r[0][2] - r[2][0], r[1][0] - r[0][1]];
    if angle < PI - 1e-3 {
        if let Some(u) = unit(&a, 1e-12) {
            return (u, angle);
        }
        return ([0.0, 0.0, 1.0], angle);
    }
    // R + 1 = 2 u uᵀ for θ = π: take the largest column.
    let mut best = [0.0; 3];
    let mut best_n = -1.0;
    for j in 0..3 {
        let col = [
            r[0][j] + IDENTITY[0][j],
            r[1][j] + IDENTITY[1][j],
            r[2][j] + IDENTITY[2][j],
        ];
        let n = norm(&col);
        if n > best_n {
            best_n = n;
            best = col;
        }
    }
    let mut u = unit(&best, 1e-12).unwrap_or([0.0, 0.0, 1.0]);
    // Fix the sign with the (small) antisymmetric part so that the angle stays θ.
    if dot(&u, &a) < 0.0 {
        u = scale_v(&u, -1.0);
    }
    (u, angle)
}

fn scale_v(a: &[f64; 3], s: f64) -> [f64; 3] {
    [a[0] * s, a[1] * s, a[2] * s]
}

/// Classify an orthogonal matrix.
pub fn kind(m: &Mat3) -> OpKind {
    const EPS: f64 = 1e-6;
    if det(m) > 0.0 {
        if max_diff(m, &IDENTITY) < EPS {
            return OpKind::Identity;
        }
        let (axis, angle) = axis_angle(m);
        OpKind::Rotation { axis, angle }
    } else {
        if max_diff(m, &INVERSION) < EPS {
            return OpKind::Inversion;
        }
        // m = −R with R proper: m = σ(u) C(u, θ + π).
        let r = scale(m, -1.0);
        let (axis, theta) = axis_angle(&r);
        if theta < EPS {
            // −1 ... impossible here (handled above); guard anyway.
            return OpKind::Inversion;
        }
        let phi = PI - theta; // |θ + π| folded into (0, π]
        if phi < EPS {
            return OpKind::Reflection { normal: axis };
        }
        OpKind::Improper { axis, angle: phi }
    }
}

/// (n, k) with angle = 2πk/n, gcd(k, n) = 1, n ≤ 60; None if the angle is no such fraction.
pub fn rational_angle(angle: f64) -> Option<(usize, usize)> {
    for n in 1..=60usize {
        let k = angle * n as f64 / (2.0 * PI);
        let kr = k.round();
        if (k - kr).abs() < 1e-6 && kr >= 1.0 {
            return Some((n, kr as usize));
        }
    }
    None
}

/// Schoenflies symbol of an operation without primes: "E", "C3", "C5^2", "i", "σ", "S6".
pub fn symbol(m: &Mat3) -> String {
    match kind(m) {
        OpKind::Identity => "E".into(),
        OpKind::Inversion => "i".into(),
        OpKind::Reflection { .. } => "σ".into(),
        OpKind::Rotation { angle, .. } => match rational_angle(angle) {
            Some((n, 1)) => format!("C{n}"),
            Some((n, k)) => format!("C{n}^{k}"),
            None => format!("C({:.1}°)", angle.to_degrees()),
        },
        OpKind::Improper { angle, .. } => match rational_angle(angle) {
            Some((n, 1)) => format!("S{n}"),
            Some((n, k)) => format!("S{n}^{k}"),
            None => format!("S({:.1}°)", angle.to_degrees()),
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kinds_round_trip() {
        let z = [0.0, 0.0, 1.0];
        let c3 = rotation(&z, 2.0 * PI / 3.0);
        assert_eq!(symbol(&c3), "C3");
        assert_eq!(symbol(&mul(&c3, &c3)), "C3"); // C3² is a rotation by 2π/3 the other way
        let c2 = rotation(&[1.0, 0.0, 0.0], PI);
        match kind(&c2) {
            OpKind::Rotation { axis, angle } => {
                assert!((angle - PI).abs() < 1e-9);
                assert!((axis[0].abs() - 1.0).abs() < 1e-9);
            }
            k => panic!("{k:?}"),
        }
        assert_eq!(symbol(&improper(&z, PI / 2.0)), "S4");
        assert_eq!(symbol(&improper(&z, PI / 3.0)), "S6");
        assert_eq!(symbol(&improper(&z, 2.0 * PI / 3.0)), "S3");
        assert_eq!(symbol(&reflection(&z)), "σ");
        assert_eq!(symbol(&improper(&z, PI)), "i");
        assert_eq!(symbol(&rotation(&z, 4.0 * PI / 5.0)), "C5^2");
        // −C6 about z = σh·C3² ∈ the S3 class (D6h: i·C6 lies in 2S3, common practice).
        assert_eq!(symbol(&scale(&rotation(&z, PI / 3.0), -1.0)), "S3");
    }

    #[test]
    fn rotation_is_orthogonal_and_right_handed() {
        let u = unit(&[1.0, 2.0, -0.5], 1e-9).unwrap();
        let r = rotation(&u, 0.7);
        assert!(max_diff(&mul(&r, &transpose(&r)), &IDENTITY) < 1e-12);
        assert!((det(&r) - 1.0).abs() < 1e-12);
        // x rotated by +90° about z is y.
        let r = rotation(&[0.0, 0.0, 1.0], PI / 2.0);
        let y = apply(&r, &[1.0, 0.0, 0.0]);
        assert!((y[1] - 1.0).abs() < 1e-12);
    }
}
