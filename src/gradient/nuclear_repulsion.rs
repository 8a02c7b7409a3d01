//! Gradient of the nuclear repulsion V_nn = Σ_{A<B} Z_A Z_B / R_AB:
//! ∂V_nn/∂R_A = −Σ_{B≠A} Z_A Z_B (R_A − R_B) / R_AB³.

use crate::chem::Molecule;

/// ∂V_nn/∂R_A for every atom (hartree/bohr).
pub fn nuclear_repulsion_gradient(mol: &Molecule) -> Vec<[f64; 3]> {
    let n = mol.atoms.len();
    let mut g = vec![[0.0; 3]; n];
    for a in 0..n {
        for b in 0..n {
            if a == b {
                continue;
            }
            let (ra, rb) = (mol.atoms[a].position, mol.atoms[b].position);
            let d = [ra[0] - rb[0], ra[1] - rb[1], ra[2] - rb[2]];
            let r = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
            let f = (mol.atoms[a].z * mol.atoms[b].z) as f64 / (r * r * r);
            for k in 0..3 {
                g[a][k] -= f * d[k];
            }
        }
    }
    g
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::Atom;

    #[test]
    fn matches_central_difference() {
        // exact condition: derivative = limit of the difference quotient
        let atoms = vec![
            Atom {
                z: 8,
                position: [0.0, 0.1, 0.0],
            },
            Atom {
                z: 1,
                position: [1.4, 1.0, 0.2],
            },
            Atom {
                z: 6,
                position: [-1.5, 0.9, -0.3],
            },
        ];
        let mol = Molecule::new(atoms);
        let g = nuclear_repulsion_gradient(&mol);
        let h = 1e-5;
        for a in 0..3 {
            for k in 0..3 {
                let mut p = mol.clone();
                p.atoms[a].position[k] += h;
                let mut m = mol.clone();
                m.atoms[a].position[k] -= h;
                let fd = (p.nuclear_repulsion() - m.nuclear_repulsion()) / (2.0 * h);
                assert!((fd - g[a][k]).abs() < 1e-7, "{a} {k}: {} vs {fd}", g[a][k]);
            }
        }
    }
}
