//! Ionization energies from EOM-IP-CCSD and EOM-IP-MBPT2: the library entry point.
//!
//! Pipeline: closed-shell RHF orbitals → three-index factors of the two-electron integrals
//! (two_electron.rs: density fitting with the orbital set's fitting set by default, else
//! Cholesky) → active-space MO blocks (integrals.rs, frozen core by default; the ladder
//! integrals of ladder.rs when CCSD is run and they fit) → ground-state amplitudes (CCSD, ccsd.rs; or
//! first-order MP2 doubles with T1 = 0 for EOM-IP-MBPT2, Stanton & Gauss, J. Chem. Phys. 103
//! (1995) 1064; Lange & Berkelbach, J. Chem. Theory Comput. 14 (2018) 4224) → H̄ elements
//! (eom_ip_intermediates.rs) → Davidson (davidson.rs) on the spin-adapted 1h + 2h1p sigma
//! vectors (eom_ip_sigma.rs; Stanton & Gauss, J. Chem. Phys. 101 (1994) 8938).
//!
//! Each state reports its IE, the dominant occupied orbital of R1, and the one-hole weight
//! |R1|² / (|R1|² + |R2|²) in the spin-orbital metric (eom_ip_sigma.rs; checked against
//! determinant-space eigenvectors in brute_force.rs): near 1 for a
//! Koopmans-like band, clearly smaller for bands whose intensity is shared with satellites
//! (inner valence). Predicted energies guide the reading of a measured spectrum; they do not
//! replace it.

use crate::basis::BasisSet;
use crate::chem::frozen_core::frozen_orbitals;
use crate::chem::Molecule;
use crate::scf::{Reference, Wavefunction};
use crate::units::HARTREE_TO_EV;
use crate::{Error, Result};

use super::ccsd::{self, CcsdOptions};
use super::davidson::{self, DavidsonOptions};
use super::eom_ip_intermediates::IpHbar;
use super::eom_ip_sigma::{self, IpSpace};
use super::eom_roots::{self, RootOutcome, RootWarning};
use super::integrals::MoIntegrals;
use super::memory::{self, FactorRoute, Stage};
use super::mp2;
use super::stages::{StageClock, StageRecord};
use super::tensor::Tensor;
use super::two_electron::{self, Resolved, TwoElectron};

/// Ground-state amplitudes the EOM eigenproblem is built on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EomMethod {
    /// CCSD T1 and T2 (EOM-IP-CCSD).
    Ccsd,
    /// First-order T2, T1 = 0 (EOM-IP-MBPT2).
    Mbpt2,
}

impl EomMethod {
    pub fn name(self) -> &'static str {
        match self {
            EomMethod::Ccsd => "eom-ccsd",
            EomMethod::Mbpt2 => "eom-mp2",
        }
    }
}

/// Which ionized states to solve for.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum RootSpec {
    /// The n lowest ionization energies.
    Lowest(usize),
    /// One state started from each of these occupied MOs (0-based MO indices, as in the
    /// wavefunction), followed by maximum overlap — for inner-valence bands.
    Orbitals(Vec<usize>),
}

#[derive(Debug, Clone)]
pub struct EomOptions {
    pub method: EomMethod,
    pub roots: RootSpec,
    /// Keep the chemical core uncorrelated (He-like 1s for Li–Ne, Ne-like for Na–Ar, …).
    pub frozen_core: bool,
    /// Treatment of the two-electron integrals (density fitting by default).
    pub two_electron: TwoElectron,
    /// Threshold of the Cholesky decomposition of the AO integrals (hartree), when that
    /// route is used.
    pub cholesky_threshold: f64,
    /// Reset the peak-memory mark at every stage so each stage reports its own peak
    /// (benchmarks; otherwise each stage reports the process peak so far).
    pub stage_peaks: bool,
    pub ccsd: CcsdOptions,
    pub davidson: DavidsonOptions,
    /// Memory budget in bytes; None: what the operating system reports as available.
    pub memory_budget: Option<f64>,
}

