//! A molecule: nuclei (atomic number, position in bohr), total charge, spin multiplicity.

use crate::chem::elements;
use crate::error::{Error, Result};

#[derive(Debug, Clone, PartialEq)]
pub struct Atom {
    /// Atomic number.
    pub z: u32,
    /// Position in bohr.
    pub position: [f64; 3],
}

impl Atom {
    pub fn symbol(&self) -> &'static str {
        elements::symbol(self.z)
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Molecule {
    pub atoms: Vec<Atom>,
    /// Total charge in units of e.
    pub charge: i32,
    /// Spin multiplicity 2S + 1.
    pub multiplicity: u32,
    /// Free-text name (XYZ comment line or file stem), for reports only.
    pub name: String,
}

impl Molecule {
    /// Neutral singlet/doublet from atoms (multiplicity 1 for even, 2 for odd electron count).
    pub fn new(atoms: Vec<Atom>) -> Self {
        let nel: u32 = atoms.iter().map(|a| a.z).sum();
        Molecule {
            atoms,
            charge: 0,
            multiplicity: if nel.is_multiple_of(2) { 1 } else { 2 },
            name: String::new(),
        }
    }

    /// Sum of nuclear charges.
    pub fn nuclear_charge(&self) -> i64 {
        self.atoms.iter().map(|a| a.z as i64).sum()
    }

    /// Number of electrons (nuclear charge − total charge).
    pub fn n_electrons(&self) -> usize {
        (self.nuclear_charge() - self.charge as i64).max(0) as usize
    }

    /// (n_alpha, n_beta) from the electron count and multiplicity.
    pub fn n_alpha_beta(&self) -> (usize, usize) {
        let n = self.n_electrons();
        let unpaired = self.multiplicity as usize - 1;
        ((n + unpaired) / 2, (n - unpaired) / 2)
    }

    /// Set charge and multiplicity, checking that they fit the electron count.
    pub fn with_charge_multiplicity(mut self, charge: i32, multiplicity: u32) -> Result<Self> {
        let nel = self.nuclear_charge() - charge as i64;
        if nel < 0 {
            return Err(Error::input(format!(
                "charge {charge} leaves {nel} electrons: a molecule needs at least zero"
            )));
        }
        if multiplicity == 0 {
            return Err(Error::input("multiplicity must be at least 1 (2S + 1)"));
        }
        let unpaired = multiplicity as i64 - 1;
        if unpaired > nel || (nel - unpaired) % 2 != 0 {
            return Err(Error::input(format!(
                "charge {charge} and multiplicity {multiplicity} cannot both hold: {nel} electrons \
                 cannot have {unpaired} unpaired (an {} electron count needs an {} multiplicity)",
                if nel % 2 == 0 { "even" } else { "odd" },
                if nel % 2 == 0 { "odd" } else { "even" }
            )));
        }
        self.charge = charge;
        self.multiplicity = multiplicity;
        Ok(self)
    }

    /// Nuclear repulsion energy Σ_{A<B} Z_A Z_B / R_AB in hartree.
    pub fn nuclear_repulsion(&self) -> f64 {
        let mut e = 0.0;
        for (i, a) in self.atoms.iter().enumerate() {
            for b in &self.atoms[..i] {
                e += (a.z * b.z) as f64 / distance(&a.position, &b.position);
            }
        }
        e
    }
}

/// Euclidean distance between two points.
pub fn distance(a: &[f64; 3], b: &[f64; 3]) -> f64 {
    ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn water_sto3g_nuclear_repulsion() {
        // Crawford group Programming Projects, water STO-3G geometry (bohr): E_nuc = 8.002367061810450
        let m = Molecule::new(vec![
            Atom {
                z: 8,
                position: [0.0, -0.143225816552, 0.0],
            },
            Atom {
                z: 1,
                position: [1.638036840407, 1.136548822547, 0.0],
            },
            Atom {
                z: 1,
                position: [-1.638036840407, 1.136548822547, 0.0],
            },
        ]);
        assert!((m.nuclear_repulsion() - 8.002_367_061_810_45).abs() < 1e-10);
    }

    #[test]
    fn parity_is_checked() {
        let h2 = Molecule::new(vec![
            Atom {
                z: 1,
                position: [0.0; 3],
            },
            Atom {
                z: 1,
                position: [0.0, 0.0, 1.4],
            },
        ]);
        assert!(h2.clone().with_charge_multiplicity(0, 2).is_err());
        assert!(h2.clone().with_charge_multiplicity(1, 2).is_ok());
        assert!(h2.clone().with_charge_multiplicity(0, 3).is_ok());
        assert!(h2.with_charge_multiplicity(3, 1).is_err());
    }
}
