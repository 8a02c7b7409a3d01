//! Mixture inputs: `FILE.xyz:WEIGHT` names a geometry and its share of the sample.
//!
//! The weight is the text after the last ':' when that text is not part of an existing
//! file's name and holds no path separator; it must be a finite number ≥ 0 (it multiplies
//! every band intensity of that molecule, so it is a mole-fraction-like share: the
//! spectrum of a mixture is the weighted sum of its components' spectra, common practice).
//! Without a suffix the weight is 1.

use std::path::{Path, PathBuf};

use crate::error::{Error, Result};

#[derive(Debug, Clone, PartialEq)]
pub struct MixtureInput {
    pub path: PathBuf,
    pub weight: f64,
}

/// Parse one command-line input.
pub fn parse_input(arg: &str) -> Result<MixtureInput> {
    if Path::new(arg).is_file() {
        return Ok(MixtureInput {
            path: PathBuf::from(arg),
            weight: 1.0,
        });
    }
    if let Some((file, w)) = arg.rsplit_once(':') {
        if !w.contains('/') && !w.contains('\\') {
            if file.is_empty() {
                return Err(Error::input(format!(
                    "'{arg}': no file before the ':{w}' weight"
                )));
            }
            let weight: f64 = w.trim().parse().map_err(|_| {
                Error::input(format!(
                    "'{arg}': the weight after ':' must be a number ≥ 0, found '{w}'"
                ))
            })?;
            if !weight.is_finite() || weight < 0.0 {
                return Err(Error::input(format!(
                    "'{arg}': the weight after ':' must be a finite number ≥ 0, found '{w}'"
                )));
            }
            return Ok(MixtureInput {
                path: PathBuf::from(file),
                weight,
            });
        }
    }
    Ok(MixtureInput {
        path: PathBuf::from(arg),
        weight: 1.0,
    })
}

/// Parse all inputs; at least one weight must be positive.
pub fn parse_inputs(args: &[String]) -> Result<Vec<MixtureInput>> {
    let v: Vec<MixtureInput> = args.iter().map(|a| parse_input(a)).collect::<Result<_>>()?;
    if !v.iter().any(|m| m.weight > 0.0) {
        return Err(Error::input(
            "every mixture weight is zero: nothing to plot",
        ));
    }
    Ok(v)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn weights() {
        assert_eq!(parse_input("a.xyz:0.3").unwrap().weight, 0.3);
        assert_eq!(
            parse_input("a.xyz:0.3").unwrap().path,
            PathBuf::from("a.xyz")
        );
        assert_eq!(parse_input("dir/a.xyz").unwrap().weight, 1.0);
        assert_eq!(parse_input("a.xyz:2e-1").unwrap().weight, 0.2);
        for bad in [
            "a.xyz:",
            "a.xyz:x",
            "a.xyz:-1",
            "a.xyz:nan",
            "a.xyz:inf",
            ":0.5",
        ] {
            let e = parse_input(bad).unwrap_err();
            assert_eq!(e.exit_code(), 2, "{bad}");
        }
        // a ':' inside a directory name is not a weight
        assert_eq!(parse_input("run:1/a.xyz").unwrap().weight, 1.0);
        assert!(parse_inputs(&["a.xyz:0".into()]).is_err());
    }
}
