//! Exact conditions on a molecular gradient: the energy of an isolated molecule does not
//! change under a rigid translation or rotation, so Σ_A g_A = 0 and Σ_A R_A × g_A = 0.

use crate::chem::Molecule;

/// Σ_A g_A.
pub fn net_force(g: &[[f64; 3]]) -> [f64; 3] {
    let mut s = [0.0; 3];
    for ga in g {
        for k in 0..3 {
            s[k] += ga[k];
        }
    }
    s
}

/// Σ_A R_A × g_A (about the origin; equals the value about any point when Σ g = 0).
pub fn net_torque(mol: &Molecule, g: &[[f64; 3]]) -> [f64; 3] {
    let mut t = [0.0; 3];
    for (a, ga) in mol.atoms.iter().zip(g) {
        let r = a.position;
        t[0] += r[1] * ga[2] - r[2] * ga[1];
        t[1] += r[2] * ga[0] - r[0] * ga[2];
        t[2] += r[0] * ga[1] - r[1] * ga[0];
    }
    t
}
