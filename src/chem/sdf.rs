//! MDL molfile and SD-file reader (CTfile formats, V2000 and V3000), 3D coordinates only.
//!
//! Layout (the published CTfile specification, common practice): a record is a three-line
//! header (title, program/dimension line, comment), a counts line, the connection table, and
//! `M  END`; an SD file is records separated by `$$$$`, each optionally followed by data
//! items (`> <name>` … blank line), which are skipped. Coordinates are in Å.
//!
//! What is read: element symbols and positions; the charge (V2000: `M  CHG` lines, or the
//! atom-block charge code 1–7 = +3 … −3 when the record has no `M  CHG`; V3000: `CHG=` atom
//! properties); unpaired electrons (V2000 `M  RAD`, V3000 `RAD=`: 2 = doublet, one unpaired
//! electron; 1 and 3 = singlet/triplet carbene, two) which give the multiplicity. Bonds are
//! read past: the quantum chemistry does not use them.
//!
//! Refused, with the file's line: a record whose header says 2D, or whose coordinates are all
//! in one plane z = 0 without a 3D mark (a drawing, not a structure: bandcast generates no
//! geometry), a record with no atoms, unknown elements (pseudo-atoms such as `R#` or `*`),
//! and anything malformed.

use crate::chem::elements;
use crate::chem::molecule::{Atom, Molecule};
use crate::chem::xyz::check_separation;
use crate::error::{Error, Result};
use crate::units::ANGSTROM_TO_BOHR;

/// One structure of a MOL or SD file.
#[derive(Debug, Clone, PartialEq)]
pub struct Record {
    /// The molecule with the file's charge and, when the file marks radicals, multiplicity
    /// (else the lowest multiplicity its electron count allows).
    pub molecule: Molecule,
    /// Total charge written in the file (None when it writes none).
    pub charge: Option<i32>,
    /// Multiplicity from the file's radical marks (None when there are none).
    pub multiplicity: Option<u32>,
    /// 1-based line of the record's title.
    pub line: usize,
}

fn err(line: usize, message: impl Into<String>) -> Error {
    Error::Input {
        file: None,
        line: Some(line),
        message: message.into(),
    }
}

/// Parse the text of a MOL file (one record) or an SD file (one or more). Errors carry the
/// 1-based line but no file name (`structure::read_structures` adds it).
pub fn parse_sdf(text: &str) -> Result<Vec<Record>> {
    let lines: Vec<&str> = text.lines().collect();
    let mut records = Vec::new();
    let mut start = 0;
    while start < lines.len() {
        // blank lines between records (or at the end) are not records
        if lines[start..].iter().all(|l| l.trim().is_empty()) {
            break;
        }
        let end = lines[start..]
            .iter()
            .position(|l| l.trim_end() == "$$$$")
            .map(|k| start + k)
            .unwrap_or(lines.len());
        records.push(parse_record(&lines, start, end, records.len() + 1)?);
        start = end + 1;
    }
    if records.is_empty() {
        return Err(err(1, "no structure in the file (an empty MOL/SD file)"));
    }
    Ok(records)
}

/// Does this text look like a molfile/SD file rather than XYZ? (A V2000/V3000 counts line on
/// line 4.)
pub fn looks_like_molfile(text: &str) -> bool {
    text.lines()
        .nth(3)
        .map(|l| l.contains("V2000") || l.contains("V3000"))
        .unwrap_or(false)
}

struct Parsed {
    atoms: Vec<(usize, Atom)>,
    charge: Option<i32>,
    unpaired: Option<u32>,
}

