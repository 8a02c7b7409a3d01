//! The standard orientation of a molecule in its point group.
//!
//! The character tables (`tables`) are written in a standard frame; this file finds that
//! frame on the molecule. Orbitals are never rotated: the group's operations are carried back
//! into the input frame (R_input = Aᵀ R_std A), so AO coefficients are used as they are.
//!
//! Conventions (after R. S. Mulliken, J. Chem. Phys. 23 (1955) 1997, "Report on notation for
//! the spectra of polyatomic molecules"; common practice):
//! - Origin: centre of nuclear charge.
//! - z: the principal axis (highest-order Cn; the S4 axis in D2d; the molecular axis of a
//!   linear molecule).
//! - C2v: the mirror plane holding more atoms is yz, i.e. x is its normal. For a planar
//!   C2v molecule x is perpendicular to the molecular plane (Mulliken's rule), so water's
//!   out-of-plane 2p lone pair is b1 and the in-plane O–H combination is b2. Ties (equal
//!   atom counts) go to the plane holding the larger nuclear charge, then to the first found.
//! - D2h, D2: z is the C2 axis through the most atoms (ties: larger nuclear charge on it);
//!   x is the remaining C2 axis whose perpendicular plane holds the most atoms, so a planar
//!   molecule lies in yz (ethylene: z along C=C, x out of plane; its π orbital is b3u).
//! - Dn, Dnh, Dnd (n ≥ 3), D2d: x along the perpendicular C2 axis through the most atoms
//!   (ties: larger nuclear charge); that axis defines the class C2′ and, in Dnh, the planes
//!   σv that contain the C2′ axes (benzene: C2′ and σv through the carbon atoms).
//! - Cnv (n ≥ 3): x lies in the vertical mirror plane holding the most atoms (that plane's
//!   class is σv).
//! - Cn, Cnh, S2n: x along the perpendicular projection of the first atom off the axis
//!   (any choice gives the same labels).
//! - Cs: z is the normal of the mirror plane. C1, Ci: the input axes.
//! - T, Td, Th: x, y, z along the three C2 axes; O, Oh: along the three C4 axes.
//! - Signs: each axis is turned so that its largest input-frame component is positive
//!   (x, z), and y = z × x keeps the frame right-handed.

use super::detect::{Elements, Nuclei};
use super::ops::{self, Mat3};

/// A right-handed orthonormal frame: rows of `axes` are the standard x, y, z directions in
/// input coordinates; `origin` is the fixed point in input coordinates (bohr).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Frame {
    pub origin: [f64; 3],
    pub axes: Mat3,
}

impl Frame {
    /// Standard coordinates of an input-frame point.
    pub fn to_standard(&self, p: &[f64; 3]) -> [f64; 3] {
        ops::apply(&self.axes, &ops::sub(p, &self.origin))
    }

    /// An operation given in the standard frame, expressed in the input frame:
    /// R_input = Aᵀ R_std A (acting on displacements from `origin`).
    pub fn op_to_input(&self, r_std: &Mat3) -> Mat3 {
        ops::mul(&ops::transpose(&self.axes), &ops::mul(r_std, &self.axes))
    }

    /// The frame whose axes are given by `p` (rows) in this frame's standard coordinates.
    pub fn sub_frame(&self, p: &Mat3) -> Frame {
        Frame {
            origin: self.origin,
            axes: ops::mul(p, &self.axes),
        }
    }
}

/// Turn a unit vector so its largest component is positive.
fn fix_sign(u: [f64; 3]) -> [f64; 3] {
    let k = (0..3)
        .max_by(|&i, &j| u[i].abs().partial_cmp(&u[j].abs()).unwrap())
        .unwrap();
    if u[k] < 0.0 {
        [-u[0], -u[1], -u[2]]
    } else {
        u
    }
}

/// Frame from z and an approximate x (made orthogonal to z).
fn frame_zx(origin: [f64; 3], z: [f64; 3], x: [f64; 3]) -> Frame {
    let z = fix_sign(z);
    let xo = ops::sub(&x, &scale(&z, ops::dot(&x, &z)));
    let x = fix_sign(ops::unit(&xo, 1e-9).unwrap_or_else(|| any_perpendicular(&z)));
    let y = ops::cross(&z, &x);
    Frame {
        origin,
        axes: [x, y, z],
    }
}

fn scale(a: &[f64; 3], s: f64) -> [f64; 3] {
    [a[0] * s, a[1] * s, a[2] * s]
}

