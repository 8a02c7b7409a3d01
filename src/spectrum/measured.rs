//! Reading a measured spectrum: two columns (energy in eV, intensity), separated by
//! commas, semicolons, tabs or spaces; `#` starts a comment; one header line (the first
//! non-comment line) may hold column names. Anything else malformed is an input error naming
//! the file and the line.

use std::path::Path;

use crate::error::{Error, Result};

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
    let mut pts: Vec<(f64, f64)> = Vec::new();
    let mut header_seen = false;
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
        pts.push((e, y));
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
    if pts.windows(2).any(|w| w[1].0 == w[0].0) {
        return Err(Error::input_at(
            path,
            None,
            "two points share the same energy",
        ));
    }
    Ok(Measured {
        energy_ev: pts.iter().map(|p| p.0).collect(),
        intensity: pts.iter().map(|p| p.1).collect(),
    })
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
}