impl Default for EomOptions {
    fn default() -> Self {
        EomOptions {
            method: EomMethod::Ccsd,
            roots: RootSpec::Lowest(5),
            frozen_core: true,
            two_electron: TwoElectron::Auto,
            cholesky_threshold: 1e-5,
            stage_peaks: false,
            ccsd: CcsdOptions::default(),
            davidson: DavidsonOptions::default(),
            memory_budget: None,
        }
    }
}

#[derive(Debug, Clone)]
pub struct IonizedState {
    /// Vertical ionization energy.
    pub ie_hartree: f64,
    pub ie_ev: f64,
    /// MO index (0-based, full MO list) with the largest |R1_i|².
    pub dominant_orbital: usize,
    /// |R1_dominant|² / |R1|².
    pub dominant_fraction: f64,
    /// Σ_i |R1_i|² / (|R1|² + |R2|²) in the spin-orbital metric.
    pub one_hole_weight: f64,
    /// R1 over all occupied MOs (frozen core entries 0), unit norm.
    pub r1: Vec<f64>,
    /// Irreducible representation of the dominant orbital, when the caller labels it.
    pub symmetry: Option<String>,
    pub method: &'static str,
    pub converged: bool,
    pub residual: f64,
    /// How the Davidson root ended (eom_roots.rs).
    pub outcome: RootOutcome,
}

/// Everything the run produced besides the states.
#[derive(Debug, Clone)]
pub struct EomReport {
    pub states: Vec<IonizedState>,
    pub method: EomMethod,
    pub e_scf: f64,
    pub e_mp2_corr: f64,
    /// CCSD correlation energy (EOM-IP-CCSD only).
    pub e_ccsd_corr: Option<f64>,
    pub ccsd_iterations: usize,
    pub n_frozen: usize,
    pub n_active_occupied: usize,
    pub n_virtual: usize,
    /// Number of three-index factors (auxiliary functions or Cholesky vectors).
    pub n_factors: usize,
    /// Whether the factors come from density fitting (else Cholesky).
    pub density_fitted: bool,
    /// Peak memory estimate (bytes) of the plan.
    pub memory_estimate: f64,
    /// Human-readable notes on how the job was run (integral treatment, storage).
    pub notes: Vec<String>,
    /// Wall time, CPU time and peak memory per stage, in order: "factors", "MO blocks",
    /// "ground state", "EOM setup" (H̄ elements), "EOM solve" (Davidson).
    pub stages: Vec<StageRecord>,
}

impl EomReport {
    /// Wall seconds of the stages named `name`.
    pub fn seconds(&self, name: &str) -> f64 {
        self.stages
            .iter()
            .filter(|r| r.name == name)
            .map(|r| r.wall_seconds)
            .sum()
    }
}

/// Energies for chosen orbitals (one targeted EOM root per orbital, in the given order) as
/// (IE hartree, one-hole weight) — None for a root that did not converge —, plus notes on
/// how the job was run and warnings about roots that did not converge, converged only to the
/// inner-valence threshold or ended on another orbital (eom_roots::RootWarning). Used by
/// `ionization::valence` for `--method eom-ccsd|eom-mp2`.
#[allow(clippy::type_complexity, clippy::too_many_arguments)]
pub fn band_energies(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    orbitals: &[usize],
    method: EomMethod,
    frozen_core: bool,
    memory_bytes: Option<f64>,
    two_electron: &TwoElectron,
) -> Result<(Vec<Option<(f64, f64)>>, Vec<String>, Vec<String>)> {
    let opts = EomOptions {
        method,
        roots: RootSpec::Orbitals(orbitals.to_vec()),
        frozen_core,
        memory_budget: memory_bytes,
        two_electron: two_electron.clone(),
        ..Default::default()
    };
    let rep = ionize_report(mol, basis, wfn, &opts, &mut |_| {})?;
    let mut notes = rep.notes.clone();
    if let Some(e) = rep.e_ccsd_corr {
        notes.push(format!(
            "CCSD correlation energy {e:.8} Eh ({} iterations); MP2 {:.8} Eh",
            rep.ccsd_iterations, rep.e_mp2_corr
        ));
    } else {
        notes.push(format!("MP2 correlation energy {:.8} Eh", rep.e_mp2_corr));
    }
    // --- per-root outcomes (eom_roots.rs) ---
    let warnings: Vec<RootWarning> = rep
        .states
        .iter()
        .zip(orbitals)
        .flat_map(|(s, &m)| eom_roots::warnings(s, m, &opts.davidson))
        .collect();
    Ok((
        rep.states
            .iter()
            .map(|s| {
                s.outcome
                    .usable()
                    .then_some((s.ie_hartree, s.one_hole_weight))
            })
            .collect(),
        notes,
        warnings.iter().map(|w| w.to_string()).collect(),
    ))
}

