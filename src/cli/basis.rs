//! `bandcast basis`: the bundled basis sets, one set in detail, or a check of a user file.

use std::path::PathBuf;

use bandcast::basis::load::{element_ranges, find, is_path};
use bandcast::basis::{catalog, default_auxiliary_for, default_jk_auxiliary_for};
use bandcast::basis::{BasisData, Harmonics, SetKind};
use bandcast::chem::elements::parse_element;
use bandcast::report::write_atomic;
use bandcast::{Error, Result};

const LONG_HELP: &str = "\
Without NAME: every bundled set with the elements it defines, whether its d and f
functions are Cartesian or real solid harmonics, the number of functions on a carbon
atom, and the papers it comes from. Orbital sets come first, then the auxiliary sets the
correlated methods use for density fitting.

With NAME (any usual spelling: 6-31g(d), cc-pvdz, def2svp ...): the set element by
element -- primitives (9s4p1d), contracted shells 3s2p1d, number of basis functions,
highest angular momentum -- the fitting sets chosen for it, and its source papers.

NAME may also be the path of your own basis file in the bandcast schema (DEVELOPERS.md,
\"Basis-set files\"): it is read, checked and summarised; errors name the line. To start a
custom set, write a bundled one out with --export and edit it.

Examples:
  bandcast basis
  bandcast basis 6-31g(d) --elements C,H,O
  bandcast basis def2-TZVPP --export my-set.json
  bandcast basis my-set.json";

/// Show the basis sets bandcast carries, or one set in detail.
#[derive(clap::Args, Debug)]
#[command(after_long_help = LONG_HELP)]
pub struct Args {
    /// A bundled set's name or a path to a basis file (.json); omit to list all sets.
    #[arg(value_name = "NAME|FILE")]
    pub name: Option<String>,
    /// Only these elements in the per-element table (comma-separated symbols: C,H,O).
    #[arg(long, value_name = "LIST", value_delimiter = ',', requires = "name")]
    pub elements: Vec<String>,
    /// Write the set to FILE as a basis file in the bandcast schema (for editing).
    #[arg(long, value_name = "FILE", requires = "name")]
    pub export: Option<PathBuf>,
}

pub fn run(args: Args) -> Result<()> {
    match &args.name {
        None => list(),
        Some(name) => show(name, &args),
    }
}

fn convention(h: Harmonics) -> &'static str {
    match h {
        Harmonics::Cartesian => "Cartesian (6d 10f)",
        Harmonics::Pure => "solid harmonics (5d 7f)",
    }
}

/// "Dunning 1989; Woon 1993 …" from the citation texts (first author's surname, year).
fn short_source(data: &BasisData, max: usize) -> String {
    let mut seen: Vec<String> = Vec::new();
    for entry in &data.source {
        for cite in &entry.cite {
            let author = cite
                .split([',', '.', ';'])
                .next()
                .unwrap_or("")
                .trim()
                .to_string();
            let year = cite
                .rfind(" (")
                .and_then(|i| cite.get(i + 2..i + 6))
                .filter(|y| y.chars().all(|c| c.is_ascii_digit()))
                .unwrap_or("");
            let s = format!("{author} {year}").trim().to_string();
            if !s.is_empty() && !seen.contains(&s) {
                seen.push(s);
            }
        }
    }
    if seen.is_empty() {
        return "(no source given)".into();
    }
    let extra = seen.len().saturating_sub(max);
    seen.truncate(max);
    let mut s = seen.join("; ");
    if extra > 0 {
        s.push_str(&format!("; +{extra} more"));
    }
    s
}

