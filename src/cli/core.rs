//! `bandcast core`: core-level (1s, 2s, 2p) binding energies and chemical shifts by ΔSCF with a localised hole.

use std::io::IsTerminal;
use std::path::PathBuf;

use bandcast::basis;
use bandcast::chem::elements::parse_element;
use bandcast::core_level::{
    predict_with_progress, CoreBasis, CoreNote, CoreOptions, IonReference, ReferenceMolecule,
    ShellChoice, ShiftReference, TargetSelection,
};
use bandcast::{Error, Result};

use bandcast::report::text::{core_table, core_timings_text};

use super::common::{MoleculeArgs, StateArgs};

/// Core-level binding energies (1s; 2s and 2p with the spin–orbit doublet for Na–Ar):
/// Koopmans, ΔSCF with the hole kept on one atom by the maximum overlap method, ΔMP2 or
/// ΔCCSD(T) beside it, and chemical shifts against a reference level of the same element
/// and shell.
///
/// Default targets: every atom heavier than helium. Atoms are numbered from 1 in the order
/// of the XYZ file. The computed energies are vertical binding energies of an isolated
/// molecule (absolute 1s energies with a relativistic correction unless --no-relativistic;
/// shifts without it): they guide a measurement, they do not replace it.
#[derive(clap::Args, Debug)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set (name of a bundled set or a basis file).
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// Ionize every atom of this element (symbol or atomic number).
    #[arg(long, value_name = "SYMBOL", conflicts_with = "atoms")]
    pub element: Option<String>,
    /// Ionize these atoms, numbered from 1: "1,3,5" or "2-4".
    #[arg(long, value_name = "LIST")]
    pub atoms: Option<String>,
    /// Shifts against the same element's level of the same shell in this molecule (its first
    /// atom of the element), computed with the same basis set and options.
    #[arg(long, value_name = "FILE.xyz", conflicts_with_all = ["shift_from_atom", "old_reference_atom"])]
    pub shift_from: Option<PathBuf>,
    /// Shifts against this atom (from 1) of the same molecule.
    #[arg(long, value_name = "N")]
    pub shift_from_atom: Option<usize>,
    /// Wavefunction type of the core-ionized cation (the neutral is RHF): uhf (the lowest
    /// UHF state that holds the hole) or rohf (spin-pure restricted open shell; ΔSCF, ΔCCSD
    /// and ΔCCSD(T) from it). Default: the lowest state of every start (UHF in practice).
    /// A file name here is the old spelling of --shift-from (kept for one release).
    #[arg(long = "reference", value_name = "uhf|rohf")]
    pub reference: Option<String>,
    /// Old spelling of --shift-from-atom (kept for one release).
    #[arg(
        long = "reference-atom",
        value_name = "N",
        hide = true,
        conflicts_with = "shift_from_atom"
    )]
    pub old_reference_atom: Option<usize>,
    /// Core flexibility on the hole atoms: plain, uncontract (split the s shells into
    /// primitives), uncontract-sp (s and p; default), or the name of a set whose functions
    /// replace the hole atoms' (e.g. cc-pCVTZ).
    #[arg(
        long,
        value_name = "plain|uncontract|uncontract-sp|NAME",
        default_value = "uncontract-sp"
    )]
    pub core_basis: String,
    /// Keep the canonical (delocalized) 1s as the hole instead of localizing it.
    #[arg(long)]
    pub canonical_hole: bool,
    /// Also compute the delocalized hole of atoms with symmetry-equivalent partners (the
    /// cation SCF kept symmetric), reported beside the localized one.
    #[arg(long)]
    pub compare_delocalised: bool,
    /// Method: dscf (ΔSCF), dmp2 (ΔSCF plus the second-order correlation change, ΔMP2,
    /// printed beside ΔSCF), dccsd or dccsd-t (coupled cluster on the neutral and the
    /// core-ionized state, printed beside ΔSCF). Default: dccsd-t when its coupled cluster
    /// fits --memory and a cost cap (small molecules), dscf otherwise; the output says which.
    #[arg(long, value_name = "dscf|dmp2|dccsd|dccsd-t")]
    pub method: Option<CoreMethod>,
    /// Frozen natural orbitals for the coupled cluster (dccsd, dccsd-t): keep the MP2 natural
    /// virtual orbitals that hold PERCENT of the virtual population (99.5 is a common
    /// choice; 100 keeps them all) and add the MP2 energy of the rest. Cuts the time and
    /// memory of large bases by several times; the error it adds is measured in
    /// docs/valence-methods.md and docs/core-levels.md. Default: every virtual orbital.
    #[arg(long, value_name = "PERCENT", value_parser = super::common::parse_fno)]
    pub fno: Option<f64>,
    /// Old spelling of --method dmp2 (kept for one release).
    #[arg(long = "mp2", hide = true)]
    pub old_mp2: bool,
    /// Add the relativistic correction of 1s levels to the absolute binding energies: the
    /// scalar (mass-velocity + Darwin) terms minus the two-electron contact (Breit–Pauli) and
    /// QED terms, as power laws in the non-relativistic binding energy (Takahata & Chong 2003
    /// form; Ne 1s +0.73 eV, O 1s +0.24, C 1s +0.05). This is the default; shifts stay
    /// non-relativistic either way.
    #[arg(long, conflicts_with = "no_relativistic")]
    pub relativistic: bool,
    /// Leave the absolute binding energies non-relativistic.
    #[arg(long)]
    pub no_relativistic: bool,
    /// Core shell: 1s, 2s, 2p (Na–Ar), or auto — the deepest shell the photon source reaches
    /// (Al Kα when none is given); of the second shell the 2p is taken.
    #[arg(long, value_name = "1s|2s|2p|auto", default_value = "auto", value_parser = parse_shell)]
    pub shell: ShellChoice,
    /// Photon source the levels are meant for (he1, he2, mgka, alka or an energy in eV): it
    /// decides the auto shell, and levels out of its reach are named with the sources that
    /// reach them.
    #[arg(long, value_name = "he1|he2|mgka|alka|ENERGY_EV", value_parser = super::common::parse_photon)]
    pub photon: Option<bandcast::spectrum::photon::Photon>,
    /// Keep the first SCF start that holds the hole instead of trying all of them.
    #[arg(long)]
    pub quick: bool,
    /// How J and K are built in every SCF: df (density-fitted, def2-universal-JKFIT extended
    /// on the hole atom; error on 1s levels measured below 0.01 eV) or exact (in-core when
    /// the integrals fit --memory, else integral-direct).
    #[arg(long, value_name = "df|exact", default_value = "df")]
    pub fock: CoreFockArg,
    /// Run an SCF for every target atom, also for atoms equivalent by symmetry to one
    /// already computed (by default those take its numbers).
    #[arg(long)]
    pub all_holes: bool,
    /// Memory budget in GiB for every stage (SCF store, ΔMP2 transform, coupled cluster);
    /// a job that cannot fit is refused before any work (default: half of the machine's
    /// memory, at most three quarters of what is available).
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Memory estimates before any work, then stage timings (each neutral and each hole,
    /// wall and CPU seconds) on stderr.
    #[arg(long)]
    pub verbose: bool,
    /// Machine-readable result on stdout.
    #[arg(long)]
    pub json: bool,
}

