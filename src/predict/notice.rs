//! Notes and warnings of a prediction as typed values: a stable `code` for programs and a
//! `message` for people. None of them names a command-line option.

use std::fmt;

use serde::ser::SerializeStruct;
use serde::{Serialize, Serializer};

#[derive(Debug, Clone, PartialEq)]
pub enum Notice {
    /// The default rule chose the method (`rule`: the rule in words).
    DefaultMethodChosen {
        method: String,
        n_basis: usize,
        rule: String,
    },
    /// A note of the method that ran (how the job was run), in its own words.
    MethodNote(String),
    /// A warning of the method that ran (something to look at), in its own words.
    MethodWarning(String),
}

impl Notice {
    /// Stable identifier for programs reading the JSON.
    pub fn code(&self) -> &'static str {
        match self {
            Notice::DefaultMethodChosen { .. } => "default_method_chosen",
            Notice::MethodNote(_) => "method_note",
            Notice::MethodWarning(_) => "method_warning",
        }
    }
}

impl fmt::Display for Notice {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Notice::DefaultMethodChosen {
                method,
                n_basis,
                rule,
            } => write!(f, "{rule} — chose {method} for {n_basis} basis functions"),
            Notice::MethodNote(m) | Notice::MethodWarning(m) => f.write_str(m),
        }
    }
}

impl Serialize for Notice {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut st = s.serialize_struct("Notice", 2)?;
        st.serialize_field("code", self.code())?;
        st.serialize_field("message", &self.to_string())?;
        st.end()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn serialises_code_and_message() {
        let n = Notice::MethodWarning("root 3 did not converge".into());
        let v = serde_json::to_value(&n).unwrap();
        assert_eq!(v["code"], "method_warning");
        assert_eq!(v["message"], "root 3 did not converge");
    }
}
