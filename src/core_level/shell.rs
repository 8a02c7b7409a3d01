//! Which core shell of an atom is ionised: 1s, 2s or 2p, chosen by the user or by the photon
//! energy ("auto").
//!
//! Auto rule: the deepest shell whose tabulated free-atom binding energy lies at or below the
//! photon energy (Al Kα, 1486.6 eV, when no source is given); of the n = 2 shells the 2p is
//! taken (the strong line measured in XPS; the 2s is computed when asked for). When no core
//! shell is reached, the shallowest core shell is computed so that the report can say where
//! it lies and which sources reach it.
//!
//! Binding energies (eV) for the choice and for the messages: free-atom/element values of
//! the X-ray Data Booklet (LBNL, 2009), Table 1-1 (J. A. Bearden & A. F. Burr, Rev. Mod.
//! Phys. 39 (1967) 125, and later compilations), **from memory**, ±1 eV; they only decide
//! which shell is in reach, never a printed prediction.

use serde::Serialize;

use crate::chem::elements::symbol;
use crate::error::{Error, Result};

/// A core shell.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
pub enum CoreShell {
    #[serde(rename = "1s")]
    S1,
    #[serde(rename = "2s")]
    S2,
    #[serde(rename = "2p")]
    P2,
}

impl CoreShell {
    pub fn name(self) -> &'static str {
        match self {
            CoreShell::S1 => "1s",
            CoreShell::S2 => "2s",
            CoreShell::P2 => "2p",
        }
    }
    /// Angular momentum.
    pub fn l(self) -> usize {
        match self {
            CoreShell::S1 | CoreShell::S2 => 0,
            CoreShell::P2 => 1,
        }
    }
    pub fn parse(s: &str) -> Option<CoreShell> {
        match s.trim().to_ascii_lowercase().as_str() {
            "1s" => Some(CoreShell::S1),
            "2s" => Some(CoreShell::S2),
            "2p" => Some(CoreShell::P2),
            _ => None,
        }
    }
}

/// Al Kα (eV): the auto limit when no photon source is given (Bearden 1967, as in
/// `spectrum::photon`).
pub const DEFAULT_LIMIT_EV: f64 = 1486.6;

/// The shell asked for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum ShellChoice {
    /// The deepest shell at or below the photon energy, see the module text.
    #[default]
    Auto,
    Fixed(CoreShell),
}

impl ShellChoice {
    /// Parse 1s | 2s | 2p | auto.
    pub fn parse(s: &str) -> Option<ShellChoice> {
        if s.trim().eq_ignore_ascii_case("auto") {
            return Some(ShellChoice::Auto);
        }
        CoreShell::parse(s).map(ShellChoice::Fixed)
    }
}

/// Free-atom binding energies (eV): 1s, 2s, 2p1/2, 2p3/2 (X-ray Data Booklet Table 1-1,
/// from memory; see the module text). Li–Ne have only the 1s as a core shell.
pub fn atomic_binding_ev(z: u32) -> Option<[Option<f64>; 4]> {
    let one = |e: f64| Some([Some(e), None, None, None]);
    let two = |k: f64, s: f64, p1: f64, p3: f64| Some([Some(k), Some(s), Some(p1), Some(p3)]);
    match z {
        3 => one(54.7),
        4 => one(111.5),
        5 => one(188.0),
        6 => one(284.2),
        7 => one(409.9),
        8 => one(543.1),
        9 => one(696.7),
        10 => one(870.2),
        11 => two(1070.8, 63.5, 30.65, 30.81),
        12 => two(1303.0, 88.7, 49.78, 49.50),
        13 => two(1559.6, 117.8, 72.95, 72.55),
        14 => two(1839.0, 149.7, 99.82, 99.42),
        15 => two(2145.5, 189.0, 136.0, 135.0),
        16 => two(2472.0, 230.9, 163.6, 162.5),
        17 => two(2822.4, 270.0, 202.0, 200.0),
        18 => two(3205.9, 326.3, 250.6, 248.4),
        _ => None,
    }
}

