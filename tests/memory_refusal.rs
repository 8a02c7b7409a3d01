//! Jobs that cannot fit the memory budget are refused (exit 2, `Error::TooLarge`) from the
//! molecule and basis alone, before any integral is computed, naming a cheaper option.
//!
//! The library checks call the planning function directly: it receives only the molecule,
//! the basis and the options (no wavefunction, no integral engine), so a refusal there is a
//! refusal before any integral. The binary checks assert the exit code, the message, and that
//! stdout holds nothing and stderr only the one error (no SCF or stage output before it).

mod common;

use bandcast::basis::BasisSet;
use bandcast::chem::xyz::{parse_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::ionization::method::Method;
use bandcast::ionization::valence::{memory_preflight, ValenceOptions};
use bandcast::scf::ScfOptions;
use bandcast::Error;

const GIB: usize = 1 << 30;

/// 27 water molecules on a 3 Å cubic grid (geometry of each: O–H 0.957 Å, HOH 104.5°,
/// common practice), generated here so the test needs no large file.
fn water_cube_xyz() -> String {
    let mut lines = Vec::new();
    for i in 0..3 {
        for j in 0..3 {
            for k in 0..3 {
                let (x, y, z) = (3.0 * i as f64, 3.0 * j as f64, 3.0 * k as f64);
                lines.push(format!("O {x:.4} {y:.4} {:.4}", z + 0.1173));
                lines.push(format!("H {x:.4} {:.4} {:.4}", y + 0.7572, z - 0.4692));
                lines.push(format!("H {x:.4} {:.4} {:.4}", y - 0.7572, z - 0.4692));
            }
        }
    }
    format!("{}\n27 waters\n{}\n", lines.len(), lines.join("\n"))
}

fn load(xyz: &str, basis: &str) -> (Molecule, BasisSet) {
    let m = parse_xyz(xyz, LengthUnit::Angstrom).unwrap();
    let b = bandcast::basis::load(basis, &m, None).unwrap();
    (m, b)
}

fn opts(method: Method, budget: usize) -> ValenceOptions {
    ValenceOptions {
        method,
        memory_bytes: budget,
        ..ValenceOptions::default()
    }
}

#[test]
fn water_cube_eom_ccsd_refused_by_the_plan_before_any_integral() {
    let (m, b) = load(&water_cube_xyz(), "cc-pVTZ");
    // 27 × 58 cc-pVTZ functions per water (O 30 + 2 × H 14, spherical; common practice)
    assert_eq!(b.n_basis, 27 * 58);
    let scf = ScfOptions {
        memory_budget_bytes: GIB,
        ..ScfOptions::default()
    };
    for method in [Method::EomCcsd, Method::EomMp2, Method::Ep2] {
        match memory_preflight(&m, &b, &opts(method, GIB), &scf) {
            Err(Error::TooLarge(msg)) => {
                assert!(msg.contains("GiB"), "{msg}");
                assert!(
                    msg.contains("--method") || msg.contains("smaller basis"),
                    "{msg}"
                );
            }
            other => panic!("{}: expected a refusal, got {other:?}", method.name()),
        }
    }
    // Koopmans needs only the SCF, whose direct floor (N² matrices) fits 1 GiB.
    assert!(memory_preflight(&m, &b, &opts(Method::Koopmans, GIB), &scf).is_ok());
}

#[test]
fn a_budget_below_the_direct_scf_floor_is_refused() {
    let (m, b) = load(&water_cube_xyz(), "cc-pVTZ");
    let scf = ScfOptions {
        memory_budget_bytes: 1 << 20,
        ..ScfOptions::default()
    };
    assert!(matches!(
        memory_preflight(&m, &b, &opts(Method::Koopmans, 1 << 20), &scf),
        Err(Error::TooLarge(_))
    ));
    // and the SCF entry itself refuses before its integrals
    assert!(matches!(
        bandcast::scf::run(&m, &b, &scf),
        Err(Error::TooLarge(_))
    ));
}

fn refused_by_binary(args: &[&str]) -> String {
    let out = common::bandcast().args(args).output().unwrap();
    let err = String::from_utf8_lossy(&out.stderr).to_string();
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(out.stdout.is_empty());
    assert_eq!(
        err.trim().lines().count(),
        1,
        "only the error line on stderr: {err}"
    );
    assert!(err.starts_with("error:"), "{err}");
    err
}

#[test]
fn binary_refuses_the_water_cube_at_one_gib() {
    let dir = std::env::temp_dir().join(format!("bandcast-memref-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let f = dir.join("water-cube.xyz");
    std::fs::write(&f, water_cube_xyz()).unwrap();
    let err = refused_by_binary(&[
        "ionize",
        f.to_str().unwrap(),
        "--basis",
        "cc-pVTZ",
        "--method",
        "eom-ccsd",
        "--memory",
        "1",
    ]);
    assert!(err.contains("eom-mp2"), "names the cheaper option: {err}");
    let err = refused_by_binary(&[
        "core",
        f.to_str().unwrap(),
        "--basis",
        "cc-pVTZ",
        "--method",
        "dmp2",
        "--element",
        "O",
    ]);
    assert!(err.contains("dscf"), "names the cheaper option: {err}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn benzene_cc_pvtz_half_gib_refused_before_the_scf() {
    // The case that used to be refused only after its SCF had run.
    let err = refused_by_binary(&[
        "ionize",
        "tests/data/gw100/benzene.xyz",
        "--basis",
        "cc-pVTZ",
        "--method",
        "eom-ccsd",
        "--memory",
        "0.5",
    ]);
    assert!(err.contains("0.50 GiB"), "{err}");
}

/// Exit status, stdout and stderr of the binary.
fn run_binary(args: &[&str]) -> (Option<i32>, String, String) {
    let out = common::bandcast().args(args).output().unwrap();
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stdout).to_string(),
        String::from_utf8_lossy(&out.stderr).to_string(),
    )
}

/// The first number of the estimate line of `stage` in `--verbose` output, in GiB.
fn estimate_gib(stderr: &str, stage: &str) -> f64 {
    let line = stderr
        .lines()
        .find(|l| l.contains(stage))
        .unwrap_or_else(|| panic!("no '{stage}' estimate in {stderr}"));
    assert!(line.trim_end().ends_with("GiB"), "{line}");
    let value = line.rsplit_once(": ").unwrap().1;
    value.trim_end_matches(" GiB").parse().unwrap()
}

/// The density-fitting tensor of core's default J and K is in the estimate: a budget that
/// holds the SCF matrices but not the tensor is refused before work (water O 1s,
/// cc-pVDZ); the same budget runs with exact integrals, which need no tensor.
#[test]
fn core_refuses_a_budget_below_its_fitting_tensor() {
    let w = "tests/data/gw100/water.xyz";
    let base = ["core", w, "--basis", "cc-pVDZ", "--method", "dscf"];
    let (code, _, err) = run_binary(&[&base[..], &["--memory", "5", "--verbose"]].concat());
    assert_eq!(code, Some(0), "{err}");
    let scf = estimate_gib(&err, "SCF matrices of the cation");
    let tensor = estimate_gib(&err, "three-index tensor");
    assert!(scf < tensor, "{err}");
    let between = format!("{}", (scf + tensor) / 2.0);
    let err = refused_by_binary(&[&base[..], &["--memory", &between]].concat());
    assert!(err.contains("three-index tensor"), "{err}");
    assert!(
        err.contains("--fock exact"),
        "names the cheaper option: {err}"
    );
    assert!(!err.contains("MiB"), "GiB like the estimates: {err}");
    let (code, out, err) =
        run_binary(&[&base[..], &["--memory", &between, "--fock", "exact"]].concat());
    assert_eq!(code, Some(0), "{err}");
    assert!(out.contains("O1"), "{out}");
}

/// ΔMP2 of a 2p level is in the estimate too (the transformation of the cation's UMP2, with
/// the fitting tensor held): HCl Cl 2p, cc-pVDZ, refused before work at a budget that holds
/// the SCF and the tensor but not the transformation; ΔSCF runs at the same budget.
#[test]
fn core_refuses_a_2p_dmp2_transformation_that_cannot_fit() {
    let f = "tests/data/gw100/hydrogen-chloride.xyz";
    let base = ["core", f, "--basis", "cc-pVDZ", "--shell", "2p", "--quick"];
    let (code, _, err) = run_binary(
        &[
            &base[..],
            &["--method", "dmp2", "--memory", "5", "--verbose"],
        ]
        .concat(),
    );
    assert_eq!(code, Some(0), "{err}");
    let tensor = estimate_gib(&err, "three-index tensor");
    let mp2 = estimate_gib(&err, "ΔMP2: MO integrals");
    assert!(mp2 > 2.0 * tensor, "{err}");
    let between = format!("{}", (tensor + mp2) / 2.0);
    let err = refused_by_binary(&[&base[..], &["--method", "dmp2", "--memory", &between]].concat());
    assert!(err.contains("ΔMP2"), "{err}");
    assert!(
        err.contains("--method dscf"),
        "names the cheaper option: {err}"
    );
    let (code, out, err) =
        run_binary(&[&base[..], &["--method", "dscf", "--memory", &between]].concat());
    assert_eq!(code, Some(0), "{err}");
    assert!(out.contains("2p"), "{out}");
}

/// The coupled cluster asked for by `--method dccsd-t` is in the estimate (the cation's at
/// its smallest plan, with the Cholesky decomposition of the integrals): water O 1s,
/// cc-pVDZ, refused before any SCF at a budget that holds the SCF and the fitting tensor but
/// not the coupled cluster, with the cheaper options named; the estimate's own budget runs.
/// (Before this check, a coupled cluster too large for the budget ran every SCF and then
/// failed in the Cholesky decomposition: CF4 C 1s in cc-pVTZ after 470 s.)
#[test]
fn core_refuses_a_coupled_cluster_that_cannot_fit_before_any_scf() {
    let w = "tests/data/gw100/water.xyz";
    let base = [
        "core", w, "--basis", "cc-pVDZ", "--quick", "--method", "dccsd-t",
    ];
    let (code, _, err) = run_binary(&[&base[..], &["--memory", "5", "--verbose"]].concat());
    assert_eq!(code, Some(0), "{err}");
    let tensor = estimate_gib(&err, "three-index tensor");
    let cc = estimate_gib(&err, "coupled cluster of the cation");
    assert!(cc > 2.0 * tensor, "{err}");
    let between = format!("{}", (tensor + cc) / 2.0);
    let err = refused_by_binary(&[&base[..], &["--memory", &between]].concat());
    assert!(err.contains("coupled cluster of the cation"), "{err}");
    assert!(
        err.contains("--fno 99.5"),
        "names the cheaper options: {err}"
    );
    let (code, out, err) =
        run_binary(&[&base[..], &["--memory", &format!("{}", 1.05 * cc)]].concat());
    assert_eq!(code, Some(0), "{err}");
    assert!(out.contains("O1"), "{out}");
}