fn parse_record(lines: &[&str], start: usize, end: usize, index: usize) -> Result<Record> {
    let at = |k: usize| start + k + 1; // 1-based file line of record line k
    if end - start < 4 {
        return Err(err(
            at(end - start),
            format!("record {index} ends before its counts line (a molfile needs a three-line header and a counts line)"),
        ));
    }
    let title = lines[start].trim().to_string();
    // The dimension code sits in columns 21–22 of the second header line.
    let dims = lines[start + 1].get(20..22).map(str::trim).unwrap_or("");
    if dims.eq_ignore_ascii_case("2D") {
        return Err(err(
            at(1),
            format!("record {index} has 2D coordinates (a drawing): bandcast needs a 3D structure and does not generate one"),
        ));
    }
    let counts = lines[start + 3];
    let parsed = if counts.contains("V3000") {
        parse_v3000(lines, start + 4, end)?
    } else if counts.contains("V2000") || counts.trim_end().len() <= 39 {
        parse_v2000(lines, start + 3, end)?
    } else {
        return Err(err(
            at(3),
            format!(
                "expected a V2000 or V3000 counts line, found '{}'",
                counts.trim()
            ),
        ));
    };
    if parsed.atoms.is_empty() {
        return Err(err(at(3), format!("record {index} holds no atoms")));
    }
    let flat = parsed.atoms.iter().all(|(_, a)| a.position[2] == 0.0);
    if flat && !dims.eq_ignore_ascii_case("3D") && parsed.atoms.len() > 1 {
        return Err(err(
            at(1),
            format!("record {index} has every z coordinate 0 and no 3D mark in its header: a drawing, not a structure (a planar molecule written by a program that marks 3D is accepted)"),
        ));
    }
    check_separation(&parsed.atoms).map_err(|(line, msg)| err(line, msg))?;
    let mut molecule = Molecule::new(parsed.atoms.into_iter().map(|(_, a)| a).collect());
    molecule.name = title;
    let charge = parsed.charge;
    let multiplicity = parsed.unpaired.map(|u| u + 1);
    if charge.is_some() || multiplicity.is_some() {
        let q = charge.unwrap_or(0);
        let mult = multiplicity.unwrap_or_else(|| {
            let nel = molecule.nuclear_charge() - q as i64;
            if nel.rem_euclid(2) == 0 {
                1
            } else {
                2
            }
        });
        molecule = molecule
            .with_charge_multiplicity(q, mult)
            .map_err(|e| err(at(3), format!("record {index}: {}", message_of(&e))))?;
    }
    Ok(Record {
        molecule,
        charge,
        multiplicity,
        line: at(0),
    })
}

fn message_of(e: &Error) -> String {
    match e {
        Error::Input { message, .. } => message.clone(),
        other => other.to_string(),
    }
}

fn element(token: &str, line: usize) -> Result<u32> {
    // element symbols only: a number here is not an element in a molfile
    if token.parse::<u32>().is_ok() {
        return Err(err(line, format!("'{token}' is not an element symbol")));
    }
    elements::parse_element(token).ok_or_else(|| {
        err(
            line,
            format!("unknown element '{token}' (bandcast reads H to Kr; pseudo-atoms and query atoms are not structures)"),
        )
    })
}

fn coordinate(token: &str, line: usize) -> Result<f64> {
    let v: f64 = token.trim().parse().map_err(|_| {
        err(
            line,
            format!("coordinate '{}' is not a number", token.trim()),
        )
    })?;
    if !v.is_finite() {
        return Err(err(
            line,
            format!("coordinate '{}' is not finite", token.trim()),
        ));
    }
    Ok(v * ANGSTROM_TO_BOHR)
}

fn count_field(s: &str, what: &str, line: usize) -> Result<usize> {
    s.trim().parse().map_err(|_| {
        err(
            line,
            format!(
                "the counts line's {what} '{}' is not a whole number",
                s.trim()
            ),
        )
    })
}

/// Fixed-column V2000: counts `aaabbb…`, atoms `xxxxx.xxxxyyyyy.yyyyzzzzz.zzzz aaa ddcc…`.
fn parse_v2000(lines: &[&str], counts_at: usize, end: usize) -> Result<Parsed> {
    let counts = lines[counts_at];
    let cline = counts_at + 1;
    let n_atoms = count_field(counts.get(0..3).unwrap_or(counts), "atom count", cline)?;
    let n_bonds = count_field(counts.get(3..6).unwrap_or("0"), "bond count", cline)?;
    let first = counts_at + 1;
    if first + n_atoms + n_bonds > end {
        return Err(err(
            end.min(lines.len()).max(1),
            format!("the counts line promises {n_atoms} atoms and {n_bonds} bonds but the record ends first"),
        ));
    }
    let mut atoms = Vec::with_capacity(n_atoms);
    let mut block_charge = 0i32;
    let mut block_has_charge = false;
    for (k, raw) in lines[first..first + n_atoms].iter().enumerate() {
        let line = first + k + 1;
        let field = |a: usize, b: usize| raw.get(a..b.min(raw.len())).unwrap_or("");
        if raw.len() < 34 {
            return Err(err(
                line,
                format!(
                    "atom line too short for the V2000 columns (x y z symbol): '{}'",
                    raw.trim()
                ),
            ));
        }
        let position = [
            coordinate(field(0, 10), line)?,
            coordinate(field(10, 20), line)?,
            coordinate(field(20, 30), line)?,
        ];
        let z = element(field(31, 34).trim(), line)?;
        // charge code in columns 37–39: 1..3 = +3..+1, 4 = doublet radical, 5..7 = −1..−3
        let code = field(36, 39).trim();
        if !code.is_empty() {
            let c: i32 = code
                .parse()
                .map_err(|_| err(line, format!("charge code '{code}' is not a number")))?;
            let q = match c {
                0 | 4 => 0,
                1..=3 => 4 - c,
                5..=7 => 4 - c,
                _ => return Err(err(line, format!("charge code {c} is not one of 0–7"))),
            };
            if q != 0 {
                block_has_charge = true;
                block_charge += q;
            }
        }
        atoms.push((line, Atom { z, position }));
    }
    let mut chg: Option<i32> = None;
    let mut rad: Option<u32> = None;
    for (k, raw) in lines[first + n_atoms + n_bonds..end].iter().enumerate() {
        let line = first + n_atoms + n_bonds + k + 1;
        let t = raw.trim_end();
        if t == "M  END" {
            break;
        }
        let kind = t.get(0..6).unwrap_or("");
        if kind == "M  CHG" || kind == "M  RAD" {
            let v = property_pairs(t, n_atoms, line)?;
            if kind == "M  CHG" {
                *chg.get_or_insert(0) += v.iter().map(|p| p.1).sum::<i32>();
            } else {
                *rad.get_or_insert(0) += v
                    .iter()
                    .map(|p| unpaired_of(p.1, line))
                    .sum::<Result<u32>>()?;
            }
        }
    }
    // M  CHG supersedes the atom-block charges (CTfile specification)
    let charge = chg.or(block_has_charge.then_some(block_charge));
    Ok(Parsed {
        atoms,
        charge,
        unpaired: rad,
    })
}

