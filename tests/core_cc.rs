//! `bandcast core --method dccsd|dccsd-t` against published gas-phase 1s binding energies
//! (docs/reference-data.md §4).
//!
//! ΔCCSD(T): coupled cluster on the neutral and on the MOM-held core-ionized UHF state, the
//! ion's amplitudes projected onto the core-ionized space (no amplitude leaves two
//! electrons in the core orbital; correlation/open_shell/core_hole.rs). The method itself is
//! checked against CVS full configuration interaction in one basis (the first test); in the
//! test-affordable cc-pVDZ basis (hole atom s and p uncontracted) the values are
//! basis-limited; docs/core-levels.md has the table in larger sets.

mod common;

use std::path::Path;

use bandcast::chem::xyz::{read_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::core_level::delta_cc::DeltaCc;
use bandcast::core_level::{CoreOptions, CoreResult, IonReference, TargetSelection};

use common::gw100_molecule as load;

/// CO at r = 1.1283 Å (tests/data/core; the GW100 file's 1.283 Å is a misprint).
fn carbon_monoxide() -> Molecule {
    read_xyz(
        &Path::new(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/tests/data/core/carbon-monoxide.xyz"
        )),
        LengthUnit::Angstrom,
    )
    .unwrap()
}

fn run(mol: &Molecule, basis: &str, cc: DeltaCc) -> CoreResult {
    let set = bandcast::basis::load(basis, mol, None).unwrap();
    let opts = CoreOptions {
        targets: TargetSelection::AllHeavy,
        thorough: false,
        cc: Some(cc),
        ..CoreOptions::default()
    };
    bandcast::core_level::predict(mol, &set, &opts).expect("core-level run")
}

/// aug-cc-pCVTZ as the basis-set library defines it for H and B–Ne: cc-pCVTZ plus the
/// diffuse shells of aug-cc-pVTZ (aug-cc-pVTZ itself for H), assembled from the bundled
/// sets into a basis file.
fn aug_cc_pcvtz_file(tag: &str) -> std::path::PathBuf {
    let read = |name: &str| -> serde_json::Value {
        let p = format!("{}/basis/{name}.json", env!("CARGO_MANIFEST_DIR"));
        serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
    };
    let (cv, aug, v) = (read("cc-pcvtz"), read("aug-cc-pvtz"), read("cc-pvtz"));
    let mut out = cv.clone();
    out["name"] = "aug-cc-pCVTZ (assembled in tests/core_cc.rs)".into();
    out["aliases"] = serde_json::json!([]);
    out["elements"]["H"] = aug["elements"]["H"].clone();
    for el in ["C", "N", "O", "F"] {
        let plain = v["elements"][el].as_array().unwrap();
        let mut shells = cv["elements"][el].as_array().unwrap().clone();
        let diffuse: Vec<_> = aug["elements"][el]
            .as_array()
            .unwrap()
            .iter()
            .filter(|s| !plain.contains(s))
            .cloned()
            .collect();
        // one diffuse s, p, d and f shell per element
        assert_eq!(diffuse.len(), 4, "{el}");
        shells.extend(diffuse);
        out["elements"][el] = shells.into();
    }
    let path = common::temp_path("core-cc", &format!("{tag}-aug-cc-pcvtz.json"));
    std::fs::write(&path, serde_json::to_string(&out).unwrap()).unwrap();
    path
}

/// ΔSCF, ΔMP2 and ΔCCSD(T) of the first level of `element` in aug-cc-pCVTZ (non-
/// relativistic, `--core-basis plain`) against the published ΔUHF and ΔUMP2 (0.02 eV: same
/// geometry and basis) and CVS full CI (0.05 eV).
fn against_cvs_full_ci(name: &str, element: u32, n_basis: usize, published: [f64; 3]) {
    let mol = load(name);
    let path = aug_cc_pcvtz_file(name);
    let set = bandcast::basis::load(path.to_str().unwrap(), &mol, None).unwrap();
    std::fs::remove_file(&path).ok();
    assert_eq!(set.n_basis, n_basis);
    let opts = CoreOptions {
        targets: TargetSelection::Element(element),
        thorough: false,
        cc: Some(DeltaCc::CcsdT),
        mp2: true,
        core_basis: bandcast::core_level::CoreBasis::Plain,
        ..CoreOptions::default()
    };
    let r = bandcast::core_level::predict(&mol, &set, &opts).expect("core-level run");
    let l = &r.core_levels[0];
    let [uhf, ump2, fci] = published;
    assert!((l.dscf_ev - uhf).abs() < 0.02, "{name} ΔSCF {}", l.dscf_ev);
    let mp2 = l.dmp2_ev.expect("ΔMP2 asked");
    assert!((mp2 - ump2).abs() < 0.02, "{name} ΔMP2 {mp2}");
    let t = l.cc.dccsdt_ev.unwrap();
    assert!(
        (t - fci).abs() < 0.05,
        "{name} ΔCCSD(T) {t} against CVS-FCI {fci}"
    );
}

