//! The atom-localised 2s or 2p hole orbitals of one atom (Na–Ar), for ΔSCF holes in the
//! second shell.
//!
//! Method (our own, in the spirit of `localize.rs`):
//! 1. Group the occupied orbitals into energy clusters (sorted by ε, a new cluster where the
//!    gap to the previous orbital exceeds `CLUSTER_GAP_FRACTION` of its |ε|: the 1s, 2s and
//!    2p levels of a third-row atom lie far apart, S 1s ≈ −92, 2s ≈ −9, 2p ≈ −6.7 Eh in H2S,
//!    valence above −1.3 Eh).
//! 2. The shell's cluster is the one holding the atom's weight of that angular momentum: with
//!    D = S^{1/2} C, the population of orbital k on the atom's l-type AOs is Σ_{μ∈A,l} D_μk².
//!    For 2p the first cluster whose l = 1 populations sum to ≥ 1.5 (three 2p orbitals, ≈ 3);
//!    for 2s the second cluster whose l = 0 populations sum to ≥ 0.5 (the first is the 1s).
//! 3. Within that cluster (the "block") the orbitals of largest population on the atom's
//!    l-type AOs are the top eigenvectors of M = D_Alᵀ D_Al (one for 2s, three for 2p): this
//!    projects the block onto the atom's 2p (or 2s) AOs. The other eigenvectors complete an
//!    orthonormal rotation of the block, so the occupied space and the neutral energy are
//!    unchanged.
//! 4. For 2p, the three localised orbitals are rotated among themselves to diagonalise the
//!    neutral Fock operator in their span: their directions are the principal axes of the
//!    molecular field at the atom (along and across a bond, in and out of a plane), and the
//!    three diagonal energies −ε_k are their Koopmans binding energies. In that frame the
//!    field has no off-diagonal terms at Koopmans level; the ΔSCF holes are computed along
//!    these axes (`two_p.rs`).
//!
//! The 2p of S in H2S mixes little with the valence (≥ 0.99 of each localised orbital sits on
//! S); the projection picks the atom's 2p set even where a valence or another atom's core
//! orbital falls in the same cluster (Na 2p near F 2s or O 2s).

use bandcast_linalg::{eigh, mul, Mat};

use crate::basis::BasisSet;
use crate::error::{Error, Result};

use super::population::{atom_aos, orbital_population_on};
use super::shell::CoreShell;

/// One spatial 2p hole of a level (JSON `spatial_holes`).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SpatialHole {
    /// 1, 2, 3 in ascending orbital energy (the most bound first).
    pub axis: usize,
    /// Direction of the hole's p orbital on the atom (unit vector in the input frame, sign
    /// arbitrary).
    pub direction: [f64; 3],
    pub koopmans_ev: f64,
    pub dscf_ev: f64,
    pub hole_population: f64,
    pub s2: f64,
    pub start: String,
    /// When the hole is degenerate with an earlier axis (same orbital energy within
    /// `DEGENERATE_HARTREE`), that axis: its ΔSCF is taken, no SCF is run.
    pub same_as_axis: Option<usize>,
    /// ΔSCF plus the change of the MP2 energy (eV), with `--method dmp2` only.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub dmp2_ev: Option<f64>,
}

/// Orbital energies closer than this (hartree) make two 2p axes degenerate by symmetry.
pub const DEGENERATE_HARTREE: f64 = 2e-6;

/// Direction of orbital `col` on the atom's p functions: the (x, y, z) coefficients of the
/// atom's p shell where the orbital is largest, normalised.
pub fn p_direction(basis: &BasisSet, c: &Mat<f64>, col: usize, atom: usize) -> [f64; 3] {
    let mut first = 0usize;
    let mut best = ([0.0; 3], 0.0);
    for sh in &basis.shells {
        let n = sh.n_functions();
        if sh.atom == atom && sh.l == 1 {
            let v = [c[(first, col)], c[(first + 1, col)], c[(first + 2, col)]];
            let norm = v.iter().map(|x| x * x).sum::<f64>();
            if norm > best.1 {
                best = (v, norm);
            }
        }
        first += n;
    }
    let r = best.1.sqrt().max(1e-300);
    best.0.map(|x| x / r)
}

