//! Atomic subshell photoionisation cross sections and the Gelius intensity model.
//!
//! Gelius model (U. Gelius, in *Electron Spectroscopy*, ed. D. A. Shirley, North-Holland
//! 1972, p. 311; also J. Electron Spectrosc. Relat. Phenom. 5 (1974) 985): the intensity of
//! a band is the sum over atoms A and subshells λ of the band orbital's Mulliken gross
//! population fraction P_{Aλ} times the atomic cross section of that subshell,
//!
//!   I = n_occ · g · Σ_{A,λ} P_{Aλ} σ_{Aλ} / N_{Aλ},
//!
//! with σ_{Aλ}/N_{Aλ} the subshell cross section per electron (N the subshell's occupancy in
//! the free atom), n_occ the electrons per orbital and g the degeneracy.
//!
//! ## Provenance of every number (cross sections in Mb = 1e-18 cm², whole subshell)
//!
//! Source of the atomic values: J.-J. Yeh & I. Lindau, "Atomic subshell photoionization cross
//! sections and asymmetry parameters: 1 ≤ Z ≤ 103", At. Data Nucl. Data Tables 32 (1985) 1
//! (Hartree–Fock–Slater).
//! - 1486.6 eV (Al Kα): Yeh & Lindau (1985) values as reproduced in the data file of an
//!   open-source general-purpose materials library (read for this project; the published
//!   table's numbers, not re-read from the paper itself).
//! - 1253.6 eV (Mg Kα): the 1486.6 eV table value times the ratio σ(1253.6)/σ(1486.6)
//!   computed by the project in the Hartree–Fock–Slater central field, the model of the
//!   Yeh & Lindau tables (`spectrum::central_field`; Herman–Skillman potential with Latter's
//!   tail, dipole-length matrix elements, Manson & Cooper, Phys. Rev. 165 (1968) 126). The
//!   tabulated Al Kα value stays the anchor; the ratio carries it to Mg Kα. The solver
//!   reproduces the Al Kα column itself within 10 % for every row but C 2p and N 2p
//!   (docs/spectrum-and-assign.md has the table) and the exact hydrogen 1s cross section
//!   within 2e-4, so the anchored value is not flagged approximate (C 2p and N 2p are).
//!   Yeh & Lindau's own 1253.6 eV column was not found in
//!   any source reachable for this project (a digitised copy exists: Kalha et al., figshare
//!   2020). A level the photon does not reach in the field (Mg 1s, 1292 eV there, 1303 eV
//!   measured) has no value at Mg Kα.
//! - 40.8 eV (He II), Na 2p: computed directly in the central field (no table to anchor it),
//!   4.3 Mb; the photoelectron leaves only about 4.5 eV above the field's threshold
//!   (36.3 eV), where the central-field model is least reliable: flagged approximate.
//! - 21.2 eV (He I) and 40.8 eV (He II): typed **from memory** of the Yeh & Lindau tables,
//!   not re-read; trust them to perhaps ±30 %. Each is marked in the table below.
//! - H 1s at every energy: the exact non-relativistic dipole cross section of the hydrogen
//!   atom (Stobbe 1930; Bethe & Salpeter 1957 eq. 71.5),
//!   σ = (2⁹π²/3) α a₀² (I/hν)⁴ exp(−4η arccot η)/(1 − exp(−2πη)), η = √(I/(hν − I)),
//!   I = 13.6057 eV (the hydrogen ionization energy, 0.5 Eh · (1 − m_e/m_p) ≈ 13.598 eV; we
//!   use the infinite-mass 13.6057 eV, common practice). At threshold this is 6.30 Mb.
//!
//! Other photon energies are interpolated log–log between the tabulated energies (an
//! estimate; flagged in the output). Outside 21.2–1486.6 eV there are no values.

use super::central_field;
use crate::ionization::{Band, Region};
use crate::units::{BOHR_TO_ANGSTROM, FINE_STRUCTURE, HARTREE_TO_EV};

/// Where a cross section came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Provenance {
    /// Yeh & Lindau (1985), from a reproduction of the published table.
    YehLindau,
    /// Yeh & Lindau (1985), typed from memory.
    YehLindauFromMemory,
    /// The 1486.6 eV table value times the central-field ratio σ(E)/σ(1486.6 eV)
    /// (`spectrum::central_field`).
    CentralFieldScaled,
    /// As `CentralFieldScaled`, for a row whose 1486.6 eV value the solver does not
    /// reproduce within `CENTRAL_FIELD_AGREEMENT` (C 2p, N 2p): flagged approximate.
    CentralFieldScaledLoose,
    /// Computed directly in the central field (no tabulated anchor).
    CentralField,
    /// Exact hydrogen-atom formula.
    HydrogenExact,
    /// Log–log interpolation between tabulated energies.
    Interpolated,
}