/// The method against CVS full configuration interaction in one basis: H2O O 1s in
/// aug-cc-pCVTZ, non-relativistic. Marie, Burth & Loos, "Reference energies for
/// non-relativistic core ionization potentials" (arXiv:2604.05920, 2026; open data in the
/// QUEST database, github.com/pfloos/QUESTDB, charged/core_IPs/h2o.json): CVS-selected-CI
/// (FCI quality) 539.870 eV, ΔUHF 539.01, ΔUMP2 540.06. Our ΔSCF and ΔMP2 reproduce theirs
/// to 0.01 eV on the GW100 geometry (so geometry and basis agree), and ΔCCSD(T) gives 539.88
/// (+0.01; CH4 C 1s in the same basis 290.85 against 290.851, docs/core-levels.md). Removing
/// the hole from the virtual space instead (the scheme before 5 December 2026) gave 540.29,
/// +0.42: the tolerance of 0.05 eV fails it. About 40 s wall idle.
#[test]
fn water_o1s_dccsd_t_matches_cvs_full_ci() {
    against_cvs_full_ci("water", 8, 105, [539.01, 540.06, 539.870]);
}

/// The same for HF F 1s (same source, hf.json: CVS-FCI 694.104, ΔUHF 692.94, ΔUMP2 694.34
/// eV): measured 692.95, 694.35 and ΔCCSD(T) 694.12 (+0.02) — the method does not drift
/// with Z. About 18 s wall idle.
#[test]
fn hydrogen_fluoride_f1s_dccsd_t_matches_cvs_full_ci() {
    against_cvs_full_ci("hydrogen-fluoride", 9, 82, [692.94, 694.34, 694.104]);
}

/// Ne 1s: experiment 870.2 eV (X-ray Data Booklet, docs/reference-data.md §4) minus the
/// relativistic correction of 1s levels (0.73 eV here: scalar 1.01, two-electron contact and
/// QED −0.28; core_level/relativistic.rs) is the non-relativistic target, 869.47 eV.
/// Measured 869.83 eV (ΔCCSD(T), cc-pVDZ with uncontracted s/p, non-relativistic) against
/// ΔSCF 869.05 eV: correlation binds the 1s more strongly
/// (common practice), and the coupled-cluster value stays a core hole (a collapse into the
/// valence would give ≈ 21 eV). Bound 0.46 eV, the measured +0.36 plus 0.1, for the
/// double-zeta basis (the value falls by 0.34 eV in cc-pVTZ, docs/core-levels.md).
#[test]
fn neon_1s_dccsd_t() {
    let r = run(&load("neon"), "cc-pVDZ", DeltaCc::CcsdT);
    let l = &r.core_levels[0];
    let t = l.cc.dccsdt_ev.expect("(T) was asked");
    let s = l.cc.dccsd_ev.expect("CCSD ran");
    assert!((t - 869.47).abs() < 0.46, "ΔCCSD(T) Ne 1s {t}");
    assert!(
        t - l.dscf_ev > 0.5 && t - l.dscf_ev < 2.0,
        "ΔSCF {} ΔCCSD(T) {t}",
        l.dscf_ev
    );
    // (T) is a small correction on top of CCSD for a core hole of a closed-shell atom
    assert!((t - s).abs() < 0.3, "ΔCCSD {s} ΔCCSD(T) {t}");
    assert_eq!(l.cc.method, "dccsd-t");
    assert_eq!(l.cc.binding_ev, t);
}

