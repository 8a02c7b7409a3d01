//! XYZ reader: first line atom count, second line comment, then `Symbol x y z` per atom
//! (Å by default, bohr on request). Symbols in any case or atomic numbers.

use std::path::Path;

use crate::chem::elements;
use crate::chem::molecule::{distance, Atom, Molecule};
use crate::error::{Error, Result};
use crate::units::ANGSTROM_TO_BOHR;

/// Closest two nuclei may come, in Å, before the input is called a mistake.
pub const MIN_SEPARATION_ANGSTROM: f64 = 0.1;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LengthUnit {
    Angstrom,
    Bohr,
}

/// Read an XYZ file from disk.
pub fn read_xyz(path: &Path, unit: LengthUnit) -> Result<Molecule> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::input_at(path, None, format!("cannot read the file: {e}")))?;
    let mut m = parse_xyz(&text, unit).map_err(|e| match e {
        Error::Input { line, message, .. } => Error::input_at(path, line, message),
        other => other,
    })?;
    // The molecule's name is the file stem in every command (the comment line stays text).
    m.name = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    Ok(m)
}

/// Parse XYZ text. Errors carry the 1-based line number but no file name.
pub fn parse_xyz(text: &str, unit: LengthUnit) -> Result<Molecule> {
    let err = |line: usize, msg: String| Error::Input {
        file: None,
        line: Some(line),
        message: msg,
    };
    let lines: Vec<&str> = text.lines().collect();
    let first = lines.first().map(|l| l.trim()).unwrap_or("");
    if first.is_empty() {
        return Err(err(1, "expected the number of atoms on the first line; the file is empty or the line is blank".into()));
    }
    let n: usize = first
        .split_whitespace()
        .next()
        .unwrap_or("")
        .parse()
        .map_err(|_| {
            err(
                1,
                format!("expected the number of atoms on the first line, found '{first}'"),
            )
        })?;
    if n == 0 {
        return Err(err(
            1,
            "the atom count is 0: a molecule needs at least one atom".into(),
        ));
    }
    let comment = lines
        .get(1)
        .map(|s| s.trim().to_string())
        .unwrap_or_default();
    let scale = match unit {
        LengthUnit::Angstrom => ANGSTROM_TO_BOHR,
        LengthUnit::Bohr => 1.0,
    };
    // The count comes from the file: never trust it for an allocation.
    let mut atoms = Vec::with_capacity(n.min(lines.len()));
    let mut idx = 2;
    while atoms.len() < n {
        let lineno = idx + 1;
        let Some(line) = lines.get(idx) else {
            return Err(err(
                lineno.min(lines.len().max(1)),
                format!(
                    "the first line promises {n} atoms but the file holds only {}",
                    atoms.len()
                ),
            ));
        };
        idx += 1;
        let t: Vec<&str> = line.split_whitespace().collect();
        if t.is_empty() {
            return Err(err(
                lineno,
                format!(
                    "blank line where atom {} of {n} was expected",
                    atoms.len() + 1
                ),
            ));
        }
        if t.len() < 4 {
            return Err(err(
                lineno,
                format!("expected 'Symbol x y z', found '{}'", line.trim()),
            ));
        }
        let z = elements::parse_element(t[0]).ok_or_else(|| {
            err(
                lineno,
                format!(
                    "unknown element '{}' (bandcast reads H to Kr, by symbol or atomic number)",
                    t[0]
                ),
            )
        })?;
        let mut pos = [0.0; 3];
        for k in 0..3 {
            let v: f64 = t[k + 1]
                .parse()
                .map_err(|_| err(lineno, format!("coordinate '{}' is not a number", t[k + 1])))?;
            if !v.is_finite() {
                return Err(err(
                    lineno,
                    format!("coordinate '{}' is not finite", t[k + 1]),
                ));
            }
            pos[k] = v * scale;
        }
        atoms.push((lineno, Atom { z, position: pos }));
    }
    // Anything after the atoms must be blank: a longer list means the count is wrong.
    if let Some((k, extra)) = lines
        .iter()
        .enumerate()
        .skip(idx)
        .find(|(_, l)| !l.trim().is_empty())
    {
        return Err(err(
            k + 1,
            format!(
                "the first line promises {n} atoms but more lines follow: '{}'",
                extra.trim()
            ),
        ));
    }
    check_separation(&atoms).map_err(|(line, msg)| err(line, msg))?;
    let mut m = Molecule::new(atoms.into_iter().map(|(_, a)| a).collect());
    m.name = comment;
    Ok(m)
}

