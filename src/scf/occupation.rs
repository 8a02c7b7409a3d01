//! Which orbitals are occupied after a diagonalisation: aufbau, or the maximum overlap
//! method (MOM: Gilbert, Besley & Gill, J. Phys. Chem. A 112 (2008) 13164; initial-MOM:
//! Barca, Gilbert & Gill, J. Chem. Theory Comput. 14 (2018) 1501).

use bandcast_linalg::{mul, Mat};

/// 0/1 flags: the `n` lowest orbitals (eigenvalues come ascending) occupied.
pub fn aufbau(n_mo: usize, n: usize) -> Vec<f64> {
    (0..n_mo).map(|i| if i < n { 1.0 } else { 0.0 }).collect()
}

/// MOM projections p_j = Σ_i O_ij², O = C_refᵀ S C_new, i over the reference columns with
/// `ref_occ[i] > 0.5`: the squared length of new orbital j's projection onto the occupied
/// reference space (0 ≤ p_j ≤ 1, Σ_j p_j = number occupied). Gilbert et al. (2008, eq. 3)
/// sum the overlaps themselves; a sum of |O_ij| would be sign-independent but lets an
/// orbital spread thinly over many occupied ones outscore a clean occupied orbital (a
/// valence-virtual mixture beat the 1s orbitals of other carbons in a 20-carbon chain), so
/// the squared norm is used.
pub fn projections(c_ref: &Mat<f64>, ref_occ: &[f64], s: &Mat<f64>, c_new: &Mat<f64>) -> Vec<f64> {
    let occ_cols: Vec<usize> = (0..c_ref.ncols().min(ref_occ.len()))
        .filter(|&i| ref_occ[i] > 0.5)
        .collect();
    let n = c_ref.nrows();
    let cref_occ = Mat::<f64>::from_fn(n, occ_cols.len(), |mu, k| c_ref[(mu, occ_cols[k])]);
    let sc = mul(s.as_ref(), false, c_new.as_ref(), false);
    let o = mul(cref_occ.as_ref(), true, sc.as_ref(), false);
    (0..c_new.ncols())
        .map(|j| (0..o.nrows()).map(|i| o[(i, j)] * o[(i, j)]).sum())
        .collect()
}

/// Indices of the `n` largest values among `candidates`, ties to the lower index
/// (deterministic), returned in ascending index order.
pub fn largest(values: &[f64], candidates: &[usize], n: usize) -> Vec<usize> {
    let mut idx: Vec<usize> = candidates.to_vec();
    idx.sort_by(|&a, &b| values[b].total_cmp(&values[a]).then(a.cmp(&b)));
    idx.truncate(n);
    idx.sort_unstable();
    idx
}

/// MOM occupation of one spin channel: occupy the orbitals of `c_new` that overlap most
/// with the occupied reference orbitals.
pub fn mom(c_ref: &Mat<f64>, ref_occ: &[f64], s: &Mat<f64>, c_new: &Mat<f64>) -> Vec<f64> {
    let n_occ = ref_occ.iter().filter(|&&o| o > 0.5).count();
    let p = projections(c_ref, ref_occ, s, c_new);
    let all: Vec<usize> = (0..c_new.ncols()).collect();
    let mut occ = vec![0.0; c_new.ncols()];
    for i in largest(&p, &all, n_occ) {
        occ[i] = 1.0;
    }
    occ
}

