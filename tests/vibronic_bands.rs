//! Vibronic bands from first principles (`bandcast::vibronic::band`): optimised neutral and
//! cation, both Hessians, Duschinsky relation, Franck–Condon progression from v = 0,
//! checked against measured photoelectron spectra. Sources beside each check.
//!
//! Electronic energies are Hartree–Fock ΔSCF; where that biases a number the bound is
//! loosened with the reason stated, and the number is printed (run with --nocapture).

use bandcast::chem::{Atom, Molecule};
use bandcast::units::ANGSTROM_TO_BOHR;
use bandcast::vibronic::band::{
    band, hole_by_label, neutral, BandModel, BandOptions, VibronicBand,
};
use bandcast::vibronic::composite::apply_correlated_vertical;

const MEMORY: usize = 2 << 30;

fn mol_angstrom(list: &[(u32, [f64; 3])]) -> Molecule {
    Molecule::new(
        list.iter()
            .map(|&(z, p)| Atom {
                z,
                position: p.map(|x| x * ANGSTROM_TO_BOHR),
            })
            .collect(),
    )
}

fn show(name: &str, b: &VibronicBand) {
    eprintln!(
        "{name}: model {:?} adiabatic {:.3} (el {:.3}, dZPE {:.3}) vertical {:.3} maximum {:.3} \
         mean {:.3} mean quanta {:.2} captured {:.4}",
        b.model,
        b.adiabatic_ev,
        b.electronic_adiabatic_ev,
        b.zero_point_change_ev,
        b.vertical_ev,
        b.maximum_ev,
        b.mean_ev,
        b.mean_total_quanta,
        b.captured_fraction
    );
    for m in &b.progression_modes {
        eprintln!(
            "   mode {} {:.1} cm-1 {} quanta at max {} mean {:.2}",
            m.mode, m.wavenumber_cm1, m.irrep, m.quanta_at_maximum, m.mean_quanta
        );
    }
    for c in &b.bond_changes {
        eprintln!(
            "   bond {:?}: {:.4} -> {:.4} Å",
            c.atoms, c.neutral_angstrom, c.ion_angstrom
        );
    }
    let mut l = b.lines.clone();
    l.sort_by(|a, b| b.intensity.total_cmp(&a.intensity));
    for x in l.iter().take(6) {
        eprintln!(
            "   line {:.3} eV  {:.4}  {:?}",
            x.energy_ev, x.intensity, x.quanta
        );
    }
    for n in &b.notes {
        eprintln!("   note: {n}");
    }
}

/// Intensity of the line with `q` quanta in `mode` (1-based) and none elsewhere.
fn single(b: &VibronicBand, mode: usize, q: u32) -> f64 {
    b.lines
        .iter()
        .filter(|l| {
            VibronicBand::line_quanta(l, mode) == q
                && l.quanta.iter().all(|x| x.mode == mode || x.quanta == 0)
        })
        .map(|l| l.intensity)
        .sum()
}

fn strongest(b: &VibronicBand) -> &bandcast::vibronic::band::BandLine {
    b.lines
        .iter()
        .max_by(|a, b| a.intensity.total_cmp(&b.intensity))
        .unwrap()
}