/// Library entry: ionized states of a closed-shell molecule.
pub fn ionize(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    opts: &EomOptions,
) -> Result<Vec<IonizedState>> {
    Ok(ionize_report(mol, basis, wfn, opts, &mut |_| {})?.states)
}

/// As [`ionize`], with the run's details and a log sink for progress lines.
pub fn ionize_report(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    opts: &EomOptions,
    log: &mut dyn FnMut(&str),
) -> Result<EomReport> {
    if wfn.reference != Reference::Rhf || wfn.n_alpha() != wfn.n_beta() {
        return Err(Error::input(
            "EOM-IP-CCSD / EOM-IP-MBPT2 need a closed-shell RHF reference (even electron \
             count, singlet)",
        ));
    }
    if !wfn.converged {
        return Err(Error::computation(
            "the SCF reference is not converged; correlated IEs would be meaningless",
        ));
    }
    let n = basis.n_basis;
    let c = &wfn.c_alpha;
    let nmo = c.ncols();
    let nocc = wfn.n_alpha();
    let n_frozen = if opts.frozen_core {
        frozen_orbitals(mol, nocc)
    } else {
        0
    };
    let o = nocc - n_frozen;
    let v = nmo - nocc;
    if o == 0 || v == 0 {
        return Err(Error::input(
            "EOM-IP needs at least one correlated occupied and one virtual orbital",
        ));
    }
    // occupied MOs must be the first nocc columns (Aufbau RHF)
    if wfn.occ_alpha.iter().take(nocc).any(|&x| x < 0.5) {
        return Err(Error::input(
            "EOM-IP expects Aufbau occupations (the lowest orbitals occupied)",
        ));
    }
    let stage = match opts.method {
        EomMethod::Ccsd => Stage::EomCcsd,
        EomMethod::Mbpt2 => Stage::EomMbpt2,
    };
    let budget = opts
        .memory_budget
        .unwrap_or_else(|| 0.8 * crate::system::available_bytes());
    let how = two_electron::resolve(&opts.two_electron, mol, basis, opts.cholesky_threshold)?;
    let route = match &how {
        Resolved::Fitted(aux) => FactorRoute::Fitted(aux.n_basis),
        Resolved::Cholesky(tau) => {
            FactorRoute::Cholesky(memory::expected_cholesky_vectors(n, *tau))
        }
    };
    let plan = memory::plan(
        stage,
        n,
        o,
        v,
        route,
        opts.ccsd.diis_size,
        opts.davidson.max_subspace,
        budget,
    )?;
    log(&format!(
        "{}: {} basis functions, {} frozen core, {} correlated occupied, {} virtual; \
         memory estimate {} of {}",
        opts.method.name(),
        n,
        n_frozen,
        o,
        v,
        crate::system::format_bytes(plan.peak_bytes),
        crate::system::format_bytes(budget)
    ));
    // Roots.
    let targets: Option<Vec<usize>> = match &opts.roots {
        RootSpec::Lowest(k) if *k == 0 => return Ok(empty_report(opts, wfn, n_frozen, o, v)),
        RootSpec::Lowest(_) => None,
        RootSpec::Orbitals(list) => {
            for &m in list {
                if m >= nocc {
                    return Err(Error::input(format!(
                        "orbital {} is not occupied (the molecule has {nocc} occupied orbitals)",
                        m + 1
                    )));
                }
                if m < n_frozen {
                    return Err(Error::input(format!(
                        "orbital {} is in the frozen core; use --all-electron to target it",
                        m + 1
                    )));
                }
            }
            Some(list.iter().map(|&m| m - n_frozen).collect())
        }
    };

    // Integrals.
    let mut clock = StageClock::new(opts.stage_peaks);
    let c_occ: Vec<f64> = (0..n)
        .flat_map(|mu| (n_frozen..nocc).map(move |i| (mu, i)))
        .map(|(mu, i)| c[(mu, i)])
        .collect();
    let c_vir: Vec<f64> = (0..n)
        .flat_map(|mu| (nocc..nmo).map(move |a| (mu, a)))
        .map(|(mu, a)| c[(mu, a)])
        .collect();
    let (factors, factor_note) = two_electron::mo_factors(
        &how,
        basis,
        &c_occ,
        o,
        &c_vir,
        v,
        plan.max_cholesky_vectors,
        log,
    )?;
    let n_factors = factors.naux;
    log(&clock.finish("factors").describe());
    let na = o + v;
    let eps = &wfn.eps_alpha;
    let fock = Tensor::from_fn(&[na, na], |x| {
        if x[0] == x[1] {
            eps[n_frozen + x[0]]
        } else {
            0.0
        }
    });
    let store_ladder = plan.store_vvvv && opts.method == EomMethod::Ccsd;
    let ints = MoIntegrals::new(factors, &fock, plan.store_ovvv, store_ladder);
    log(&clock.finish("MO blocks").describe());
    let mut notes = vec![factor_note];
    notes.push(format!(
        "(ov|vv) block {}{}",
        if plan.store_ovvv {
            "stored"
        } else {
            "rebuilt in slices"
        },
        match opts.method {
            EomMethod::Ccsd if store_ladder => "; particle-particle ladder from stored (vv|vv)",
            EomMethod::Ccsd => {
                "; particle-particle ladder generated from the factors every iteration \
                 ((vv|vv) does not fit the memory budget)"
            }
            EomMethod::Mbpt2 => "",
        }
    ));
    if n_frozen > 0 {
        let plural = if n_frozen == 1 { "" } else { "s" };
        notes.push(format!("frozen core: {n_frozen} orbital{plural}"));
    } else {
        notes.push("all electrons correlated".into());
    }

    // Ground state.
    let (t1, t2, e_cc, iters, e_mp2) = match opts.method {
        EomMethod::Ccsd => {
            let r = ccsd::solve(&ints, &opts.ccsd, log)?;
            (r.t1, r.t2, Some(r.e_corr), r.iterations, r.e_mp2)
        }
        EomMethod::Mbpt2 => {
            let (e_mp2, t2) = mp2::mp2(&ints);
            log(&format!("MP2 correlation energy {e_mp2:.10} Eh"));
            (Tensor::zeros(&[o, v]), t2, None, 0, e_mp2)
        }
    };
    log(&clock.finish("ground state").describe());
    // EOM.
    let hbar = IpHbar::new(ints, &t1, t2);
    log(&clock.finish("EOM setup").describe());
    let space = IpSpace { nocc: o, nvir: v };
    let diag = eom_ip_sigma::diagonal(&hbar, &space);
    let dim = space.dim();
    let _ = dim;
    // --- roots: guesses, homing and inner-valence thresholds (eom_roots.rs) ---
    let lowest = match opts.roots {
        RootSpec::Lowest(k) => k,
        RootSpec::Orbitals(_) => 0,
    };
    let (guesses, nroots, selection) = eom_roots::guesses(&space, targets.as_deref(), lowest);
    let mut apply = |xs: &[Vec<f64>]| -> Vec<Vec<f64>> {
        xs.iter()
            .map(|x| eom_ip_sigma::sigma(&hbar, &space, x))
            .collect()
    };
    let pairs = davidson::solve_with(
        &mut apply,
        &diag,
        guesses,
        nroots,
        selection,
        &opts.davidson,
        &|_, x| eom_roots::is_inner_valence(&space, x),
        log,
    )?;
    let mut states: Vec<IonizedState> = pairs
        .into_iter()
        .map(|p| {
            let outcome = RootOutcome::of(&p, &space, &opts.davidson);
            let (n1, n2) = space.metric_norms(&p.vector);
            let mut r1 = vec![0.0; nocc];
            let nr1 = n1.sqrt().max(1e-300);
            for i in 0..o {
                r1[n_frozen + i] = p.vector[i] / nr1;
            }
            let (dom, frac) = r1
                .iter()
                .enumerate()
                .map(|(i, x)| (i, x * x))
                .max_by(|a, b| a.1.total_cmp(&b.1))
                .unwrap_or((0, 0.0));
            IonizedState {
                ie_hartree: p.value,
                ie_ev: p.value * HARTREE_TO_EV,
                dominant_orbital: dom,
                dominant_fraction: frac,
                one_hole_weight: n1 / (n1 + n2),
                r1,
                symmetry: None,
                method: opts.method.name(),
                converged: p.converged,
                residual: p.residual,
                outcome,
            }
        })
        .collect();
    if targets.is_none() {
        // lowest roots come back ascending; targeted roots keep the order of the targets
        states.sort_by(|a, b| a.ie_hartree.total_cmp(&b.ie_hartree));
    }
    log(&clock.finish("EOM solve").describe());
    for s in &states {
        log(&format!(
            "{} state: IE {:.4} eV, orbital {}, one-hole weight {:.3}",
            opts.method.name(),
            s.ie_ev,
            s.dominant_orbital + 1,
            s.one_hole_weight
        ));
    }
    Ok(EomReport {
        states,
        method: opts.method,
        e_scf: wfn.energy,
        e_mp2_corr: e_mp2,
        e_ccsd_corr: e_cc,
        ccsd_iterations: iters,
        n_frozen,
        n_active_occupied: o,
        n_virtual: v,
        n_factors,
        density_fitted: how.is_fitted(),
        memory_estimate: plan.peak_bytes,
        notes,
        stages: clock.records,
    })
}

