//! Coupled cluster on open-shell and other non-closed-shell references: CCSD and (T) on
//! UHF, ROHF (semicanonical) and core-hole (MOM) determinants, in spin blocks.
//!
//! An RHF reference (a closed-shell neutral) is passed on to the closed-shell CCSD and (T)
//! instead (closed_shell.rs): same energies, a fraction of the work.
//!
//! Files: reference.rs (orbital selection, Fock, semicanonical rotation), spin_blocks.rs (tensors held as their
//! spin-conserving blocks, contraction over blocks), spin_system.rs (integral blocks of each
//! spin case and the particle–particle ladder from the factors), uccsd.rs (amplitude
//! equations), utriples.rs ((T)), this file (memory plan, refusal, the one entry `run`).
//! spin_orbital.rs, ccsd.rs and triples.rs are the spin-orbital form of the same equations (every index over
//! α and β spin orbitals, a v⁴ block 16× the spatial one): kept as the independent check of
//! the spin-blocked code in tests (tests.rs), compiled for tests only.
//!
//! Size: the v⁴ ladder integrals are held (3 spatial v⁴ blocks) when they fit the budget,
//! otherwise rebuilt every iteration in batches from the factors, so the memory is bounded
//! by the o²v² amplitudes and the o v³ blocks.

#[cfg(test)]
pub mod ccsd;
mod closed_shell;
pub mod core_hole;
pub mod natural_virtuals;
pub mod reference;
pub mod spin_blocks;
#[cfg(test)]
pub mod spin_orbital;
pub mod spin_system;
#[cfg(test)]
pub mod triples;
pub mod uccsd;
pub mod utriples;

#[cfg(test)]
mod tests;

use crate::basis::BasisSet;
use crate::chem::frozen_core::frozen_orbitals;
use crate::chem::Molecule;
use crate::correlation::two_electron::{self, Resolved, TwoElectron};
use crate::scf::Wavefunction;
use crate::{Error, Result};

pub use crate::correlation::ccsd::CcsdOptions;
pub use natural_virtuals::{CutPair, NaturalVirtuals};
pub use reference::Selection;

/// How the frozen core is chosen.
#[derive(Debug, Clone, PartialEq)]
pub enum FrozenCore {
    /// chem/frozen_core.rs's count for the molecule, the same in both spins.
    Standard,
    /// Correlate every electron.
    None,
    /// These many lowest occupied orbitals of each spin (α, β).
    Count([usize; 2]),
}

#[derive(Debug, Clone)]
pub struct OpenShellOptions {
    pub frozen_core: FrozenCore,
    /// Spatial virtual MO columns (α, β) removed from the correlation space.
    pub excluded_virtuals: [Vec<usize>; 2],
    /// A core-ionized reference whose emptied core orbital is the lowest virtual of this
    /// spin: the amplitudes are projected onto the core-ionized space (core_hole.rs).
    pub core_hole_spin: Option<usize>,
    pub triples: bool,
    pub two_electron: TwoElectron,
    pub cholesky_threshold: f64,
    /// Memory budget (bytes); None = 80 % of the available memory.
    pub memory_budget: Option<f64>,
    pub ccsd: CcsdOptions,
    /// Frozen natural orbitals: keep the MP2 natural virtuals holding this fraction of the
    /// virtual population (0 < x ≤ 1) and add the MP2 energy of the rest
    /// (natural_virtuals.rs). None: all virtuals.
    pub natural_virtuals: Option<f64>,
    /// Solve an RHF reference with the closed-shell CCSD and (T) (closed_shell.rs) rather
    /// than the spin-blocked equations: same energies, a fraction of the work. Off only to
    /// check one route against the other.
    pub closed_shell_route: bool,
}

impl Default for OpenShellOptions {
    fn default() -> Self {
        OpenShellOptions {
            frozen_core: FrozenCore::Standard,
            excluded_virtuals: [Vec::new(), Vec::new()],
            core_hole_spin: None,
            triples: true,
            two_electron: TwoElectron::Auto,
            cholesky_threshold: 1e-5,
            memory_budget: None,
            ccsd: CcsdOptions::default(),
            natural_virtuals: None,
            closed_shell_route: true,
        }
    }
}

