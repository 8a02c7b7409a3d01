//! Memory before work: every memory estimate (SCF, EP2, EOM-IP) enters the default-method
//! choice and the refusals before the SCF starts.
//!
//! How "before any integral" is checked, structurally (no timing): the jobs below run on a
//! *poisoned* copy of the basis — every exponent NaN — so any integral computed from it is
//! NaN and the SCF could only fail with a computation error (or give NaN energies). A
//! refusal `Error::TooLarge` with the exact message of `plan_before_work` (which takes only
//! the molecule, the basis sizes and the options: no wavefunction, no integral engine)
//! therefore comes from the estimate path, with no SCF started.

use bandcast::basis::BasisSet;
use bandcast::chem::xyz::{parse_xyz, LengthUnit};
use bandcast::chem::Molecule;
use bandcast::ionization::default_method::{
    plan_before_work, predict_default, stage_estimates, SkipReason,
};
use bandcast::ionization::method::Method;
use bandcast::ionization::valence::{predict, ValenceOptions};
use bandcast::predict::{memory_estimates, MethodChoice, Request};
use bandcast::Error;

/// 27 water molecules on a 3 Å cubic grid (each: O–H 0.957 Å, HOH 104.5°, common
/// practice); 27 × 58 = 1566 cc-pVTZ functions.
fn water_cube() -> Molecule {
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
    let text = format!("{}\n27 waters\n{}\n", lines.len(), lines.join("\n"));
    parse_xyz(&text, LengthUnit::Angstrom).unwrap()
}

/// The basis with every exponent NaN: sizes and shell structure intact, integrals poisoned.
fn poisoned(b: &BasisSet) -> BasisSet {
    let mut p = b.clone();
    for sh in &mut p.shells {
        for e in &mut sh.exponents {
            *e = f64::NAN;
        }
    }
    p
}

fn opts(budget: f64) -> ValenceOptions {
    ValenceOptions {
        memory_bytes: budget as usize,
        ..ValenceOptions::default()
    }
}

fn too_large(r: bandcast::Result<impl std::fmt::Debug>) -> String {
    match r {
        Err(Error::TooLarge(m)) => m,
        other => panic!("expected a memory refusal, got {other:?}"),
    }
}

/// The default chain on a job ten times larger than the budget: the SCF matrices alone
/// need 10× the budget, so nothing can run; refused with the planner's own message.
#[test]
fn default_chain_ten_times_over_budget_refused_before_any_integral() {
    let m = water_cube();
    let b = bandcast::basis::load("cc-pVTZ", &m, None).unwrap();
    let p = poisoned(&b);
    let floor = stage_estimates(&m, &b, &opts(1e12), Method::Koopmans)[0].bytes;
    let o = opts(floor / 10.0);
    let planned = too_large(plan_before_work(&m, &p, &o).map(|x| x.choice));
    let run = too_large(predict_default(&m, &p, &o).map(|x| x.1));
    assert_eq!(planned, run, "the refusal comes from the estimate path");
    assert!(
        planned.contains("smaller basis"),
        "names the cheaper option: {planned}"
    );
}

/// An asked-for EOM-IP-CCSD ten times larger than the budget, through the one request path
/// of `spectrum`/`assign` and through `ionize`'s library entry: refused before the SCF.
#[test]
fn eom_ccsd_ten_times_over_budget_refused_before_any_integral() {
    let m = water_cube();
    let b = bandcast::basis::load("cc-pVDZ", &m, None).unwrap();
    let p = poisoned(&b);
    // the planned peak with an ample budget, then a tenth of it
    let big = opts(1e15);
    let est = stage_estimates(&m, &b, &big, Method::EomCcsd);
    let peak = est.last().unwrap().bytes;
    assert!(est.last().unwrap().stage.contains("peak"), "{est:?}");
    let o = ValenceOptions {
        method: Method::EomCcsd,
        ..opts(peak / 10.0)
    };
    let msg = too_large(predict(&m, &p, &o).map(|r| r.bands.len()));
    assert!(msg.contains("eom-mp2"), "names the cheaper method: {msg}");
    let mut req = Request::new(&m, &p, bandcast::ionization::Region::Valence);
    req.method = MethodChoice::Valence(Method::EomCcsd);
    req.options.memory_bytes = Some((peak / 10.0) as usize);
    let msg2 = too_large(bandcast::predict::predict(&req, &|_| {}).map(|r| r.bands.len()));
    assert_eq!(msg, msg2);
}

