//! The record a batch writes for each molecule: what was run, whether it succeeded, and the
//! command's own JSON result (or its error). One file per molecule, written whole or not at
//! all, so a killed job leaves either a finished record or none.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Status {
    Ok,
    Failed,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Record {
    /// The molecule's name (record title or file stem).
    pub molecule: String,
    /// The structure as given to the command (`FILE` or `FILE#K`).
    pub structure: String,
    /// 1-based manifest line.
    pub manifest_line: usize,
    /// `ionize`, `core` or `spectrum`.
    pub command: String,
    /// The command's arguments after its name, as run (without `--json`).
    pub arguments: Vec<String>,
    pub status: Status,
    /// The command's exit code (0 on success, 1 computation failed, 2 bad input, other: the
    /// process was killed or crashed).
    pub exit_code: Option<i32>,
    /// The command's JSON output on success.
    pub result: Option<serde_json::Value>,
    /// The error message on failure (the command's own words).
    pub error: Option<String>,
    pub wall_seconds: f64,
}