/// MOM for ROHF (one orbital set): first the doubly occupied orbitals by overlap with the
/// reference closed shell, then among the rest the singly occupied ones by overlap with the
/// reference open shell. Returns (alpha flags, beta flags) with beta ⊂ alpha.
pub fn mom_restricted_open(
    c_ref: &Mat<f64>,
    ref_alpha: &[f64],
    ref_beta: &[f64],
    s: &Mat<f64>,
    c_new: &Mat<f64>,
) -> (Vec<f64>, Vec<f64>) {
    let closed: Vec<f64> = ref_alpha
        .iter()
        .zip(ref_beta)
        .map(|(&a, &b)| if a > 0.5 && b > 0.5 { 1.0 } else { 0.0 })
        .collect();
    let open: Vec<f64> = ref_alpha
        .iter()
        .zip(ref_beta)
        .map(|(&a, &b)| if a > 0.5 && b <= 0.5 { 1.0 } else { 0.0 })
        .collect();
    let n_closed = closed.iter().filter(|&&o| o > 0.5).count();
    let n_open = open.iter().filter(|&&o| o > 0.5).count();
    let m = c_new.ncols();
    let all: Vec<usize> = (0..m).collect();
    let pc = projections(c_ref, &closed, s, c_new);
    let chosen_closed = largest(&pc, &all, n_closed);
    let rest: Vec<usize> = all
        .iter()
        .copied()
        .filter(|i| !chosen_closed.contains(i))
        .collect();
    let po = projections(c_ref, &open, s, c_new);
    let chosen_open = largest(&po, &rest, n_open);
    let mut a = vec![0.0; m];
    let mut b = vec![0.0; m];
    for &i in &chosen_closed {
        a[i] = 1.0;
        b[i] = 1.0;
    }
    for &i in &chosen_open {
        a[i] = 1.0;
    }
    (a, b)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn identity(n: usize) -> Mat<f64> {
        Mat::<f64>::from_fn(n, n, |i, j| if i == j { 1.0 } else { 0.0 })
    }

    #[test]
    fn aufbau_fills_lowest() {
        assert_eq!(aufbau(4, 2), vec![1.0, 1.0, 0.0, 0.0]);
    }

    #[test]
    fn mom_follows_a_reordered_orbital() {
        // Reference: orbitals 0 and 2 occupied (a hole in orbital 1). The new orbitals are the
        // reference ones in a different order, with signs flipped: the occupied ones must be
        // followed wherever they went.
        let s = identity(3);
        let c_ref = identity(3);
        let perm = [2usize, 0, 1]; // new column j is old column perm[j]
        let c_new = Mat::<f64>::from_fn(3, 3, |i, j| if i == perm[j] { -1.0 } else { 0.0 });
        let occ = mom(&c_ref, &[1.0, 0.0, 1.0], &s, &c_new);
        // old 0 → new 1, old 2 → new 0
        assert_eq!(occ, vec![1.0, 1.0, 0.0]);
    }

    #[test]
    fn mom_with_mixed_orbitals_picks_largest_projection() {
        let s = identity(2);
        let c_ref = identity(2);
        let (c, sn) = (0.8f64, 0.6f64);
        // new orbital 0 is mostly old 1, new orbital 1 mostly old 0
        let c_new = Mat::<f64>::from_fn(2, 2, |i, j| [[sn, c], [c, -sn]][i][j]);
        assert_eq!(mom(&c_ref, &[1.0, 0.0], &s, &c_new), vec![0.0, 1.0]);
    }

    #[test]
    fn a_clean_occupied_orbital_beats_one_spread_thinly_over_many() {
        // Reference: orbitals 0–3 occupied, 4 virtual. New orbitals: old 0 unchanged; in the
        // span of old 1–4 an orthonormal set in which v = 0.6 (e1+e2+e3)/√3 + 0.8 e4 is
        // mostly virtual. A sum of |O_ij| scores v at 1.04, above old 0's 1.00, and would
        // drop the clean occupied orbital; the squared projection keeps it (1 vs 0.36).
        let s = identity(5);
        let c_ref = identity(5);
        let r3 = 3f64.sqrt();
        let (a, b) = (0.6, 0.8);
        let cols: [[f64; 5]; 5] = [
            [1.0, 0.0, 0.0, 0.0, 0.0],
            [0.0, a / r3, a / r3, a / r3, b],
            [0.0, 1.0 / 2f64.sqrt(), -1.0 / 2f64.sqrt(), 0.0, 0.0],
            [
                0.0,
                1.0 / 6f64.sqrt(),
                1.0 / 6f64.sqrt(),
                -2.0 / 6f64.sqrt(),
                0.0,
            ],
            [0.0, b / r3, b / r3, b / r3, -a],
        ];
        let c_new = Mat::<f64>::from_fn(5, 5, |i, j| cols[j][i]);
        let ctc = mul(c_new.as_ref(), true, c_new.as_ref(), false);
        for i in 0..5 {
            for j in 0..5 {
                let e = if i == j { 1.0 } else { 0.0 };
                assert!((ctc[(i, j)] - e).abs() < 1e-12);
            }
        }
        let occ = mom(&c_ref, &[1.0, 1.0, 1.0, 1.0, 0.0], &s, &c_new);
        assert_eq!(occ, vec![1.0, 0.0, 1.0, 1.0, 1.0]);
    }

    #[test]
    fn restricted_open_core_hole() {
        // Reference: alpha 0,1,2 occupied; beta 1,2 (hole in orbital 0, open shell).
        let s = identity(4);
        let c_ref = identity(4);
        let perm = [1usize, 2, 0, 3];
        let c_new = Mat::<f64>::from_fn(4, 4, |i, j| if i == perm[j] { 1.0 } else { 0.0 });
        let (a, b) = mom_restricted_open(
            &c_ref,
            &[1.0, 1.0, 1.0, 0.0],
            &[0.0, 1.0, 1.0, 0.0],
            &s,
            &c_new,
        );
        assert_eq!(a, vec![1.0, 1.0, 1.0, 0.0]);
        assert_eq!(b, vec![1.0, 1.0, 0.0, 0.0]); // old 0 (the open one) is new column 2
    }
}