/// `--fock` of `bandcast core` (and `bandcast bench core`).
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum CoreFockArg {
    /// Density-fitted J and K, fitting set extended on the hole atom.
    Df,
    /// Density-fitted with the bundled fitting set unchanged (for measurements).
    #[value(hide = true)]
    DfPlain,
    /// Exact two-electron integrals.
    Exact,
}

impl CoreFockArg {
    pub fn fock(self) -> bandcast::core_level::CoreFock {
        use bandcast::core_level::CoreFock;
        match self {
            CoreFockArg::Df => CoreFock::DensityFitted,
            CoreFockArg::DfPlain => CoreFock::DensityFittedPlain,
            CoreFockArg::Exact => CoreFock::Exact,
        }
    }
}

/// `--method` of `bandcast core`.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum CoreMethod {
    /// ΔSCF.
    Dscf,
    /// ΔSCF plus ΔMP2.
    Dmp2,
    /// ΔSCF plus ΔCCSD.
    Dccsd,
    /// ΔSCF plus ΔCCSD and ΔCCSD(T).
    DccsdT,
}

fn parse_shell(s: &str) -> std::result::Result<ShellChoice, String> {
    ShellChoice::parse(s).ok_or_else(|| format!("'{s}' is not 1s, 2s, 2p or auto"))
}