/// `M  CHGnn8 aaa vvv …`: pairs (atom, value).
fn property_pairs(t: &str, n_atoms: usize, line: usize) -> Result<Vec<(usize, i32)>> {
    let fields: Vec<&str> = t[6..].split_whitespace().collect();
    let n: usize = fields
        .first()
        .and_then(|f| f.parse().ok())
        .ok_or_else(|| err(line, format!("'{}' lacks its entry count", t.trim())))?;
    if fields.len() != 1 + 2 * n {
        return Err(err(line, format!("'{}' promises {n} entries", t.trim())));
    }
    (0..n)
        .map(|i| {
            let a: usize = fields[1 + 2 * i].parse().map_err(|_| {
                err(
                    line,
                    format!("atom number '{}' is not a number", fields[1 + 2 * i]),
                )
            })?;
            let v: i32 = fields[2 + 2 * i].parse().map_err(|_| {
                err(
                    line,
                    format!("value '{}' is not a number", fields[2 + 2 * i]),
                )
            })?;
            if a == 0 || a > n_atoms {
                return Err(err(
                    line,
                    format!("atom {a} does not exist (the record has {n_atoms})"),
                ));
            }
            Ok((a, v))
        })
        .collect()
}

/// Unpaired electrons of a radical mark: 1 singlet carbene (two electrons, paired — counted as
/// 0 unpaired), 2 doublet (1), 3 triplet (2).
fn unpaired_of(rad: i32, line: usize) -> Result<u32> {
    match rad {
        0 | 1 => Ok(0),
        2 => Ok(1),
        3 => Ok(2),
        _ => Err(err(line, format!("radical value {rad} is not one of 0–3"))),
    }
}

