//! `bandcast ionize`: valence ionization energies as labelled bands.
//!
//! Parsing and printing only; the work is `bandcast::ionization::valence::predict`.

use std::fmt::Write as _;

use bandcast::ionization::method::Method;
use bandcast::ionization::default_method;
use bandcast::ionization::valence::{predict, ValenceOptions, ValenceResult};
use bandcast::scf::Reference;
use bandcast::{Error, Result};
use serde_json::{json, Value};

use super::common::MoleculeArgs;

/// Valence ionization energies with band labels, degeneracies, make-up and bonding character.
#[derive(clap::Args, Debug)]
pub struct Args {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set: a bundled name (see `bandcast basis`) or a basis file.
    #[arg(long, value_name = "NAME")]
    pub basis: String,
    /// koopmans | dscf | ep2 | eom-ccsd | eom-mp2 (default for closed shells: the most
    /// accurate that fits — eom-ccsd up to 300 basis functions, eom-mp2 up to 450, ep2
    /// beyond, within --memory; dscf for open shells).
    #[arg(long, value_name = "METHOD")]
    pub method: Option<String>,
    /// Report the N bands of lowest ionization energy.
    #[arg(long, value_name = "N", conflicts_with = "window")]
    pub count: Option<usize>,
    /// Report the bands with ionization energy up to EV electronvolts (e.g. 21.2 for He I).
    #[arg(long, value_name = "EV")]
    pub window: Option<f64>,
    /// Correlate the core electrons too in EP2 and EOM (default: frozen core).
    #[arg(long, alias = "all-electron")]
    pub correlate_core: bool,
    /// Memory in GiB for the MO integrals and the correlated stages (default: half of the
    /// machine's memory, at most three quarters of what is available — the rule of
    /// `bandcast scf --memory`). It also decides the default method.
    #[arg(long, value_name = "GIB")]
    pub memory: Option<f64>,
    /// Two-electron integrals of eom-ccsd / eom-mp2: ri (density fitting with the fitting
    /// set made for the basis; the default when one is bundled, Cholesky otherwise) or
    /// cholesky (pivoted Cholesky decomposition, threshold 1e-5 Eh).
    #[arg(long, value_name = "ri|cholesky")]
    pub integrals: Option<String>,
    /// One JSON object on stdout instead of the table.
    #[arg(long)]
    pub json: bool,
    // --- vibronic bands (cli/vibronic.rs) ---
    /// Vibrational structure of the --count (default 3) lowest bands: optimise the neutral
    /// and each cation (hole held by the maximum overlap method), both harmonic analyses,
    /// Franck–Condon progression with Duschinsky rotation; adiabatic, vertical and maximum
    /// positions (HF ΔSCF energies) and the progression-forming modes.
    #[arg(long, conflicts_with_all = ["method", "window", "integrals", "correlate_core"])]
    pub vibronic: bool,
    // --- end vibronic ---
}

/// Printed under every table: the numbers are predictions.
pub const GUIDANCE: &str = "These are computed predictions to guide a measurement, not a \
substitute for one; check assignments against a measured spectrum before relying on them.";

pub fn run(args: Args) -> Result<()> {
    let mol = args.molecule.load()?;
    // --- vibronic bands (cli/vibronic.rs) ---
    if args.vibronic {
        return super::vibronic::ionize(&mol, &args.molecule.file, &args.basis, args.count, args.json);
    }
    // --- end vibronic ---
    const GIB: f64 = (1u64 << 30) as f64;
    let memory_bytes = match args.memory {
        Some(gib) if !(gib > 0.0) => {
            return Err(Error::input("--memory must be a positive number of GiB"))
        }
        Some(gib) => gib * GIB,
        None => bandcast::system::default_memory_budget() as f64,
    };
    let basis = bandcast::basis::load(&args.basis, &mol, None)?;
    let defaulted = args.method.is_none();
    let method = match &args.method {
        Some(m) => Method::parse(m)?,
        // the chain's first choice; predict_default falls back from it when it fails
        None => default_method::choose(&mol, &basis, memory_bytes).method,
    };
    use bandcast::correlation::two_electron::TwoElectron;
    let eom_integrals = match args.integrals.as_deref() {
        None => TwoElectron::Auto,
        Some(x) if x.eq_ignore_ascii_case("ri") => {
            match bandcast::basis::default_auxiliary_for(&basis.name) {
                Some(aux) => TwoElectron::Fitted(aux.to_string()),
                None => {
                    return Err(Error::input(format!(
                        "--integrals ri: no fitting set is bundled for the basis {}; use \
                     --integrals cholesky",
                        basis.name
                    )))
                }
            }
        }
        Some(x) if x.eq_ignore_ascii_case("cholesky") => TwoElectron::Cholesky,
        Some(x) => {
            return Err(Error::input(format!(
                "--integrals: '{x}' is not one of ri, cholesky"
            )))
        }
    };
    let opts = ValenceOptions {
        method,
        count: args.count,
        window_ev: args.window,
        frozen_core: !args.correlate_core,
        memory_bytes: memory_bytes as usize,
        eom_integrals,
        ..Default::default()
    };
    let result = if defaulted {
        default_method::predict_default(&mol, &basis, &opts)?.0
    } else {
        predict(&mol, &basis, &opts)?
    };
    let name = if mol.name.is_empty() {
        args.molecule.file.display().to_string()
    } else {
        mol.name.clone()
    };
    if args.json {
        println!(
            "{}",
            serde_json::to_string_pretty(&to_json(&result, &name)).expect("JSON of plain data")
        );
    } else {
        print!("{}", table(&result, &name));
    }
    Ok(())
}