#[derive(Debug, Clone)]
pub struct OpenShellResult {
    /// Energy of the reference determinant (the SCF energy).
    pub e_reference: f64,
    pub e_ccsd_corr: f64,
    /// (T) correction, when asked for.
    pub e_triples: Option<f64>,
    pub iterations: usize,
    /// Frozen occupied orbitals (α, β), active occupied and virtual spin orbitals.
    pub n_frozen: [usize; 2],
    pub nocc: usize,
    pub nvir: usize,
    pub semicanonical: bool,
    pub peak_estimate_bytes: f64,
    pub notes: Vec<String>,
    /// The natural-virtual cut, when asked for; its MP2 correction is part of `e_ccsd`.
    pub natural_virtuals: Option<NaturalVirtuals>,
}

impl OpenShellResult {
    pub fn e_ccsd(&self) -> f64 {
        self.e_reference
            + self.e_ccsd_corr
            + self
                .natural_virtuals
                .as_ref()
                .map_or(0.0, |n| n.correction())
    }
    pub fn e_ccsd_t(&self) -> Option<f64> {
        self.e_triples.map(|t| self.e_ccsd() + t)
    }
}

/// Peak estimate of a job of this size and whether the ladder integrals are held.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MemoryPlan {
    pub peak_bytes: f64,
    pub hold_ladder: bool,
}

/// Peak estimate for `naux` factors, `m` kept orbitals per spin (frozen included), `o`/`v`
/// active occupied/virtual orbitals per spin: the reference stage (prepared factors, active
/// factors, integral blocks and the largest block's temporaries), the CCSD stage (factors,
/// blocks, the held ladder integrals or one rebuilt batch, amplitudes/intermediates/DIIS)
/// and (T) (factors, blocks, t1/t2 and one task's arrays per thread). The ladder integrals
/// are held when that peak fits `budget` (bytes). Formulas in spin_system.rs, uccsd.rs and
/// utriples.rs.
pub fn estimate(
    naux: usize,
    m: [usize; 2],
    o: [usize; 2],
    v: [usize; 2],
    diis: usize,
    triples: bool,
    budget: f64,
) -> MemoryPlan {
    let nq = naux as f64;
    let (omax, vmax) = (o[0].max(o[1]) as f64, v[0].max(v[1]) as f64);
    let sq = |x: usize| (x * x) as f64;
    let fac_prep = nq * (sq(m[0]) + sq(m[1]));
    let fac = nq * (sq(o[0] + v[0]) + sq(o[1] + v[1]));
    let blocks = spin_system::block_words(o, v);
    let reference =
        (fac_prep + fac).max(fac + blocks + 2.0 * omax * vmax.powi(3) + nq * vmax * vmax);
    let amplitudes = uccsd::peak_words(o, v, diis);
    let batch = vmax.powi(4).min((1u64 << 25) as f64 + vmax.powi(3));
    let batched = fac + blocks + 3.0 * batch + amplitudes;
    // the store is filled batch by batch: one batch and the factor slabs beside it
    let fill = spin_system::ladder_batch_words(v) + 2.0 * nq * vmax * vmax;
    let held = fac + blocks + spin_system::ladder_words(v) + amplitudes.max(fill);
    let t = if triples {
        fac + blocks
            + 2.0 * uccsd::t2_words(o, v)
            + rayon::current_num_threads() as f64 * utriples::task_words(vmax as usize)
    } else {
        0.0
    };
    let with_store = 8.0 * reference.max(held).max(t);
    if with_store <= budget {
        MemoryPlan {
            peak_bytes: with_store,
            hold_ladder: true,
        }
    } else {
        MemoryPlan {
            peak_bytes: 8.0 * reference.max(batched).max(t),
            hold_ladder: false,
        }
    }
}

/// Whether `run` takes the closed-shell route (closed_shell.rs) for this reference.
fn closed_route(opts: &OpenShellOptions, wfn: &Wavefunction, nf: [usize; 2]) -> bool {
    opts.closed_shell_route
        && wfn.reference == crate::scf::Reference::Rhf
        && nf[0] == nf[1]
        && opts.excluded_virtuals.iter().all(|x| x.is_empty())
        && opts.core_hole_spin.is_none()
}

