//! Arguments shared by `optimize` and `vibrations`: the molecule, the basis and the state.

use bandcast::chem::Molecule;
use bandcast::geometry::state::resolve_hole;
use bandcast::geometry::StateSpec;
use bandcast::scf::{FockMethod, Reference, ScfOptions};
use bandcast::{Error, Result};

use super::common::MoleculeArgs;

#[derive(clap::Args, Debug)]
pub struct GeometryStateArgs {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set: a bundled name (`bandcast basis` lists them) or a path to a basis file.
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// rhf, uhf or rohf. Default: rhf for singlets, uhf otherwise (and for holes).
    #[arg(long, value_name = "REF", value_parser = ["rhf", "uhf", "rohf"])]
    pub reference: Option<String>,
    /// Take one electron out of this occupied orbital of the (closed-shell) molecule given
    /// by --charge/--multiplicity and follow the cation held in that state by the maximum
    /// overlap method: a number counted from 1 in energy order, or a label as
    /// `bandcast ionize` prints it (1b1, 3σg).
    #[arg(long, value_name = "ORBITAL")]
    pub hole: Option<String>,
    /// How J and K are built: auto or exact (the same: exact integrals, in-core when they fit
    /// --memory, else integral-direct) or df (density-fitted J and K, the default fitting
    /// set, and the exact gradient of that fitted energy: faster, but the energy carries the
    /// fitting error). df and exact mean the same in every command that takes --fock.
    #[arg(long, value_name = "HOW", default_value = "auto", value_parser = ["auto", "exact", "df"])]
    pub fock: String,
}

impl GeometryStateArgs {
    /// The molecule as read (with the charge and multiplicity given) and the state.
    pub fn state(&self) -> Result<(Molecule, StateSpec)> {
        let mol = self.molecule.load()?;
        let reference = match self.reference.as_deref() {
            Some("rhf") => Reference::Rhf,
            Some("uhf") => Reference::Uhf,
            Some("rohf") => Reference::Rohf,
            Some(other) => return Err(Error::input(format!("unknown reference '{other}'"))),
            None if self.hole.is_some() || mol.multiplicity != 1 => Reference::Uhf,
            None => Reference::Rhf,
        };
        let mut spec = StateSpec {
            basis: self.basis.clone(),
            charge: mol.charge,
            multiplicity: mol.multiplicity,
            reference,
            hole: None,
            scf: ScfOptions {
                e_tol: 1e-11,
                commutator_tol: 1e-9,
                ..ScfOptions::default()
            },
        };
        if self.fock == "df" {
            spec.scf.fock = FockMethod::DensityFitted;
        }
        if let Some(h) = &self.hole {
            spec.hole = Some(resolve_hole(&mol, &spec, h)?);
        }
        spec.validate(&mol)?;
        Ok((mol, spec))
    }
}

/// XYZ text (Å) of a molecule with a comment line.
pub fn xyz_text(mol: &Molecule, comment: &str) -> String {
    let mut s = format!("{}\n{}\n", mol.atoms.len(), comment.replace('\n', " "));
    for a in &mol.atoms {
        let p = a.position.map(|x| x / bandcast::units::ANGSTROM_TO_BOHR);
        s.push_str(&format!(
            "{:<2} {:>15.10} {:>15.10} {:>15.10}\n",
            a.symbol(),
            p[0],
            p[1],
            p[2]
        ));
    }
    s
}
