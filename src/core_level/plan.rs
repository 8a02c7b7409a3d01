//! Stage 1, plan: which holes, which of them are computed (one per class of symmetry-
//! equivalent atoms), and the units of work — each a basis (the given one with core
//! flexibility on some atoms) with its own neutral SCF and the holes computed in it.
//!
//! Each computed hole gets its own basis (core flexibility on the hole atom alone) and its
//! own neutral SCF in that basis, so ΔSCF compares like with like and every hole of a run is
//! treated alike. This is cheaper than one basis with flexibility on every hole atom as soon
//! as there are two or more distinct holes: the Fock builds of the cation dominate the cost
//! and grow with about the third power of the number of functions (measured in README
//! "bandcast core"). With `CoreBasis::Plain` every hole uses the same basis and one neutral
//! serves them all.

use crate::chem::elements::symbol;
use crate::chem::Molecule;
use crate::error::{Error, Result};

use super::equivalence::{equivalent_holes, Equivalence};
use super::options::{CoreBasis, CoreOptions, ShiftReference};
use super::targets::{atom_label, check_core_atom, resolve_targets};

/// One basis with its neutral SCF and the holes computed in it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Unit {
    /// Atoms (0-based) that carry the flexible core functions.
    pub flex: Vec<usize>,
    /// Holes (0-based atoms) computed in this basis.
    pub holes: Vec<usize>,
}

impl Unit {
    /// "C1" or "C1, C2, O3": the holes computed in this basis.
    pub fn label(&self, mol: &Molecule) -> String {
        let v: Vec<String> = self.holes.iter().map(|&a| atom_label(mol, a)).collect();
        v.join(", ")
    }
}

/// What a run will compute.
#[derive(Debug, Clone)]
pub struct Plan {
    /// The atoms asked for (0-based, ascending).
    pub targets: Vec<usize>,
    /// The targets plus a shift-reference atom of the same molecule.
    pub hole_atoms: Vec<usize>,
    /// Symmetry-equivalence of the hole atoms (no copies when symmetry is not used).
    pub equivalence: Equivalence,
    /// The hole atoms that get their own SCF.
    pub computed: Vec<usize>,
    pub units: Vec<Unit>,
}

impl Plan {
    /// Atoms equivalent by symmetry to `atom` among the hole atoms.
    pub fn partners_of(&self, atom: usize) -> &[usize] {
        self.equivalence.partners_of(&self.hole_atoms, atom)
    }
}

/// The plan of a run on `mol`, or an input error naming what is wrong with the request.
pub fn plan(mol: &Molecule, opts: &CoreOptions) -> Result<Plan> {
    check_closed_shell(mol)?;
    let targets = resolve_targets(mol, &opts.targets)?;
    let mut hole_atoms = targets.clone();
    if let ShiftReference::Atom(r) = opts.reference {
        check_shift_atom(mol, r, &targets)?;
        if !hole_atoms.contains(&r) {
            hole_atoms.push(r);
            hole_atoms.sort_unstable();
        }
    }
    let equivalence = equivalent_holes(mol, &hole_atoms);
    let equivalence = if opts.use_symmetry {
        equivalence
    } else {
        equivalence.without_copies(&hole_atoms)
    };
    let computed = equivalence.computed(&hole_atoms);
    // A canonical or delocalised hole needs a symmetric basis: flexibility on the
    // equivalent atoms too.
    let units: Vec<Unit> = if opts.core_basis == CoreBasis::Plain {
        vec![Unit {
            flex: Vec::new(),
            holes: computed.clone(),
        }]
    } else {
        computed
            .iter()
            .map(|&a| {
                let mut flex = vec![a];
                if !opts.localise || opts.delocalised {
                    flex.extend_from_slice(equivalence.partners_of(&hole_atoms, a));
                    flex.sort_unstable();
                }
                Unit {
                    flex,
                    holes: vec![a],
                }
            })
            .collect()
    };
    Ok(Plan {
        targets,
        hole_atoms,
        equivalence,
        computed,
        units,
    })
}

fn check_closed_shell(mol: &Molecule) -> Result<()> {
    if mol.multiplicity != 1 || !mol.n_electrons().is_multiple_of(2) {
        return Err(Error::input(format!(
            "core levels are computed for closed-shell molecules (multiplicity 1); this one has \
             charge {} and multiplicity {}",
            mol.charge, mol.multiplicity
        )));
    }
    Ok(())
}

/// A shift-reference atom of the molecule must have a core level and be of the targets'
/// element.
fn check_shift_atom(mol: &Molecule, r: usize, targets: &[usize]) -> Result<()> {
    check_core_atom(mol, r)?;
    let zr = mol.atoms[r].z;
    if let Some(&bad) = targets.iter().find(|&&t| mol.atoms[t].z != zr) {
        return Err(Error::input(format!(
            "the shift reference atom {} is {}, but target atom {} is {}: a shift compares 1s \
             levels of one element (choose {} atoms as targets)",
            r + 1,
            symbol(zr),
            bad + 1,
            symbol(mol.atoms[bad].z),
            symbol(zr)
        )));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::core_level::options::TargetSelection;

    use crate::chem::fixtures::rough_ethanol as ethanol;

    #[test]
    fn one_unit_per_distinct_hole_unless_the_basis_is_plain() {
        let m = ethanol();
        let p = plan(&m, &CoreOptions::default()).unwrap();
        assert_eq!(p.computed, vec![0, 1, 2]);
        assert_eq!(p.units.len(), 3);
        assert_eq!(p.units[1].flex, vec![1]);
        assert_eq!(p.units[1].label(&m), "C2");
        let plain = CoreOptions {
            core_basis: CoreBasis::Plain,
            ..CoreOptions::default()
        };
        let p = plan(&m, &plain).unwrap();
        assert_eq!(p.units.len(), 1);
        assert_eq!(p.units[0].holes, vec![0, 1, 2]);
        assert_eq!(p.units[0].label(&m), "C1, C2, O3");
    }

    #[test]
    fn shift_atom_joins_the_holes_and_must_match_the_element() {
        let m = ethanol();
        let opts = CoreOptions {
            targets: TargetSelection::Atoms(vec![1]),
            reference: ShiftReference::Atom(0),
            ..CoreOptions::default()
        };
        let p = plan(&m, &opts).unwrap();
        assert_eq!(p.targets, vec![1]);
        assert_eq!(p.hole_atoms, vec![0, 1]);
        let bad = CoreOptions {
            targets: TargetSelection::Atoms(vec![2]),
            ..opts
        };
        let e = plan(&m, &bad).unwrap_err();
        assert_eq!(e.exit_code(), 2);
        assert!(e.to_string().contains("target atom 3 is O"), "{e}");
        assert!(!e.to_string().contains("--"), "{e}");
    }

    #[test]
    fn open_shell_molecules_are_refused() {
        let mut m = ethanol();
        m.charge = 1;
        m.multiplicity = 2;
        assert_eq!(
            plan(&m, &CoreOptions::default()).unwrap_err().exit_code(),
            2
        );
    }
}
