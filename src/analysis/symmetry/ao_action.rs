//! How the operations of a point group act on AO coefficient vectors.
//!
//! An operation R carries the shells of atom A onto the shells of atom perm(A) (same
//! position in that atom's shell list) and mixes the functions of each shell by D(R)
//! (`angular::shell_rotation`). For an orbital ψ = Σ_μ φ_μ c_μ, O_R ψ = Σ_ν φ_ν (R c)_ν with
//! (R c)[target shell, n] = Σ_m D_nm c[shell, m]. Densities transform as P ↦ R P Rᵀ.

use std::collections::HashMap;

use bandcast_linalg::Mat;

use super::angular::shell_rotation;
use super::group::PointGroup;
use crate::basis::BasisSet;

/// One operation on the AOs of a basis.
#[derive(Debug, Clone)]
pub struct AoAction {
    /// Shell k is carried onto shell `target[k]`.
    target: Vec<usize>,
    /// D(R) per (l, pure), row-major.
    blocks: HashMap<(usize, bool), Vec<f64>>,
}

/// The action of every operation of `pg` (in `pg.operations` order) on the AOs of `basis`;
/// None when the basis is not carried onto itself (shells of another l or harmonics, or with
/// `same_exponents` other exponents, on atoms the group makes equivalent).
pub fn ao_actions(
    pg: &PointGroup,
    basis: &BasisSet,
    same_exponents: bool,
) -> Option<Vec<AoAction>> {
    let n_atoms = pg
        .operations
        .first()
        .map(|o| o.permutation.len())
        .unwrap_or(0);
    let mut shells_of_atom: Vec<Vec<usize>> = vec![Vec::new(); n_atoms];
    for (k, sh) in basis.shells.iter().enumerate() {
        if sh.atom >= n_atoms {
            return None;
        }
        shells_of_atom[sh.atom].push(k);
    }
    let mut position_in_atom = vec![0usize; basis.shells.len()];
    for list in &shells_of_atom {
        for (p, &k) in list.iter().enumerate() {
            position_in_atom[k] = p;
        }
    }
    let mut out = Vec::with_capacity(pg.operations.len());
    for op in &pg.operations {
        let mut target = Vec::with_capacity(basis.shells.len());
        for (k, sh) in basis.shells.iter().enumerate() {
            let b = op.permutation[sh.atom];
            let t = *shells_of_atom[b].get(position_in_atom[k])?;
            let ts = &basis.shells[t];
            if ts.l != sh.l
                || ts.pure != sh.pure
                || (same_exponents && ts.exponents != sh.exponents)
            {
                return None;
            }
            target.push(t);
        }
        let mut blocks: HashMap<(usize, bool), Vec<f64>> = HashMap::new();
        for sh in &basis.shells {
            blocks
                .entry((sh.l, sh.pure))
                .or_insert_with(|| shell_rotation(sh.l, sh.pure, &op.matrix));
        }
        out.push(AoAction { target, blocks });
    }
    Some(out)
}

impl AoAction {
    /// out = R c for one coefficient vector (length n_basis).
    pub fn apply(&self, basis: &BasisSet, c: &[f64], out: &mut [f64]) {
        for (k, sh) in basis.shells.iter().enumerate() {
            let nf = sh.n_functions();
            let d = &self.blocks[&(sh.l, sh.pure)];
            let (src, dst) = (basis.offsets[k], basis.offsets[self.target[k]]);
            for n in 0..nf {
                let mut v = 0.0;
                for m in 0..nf {
                    v += d[n * nf + m] * c[src + m];
                }
                out[dst + n] = v;
            }
        }
    }

    /// R as a dense n_basis × n_basis matrix (column j = R e_j).
    pub fn matrix(&self, basis: &BasisSet) -> Mat<f64> {
        let n = basis.n_basis;
        let mut r = Mat::<f64>::zeros(n, n);
        let mut e = vec![0.0; n];
        let mut col = vec![0.0; n];
        for j in 0..n {
            e[j] = 1.0;
            self.apply(basis, &e, &mut col);
            e[j] = 0.0;
            for i in 0..n {
                r[(i, j)] = col[i];
            }
        }
        r
    }
}