/// Some unit vector perpendicular to unit `z`.
pub fn any_perpendicular(z: &[f64; 3]) -> [f64; 3] {
    let k = (0..3)
        .min_by(|&i, &j| z[i].abs().partial_cmp(&z[j].abs()).unwrap())
        .unwrap();
    let mut e = [0.0; 3];
    e[k] = 1.0;
    ops::unit(&ops::cross(z, &e), 1e-12).unwrap()
}

/// Projection of the first atom off the axis `z`, or any perpendicular.
fn first_off_axis(nuc: &Nuclei, z: &[f64; 3]) -> [f64; 3] {
    for r in &nuc.r {
        let p = ops::sub(r, &scale(z, ops::dot(r, z)));
        if ops::norm(&p) > nuc.small() {
            return ops::unit(&p, 1e-12).unwrap();
        }
    }
    any_perpendicular(z)
}

/// Frame of a linear molecule: z along the axis, x any perpendicular.
pub fn linear_frame(nuc: &Nuclei, u: &[f64; 3]) -> Frame {
    frame_zx(nuc.centre, *u, any_perpendicular(u))
}

/// Pick the item maximising a key; the first wins ties.
fn argmax<T: Copy, K: PartialOrd>(items: &[T], key: impl Fn(&T) -> K) -> Option<T> {
    let mut best: Option<(T, K)> = None;
    for it in items {
        let k = key(it);
        if best.as_ref().is_none_or(|(_, bk)| k > *bk) {
            best = Some((*it, k));
        }
    }
    best.map(|(t, _)| t)
}

/// The standard frame for group `name` (see the module documentation).
pub fn standard_frame(name: &str, main: Option<[f64; 3]>, el: &Elements, nuc: &Nuclei) -> Frame {
    let o = nuc.centre;
    let axes_of = |order: usize| -> Vec<[f64; 3]> {
        el.axes
            .iter()
            .filter(|a| a.order == order)
            .map(|a| a.u)
            .collect()
    };
    let perpendicular_c2 = |z: &[f64; 3]| -> Vec<[f64; 3]> {
        el.axes
            .iter()
            .filter(|a| a.order == 2 && ops::dot(&a.u, z).abs() < 0.02)
            .map(|a| a.u)
            .collect()
    };
    let vertical_planes = |z: &[f64; 3]| -> Vec<[f64; 3]> {
        el.planes
            .iter()
            .filter(|p| ops::dot(p, z).abs() < 0.02)
            .copied()
            .collect()
    };
    let identity = Frame {
        origin: o,
        axes: ops::IDENTITY,
    };
    match name {
        "C1" | "Ci" => identity,
        "Cs" => {
            let z = el.planes[0];
            frame_zx(o, z, first_off_axis(nuc, &z))
        }
        "D2" | "D2h" => {
            let c2 = axes_of(2);
            let z = argmax(&c2, |u| (nuc.atoms_on_axis(u), nuc.charge_on_axis(u))).unwrap();
            let rest: Vec<[f64; 3]> = c2
                .iter()
                .filter(|u| ops::dot(u, &z).abs() < 0.5)
                .copied()
                .collect();
            let x =
                argmax(&rest, |u| nuc.atoms_in_plane(u)).unwrap_or_else(|| any_perpendicular(&z));
            frame_zx(o, z, x)
        }
        "T" | "Td" | "Th" | "O" | "Oh" => {
            let order = if name.starts_with('O') { 4 } else { 2 };
            let a = axes_of(order);
            let x = a[0];
            let y = a
                .iter()
                .find(|u| ops::dot(u, &x).abs() < 0.1)
                .copied()
                .unwrap_or_else(|| any_perpendicular(&x));
            let z = ops::cross(&x, &y);
            frame_zx(o, z, x)
        }
        _ => {
            let z = main.expect("axial group has a principal axis");
            let x = if name.starts_with('D') {
                let perp = perpendicular_c2(&z);
                argmax(&perp, |u| (nuc.atoms_on_axis(u), nuc.charge_on_axis(u)))
                    .unwrap_or_else(|| first_off_axis(nuc, &z))
            } else if name == "C2v" {
                let planes = vertical_planes(&z);
                argmax(&planes, |p| nuc.atoms_in_plane(p))
                    .unwrap_or_else(|| first_off_axis(nuc, &z))
            } else if name.ends_with('v') {
                let planes = vertical_planes(&z);
                match argmax(&planes, |p| nuc.atoms_in_plane(p)) {
                    Some(p) => ops::cross(&z, &p),
                    None => first_off_axis(nuc, &z),
                }
            } else {
                first_off_axis(nuc, &z)
            };
            frame_zx(o, z, x)
        }
    }
}
