//! The error type of the library and how it maps onto exit codes.
//!
//! Exit codes (DESIGN.md): 0 success, 1 the computation failed, 2 bad input.

use std::path::PathBuf;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// Something the user gave us is wrong. `line` is 1-based when known.
    #[error("{}", fmt_input(.file, .line, .message))]
    Input {
        file: Option<PathBuf>,
        line: Option<usize>,
        message: String,
    },
    /// The job does not fit the machine (memory estimate over budget, …): exit 2 as the user
    /// must change the request.
    #[error("{0}")]
    TooLarge(String),
    /// The computation ran but failed (SCF did not converge, hole collapsed, …).
    #[error("{0}")]
    Computation(String),
}

fn fmt_input(file: &Option<PathBuf>, line: &Option<usize>, message: &str) -> String {
    match (file, line) {
        (Some(f), Some(l)) => format!("{}:{}: {}", f.display(), l, message),
        (Some(f), None) => format!("{}: {}", f.display(), message),
        (None, _) => message.to_string(),
    }
}

impl Error {
    pub fn input(message: impl Into<String>) -> Self {
        Error::Input {
            file: None,
            line: None,
            message: message.into(),
        }
    }
    pub fn input_at(
        file: impl Into<PathBuf>,
        line: Option<usize>,
        message: impl Into<String>,
    ) -> Self {
        Error::Input {
            file: Some(file.into()),
            line,
            message: message.into(),
        }
    }
    pub fn computation(message: impl Into<String>) -> Self {
        Error::Computation(message.into())
    }
    /// Stable one-word kind for machine-readable failures: "input", "too_large", "computation".
    pub fn kind(&self) -> &'static str {
        match self {
            Error::Input { .. } => "input",
            Error::TooLarge(_) => "too_large",
            Error::Computation(_) => "computation",
        }
    }
    /// The file an input error is about, when known.
    pub fn file(&self) -> Option<&std::path::Path> {
        match self {
            Error::Input { file, .. } => file.as_deref(),
            _ => None,
        }
    }
    /// The 1-based line an input error is about, when known.
    pub fn line(&self) -> Option<usize> {
        match self {
            Error::Input { line, .. } => *line,
            _ => None,
        }
    }
    /// The failure as one JSON object (`error`, `kind`, `file`, `line`, `exit_code`), for
    /// pipelines that read stdout of a `--json` run.
    pub fn to_json(&self) -> serde_json::Value {
        serde_json::json!({
            "error": self.to_string(),
            "kind": self.kind(),
            "file": self.file().map(|f| f.display().to_string()),
            "line": self.line(),
            "exit_code": self.exit_code(),
        })
    }
    /// Process exit code for this error.
    pub fn exit_code(&self) -> i32 {
        match self {
            Error::Input { .. } | Error::TooLarge(_) => 2,
            Error::Computation(_) => 1,
        }
    }
}

pub type Result<T> = std::result::Result<T, Error>;
