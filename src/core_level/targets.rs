//! Which atoms of a molecule get a 1s hole, checked against the molecule.
//!
//! Atoms are numbered from 1 in input order at the edges (messages, reports) and from 0
//! inside the library.

use crate::chem::elements::symbol;
use crate::chem::Molecule;
use crate::error::{Error, Result};

use super::options::TargetSelection;

/// Lightest element that has a 1s core level under a valence shell (lithium).
pub const MIN_CORE_Z: u32 = 3;

/// Resolve a selection into 0-based atom indices (ascending, no repeats), or an input error
/// naming what is wrong.
pub fn resolve_targets(mol: &Molecule, sel: &TargetSelection) -> Result<Vec<usize>> {
    let n = mol.atoms.len();
    let out: Vec<usize> = match sel {
        TargetSelection::AllHeavy => (0..n).filter(|&i| mol.atoms[i].z >= MIN_CORE_Z).collect(),
        TargetSelection::Element(z) => {
            let v: Vec<usize> = (0..n).filter(|&i| mol.atoms[i].z == *z).collect();
            if v.is_empty() {
                return Err(Error::input(format!(
                    "element {} is not in the molecule{}",
                    symbol(*z),
                    present_elements(mol)
                )));
            }
            v
        }
        TargetSelection::Atoms(list) => {
            let mut v = Vec::with_capacity(list.len());
            for &i in list {
                check_atom_index(mol, i)?;
                if !v.contains(&i) {
                    v.push(i);
                }
            }
            v.sort_unstable();
            v
        }
    };
    if out.is_empty() {
        return Err(Error::input(
            "the molecule has no atom heavier than helium, so no 1s core level to ionise",
        ));
    }
    for &i in &out {
        check_core_atom(mol, i)?;
    }
    Ok(out)
}

/// An index (0-based) that must name an atom of the molecule; messages count from 1.
pub fn check_atom_index(mol: &Molecule, i: usize) -> Result<()> {
    if i >= mol.atoms.len() {
        return Err(Error::input(format!(
            "atom {} does not exist: the molecule has {} atoms (numbered from 1)",
            i + 1,
            mol.atoms.len()
        )));
    }
    Ok(())
}

/// The atom must have a core 1s level (Z ≥ 3).
pub fn check_core_atom(mol: &Molecule, i: usize) -> Result<()> {
    check_atom_index(mol, i)?;
    let z = mol.atoms[i].z;
    if z < MIN_CORE_Z {
        return Err(Error::input(format!(
            "atom {} is {}: its 1s is the valence shell, there is no core level to ionise",
            i + 1,
            symbol(z)
        )));
    }
    Ok(())
}

/// Label of an atom as printed: symbol and 1-based index ("C2").
pub fn atom_label(mol: &Molecule, i: usize) -> String {
    format!("{}{}", symbol(mol.atoms[i].z), i + 1)
}

fn present_elements(mol: &Molecule) -> String {
    let mut zs: Vec<u32> = mol.atoms.iter().map(|a| a.z).collect();
    zs.sort_unstable();
    zs.dedup();
    let names: Vec<&str> = zs.iter().map(|&z| symbol(z)).collect();
    format!(" (it has {})", names.join(", "))
}

#[cfg(test)]
mod tests {
    use super::*;

    use crate::chem::fixtures::rough_ethanol as ethanol;

    #[test]
    fn default_takes_heavy_atoms_only() {
        let m = ethanol();
        assert_eq!(
            resolve_targets(&m, &TargetSelection::AllHeavy).unwrap(),
            vec![0, 1, 2]
        );
        assert_eq!(
            resolve_targets(&m, &TargetSelection::Element(6)).unwrap(),
            vec![0, 1]
        );
    }

    #[test]
    fn bad_requests_are_input_errors_naming_the_atom() {
        let m = ethanol();
        let e = resolve_targets(&m, &TargetSelection::Atoms(vec![11])).unwrap_err();
        assert_eq!(e.exit_code(), 2);
        assert!(e.to_string().contains("atom 12"), "{e}");
        let e = resolve_targets(&m, &TargetSelection::Element(7)).unwrap_err();
        assert_eq!(e.exit_code(), 2);
        assert!(e.to_string().contains("N is not in the molecule"), "{e}");
        let e = resolve_targets(&m, &TargetSelection::Atoms(vec![3])).unwrap_err();
        assert!(e.to_string().contains("atom 4 is H"), "{e}");
    }
}
