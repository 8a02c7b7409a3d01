//! The abelian subgroup used when the full group's labels cannot be assigned.
//!
//! Choice (common practice for the abelian groups with real one-dimensional irreps: D2h and
//! its subgroups): the largest such subgroup, in a frame tied to the parent's standard frame:
//! - D2h from Dnh (n even), Oh, Th, D∞h; D2 from Dn (n even), O, T, D4d, D6d.
//! - C2v from Cnv (n even), C∞v, Td and D2d (z along the S4 axis, the planes are two σd),
//!   and from Dnh (n odd, e.g. D3h): C2 along the C2′ axis, x along the old z so that a
//!   planar D3h molecule lies in the C2v yz plane.
//! - C2h from Cnh (n even) and Dnd (n odd, C2 along C2′, σd ⊥ C2′).
//! - C2 from Cn, S2n (n even) and Dn (n odd, along C2′); Cs from Cnv (n odd: one σv) and
//!   Cnh (n odd: σh); Ci from S2n (n odd); C1 from Cn (n odd).
//! - The abelian groups themselves map to themselves.

use super::ops::Mat3;

const ID: Mat3 = [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
/// z_sub = x, x_sub = y, y_sub = z.
const ALONG_X: Mat3 = [[0.0, 1.0, 0.0], [0.0, 0.0, 1.0], [1.0, 0.0, 0.0]];
/// z_sub = y (normal of σv(xz)), x_sub = z, y_sub = x.
const NORMAL_Y: Mat3 = [[0.0, 0.0, 1.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0]];
/// z_sub = x, x_sub = z, y_sub = −y.
const C2V_FROM_DNH_ODD: Mat3 = [[0.0, 0.0, 1.0], [0.0, -1.0, 0.0], [1.0, 0.0, 0.0]];
const S: f64 = std::f64::consts::FRAC_1_SQRT_2;
/// x_sub, y_sub along the diagonals x = ±y.
const DIAGONAL: Mat3 = [[S, S, 0.0], [-S, S, 0.0], [0.0, 0.0, 1.0]];

/// (subgroup name, rows = subgroup axes in the parent's standard coordinates).
pub fn abelian_subgroup(name: &str) -> (&'static str, Mat3) {
    match name {
        "C1" => ("C1", ID),
        "Cs" => ("Cs", ID),
        "Ci" => ("Ci", ID),
        "C2" => ("C2", ID),
        "C2v" => ("C2v", ID),
        "C2h" => ("C2h", ID),
        "D2" => ("D2", ID),
        "D2h" => ("D2h", ID),
        "Oh" | "Th" | "D∞h" => ("D2h", ID),
        "O" | "T" => ("D2", ID),
        "Td" | "D2d" => ("C2v", DIAGONAL),
        "C∞v" => ("C2v", ID),
        "Kh" => ("C1", ID),
        _ => {
            let head = &name[..1];
            let digits: String = name[1..]
                .chars()
                .take_while(|c| c.is_ascii_digit())
                .collect();
            let suffix = &name[1 + digits.len()..];
            let n: usize = digits.parse().unwrap_or(1);
            let even = n.is_multiple_of(2);
            match (head, suffix, even) {
                ("D", "h", true) => ("D2h", ID),
                ("D", "h", false) => ("C2v", C2V_FROM_DNH_ODD),
                ("D", "d", true) => ("D2", ID),
                ("D", "d", false) => ("C2h", ALONG_X),
                ("D", "", true) => ("D2", ID),
                ("D", "", false) => ("C2", ALONG_X),
                ("C", "v", true) => ("C2v", ID),
                ("C", "v", false) => ("Cs", NORMAL_Y),
                ("C", "h", true) => ("C2h", ID),
                ("C", "h", false) => ("Cs", ID),
                ("C", "", true) => ("C2", ID),
                ("S", "", _) if (n / 2).is_multiple_of(2) => ("C2", ID),
                ("S", "", _) => ("Ci", ID),
                _ => ("C1", ID),
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::{ops, tables};
    use super::*;

    /// Every subgroup operation, carried into the parent frame, is an operation of the parent.
    #[test]
    fn subgroups_are_subgroups() {
        for parent in tables::GROUPS {
            let (sub, p) = abelian_subgroup(parent);
            assert!((ops::det(&p) - 1.0).abs() < 1e-12, "{parent}");
            let pt = tables::table(parent).unwrap();
            let st = tables::table(sub).unwrap();
            for r in &st.elements {
                // Sub-frame coordinates s = P x: R_parent = Pᵀ R_sub P.
                let q = ops::mul(&ops::transpose(&p), &ops::mul(r, &p));
                assert!(
                    pt.elements.iter().any(|e| ops::max_diff(e, &q) < 1e-9),
                    "{sub} is not inside {parent}"
                );
            }
        }
    }
}
