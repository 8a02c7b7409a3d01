//! Keeping the point group of the start: geometries, gradients and steps are averaged over
//! the group's operations (each operation R with its atom permutation π maps a vector
//! field v onto v'_π(A) = R v_A; the average is the totally symmetric part). A symmetric
//! geometry then stays symmetric to rounding through the optimisation.

use crate::analysis::symmetry::{ops, PointGroup};

/// Totally symmetric part of a per-atom vector field (gradient, step).
pub fn symmetrize_vectors(pg: &PointGroup, v: &[[f64; 3]]) -> Vec<[f64; 3]> {
    if pg.operations.is_empty() {
        return v.to_vec();
    }
    let mut out = vec![[0.0; 3]; v.len()];
    let w = 1.0 / pg.operations.len() as f64;
    for op in &pg.operations {
        for (a, va) in v.iter().enumerate() {
            let r = ops::apply(&op.matrix, va);
            let b = op.permutation[a];
            for k in 0..3 {
                out[b][k] += w * r[k];
            }
        }
    }
    out
}

/// Positions made exactly symmetric (about the group's fixed point).
pub fn symmetrize_positions(pg: &PointGroup, x: &[[f64; 3]]) -> Vec<[f64; 3]> {
    let o = pg.frame.origin;
    let d: Vec<[f64; 3]> = x.iter().map(|p| ops::sub(p, &o)).collect();
    symmetrize_vectors(pg, &d)
        .iter()
        .map(|p| ops::add(p, &o))
        .collect()
}
