//! Reading a measured spectrum: two columns (energy in eV, intensity), separated by
//! commas, semicolons, tabs or spaces; `#` starts a comment; one header line (the first
//! non-comment line) may hold column names. Anything else malformed is an input error naming
//! the file and the line; two points at the same energy name both lines and the energy.
//!
//! What the header says about the energy axis is kept (`HeaderAxis`): a column named
//! "kinetic", "KE" or "E_kin" marks a kinetic-energy file, "binding", "BE" or "E_bind" a
//! binding-energy file. The caller decides what to do with it (`bandcast assign` converts a
//! kinetic file with the photon energy, or refuses without one).

use std::path::Path;

use super::photon::Axis;
use crate::error::{Error, Result};

/// The energy axis a header line names, if any.
pub fn header_axis(header: &str) -> Option<Axis> {
    let h = header.to_ascii_lowercase();
    let words: Vec<&str> = h
        .split(|c: char| !c.is_ascii_alphanumeric() && c != '_')
        .filter(|w| !w.is_empty())
        .collect();
    let kinetic = h.contains("kinetic")
        || words
            .iter()
            .any(|w| matches!(*w, "ke" | "e_kin" | "ekin" | "kinetic_energy"));
    let binding = h.contains("binding")
        || words
            .iter()
            .any(|w| matches!(*w, "be" | "e_bind" | "ebind" | "binding_energy"));
    match (kinetic, binding) {
        (true, false) => Some(Axis::Kinetic),
        (false, true) => Some(Axis::Binding),
        _ => None,
    }
}

/// A measured trace, sorted by increasing energy.
#[derive(Debug, Clone, PartialEq)]
pub struct Measured {
    pub energy_ev: Vec<f64>,
    pub intensity: Vec<f64>,
}

/// Fewest points we accept.
pub const MIN_POINTS: usize = 7;

fn split_fields(line: &str) -> Vec<&str> {
    line.split(|c: char| c == ',' || c == ';' || c == '\t' || c.is_whitespace())
        .filter(|t| !t.is_empty())
        .collect()
}

/// Parse the text of a measured spectrum; `path` is only used in error messages.
pub fn parse_measured(text: &str, path: &Path) -> Result<Measured> {
    parse_measured_with_header(text, path).map(|(m, _)| m)
}

/// Parse the text of a measured spectrum and return what its header line says about the
/// energy axis (None: no header, or one that does not say).
pub fn parse_measured_with_header(text: &str, path: &Path) -> Result<(Measured, Option<Axis>)> {
    let mut pts: Vec<(f64, f64, usize)> = Vec::new();
    let mut header_seen = false;
    let mut axis = None;
    for (i, raw) in text.lines().enumerate() {
        let lineno = i + 1;
        let line = raw.split('#').next().unwrap_or("").trim();
        if line.is_empty() {
            continue;
        }
        let fields = split_fields(line);
        let nums: Vec<Option<f64>> = fields.iter().map(|f| f.parse::<f64>().ok()).collect();
        let all_numeric = nums.iter().all(|n| n.is_some());
        if !all_numeric {
            if pts.is_empty() && !header_seen && nums.iter().all(|n| n.is_none()) {
                header_seen = true;
                axis = header_axis(line);
                continue;
            }
            return Err(Error::input_at(
                path,
                Some(lineno),
                format!("expected two numbers (energy in eV, intensity), found '{line}'"),
            ));
        }
        if fields.len() != 2 {
            return Err(Error::input_at(
                path,
                Some(lineno),
                format!(
                    "expected two columns (energy in eV, intensity), found {}",
                    fields.len()
                ),
            ));
        }
        let (e, y) = (nums[0].unwrap(), nums[1].unwrap());
        if !e.is_finite() || !y.is_finite() {
            return Err(Error::input_at(
                path,
                Some(lineno),
                "energy and intensity must be finite",
            ));
        }
        pts.push((e, y, lineno));
    }
    if pts.len() < MIN_POINTS {
        return Err(Error::input_at(
            path,
            None,
            format!(
                "a measured spectrum needs at least {MIN_POINTS} points, found {}",
                pts.len()
            ),
        ));
    }
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    if let Some(w) = pts.windows(2).find(|w| w[1].0 == w[0].0) {
        let (a, b) = if w[0].2 < w[1].2 {
            (w[0].2, w[1].2)
        } else {
            (w[1].2, w[0].2)
        };
        return Err(Error::input_at(
            path,
            Some(b),
            format!(
                "energy {} eV appears twice (lines {a} and {b}); a trace needs one intensity per energy",
                w[0].0
            ),
        ));
    }
    Ok((
        Measured {
            energy_ev: pts.iter().map(|p| p.0).collect(),
            intensity: pts.iter().map(|p| p.1).collect(),
        },
        axis,
    ))
}

