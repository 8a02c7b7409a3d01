//! What a core-level run is asked to do: which atoms, against which reference, with what
//! core flexibility, and which extras (ΔMP2).

use crate::basis::BasisSet;
use crate::chem::Molecule;

use super::shell::ShellChoice;

/// Which atoms get a 1s hole.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum TargetSelection {
    /// Every atom heavier than helium (H and He have no core level below their valence).
    #[default]
    AllHeavy,
    /// Every atom of one element (atomic number).
    Element(u32),
    /// These atoms (0-based input order).
    Atoms(Vec<usize>),
}

/// What a chemical shift is measured against.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum ShiftReference {
    #[default]
    None,
    /// A separate molecule: the first atom of each target's element is ionised there.
    Molecule(Box<ReferenceMolecule>),
    /// Another atom (0-based) of the same molecule, same element as the targets.
    Atom(usize),
}

/// A reference molecule for shifts, with the basis set it is computed in (normally the
/// same set as the molecule's, put on the reference molecule).
#[derive(Debug, Clone)]
pub struct ReferenceMolecule {
    pub molecule: Molecule,
    pub basis: BasisSet,
}

impl PartialEq for ReferenceMolecule {
    /// Same molecule, and a basis of the same name with the same shells.
    fn eq(&self, other: &Self) -> bool {
        self.molecule == other.molecule
            && self.basis.name == other.basis.name
            && self.basis.shells == other.basis.shells
    }
}

/// Extra flexibility given to the hole atoms' basis functions (see `flexibility.rs`).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum CoreBasis {
    /// The basis as named, nothing added.
    Plain,
    /// Every s shell of the hole atoms split into its primitives.
    Uncontract,
    /// Every s and p shell of the hole atoms split into primitives (the default: measured
    /// in README "bandcast core", it brings cc-pVDZ within ~1 eV of the Hartree–Fock limit
    /// behaviour of the 1s binding energies, where s alone leaves C 1s 0.7–1.3 eV high).
    #[default]
    UncontractSp,
    /// The hole atoms take their functions from another set (e.g. a core-valence set).
    Named(String),
}

impl CoreBasis {
    /// Parse a core-basis name: plain | uncontract | uncontract-sp | a set name.
    pub fn parse(text: &str) -> CoreBasis {
        match text.trim().to_ascii_lowercase().as_str() {
            "plain" => CoreBasis::Plain,
            "uncontract" | "uncontracted" => CoreBasis::Uncontract,
            "uncontract-sp" => CoreBasis::UncontractSp,
            _ => CoreBasis::Named(text.trim().to_string()),
        }
    }
    /// Short description for reports.
    pub fn describe(&self) -> String {
        match self {
            CoreBasis::Plain => "plain".into(),
            CoreBasis::Uncontract => "uncontracted s on hole atoms".into(),
            CoreBasis::UncontractSp => "uncontracted s and p on hole atoms".into(),
            CoreBasis::Named(n) => format!("{n} on hole atoms"),
        }
    }
}

/// Which cation determinant a level is computed from (`--reference` of `bandcast core`: the
/// wavefunction type of the core-ionized state; the neutral is always RHF).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum IonReference {
    /// The lowest state that holds the hole among every start (MOM, IMOM, ROHF, ROHF→UHF):
    /// in every case measured a UHF state, since UHF lies variationally below ROHF.
    #[default]
    Lowest,
    /// The lowest held state among the UHF starts only.
    Uhf,
    /// The ROHF start only (spin-pure, ⟨S²⟩ = 3/4): ΔSCF, ΔCCSD and ΔCCSD(T) from the
    /// restricted open-shell cation (coupled cluster with semicanonical orbitals).
    Rohf,
}

