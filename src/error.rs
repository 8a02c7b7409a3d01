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
    /// Process exit code for this error.
    pub fn exit_code(&self) -> i32 {
        match self {
            Error::Input { .. } | Error::TooLarge(_) => 2,
            Error::Computation(_) => 1,
        }
    }
}

pub type Result<T> = std::result::Result<T, Error>;
