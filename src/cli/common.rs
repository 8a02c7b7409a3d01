//! Argument groups and helpers shared by several subcommands.

use std::path::{Path, PathBuf};

use bandcast::chem::structure::read_one;
use bandcast::chem::xyz::LengthUnit;
use bandcast::chem::Molecule;
use bandcast::Result;

/// The molecule: an XYZ file plus charge and multiplicity.
#[derive(clap::Args, Debug, Clone)]
pub struct MoleculeArgs {
    /// Structure: XYZ (Å unless --bohr), MOL or SD file (record K of an SD file as FILE#K).
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
    #[command(flatten)]
    pub state: StateArgs,
}

/// Charge, multiplicity and length unit, for commands that take several files.
#[derive(clap::Args, Debug, Clone)]
pub struct StateArgs {
    /// Coordinates in the file are in bohr, not Å.
    #[arg(long)]
    pub bohr: bool,
    /// Total charge of the molecule (default: the charge a MOL/SD file writes, else 0).
    #[arg(long, allow_hyphen_values = true)]
    pub charge: Option<i32>,
    /// Spin multiplicity 2S+1 (default: from a MOL/SD file's radical marks, else 1 for an
    /// even electron count and 2 for odd).
    #[arg(long, value_name = "M")]
    pub multiplicity: Option<u32>,
}

impl StateArgs {
    pub fn load(&self, path: &Path) -> Result<Molecule> {
        let unit = if self.bohr {
            LengthUnit::Bohr
        } else {
            LengthUnit::Angstrom
        };
        let record = read_one(path, unit)?;
        let charge = self.charge.or(record.charge).unwrap_or(0);
        let m = record.molecule;
        let nel = m.nuclear_charge() - charge as i64;
        // the file's radical marks describe the file's charge state only
        let from_file = record
            .multiplicity
            .filter(|_| self.charge.is_none() || self.charge == record.charge);
        let mult = self
            .multiplicity
            .or(from_file)
            .unwrap_or(if nel.rem_euclid(2) == 0 { 1 } else { 2 });
        m.with_charge_multiplicity(charge, mult)
            .map_err(|e| match e {
                bandcast::Error::Input {
                    file: None,
                    line: None,
                    message,
                } => bandcast::Error::input_at(path, None, message),
                other => other,
            })
    }
}

impl MoleculeArgs {
    pub fn load(&self) -> Result<Molecule> {
        self.state.load(&self.file)
    }
}