/// H2O O 1s: experiment 539.827 eV vertical (Wang et al. 2021, docs/reference-data.md §4)
/// minus the relativistic correction of O 1s (0.24 eV, core_level/relativistic.rs) is the
/// non-relativistic target, 539.59 eV; measured 539.71 eV in cc-pVDZ (uncontracted s/p on
/// O), non-relativistic (539.95 with the correction): +0.12; bound 0.22 eV, the measured
/// error plus 0.1.
/// About 2 s wall on an idle 2-core machine (spin-blocked coupled cluster).
#[test]
fn water_o1s_dccsd_t() {
    let r = run(&load("water"), "cc-pVDZ", DeltaCc::CcsdT);
    let t = r.core_levels[0].cc.dccsdt_ev.unwrap();
    assert!((t - 539.59).abs() < 0.22, "ΔCCSD(T) O 1s {t}");
}

/// H2O O 1s with cc-pCVTZ on O and cc-pVTZ on H, the coupled cluster on frozen natural
/// orbitals keeping 99.5 % of the MP2 virtual population (`--fno 99.5`; the core hole is
/// kept out of the cut): experiment 539.827 eV (Wang et al. 2021, docs/reference-data.md
/// §4), non-relativistic target 539.59 eV as above. Measured 539.71 eV non-relativistic
/// (539.95 with the relativistic correction; all virtuals 539.69), 40 and 34 of 66 virtuals
/// per spin kept beside the ion's hole, MP2 correction +0.149 eV. About 4 s wall idle.
/// Bound 0.22 eV as for the double-zeta check above.
#[test]
fn water_o1s_dccsd_t_core_valence_basis_on_frozen_natural_orbitals() {
    let mol = load("water");
    let set = bandcast::basis::load("cc-pVTZ", &mol, None).unwrap();
    let opts = CoreOptions {
        thorough: false,
        cc: Some(DeltaCc::CcsdT),
        core_basis: bandcast::core_level::CoreBasis::parse("cc-pCVTZ"),
        natural_virtuals: Some(0.995),
        ..CoreOptions::default()
    };
    let r = bandcast::core_level::predict(&mol, &set, &opts).expect("core-level run");
    let l = &r.core_levels[0];
    let t = l.cc.dccsdt_ev.unwrap();
    assert!((t - 539.59).abs() < 0.22, "ΔCCSD(T) O 1s {t}");
    let json = serde_json::to_string(&r).unwrap();
    assert!(json.contains("natural_virtuals"), "no natural-virtual note");
}

fn run_with(mol: &Molecule, opts: CoreOptions) -> CoreResult {
    let set = bandcast::basis::load("cc-pVDZ", mol, None).unwrap();
    bandcast::core_level::predict(mol, &set, &opts).expect("core-level run")
}

/// Ne 1s on the ROHF cation (`--reference rohf`): ⟨S²⟩ = 3/4 exactly (exact condition of a
/// doublet ROHF determinant), and ΔCCSD(T) agrees with the UHF-based value within 0.02 eV
/// although ΔSCF differs by 0.27 eV: coupled cluster with singles is nearly independent of
/// the reference orbitals (Thouless; common practice). Measured: ROHF 869.82, UHF 869.83;
/// both within 0.46 eV of the non-relativistic target 869.47 eV (experiment 870.2, X-ray Data
/// Booklet, minus the relativistic 0.73), as in `neon_1s_dccsd_t`.
#[test]
fn neon_1s_dccsd_t_on_rohf_and_uhf_references_agree() {
    let ne = load("neon");
    let opts = |r| CoreOptions {
        thorough: false,
        cc: Some(DeltaCc::CcsdT),
        ion_reference: r,
        ..CoreOptions::default()
    };
    let ro = run_with(&ne, opts(IonReference::Rohf));
    let u = run_with(&ne, opts(IonReference::Uhf));
    let (lr, lu) = (&ro.core_levels[0], &u.core_levels[0]);
    assert_eq!(lr.start, "rohf");
    assert!((lr.s2 - 0.75).abs() < 1e-8, "{}", lr.s2);
    assert!(
        lr.dscf_ev - lu.dscf_ev > 0.1,
        "{} {}",
        lr.dscf_ev,
        lu.dscf_ev
    );
    let (tr, tu) = (lr.cc.dccsdt_ev.unwrap(), lu.cc.dccsdt_ev.unwrap());
    assert!((tr - tu).abs() < 0.02, "ROHF {tr} UHF {tu}");
    assert!((tr - 869.47).abs() < 0.46, "{tr}");
}

