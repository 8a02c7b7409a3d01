//! One stage's memory estimate, made from the molecule and basis before any work: what the
//! stage is, its peak in bytes, and whether it is needed or only used when it fits (an
//! optional store). Printed with `--verbose` in GiB by every computing command.

/// The peak memory of one stage of a job, estimated before any integral is computed.
#[derive(Debug, Clone, PartialEq)]
pub struct StageEstimate {
    /// What the stage holds, in words a user reads ("SCF matrices (direct Fock build)").
    pub stage: String,
    /// Estimated peak (bytes).
    pub bytes: f64,
    /// An optional store: used only when it fits the budget, otherwise the stage recomputes.
    pub optional: bool,
}

impl StageEstimate {
    pub fn needed(stage: impl Into<String>, bytes: f64) -> Self {
        StageEstimate {
            stage: stage.into(),
            bytes,
            optional: false,
        }
    }

    pub fn optional(stage: impl Into<String>, bytes: f64) -> Self {
        StageEstimate {
            stage: stage.into(),
            bytes,
            optional: true,
        }
    }
}

impl std::fmt::Display for StageEstimate {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "{}: {}{}",
            self.stage,
            super::format_gib(self.bytes),
            if self.optional {
                " (optional: used only when it fits the budget)"
            } else {
                ""
            }
        )
    }
}
