//! What an orbital is made of: Mulliken gross populations of a molecular orbital (or a
//! degenerate set) gathered by atom and atomic shell ("O1 2p 0.91, H2 1s 0.05, H3 1s 0.05").
//!
//! Gross population of AO μ in MO i (R. S. Mulliken, J. Chem. Phys. 23 (1955) 1833):
//! q_μi = C_μi (S C)_μi, Σ_μ q_μi = 1 for an S-normalised orbital. Fractions are summed over
//! the orbitals of a degenerate set and divided by the set's total, so they add up to 1 over
//! all entries before small ones are dropped. Mulliken shares depend on the basis set (and
//! can be slightly negative); read them as a qualitative make-up, not a measurable quantity.
//!
//! Shell labels. A basis function of angular momentum l on an atom is named after the atom's
//! valence shell of that l in its ground-state configuration:
//! - s → ns and p → np with n the atom's period (H, He: 1s; their p functions → 2p);
//! - d → 3d (through Zn; for Ga–Kr, whose 3d is filled core, polarisation d → 4d);
//!   f → 4f, g → 5g.
//!
//! A function of an l the free atom does not occupy (d on O, p on H) is a polarisation
//! function; it keeps the name of the lowest shell of that l above the valence shell ("3d",
//! "2p"), so "O 3d 0.02" reads "polarisation".
//!
//! Core orbitals. The lowest n_core orbitals (columns 0..n_core of C, which must be sorted by
//! energy as the SCF returns them) are core orbitals, n_core counting per atom 1 (Li–Ne:
//! 1s), 5 (Na–Ar: 1s 2s 2p), 9 (K–Zn: … 3s 3p), 14 (Ga–Kr: … 3d). Each core orbital is given
//! to the element carrying most of its population; its rank among the core orbitals of that
//! element, in energy order, says which shell it is (for N_Z atoms of element Z: the first
//! N_Z are 1s, the next N_Z 2s, then 3 N_Z 2p, …). Functions of that shell's l on atoms of
//! that element are then named after the core shell (N2: 1σg and 1σu are "N1 1s, N2 1s").

use crate::analysis::makeup::MakeupEntry;
use crate::basis::BasisSet;
use crate::chem::elements;
use crate::chem::Molecule;
use bandcast_linalg::Mat;
use std::collections::BTreeMap;

/// Entries below this fraction are left out.
pub const MIN_FRACTION: f64 = 0.02;

/// Period (row of the periodic table) of element `z`.
pub fn period(z: u32) -> u32 {
    match z {
        0..=2 => 1,
        3..=10 => 2,
        11..=18 => 3,
        19..=36 => 4,
        37..=54 => 5,
        _ => 6,
    }
}

/// Valence-shell name of angular momentum `l` on element `z` (see the module documentation).
pub fn valence_shell(z: u32, l: usize) -> String {
    let n = match l {
        0 => period(z),
        1 => period(z).max(2),
        2 => {
            if (31..=36).contains(&z) {
                4
            } else {
                3
            }
        }
        l => l as u32 + 1,
    };
    format!("{n}{}", crate::basis::shell::l_letter(l))
}

/// Core shells of element `z` in energy order: (name, l, number of orbitals).
pub fn core_shells(z: u32) -> &'static [(&'static str, usize, usize)] {
    const K: [(&str, usize, usize); 1] = [("1s", 0, 1)];
    const L: [(&str, usize, usize); 3] = [("1s", 0, 1), ("2s", 0, 1), ("2p", 1, 3)];
    const M: [(&str, usize, usize); 5] = [
        ("1s", 0, 1),
        ("2s", 0, 1),
        ("2p", 1, 3),
        ("3s", 0, 1),
        ("3p", 1, 3),
    ];
    const MD: [(&str, usize, usize); 6] = [
        ("1s", 0, 1),
        ("2s", 0, 1),
        ("2p", 1, 3),
        ("3s", 0, 1),
        ("3p", 1, 3),
        ("3d", 2, 5),
    ];
    match z {
        0..=2 => &[],
        3..=10 => &K,
        11..=18 => &L,
        19..=30 => &M,
        _ => &MD,
    }
}

/// Number of core orbitals of a molecule (frozen-core count).
pub fn n_core(mol: &Molecule) -> usize {
    mol.atoms
        .iter()
        .map(|a| core_shells(a.z).iter().map(|s| s.2).sum::<usize>())
        .sum()
}

/// Atom label: symbol and 1-based input index ("O1").
pub fn atom_label(mol: &Molecule, atom: usize) -> String {
    format!("{}{}", elements::symbol(mol.atoms[atom].z), atom + 1)
}

/// Gross populations of MO `i` per AO.
fn gross(c: &Mat<f64>, sc: &Mat<f64>, i: usize) -> Vec<f64> {
    (0..c.nrows()).map(|mu| c[(mu, i)] * sc[(mu, i)]).collect()
}