/// CO − CH4 C 1s shift, ΔCCSD(T), cc-pVDZ with uncontracted s/p on C: within 0.15 eV of
/// 5.4 eV (Thomas, J. Chem. Phys. 53 (1970) 1744; docs/reference-data.md §4). CO at
/// r = 1.1283 Å (tests/data/core; the GW100 file's 1.283 Å is a misprint). Measured 5.30 eV
/// (UHF cation, 296.36 − 291.06). The CO2 − CH4 shift (6.64 against 6.89) misses the
/// 0.15 eV target in this basis; in cc-pVTZ both shifts meet it (test at the end).
/// About 6 s wall on an idle 2-core machine.
#[test]
fn co_minus_methane_c1s_shift_dccsd_t() {
    let co = carbon_monoxide();
    let opts = CoreOptions {
        targets: TargetSelection::Element(6),
        thorough: false,
        cc: Some(DeltaCc::CcsdT),
        ..CoreOptions::default()
    };
    let a = run_with(&co, opts.clone()).core_levels[0]
        .cc
        .dccsdt_ev
        .unwrap();
    let b = run_with(&load("methane"), opts).core_levels[0]
        .cc
        .dccsdt_ev
        .unwrap();
    assert!(
        (a - b - 5.4).abs() < 0.15,
        "CO {a} CH4 {b}: shift {}",
        a - b
    );
}

/// The recommended Ne 1s value (`binding_ev` = ΔCCSD(T) + relativistic correction, the
/// default route) against experiment, 870.2 eV (X-ray Data Booklet, docs/reference-data.md
/// §4). The correction is added once (binding − ΔCCSD(T) = the law at the ΔSCF value,
/// regression) and is positive. Measured in cc-pVDZ (uncontracted s/p): 869.83 + 0.73 =
/// 870.56 eV, +0.36 eV: in this basis the 0.2 eV target of issue 16 is not met (cc-pVTZ:
/// +0.02; docs/core-levels.md, "Accuracy against experiment"); the bound here is the
/// measured error plus 0.1 eV, so a correction applied twice (+1.1 eV), without its
/// two-electron and QED part (+0.64 eV) or with the wrong sign (−1.1 eV) fails.
#[test]
fn neon_1s_recommended_value_with_relativistic_correction() {
    let ne = load("neon");
    let r = run_with(
        &ne,
        CoreOptions {
            thorough: false,
            cc: Some(DeltaCc::CcsdT),
            relativistic: true,
            ..CoreOptions::default()
        },
    );
    let l = &r.core_levels[0];
    let t = l.cc.dccsdt_ev.unwrap();
    let rel = l.relativistic_correction_ev.unwrap();
    assert!(rel > 0.65 && rel < 0.8, "{rel}");
    assert!((l.cc.binding_ev - t - rel).abs() < 1e-9);
    assert!((rel - bandcast::core_level::relativistic::correction_ev(l.dscf_ev)).abs() < 1e-12);
    let err = l.cc.binding_ev - 870.2;
    assert!(err > 0.0 && err < 0.46, "Ne 1s error {err}");
}

/// N2 N 1s (409.9 eV, X-ray Data Booklet) and CH4 C 1s (290.8 eV, Thomas 1970; both
/// docs/reference-data.md §4) in the default route, ΔCCSD(T) + relativistic correction.
/// Measured +0.26 and +0.31 eV in this double-zeta basis (cc-pVTZ: −0.03 and −0.05,
/// docs/core-levels.md); the bound is the measured error plus 0.1 eV (a guard against
/// regressions, not the target).
/// About 6 s wall on an idle 2-core machine.
#[test]
fn nitrogen_and_methane_1s_recommended_values() {
    for (name, z, exp, bound) in [("nitrogen", 7, 409.9, 0.36), ("methane", 6, 290.8, 0.41)] {
        let r = run_with(
            &load(name),
            CoreOptions {
                targets: TargetSelection::Element(z),
                thorough: false,
                cc: Some(DeltaCc::CcsdT),
                relativistic: true,
                ..CoreOptions::default()
            },
        );
        let err = r.core_levels[0].cc.binding_ev - exp;
        assert!(err > 0.0 && err < bound, "{name}: error {err}");
    }
}