/// V3000 lines `M  V30 …`, with `-` continuation; the atom block between `BEGIN ATOM` and
/// `END ATOM`: `index symbol x y z aamap [KEY=VALUE …]`.
fn parse_v3000(lines: &[&str], first: usize, end: usize) -> Result<Parsed> {
    // join continuation lines, keeping the line number of the first part
    let mut joined: Vec<(usize, String)> = Vec::new();
    let mut k = first;
    while k < end {
        let raw = lines[k].trim_end();
        let line = k + 1;
        k += 1;
        if raw == "M  END" {
            break;
        }
        let Some(body) = raw.strip_prefix("M  V30 ") else {
            if raw.trim().is_empty() {
                continue;
            }
            return Err(err(
                line,
                format!("expected an 'M  V30' line, found '{}'", raw.trim()),
            ));
        };
        let mut text = body.to_string();
        while text.ends_with('-') && k < end {
            text.pop();
            let next = lines[k].trim_end();
            k += 1;
            text.push_str(next.strip_prefix("M  V30 ").unwrap_or(next));
        }
        joined.push((line, text));
    }
    let mut atoms = Vec::new();
    let mut charge: Option<i32> = None;
    let mut unpaired: Option<u32> = None;
    let mut in_atoms = false;
    let mut promised: Option<usize> = None;
    for (line, text) in &joined {
        let t = text.trim();
        let upper = t.to_ascii_uppercase();
        if upper.starts_with("COUNTS") {
            let n = t.split_whitespace().nth(1).unwrap_or("");
            promised = Some(count_field(n, "atom count", *line)?);
        } else if upper == "BEGIN ATOM" {
            in_atoms = true;
        } else if upper == "END ATOM" {
            in_atoms = false;
        } else if in_atoms {
            let f: Vec<&str> = t.split_whitespace().collect();
            if f.len() < 5 {
                return Err(err(
                    *line,
                    format!("atom line needs 'index symbol x y z', found '{t}'"),
                ));
            }
            let z = element(f[1], *line)?;
            let position = [
                coordinate(f[2], *line)?,
                coordinate(f[3], *line)?,
                coordinate(f[4], *line)?,
            ];
            for prop in f.iter().skip(6) {
                if let Some((key, value)) = prop.split_once('=') {
                    let parse = |v: &str| {
                        v.parse::<i32>()
                            .map_err(|_| err(*line, format!("'{prop}' is not a whole number")))
                    };
                    match key.to_ascii_uppercase().as_str() {
                        "CHG" => *charge.get_or_insert(0) += parse(value)?,
                        "RAD" => *unpaired.get_or_insert(0) += unpaired_of(parse(value)?, *line)?,
                        _ => {}
                    }
                }
            }
            atoms.push((*line, Atom { z, position }));
        }
    }
    if in_atoms {
        let last = joined.last().map(|j| j.0).unwrap_or(first + 1);
        return Err(err(last, "the atom block has no 'END ATOM'"));
    }
    if let Some(n) = promised {
        if n != atoms.len() {
            let line = joined.first().map(|j| j.0).unwrap_or(first + 1);
            return Err(err(
                line,
                format!(
                    "the COUNTS line promises {n} atoms, the atom block holds {}",
                    atoms.len()
                ),
            ));
        }
    }
    Ok(Parsed {
        atoms,
        charge,
        unpaired,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn line_of(e: Error) -> Option<usize> {
        match e {
            Error::Input { line, .. } => line,
            _ => None,
        }
    }

    const WATER: &str = "water\n     test           3D\n\n  3  2  0  0  0  0  0  0  0  0999 V2000\n    0.0000    0.0000    0.0000 O   0  0  0  0  0  0  0  0  0  0  0  0\n    0.7571    0.0000    0.5861 H   0  0  0  0  0  0  0  0  0  0  0  0\n   -0.7571    0.0000    0.5861 H   0  0  0  0  0  0  0  0  0  0  0  0\n  2  1  1  0\n  3  1  1  0\nM  END\n";

    #[test]
    fn reads_a_v2000_record() {
        let r = parse_sdf(WATER).unwrap();
        assert_eq!(r.len(), 1);
        assert_eq!(r[0].molecule.atoms.len(), 3);
        assert_eq!(r[0].molecule.name, "water");
        assert_eq!(r[0].charge, None);
        assert!((r[0].molecule.atoms[1].position[0] - 0.7571 * ANGSTROM_TO_BOHR).abs() < 1e-12);
    }

    #[test]
    fn errors_name_the_line() {
        let bad = WATER.replace(
            "0.7571    0.0000    0.5861 H",
            "0.7571    zero      0.5861 H",
        );
        assert_eq!(line_of(parse_sdf(&bad).unwrap_err()), Some(6));
        let two_d = WATER.replace("3D", "2D");
        assert_eq!(line_of(parse_sdf(&two_d).unwrap_err()), Some(2));
        let short = WATER.replace("  3  2  0", "  5  2  0");
        assert!(parse_sdf(&short).is_err());
        let bad_el = WATER.replace(" O   0", " Xx  0");
        assert_eq!(line_of(parse_sdf(&bad_el).unwrap_err()), Some(5));
    }

    #[test]
    fn charge_from_the_atom_block_when_no_m_chg() {
        // charge code 3 = +1 on the oxygen: H3O+ written without an M  CHG line
        let h3o = "h3o\n     test           3D\n\n  4  3  0  0  0  0  0  0  0  0999 V2000\n    0.0000    0.0000    0.1000 O   0  3  0  0  0  0  0  0  0  0  0  0\n    0.9000    0.0000   -0.2000 H   0  0\n   -0.4500    0.7800   -0.2000 H   0  0\n   -0.4500   -0.7800   -0.2000 H   0  0\n  1  2  1  0\n  1  3  1  0\n  1  4  1  0\nM  END\n";
        let r = parse_sdf(h3o).unwrap();
        assert_eq!(r[0].charge, Some(1));
        assert_eq!(r[0].molecule.charge, 1);
        assert_eq!(r[0].molecule.multiplicity, 1);
    }
}