/// The memory plan of the route `run` takes: closed_shell.rs's estimate on the closed-shell
/// route, `estimate` (spin blocks) otherwise.
fn route_plan(
    closed: bool,
    naux: usize,
    m: [usize; 2],
    o: [usize; 2],
    v: [usize; 2],
    opts: &OpenShellOptions,
    budget: f64,
) -> MemoryPlan {
    let diis = opts.ccsd.diis_size;
    if closed {
        let (peak_bytes, hold_ladder, _) =
            closed_shell::estimate(naux, m[0], o[0], v[0], diis, opts.triples, budget);
        MemoryPlan {
            peak_bytes,
            hold_ladder,
        }
    } else {
        estimate(naux, m, o, v, diis, opts.triples, budget)
    }
}

/// Before a natural-virtual cut only its own stage is known: the factors over all orbitals
/// (twice, during the cut), each occupied orbital's B^Q_ia and the per-thread pair
/// matrices. The coupled-cluster stage is planned again with the kept sizes (`run`), before
/// any coupled-cluster work.
fn natural_virtual_stage(naux: usize, m: [usize; 2], o: [usize; 2], v: [usize; 2]) -> MemoryPlan {
    let nq = naux as f64;
    let vmax = v[0].max(v[1]) as f64;
    let fac_prep = nq * ((m[0] * m[0]) as f64 + (m[1] * m[1]) as f64);
    let rows = nq * ((o[0] * v[0]) as f64 + (o[1] * v[1]) as f64);
    let temps = (rayon::current_num_threads() as f64 * 5.0 + 4.0) * vmax * vmax;
    MemoryPlan {
        peak_bytes: 8.0 * (2.0 * fac_prep + rows + temps),
        hold_ladder: false,
    }
}

/// Room (bytes) the Cholesky decomposition of the AO integrals needs beside the planned peak
/// for `naux` expected vectors: twice the vectors (the margin `run` keeps when it bounds the
/// vector count) and two 256-column batches; 0 for density fitting.
fn cholesky_room_bytes(how: &Resolved, n_basis: usize, naux: usize) -> f64 {
    match how {
        Resolved::Cholesky(_) => {
            let npair = (n_basis * (n_basis + 1) / 2) as f64;
            8.0 * npair * (2.0 * naux as f64 + 2.0 * 256.0)
        }
        Resolved::Fitted(_) => 0.0,
    }
}

/// The least memory (bytes) the coupled cluster of a state with `n_basis` functions and
/// `occ` occupied orbitals per spin (all correlated) needs, before any wavefunction exists:
/// the smallest stage plan (ladder integrals rebuilt in batches; with natural virtuals the
/// cut's own stage) plus the Cholesky decomposition of the AO integrals at threshold `tau`.
/// The core-level run refuses an explicit coupled cluster on this before any SCF.
pub fn preflight_bytes(
    n_basis: usize,
    occ: [usize; 2],
    triples: bool,
    natural_virtuals: bool,
    tau: f64,
) -> f64 {
    let how = Resolved::Cholesky(tau);
    let naux = how.expected_rank(n_basis);
    let m = [n_basis, n_basis];
    let v = [
        n_basis.saturating_sub(occ[0]),
        n_basis.saturating_sub(occ[1]),
    ];
    let opts = OpenShellOptions {
        triples,
        ..OpenShellOptions::default()
    };
    let stage = if natural_virtuals {
        natural_virtual_stage(naux, m, occ, v)
    } else {
        route_plan(false, naux, m, occ, v, &opts, 0.0)
    };
    stage.peak_bytes + cholesky_room_bytes(&how, n_basis, naux)
}

/// Frozen orbitals per spin for these options.
pub fn frozen_counts(mol: &Molecule, wfn: &Wavefunction, f: &FrozenCore) -> [usize; 2] {
    match f {
        FrozenCore::Standard => {
            let k = frozen_orbitals(mol, wfn.n_alpha().min(wfn.n_beta()));
            [k, k]
        }
        FrozenCore::None => [0, 0],
        FrozenCore::Count(c) => *c,
    }
}