#[test]
fn h2_n2_h2o_bands_against_measured_spectra() {
    let opts = BandOptions::default();

    // H2 → H2⁺ X 2Σg+ (cc-pVTZ: H2⁺ is a one-electron system, so UHF is exact in the basis;
    // the error of the ΔSCF energy is the neutral's correlation energy, −0.0408 Eh = 1.11 eV
    // (Kołos & Wolniewicz, from memory), which makes the HF adiabatic IE low by about that).
    let h2 = mol_angstrom(&[(1, [0.0, 0.0, 0.0]), (1, [0.0, 0.0, 0.74])]);
    let n = neutral(&h2, "cc-pVTZ", &opts).unwrap();
    let b = band(&n, 0, Some("1σg".into()), &opts).unwrap();
    show("H2 1σg", &b);
    assert_eq!(b.model, BandModel::Duschinsky);
    assert!(b.captured_fraction >= 0.95);
    // Turner et al., Molecular Photoelectron Spectroscopy (1970); NIST: the H2⁺ band's
    // strongest line is v′ = 2.
    assert_eq!(
        VibronicBand::line_quanta(strongest(&b), 1),
        2,
        "H2 maximum not at v′ = 2"
    );
    // NIST adiabatic IE 15.43 eV; HF ΔSCF bound widened by the correlation energy (above):
    // the corrected value must land within 0.15 eV.
    let corrected = b.adiabatic_ev + 1.11;
    assert!(
        (corrected - 15.43).abs() < 0.15,
        "H2 adiabatic + Ec = {corrected:.3}"
    );
    let h2_quanta = b.mean_total_quanta;
    // Composite (correlated vertical + HF relaxation): for two electrons EOM-IP-CCSD is exact
    // in the basis, so the adiabatic IE must reach NIST's 15.43 eV within 0.15 eV without
    // any correction by hand.
    let mut c = vec![b];
    let m = apply_correlated_vertical(&n, "cc-pVTZ", &mut c, MEMORY).unwrap();
    show(&format!("H2 1σg composite ({m})"), &c[0]);
    assert!(c[0].composite.is_some());
    assert!(
        (c[0].adiabatic_ev - 15.43).abs() < 0.15,
        "H2 composite adiabatic {:.3}",
        c[0].adiabatic_ev
    );

    // N2 (cc-pVDZ). 3σg band: NIST adiabatic 15.58 eV, 0–0 dominant with v′=1/v′=0 about
    // 0.1 (Turner et al. 1970; from memory). 1πu band: adiabatic 16.69 eV (from memory), a
    // longer progression (maximum at v′ = 1, from memory).
    let n2 = mol_angstrom(&[(7, [0.0, 0.0, 0.0]), (7, [0.0, 0.0, 1.098])]);
    let n = neutral(&n2, "cc-pVDZ", &opts).unwrap();
    let s = band(
        &n,
        hole_by_label(&n, "3σg").unwrap(),
        Some("3σg".into()),
        &opts,
    )
    .unwrap();
    show("N2 3σg", &s);
    let p = band(
        &n,
        hole_by_label(&n, "1πu").unwrap(),
        Some("1πu".into()),
        &opts,
    )
    .unwrap();
    show("N2 1πu", &p);
    assert!(s.captured_fraction >= 0.95 && p.captured_fraction >= 0.95);
    let r10 = single(&s, 1, 1) / single(&s, 1, 0);
    eprintln!("N2 3σg v′=1/v′=0 = {r10:.3}");
    assert_eq!(
        VibronicBand::line_quanta(strongest(&s), 1),
        0,
        "3σg: 0–0 not strongest"
    );
    // about 0.1 (from memory); the harmonic HF model is allowed a factor of ~2 either way
    assert!(
        (0.04..0.2).contains(&r10),
        "3σg v′=1/v′=0 = {r10:.3}, expected about 0.1"
    );
    assert!(
        p.mean_total_quanta > 2.0 * s.mean_total_quanta,
        "1πu progression not clearly longer: {} vs {}",
        p.mean_total_quanta,
        s.mean_total_quanta
    );
    let n2_pi_quanta = p.mean_total_quanta;
    let s_q = s.mean_total_quanta;
    // Composite positions: HF ΔSCF puts 1πu below 3σg (a known failure of HF for N2); the
    // correlated vertical energies restore the measured order X 2Σg+ (15.58 eV, NIST) below
    // A 2Πu (16.69 eV, from memory).
    let mut c = vec![s, p];
    let m = apply_correlated_vertical(&n, "cc-pVDZ", &mut c, MEMORY).unwrap();
    show(&format!("N2 3σg composite ({m})"), &c[0]);
    show(&format!("N2 1πu composite ({m})"), &c[1]);
    assert!(c[0].adiabatic_ev < c[1].adiabatic_ev, "N2 composite order");
    // Positions within 0.45 eV: EOM-IP-CCSD in a double-zeta basis without diffuse functions
    // lands a few tenths of an eV from measured IEs (common practice); measured here: 3σg
    // −0.39, 1πu +0.09 eV.
    assert!(
        (c[0].adiabatic_ev - 15.58).abs() < 0.45,
        "N2 3σg {:.3}",
        c[0].adiabatic_ev
    );
    assert!(
        (c[1].adiabatic_ev - 16.69).abs() < 0.45,
        "N2 1πu {:.3}",
        c[1].adiabatic_ev
    );

    // H2O 1b1 (cc-pVDZ): NIST adiabatic 12.62 eV; 0–0 strongest and a bending progression of
    // about 0.17 eV spacing (Turner et al. 1970; from memory). HF harmonic wavenumbers lie
    // about 10 % above measured fundamentals (Scott & Radom 1996, common practice): spacing
    // accepted within 0.15–0.22 eV.
    let h2o = mol_angstrom(&[
        (8, [0.0, 0.0, 0.1173]),
        (1, [0.0, 0.7572, -0.4692]),
        (1, [0.0, -0.7572, -0.4692]),
    ]);
    let n = neutral(&h2o, "cc-pVDZ", &opts).unwrap();
    let w = band(
        &n,
        hole_by_label(&n, "1b1").unwrap(),
        Some("1b1".into()),
        &opts,
    )
    .unwrap();
    show("H2O 1b1", &w);
    assert!(w.captured_fraction >= 0.95);
    assert!(
        strongest(&w).quanta.is_empty(),
        "H2O 1b1: 0–0 not strongest"
    );
    let bend = w
        .ion_modes
        .iter()
        .position(|m| m.0 < 2500.0)
        .expect("a bending mode")
        + 1;
    let spacing = w
        .lines
        .iter()
        .find(|l| l.quanta.len() == 1 && VibronicBand::line_quanta(l, bend) == 1)
        .map(|l| l.energy_ev - w.adiabatic_ev)
        .expect("a bending line");
    eprintln!(
        "H2O 1b1 bending spacing {spacing:.3} eV, 1/0 = {:.3}",
        single(&w, bend, 1) / single(&w, bend, 0)
    );
    assert!(
        (0.15..0.22).contains(&spacing),
        "bending spacing {spacing:.3} eV"
    );
    assert!(single(&w, bend, 1) > 0.02, "no bending progression");
    let mut c = vec![w.clone()];
    let m = apply_correlated_vertical(&n, "cc-pVDZ", &mut c, MEMORY).unwrap();
    show(&format!("H2O 1b1 composite ({m})"), &c[0]);
    // NIST adiabatic 12.62 eV: the composite must come closer than HF ΔSCF (which misses
    // the correlation change of a lone-pair ionization, ~2 eV here).
    assert!((c[0].adiabatic_ev - 12.62).abs() < (w.adiabatic_ev - 12.62).abs());
    // Why the cc-pVDZ composite is ~1 eV low (docs/vibronic-bands.md): the correlated
    // vertical energy of a lone pair needs diffuse functions; relaxation (0.11 eV) and
    // zero-point change (−0.08 eV) are small. The band says so ...
    assert!(c[0]
        .notes
        .iter()
        .any(|n| n.code() == "band-vertical-basis-without-diffuse"));
    // ... and with the vertical energy in aug-cc-pVTZ (geometries and modes still
    // HF/cc-pVDZ) the adiabatic IE must land within 0.25 eV of NIST's 12.62 eV: the
    // remaining error is EOM-IP-CCSD's own and its basis (a few tenths of an eV, common
    // practice). Measured here: 12.46 eV.
    let mut c = vec![w.clone()];
    apply_correlated_vertical(&n, "aug-cc-pVTZ", &mut c, MEMORY).unwrap();
    show("H2O 1b1 composite, vertical aug-cc-pVTZ", &c[0]);
    assert!(
        (c[0].adiabatic_ev - 12.62).abs() < 0.25,
        "H2O 1b1 composite (aug-cc-pVTZ vertical) adiabatic {:.3}",
        c[0].adiabatic_ev
    );
    assert!(c[0]
        .notes
        .iter()
        .all(|n| n.code() != "band-vertical-basis-without-diffuse"));

    // Fact of the trade: a non-bonding ionization gives a shorter progression than a bonding
    // one: H2O 1b1 (lone pair) < N2 1πu and H2 1σg (bonding), by mean total quanta.
    eprintln!(
        "mean quanta: H2O 1b1 {:.2}, N2 3σg {:.2}, N2 1πu {:.2}, H2 1σg {:.2}",
        w.mean_total_quanta, s_q, n2_pi_quanta, h2_quanta
    );
    assert!(w.mean_total_quanta < n2_pi_quanta);
    assert!(w.mean_total_quanta < h2_quanta);
}
