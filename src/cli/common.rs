//! Argument groups and helpers shared by several subcommands.

use std::path::{Path, PathBuf};

use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::Result;

/// The molecule: an XYZ file plus charge and multiplicity.
#[derive(clap::Args, Debug, Clone)]
pub struct MoleculeArgs {
    /// Geometry in XYZ format (Å unless --bohr).
    #[arg(value_name = "FILE.xyz")]
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
    /// Total charge of the molecule.
    #[arg(long, default_value_t = 0, allow_hyphen_values = true)]
    pub charge: i32,
    /// Spin multiplicity 2S+1 (default: 1 for an even electron count, 2 for odd).
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
        let m = read_xyz(path, unit)?;
        let nel = m.nuclear_charge() - self.charge as i64;
        let mult = self
            .multiplicity
            .unwrap_or(if nel.rem_euclid(2) == 0 { 1 } else { 2 });
        m.with_charge_multiplicity(self.charge, mult)
    }
}

impl MoleculeArgs {
    pub fn load(&self) -> Result<Molecule> {
        self.state.load(&self.file)
    }
}