/// Tabulated photon energies (eV).
const E_HE1: f64 = 21.2;
const E_HE2: f64 = 40.8;
const E_MGKA: f64 = 1253.6;
const E_ALKA: f64 = 1486.6;

/// (Z, n, l, electrons in the free-atom subshell, σ at 21.2 eV [memory], σ at 40.8 eV
/// [memory], σ at 1486.6 eV [Yeh & Lindau, reproduced table]). `None`: not tabulated (a 1s core
/// level cannot be reached by He I/He II photons).
type Row = (u32, u32, u32, f64, Option<f64>, Option<f64>, f64);
const TABLE: &[Row] = &[
    // C 1s² 2s² 2p²
    (6, 1, 0, 2.0, None, None, 1.3e-2),
    (6, 2, 0, 2.0, Some(1.23), Some(1.01), 6.6e-4), // 21.2, 40.8: from memory
    (6, 2, 1, 2.0, Some(6.13), Some(1.93), 1.0e-5), // 21.2, 40.8: from memory
    // N 1s² 2s² 2p³
    (7, 1, 0, 2.0, None, None, 2.4e-2),
    (7, 2, 0, 2.0, Some(1.38), Some(1.11), 1.1e-3), // 21.2, 40.8: from memory
    (7, 2, 1, 3.0, Some(9.6), Some(4.33), 7.2e-5),  // 21.2, 40.8: from memory
    // O 1s² 2s² 2p⁴
    (8, 1, 0, 2.0, None, None, 4.0e-2),
    (8, 2, 0, 2.0, Some(1.57), Some(1.21), 1.9e-3), // 21.2, 40.8: from memory
    (8, 2, 1, 4.0, Some(10.7), Some(6.82), 2.4e-4), // 21.2, 40.8: from memory
    // F 1s² 2s² 2p⁵
    (9, 1, 0, 2.0, None, None, 6.0e-2),
    (9, 2, 0, 2.0, Some(1.77), Some(1.32), 2.8e-3), // 21.2, 40.8: from memory
    (9, 2, 1, 5.0, Some(11.6), Some(8.6), 6.8e-4),  // 21.2, 40.8: from memory
    // Na–Ar core levels at 1486.6 eV: Yeh & Lindau (1985) values as reproduced in the same
    // open-source data file as the C–F rows (pymatgen, analysis/
    // atomic_subshell_photoionization_cross_sections.csv, "reparsed from the original
    // compilation"; read for this project, not re-read from the paper). They replace values
    // typed from memory that were 0–30 % off (Na 2p 1.7e-3 → 2.5e-3, Mg 2p 3.3e-3 → 4.6e-3).
    // Reach of the 2p/2s at the He lines (free-atom binding energies, core_level::shell):
    // He I (21.2 eV) reaches none; He II (40.8 eV) reaches only Na 2p (≈ 31 eV; Mg 2p ≈ 50 eV
    // and every 2s lie above). The Na 2p value at 40.8 eV is computed in the central field
    // (subshell_mb), there being no table value.
    (11, 1, 0, 2.0, None, None, 1.17e-1),
    (11, 2, 0, 2.0, None, None, 5.8e-3),
    (11, 2, 1, 6.0, None, None, 2.5e-3),
    (12, 1, 0, 2.0, None, None, 1.52e-1),
    (12, 2, 0, 2.0, None, None, 7.7e-3),
    (12, 2, 1, 6.0, None, None, 4.6e-3),
    (13, 2, 0, 2.0, None, None, 1.0e-2),
    (13, 2, 1, 6.0, None, None, 7.2e-3),
    (14, 2, 0, 2.0, None, None, 1.3e-2),
    (14, 2, 1, 6.0, None, None, 1.1e-2),
    (15, 2, 0, 2.0, None, None, 1.6e-2),
    (15, 2, 1, 6.0, None, None, 1.6e-2),
    (16, 2, 0, 2.0, None, None, 1.9e-2),
    (16, 2, 1, 6.0, None, None, 2.2e-2),
    (17, 2, 0, 2.0, None, None, 2.2e-2),
    (17, 2, 1, 6.0, None, None, 3.1e-2),
    (18, 2, 0, 2.0, None, None, 2.6e-2),
    (18, 2, 1, 6.0, None, None, 4.1e-2),
];

