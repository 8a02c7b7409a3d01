//! The computed central-field cross sections the program uses, precomputed (the solver
//! takes about a second for all atoms; the table keeps start-up free of it) and checked by
//! a regeneration test that recomputes every entry and compares.
//!
//! Values: Hartree–Fock–Slater central field (`atom`, `photo`), Mb for the whole subshell of
//! the free-atom ground configuration, at the photon energies `ENERGIES_EV`; None where the
//! photon does not reach the level in the field (photon energy below |ε_nl|).

use super::atom;
use super::photo::{cross_section_mb, Field};

/// Photon energies of the columns (eV): He I, He II, Mg Kα, Al Kα.
pub const ENERGIES_EV: [f64; 4] = [21.2, 40.8, 1253.6, 1486.6];

/// Subshells computed: the 1s/2s/2p rows of `spectrum::cross_section` (C–F, Na–Ar).
pub const SUBSHELLS: &[(u32, u32, u32)] = &[
    (6, 1, 0),
    (6, 2, 0),
    (6, 2, 1),
    (7, 1, 0),
    (7, 2, 0),
    (7, 2, 1),
    (8, 1, 0),
    (8, 2, 0),
    (8, 2, 1),
    (9, 1, 0),
    (9, 2, 0),
    (9, 2, 1),
    (11, 1, 0),
    (11, 2, 0),
    (11, 2, 1),
    (12, 1, 0),
    (12, 2, 0),
    (12, 2, 1),
    (13, 2, 0),
    (13, 2, 1),
    (14, 2, 0),
    (14, 2, 1),
    (15, 2, 0),
    (15, 2, 1),
    (16, 2, 0),
    (16, 2, 1),
    (17, 2, 0),
    (17, 2, 1),
    (18, 2, 0),
    (18, 2, 1),
];

/// One computed row: Z, n, l, binding energy in the field (eV), σ at `ENERGIES_EV` (Mb).
pub type Row = (u32, u32, u32, f64, [Option<f64>; 4]);

/// Compute every row of `SUBSHELLS` (one self-consistent field per element).
pub fn compute_all() -> Result<Vec<Row>, String> {
    let mut out = Vec::new();
    let mut zs: Vec<u32> = SUBSHELLS.iter().map(|s| s.0).collect();
    zs.dedup();
    for z in zs {
        let a = atom::solve(z)?;
        let rv = |r: f64| a.rv_at(r);
        let field = Field {
            z: z as f64,
            rv: &rv,
        };
        for &(zz, n, l) in SUBSHELLS.iter().filter(|s| s.0 == z) {
            let occ = a
                .orbitals
                .iter()
                .find(|((nn, ll, _), _)| *nn == n && *ll == l)
                .map(|((_, _, o), _)| *o)
                .ok_or_else(|| format!("Z = {z}: no {n}{l} subshell"))?;
            let mut sig = [None; 4];
            let mut be = 0.0;
            for (k, &hv) in ENERGIES_EV.iter().enumerate() {
                if let Some((s, b)) = cross_section_mb(&field, n, l, occ, hv) {
                    sig[k] = Some(s);
                    be = b;
                }
            }
            if be == 0.0 {
                let e = a
                    .orbitals
                    .iter()
                    .find(|((nn, ll, _), _)| *nn == n && *ll == l)
                    .unwrap()
                    .1
                    .energy;
                be = -e * crate::units::HARTREE_TO_EV;
            }
            out.push((zz, n, l, be, sig));
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    #[ignore = "prints the table"]
    fn print_table() {
        for (z, n, l, be, s) in compute_all().unwrap() {
            let f = |x: Option<f64>| x.map_or("None".to_string(), |v| format!("Some({v:.4e})"));
            println!(
                "({z}, {n}, {l}, {be:.2}, [{}, {}, {}, {}]),",
                f(s[0]),
                f(s[1]),
                f(s[2]),
                f(s[3])
            );
        }
    }
}
