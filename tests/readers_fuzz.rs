//! Generated and mutated inputs for the readers a user feeds by hand: XYZ structures,
//! MOL/SD files, basis-set JSON files and measured traces.
//!
//! What every case must show (the input rules of the command line, DEVELOPERS.md):
//! - no panic, whatever the bytes;
//! - invalid input is an input error (exit code 2) that names the file, and the line where
//!   the reader knows it (a line number inside the text);
//! - valid input, written out again and read back, gives the same data (write/read round
//!   trip).
//!
//! The generator is a small seeded xorshift, so a failure names a seed and case number that
//! reproduce it. Case counts are chosen so the corpora together take a few seconds in a
//! release build; the corpus sizes are the `CASES_*` constants (README, "Reliability").

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::Path;

use bandcast::basis::BasisData;
use bandcast::chem::xyz::{parse_xyz, write_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::spectrum::measured::{parse_measured, Measured};
use bandcast::Error;

const CASES_XYZ: usize = 6000;
const CASES_BASIS: usize = 3000;
const CASES_TRACE: usize = 6000;
const CASES_MOLFILE: usize = 4000;

/// xorshift64*: deterministic, no dependency.
struct Rng(u64);

impl Rng {
    fn new(seed: u64) -> Self {
        Rng(seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1)
    }
    fn next(&mut self) -> u64 {
        let mut x = self.0;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.0 = x;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
    fn unit(&mut self) -> f64 {
        (self.next() >> 11) as f64 / (1u64 << 53) as f64
    }
    fn pick<'a, T>(&mut self, xs: &'a [T]) -> &'a T {
        &xs[self.below(xs.len())]
    }
}

/// Tokens that readers of numbers and symbols tend to trip over.
const NASTY: &[&str] = &[
    "NaN",
    "nan",
    "inf",
    "-inf",
    "1e999",
    "-1e999",
    "1e-400",
    "-0",
    "0x10",
    "1,5",
    "١",
    "∞",
    "",
    " ",
    "\t",
    "\r",
    "\0",
    "#",
    ",",
    ";",
    "\"",
    "{",
    "}",
    "[",
    "]",
    ":",
    "e",
    "E5",
    "+",
    "-",
    ".",
    "..",
    "1.2.3",
    "99999999999999999999",
    "18446744073709551616",
    "-1",
    "Xx",
    "Uuo",
    "0",
    "119",
    "H",
    "h",
    "C",
    "Kr",
    "\u{feff}",
    "é",
    "\n\n",
    "null",
    "true",
];

/// One random edit of the text: delete, insert, replace a span, duplicate or drop a line,
/// truncate, or splice in a nasty token.
fn mutate(rng: &mut Rng, text: &str) -> String {
    let chars: Vec<char> = text.chars().collect();
    let n = chars.len();
    let at = rng.below(n + 1);
    let to_string = |c: &[char]| c.iter().collect::<String>();
    match rng.below(8) {
        0 => {
            let len = 1 + rng.below(8);
            let end = (at + len).min(n);
            to_string(&chars[..at]) + &to_string(&chars[end..])
        }
        1 => to_string(&chars[..at]) + *rng.pick(NASTY) + &to_string(&chars[at..]),
        2 => {
            let len = 1 + rng.below(6);
            let end = (at + len).min(n);
            to_string(&chars[..at]) + *rng.pick(NASTY) + &to_string(&chars[end..])
        }
        3 => to_string(&chars[..at]),
        4 | 5 => {
            let mut lines: Vec<&str> = text.lines().collect();
            if lines.is_empty() {
                return text.to_string();
            }
            let k = rng.below(lines.len());
            if rng.below(2) == 0 {
                let l = lines[k];
                lines.insert(k, l);
            } else {
                lines.remove(k);
            }
            lines.join("\n") + "\n"
        }
        6 => {
            // a random printable byte
            let c = (b' ' + rng.below(95) as u8) as char;
            to_string(&chars[..at]) + &c.to_string() + &to_string(&chars[at..])
        }
        _ => {
            // swap two lines
            let mut lines: Vec<&str> = text.lines().collect();
            if lines.len() > 1 {
                let (a, b) = (rng.below(lines.len()), rng.below(lines.len()));
                lines.swap(a, b);
            }
            lines.join("\n") + "\n"
        }
    }
}