/// How closely (relative) the central-field solver must reproduce a row's tabulated 1486.6 eV
/// value for the ratio it carries to other energies to count as exact as the table: the
/// measured spread of the 1s, 2s and Na–Ar 2p rows is −1.8 % … +7.3 % (N 2s the largest),
/// O 2p +9.2 %, F 2p −4.8 %, so 10 %. C 2p (×2.13) and N 2p (×1.21), tiny valence values
/// at 1486.6 eV (1e-5 and 7e-5 Mb), fall outside; their carried values are flagged.
pub const CENTRAL_FIELD_AGREEMENT: f64 = 0.10;

/// Hydrogen ionization energy used in the exact formula (eV): 0.5 Eh.
const H_IONIZATION_EV: f64 = 0.5 * HARTREE_TO_EV;

/// Exact photoionisation cross section of the hydrogen 1s level (Mb) at photon energy
/// `hv_ev` (Bethe & Salpeter 1957 eq. 71.5). Zero below threshold.
pub fn hydrogen_1s_mb(hv_ev: f64) -> f64 {
    let i = H_IONIZATION_EV;
    if hv_ev <= i {
        return 0.0;
    }
    let a0_cm = BOHR_TO_ANGSTROM * 1e-8;
    let prefactor = 512.0 * std::f64::consts::PI.powi(2) / 3.0 * FINE_STRUCTURE * a0_cm * a0_cm;
    let eta = (i / (hv_ev - i)).sqrt();
    let arccot = (1.0 / eta).atan();
    let f = (-4.0 * eta * arccot).exp() / (1.0 - (-2.0 * std::f64::consts::PI * eta).exp());
    prefactor * (i / hv_ev).powi(4) * f / 1e-18
}

/// Cross section (Mb, whole subshell), the free-atom subshell occupancy, and provenance for
/// element `z`, subshell (n, l), photon energy `hv_ev`. None when not tabulated.
pub fn subshell_mb(z: u32, n: u32, l: u32, hv_ev: f64) -> Option<(f64, f64, Provenance)> {
    if z == 1 && n == 1 && l == 0 {
        return Some((hydrogen_1s_mb(hv_ev), 1.0, Provenance::HydrogenExact));
    }
    let row = TABLE.iter().find(|r| r.0 == z && r.1 == n && r.2 == l)?;
    let (_, _, _, occ, s_he1, s_he2, s_alka) = *row;
    let computed = central_field::table::lookup(z, n, l).map(|r| r.4);
    // (energy, value, provenance) points in increasing energy.
    let mut pts: Vec<(f64, f64, Provenance)> = Vec::new();
    if let Some(v) = s_he1 {
        pts.push((E_HE1, v, Provenance::YehLindauFromMemory));
    }
    match (s_he2, computed.and_then(|c| c[1])) {
        (Some(v), _) => pts.push((E_HE2, v, Provenance::YehLindauFromMemory)),
        (None, Some(v)) => pts.push((E_HE2, v, Provenance::CentralField)),
        (None, None) => {}
    }
    // Mg Kα: the Al Kα table value carried by the computed ratio; none when the photon
    // does not reach the level in the field.
    if let Some(c) = computed {
        if let (Some(mg), Some(al)) = (c[2], c[3]) {
            let prov = if (al / s_alka - 1.0).abs() <= CENTRAL_FIELD_AGREEMENT {
                Provenance::CentralFieldScaled
            } else {
                Provenance::CentralFieldScaledLoose
            };
            pts.push((E_MGKA, s_alka * mg / al, prov));
        }
    }
    pts.push((E_ALKA, s_alka, Provenance::YehLindau));
    // Exact hit (within the rounding of the nominal line energies).
    for &(e, v, p) in &pts {
        if (hv_ev - e).abs() < 0.05 {
            return Some((v, occ, p));
        }
    }
    for w in pts.windows(2) {
        let (e0, v0, _) = w[0];
        let (e1, v1, _) = w[1];
        if hv_ev > e0 && hv_ev < e1 {
            let t = (hv_ev / e0).ln() / (e1 / e0).ln();
            let v = (v0.ln() + t * (v1 / v0).ln()).exp();
            return Some((v, occ, Provenance::Interpolated));
        }
    }
    None
}