/// A note on stderr for an old option spelling.
fn old_spelling(old: &str, new: &str) {
    eprintln!("note: {old} is the old spelling of {new}; it will be removed in a later release");
}

/// Build the library options from the arguments (everything the user can get wrong is
/// reported as an input error, exit 2).
pub fn options(args: &Args) -> Result<CoreOptions> {
    let targets = match (&args.element, &args.atoms) {
        (Some(e), _) => TargetSelection::Element(parse_element(e).ok_or_else(|| {
            Error::input(format!("--element: '{e}' is not an element symbol (H–Kr)"))
        })?),
        (None, Some(list)) => TargetSelection::Atoms(parse_atom_list(list)?),
        (None, None) => TargetSelection::AllHeavy,
    };
    // --reference is the cation's wavefunction type; anything else is the old spelling of
    // --shift-from.
    let (ion_reference, old_reference) = match args.reference.as_deref() {
        None => (IonReference::Lowest, None),
        Some(t) if t.trim().eq_ignore_ascii_case("rhf") => {
            return Err(Error::input(
                "--reference rhf: a core-ionized cation is open-shell; use uhf or rohf (the \
                 neutral is always RHF)",
            ))
        }
        Some(t) => match IonReference::parse(t) {
            Some(r) => (r, None),
            None => {
                old_spelling("--reference FILE", "--shift-from FILE");
                if args.shift_from.is_some() || args.shift_from_atom.is_some() {
                    return Err(Error::input(format!(
                        "--reference {t}: not uhf or rohf, and read as the old spelling of \
                         --shift-from, which is already given"
                    )));
                }
                (IonReference::Lowest, Some(PathBuf::from(t)))
            }
        },
    };
    if ion_reference != IonReference::Lowest && args.method == Some(CoreMethod::Dmp2) {
        return Err(Error::input(
            "--method dmp2 is computed from the lowest UHF cation; drop --reference or choose \
             another method",
        ));
    }
    if args.fno.is_some()
        && (matches!(args.method, Some(CoreMethod::Dscf) | Some(CoreMethod::Dmp2)) || args.old_mp2)
    {
        return Err(Error::input(
            "--fno applies to the coupled cluster (--method dccsd or dccsd-t, or the default \
             method); drop it or choose a coupled-cluster method",
        ));
    }
    if args.old_reference_atom.is_some() {
        old_spelling("--reference-atom N", "--shift-from-atom N");
    }
    if args.old_mp2 {
        old_spelling("--mp2", "--method dmp2");
    }
    let shift_file = args.shift_from.as_ref().or(old_reference.as_ref());
    let shift_atom = args.shift_from_atom.or(args.old_reference_atom);
    let reference = match (shift_file, shift_atom) {
        (Some(path), _) => {
            let state = StateArgs {
                bohr: args.molecule.state.bohr,
                charge: Some(0),
                multiplicity: None,
            };
            let molecule = state.load(path)?;
            let basis = basis::load(&args.basis, &molecule, None)?;
            ShiftReference::Molecule(Box::new(ReferenceMolecule { molecule, basis }))
        }
        (None, Some(0)) => {
            return Err(Error::input(
                "--shift-from-atom: atoms are numbered from 1, not 0",
            ))
        }
        (None, Some(n)) => ShiftReference::Atom(n - 1),
        (None, None) => ShiftReference::None,
    };
    Ok(CoreOptions {
        targets,
        reference,
        core_basis: CoreBasis::parse(&args.core_basis),
        localise: !args.canonical_hole,
        mp2: args.method == Some(CoreMethod::Dmp2) || args.old_mp2,
        thorough: !args.quick,
        use_symmetry: !args.all_holes,
        relativistic: !args.no_relativistic,
        delocalised: args.compare_delocalised,
        shell: args.shell,
        photon_ev: args.photon.map(|p| p.energy_ev()),
        cc: match args.method {
            Some(CoreMethod::Dccsd) => Some(crate::core_level::delta_cc::DeltaCc::Ccsd),
            Some(CoreMethod::DccsdT) => Some(crate::core_level::delta_cc::DeltaCc::CcsdT),
            _ => None,
        },
        memory_bytes: super::common::memory_gib_to_bytes(args.memory)?,
        ion_reference,
        cc_optional: false,
        fock: args.fock.fock(),
        natural_virtuals: args.fno,
        progress: args.verbose,
    })
}