fn empty_report(opts: &EomOptions, wfn: &Wavefunction, nf: usize, o: usize, v: usize) -> EomReport {
    EomReport {
        states: Vec::new(),
        method: opts.method,
        e_scf: wfn.energy,
        e_mp2_corr: 0.0,
        e_ccsd_corr: None,
        ccsd_iterations: 0,
        n_frozen: nf,
        n_active_occupied: o,
        n_virtual: v,
        n_factors: 0,
        density_fitted: false,
        memory_estimate: 0.0,
        notes: Vec::new(),
        stages: Vec::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{Atom, Molecule};

    /// The program's RHF (scf::run), converged tightly for the reference values below.
    fn rhf(mol: &Molecule, basis: &crate::basis::BasisSet) -> Wavefunction {
        let opts = crate::scf::ScfOptions {
            e_tol: 1e-12,
            commutator_tol: 1e-10,
            screening: 1e-14,
            ..Default::default()
        };
        crate::scf::run(mol, basis, &opts).unwrap()
    }

    use crate::chem::fixtures::crawford_water as water;

    /// Water/STO-3G, all electrons: CCSD correlation energy −0.070680088376 Eh and MP2
    /// −0.049149636120 Eh (Crawford group Programming Projects #5 and #4, same geometry as
    /// their SCF project; from memory — tolerance 1e-6 Eh allows for a slip in the last
    /// digits; the SCF energy −74.942079928192 Eh is in docs/reference-data.md §1).
    #[test]
    fn water_sto3g_ccsd_and_mp2() {
        let mol = water();
        let basis = crate::basis::load("sto-3g", &mol, None).unwrap();
        let wfn = rhf(&mol, &basis);
        assert!(
            (wfn.energy - -74.942079928192).abs() < 1e-6,
            "SCF {}",
            wfn.energy
        );
        let opts = EomOptions {
            frozen_core: false,
            two_electron: TwoElectron::Cholesky,
            cholesky_threshold: 1e-10,
            roots: RootSpec::Lowest(2),
            ..Default::default()
        };
        let rep = ionize_report(&mol, &basis, &wfn, &opts, &mut |l| eprintln!("{l}")).unwrap();
        eprintln!("MP2 {} CCSD {:?}", rep.e_mp2_corr, rep.e_ccsd_corr);
        assert!((rep.e_mp2_corr - -0.049149636120).abs() < 1e-6);
        assert!((rep.e_ccsd_corr.unwrap() - -0.070680088376).abs() < 1e-6);
        assert_eq!(rep.states.len(), 2);
        // The HOMO (1b1, MO 5) ionizes first, then 3a1 (MO 4).
        assert_eq!(rep.states[0].dominant_orbital, 4);
        assert_eq!(rep.states[1].dominant_orbital, 3);
        assert!(rep.states[0].one_hole_weight > 0.85);
    }

    /// For two electrons CCSD is exact and the 1h + 2h1p space is the whole one-electron
    /// space of the cation, so every EOM-IP-CCSD root equals λ_k(h) + E_nuc − E_FCI with λ_k
    /// the eigenvalues of the core Hamiltonian (exact in the basis; textbook identity).
    #[test]
    fn two_electrons_are_exact() {
        use crate::integrals::{kinetic, nuclear, overlap};
        let mol = Molecule::new(vec![
            Atom {
                z: 1,
                position: [0.0, 0.0, -0.7],
            },
            Atom {
                z: 1,
                position: [0.0, 0.0, 0.7],
            },
        ]);
        let basis = crate::basis::load("def2-svp", &mol, None).unwrap();
        let wfn = rhf(&mol, &basis);
        let opts = EomOptions {
            two_electron: TwoElectron::Cholesky,
            cholesky_threshold: 1e-11,
            roots: RootSpec::Lowest(1),
            ccsd: CcsdOptions {
                r_tol: 1e-10,
                e_tol: 1e-11,
                ..Default::default()
            },
            davidson: DavidsonOptions {
                r_tol: 1e-8,
                e_tol: 1e-10,
                ..Default::default()
            },
            ..Default::default()
        };
        let rep = ionize_report(&mol, &basis, &wfn, &opts, &mut |_| {}).unwrap();
        let s = overlap(&basis);
        let mut h = kinetic(&basis);
        let v = nuclear(&basis, &mol);
        let n = basis.n_basis;
        for i in 0..n {
            for j in 0..n {
                h[(i, j)] += v[(i, j)];
            }
        }
        // generalized eigenproblem through the MO basis (orthonormal columns of C)
        let hm = bandcast_linalg::congruence(wfn.c_alpha.as_ref(), h.as_ref());
        let (lam, _) = bandcast_linalg::eigh(hm.as_ref());
        let _ = s;
        let e_fci = wfn.energy + rep.e_ccsd_corr.unwrap();
        let exact = lam[0] + wfn.nuclear_repulsion - e_fci;
        assert!(
            (rep.states[0].ie_hartree - exact).abs() < 1e-8,
            "{} vs {exact}",
            rep.states[0].ie_hartree
        );
        // EOM-IP-MBPT2 is not exact but close for H2.
        let m = EomOptions {
            method: EomMethod::Mbpt2,
            ..opts
        };
        let rm = ionize_report(&mol, &basis, &wfn, &m, &mut |_| {}).unwrap();
        assert!((rm.states[0].ie_hartree - exact).abs() < 0.01);
        assert!((rm.states[0].ie_hartree - exact).abs() > 1e-6);
    }
}
