//! The valence ionization methods bandcast knows, their names on the command line and in
//! JSON, and how far each is typically off (used to flag bands whose order is uncertain).

use serde::Serialize;

use crate::error::{Error, Result};

/// A valence ionization method. New methods get a variant here, a name, a typical error and
/// one arm in `valence::predict` (DEVELOPERS.md, "Ionization methods").
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub enum Method {
    /// −ε of the canonical Hartree–Fock orbitals.
    Koopmans,
    /// E(cation) − E(neutral), cation UHF kept on the hole by the maximum overlap method.
    Dscf,
    /// Second-order electron propagator, diagonal self-energy.
    Ep2,
    /// Equation-of-motion coupled cluster (IP-EOM-CCSD).
    EomCcsd,
    /// IP-EOM with MP2 ground-state amplitudes.
    EomMp2,
    /// E_CCSD(T)(cation held by MOM) − E_CCSD(T)(neutral).
    DccsdT,
}

impl Method {
    pub const ALL: [Method; 6] = [
        Method::Koopmans,
        Method::Dscf,
        Method::Ep2,
        Method::EomCcsd,
        Method::EomMp2,
        Method::DccsdT,
    ];

    /// Name used on the command line, in JSON and in `Band::method`.
    pub fn name(self) -> &'static str {
        match self {
            Method::Koopmans => "koopmans",
            Method::Dscf => "dscf",
            Method::Ep2 => "ep2",
            Method::EomCcsd => "eom-ccsd",
            Method::EomMp2 => "eom-mp2",
            Method::DccsdT => "dccsd-t",
        }
    }

    pub fn parse(s: &str) -> Result<Method> {
        let t = s.trim().to_ascii_lowercase();
        Method::ALL
            .into_iter()
            .find(|m| m.name() == t)
            .ok_or_else(|| {
                let names: Vec<&str> = Method::ALL.iter().map(|m| m.name()).collect();
                Error::input(format!(
                    "unknown ionization method '{s}' (choose one of: {})",
                    names.join(", ")
                ))
            })
    }

    /// Typical absolute error of a valence IE from this method, eV. Two bands closer than
    /// this may come out in the wrong order.
    ///
    /// - Koopmans: 0.68 eV, mean absolute error of −ε(HOMO) at HF on the GW100 set (from
    ///   memory); individual bands, lone pairs above all, can be off by 2 eV (F2).
    /// - ΔSCF (Hartree–Fock): 1.0 eV. 0.3–0.5 eV is often quoted for valence ΔSCF (from
    ///   memory), but with HF energies the missing correlation makes IEs low: against
    ///   ΔCCSD(T)/def2-TZVPP this code gives −1.6 eV (water), −0.9 (methane), −0.2 (N2).
    /// - EP2: 0.5 eV for outer-valence IEs (from memory; lone pairs ~1 eV low in triple-zeta).
    /// - EOM-IP-CCSD: 0.1 eV (from memory).
    /// - EOM-IP-MP2: 0.3 eV (from memory, rough).
    /// - ΔCCSD(T): 0.1 eV against experiment for outer-valence IEs in a triple-zeta basis
    ///   (from memory; it is the definition of the GW100 reference values).
    pub fn typical_error_ev(self) -> f64 {
        match self {
            Method::Koopmans => 0.68,
            Method::Dscf => 1.0,
            Method::Ep2 => 0.5,
            Method::EomCcsd => 0.1,
            Method::EomMp2 => 0.3,
            Method::DccsdT => 0.1,
        }
    }
}

impl std::fmt::Display for Method {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip_and_unknown_is_input_error() {
        for m in Method::ALL {
            assert_eq!(Method::parse(m.name()).unwrap(), m);
        }
        assert_eq!(Method::parse("EP2").unwrap(), Method::Ep2);
        assert!(matches!(Method::parse("mp3"), Err(Error::Input { .. })));
        // the ladder of typical errors: better methods are trusted more
        assert!(Method::EomCcsd.typical_error_ev() < Method::Dscf.typical_error_ev());
        assert!(Method::Ep2.typical_error_ev() < Method::Koopmans.typical_error_ev());
    }
}
