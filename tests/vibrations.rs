//! Harmonic wavenumbers at HF/6-31G* minima, scaled by 0.8953 (A. P. Scott & L. Radom,
//! J. Phys. Chem. 100 (1996) 16502), against experimental fundamentals (NIST / Herzberg,
//! from memory) within 5 %; the number of zero modes after projection (6, linear 5: exact
//! condition).

mod common;

use bandcast::analysis::symmetry::{detect_point_group, DEFAULT_TOLERANCE};
use bandcast::chem::{Atom, Molecule};
use bandcast::geometry::{optimize, OptimizeOptions, StateSpec};
use bandcast::scf::{Reference, ScfOptions};
use bandcast::units::ANGSTROM_TO_BOHR;
use bandcast::vibrations::{harmonic_analysis, hessian_by_gradients};

const SCALE: f64 = 0.8953; // Scott & Radom 1996, HF/6-31G*

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

fn spec() -> StateSpec {
    StateSpec {
        basis: "6-31G*".into(),
        charge: 0,
        multiplicity: 1,
        reference: Reference::Rhf,
        hole: None,
        scf: ScfOptions {
            e_tol: 1e-11,
            commutator_tol: 1e-9,
            ..ScfOptions::default()
        },
    }
}

/// Optimise tightly, then the harmonic analysis: (wavenumbers, irreps, rigid count).
fn analyse(start: &Molecule) -> (Vec<f64>, Vec<String>, usize, bool) {
    let s = spec();
    let opts = OptimizeOptions {
        max_force: 1e-5,
        rms_force: 1e-5,
        max_step: 1e-4,
        rms_step: 1e-4,
        ..OptimizeOptions::default()
    };
    let r = optimize(start, &s, &opts, &mut |_| {}).unwrap();
    assert!(r.converged);
    let h = hessian_by_gradients(&r.state, &s, &mut |_, _| {}).unwrap();
    let pg = detect_point_group(&r.molecule, DEFAULT_TOLERANCE);
    let a = harmonic_analysis(&r.molecule, &h, Some(&pg));
    eprintln!(
        "{}: rigid {:?} cm-1, modes {:?}, ZPE {:.4} eV",
        pg.name,
        a.rigid_cm1,
        a.modes
            .iter()
            .map(|m| (m.wavenumber_cm1, m.irrep.clone()))
            .collect::<Vec<_>>(),
        a.zero_point_ev
    );
    for c in &a.rigid_cm1 {
        assert!(c.abs() < 1.0, "rigid motion at {c} cm-1");
    }
    assert_eq!(a.n_imaginary, 0);
    (
        a.modes.iter().map(|m| m.wavenumber_cm1).collect(),
        a.modes.iter().map(|m| m.irrep.clone()).collect(),
        a.rigid_cm1.len(),
        a.linear,
    )
}

#[test]
fn water_fundamentals() {
    let start = mol_angstrom(&[
        (8, [0.0, 0.0, 0.12]),
        (1, [0.0, 0.76, -0.47]),
        (1, [0.0, -0.76, -0.47]),
    ]);
    let (nu, irreps, rigid, linear) = analyse(&start);
    assert_eq!((rigid, linear), (6, false)); // exact condition: 3 translations + 3 rotations
    assert_eq!(nu.len(), 3);
    // experimental fundamentals of H2O (NIST / Herzberg, from memory): bend 1595 (a1),
    // symmetric stretch 3657 (a1), antisymmetric stretch 3756 (b2)
    for (k, (exp, irrep)) in [(1595.0, "a1"), (3657.0, "a1"), (3756.0, "b2")]
        .iter()
        .enumerate()
    {
        let scaled = SCALE * nu[k];
        assert!(
            (scaled / exp - 1.0).abs() < 0.05,
            "mode {k}: {scaled} vs {exp}"
        );
        assert_eq!(irreps[k].to_lowercase(), *irrep, "mode {k}");
    }
}

#[test]
fn carbon_dioxide_fundamentals() {
    let start = mol_angstrom(&[
        (6, [0.0, 0.0, 0.0]),
        (8, [0.0, 0.0, 1.17]),
        (8, [0.0, 0.0, -1.17]),
    ]);
    let (nu, irreps, rigid, linear) = analyse(&start);
    // symmetry species of the CO2 modes (fact of the trade): πu bend, σg and σu stretches
    assert_eq!(irreps, ["πu", "πu", "σg", "σu"]);
    assert_eq!((rigid, linear), (5, true)); // exact condition: linear, 2 rotations
    assert_eq!(nu.len(), 4);
    // experimental fundamentals of CO2 (NIST / Herzberg, from memory): bend 667 (twice),
    // symmetric stretch 1333 (Fermi-resonance mean), antisymmetric stretch 2349
    for (k, exp) in [667.0, 667.0, 1333.0, 2349.0].iter().enumerate() {
        let scaled = SCALE * nu[k];
        assert!(
            (scaled / exp - 1.0).abs() < 0.05,
            "mode {k}: {scaled} vs {exp}"
        );
    }
}