/// An input error must name the file and, if it names a line, one inside the text (or the
/// line just past its end, where something is missing).
fn check_input_error(e: &Error, file: &Path, text: &str, case: &str) {
    match e {
        Error::Input {
            file: f,
            line,
            message,
        } => {
            assert!(!message.is_empty(), "{case}: empty message");
            if let Some(f) = f {
                assert_eq!(f, file, "{case}: error names another file");
            }
            if let Some(l) = line {
                let n = text.lines().count().max(1);
                assert!(
                    *l >= 1 && *l <= n + 1,
                    "{case}: line {l} outside the text of {n} lines: {message}"
                );
            }
        }
        other => panic!("{case}: invalid input must be an input error (exit 2), got {other:?}"),
    }
    assert_eq!(e.exit_code(), 2, "{case}: exit code");
}

fn random_molecule(rng: &mut Rng) -> Molecule {
    let n = 1 + rng.below(12);
    // atoms on a jittered 1.5 Å grid, so no two come closer than the reader's 0.1 Å limit
    let atoms = (0..n)
        .map(|i| {
            let cell = [(i % 3) as f64, ((i / 3) % 3) as f64, (i / 9) as f64];
            let pos = cell.map(|c| (1.5 * c + 0.4 * (rng.unit() - 0.5)) * 1.889_726_124_6);
            bandcast::chem::Atom {
                z: 1 + rng.below(36) as u32,
                position: pos,
            }
        })
        .collect();
    let mut m = Molecule::new(atoms);
    m.name = format!("case {}", rng.below(1000));
    m
}

fn same_atoms(a: &Molecule, b: &Molecule, tol: f64) -> bool {
    a.atoms.len() == b.atoms.len()
        && a.atoms.iter().zip(&b.atoms).all(|(x, y)| {
            x.z == y.z
                && x.position
                    .iter()
                    .zip(&y.position)
                    .all(|(p, q)| (p - q).abs() <= tol * p.abs().max(1.0))
        })
}

#[test]
fn xyz_reader_survives_generated_and_mutated_files() {
    let file = Path::new("fuzz.xyz");
    let mut rng = Rng::new(0x5EED_0001);
    let (mut valid, mut invalid) = (0, 0);
    for case in 0..CASES_XYZ {
        let mol = random_molecule(&mut rng);
        let unit = if rng.below(2) == 0 {
            LengthUnit::Bohr
        } else {
            LengthUnit::Angstrom
        };
        let clean = write_xyz(&mol, unit);
        // the generated file itself reads back to the molecule
        let back = parse_xyz(&clean, unit).expect("generated XYZ is valid");
        let tol = if unit == LengthUnit::Bohr {
            0.0
        } else {
            4.0 * f64::EPSILON
        };
        assert!(
            same_atoms(&mol, &back, tol),
            "case {case}: round trip of the generated file"
        );
        assert_eq!(back.name, mol.name, "case {case}: comment line");

        let mut text = clean.clone();
        for _ in 0..1 + rng.below(3) {
            text = mutate(&mut rng, &text);
        }
        let label = format!("xyz case {case} (seed 0x5EED0001)\n{text}");
        let got = catch_unwind(AssertUnwindSafe(|| parse_xyz(&text, unit)))
            .unwrap_or_else(|_| panic!("{label}: the reader panicked"));
        match got {
            Ok(m) => {
                valid += 1;
                // what was accepted must survive its own write/read round trip
                let again = parse_xyz(&write_xyz(&m, LengthUnit::Bohr), LengthUnit::Bohr)
                    .unwrap_or_else(|e| panic!("{label}: rewritten file rejected: {e}"));
                assert!(
                    same_atoms(&m, &again, 0.0),
                    "{label}: round trip changed the atoms"
                );
            }
            Err(e) => {
                invalid += 1;
                // parse_xyz names no file; read_xyz adds it (checked below on disk)
                check_input_error(&e, file, &text, &label);
            }
        }
    }
    assert!(
        valid > 100 && invalid > 1000,
        "the corpus exercises both sides: {valid} valid, {invalid} invalid"
    );
}