/// The memory estimate for `wfn` under `opts`, or `Error::TooLarge` naming what is cheaper.
pub fn plan(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    opts: &OpenShellOptions,
) -> Result<(MemoryPlan, Resolved)> {
    if let Some(x) = opts.natural_virtuals {
        if !(x > 0.0 && x <= 1.0) {
            return Err(Error::input(format!(
                "the natural-virtual population to keep is a fraction above 0 and at most 1 \
                 (0.995 for 99.5 %), not {x}"
            )));
        }
    }
    let how = two_electron::resolve(&opts.two_electron, mol, basis, opts.cholesky_threshold)?;
    let nf = frozen_counts(mol, wfn, &opts.frozen_core);
    let sel = Selection {
        n_frozen: nf,
        excluded_virtuals: opts.excluded_virtuals.clone(),
    };
    let lists = reference::orbital_lists(wfn, &sel);
    let m = [
        lists[0].0.len() + lists[0].1.len(),
        lists[1].0.len() + lists[1].1.len(),
    ];
    let oo = [
        lists[0].0.len().saturating_sub(nf[0]),
        lists[1].0.len().saturating_sub(nf[1]),
    ];
    let vv = [lists[0].1.len(), lists[1].1.len()];
    let (o, v) = (oo[0] + oo[1], vv[0] + vv[1]);
    let naux = how.expected_rank(basis.n_basis);
    let budget = opts
        .memory_budget
        .unwrap_or_else(|| 0.8 * crate::system::available_bytes());
    let closed = closed_route(opts, wfn, nf);
    let mp = match opts.natural_virtuals {
        None => route_plan(closed, naux, m, oo, vv, opts, budget),
        Some(_) => natural_virtual_stage(naux, m, oo, vv),
    };
    let peak = mp.peak_bytes;
    let room = cholesky_room_bytes(&how, basis.n_basis, naux);
    if peak + room > budget {
        let hint = if opts.triples {
            "try CCSD without (T), ΔMP2 or ΔSCF, or a smaller basis"
        } else {
            "try ΔMP2 or ΔSCF, or a smaller basis"
        };
        return Err(Error::TooLarge(format!(
            "open-shell coupled cluster needs about {} of memory ({} basis functions, {o} \
             correlated occupied and {v} virtual spin orbitals, {naux} factors, with the \
             Cholesky decomposition of the integrals) but the budget is {}; {hint}",
            crate::system::format_bytes(peak + room),
            basis.n_basis,
            crate::system::format_bytes(budget)
        )));
    }
    Ok((mp, how))
}

