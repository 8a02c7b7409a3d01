//! Localising a core hole on one atom.
//!
//! When atoms are symmetry-equivalent (the two O of CO2, the two N of N2, the carbons of
//! ethane or benzene) the canonical 1s orbitals are symmetric and antisymmetric
//! combinations spread over all of them. A hole in such an orbital is delocalised; its
//! relaxed ΔSCF energy lies several eV above the measured one, while a hole localised on
//! one atom (which breaks the symmetry) relaxes fully and agrees with experiment (Bagus &
//! Schaefer, J. Chem. Phys. 56 (1972) 224, for O2+ 1s⁻¹; Cederbaum & Domcke,
//! J. Chem. Phys. 66 (1977) 5084, for the physics of the broken symmetry).
//!
//! Method: take the occupied orbitals whose energy lies near the canonical orbital with
//! the largest population on the target atom (the "core block": all 1s orbitals of the
//! equivalent atoms, and at most the 1s orbitals of chemically shifted atoms of the same
//! element), and rotate within that block so that one orbital has the largest possible
//! Löwdin population on the target atom. With D = S^{1/2} C_block and D_A its rows on the
//! target atom, the population of the combination x (xᵀx = 1) is xᵀ D_Aᵀ D_A x, so the best
//! combination is the top eigenvector of the small matrix M = D_Aᵀ D_A; the other
//! eigenvectors complete an orthonormal rotation of the block, so the occupied space (and
//! the neutral's energy) is unchanged.

use bandcast_linalg::{eigh, mul, Mat};

use crate::basis::BasisSet;

use super::population::atom_aos;

/// The block of core orbitals is the occupied orbitals within this fraction of the seed
/// orbital's energy (1s levels of one element differ by ≲ 0.5 Eh between environments; the
/// next shell lies far outside: C 1s ≈ −11.3 Eh, C 2s ≈ −1 Eh).
pub const CORE_WINDOW_FRACTION: f64 = 0.2;

#[derive(Debug, Clone)]
pub struct LocalisedHole {
    /// Orbital coefficients: `c` with the core block rotated (AO × MO).
    pub c: Mat<f64>,
    /// Column of `c` that holds the localised 1s of the target.
    pub hole: usize,
    /// Löwdin population of the localised orbital on the target atom.
    pub population: f64,
    /// Population of the best canonical orbital on the target atom (before rotation).
    pub canonical_population: f64,
    /// Column of that canonical orbital (its −ε is the Koopmans 1s energy).
    pub canonical: usize,
    /// The MO columns of the core block.
    pub block: Vec<usize>,
}

impl LocalisedHole {
    /// Whether the rotation changed anything that matters (the canonical orbital was not
    /// already on one atom).
    pub fn rotated(&self) -> bool {
        self.block.len() > 1 && self.population - self.canonical_population > 0.02
    }
}

/// Localise the 1s hole of `atom` in the occupied orbitals `occ` (columns of `c`), with
/// energies `eps`, overlap square root `s_half`.
pub fn localise_core_hole(
    basis: &BasisSet,
    s_half: &Mat<f64>,
    c: &Mat<f64>,
    eps: &[f64],
    occ: &[usize],
    atom: usize,
) -> LocalisedHole {
    let aos = atom_aos(basis, atom);
    let d = mul(s_half.as_ref(), false, c.as_ref(), false);
    let pop = |k: usize| -> f64 { aos.iter().map(|&mu| d[(mu, k)] * d[(mu, k)]).sum() };
    // Seed: occupied orbital with the largest population on the target, lowest energy first
    // on ties (a 1s outweighs the valence on its own atom).
    let mut seed = occ[0];
    let mut best = f64::MIN;
    for &k in occ {
        let p = pop(k);
        if p > best + 1e-12 {
            best = p;
            seed = k;
        }
    }
    // Prefer the deepest orbital among those nearly as populated (a C 1s versus a C 2s
    // lone pair): take the lowest-energy occupied orbital with ≥ half the best population.
    for &k in occ {
        if pop(k) >= 0.5 * best && eps[k] < eps[seed] {
            seed = k;
        }
    }
    let canonical_population = pop(seed);
    let e0 = eps[seed];
    let window = CORE_WINDOW_FRACTION * e0.abs();
    let block: Vec<usize> = occ
        .iter()
        .copied()
        .filter(|&k| (eps[k] - e0).abs() <= window)
        .collect();
    let nb = block.len();
    // M = D_Aᵀ D_A over the block.
    let m = Mat::<f64>::from_fn(nb, nb, |i, j| {
        aos.iter()
            .map(|&mu| d[(mu, block[i])] * d[(mu, block[j])])
            .sum()
    });
    let (w, x) = eigh(m.as_ref());
    // Eigenvalues ascending: the localised orbital is the last eigenvector. Order the new
    // block columns with it first, then the others by descending population.
    let mut out = c.clone();
    let n_ao = c.nrows();
    for (slot, &col) in block.iter().enumerate() {
        let e = nb - 1 - slot;
        let v = block_combination(c, &block, |i| x[(i, e)], &aos);
        for mu in 0..n_ao {
            out[(mu, col)] = v[mu];
        }
    }
    LocalisedHole {
        c: out,
        hole: block[0],
        population: w[nb - 1],
        canonical_population,
        canonical: seed,
        block,
    }
}

