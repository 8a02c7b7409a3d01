//! One table from a batch folder: a row per band (ionize, spectrum) or core level (core),
//! and a row per failed molecule, in manifest order.

use serde::Serialize;
use serde_json::Value;

use crate::batch::record::{Record, Status};

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Row {
    pub molecule: String,
    /// Band or level label (`1b1`, `C2 1s`); empty for a failed molecule.
    pub label: String,
    /// Ionization or binding energy in eV; None for a failed molecule.
    pub energy_ev: Option<f64>,
    pub method: String,
    /// The molecule's warnings and, for a failure, its error.
    pub warnings: Vec<String>,
}

fn text(v: Option<&Value>) -> String {
    v.and_then(Value::as_str).unwrap_or("").to_string()
}

fn strings(v: Option<&Value>) -> Vec<String> {
    v.and_then(Value::as_array)
        .map(|a| {
            a.iter()
                .map(|w| match w {
                    Value::String(s) => s.clone(),
                    // typed warnings: {code, message}
                    other => other
                        .get("message")
                        .and_then(Value::as_str)
                        .map(str::to_string)
                        .unwrap_or_else(|| other.to_string()),
                })
                .collect()
        })
        .unwrap_or_default()
}

/// The first of `keys` that holds a number.
fn number(v: &Value, keys: &[&str]) -> Option<f64> {
    keys.iter().find_map(|k| v.get(*k).and_then(Value::as_f64))
}

/// Rows of one record.
pub fn rows_of(r: &Record) -> Vec<Row> {
    let failed = |msg: String| Row {
        molecule: r.molecule.clone(),
        label: String::new(),
        energy_ev: None,
        method: String::new(),
        warnings: vec![msg],
    };
    let result = match (&r.status, &r.result) {
        (Status::Ok, Some(v)) => v,
        _ => {
            return vec![failed(format!(
                "failed: {}",
                r.error.clone().unwrap_or_default()
            ))]
        }
    };
    let top_method = text(result.get("method"));
    let warnings = strings(result.get("warnings"));
    let mut rows = Vec::new();
    if let Some(levels) = result.get("core_levels").and_then(Value::as_array) {
        for l in levels {
            // the recommended value where the output names one, else the most correlated
            let energy = number(l, &["binding_ev", "dmp2_ev", "dscf_ev"]);
            let method = if !text(l.get("method")).is_empty() {
                text(l.get("method"))
            } else if l.get("binding_ev").and_then(Value::as_f64).is_none()
                && l.get("dmp2_ev").and_then(Value::as_f64).is_some()
            {
                "dmp2".to_string()
            } else {
                "dscf".to_string()
            };
            let mut w = warnings.clone();
            w.extend(strings(l.get("warnings")));
            rows.push(Row {
                molecule: r.molecule.clone(),
                label: text(l.get("label")),
                energy_ev: energy,
                method,
                warnings: w,
            });
        }
    } else if let Some(bands) = result.get("bands").and_then(Value::as_array) {
        for b in bands {
            let method = if text(b.get("method")).is_empty() {
                top_method.clone()
            } else {
                text(b.get("method"))
            };
            let mut w = warnings.clone();
            w.extend(strings(b.get("warnings")));
            rows.push(Row {
                molecule: r.molecule.clone(),
                label: text(b.get("label")),
                energy_ev: number(b, &["ie_ev", "binding_ev", "energy_ev"]),
                method,
                warnings: w,
            });
        }
    }
    if rows.is_empty() {
        rows.push(Row {
            molecule: r.molecule.clone(),
            label: String::new(),
            energy_ev: None,
            method: top_method,
            warnings: {
                let mut w = warnings;
                w.push("no band or level in the result".into());
                w
            },
        });
    }
    rows
}

/// Rows of all records, in manifest order (then by structure, for records of one line).
pub fn merge_records(mut records: Vec<Record>) -> Vec<Row> {
    records.sort_by(|a, b| {
        a.manifest_line
            .cmp(&b.manifest_line)
            .then_with(|| a.structure.cmp(&b.structure))
    });
    records.iter().flat_map(rows_of).collect()
}

/// The rows as CSV (RFC 4180 quoting): molecule,label,energy_ev,method,warnings (warnings
/// joined by "; ").
pub fn to_csv(rows: &[Row]) -> String {
    fn q(s: &str) -> String {
        if s.contains([',', '"', '\n', '\r']) {
            format!("\"{}\"", s.replace('"', "\"\""))
        } else {
            s.to_string()
        }
    }
    let mut out = String::from("molecule,label,energy_ev,method,warnings\n");
    for r in rows {
        out.push_str(&format!(
            "{},{},{},{},{}\n",
            q(&r.molecule),
            q(&r.label),
            r.energy_ev.map(|e| format!("{e:.4}")).unwrap_or_default(),
            q(&r.method),
            q(&r.warnings.join("; "))
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn record(result: Value) -> Record {
        Record {
            molecule: "m".into(),
            structure: "m.xyz".into(),
            manifest_line: 1,
            command: "ionize".into(),
            arguments: vec![],
            status: Status::Ok,
            exit_code: Some(0),
            result: Some(result),
            error: None,
            wall_seconds: 0.0,
        }
    }

    #[test]
    fn bands_and_levels_become_rows() {
        let ion = record(
            serde_json::json!({"method": "ep2", "warnings": ["w"], "bands": [{"label": "1b1", "ie_ev": 11.0}, {"label": "3a1", "ie_ev": 13.2}]}),
        );
        let rows = rows_of(&ion);
        assert_eq!(rows.len(), 2);
        assert_eq!(
            (
                rows[0].label.as_str(),
                rows[0].energy_ev,
                rows[0].method.as_str()
            ),
            ("1b1", Some(11.0), "ep2")
        );
        assert_eq!(rows[1].warnings, vec!["w".to_string()]);
        let core = record(
            serde_json::json!({"core_levels": [{"label": "O1 1s", "dscf_ev": 539.1, "dmp2_ev": null}]}),
        );
        let rows = rows_of(&core);
        assert_eq!(
            (rows[0].energy_ev, rows[0].method.as_str()),
            (Some(539.1), "dscf")
        );
        let csv = to_csv(&rows);
        assert_eq!(
            csv,
            "molecule,label,energy_ev,method,warnings\nm,O1 1s,539.1000,dscf,\n"
        );
    }
}
