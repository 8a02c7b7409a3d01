//! Running an SCF on a molecule: one-electron integrals, orthogonalisation, the choice of
//! Fock builder, guesses and occupations, and the finished `Wavefunction`.
//!
//! `ScfContext` keeps what does not depend on the electron count (S, h, X, the ERI engine,
//! the in-core integral store, the SAD density), so ΔSCF work can run many SCFs on the same
//! nuclei and basis (the neutral, then cations with holes from `Guess::Orbitals` +
//! `Occupation::Mom`) without recomputing integrals.

use std::collections::HashMap;
use std::time::Instant;

use bandcast_linalg::Mat;

pub use super::df_start::DfStartRecord;
use super::driver::{self, IterationInfo, Problem, Start};
use super::fock::quartets::QuartetPlan;
use super::fock::source::{EngineSource, EriSource};
use super::fock::{DfFock, DirectFock, FockBuilder, InCoreFock};
use super::guess;
use super::occupation;
use super::options::{DfStart, FockMethod, Guess, Occupation, Reference, ScfOptions};
use super::orthogonalize::Orthogonalizer;
use super::spin::s_squared;
use super::symmetrise::SymmetrisedFock;
use super::wavefunction::Wavefunction;
use crate::basis::BasisSet;
use crate::chem::{Atom, Molecule};
use crate::error::{Error, Result};
use crate::integrals::{self, EriEngine};

/// Core Hamiltonian h = T + V (kinetic plus nuclear attraction), AO basis.
pub fn core_hamiltonian(basis: &BasisSet, mol: &Molecule) -> Mat<f64> {
    let t = integrals::kinetic(basis);
    let v = integrals::nuclear(basis, mol);
    &t + &v
}

/// Integrals and setup shared by SCF runs on one set of nuclei in one basis.
pub struct ScfContext {
    pub atoms: Vec<Atom>,
    pub basis: BasisSet,
    pub s: Mat<f64>,
    pub h: Mat<f64>,
    pub ortho: Orthogonalizer,
    pub engine: EriEngine,
    plan: Option<QuartetPlan>,
    incore: Option<InCoreFock>,
    df: Option<DfFock>,
    sad: Option<Mat<f64>>,
    /// Description of the Fock builder used by the last run.
    pub last_builder: String,
    /// What the last run did (builder, density-fitted start, timings).
    pub last_run: RunRecord,
    /// Wall seconds of the set-up steps of `ScfContext::new`.
    pub setup_timings: Vec<(String, f64)>,
}

/// In-core stores at least this large get a density-fitted start under `DfStart::Auto`:
/// each in-core build then reads gigabytes (≈ 1.3 CPU-s for benzene/def2-TZVPP's 4.85 GiB),
/// and the start replaces ~10 of them by 3.
const DF_START_MIN_IN_CORE_BYTES: usize = 1 << 30;

/// The auxiliary set for density-fitted J and K unless `ScfOptions::jk_fitting` names one.
pub const DEFAULT_JK_FITTING: &str = "def2-universal-JKFIT";

/// Which Fock builder a run uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BuilderChoice {
    /// Unique ERIs stored, optionally after converging with density fitting (large stores).
    InCore {
        df_start: bool,
    },
    /// Integral-direct, optionally after converging with density fitting.
    Direct {
        df_start: bool,
    },
    DensityFitted,
}

/// What one `ScfContext::run` did.
#[derive(Debug, Clone, Default)]
pub struct RunRecord {
    /// Description of the Fock builder of the final iterations.
    pub builder: String,
    /// J and K of the final iterations were density-fitted (the energy is not the
    /// exact-integral one).
    pub density_fitted: bool,
    /// The density-fitted start before exact iterations, if there was one.
    pub df_start: Option<DfStartRecord>,
    /// Why an automatic density-fitted start was not made (e.g. no fitting functions for
    /// an element).
    pub df_start_skipped: Option<String>,
    pub memory_budget_bytes: usize,
    /// Wall seconds per step (guess, integral storage, iterations, …) in order.
    pub timings: Vec<(String, f64)>,
}

fn problem<'a>(
    s: &'a Mat<f64>,
    h: &'a Mat<f64>,
    e_nuc: f64,
    ortho: &'a Orthogonalizer,
    n_alpha: usize,
    n_beta: usize,
) -> Problem<'a> {
    Problem {
        s,
        h,
        e_nuc,
        ortho,
        n_alpha,
        n_beta,
    }
}