/// Gelius intensity of one band and the fraction of its make-up with no tabulated cross
/// section (that part contributes nothing).
#[derive(Debug, Clone, PartialEq)]
pub struct GeliusIntensity {
    pub intensity: f64,
    pub untabulated_fraction: f64,
    /// True when any value used was interpolated, scaled or typed from memory.
    pub approximate: bool,
}

/// Element symbol at the start of an atom label such as "O1" or "Cl12".
fn element_of(atom_label: &str) -> Option<u32> {
    let sym: String = atom_label
        .chars()
        .take_while(|c| c.is_ascii_alphabetic())
        .collect();
    crate::chem::elements::parse_element(&sym)
}

/// Angular momentum of a shell label such as "2p", "p", "3d".
fn l_of(shell: &str) -> Option<u32> {
    match shell.chars().rev().find(|c| c.is_ascii_alphabetic())? {
        's' | 'S' => Some(0),
        'p' | 'P' => Some(1),
        'd' | 'D' => Some(2),
        'f' | 'F' => Some(3),
        'g' | 'G' => Some(4),
        _ => None,
    }
}

/// Intensity of `band` at photon energy `hv_ev` by the Gelius model.
///
/// Shell labels are mapped by angular momentum and region: for valence bands every s- or
/// p-type share on C–F is counted as the atom's 2s or 2p (split-valence and polarisation
/// functions of the same l describe the same atomic subshell), on H as 1s; for core bands
/// s-type shares count as 1s. d and higher shares (polarisation) have no atomic counterpart
/// and count as untabulated. Negative Mulliken fractions are kept as they are.
pub fn gelius_intensity(band: &Band, hv_ev: f64) -> GeliusIntensity {
    let mut sum = 0.0;
    let mut untab = 0.0;
    let mut approximate = false;
    for m in &band.makeup {
        let (Some(z), Some(l)) = (element_of(&m.atom), l_of(&m.shell)) else {
            untab += m.fraction;
            continue;
        };
        let n = match (z, band.region, l) {
            (1 | 2, _, _) => 1,
            // core levels name their shell ("1s", "2p3/2"); an unnamed s share is a 1s
            (_, Region::Core, _) => m
                .shell
                .chars()
                .next()
                .and_then(|c| c.to_digit(10))
                .unwrap_or(if l == 0 { 1 } else { 2 }),
            // valence shares: the 2s/2p of Li–Ne; Na–Ar valence (3s, 3p) is not tabulated
            (3..=10, _, _) => 2,
            _ => 3,
        };
        match subshell_mb(z, n, l, hv_ev) {
            Some((sigma, occ, prov)) => {
                sum += m.fraction * sigma / occ;
                if !matches!(
                    prov,
                    Provenance::YehLindau
                        | Provenance::HydrogenExact
                        | Provenance::CentralFieldScaled
                ) {
                    approximate = true;
                }
            }
            None => untab += m.fraction,
        }
    }
    GeliusIntensity {
        intensity: band.default_intensity() * sum,
        untabulated_fraction: untab,
        approximate,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hydrogen_threshold() {
        // σ(1s) at threshold = 6.30e-18 cm² (Bethe & Salpeter 1957 §71; common practice).
        let s = hydrogen_1s_mb(H_IONIZATION_EV * (1.0 + 1e-9));
        assert!((s - 6.30).abs() < 0.01, "{s}");
        assert_eq!(hydrogen_1s_mb(10.0), 0.0);
    }

    #[test]
    fn table_lookup() {
        // Yeh & Lindau (1985), reproduced table: O 2p at 1486.6 eV = 2.4e-4 Mb.
        let (s, occ, p) = subshell_mb(8, 2, 1, 1486.6).unwrap();
        assert_eq!((s, occ, p), (2.4e-4, 4.0, Provenance::YehLindau));
        // Mg Kα scaling makes the cross section larger at the lower energy.
        assert!(subshell_mb(8, 2, 1, 1253.6).unwrap().0 > 2.4e-4);
        let (_, _, p) = subshell_mb(6, 2, 1, 100.0).unwrap();
        assert_eq!(p, Provenance::Interpolated);
        assert!(subshell_mb(6, 1, 0, 21.2).is_none());
        assert!(subshell_mb(6, 2, 1, 5000.0).is_none());
        // Na–Ar rows: Yeh & Lindau (1985), reproduced table: S 2p 2.2e-2 Mb at 1486.6 eV.
        let (s2p, occ, p) = subshell_mb(16, 2, 1, 1486.6).unwrap();
        assert_eq!((s2p, occ, p), (2.2e-2, 6.0, Provenance::YehLindau));
        // 2p above 2s from S on (Scofield 1976 sensitivity factors, J. Electron Spectrosc.
        // Relat. Phenom. 8 (1976) 129, from memory: S 2p 1.68 vs S 2s 1.43 relative to C 1s).
        assert!(s2p > subshell_mb(16, 2, 0, 1486.6).unwrap().0);
        // Per electron, S 2p at Al Kα against C 1s: Scofield's ratio (1.68/1.00 for the
        // whole subshells, from memory) within the ±30 % the two calculations differ by.
        let c1s = subshell_mb(6, 1, 0, 1486.6).unwrap().0;
        assert!((s2p / c1s / 1.68 - 1.0).abs() < 0.3, "{}", s2p / c1s);
        // He II does not reach a 2p beyond Na's: no values there.
        assert!(subshell_mb(16, 2, 1, 40.8).is_none());
        // Mg Kα is the Al Kα value carried by the central-field ratio, larger at the lower
        // energy; Mg 1s (1303 eV, X-ray Data Booklet) is out of reach of Mg Kα.
        let (smg, _, p) = subshell_mb(16, 2, 1, 1253.6).unwrap();
        assert_eq!(p, Provenance::CentralFieldScaled);
        assert!(smg > s2p);
        assert!(subshell_mb(12, 1, 0, 1253.6).is_none());
        assert!(subshell_mb(11, 1, 0, 1253.6).is_some());
        // Na 2p at He II: computed in the central field, flagged through its provenance.
        let (sna, occ, p) = subshell_mb(11, 2, 1, 40.8).unwrap();
        assert_eq!((occ, p), (6.0, Provenance::CentralField));
        assert!(sna > 1.0 && sna < 10.0, "{sna}");
    }

    /// Measured agreement of the central-field solver with the Yeh & Lindau Al Kα column
    /// (the rows typed in from the reproduced table, two significant digits). External
    /// check: Yeh & Lindau (1985) through the reproduced table. Measured computed/table:
    /// 1s 0.995–1.049, 2s 0.986–1.073, Na–Ar 2p 0.982–1.052, O 2p 1.09, F 2p 0.95; C 2p 2.13
    /// and N 2p 1.21 (valence, 1e-5 and 7e-5 Mb) are the only rows outside 10 %, flagged.
    #[test]
    fn central_field_reproduces_yeh_lindau_al_ka() {
        let mut worst: f64 = 0.0;
        let mut loose = Vec::new();
        for row in TABLE {
            let (z, n, l, _, _, _, yl) = *row;
            let c = central_field::table::lookup(z, n, l).expect("computed row");
            let ratio = c.4[3].expect("reached at Al Kα") / yl;
            if (ratio - 1.0).abs() > CENTRAL_FIELD_AGREEMENT {
                loose.push((z, n, l));
                let p = subshell_mb(z, n, l, 1253.6).unwrap().2;
                assert_eq!(p, Provenance::CentralFieldScaledLoose);
                // even these stay within a factor 2.2 (C 2p: 2.13)
                assert!(ratio < 2.2 && ratio > 0.45, "Z={z} {n}{l}: {ratio:.3}");
                continue;
            }
            worst = worst.max((ratio - 1.0).abs());
        }
        assert_eq!(loose, vec![(6, 2, 1), (7, 2, 1)]);
        // every other row within 10 %, the largest measured 9.2 % (O 2p); core rows ≤ 7.3 %
        assert!(worst > 0.05 && worst < CENTRAL_FIELD_AGREEMENT, "{worst}");
        // The Mg/Al ratio of the central field is not the high-energy power law: the law
        // (hν)^-(7/2+l) overstates the rise (Bethe & Salpeter 1957 §71 gives it as the
        // high-energy limit only). For S 2p: law 1.93, field 1.70.
        let c = central_field::table::lookup(16, 2, 1).unwrap().4;
        let field = c[2].unwrap() / c[3].unwrap();
        let law = (1253.6f64 / 1486.6).powf(-4.5);
        assert!(field < law && field > 1.3, "{field} vs {law}");
    }
}