fn reference_name(r: Reference) -> &'static str {
    match r {
        Reference::Rhf => "rhf",
        Reference::Uhf => "uhf",
        Reference::Rohf => "rohf",
    }
}

/// The `--json` document (schema in README.md, "bandcast ionize").
pub fn to_json(r: &ValenceResult, molecule: &str) -> Value {
    let bands: Vec<Value> = r
        .bands
        .iter()
        .enumerate()
        .map(|(k, b)| {
            let with: Vec<&str> = r
                .uncertain_pairs
                .iter()
                .filter_map(|p| {
                    if p.first == k {
                        Some(p.labels[1].as_str())
                    } else if p.second == k {
                        Some(p.labels[0].as_str())
                    } else {
                        None
                    }
                })
                .collect();
            json!({
                "label": b.label,
                "symmetry": b.symmetry,
                "ie_ev": b.ie_ev,
                "degeneracy": b.degeneracy,
                "occupation": b.occupation,
                "pole_strength": b.pole_strength,
                "one_hole_weight": b.one_hole_weight,
                "method": b.method,
                "character": b.character,
                "character_note": b.character_note,
                "makeup": b.makeup.iter().map(|m| json!({
                    "atom": m.atom, "shell": m.shell, "fraction": m.fraction
                })).collect::<Vec<_>>(),
                "koopmans_ie_ev": r.koopmans_ev[k],
                "order_uncertain_with": with,
            })
        })
        .collect();
    let pairs: Vec<Value> = r
        .uncertain_pairs
        .iter()
        .map(|p| {
            json!({
                "bands": p.labels,
                "gap_ev": p.gap_ev,
                "doubt": p.doubt,
                "reason": p.reason,
            })
        })
        .collect();
    json!({
        "molecule": molecule,
        "method": r.method.name(),
        "basis": r.basis,
        "point_group": r.point_group,
        "reference": { "kind": reference_name(r.reference), "energy_hartree": r.reference_energy },
        "bands": bands,
        "order_uncertain": pairs,
        "notes": r.notes,
        "warnings": r.warnings,
        "note": GUIDANCE,
    })
}

/// The human-readable table.
pub fn table(r: &ValenceResult, molecule: &str) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{molecule}: valence ionization by {} in {}{}",
        r.method,
        r.basis,
        r.point_group
            .as_ref()
            .map(|g| format!(", point group {g}"))
            .unwrap_or_default()
    );
    let _ = writeln!(
        s,
        "reference {} energy {:.8} Eh",
        reference_name(r.reference).to_uppercase(),
        r.reference_energy
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "  {:<8} {:>8} {:>4} {:>6} {:>8}  {:<12} make-up",
        "band", "IE (eV)", "deg", "weight", "Koopmans", "character"
    );
    for (k, b) in r.bands.iter().enumerate() {
        let flag = if r
            .uncertain_pairs
            .iter()
            .any(|p| p.first == k || p.second == k)
        {
            " ?"
        } else {
            ""
        };
        let pole = b
            .pole_strength
            .or(b.one_hole_weight)
            .map(|p| format!("{p:.3}"))
            .unwrap_or_else(|| "-".into());
        let makeup: Vec<String> = b
            .makeup
            .iter()
            .filter(|m| m.fraction >= 0.05)
            .take(4)
            .map(|m| format!("{} {} {:.0}%", m.atom, m.shell, 100.0 * m.fraction))
            .collect();
        let _ = writeln!(
            s,
            "  {:<8} {:>8.3} {:>4} {:>6} {:>8.3}  {:<12} {}{}",
            b.label,
            b.ie_ev,
            b.degeneracy,
            pole,
            r.koopmans_ev[k],
            b.character.as_deref().unwrap_or("-"),
            if makeup.is_empty() {
                "-".to_string()
            } else {
                makeup.join(", ")
            },
            flag
        );
        if let Some(note) = &b.character_note {
            let _ = writeln!(
                s,
                "  {:<8} {:>8} {:>4} {:>6} {:>8}  ↳ {note}",
                "", "", "", "", ""
            );
        }
    }
    if !r.uncertain_pairs.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(s, "order uncertain (marked ?):");
        for p in &r.uncertain_pairs {
            let _ = writeln!(s, "  {} / {}: {}", p.labels[0], p.labels[1], p.reason);
        }
    }
    if !r.notes.is_empty() || !r.warnings.is_empty() {
        let _ = writeln!(s);
        for n in &r.notes {
            let _ = writeln!(s, "note: {n}");
        }
        for w in &r.warnings {
            let _ = writeln!(s, "warning: {w}");
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "{GUIDANCE}");
    s
}

/// `bandcast bench ep2 FILE.xyz --basis NAME`: time the SCF and EP2 for all valence bands.
#[derive(clap::Args, Debug)]
pub struct Ep2BenchArgs {
    #[command(flatten)]
    pub molecule: MoleculeArgs,
    /// Basis set (default def2-TZVPP).
    #[arg(long, value_name = "NAME", default_value = "def2-TZVPP")]
    pub basis: String,
}

pub fn ep2_bench(args: Ep2BenchArgs) -> Result<()> {
    let mol = args.molecule.load()?;
    let basis = bandcast::basis::load(&args.basis, &mol, None)?;
    let r = bandcast::bench::ep2::run_ep2_bench(&mol, &basis)?;
    println!("{} / {}: {r}", args.molecule.file.display(), basis.name);
    Ok(())
}