pub fn run(args: Args) -> Result<()> {
    let mol = args.molecule.load()?;
    let set = basis::load(&args.basis, &mol, None)?;
    let mut opts = options(&args)?;
    // No --method (and no old --mp2): the most accurate method that fits, said in the output.
    let default_choice = if args.method.is_none() && !args.old_mp2 {
        let c = bandcast::core_level::default_method::choose(&mol, &set, &opts)?;
        opts.cc = c.cc();
        opts.cc_optional = true;
        Some(c)
    } else {
        None
    };
    // before any integral: the SCF, the fitting tensor, the ΔMP2 transformation and the
    // coupled cluster (held to its own budget, `core_level::memory::cc_budget_bytes`)
    {
        let budget = bandcast::core_level::memory_budget_bytes(&opts) as f64;
        let estimates = bandcast::core_level::memory::stage_estimates(&mol, &set, &opts)?;
        if args.verbose {
            super::common::print_estimates(&mol.name, &estimates, budget);
        }
        let exact = opts.fock == bandcast::core_level::CoreFock::Exact;
        let cheaper = match (exact, opts.mp2) {
            (false, true) => {
                "--fock exact (no fitting tensor), --method dscf (no ΔMP2) or a smaller basis \
                 needs less"
            }
            (false, false) => "--fock exact (no fitting tensor) or a smaller basis needs less",
            (true, true) => "--method dscf (no ΔMP2) or a smaller basis needs less",
            (true, false) => "a smaller basis needs less",
        };
        let (cc, rest): (Vec<_>, Vec<_>) = estimates
            .into_iter()
            .partition(bandcast::core_level::memory::is_cc_stage);
        super::common::refuse_if_over(&mol.name, &rest, budget, cheaper)?;
        let cc_cheaper = if opts.natural_virtuals.is_some() {
            "a larger --memory, --method dmp2 or dscf, or a smaller basis needs less"
        } else {
            "a larger --memory, --fno 99.5 (frozen natural orbitals), --method dmp2 or dscf, or \
             a smaller basis needs less"
        };
        let cc_budget = bandcast::core_level::memory::cc_budget_bytes(&opts);
        super::common::refuse_if_over(&mol.name, &cc, cc_budget, cc_cheaper)?;
    }
    let bar = if std::io::stderr().is_terminal() {
        let b = indicatif::ProgressBar::new(0);
        b.set_style(
            indicatif::ProgressStyle::with_template("{msg} [{bar:30}] {pos}/{len} holes")
                .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        b.set_message("core holes");
        Some(b)
    } else {
        None
    };
    let tick = |done: usize, total: usize| {
        if let Some(b) = &bar {
            b.set_length(total as u64);
            b.set_position(done as u64);
        }
    };
    let result = predict_with_progress(&mol, &set, &opts, &tick);
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let mut result = result?;
    if let Some(c) = default_choice {
        result.notes.insert(0, CoreNote::DefaultMethod(c));
    }
    if args.verbose {
        eprint!("{}", core_timings_text(&result.timings));
    }
    if args.json {
        let text = serde_json::to_string_pretty(&result)
            .map_err(|e| Error::computation(format!("JSON output: {e}")))?;
        super::output::emit_json(&text);
    } else {
        print!("{}", core_table(&result));
    }
    Ok(())
}

/// `bandcast bench core`: all carbon 1s levels of CnH2n+2.
#[derive(clap::Args, Debug)]
pub struct BenchArgs {
    /// Number of carbon atoms of the alkane (default 20: icosane C20H42).
    #[arg(long, value_name = "N")]
    pub carbons: Option<usize>,
    /// The small case: hexane C6H14 (unless --carbons is given).
    #[arg(long)]
    pub small: bool,
    /// Basis set.
    #[arg(long, default_value = "cc-pVDZ", value_name = "NAME")]
    pub basis: String,
    /// Try every SCF start for each hole (default: stop at the first clean one).
    #[arg(long)]
    pub thorough: bool,
    /// Run an SCF for every carbon, also for those equivalent by symmetry.
    #[arg(long)]
    pub all_holes: bool,
    /// Core flexibility on the hole atoms (as `bandcast core --core-basis`).
    #[arg(long, default_value = "uncontract-sp", value_name = "KIND")]
    pub core_basis: String,
    /// How J and K are built (as `bandcast core --fock`).
    #[arg(long, value_name = "df|exact", default_value = "df")]
    pub fock: CoreFockArg,
}

pub fn bench(a: BenchArgs) -> Result<()> {
    let carbons = a.carbons.unwrap_or(if a.small { 6 } else { 20 });
    if carbons == 0 {
        return Err(Error::input("--carbons must be at least 1"));
    }
    let load_start = bandcast::system::load_average();
    let opts = CoreOptions {
        targets: TargetSelection::Element(6),
        thorough: a.thorough,
        use_symmetry: !a.all_holes,
        core_basis: CoreBasis::parse(&a.core_basis),
        fock: a.fock.fock(),
        ..CoreOptions::default()
    };
    let r = bandcast::bench::core_level::run_core_bench(carbons, &a.basis, &opts)?;
    let t = &r.result.timings;
    println!(
        "core: {} — {} atoms, {} functions, {} C 1s levels from {} SCF holes, {} starts, {} threads",
        r.molecule,
        r.n_atoms,
        r.result.n_basis,
        r.n_holes,
        t.holes.len(),
        if a.thorough { "all" } else { "first clean" },
        rayon::current_num_threads()
    );
    print!("{}", core_timings_text(t));
    let load = |l: Option<f64>| l.map_or("?".into(), |x| format!("{x:.1}"));
    println!(
        "  J and K: {}; peak memory {}; machine load average {} at start, {} at end \
         (all cores of a 2-core machine busy = 2.0)",
        r.result.integrals.describe(),
        bandcast::system::peak_memory_mib().map_or("?".into(), |m| format!("{m:.0} MiB")),
        load(load_start),
        load(bandcast::system::load_average())
    );
    for l in &r.result.core_levels {
        println!(
            "  {:<8} ΔSCF {:>8.3} eV  ⟨S²⟩ {:.3}  start {}{}",
            l.label,
            l.dscf_ev,
            l.s2,
            l.start,
            match l.same_as_atom {
                Some(k) => format!("  (= atom {k} by symmetry)"),
                None => String::new(),
            }
        );
    }
    Ok(())
}

/// Parse an atom list "1,3,5" or "2-4,7" (1-based) into 0-based indices.
pub fn parse_atom_list(text: &str) -> Result<Vec<usize>> {
    let mut out = Vec::new();
    for part in text.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        let parse = |t: &str| -> Result<usize> {
            let v: usize = t.trim().parse().map_err(|_| {
                Error::input(format!(
                    "--atoms: '{t}' is not an atom number (atoms are numbered from 1)"
                ))
            })?;
            if v == 0 {
                return Err(Error::input("--atoms: atoms are numbered from 1, not 0"));
            }
            Ok(v - 1)
        };
        if let Some((a, b)) = part.split_once('-') {
            let (a, b) = (parse(a)?, parse(b)?);
            if b < a {
                return Err(Error::input(format!(
                    "--atoms: range '{part}' runs backwards"
                )));
            }
            out.extend(a..=b);
        } else {
            out.push(parse(part)?);
        }
    }
    if out.is_empty() {
        return Err(Error::input("--atoms: no atom numbers given"));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atom_lists_parse_from_one() {
        assert_eq!(parse_atom_list("1,3, 5").unwrap(), vec![0, 2, 4]);
        assert_eq!(parse_atom_list("2-4,7").unwrap(), vec![1, 2, 3, 6]);
        assert!(parse_atom_list("0").is_err());
        assert!(parse_atom_list("x").is_err());
        assert!(parse_atom_list("4-2").is_err());
        assert!(parse_atom_list("").is_err());
    }
}