/// Exact condition: the displaced gradients are independent, so the Hessian is the same
/// bit for bit whether they run one at a time or several at once.
#[test]
fn hessian_independent_of_concurrency() {
    let w = mol_angstrom(&[
        (8, [0.0, 0.0, 0.12]),
        (1, [0.0, 0.76, -0.47]),
        (1, [0.0, -0.76, -0.47]),
    ]);
    let mut s = spec();
    s.basis = "STO-3G".into();
    let st = s.solve(&w, None).unwrap();
    let h1 = bandcast::vibrations::hessian_by_gradients_with(&st, &s, 1, &mut |_, _| {}).unwrap();
    let h3 = bandcast::vibrations::hessian_by_gradients_with(&st, &s, 3, &mut |_, _| {}).unwrap();
    assert_eq!(h1, h3);
}

/// Bad input refused before any work (exit 2, the rule for bad input): a memory budget
/// smaller than the Hessian's own working set.
#[test]
fn vibrations_memory_refused_before_work() {
    let dir = std::env::temp_dir().join(format!("bandcast-vib-mem-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let f = dir.join("water.xyz");
    std::fs::write(
        &f,
        "3\nwater\nO 0 0 0.12\nH 0 0.76 -0.47\nH 0 -0.76 -0.47\n",
    )
    .unwrap();
    let out = common::bandcast()
        .args([
            "vibrations",
            f.to_str().unwrap(),
            "--basis",
            "6-31G*",
            "--memory",
            "1e-7",
        ])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("too small"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}

/// Symmetry shared with `core` and `ionize` (issue: one detection, one tolerance): a water
/// 0.01 Å off C2v is symmetrised before the Hessian, reported with its largest displacement,
/// and its modes carry C2v irreps — two a1 and one b (exact condition for a C2v triatomic).
#[test]
fn near_symmetric_input_is_symmetrised_before_the_hessian() {
    let dir = std::env::temp_dir().join(format!("bandcast-vib-sym-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let f = dir.join("water.xyz");
    std::fs::write(
        &f,
        "3\nwater\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0.004 -0.7662 -0.4692\n",
    )
    .unwrap();
    let out = common::bandcast()
        .args([
            "vibrations",
            f.to_str().unwrap(),
            "--basis",
            "sto-3g",
            "--json",
        ])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(0), "{err}");
    assert!(err.contains("symmetrised to C2v"), "{err}");
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(j["point_group"], "C2v");
    let d = j["symmetrised_displacement_angstrom"].as_f64().unwrap();
    assert!(d > 0.001 && d < 0.02, "{d}");
    let irreps: Vec<String> = j["modes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|m| m["irrep"].as_str().unwrap().to_lowercase())
        .collect();
    assert_eq!(
        irreps.iter().filter(|i| i.starts_with("a1")).count(),
        2,
        "{irreps:?}"
    );
    assert_eq!(
        irreps.iter().filter(|i| i.starts_with('b')).count(),
        1,
        "{irreps:?}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

/// The density-fitted gradient's arrays ((P|μν) and T, two n_aux·n² arrays) are counted
/// before any work (exit 2, the rule for a budget too small): water/cc-pVDZ with a budget
/// (0.0004 GiB ≈ 0.4 MiB) that holds the exact-integral working set (about 0.3 MiB) but not
/// the fitted one (about 1.5 MiB) is refused with `--fock df` by `vibrations` and
/// `optimize` (no output file written), and runs with exact integrals.
#[test]
fn fitted_gradient_memory_refused_before_work() {
    let water = format!("{}/tests/data/gw100/water.xyz", env!("CARGO_MANIFEST_DIR"));
    let out_xyz =
        std::env::temp_dir().join(format!("bandcast-df-mem-opt-{}.xyz", std::process::id()));
    let run = |args: &[&str]| common::bandcast().args(args).output().unwrap();
    let base = [&water[..], "--basis", "cc-pVDZ", "--memory", "0.0004"];
    let vib_df = run(&[&["vibrations"], &base[..], &["--fock", "df"]].concat());
    let err = String::from_utf8_lossy(&vib_df.stderr);
    assert_eq!(vib_df.status.code(), Some(2), "{err}");
    assert!(err.contains("density-fitted gradient"), "{err}");
    assert!(vib_df.stdout.is_empty());
    let opt_df = run(&[
        &["optimize"],
        &base[..],
        &["--fock", "df", "--out", out_xyz.to_str().unwrap()],
    ]
    .concat());
    let err = String::from_utf8_lossy(&opt_df.stderr);
    assert_eq!(opt_df.status.code(), Some(2), "{err}");
    assert!(err.contains("memory"), "{err}");
    assert!(
        !out_xyz.exists(),
        "optimize wrote its output before refusing"
    );
    // the same budget holds the exact-integral harmonic analysis
    let vib = run(&[&["vibrations"], &base[..]].concat());
    assert_eq!(
        vib.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&vib.stderr)
    );
}