/// The orbital Σ_i C[:, block[i]] · coef(i), its sign fixed so that its largest coefficient
/// on the atom's functions `aos` is positive (independent of the eigen solver's sign
/// choice). Shared by the 1s localisation here and the 2s/2p hole set (`shell_hole.rs`).
pub(crate) fn block_combination(
    c: &Mat<f64>,
    block: &[usize],
    coef: impl Fn(usize) -> f64,
    aos: &[usize],
) -> Vec<f64> {
    let mut v: Vec<f64> = (0..c.nrows())
        .map(|mu| (0..block.len()).map(|i| c[(mu, block[i])] * coef(i)).sum())
        .collect();
    let big = aos
        .iter()
        .map(|&mu| v[mu])
        .fold(0.0f64, |a, b| if b.abs() > a.abs() { b } else { a });
    if big < 0.0 {
        v.iter_mut().for_each(|t| *t = -*t);
    }
    v
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;

    fn s_shell(atom: usize, e: f64) -> Shell {
        Shell {
            l: 0,
            pure: false,
            center: [0.0, 0.0, atom as f64],
            atom,
            exponents: vec![e],
            coefficients: vec![1.0],
        }
    }

    /// Model of N2's core: two orthonormal "1s" AOs (one per atom) plus one valence AO per
    /// atom; canonical orbitals are the ± combinations of the 1s pair, nearly degenerate.
    #[test]
    fn symmetric_pair_is_localised_on_the_chosen_atom() {
        let basis = BasisSet::from_shells(
            "m",
            vec![
                s_shell(0, 100.0),
                s_shell(0, 1.0),
                s_shell(1, 100.0),
                s_shell(1, 1.0),
            ],
        );
        let s = Mat::<f64>::identity(4, 4);
        let r = std::f64::consts::FRAC_1_SQRT_2;
        // Columns: 1σg, 1σu, valence bonding.
        let mut c = Mat::<f64>::zeros(4, 3);
        c[(0, 0)] = r;
        c[(2, 0)] = r;
        c[(0, 1)] = r;
        c[(2, 1)] = -r;
        c[(1, 2)] = r;
        c[(3, 2)] = r;
        let eps = [-15.68, -15.67, -1.5];
        for target in [0usize, 1] {
            let h = localise_core_hole(&basis, &s, &c, &eps, &[0, 1, 2], target);
            assert_eq!(h.block, vec![0, 1]);
            assert!((h.canonical_population - 0.5).abs() < 1e-12);
            assert!((h.population - 1.0).abs() < 1e-12);
            assert!(h.rotated());
            let hole: Vec<f64> = (0..4).map(|mu| h.c[(mu, h.hole)]).collect();
            let on = if target == 0 { 0 } else { 2 };
            assert!((hole[on] - 1.0).abs() < 1e-12, "{hole:?}");
            // The rotated block stays orthonormal and the valence orbital is untouched.
            let ctc = mul(h.c.as_ref(), true, h.c.as_ref(), false);
            for i in 0..3 {
                for j in 0..3 {
                    let e = if i == j { 1.0 } else { 0.0 };
                    assert!((ctc[(i, j)] - e).abs() < 1e-12);
                }
            }
            assert_eq!(h.c[(1, 2)], c[(1, 2)]);
        }
    }

    #[test]
    fn a_lone_core_orbital_is_left_alone() {
        let basis = BasisSet::from_shells("m", vec![s_shell(0, 100.0), s_shell(1, 1.0)]);
        let s = Mat::<f64>::identity(2, 2);
        let mut c = Mat::<f64>::zeros(2, 2);
        c[(0, 0)] = 1.0;
        c[(1, 1)] = 1.0;
        let h = localise_core_hole(&basis, &s, &c, &[-20.0, -0.5], &[0, 1], 0);
        assert_eq!(h.block, vec![0]);
        assert_eq!(h.hole, 0);
        assert!(!h.rotated());
        assert!((h.population - 1.0).abs() < 1e-12);
    }
}
