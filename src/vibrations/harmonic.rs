//! Harmonic analysis of a Cartesian Hessian (common practice; E. B. Wilson, J. C. Decius
//! & P. C. Cross, *Molecular Vibrations*, 1955): mass-weighted Hessian
//! H_ij / √(m_i m_j) with the masses of the most abundant isotopes (`chem::masses`), the
//! rigid translations and rotations (about the centre of mass) projected out, eigenvalues λ
//! giving ω = √λ (atomic units) and ν̃ = ω × 219474.63 cm⁻¹ (negative numbers stand for
//! imaginary wavenumbers), normal modes as Cartesian displacements of unit length, the
//! zero-point energy ½ Σ ħω over the real modes, and each mode's irrep from the characters
//! of the displacement vectors under the point group's operations.

use bandcast_linalg::{eigh, Mat};

use crate::analysis::symmetry::{ops, PointGroup};
use crate::chem::masses::most_abundant_isotope_mass;
use crate::chem::Molecule;
use crate::units::{DALTON_TO_ELECTRON_MASS, HARTREE_TO_EV, HARTREE_TO_WAVENUMBER};

/// Wavenumbers below this (cm⁻¹, in magnitude) after projection count as rigid motion.
pub const ZERO_MODE_CM1: f64 = 1.0;

#[derive(Debug, Clone, serde::Serialize)]
pub struct Mode {
    /// cm⁻¹; negative = imaginary.
    pub wavenumber_cm1: f64,
    /// Irrep label in the molecule's point group (lower case, as orbital labels), or "?"
    /// when the characters do not reduce to one irrep.
    pub irrep: String,
    /// Cartesian displacement per atom (unit length over all atoms, dimensionless).
    pub displacement: Vec<[f64; 3]>,
}

#[derive(Debug, Clone)]
pub struct HarmonicAnalysis {
    /// Vibrational modes (3N − 6, or 3N − 5 for linear molecules), ascending.
    pub modes: Vec<Mode>,
    /// Eigenvalues of the projected mass-weighted Hessian that belong to rigid motion, as
    /// wavenumbers (cm⁻¹): ≈ 0 by construction.
    pub rigid_cm1: Vec<f64>,
    pub zero_point_hartree: f64,
    pub zero_point_ev: f64,
    /// Number of imaginary modes.
    pub n_imaginary: usize,
    pub linear: bool,
}

