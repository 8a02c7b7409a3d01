//! Element symbols H–Kr and their atomic numbers.

pub const SYMBOLS: [&str; 36] = [
    "H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne", "Na", "Mg", "Al", "Si", "P", "S", "Cl",
    "Ar", "K", "Ca", "Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn", "Ga", "Ge", "As",
    "Se", "Br", "Kr",
];

/// Largest atomic number bandcast reads.
pub const MAX_Z: u32 = 36;

/// Symbol of element Z (1-based), e.g. 8 → "O".
pub fn symbol(z: u32) -> &'static str {
    SYMBOLS[(z - 1) as usize]
}

/// Atomic number from a symbol in any case ("o", "CL") or from a number ("8").
pub fn parse_element(token: &str) -> Option<u32> {
    if let Ok(z) = token.parse::<u32>() {
        return (1..=MAX_Z).contains(&z).then_some(z);
    }
    let t = token.trim();
    SYMBOLS
        .iter()
        .position(|s| s.eq_ignore_ascii_case(t))
        .map(|i| i as u32 + 1)
}

#[cfg(test)]
mod tests {
    use super::*;
    #[test]
    fn symbols_and_numbers() {
        assert_eq!(parse_element("o"), Some(8));
        assert_eq!(parse_element("CL"), Some(17));
        assert_eq!(parse_element("36"), Some(36));
        assert_eq!(parse_element("37"), None);
        assert_eq!(parse_element("Xx"), None);
        assert_eq!(symbol(18), "Ar");
    }
}