/// Read a measured spectrum and what its header says about the energy axis.
pub fn read_measured_with_header(path: &Path) -> Result<(Measured, Option<Axis>)> {
    let text = std::fs::read_to_string(path).map_err(|e| {
        Error::input_at(
            path,
            None,
            format!("cannot read the measured spectrum: {e}"),
        )
    })?;
    parse_measured_with_header(&text, path)
}

/// Read a measured spectrum from a file.
pub fn read_measured(path: &Path) -> Result<Measured> {
    let text = std::fs::read_to_string(path).map_err(|e| {
        Error::input_at(
            path,
            None,
            format!("cannot read the measured spectrum: {e}"),
        )
    })?;
    parse_measured(&text, path)
}

impl Measured {
    /// Mean point spacing (eV).
    pub fn mean_step(&self) -> f64 {
        let n = self.energy_ev.len();
        (self.energy_ev[n - 1] - self.energy_ev[0]) / (n - 1) as f64
    }
    /// Convert a kinetic-energy trace to binding energy (re-sorted to increase).
    pub fn kinetic_to_binding(&self, hv_ev: f64) -> Measured {
        let mut pts: Vec<(f64, f64)> = self
            .energy_ev
            .iter()
            .zip(&self.intensity)
            .map(|(&e, &y)| (hv_ev - e, y))
            .collect();
        pts.sort_by(|a, b| a.0.total_cmp(&b.0));
        Measured {
            energy_ev: pts.iter().map(|p| p.0).collect(),
            intensity: pts.iter().map(|p| p.1).collect(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_csv_with_header_and_comments() {
        let t = "# synthetic\nenergy,intensity\n1,2\n2,3 # note\n3;4\n4\t5\n5 6\n6,7\n7,8\n";
        let m = parse_measured(t, Path::new("x.csv")).unwrap();
        assert_eq!(m.energy_ev.len(), 7);
        assert_eq!(m.intensity[6], 8.0);
    }

    #[test]
    fn names_the_line() {
        let t = "e,i\n1,2\n2,3\n3,x\n";
        let e = parse_measured(t, Path::new("bad.csv")).unwrap_err();
        assert_eq!(e.exit_code(), 2);
        assert!(e.to_string().contains("bad.csv:4"), "{e}");
        let t = "1,2\n2,3,4\n";
        assert!(parse_measured(t, Path::new("b.csv"))
            .unwrap_err()
            .to_string()
            .contains("b.csv:2"));
    }

    #[test]
    fn duplicate_energy_names_both_lines_and_the_value() {
        let t = "e,i\n1,2\n2,3\n3,4\n2,5\n5,6\n6,7\n7,8\n";
        let e = parse_measured(t, Path::new("d.csv")).unwrap_err();
        let s = e.to_string();
        assert_eq!(e.exit_code(), 2);
        assert!(
            s.contains("d.csv:5") && s.contains("lines 3 and 5") && s.contains("energy 2 eV"),
            "{s}"
        );
    }

    #[test]
    fn header_names_the_axis() {
        assert_eq!(
            header_axis("Kinetic energy (eV), counts"),
            Some(Axis::Kinetic)
        );
        assert_eq!(header_axis("KE,I"), Some(Axis::Kinetic));
        assert_eq!(header_axis("binding_energy intensity"), Some(Axis::Binding));
        assert_eq!(header_axis("energy,intensity"), None);
        let t = "# x\nE_kin counts\n1 2\n2 3\n3 4\n4 5\n5 6\n6 7\n7 8\n";
        let (_, a) = parse_measured_with_header(t, Path::new("k.txt")).unwrap();
        assert_eq!(a, Some(Axis::Kinetic));
    }
}