impl IonReference {
    /// Whether a cation from the SCF start `start` ("mom", "imom", "rohf", "rohf→uhf") may
    /// be kept.
    pub fn accepts(self, start: &str) -> bool {
        match self {
            IonReference::Lowest => true,
            IonReference::Uhf => start != "rohf",
            IonReference::Rohf => start == "rohf",
        }
    }
    /// Parse `uhf` or `rohf` (`rhf` is refused by the caller: a core-ionized cation is open
    /// shell).
    pub fn parse(text: &str) -> Option<IonReference> {
        match text.trim().to_ascii_lowercase().as_str() {
            "uhf" => Some(IonReference::Uhf),
            "rohf" => Some(IonReference::Rohf),
            _ => None,
        }
    }
}

/// Options of `predict`.
#[derive(Debug, Clone, PartialEq)]
pub struct CoreOptions {
    pub targets: TargetSelection,
    pub reference: ShiftReference,
    pub core_basis: CoreBasis,
    /// Localise the hole on the target atom before the MOM search (true unless a
    /// delocalised, canonical hole is asked for on purpose).
    pub localise: bool,
    /// Second-order (ΔMP2) correction beside ΔSCF.
    pub mp2: bool,
    /// Try every start (MOM, IMOM, ROHF, ROHF→UHF) and keep the lowest state that holds the
    /// hole; when false the first start that holds the hole is used (faster, may keep a
    /// higher state: README "bandcast core" shows by how much).
    pub thorough: bool,
    /// Compute one atom of each class of symmetry-equivalent hole atoms and give the others
    /// its numbers (`equivalence.rs`); false runs an SCF for every atom.
    pub use_symmetry: bool,
    /// Add the relativistic correction of `relativistic.rs` to each 1s level's absolute
    /// binding energy (off in `CoreOptions::default()`, on by default in `bandcast core`;
    /// shifts stay non-relativistic either way).
    pub relativistic: bool,
    /// Also compute the delocalised (symmetry-constrained) hole of atoms that have
    /// symmetry-equivalent partners, reported beside the localised one (`delocalised.rs`).
    /// Both then use a basis with the core flexibility on the atom and its partners.
    pub delocalised: bool,
    /// Which shell (1s, 2s, 2p or auto by the photon energy; `shell.rs`).
    pub shell: ShellChoice,
    /// Photon energy (eV) the levels are meant for: decides the auto shell and the notes on
    /// levels out of its reach (None: Al Kα for the choice, no notes).
    pub photon_ev: Option<f64>,
    /// ΔCCSD or ΔCCSD(T) beside ΔSCF (`delta_cc.rs`), when asked.
    pub cc: Option<super::delta_cc::DeltaCc>,
    /// Memory budget (bytes) for the stored integrals and the SCF of every hole; None: the
    /// machine-dependent default of `system::default_memory_budget`.
    pub memory_bytes: Option<usize>,
    /// Wavefunction type of the cation (1s levels).
    pub ion_reference: IonReference,
    /// The coupled cluster was chosen by default (`default_method.rs`): when it is refused
    /// for memory at run time (the memory available changed since the choice), the level
    /// keeps ΔSCF with a note instead of failing.
    pub cc_optional: bool,
    /// How the SCFs build J and K (`fitting.rs`): density-fitted by default.
    pub fock: super::fitting::CoreFock,
    /// Frozen natural orbitals for the coupled cluster: the fraction of the MP2 virtual
    /// population kept (`correlation::open_shell::natural_virtuals`); None: all virtuals.
    pub natural_virtuals: Option<f64>,
    /// Write the coupled-cluster iterations to stderr as they run (the CLI's `--verbose`).
    pub progress: bool,
}

impl Default for CoreOptions {
    fn default() -> Self {
        CoreOptions {
            targets: TargetSelection::AllHeavy,
            reference: ShiftReference::None,
            core_basis: CoreBasis::UncontractSp,
            localise: true,
            mp2: false,
            thorough: true,
            use_symmetry: true,
            relativistic: false,
            delocalised: false,
            shell: ShellChoice::Auto,
            photon_ev: None,
            cc: None,
            memory_bytes: None,
            ion_reference: IonReference::Lowest,
            cc_optional: false,
            fock: super::fitting::CoreFock::default(),
            natural_virtuals: None,
            progress: false,
        }
    }
}
