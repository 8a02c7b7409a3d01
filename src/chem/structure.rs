//! Reading a structure file of any supported format: XYZ, MDL molfile (`.mol`) or SD file
//! (`.sdf`, `.sd`), chosen by the file's extension and, for other names, by its content (a
//! V2000/V3000 counts line on line 4 means a molfile).

use std::path::Path;

use crate::chem::sdf::{looks_like_molfile, parse_sdf, Record};
use crate::chem::xyz::{parse_xyz, LengthUnit};
use crate::error::{Error, Result};

/// The formats bandcast reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    Xyz,
    Molfile,
}

/// The format of `path` from its extension, else from `text`.
pub fn format_of(path: &Path, text: &str) -> Format {
    let ext = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    match ext.as_str() {
        "xyz" => Format::Xyz,
        "mol" | "sdf" | "sd" => Format::Molfile,
        _ if looks_like_molfile(text) => Format::Molfile,
        _ => Format::Xyz,
    }
}

/// Every structure in the file: one for XYZ and molfiles, one per record for SD files.
/// Errors name the file and line. `unit` applies to XYZ only: molfile coordinates are Å by
/// definition, so asking for bohr there is an input error.
pub fn read_structures(path: &Path, unit: LengthUnit) -> Result<Vec<Record>> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::input_at(path, None, format!("cannot read the file: {e}")))?;
    let with_file = |e: Error| match e {
        Error::Input { line, message, .. } => Error::input_at(path, line, message),
        other => other,
    };
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    match format_of(path, &text) {
        Format::Xyz => {
            let mut molecule = parse_xyz(&text, unit).map_err(with_file)?;
            // the comment line is free text (often a citation): the file names the molecule
            molecule.name = stem;
            Ok(vec![Record {
                molecule,
                charge: None,
                multiplicity: None,
                line: 1,
            }])
        }
        Format::Molfile => {
            if unit == LengthUnit::Bohr {
                return Err(Error::input_at(
                    path,
                    None,
                    "molfile/SD coordinates are in Å by definition; bohr applies to XYZ files only",
                ));
            }
            let mut records = parse_sdf(&text).map_err(with_file)?;
            let several = records.len() > 1;
            for (k, r) in records.iter_mut().enumerate() {
                if r.molecule.name.is_empty() {
                    r.molecule.name = if several {
                        format!("{stem} #{}", k + 1)
                    } else {
                        stem.clone()
                    };
                }
            }
            Ok(records)
        }
    }
}

/// Split `FILE#K` (record K, from 1, of an SD file) into the path and the record number; a
/// name that merely contains `#` but exists as a file is taken whole.
pub fn split_record_spec(spec: &Path) -> (std::path::PathBuf, Option<usize>) {
    let text = spec.to_string_lossy();
    if !spec.exists() {
        if let Some((file, k)) = text.rsplit_once('#') {
            if let Ok(k) = k.parse::<usize>() {
                return (std::path::PathBuf::from(file), Some(k));
            }
        }
    }
    (spec.to_path_buf(), None)
}

/// The one structure a single-molecule command works on: the file's only structure, or record
/// K of an SD file named as `FILE#K`. A file with several records and no `#K` is an input
/// error that says how many it holds.
pub fn read_one(spec: &Path, unit: LengthUnit) -> Result<Record> {
    let (path, k) = split_record_spec(spec);
    let mut records = read_structures(&path, unit)?;
    let n = records.len();
    match k {
        Some(0) => Err(Error::input_at(&path, None, "records are numbered from 1")),
        Some(k) if k > n => Err(Error::input_at(
            &path,
            None,
            format!("record {k} asked for, but the file holds {n}"),
        )),
        Some(k) => Ok(records.swap_remove(k - 1)),
        None if n > 1 => Err(Error::input_at(
            &path,
            None,
            format!(
                "the file holds {n} structures; name one as {}#K (K from 1 to {n}), or run them all with `bandcast batch`",
                path.display()
            ),
        )),
        None => Ok(records.remove(0)),
    }
}