/// Harmonic analysis of `hessian` (3N × 3N row-major, hartree/bohr²) at `mol`.
pub fn harmonic_analysis(
    mol: &Molecule,
    hessian: &[f64],
    pg: Option<&PointGroup>,
) -> HarmonicAnalysis {
    let n = mol.atoms.len();
    let dim = 3 * n;
    let m: Vec<f64> = mol
        .atoms
        .iter()
        .map(|a| most_abundant_isotope_mass(a.z) * DALTON_TO_ELECTRON_MASS)
        .collect();
    let sq: Vec<f64> = (0..dim).map(|i| m[i / 3].sqrt()).collect();
    // rigid motions in mass-weighted coordinates
    let mtot: f64 = m.iter().sum();
    let mut com = [0.0; 3];
    for (a, at) in mol.atoms.iter().enumerate() {
        for k in 0..3 {
            com[k] += m[a] * at.position[k] / mtot;
        }
    }
    let mut raw: Vec<Vec<f64>> = Vec::new();
    for k in 0..3 {
        raw.push(
            (0..dim)
                .map(|i| if i % 3 == k { sq[i] } else { 0.0 })
                .collect(),
        );
    }
    for k in 0..3 {
        let mut v = vec![0.0; dim];
        for (a, at) in mol.atoms.iter().enumerate() {
            let r = ops::sub(&at.position, &com);
            let mut e = [0.0; 3];
            e[k] = 1.0;
            let w = ops::cross(&e, &r);
            for c in 0..3 {
                v[3 * a + c] = w[c] * sq[3 * a + c];
            }
        }
        raw.push(v);
    }
    let mut rigid: Vec<Vec<f64>> = Vec::new();
    for mut v in raw {
        for u in &rigid {
            let d: f64 = v.iter().zip(u).map(|(a, b)| a * b).sum();
            v.iter_mut().zip(u).for_each(|(a, b)| *a -= d * b);
        }
        let nv = v.iter().map(|a| a * a).sum::<f64>().sqrt();
        if nv > 1e-6 * mtot.sqrt() {
            rigid.push(v.iter().map(|a| a / nv).collect());
        }
    }
    let linear = rigid.len() == 5;
    // projected mass-weighted Hessian P Hm P
    let mut hm = Mat::<f64>::from_fn(dim, dim, |i, j| hessian[i * dim + j] / (sq[i] * sq[j]));
    let mut p = Mat::<f64>::from_fn(dim, dim, |i, j| if i == j { 1.0 } else { 0.0 });
    for u in &rigid {
        for i in 0..dim {
            for j in 0..dim {
                p[(i, j)] -= u[i] * u[j];
            }
        }
    }
    hm = bandcast_linalg::mul(p.as_ref(), false, hm.as_ref(), false);
    hm = bandcast_linalg::mul(hm.as_ref(), false, p.as_ref(), false);
    let (lam, vecs) = eigh(hm.as_ref());
    let to_cm = |l: f64| l.signum() * l.abs().sqrt() * HARTREE_TO_WAVENUMBER;
    // the rigid-motion eigenvectors: largest overlap with the rigid space
    let mut idx: Vec<(usize, f64)> = (0..dim)
        .map(|k| {
            let o: f64 = rigid
                .iter()
                .map(|u| (0..dim).map(|i| u[i] * vecs[(i, k)]).sum::<f64>().powi(2))
                .sum();
            (k, o)
        })
        .collect();
    idx.sort_by(|a, b| b.1.total_cmp(&a.1));
    let rigid_set: Vec<usize> = idx.iter().take(rigid.len()).map(|x| x.0).collect();
    let rigid_cm1: Vec<f64> = rigid_set.iter().map(|&k| to_cm(lam[k])).collect();
    let mut modes = Vec::new();
    let mut zpe = 0.0;
    let mut n_imag = 0;
    let vib: Vec<usize> = (0..dim).filter(|k| !rigid_set.contains(k)).collect();
    for &k in &vib {
        let mut d: Vec<f64> = (0..dim).map(|i| vecs[(i, k)] / sq[i]).collect();
        let nd = d.iter().map(|x| x * x).sum::<f64>().sqrt();
        d.iter_mut().for_each(|x| *x /= nd);
        let disp: Vec<[f64; 3]> = d.chunks(3).map(|c| [c[0], c[1], c[2]]).collect();
        let l = lam[k];
        if l < 0.0 {
            n_imag += 1;
        } else {
            zpe += 0.5 * l.sqrt();
        }
        modes.push(Mode {
            wavenumber_cm1: to_cm(l),
            irrep: String::new(),
            displacement: disp,
        });
    }
    if let Some(pg) = pg {
        assign_irreps(pg, &mut modes);
    }
    HarmonicAnalysis {
        modes,
        rigid_cm1,
        zero_point_hartree: zpe,
        zero_point_ev: zpe * HARTREE_TO_EV,
        n_imaginary: n_imag,
        linear,
    }
}

/// Irreps of the modes: modes within 0.5 cm⁻¹ form one set; the character of operation R
/// on a set is Σ_modes ⟨d|R d⟩ with (R d)_π(A) = R d_A; the set's label is the irrep whose
/// multiplicity is 1 (the others 0) when the characters reduce that way.
fn assign_irreps(pg: &PointGroup, modes: &mut [Mode]) {
    let table = &pg.table;
    let nclass = table.classes.len();
    let mut i = 0;
    while i < modes.len() {
        let mut j = i + 1;
        while j < modes.len() && (modes[j].wavenumber_cm1 - modes[i].wavenumber_cm1).abs() < 0.5 {
            j += 1;
        }
        let mut chi = vec![0.0; nclass];
        let mut count = vec![0usize; nclass];
        for op in &pg.operations {
            let mut c = 0.0;
            for m in &modes[i..j] {
                let d = &m.displacement;
                for (a, da) in d.iter().enumerate() {
                    let r = ops::apply(&op.matrix, da);
                    c += ops::dot(&r, &d[op.permutation[a]]);
                }
            }
            chi[op.class] += c;
            count[op.class] += 1;
        }
        for (c, &k) in chi.iter_mut().zip(&count) {
            if k > 0 {
                *c /= k as f64;
            }
        }
        let mult = table.reduce(&chi);
        let one: Vec<usize> = (0..mult.len())
            .filter(|&g| (mult[g] - 1.0).abs() < 0.2)
            .collect();
        let rest_zero = mult
            .iter()
            .enumerate()
            .all(|(g, &x)| one.contains(&g) || x.abs() < 0.2);
        let label = if one.len() == 1 && rest_zero {
            table.irreps[one[0]].name.clone()
        } else {
            "?".to_string()
        };
        for m in &mut modes[i..j] {
            m.irrep = label.clone();
        }
        i = j;
    }
}