fn list() -> Result<()> {
    println!(
        "Basis sets bundled with bandcast (all values as published; see `bandcast basis NAME`)"
    );
    for (title, fitting) in [
        ("Orbital basis sets", false),
        ("Auxiliary sets for density fitting", true),
    ] {
        println!();
        println!("{title}");
        println!(
            "  {:<22} {:<24} {:<12} {:>5}  source",
            "name", "d/f functions", "elements", "C"
        );
        let names = if fitting {
            catalog::fitting_names()
        } else {
            catalog::orbital_names()
        };
        for name in names {
            let data = catalog::get(name)?;
            let pure = data.harmonics == Harmonics::Pure;
            let carbon = data
                .element(6)
                .map(|e| e.n_functions(pure).to_string())
                .unwrap_or_else(|| "-".into());
            let kind = match data.kind {
                SetKind::FittingJk => " [J+K]",
                SetKind::FittingRi => " [RI]",
                SetKind::Orbital => "",
            };
            println!(
                "  {:<22} {:<24} {:<12} {:>5}  {}{}",
                data.name,
                convention(data.harmonics),
                element_ranges(&data.atomic_numbers()),
                carbon,
                short_source(data, 3),
                kind
            );
        }
    }
    println!();
    println!("C: number of basis functions on one carbon atom. Names are case-insensitive;");
    println!("6-31G(d), 6-31G(d,p), def2svp and similar spellings are understood.");
    Ok(())
}

fn show(name: &str, args: &Args) -> Result<()> {
    let (data, label) = find(name)?;
    let data: &BasisData = &data;
    let pure = data.harmonics == Harmonics::Pure;
    let mut zs = data.atomic_numbers();
    if !args.elements.is_empty() {
        let mut wanted = Vec::new();
        for token in &args.elements {
            let z = parse_element(token.trim()).ok_or_else(|| {
                Error::input(format!("--elements: '{token}' is not an element symbol"))
            })?;
            if data.element(z).is_none() {
                return Err(Error::input(format!(
                    "basis set '{}' has no functions for {}; it defines {}",
                    data.name,
                    bandcast::chem::elements::symbol(z),
                    element_ranges(&zs)
                )));
            }
            wanted.push(z);
        }
        zs = wanted;
    }

    if is_path(name) {
        println!("{} (file {label}: read and checked)", data.name);
    } else {
        println!("{}", data.name);
    }
    let kind = match data.kind {
        SetKind::Orbital => "orbital basis set",
        SetKind::FittingJk => "auxiliary set fitted for Coulomb and exchange (J+K)",
        SetKind::FittingRi => "auxiliary set fitted for correlation energies (RI)",
    };
    println!("  {kind}; {}", convention(data.harmonics));
    if !data.description.is_empty() && data.description != data.name {
        println!("  {}", data.description);
    }
    if !data.aliases.is_empty() {
        println!("  also written: {}", data.aliases.join(", "));
    }
    println!(
        "  elements: {} ({})",
        element_ranges(&data.atomic_numbers()),
        data.elements.len()
    );
    if data.kind == SetKind::Orbital && !is_path(name) {
        if let Some(aux) = default_auxiliary_for(&data.name) {
            println!("  fitting set for correlated methods: {aux}");
        }
        if let Some(aux) = default_jk_auxiliary_for(&data.name) {
            println!("  fitting set for Coulomb and exchange: {aux}");
        }
    }
    println!();
    println!(
        "  {:<4} {:<12} {:<12} {:>9}  {:>5}",
        "", "primitives", "contracted", "functions", "max l"
    );
    for z in zs {
        let el = data.element(z).expect("checked above");
        println!(
            "  {:<4} {:<12} {:<12} {:>9}  {:>5}",
            format!("{}:", el.symbol()),
            format!("({})", el.primitive_summary()),
            el.contracted_summary(),
            el.n_functions(pure),
            bandcast::basis::shell::l_letter(el.max_l())
        );
    }
    println!();
    if data.source.is_empty() {
        println!("Source: none given in the file.");
    } else {
        println!("Source");
        for entry in &data.source {
            let els: Vec<u32> = entry
                .elements
                .iter()
                .filter_map(|s| parse_element(s))
                .collect();
            let head = match (els.is_empty(), entry.note.is_empty()) {
                (true, true) => String::new(),
                (true, false) => entry.note.clone(),
                (false, true) => element_ranges(&els),
                (false, false) => format!("{}: {}", element_ranges(&els), entry.note),
            };
            if !head.is_empty() {
                println!("  {head}");
            }
            for c in &entry.cite {
                println!("    {c}");
            }
        }
    }
    if !data.provenance.is_empty() {
        println!("  ({})", data.provenance);
    }
    if let Some(path) = &args.export {
        write_atomic(path, data.to_json().as_bytes())?;
        eprintln!("wrote {} as a basis file to {}", data.name, path.display());
    }
    Ok(())
}