/// Build the density-fitting tensor into `slot` unless it holds one for the same fitting set.
fn ensure_df(
    slot: &mut Option<DfFock>,
    record: &mut RunRecord,
    basis: &BasisSet,
    mol: &Molecule,
    opts: &ScfOptions,
) -> Result<()> {
    let name = opts.jk_fitting.as_deref().unwrap_or(DEFAULT_JK_FITTING);
    // A tensor already built for this name (e.g. a set made by the caller,
    // `ScfContext::prepare_density_fitting`) is kept.
    if slot.as_ref().is_some_and(|d| d.aux_name() == name) {
        return Ok(());
    }
    let aux = crate::basis::load_auxiliary(name, mol)?;
    if slot.as_ref().is_none_or(|d| d.aux_name() != aux.name) {
        *slot = None;
        let t = Instant::now();
        *slot = Some(DfFock::new(basis, &aux, opts.memory_budget_bytes)?);
        record.timings.push((
            "density-fitting integrals".into(),
            t.elapsed().as_secs_f64(),
        ));
    }
    Ok(())
}

/// The density-fitted start (`df_start.rs`) before exact iterations with `exact`; returns
/// the start of the exact iterations. When the fitting set does not cover the molecule or
/// its tensor does not fit the budget, nothing is done and `record` says why.
#[allow(clippy::too_many_arguments)]
fn df_start_with(
    slot: &mut Option<DfFock>,
    record: &mut RunRecord,
    basis: &BasisSet,
    problem: &Problem,
    exact: &mut dyn FockBuilder,
    mol: &Molecule,
    opts: &ScfOptions,
    start: Start,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<Start> {
    if let Err(e) = ensure_df(slot, record, basis, mol, opts) {
        record.df_start_skipped = Some(e.to_string());
        return Ok(start);
    }
    let df = slot.as_mut().expect("just built");
    let t = Instant::now();
    let (s, rec) = super::df_start::df_start(problem, df, exact, opts, start, log)?;
    record.df_start = Some(rec);
    record
        .timings
        .push(("density-fitted start".into(), t.elapsed().as_secs_f64()));
    // The tensor is not needed by the exact iterations.
    *slot = None;
    Ok(s)
}

/// Run `f`, recording its wall time as "iterations".
/// Iterations with exact integrals from `builder` (in-core or direct), after a
/// density-fitted start when `df_start` asks for one; the builder and the time are recorded.
#[allow(clippy::too_many_arguments)]
fn exact_iterations(
    df_slot: &mut Option<DfFock>,
    record: &mut RunRecord,
    basis: &BasisSet,
    problem: &Problem,
    builder: &mut dyn FockBuilder,
    df_start: bool,
    mol: &Molecule,
    opts: &ScfOptions,
    mut start: Start,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<driver::Solution> {
    if df_start {
        start = df_start_with(
            df_slot, record, basis, problem, builder, mol, opts, start, log,
        )?;
    }
    record.builder = builder.describe();
    timed(record, || {
        iterate_constrained(problem, builder, opts, start, log)
    })
}

/// The SCF iterations, with J and K built from symmetrised densities when the options ask
/// for a point-group constraint (`symmetrise.rs`).
fn iterate_constrained(
    problem: &Problem,
    builder: &mut dyn FockBuilder,
    opts: &ScfOptions,
    start: Start,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<driver::Solution> {
    match &opts.density_symmetry {
        Some(sym) => {
            let mut symmetrised = SymmetrisedFock::new(builder, sym.as_ref());
            driver::iterate(problem, &mut symmetrised, opts, start, log)
        }
        None => driver::iterate(problem, builder, opts, start, log),
    }
}

fn timed<T>(rec: &mut RunRecord, f: impl FnOnce() -> T) -> T {
    let t = Instant::now();
    let r = f();
    rec.timings
        .push(("iterations".into(), t.elapsed().as_secs_f64()));
    r
}

/// SCF on `mol` in `basis` (see `ScfOptions` for what can be asked).
pub fn run(mol: &Molecule, basis: &BasisSet, opts: &ScfOptions) -> Result<Wavefunction> {
    super::memory::check(basis.n_basis, opts)?;
    ScfContext::new(mol, basis, opts.lindep_threshold)?.run(mol, opts, &mut |_| {})
}

/// `run` with a callback receiving one `IterationInfo` per iteration (progress lines).
pub fn run_logged(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ScfOptions,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<Wavefunction> {
    super::memory::check(basis.n_basis, opts)?;
    ScfContext::new(mol, basis, opts.lindep_threshold)?.run(mol, opts, log)
}

impl ScfContext {
    pub fn new(mol: &Molecule, basis: &BasisSet, lindep_threshold: f64) -> Result<Self> {
        if mol.atoms.is_empty() {
            return Err(Error::input("the molecule has no atoms"));
        }
        if basis.n_basis == 0 {
            return Err(Error::input("the basis set has no functions"));
        }
        let mut setup_timings = Vec::new();
        let mut t = Instant::now();
        let mut lap = |name: &str, t: &mut Instant| {
            setup_timings.push((name.to_string(), t.elapsed().as_secs_f64()));
            *t = Instant::now();
        };
        let s = integrals::overlap(basis);
        let h = core_hamiltonian(basis, mol);
        lap("one-electron integrals", &mut t);
        let ortho = Orthogonalizer::canonical(&s, lindep_threshold)?;
        lap("orthogonalisation", &mut t);
        let engine = EriEngine::new(basis);
        lap("ERI engine and Schwarz bounds", &mut t);
        Ok(ScfContext {
            atoms: mol.atoms.clone(),
            basis: basis.clone(),
            s,
            h,
            ortho,
            engine,
            plan: None,
            incore: None,
            df: None,
            sad: None,
            last_builder: String::new(),
            last_run: RunRecord::default(),
            setup_timings,
        })
    }

    fn plan(&mut self, threshold: f64) -> &QuartetPlan {
        if self.plan.as_ref().is_none_or(|p| p.threshold != threshold) {
            let src = EngineSource::new(&self.engine, &self.basis);
            self.plan = Some(QuartetPlan::new(&src, threshold));
            self.incore = None;
        }
        self.plan.as_ref().expect("just built")
    }

    /// Bytes the in-core store needs at this screening threshold.
    pub fn in_core_bytes(&mut self, threshold: f64) -> usize {
        InCoreFock::estimate_bytes(self.plan(threshold))
    }

    /// The Fock builder `run` would use for these options (without building anything but
    /// the quartet list).
    pub fn choose_builder(&mut self, opts: &ScfOptions) -> BuilderChoice {
        let need = self.in_core_bytes(opts.screening);
        let fits = need <= opts.memory_budget_bytes;
        let from_scratch = !matches!(opts.guess, Guess::Orbitals { .. });
        let df_start = |auto: bool| match opts.df_start {
            DfStart::Always => true,
            DfStart::Never => false,
            DfStart::Auto => auto && from_scratch,
        } && opts.density_symmetry.is_none();
        let auto = opts.fock == FockMethod::Auto;
        match opts.fock {
            FockMethod::DensityFitted => BuilderChoice::DensityFitted,
            FockMethod::Direct => BuilderChoice::Direct {
                df_start: df_start(false),
            },
            FockMethod::InCore | FockMethod::Auto if fits || !auto => BuilderChoice::InCore {
                df_start: df_start(auto && need >= DF_START_MIN_IN_CORE_BYTES),
            },
            _ => BuilderChoice::Direct {
                df_start: df_start(true),
            },
        }
    }

    /// The density-fitting builder for `opts` (built once and kept).
    fn df_builder(&mut self, mol: &Molecule, opts: &ScfOptions) -> Result<&mut DfFock> {
        ensure_df(&mut self.df, &mut self.last_run, &self.basis, mol, opts)?;
        Ok(self.df.as_mut().expect("just built"))
    }

    /// Build the density-fitting tensor now with the auxiliary set `aux` (which may be a
    /// set made by the caller); runs whose `jk_fitting` names `aux.name` then use it.
    pub fn prepare_density_fitting(&mut self, aux: &BasisSet, budget: usize) -> Result<()> {
        if self.df.as_ref().is_some_and(|d| d.aux_name() == aux.name) {
            return Ok(());
        }
        self.df = None;
        self.df = Some(DfFock::new(&self.basis, aux, budget)?);
        Ok(())
    }

    /// Bytes of the density-fitting tensor held, if any.
    pub fn density_fitting_bytes(&self) -> usize {
        self.df.as_ref().map_or(0, |d| d.bytes())
    }

    /// Build the in-core store now from `src`, which must describe this context's shells
    /// (e.g. a source that copies blocks shared with another basis). Runs at the same
    /// screening threshold then use it.
    pub fn build_in_core_from(
        &mut self,
        src: &dyn EriSource,
        threshold: f64,
        budget: usize,
    ) -> Result<()> {
        self.plan(threshold);
        let plan = self.plan.as_ref().expect("just built");
        self.incore = Some(InCoreFock::new(src, plan, budget)?);
        Ok(())
    }

    /// One SCF for the electron count and spin of `mol` (same nuclei as the context).
    pub fn run(
        &mut self,
        mol: &Molecule,
        opts: &ScfOptions,
        log: &mut dyn FnMut(&IterationInfo),
    ) -> Result<Wavefunction> {
        if mol.atoms != self.atoms {
            return Err(Error::input(
                "the molecule's nuclei differ from those the SCF integrals were built for",
            ));
        }
        super::memory::check(self.basis.n_basis, opts)?;
        let (n_alpha, n_beta) = electron_counts(mol, opts)?;
        let m = self.ortho.n_independent();
        if n_alpha.max(n_beta) > m {
            return Err(Error::input(format!(
                "{} electrons of one spin do not fit into the {} independent functions of {}",
                n_alpha.max(n_beta),
                m,
                self.basis.name
            )));
        }
        self.last_run = RunRecord {
            memory_budget_bytes: opts.memory_budget_bytes,
            ..RunRecord::default()
        };
        let t = Instant::now();
        let start = self.start(mol, opts, n_alpha, n_beta)?;
        self.last_run
            .timings
            .push(("guess".into(), t.elapsed().as_secs_f64()));

        let choice = self.choose_builder(opts);
        let e_nuc = mol.nuclear_repulsion();
        let sol = match choice {
            BuilderChoice::InCore { df_start } => {
                if self.incore.is_none() {
                    let t = Instant::now();
                    let src = EngineSource::new(&self.engine, &self.basis);
                    let plan = self.plan.as_ref().expect("built by choose_builder");
                    self.incore = Some(InCoreFock::new(&src, plan, opts.memory_budget_bytes)?);
                    self.last_run
                        .timings
                        .push(("in-core integrals".into(), t.elapsed().as_secs_f64()));
                }
                let problem = problem(&self.s, &self.h, e_nuc, &self.ortho, n_alpha, n_beta);
                exact_iterations(
                    &mut self.df,
                    &mut self.last_run,
                    &self.basis,
                    &problem,
                    self.incore.as_mut().expect("just built"),
                    df_start,
                    mol,
                    opts,
                    start,
                    log,
                )?
            }
            BuilderChoice::DensityFitted => {
                self.df_builder(mol, opts)?;
                let builder = self.df.as_mut().expect("just built");
                self.last_run.builder = builder.describe();
                self.last_run.density_fitted = true;
                let problem = problem(&self.s, &self.h, e_nuc, &self.ortho, n_alpha, n_beta);
                timed(&mut self.last_run, || {
                    iterate_constrained(&problem, builder, opts, start, log)
                })?
            }
            BuilderChoice::Direct { df_start } => {
                let src = EngineSource::new(&self.engine, &self.basis);
                let plan = self.plan.clone().expect("built by choose_builder");
                let mut direct = DirectFock::new(&src, plan);
                let problem = problem(&self.s, &self.h, e_nuc, &self.ortho, n_alpha, n_beta);
                exact_iterations(
                    &mut self.df,
                    &mut self.last_run,
                    &self.basis,
                    &problem,
                    &mut direct,
                    df_start,
                    mol,
                    opts,
                    start,
                    log,
                )?
            }
        };
        self.last_builder = self.last_run.builder.clone();

        let s2 = match opts.reference {
            Reference::Rhf => 0.0,
            _ => s_squared(
                &sol.c_alpha,
                &sol.occ_alpha,
                &sol.c_beta,
                &sol.occ_beta,
                &self.s,
            ),
        };
        let pa = driver::density(&sol.c_alpha, &sol.occ_alpha);
        let pb = driver::density(&sol.c_beta, &sol.occ_beta);
        let dipole = dipole_moment(&self.basis, mol, &pa, &pb);
        Ok(Wavefunction {
            reference: opts.reference,
            energy: sol.energy,
            nuclear_repulsion: mol.nuclear_repulsion(),
            one_electron: sol.one_electron,
            two_electron: sol.two_electron,
            converged: true,
            iterations: sol.iterations,
            c_alpha: sol.c_alpha,
            c_beta: sol.c_beta,
            eps_alpha: sol.eps_alpha,
            eps_beta: sol.eps_beta,
            occ_alpha: sol.occ_alpha,
            occ_beta: sol.occ_beta,
            s2,
            n_basis: self.basis.n_basis,
            n_independent: self.ortho.n_independent(),
            dipole,
        })
    }

    /// Starting point from the guess and occupation options.
    fn start(&mut self, mol: &Molecule, opts: &ScfOptions, na: usize, nb: usize) -> Result<Start> {
        let m = self.ortho.n_independent();
        let orbital_start = |ca: Mat<f64>, cb: Mat<f64>, s: &Mat<f64>| -> Result<Start> {
            let (oa, ob) = match &opts.occupation {
                Occupation::Aufbau => (
                    occupation::aufbau(ca.ncols(), na),
                    occupation::aufbau(cb.ncols(), nb),
                ),
                Occupation::Mom {
                    c_alpha_ref,
                    c_beta_ref,
                    occ_alpha,
                    occ_beta,
                    ..
                } => match opts.reference {
                    Reference::Rhf => {
                        let o = occupation::mom(c_alpha_ref, occ_alpha, s, &ca);
                        (o.clone(), o)
                    }
                    Reference::Uhf => (
                        occupation::mom(c_alpha_ref, occ_alpha, s, &ca),
                        occupation::mom(c_beta_ref, occ_beta, s, &cb),
                    ),
                    Reference::Rohf => {
                        occupation::mom_restricted_open(c_alpha_ref, occ_alpha, occ_beta, s, &ca)
                    }
                },
            };
            Ok(Start::Orbitals {
                c_alpha: ca,
                c_beta: cb,
                occ_alpha: oa,
                occ_beta: ob,
            })
        };
        match &opts.guess {
            Guess::Core => {
                let (_, c) = self.ortho.solve(&self.h);
                orbital_start(c.clone(), c, &self.s)
            }
            Guess::Orbitals { c_alpha, c_beta } => {
                let n = self.basis.n_basis;
                for (name, c) in [("c_alpha", c_alpha), ("c_beta", c_beta)] {
                    if c.nrows() != n || c.ncols() == 0 || c.ncols() > n {
                        return Err(Error::input(format!(
                            "guess orbitals {name} are {}×{}, the basis has {n} functions",
                            c.nrows(),
                            c.ncols()
                        )));
                    }
                }
                let cb = if opts.reference == Reference::Uhf {
                    c_beta.clone()
                } else {
                    c_alpha.clone()
                };
                let _ = m;
                orbital_start(c_alpha.clone(), cb, &self.s)
            }
            Guess::Sad => {
                if self.sad.is_none() {
                    self.sad = Some(sad_density(&self.basis, mol)?);
                }
                let p = self.sad.as_ref().expect("just built");
                let half = Mat::<f64>::from_fn(p.nrows(), p.ncols(), |i, j| 0.5 * p[(i, j)]);
                Ok(Start::Densities {
                    alpha: half.clone(),
                    beta: half,
                })
            }
        }
    }
}

/// (n_alpha, n_beta) from the molecule, or from the MOM occupation flags (which must agree
/// with the molecule's electron count and spin).
fn electron_counts(mol: &Molecule, opts: &ScfOptions) -> Result<(usize, usize)> {
    let (na, nb) = mol.n_alpha_beta();
    let (na, nb) = match &opts.occupation {
        Occupation::Aufbau => (na, nb),
        Occupation::Mom {
            c_alpha_ref,
            c_beta_ref,
            occ_alpha,
            occ_beta,
            ..
        } => {
            if occ_alpha.len() != c_alpha_ref.ncols() || occ_beta.len() != c_beta_ref.ncols() {
                return Err(Error::input(
                    "MOM occupation vectors must have one entry per reference orbital column",
                ));
            }
            if occ_alpha
                .iter()
                .chain(occ_beta.iter())
                .any(|&o| o != 0.0 && o != 1.0)
            {
                return Err(Error::input("MOM occupations must be 0 or 1"));
            }
            let ma = occ_alpha.iter().filter(|&&o| o == 1.0).count();
            let mb = match opts.reference {
                Reference::Rhf => ma,
                _ => occ_beta.iter().filter(|&&o| o == 1.0).count(),
            };
            let unpaired = mol.multiplicity as usize - 1;
            if ma + mb != mol.n_electrons() || ma.abs_diff(mb) != unpaired {
                return Err(Error::input(format!(
                    "MOM occupations hold {ma} alpha + {mb} beta electrons, but the molecule has \
                     {} electrons with multiplicity {}",
                    mol.n_electrons(),
                    mol.multiplicity
                )));
            }
            if opts.reference == Reference::Rohf
                && occ_alpha
                    .iter()
                    .zip(occ_beta.iter())
                    .any(|(&a, &b)| b == 1.0 && a != 1.0)
            {
                return Err(Error::input(
                    "ROHF occupations need every beta-occupied orbital to be alpha-occupied too",
                ));
            }
            (ma, mb)
        }
    };
    match opts.reference {
        Reference::Rhf if na != nb => Err(Error::input(format!(
            "RHF needs a closed shell, but {} electrons with multiplicity {} leave {} unpaired: \
             use the UHF or ROHF reference",
            mol.n_electrons(),
            mol.multiplicity,
            na.abs_diff(nb)
        ))),
        Reference::Rohf if nb > na => Err(Error::input(
            "ROHF needs at least as many alpha as beta electrons",
        )),
        _ => Ok((na, nb)),
    }
}

/// Dipole moment (a.u.) about the origin of the input frame:
/// μ = Σ_A Z_A R_A − Σ_σ Tr[P^σ r].
pub fn dipole_moment(basis: &BasisSet, mol: &Molecule, pa: &Mat<f64>, pb: &Mat<f64>) -> [f64; 3] {
    let d = integrals::dipole(basis, [0.0; 3]);
    let mut mu = [0.0; 3];
    for (k, m) in mu.iter_mut().enumerate() {
        let nuc: f64 = mol.atoms.iter().map(|a| a.z as f64 * a.position[k]).sum();
        let el = driver::trace_product(pa, &d[k]) + driver::trace_product(pb, &d[k]);
        *m = nuc - el;
    }
    mu
}

/// Key of an atom's shells (element and exact shell data), so equal atoms share one atomic SCF.
fn atom_key(z: u32, shells: &[&crate::basis::Shell]) -> String {
    let mut k = format!("{z}");
    for s in shells {
        k.push_str(&format!("|{}{}", s.l, s.pure));
        for (e, c) in s.exponents.iter().zip(&s.coefficients) {
            k.push_str(&format!(",{e:e}:{c:e}"));
        }
    }
    k
}

/// Superposition of atomic densities (total, α + β) in the molecular AO basis; see `guess.rs`.
pub fn sad_density(basis: &BasisSet, mol: &Molecule) -> Result<Mat<f64>> {
    let n = basis.n_basis;
    let mut p = Mat::<f64>::zeros(n, n);
    let mut cache: HashMap<String, Mat<f64>> = HashMap::new();
    for (ia, atom) in mol.atoms.iter().enumerate() {
        let idx: Vec<usize> = (0..basis.shells.len())
            .filter(|&i| basis.shells[i].atom == ia)
            .collect();
        if idx.is_empty() || atom.z == 0 {
            continue;
        }
        let shells: Vec<&crate::basis::Shell> = idx.iter().map(|&i| &basis.shells[i]).collect();
        let key = atom_key(atom.z, &shells);
        if !cache.contains_key(&key) {
            let sub: Vec<crate::basis::Shell> = shells
                .iter()
                .map(|s| crate::basis::Shell {
                    atom: 0,
                    ..(*s).clone()
                })
                .collect();
            let ab = BasisSet::from_shells(format!("{} atom", basis.name), sub);
            let am = Molecule::new(vec![atom.clone()]);
            let s = integrals::overlap(&ab);
            let h = core_hamiltonian(&ab, &am);
            let engine = EriEngine::new(&ab);
            let src = EngineSource::new(&engine, &ab);
            let plan = QuartetPlan::new(&src, 1e-12);
            let dens = match InCoreFock::new(&src, &plan, 1 << 30) {
                Ok(mut b) => guess::atomic_density(&h, &s, &mut b, atom.z as f64)?,
                Err(_) => {
                    let mut b = DirectFock::new(&src, plan);
                    guess::atomic_density(&h, &s, &mut b, atom.z as f64)?
                }
            };
            cache.insert(key.clone(), dens);
        }
        let pa = &cache[&key];
        // Map atomic AO indices to molecular ones.
        let mut map = Vec::new();
        for &i in &idx {
            let off = basis.offsets[i];
            for f in 0..basis.shells[i].n_functions() {
                map.push(off + f);
            }
        }
        for (a, &mu) in map.iter().enumerate() {
            for (b, &nu) in map.iter().enumerate() {
                p[(mu, nu)] += pa[(a, b)];
            }
        }
    }
    Ok(p)
}