/// CO2 − CH4 C 1s shift, ΔCCSD(T), default basis: 6.89 eV (Jolly, Bomben & Eyermann, At.
/// Data Nucl. Data Tables 31 (1984) 433, from memory, minus Thomas 1970; docs/reference-
/// data.md §4). Measured 6.64 eV (−0.25): the 0.15 eV target is NOT met in
/// cc-pVDZ; this test holds the measured 0.3 eV (cc-pVTZ meets it: the last test).
/// About 20 s wall on an idle 2-core machine.
#[test]
fn co2_minus_methane_c1s_shift_dccsd_t_within_0_3_ev() {
    let opts = CoreOptions {
        targets: TargetSelection::Element(6),
        thorough: false,
        cc: Some(DeltaCc::CcsdT),
        ..CoreOptions::default()
    };
    let a = run_with(&load("carbon-dioxide"), opts.clone()).core_levels[0]
        .cc
        .dccsdt_ev
        .unwrap();
    let b = run_with(&load("methane"), opts).core_levels[0]
        .cc
        .dccsdt_ev
        .unwrap();
    assert!(
        (a - b - 6.89).abs() < 0.3,
        "CO2 {a} CH4 {b}: shift {}",
        a - b
    );
}

/// The C 1s shifts in a triple-zeta basis on every atom: cc-pVTZ with the hole atom's s and
/// p uncontracted (the default `--core-basis`), the coupled cluster on frozen natural
/// orbitals keeping 99.5 % of the MP2 virtual population (`--fno 99.5`). Experiment: CO −
/// CH4 5.4 eV (Thomas, J. Chem. Phys. 53 (1970) 1744), CO2 − CH4 297.69 − 290.8 = 6.89 eV
/// (CO2: Jolly, Bomben & Eyermann 1984, from memory; docs/reference-data.md §4); issue 16's
/// 0.15 eV. Measured 5 December 2026: CH4 290.71, CO 296.22, CO2 297.56 eV
/// (non-relativistic), shifts 5.51 (+0.11) and 6.85 (−0.04); all virtuals give 290.70,
/// 296.15, 297.53 — 5.45 and 6.83; cc-pVDZ gives 6.64 (the test above) — the triple-zeta
/// basis on the other atoms is what the CO2 shift needs. ΔSCF in the same basis gives 8.48
/// for CO2 − CH4, so the check fails without the correlation. About 15 s wall on an idle
/// 2-core machine.
#[test]
fn c1s_shifts_in_triple_zeta_within_0_15_ev() {
    let run_tz = |mol: &Molecule| {
        let set = bandcast::basis::load("cc-pVTZ", mol, None).unwrap();
        let opts = CoreOptions {
            targets: TargetSelection::Element(6),
            thorough: false,
            cc: Some(DeltaCc::CcsdT),
            natural_virtuals: Some(0.995),
            ..CoreOptions::default()
        };
        let r = bandcast::core_level::predict(mol, &set, &opts).expect("core-level run");
        let l = &r.core_levels[0];
        (l.dscf_ev, l.cc.dccsdt_ev.unwrap())
    };
    let co = carbon_monoxide();
    let (_, c_co) = run_tz(&co);
    let (s_co2, c_co2) = run_tz(&load("carbon-dioxide"));
    let (s_ch4, c_ch4) = run_tz(&load("methane"));
    let (co, co2) = (c_co - c_ch4, c_co2 - c_ch4);
    assert!((co - 5.4).abs() < 0.15, "CO − CH4 {co}");
    assert!((co2 - 6.89).abs() < 0.15, "CO2 − CH4 {co2}");
    assert!((s_co2 - s_ch4 - 6.89).abs() > 1.0, "ΔSCF {}", s_co2 - s_ch4);
}