/// For each core orbital (columns 0..n_core): (element, core-shell name, l).
fn core_assignment(
    mol: &Molecule,
    basis: &BasisSet,
    c: &Mat<f64>,
    sc: &Mat<f64>,
) -> Vec<Option<(u32, &'static str, usize)>> {
    let nc = n_core(mol).min(c.ncols());
    let mut n_of: BTreeMap<u32, usize> = BTreeMap::new();
    for a in &mol.atoms {
        *n_of.entry(a.z).or_insert(0) += 1;
    }
    let ao = basis.ao_map();
    let mut rank: BTreeMap<u32, usize> = BTreeMap::new();
    (0..nc)
        .map(|i| {
            let q = gross(c, sc, i);
            let mut by_z: BTreeMap<u32, f64> = BTreeMap::new();
            for (mu, &(atom, _, _)) in ao.iter().enumerate() {
                *by_z.entry(mol.atoms[atom].z).or_insert(0.0) += q[mu];
            }
            let (&z, _) = by_z
                .iter()
                .max_by(|a, b| a.1.total_cmp(b.1).then(b.0.cmp(a.0)))?;
            let r = rank.entry(z).or_insert(0);
            let mut pos = *r;
            *r += 1;
            let nz = n_of[&z];
            for &(name, l, k) in core_shells(z) {
                if pos < nz * k {
                    return Some((z, name, l));
                }
                pos -= nz * k;
            }
            None
        })
        .collect()
}

/// Make-up of the orbitals `mo_indices` (one orbital or a degenerate set) by atom and
/// shell, largest first, entries under `MIN_FRACTION` dropped.
pub fn orbital_makeup(
    mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    mo_indices: &[usize],
) -> Vec<MakeupEntry> {
    let sc = bandcast_linalg::mul(s.as_ref(), false, c.as_ref(), false);
    let core = core_assignment(mol, basis, c, &sc);
    let ao = basis.ao_map();
    // (atom, l, shell name) → population.
    let mut acc: BTreeMap<(usize, usize, String), f64> = BTreeMap::new();
    let mut total = 0.0;
    for &i in mo_indices {
        let q = gross(c, &sc, i);
        let core_i = core.get(i).copied().flatten();
        for (mu, &(atom, _, l)) in ao.iter().enumerate() {
            let z = mol.atoms[atom].z;
            let name = match core_i {
                Some((cz, cname, cl)) if cz == z && cl == l => cname.to_string(),
                _ => valence_shell(z, l),
            };
            *acc.entry((atom, l, name)).or_insert(0.0) += q[mu];
            total += q[mu];
        }
    }
    if total.abs() < 1e-300 {
        return Vec::new();
    }
    let mut out: Vec<(usize, MakeupEntry)> = acc
        .into_iter()
        .map(|((atom, _, shell), p)| {
            (
                atom,
                MakeupEntry {
                    atom: atom_label(mol, atom),
                    shell,
                    fraction: p / total,
                },
            )
        })
        .filter(|(_, e)| e.fraction >= MIN_FRACTION)
        .collect();
    out.sort_by(|a, b| {
        b.1.fraction
            .total_cmp(&a.1.fraction)
            .then(a.0.cmp(&b.0))
            .then(a.1.shell.cmp(&b.1.shell))
    });
    out.into_iter().map(|(_, e)| e).collect()
}

/// The name in the shared interface plan.
pub fn mulliken_makeup(
    mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    mo_indices: &[usize],
) -> Vec<MakeupEntry> {
    orbital_makeup(mol, basis, s, c, mo_indices)
}

/// Entries of the same element and shell merged ("H2 1s" + "H3 1s" → "H 1s"), largest
/// first.
pub fn merge_by_element(entries: &[MakeupEntry]) -> Vec<MakeupEntry> {
    let mut acc: Vec<MakeupEntry> = Vec::new();
    for e in entries {
        let sym: String = e.atom.chars().take_while(|c| c.is_alphabetic()).collect();
        match acc.iter_mut().find(|x| x.atom == sym && x.shell == e.shell) {
            Some(x) => x.fraction += e.fraction,
            None => acc.push(MakeupEntry {
                atom: sym,
                shell: e.shell.clone(),
                fraction: e.fraction,
            }),
        }
    }
    acc.sort_by(|a, b| b.fraction.total_cmp(&a.fraction));
    acc
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shell_names() {
        // Ground-state configurations of the elements (common practice).
        assert_eq!(valence_shell(1, 0), "1s");
        assert_eq!(valence_shell(1, 1), "2p");
        assert_eq!(valence_shell(8, 0), "2s");
        assert_eq!(valence_shell(8, 1), "2p");
        assert_eq!(valence_shell(8, 2), "3d");
        assert_eq!(valence_shell(17, 1), "3p");
        assert_eq!(valence_shell(11, 1), "3p");
        assert_eq!(valence_shell(26, 2), "3d");
        assert_eq!(valence_shell(35, 2), "4d");
        assert_eq!(valence_shell(6, 3), "4f");
        let water = Molecule::new(vec![
            crate::chem::Atom {
                z: 8,
                position: [0.0; 3],
            },
            crate::chem::Atom {
                z: 1,
                position: [1.4, 0.0, 1.1],
            },
            crate::chem::Atom {
                z: 1,
                position: [-1.4, 0.0, 1.1],
            },
        ]);
        assert_eq!(n_core(&water), 1);
    }
}
