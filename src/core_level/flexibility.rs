//! Core flexibility: basis-set transforms that let the orbitals of a core-ionised atom
//! contract around the hole.
//!
//! A valence basis contracts its tight s primitives into fixed combinations fitted to the
//! neutral atom. After a 1s electron leaves, the remaining 1s electron and the valence shell
//! contract (the atom behaves like its Z+1 neighbour for the valence electrons); frozen
//! contractions cannot follow and ΔSCF comes out too high. Splitting the hole atom's
//! contracted shells into their primitives restores that freedom at the cost of a few
//! functions (common practice in ΔSCF core work; the relaxation argument is that of
//! Bagus, Phys. Rev. 139 (1965) A619). Alternatively the hole atom takes its functions from
//! a core-valence set (Woon & Dunning, J. Chem. Phys. 103 (1995) 4572).
//!
//! Both the neutral and the cation use the same transformed basis, so ΔSCF compares like
//! with like.

use crate::basis::{self, BasisSet, Shell};
use crate::chem::Molecule;
use crate::error::Result;

use super::options::CoreBasis;

/// Relative tolerance under which two exponents count as the same primitive.
const SAME_EXPONENT: f64 = 1e-10;

/// Split every shell of angular momentum ≤ `max_l` on the given atoms into one shell per
/// distinct primitive exponent (coefficient 1). Shells of other atoms and higher `l` are
/// kept as they are. The uncontracted shells of each (atom, l) replace the first contracted
/// shell of that kind, in descending exponent order, so the AO order stays atom-grouped.
pub fn uncontract(basis: &BasisSet, atoms: &[usize], max_l: usize) -> BasisSet {
    let mut shells: Vec<Shell> = Vec::with_capacity(basis.shells.len() * 2);
    let mut done: Vec<(usize, usize)> = Vec::new();
    for sh in &basis.shells {
        if !(atoms.contains(&sh.atom) && sh.l <= max_l) {
            shells.push(sh.clone());
            continue;
        }
        if done.contains(&(sh.atom, sh.l)) {
            continue;
        }
        done.push((sh.atom, sh.l));
        let mut exps: Vec<f64> = Vec::new();
        let mut pure = sh.pure;
        for other in basis
            .shells
            .iter()
            .filter(|o| o.atom == sh.atom && o.l == sh.l)
        {
            pure = other.pure;
            for (&a, &c) in other.exponents.iter().zip(&other.coefficients) {
                if c == 0.0 {
                    continue;
                }
                if !exps
                    .iter()
                    .any(|&e| (e - a).abs() <= SAME_EXPONENT * e.abs().max(a.abs()))
                {
                    exps.push(a);
                }
            }
        }
        exps.sort_by(|a, b| b.total_cmp(a));
        for a in exps {
            shells.push(Shell {
                l: sh.l,
                pure,
                center: sh.center,
                atom: sh.atom,
                exponents: vec![a],
                coefficients: vec![1.0],
            });
        }
    }
    let what = if max_l == 0 { "s" } else { "s,p" };
    let labels: Vec<String> = atoms.iter().map(|a| (a + 1).to_string()).collect();
    BasisSet::from_shells(
        format!(
            "{} (uncontracted {what} on atom{} {})",
            basis.name,
            if atoms.len() == 1 { "" } else { "s" },
            labels.join(",")
        ),
        shells,
    )
}

/// Replace the shells of the given atoms by those of `donor` (the same molecule in another
/// basis set), keeping every other atom's shells from `basis`. Shells stay grouped by atom
/// in input order.
pub fn replace_atoms(basis: &BasisSet, donor: &BasisSet, atoms: &[usize]) -> BasisSet {
    let n_atoms = basis
        .shells
        .iter()
        .chain(&donor.shells)
        .map(|s| s.atom + 1)
        .max()
        .unwrap_or(0);
    let mut shells = Vec::with_capacity(basis.shells.len() + donor.shells.len());
    for a in 0..n_atoms {
        let from = if atoms.contains(&a) { donor } else { basis };
        shells.extend(from.shells.iter().filter(|s| s.atom == a).cloned());
    }
    let labels: Vec<String> = atoms.iter().map(|a| (a + 1).to_string()).collect();
    BasisSet::from_shells(
        format!(
            "{} ({} on atom{} {})",
            basis.name,
            donor.name,
            if atoms.len() == 1 { "" } else { "s" },
            labels.join(",")
        ),
        shells,
    )
}