/// CCSD (and (T)) energy of `wfn` (UHF, ROHF, or RHF treated as UHF).
pub fn run(
    mol: &Molecule,
    basis: &BasisSet,
    wfn: &Wavefunction,
    opts: &OpenShellOptions,
    log: &mut dyn FnMut(&str),
) -> Result<OpenShellResult> {
    if !wfn.converged {
        return Err(Error::computation(
            "the SCF reference is not converged; coupled cluster on it would be meaningless",
        ));
    }
    let (mp, how) = plan(mol, basis, wfn, opts)?;
    let peak = mp.peak_bytes;
    let nf = frozen_counts(mol, wfn, &opts.frozen_core);
    let sel = Selection {
        n_frozen: nf,
        excluded_virtuals: opts.excluded_virtuals.clone(),
    };
    let h = crate::scf::context::core_hamiltonian(basis, mol);
    let budget = opts
        .memory_budget
        .unwrap_or_else(|| 0.8 * crate::system::available_bytes());
    let npair = (basis.n_basis * (basis.n_basis + 1) / 2) as f64;
    let max_chol = ((budget - peak).max(0.0) / (8.0 * npair) / 2.0) as usize;
    let mut prepared = reference::prepare(basis, &h, wfn, &sel, &how, max_chol.max(1), log)?;
    let fno = opts
        .natural_virtuals
        .map(|x| natural_virtuals::truncate(&mut prepared, nf, x, opts.core_hole_spin));
    let closed = closed_route(opts, wfn, nf);
    let cut_stage_peak = if fno.is_some() { peak } else { 0.0 };
    let (mp, peak) = match &fno {
        None => (mp, peak),
        Some(cut) => {
            let f = &prepared.fac;
            let m = [f[0].m, f[1].m];
            let o = [f[0].nocc - nf[0], f[1].nocc - nf[1]];
            let v = [m[0] - f[0].nocc, m[1] - f[1].nocc];
            let after = route_plan(closed, f[0].naux, m, o, v, opts, budget);
            log(&format!(
                "natural virtuals: kept {}α+{}β of {}α+{}β ({:.2} % of the MP2 virtual \
                 population), MP2 correction {:.6} Eh",
                cut.kept[0],
                cut.kept[1],
                cut.full[0],
                cut.full[1],
                100.0 * cut.population,
                cut.correction()
            ));
            if after.peak_bytes > budget {
                return Err(Error::TooLarge(format!(
                    "open-shell coupled cluster needs about {} of memory after the \
                     natural-virtual cut ({}α+{}β of {}α+{}β virtuals kept) but the budget is \
                     {}; keep a smaller fraction of the virtual population, or use ΔMP2 or \
                     ΔSCF",
                    crate::system::format_bytes(after.peak_bytes),
                    cut.kept[0],
                    cut.kept[1],
                    cut.full[0],
                    cut.full[1],
                    crate::system::format_bytes(budget)
                )));
            }
            (after, peak.max(after.peak_bytes))
        }
    };
    if closed {
        let note = prepared.note.clone();
        let f = &prepared.fac[0];
        let (o, v) = (f.nocc - nf[0], f.m - f.nocc);
        let r = closed_shell::solve(prepared, nf[0], &opts.ccsd, opts.triples, budget, log)?;
        return Ok(OpenShellResult {
            e_reference: wfn.energy,
            e_ccsd_corr: r.e_ccsd_corr,
            e_triples: r.e_triples,
            iterations: r.iterations,
            n_frozen: nf,
            nocc: 2 * o,
            nvir: 2 * v,
            semicanonical: false,
            peak_estimate_bytes: r.peak_bytes.max(cut_stage_peak),
            notes: vec![
                note,
                "closed-shell reference: spin-adapted RHF CCSD and (T)".to_string(),
            ],
            natural_virtuals: fno,
        });
    }
    let (mut sys, note) = spin_system::build_prepared(prepared, &sel, mp.hold_ladder)?;
    let (nocc, nvir) = (sys.o[0] + sys.o[1], sys.v[0] + sys.v[1]);
    log(&format!(
        "open-shell CCSD (spin blocks): {}α+{}β correlated occupied and {}α+{}β virtual \
         orbitals, frozen {}α/{}β; ladder integrals {}; memory estimate {}",
        sys.o[0],
        sys.o[1],
        sys.v[0],
        sys.v[1],
        nf[0],
        nf[1],
        if mp.hold_ladder {
            "held"
        } else {
            "rebuilt in batches each iteration"
        },
        crate::system::format_bytes(peak)
    ));
    let hole = match opts.core_hole_spin {
        Some(s) => {
            let h = core_hole::CoreHole::locate(&sys, s)?;
            log(&format!(
                "core-valence separation: hole = virtual {} of spin {}, partner = occupied {} \
                 of the other spin",
                h.hole,
                if s == 0 { "α" } else { "β" },
                h.partner
            ));
            Some(h)
        }
        None => None,
    };
    let cc = uccsd::solve(&sys, &opts.ccsd, hole.as_ref(), log)?;
    sys.ladder_store = None;
    let e_t = opts.triples.then(|| {
        let (no, nv) = (sys.o[0] + sys.o[1], sys.v[0] + sys.v[1]);
        log(&format!(
            "(T): {} occupied spin-orbital triples over {nv} virtual spin orbitals",
            no * no.saturating_sub(1) * no.saturating_sub(2) / 6
        ));
        let start = std::time::Instant::now();
        let e = utriples::correction(&sys, &cc.t1, &cc.t2, hole.as_ref());
        log(&format!(
            "(T) correction {e:.10} Eh ({:.1} s); CCSD(T) correlation energy {:.10} Eh",
            start.elapsed().as_secs_f64(),
            cc.e_corr + e
        ));
        e
    });
    let mut notes = vec![note];
    if sys.semicanonical {
        notes.push(
            "ROHF reference: semicanonical orbitals, f_ia terms kept in CCSD and (T) (Watts, \
             Gauss & Bartlett, J. Chem. Phys. 98 (1993) 8718)"
                .to_string(),
        );
    }
    Ok(OpenShellResult {
        e_reference: wfn.energy,
        e_ccsd_corr: cc.e_corr,
        e_triples: e_t,
        iterations: cc.iterations,
        n_frozen: nf,
        nocc,
        nvir,
        semicanonical: sys.semicanonical,
        peak_estimate_bytes: peak,
        notes,
        natural_virtuals: fno,
    })
}