/// The EP2 estimate enters the default choice before the SCF: 27 waters in cc-pVTZ are
/// beyond both EOM-IP size limits, and EP2's transformation for its 108 valence targets
/// cannot fit 4 GiB, so the chain settles on Koopmans before any work (it used to start the
/// SCF and find out in EP2). The estimates cover the SCF and the chosen method.
#[test]
fn ep2_estimate_decides_the_default_before_the_scf() {
    let m = water_cube();
    let b = bandcast::basis::load("cc-pVTZ", &m, None).unwrap();
    let p = poisoned(&b);
    let plan = plan_before_work(&m, &p, &opts(4.0 * (1u64 << 30) as f64)).unwrap();
    assert_eq!(plan.choice.method, Method::Koopmans);
    let ep2 = plan
        .choice
        .skipped
        .iter()
        .find(|s| s.method == Method::Ep2)
        .unwrap();
    assert_eq!(ep2.reason.code(), "does-not-fit", "{}", ep2.reason);
    assert!(matches!(ep2.reason, SkipReason::DoesNotFit { .. }));
    assert!(plan.estimates[0].stage.starts_with("SCF"));
    // the request path (spectrum, assign) reports the same plan
    let mut req = Request::new(&m, &p, bandcast::ionization::Region::Valence);
    req.options.memory_bytes = Some(4 << 30);
    assert_eq!(memory_estimates(&req).unwrap(), plan.estimates);
}

/// The stage estimates of a correlated job name the SCF, the MO integrals and the CC
/// amplitudes, each a positive size; for water/cc-pVDZ (24 functions) the SCF matrices
/// are below a megabyte — exact condition: 8 bytes × 24² × a few tens of matrices.
#[test]
fn stage_estimates_cover_scf_integrals_and_amplitudes() {
    let m = parse_xyz(
        "3\nwater\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0 -0.7572 -0.4692\n",
        LengthUnit::Angstrom,
    )
    .unwrap();
    let b = bandcast::basis::load("cc-pVDZ", &m, None).unwrap();
    let e = stage_estimates(&m, &b, &opts(1e9), Method::EomCcsd);
    for key in ["SCF matrices", "MO integrals", "CC amplitudes", "peak"] {
        assert!(e.iter().any(|s| s.stage.contains(key)), "{key}: {e:?}");
    }
    assert!(e.iter().all(|s| s.bytes > 0.0));
    assert!(e[0].bytes < 1e6 && e[0].bytes > 8.0 * 24.0 * 24.0 * 10.0);
    let ep2 = stage_estimates(&m, &b, &opts(1e9), Method::Ep2);
    assert!(ep2.iter().any(|s| s.stage.starts_with("ep2: MO integrals")));
}

/// Control for the poisoned basis: with an ample budget the same kind of job gets past the
/// estimates and into the SCF, where the NaN integrals stop it with something other than
/// a memory refusal (a computation error, NaN energies, or the eigensolver's panic on a NaN
/// matrix) — so a `TooLarge` above can only come from before the integrals.
#[test]
fn control_poisoned_basis_fails_inside_the_scf() {
    let m = parse_xyz(
        "3\nwater\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0 -0.7572 -0.4692\n",
        LengthUnit::Angstrom,
    )
    .unwrap();
    let b = bandcast::basis::load("cc-pVDZ", &m, None).unwrap();
    let p = poisoned(&b);
    let r = std::panic::catch_unwind(|| predict_default(&m, &p, &opts(1e9)));
    match r {
        Err(_) => {} // panicked inside the SCF on the NaN integrals
        Ok(Err(Error::TooLarge(m))) => panic!("not a memory matter: {m}"),
        Ok(Err(_)) => {}
        Ok(Ok((v, _))) => assert!(v.bands.iter().all(|b| !b.ie_ev.is_finite())),
    }
}