/// The basis `plain` with the core flexibility `core` on `hole_atoms`. A named donor set is
/// loaded for the hole atoms only (it may lack other elements, e.g. a core-valence set
/// without hydrogen) and its shells are put back on their atoms.
pub fn flexible_basis(
    plain: &BasisSet,
    mol: &Molecule,
    hole_atoms: &[usize],
    core: &CoreBasis,
) -> Result<BasisSet> {
    Ok(match core {
        CoreBasis::Plain => plain.clone(),
        CoreBasis::Uncontract => uncontract(plain, hole_atoms, 0),
        CoreBasis::UncontractSp => uncontract(plain, hole_atoms, 1),
        CoreBasis::Named(name) => {
            let sub = Molecule {
                atoms: hole_atoms.iter().map(|&a| mol.atoms[a].clone()).collect(),
                charge: 0,
                multiplicity: 1,
                name: mol.name.clone(),
            };
            let mut donor = basis::load(name, &sub, None)?;
            for sh in &mut donor.shells {
                sh.atom = hole_atoms[sh.atom];
            }
            replace_atoms(plain, &donor, hole_atoms)
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn shell(atom: usize, l: usize, e: &[f64], c: &[f64]) -> Shell {
        Shell {
            l,
            pure: true,
            center: [0.0, 0.0, atom as f64],
            atom,
            exponents: e.to_vec(),
            coefficients: c.to_vec(),
        }
    }

    /// A cc-pVDZ-like carbon (general contraction over shared primitives, split into
    /// segmented shells as the loader does) plus a hydrogen.
    fn toy() -> BasisSet {
        let prim = [6665.0, 1000.0, 228.0, 64.71, 21.06, 7.495, 2.797, 0.5215];
        BasisSet::from_shells(
            "toy",
            vec![
                shell(0, 0, &prim, &[0.1, 0.2, 0.3, 0.3, 0.2, 0.1, 0.05, 0.01]),
                shell(
                    0,
                    0,
                    &prim,
                    &[-0.01, -0.02, -0.03, -0.05, -0.1, -0.2, 0.0, 0.6],
                ),
                shell(0, 0, &[0.1596], &[1.0]),
                shell(0, 1, &[9.439, 2.002, 0.5456], &[0.04, 0.2, 0.5]),
                shell(0, 1, &[0.1517], &[1.0]),
                shell(0, 2, &[0.55], &[1.0]),
                shell(1, 0, &[13.01, 1.962, 0.4446], &[0.02, 0.14, 0.48]),
                shell(1, 0, &[0.122], &[1.0]),
                shell(1, 1, &[0.727], &[1.0]),
            ],
        )
    }

    #[test]
    fn uncontracting_s_keeps_every_distinct_primitive_once() {
        let b = toy();
        let u = uncontract(&b, &[0], 0);
        let s0: Vec<f64> = u
            .shells
            .iter()
            .filter(|s| s.atom == 0 && s.l == 0)
            .map(|s| s.exponents[0])
            .collect();
        // 8 shared primitives + the separate diffuse one; the zero coefficient of 2.797 in
        // the second shell does not matter since the first shell uses it.
        assert_eq!(s0.len(), 9);
        assert!(s0.windows(2).all(|w| w[0] > w[1]));
        assert!(u
            .shells
            .iter()
            .filter(|s| s.atom == 0 && s.l == 0)
            .all(|s| s.exponents.len() == 1 && s.coefficients == vec![1.0]));
        // p, d and the other atom untouched: 3 + 5 + 3 + 5 on C besides s? count functions.
        assert_eq!(u.n_basis, b.n_basis + 6);
        assert_eq!(
            u.shells.iter().filter(|s| s.atom == 1).count(),
            b.shells.iter().filter(|s| s.atom == 1).count()
        );
        // Offsets consistent.
        assert_eq!(u.offsets.len(), u.shells.len());
        assert_eq!(
            *u.offsets.last().unwrap() + u.shells.last().unwrap().n_functions(),
            u.n_basis
        );
        // AO order stays grouped by atom.
        let atoms: Vec<usize> = u.shells.iter().map(|s| s.atom).collect();
        assert!(atoms.windows(2).all(|w| w[0] <= w[1]));
    }

    #[test]
    fn uncontracting_sp_also_splits_p() {
        let u = uncontract(&toy(), &[0], 1);
        let np = u.shells.iter().filter(|s| s.atom == 0 && s.l == 1).count();
        assert_eq!(np, 4);
        assert_eq!(u.n_basis, toy().n_basis + 6 + 2 * 3);
    }

    #[test]
    fn replacing_an_atom_takes_the_donor_shells() {
        let b = toy();
        let donor = BasisSet::from_shells(
            "donor",
            vec![
                shell(0, 0, &[100.0], &[1.0]),
                shell(1, 0, &[50.0], &[1.0]),
                shell(1, 1, &[5.0], &[1.0]),
            ],
        );
        let r = replace_atoms(&b, &donor, &[1]);
        let on1: Vec<&Shell> = r.shells.iter().filter(|s| s.atom == 1).collect();
        assert_eq!(on1.len(), 2);
        assert_eq!(on1[0].exponents, vec![50.0]);
        assert_eq!(r.shells.iter().filter(|s| s.atom == 0).count(), 6);
        assert_eq!(r.n_basis, b.n_basis - 5 + 4);
    }
}