/// Tabulated binding energy (eV) of a shell of element `z` (2p: the 2p3/2 value).
pub fn shell_binding_ev(z: u32, shell: CoreShell) -> Option<f64> {
    let t = atomic_binding_ev(z)?;
    match shell {
        CoreShell::S1 => t[0],
        CoreShell::S2 => t[1],
        CoreShell::P2 => t[3],
    }
}

/// Whether element `z` has `shell` as a core shell (bandcast covers 1s for Li–Ar and 2s, 2p
/// for Na–Ar).
pub fn has_core_shell(z: u32, shell: CoreShell) -> bool {
    shell_binding_ev(z, shell).is_some()
}

/// The shell computed for element `z` under `choice` with photons of `photon_ev` (None: Al
/// Kα), or an input error naming the element.
pub fn shell_for(z: u32, choice: ShellChoice, photon_ev: Option<f64>) -> Result<CoreShell> {
    let limit_ev = photon_ev.unwrap_or(DEFAULT_LIMIT_EV);
    match choice {
        ShellChoice::Fixed(s) => {
            if has_core_shell(z, s) {
                Ok(s)
            } else {
                Err(Error::input(format!(
                    "{} has no {} core level that can be computed here (2s and 2p: Na–Ar; \
                     1s: Li–Ar)",
                    symbol(z),
                    s.name()
                )))
            }
        }
        ShellChoice::Auto => {
            let reach = |s| shell_binding_ev(z, s).is_some_and(|e| e <= limit_ev);
            if reach(CoreShell::S1) {
                Ok(CoreShell::S1)
            } else if has_core_shell(z, CoreShell::P2) {
                Ok(CoreShell::P2)
            } else {
                Ok(CoreShell::S1)
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn auto_takes_the_deepest_reachable_shell() {
        let al_ka = |z| shell_for(z, ShellChoice::Auto, None);
        // Al Kα reaches the 1s of C–Ne and of Na, Mg (1071, 1303 eV) but not of Al–Ar
        // (X-ray Data Booklet, from memory): those get their 2p.
        assert_eq!(al_ka(6).unwrap(), CoreShell::S1);
        assert_eq!(al_ka(12).unwrap(), CoreShell::S1);
        assert_eq!(al_ka(13).unwrap(), CoreShell::P2);
        assert_eq!(al_ka(16).unwrap(), CoreShell::P2);
        let mg_ka = |z| shell_for(z, ShellChoice::Auto, Some(1253.6));
        assert_eq!(mg_ka(12).unwrap(), CoreShell::P2);
        assert_eq!(mg_ka(11).unwrap(), CoreShell::S1);
        // He II reaches nothing of carbon: the 1s is still computed (and reported as out of reach).
        assert_eq!(
            shell_for(6, ShellChoice::Auto, Some(40.814)).unwrap(),
            CoreShell::S1
        );
    }

    #[test]
    fn fixed_shells_need_the_shell() {
        assert_eq!(
            shell_for(16, ShellChoice::Fixed(CoreShell::S2), None).unwrap(),
            CoreShell::S2
        );
        let e = shell_for(8, ShellChoice::Fixed(CoreShell::P2), None).unwrap_err();
        assert_eq!(e.exit_code(), 2);
        assert!(e.to_string().contains("O has no 2p"), "{e}");
    }
}

/// The photon sources of `spectrum::photon` (name, energy in eV; Bearden 1967 / NIST, as
/// there) that reach a level of binding energy `be_ev`.
pub fn sources_reaching(be_ev: f64) -> Vec<String> {
    [
        ("He I", 21.218),
        ("He II", 40.814),
        ("Mg Kα", 1253.6),
        ("Al Kα", 1486.6),
    ]
    .iter()
    .filter(|(_, e)| be_ev < *e)
    .map(|(n, _)| n.to_string())
    .collect()
}