/// Refuse nuclei closer than `MIN_SEPARATION_ANGSTROM`: (1-based line of the later atom,
/// message). Shared by every structure reader.
pub(crate) fn check_separation(
    atoms: &[(usize, Atom)],
) -> std::result::Result<(), (usize, String)> {
    let min_sep = MIN_SEPARATION_ANGSTROM * ANGSTROM_TO_BOHR;
    for i in 0..atoms.len() {
        for j in 0..i {
            let d = distance(&atoms[i].1.position, &atoms[j].1.position);
            if d < min_sep {
                return Err((
                    atoms[i].0,
                    format!(
                        "atom {} lies {:.4} Å from atom {} (closer than {MIN_SEPARATION_ANGSTROM} Å): check the coordinates and the unit",
                        i + 1,
                        d / ANGSTROM_TO_BOHR,
                        j + 1
                    ),
                ));
            }
        }
    }
    Ok(())
}

/// The molecule as XYZ text that `parse_xyz` reads back to the same atoms: the atom count,
/// the name as the comment line (line breaks replaced by spaces), then one `Symbol x y z`
/// line per atom in `unit`. Coordinates use the shortest decimal that reads back to the same
/// f64, so with `LengthUnit::Bohr` the round trip is exact; in Å it is exact to the last bit
/// or two of the Å ↔ bohr conversion.
pub fn write_xyz(mol: &Molecule, unit: LengthUnit) -> String {
    let scale = match unit {
        LengthUnit::Angstrom => 1.0 / ANGSTROM_TO_BOHR,
        LengthUnit::Bohr => 1.0,
    };
    let mut out = format!(
        "{}\n{}\n",
        mol.atoms.len(),
        mol.name.replace(['\n', '\r'], " ")
    );
    for a in &mol.atoms {
        let [x, y, z] = a.position.map(|c| c * scale);
        out.push_str(&format!("{} {x:?} {y:?} {z:?}\n", a.symbol()));
    }
    out
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

    #[test]
    fn reads_water() {
        let m = parse_xyz(
            "3\nwater\nO 0 0 0\nh 0.7571 0 0.5861\n1 -0.7571 0 0.5861\n",
            LengthUnit::Angstrom,
        )
        .unwrap();
        assert_eq!(m.atoms.len(), 3);
        assert_eq!(m.atoms[2].z, 1);
        assert!((m.atoms[1].position[0] - 0.7571 * ANGSTROM_TO_BOHR).abs() < 1e-12);
        assert_eq!(m.name, "water");
    }

    #[test]
    fn bad_inputs_name_the_line() {
        assert_eq!(
            line_of(parse_xyz("x\n\n", LengthUnit::Angstrom).unwrap_err()),
            Some(1)
        );
        assert_eq!(
            line_of(parse_xyz("2\nc\nH 0 0 0\n", LengthUnit::Angstrom).unwrap_err()),
            Some(3)
        );
        assert_eq!(
            line_of(parse_xyz("1\nc\nQq 0 0 0\n", LengthUnit::Angstrom).unwrap_err()),
            Some(3)
        );
        assert_eq!(
            line_of(parse_xyz("1\nc\nH 0 zero 0\n", LengthUnit::Angstrom).unwrap_err()),
            Some(3)
        );
        assert_eq!(
            line_of(parse_xyz("1\nc\nH 0 NaN 0\n", LengthUnit::Angstrom).unwrap_err()),
            Some(3)
        );
        assert_eq!(
            line_of(parse_xyz("1\nc\nH 0 inf 0\n", LengthUnit::Angstrom).unwrap_err()),
            Some(3)
        );
        assert_eq!(
            line_of(parse_xyz("2\nc\nH 0 0 0\nH 0 0 0.05\n", LengthUnit::Angstrom).unwrap_err()),
            Some(4)
        );
        assert_eq!(
            line_of(parse_xyz("1\nc\nH 0 0 0\nH 0 0 1\n", LengthUnit::Angstrom).unwrap_err()),
            Some(4)
        );
    }

    #[test]
    fn bohr_switch() {
        let m = parse_xyz("2\n\nH 0 0 0\nH 0 0 1.4\n", LengthUnit::Bohr).unwrap();
        assert!((m.atoms[1].position[2] - 1.4).abs() < 1e-15);
    }
}