#[test]
fn xyz_errors_from_disk_name_the_file_and_line() {
    let dir = std::env::temp_dir().join(format!("bandcast-fuzz-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("broken.xyz");
    std::fs::write(&path, "2\nbroken\nH 0 0 0\nH 0 zero 0.74\n").unwrap();
    let e = bandcast::chem::xyz::read_xyz(&path, LengthUnit::Angstrom).unwrap_err();
    let msg = e.to_string();
    assert!(msg.starts_with(&format!("{}:4:", path.display())), "{msg}");
    assert_eq!(e.exit_code(), 2);
    // a count far beyond the file (a typo of a few digits) is an error at the end of the
    // file, not an attempt to reserve memory for it
    std::fs::write(&path, "99999999999999\nx\nH 0 0 0\n").unwrap();
    let e = bandcast::chem::xyz::read_xyz(&path, LengthUnit::Angstrom).unwrap_err();
    assert_eq!(e.exit_code(), 2, "{e}");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn basis_reader_survives_mutated_files() {
    let file = Path::new("my-set.json");
    let mut rng = Rng::new(0x5EED_0002);
    // start from bundled sets written out in the user-file layout
    let seeds: Vec<String> = ["sto-3g", "6-31g*", "cc-pvdz"]
        .iter()
        .map(|n| {
            bandcast::basis::catalog::get(n)
                .expect("bundled set")
                .to_json()
        })
        .collect();
    for s in &seeds {
        let data = BasisData::from_json(s, Some(file)).expect("an exported set reads back");
        assert_eq!(&data.to_json(), s, "export → read → export is the identity");
    }
    let (mut valid, mut invalid) = (0, 0);
    for case in 0..CASES_BASIS {
        let mut text = rng.pick(&seeds).clone();
        for _ in 0..1 + rng.below(3) {
            text = mutate(&mut rng, &text);
        }
        let label = format!("basis case {case} (seed 0x5EED0002)");
        let got = catch_unwind(AssertUnwindSafe(|| BasisData::from_json(&text, Some(file))))
            .unwrap_or_else(|_| panic!("{label}: the reader panicked on\n{text}"));
        match got {
            Ok(d) => {
                valid += 1;
                let again = BasisData::from_json(&d.to_json(), Some(file))
                    .unwrap_or_else(|e| panic!("{label}: rewritten set rejected: {e}"));
                assert_eq!(
                    again.to_json(),
                    d.to_json(),
                    "{label}: round trip changed the set"
                );
            }
            Err(e) => {
                invalid += 1;
                check_input_error(&e, file, &text, &label);
                assert!(
                    matches!(&e, Error::Input { file: Some(_), .. }),
                    "{label}: a user file's error names the file"
                );
            }
        }
    }
    assert!(
        valid > 50 && invalid > 300,
        "{valid} valid, {invalid} invalid"
    );
}

fn random_trace(rng: &mut Rng) -> (String, Vec<(f64, f64)>) {
    let n = 7 + rng.below(60);
    let start = 5.0 + 30.0 * rng.unit();
    let step = 0.005 + 0.2 * rng.unit();
    let sep = *rng.pick(&[",", ";", "\t", " ", "  ", ", "]);
    let mut text = String::new();
    if rng.below(2) == 0 {
        text.push_str("# generated trace\n");
    }
    if rng.below(2) == 0 {
        text.push_str(&format!("binding_energy_eV{sep}counts\n"));
    }
    let mut pts = Vec::with_capacity(n);
    for i in 0..n {
        let e = start + step * i as f64;
        let y = 1000.0 * rng.unit();
        pts.push((e, y));
        text.push_str(&format!("{e:?}{sep}{y:?}"));
        if rng.below(10) == 0 {
            text.push_str(" # note");
        }
        text.push('\n');
    }
    // files are often written high energy first
    if rng.below(2) == 0 {
        let mut lines: Vec<&str> = text.lines().collect();
        let body = lines.split_off(lines.len() - n);
        let mut t = lines.join("\n");
        if !t.is_empty() {
            t.push('\n');
        }
        for l in body.iter().rev() {
            t.push_str(l);
            t.push('\n');
        }
        text = t;
    }
    (text, pts)
}

fn write_trace(m: &Measured) -> String {
    m.energy_ev
        .iter()
        .zip(&m.intensity)
        .map(|(e, y)| format!("{e:?},{y:?}\n"))
        .collect()
}

#[test]
fn trace_reader_survives_generated_and_mutated_files() {
    let file = Path::new("measured.csv");
    let mut rng = Rng::new(0x5EED_0003);
    let (mut valid, mut invalid) = (0, 0);
    for case in 0..CASES_TRACE {
        let (clean, pts) = random_trace(&mut rng);
        let m = parse_measured(&clean, file).expect("generated trace is valid");
        assert_eq!(
            m.energy_ev,
            pts.iter().map(|p| p.0).collect::<Vec<_>>(),
            "case {case}: energies"
        );
        assert_eq!(
            m.intensity,
            pts.iter().map(|p| p.1).collect::<Vec<_>>(),
            "case {case}: intensities"
        );

        let mut text = clean;
        for _ in 0..1 + rng.below(3) {
            text = mutate(&mut rng, &text);
        }
        let label = format!("trace case {case} (seed 0x5EED0003)\n{text}");
        let got = catch_unwind(AssertUnwindSafe(|| parse_measured(&text, file)))
            .unwrap_or_else(|_| panic!("{label}: the reader panicked"));
        match got {
            Ok(m) => {
                valid += 1;
                assert!(
                    m.energy_ev.windows(2).all(|w| w[0] < w[1]),
                    "{label}: not sorted"
                );
                assert!(
                    m.energy_ev
                        .iter()
                        .chain(&m.intensity)
                        .all(|v| v.is_finite()),
                    "{label}"
                );
                let again = parse_measured(&write_trace(&m), file)
                    .unwrap_or_else(|e| panic!("{label}: rewritten trace rejected: {e}"));
                assert_eq!(again, m, "{label}: round trip changed the trace");
            }
            Err(e) => {
                invalid += 1;
                check_input_error(&e, file, &text, &label);
                assert!(
                    matches!(&e, Error::Input { file: Some(_), .. }),
                    "{label}: a trace error names the file"
                );
            }
        }
    }
    assert!(
        valid > 1000 && invalid > 1000,
        "{valid} valid, {invalid} invalid"
    );
}

/// A V2000 record in the fixed columns of the CTfile specification (4 decimals, Å).
fn write_v2000(m: &Molecule, title: &str, charge: i32) -> String {
    let a = 1.0 / bandcast::units::ANGSTROM_TO_BOHR;
    let mut t = format!(
        "{title}\n     fuzz           3D\n\n{:3}  0  0  0  0  0  0  0  0  0999 V2000\n",
        m.atoms.len()
    );
    for at in &m.atoms {
        let [x, y, z] = at.position.map(|c| c * a);
        t.push_str(&format!(
            "{x:10.4}{y:10.4}{z:10.4} {:<3} 0  0  0  0  0  0  0  0  0  0  0  0\n",
            at.symbol()
        ));
    }
    if charge != 0 {
        t.push_str(&format!("M  CHG  1   1 {charge:3}\n"));
    }
    t.push_str("M  END\n");
    t
}

#[test]
fn molfile_reader_survives_generated_and_mutated_files() {
    use bandcast::chem::sdf::parse_sdf;
    let file = Path::new("fuzz.sdf");
    let mut rng = Rng::new(0x5EED_0004);
    let (mut valid, mut invalid) = (0, 0);
    for case in 0..CASES_MOLFILE {
        // one to three records; a charge of ±1 where the electron count allows a closed shell
        let n_rec = 1 + rng.below(3);
        let mut text = String::new();
        let mut mols = Vec::new();
        for r in 0..n_rec {
            let m = random_molecule(&mut rng);
            let q = if m.nuclear_charge() % 2 == 1 { 1 } else { 0 };
            text.push_str(&write_v2000(&m, &format!("record {r}"), q));
            if r + 1 < n_rec {
                text.push_str("> <note>\nfuzz\n\n$$$$\n");
            }
            mols.push((m, q));
        }
        let recs = parse_sdf(&text)
            .unwrap_or_else(|e| panic!("case {case}: generated file rejected: {e}\n{text}"));
        assert_eq!(recs.len(), n_rec, "case {case}: record count");
        for (r, (m, q)) in recs.iter().zip(&mols) {
            // four decimals in Å: each coordinate within half a unit of the last place
            assert_eq!(
                m.atoms.len(),
                r.molecule.atoms.len(),
                "case {case}: atom count"
            );
            for (x, y) in m.atoms.iter().zip(&r.molecule.atoms) {
                assert_eq!(x.z, y.z, "case {case}: element");
                for k in 0..3 {
                    let d =
                        (x.position[k] - y.position[k]).abs() / bandcast::units::ANGSTROM_TO_BOHR;
                    assert!(d <= 0.51e-4, "case {case}: coordinate off by {d} Å");
                }
            }
            assert_eq!(r.molecule.charge, *q, "case {case}: charge");
        }
        for _ in 0..1 + rng.below(3) {
            text = mutate(&mut rng, &text);
        }
        let label = format!("molfile case {case} (seed 0x5EED0004)\n{text}");
        match catch_unwind(AssertUnwindSafe(|| parse_sdf(&text)))
            .unwrap_or_else(|_| panic!("{label}: the reader panicked"))
        {
            Ok(recs) => {
                valid += 1;
                assert!(!recs.is_empty(), "{label}: no records but no error");
            }
            Err(e) => {
                invalid += 1;
                check_input_error(&e, file, &text, &label);
            }
        }
    }
    assert!(
        valid > 200 && invalid > 1000,
        "{valid} valid, {invalid} invalid"
    );
}
