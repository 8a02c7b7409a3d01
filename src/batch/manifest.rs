//! The batch manifest: one structure file per line, optionally followed by options for that
//! molecule alone (e.g. `ion.xyz --charge 1`); `#` starts a comment; blank lines are skipped.
//! Relative paths are taken from the manifest's folder. A line naming an SD file stands for
//! each of its records; the manifest may itself be an SD file (one molecule per record).

use std::path::{Path, PathBuf};

use crate::chem::structure::{format_of, read_structures, Format};
use crate::chem::xyz::LengthUnit;
use crate::error::{Error, Result};

/// One molecule of the batch.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// What the command is given: the file, with `#K` for record K of an SD file.
    pub spec: String,
    /// Options for this molecule alone, passed after the batch's common options.
    pub options: Vec<String>,
    /// 1-based manifest line (for an SD manifest: the record's first line).
    pub line: usize,
    /// A name for reports: the record's title or the file stem.
    pub name: String,
    /// Stable file name of the molecule's record in the output folder (no extension).
    pub key: String,
}

/// Read the manifest and expand SD files into records. Every file must exist and be
/// readable as a structure: a bad entry stops the batch before any work, naming its line.
pub fn read_manifest(path: &Path) -> Result<Vec<Entry>> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::input_at(path, None, format!("cannot read the manifest: {e}")))?;
    let base = path.parent().unwrap_or(Path::new(""));
    let mut entries = Vec::new();
    if format_of(path, &text) == Format::Molfile {
        expand(path, &path.to_string_lossy(), &[], 0, &mut entries)?;
    } else {
        for (i, raw) in text.lines().enumerate() {
            let line = i + 1;
            let body = strip_comment(raw);
            let mut words = body.split_whitespace();
            let Some(file) = words.next() else { continue };
            let options: Vec<String> = words.map(str::to_string).collect();
            if let Some(bad) = options.iter().find(|o| *o == "--json") {
                return Err(Error::input_at(
                    path,
                    Some(line),
                    format!("'{bad}' is set by the batch itself"),
                ));
            }
            let (file, record) = match file.rsplit_once('#') {
                Some((f, k)) if k.parse::<usize>().is_ok() => (f, Some(k)),
                _ => (file, None),
            };
            let full: PathBuf = base.join(file);
            if !full.is_file() {
                return Err(Error::input_at(
                    path,
                    Some(line),
                    format!("no such structure file: {}", full.display()),
                ));
            }
            let spec = full.to_string_lossy().into_owned();
            match record {
                Some(k) => {
                    let stem = stem_of(&full);
                    entries.push(Entry {
                        spec: format!("{spec}#{k}"),
                        options,
                        line,
                        name: format!("{stem} #{k}"),
                        key: String::new(),
                    });
                }
                None => {
                    expand(&full, &spec, &options, line, &mut entries).map_err(|e| match e {
                        Error::Input {
                            file: Some(f),
                            line: l,
                            message,
                        } => Error::input_at(
                            path,
                            Some(line),
                            format!(
                                "{}{}: {message}",
                                f.display(),
                                l.map(|l| format!(":{l}")).unwrap_or_default()
                            ),
                        ),
                        other => other,
                    })?
                }
            }
        }
    }
    if entries.is_empty() {
        return Err(Error::input_at(
            path,
            None,
            "the manifest lists no structure",
        ));
    }
    for (j, e) in entries.iter_mut().enumerate() {
        e.key = format!("{:05}-{}", j + 1, sanitize(&e.name));
    }
    Ok(entries)
}

fn stem_of(p: &Path) -> String {
    p.file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default()
}

/// One entry per structure in `file` (several for an SD file).
fn expand(
    file: &Path,
    spec: &str,
    options: &[String],
    line: usize,
    out: &mut Vec<Entry>,
) -> Result<()> {
    let records = read_structures(file, LengthUnit::Angstrom).or_else(|e| {
        // an XYZ given in bohr is read by the command with its own options; only check it exists
        if options.iter().any(|o| o == "--bohr") {
            Ok(Vec::new())
        } else {
            Err(e)
        }
    })?;
    if records.len() <= 1 {
        out.push(Entry {
            spec: spec.to_string(),
            options: options.to_vec(),
            line: if line == 0 { 1 } else { line },
            name: records
                .first()
                .map(|r| r.molecule.name.clone())
                .filter(|n| !n.is_empty())
                .unwrap_or_else(|| stem_of(file)),
            key: String::new(),
        });
        return Ok(());
    }
    for (k, r) in records.iter().enumerate() {
        out.push(Entry {
            spec: format!("{spec}#{}", k + 1),
            options: options.to_vec(),
            line: if line == 0 { r.line } else { line },
            name: r.molecule.name.clone(),
            key: String::new(),
        });
    }
    Ok(())
}

/// The line without its comment: `#` starts one at the start of the line or after white
/// space (so `file.sdf#2`, record 2, is not a comment).
fn strip_comment(raw: &str) -> &str {
    let b = raw.as_bytes();
    for (i, &c) in b.iter().enumerate() {
        if c == b'#' && (i == 0 || b[i - 1].is_ascii_whitespace()) {
            return &raw[..i];
        }
    }
    raw
}

/// A file-name-safe version of a molecule name.
fn sanitize(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' || c == '.' {
                c
            } else {
                '_'
            }
        })
        .take(60)
        .collect();
    if s.is_empty() {
        "molecule".into()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_safe_file_names() {
        assert_eq!(sanitize("ethanol #2"), "ethanol__2");
        assert_eq!(sanitize("../x"), ".._x");
        assert_eq!(sanitize(""), "molecule");
    }

    #[test]
    fn comments_but_not_record_numbers() {
        assert_eq!(
            strip_comment("a.sdf#2 --charge 1 # cation"),
            "a.sdf#2 --charge 1 "
        );
        assert_eq!(strip_comment("# all comment"), "");
        assert_eq!(strip_comment("water.xyz"), "water.xyz");
    }
}