/// Relative energy gap that starts a new cluster of occupied orbitals.
pub const CLUSTER_GAP_FRACTION: f64 = 0.2;

/// The localised hole orbitals of one shell of one atom.
#[derive(Debug, Clone)]
pub struct ShellHoles {
    /// Orbitals with the block rotated (AO × MO).
    pub c: Mat<f64>,
    /// Columns of `c` holding the hole orbitals (1 for 2s, 3 for 2p, in ascending ε).
    pub holes: Vec<usize>,
    /// ⟨φ|F|φ⟩ of each hole orbital (hartree; −ε is its Koopmans binding energy).
    pub eps: Vec<f64>,
    /// Löwdin population of each hole orbital on the atom.
    pub populations: Vec<f64>,
    /// The MO columns of the block.
    pub block: Vec<usize>,
}

/// Population of each column of `d` (= S^{1/2} C) on the AOs `rows`.
fn populations(d: &Mat<f64>, rows: &[usize], cols: &[usize]) -> Vec<f64> {
    cols.iter()
        .map(|&k| rows.iter().map(|&mu| d[(mu, k)] * d[(mu, k)]).sum())
        .collect()
}

/// Localise the `shell` (2s or 2p) hole set of `atom` in the occupied orbitals `occ`.
pub fn localise_shell(
    basis: &BasisSet,
    s_half: &Mat<f64>,
    c: &Mat<f64>,
    eps: &[f64],
    occ: &[usize],
    atom: usize,
    shell: CoreShell,
) -> Result<ShellHoles> {
    let l = shell.l();
    let n_hole = 2 * l + 1;
    let map = basis.ao_map();
    let rows: Vec<usize> = atom_aos(basis, atom)
        .into_iter()
        .filter(|&mu| map[mu].2 == l)
        .collect();
    let d = mul(s_half.as_ref(), false, c.as_ref(), false);
    let mut sorted = occ.to_vec();
    sorted.sort_by(|&a, &b| eps[a].total_cmp(&eps[b]));
    let mut clusters: Vec<Vec<usize>> = Vec::new();
    for &k in &sorted {
        match clusters.last_mut() {
            Some(cl)
                if eps[k] - eps[*cl.last().unwrap()]
                    <= CLUSTER_GAP_FRACTION * eps[*cl.last().unwrap()].abs() =>
            {
                cl.push(k)
            }
            _ => clusters.push(vec![k]),
        }
    }
    let (need, skip) = match shell {
        CoreShell::P2 => (1.5, 0usize),
        CoreShell::S2 => (0.5, 1usize),
        CoreShell::S1 => (0.5, 0usize),
    };
    let block = clusters
        .iter()
        .filter(|cl| populations(&d, &rows, cl).iter().sum::<f64>() >= need)
        .nth(skip)
        .filter(|cl| cl.len() >= n_hole)
        .cloned()
        .ok_or_else(|| {
            Error::computation(format!(
                "atom {}: no occupied {} set found on the atom (is it Na–Ar?)",
                atom + 1,
                shell.name()
            ))
        })?;
    let nb = block.len();
    let m = Mat::<f64>::from_fn(nb, nb, |i, j| {
        rows.iter()
            .map(|&mu| d[(mu, block[i])] * d[(mu, block[j])])
            .sum()
    });
    let (_w, x) = eigh(m.as_ref());
    // Top n_hole eigenvectors span the atom's shell; rotate them to diagonalise the Fock
    // operator (diagonal in the canonical block: eps).
    let top: Vec<usize> = (nb - n_hole..nb).rev().collect();
    let f = Mat::<f64>::from_fn(n_hole, n_hole, |a, b| {
        (0..nb)
            .map(|i| x[(i, top[a])] * eps[block[i]] * x[(i, top[b])])
            .sum()
    });
    let (fe, u) = eigh(f.as_ref());
    // Block coefficients of the new columns: holes first, then the complement.
    let mut cols: Vec<Vec<f64>> = (0..n_hole)
        .map(|h| {
            (0..nb)
                .map(|i| (0..n_hole).map(|a| x[(i, top[a])] * u[(a, h)]).sum())
                .collect()
        })
        .collect();
    for e in (0..nb - n_hole).rev() {
        cols.push((0..nb).map(|i| x[(i, e)]).collect());
    }
    let n_ao = c.nrows();
    let mut out = c.clone();
    let aos = atom_aos(basis, atom);
    for (slot, xb) in cols.iter().enumerate() {
        let v = super::localize::block_combination(c, &block, |i| xb[i], &aos);
        for mu in 0..n_ao {
            out[(mu, block[slot])] = v[mu];
        }
    }
    let holes: Vec<usize> = block[..n_hole].to_vec();
    let pops = holes
        .iter()
        .map(|&k| {
            let v: Vec<f64> = (0..n_ao).map(|mu| out[(mu, k)]).collect();
            orbital_population_on(basis, s_half, &v, atom)
        })
        .collect();
    Ok(ShellHoles {
        c: out,
        holes,
        eps: fe,
        populations: pops,
        block,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;

    fn shell(atom: usize, l: usize) -> Shell {
        Shell {
            l,
            pure: false,
            center: [0.0, 0.0, 2.0 * atom as f64],
            atom,
            exponents: vec![1.0],
            coefficients: vec![1.0],
        }
    }

    /// Model of Cl2's inner shells in an orthonormal AO basis (s, px, py, pz on each atom):
    /// the canonical 1s and 2p orbitals are g/u combinations spread over both atoms. The 2p set
    /// of atom A is then exactly A's three p AOs, and the Fock operator in their span has the
    /// g/u averages on its diagonal (exact conditions of the model).
    #[test]
    fn the_2p_set_of_one_of_two_equivalent_atoms() {
        let basis = BasisSet::from_shells(
            "m",
            vec![shell(0, 0), shell(0, 1), shell(1, 0), shell(1, 1)],
        );
        let r = std::f64::consts::FRAC_1_SQRT_2;
        // columns: 1s g, 1s u, then (px, py, pz) g and u
        let mut c = Mat::<f64>::zeros(8, 8);
        c[(0, 0)] = r;
        c[(4, 0)] = r;
        c[(0, 1)] = r;
        c[(4, 1)] = -r;
        for k in 0..3 {
            c[(1 + k, 2 + 2 * k)] = r;
            c[(5 + k, 2 + 2 * k)] = r;
            c[(1 + k, 3 + 2 * k)] = r;
            c[(5 + k, 3 + 2 * k)] = -r;
        }
        let eps = [-92.0, -91.99, -6.70, -6.69, -6.70, -6.69, -6.75, -6.72];
        let occ: Vec<usize> = (0..8).collect();
        let id = Mat::<f64>::identity(8, 8);
        let h = localise_shell(&basis, &id, &c, &eps, &occ, 1, CoreShell::P2).unwrap();
        assert_eq!(h.block.len(), 6);
        assert_eq!(h.holes.len(), 3);
        // Lowest first: pz (the σ direction along the bond), then the degenerate px, py.
        assert!((h.eps[0] + 6.735).abs() < 1e-12, "{:?}", h.eps);
        assert!((h.eps[1] + 6.695).abs() < 1e-12 && (h.eps[2] + 6.695).abs() < 1e-12);
        for (k, &col) in h.holes.iter().enumerate() {
            assert!((h.populations[k] - 1.0).abs() < 1e-12);
            // nothing on atom A's functions (AOs 0–3)
            assert!((0..4).all(|mu| h.c[(mu, col)].abs() < 1e-12));
        }
        let d = p_direction(&basis, &h.c, h.holes[0], 1);
        assert!((d[2].abs() - 1.0).abs() < 1e-12, "{d:?}");
        // The 1s cluster is skipped; a 2s is the second s cluster: absent here.
        assert!(localise_shell(&basis, &id, &c, &eps, &occ, 1, CoreShell::S2).is_err());
    }
}
