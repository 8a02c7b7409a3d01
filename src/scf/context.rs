//! Running an SCF on a molecule: one-electron integrals, orthogonalisation, the choice of
//! Fock builder, guesses and occupations, and the finished `Wavefunction`.
//!
//! `ScfContext` keeps what does not depend on the electron count (S, h, X, the ERI engine,
//! the in-core integral store, the SAD density), so ΔSCF work can run many SCFs on the same
//! nuclei and basis (the neutral, then cations with holes from `Guess::Orbitals` +
//! `Occupation::Mom`) without recomputing integrals.

use std::collections::HashMap;

use bandcast_linalg::Mat;

use super::driver::{self, IterationInfo, Problem, Start};
use super::fock::quartets::QuartetPlan;
use super::fock::source::{EngineSource, EriSource};
use super::fock::{DirectFock, FockBuilder, InCoreFock};
use super::guess;
use super::occupation;
use super::options::{FockMethod, Guess, Occupation, Reference, ScfOptions};
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
    sad: Option<Mat<f64>>,
    /// Description of the Fock builder used by the last run.
    pub last_builder: String,
}

/// SCF on `mol` in `basis` (see `ScfOptions` for what can be asked).
pub fn run(mol: &Molecule, basis: &BasisSet, opts: &ScfOptions) -> Result<Wavefunction> {
    ScfContext::new(mol, basis, opts.lindep_threshold)?.run(mol, opts, &mut |_| {})
}

/// `run` with a callback receiving one `IterationInfo` per iteration (progress lines).
pub fn run_logged(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &ScfOptions,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<Wavefunction> {
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
        let s = integrals::overlap(basis);
        let h = core_hamiltonian(basis, mol);
        let ortho = Orthogonalizer::canonical(&s, lindep_threshold)?;
        Ok(ScfContext {
            atoms: mol.atoms.clone(),
            basis: basis.clone(),
            s,
            h,
            ortho,
            engine: EriEngine::new(basis),
            plan: None,
            incore: None,
            sad: None,
            last_builder: String::new(),
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
        let start = self.start(mol, opts, n_alpha, n_beta)?;

        // Fock builder.
        let threshold = opts.screening;
        let need = self.in_core_bytes(threshold);
        let use_incore = match opts.fock {
            FockMethod::InCore => true,
            FockMethod::Direct => false,
            FockMethod::Auto => need <= opts.memory_budget_bytes,
        };
        if use_incore && self.incore.is_none() {
            let src = EngineSource::new(&self.engine, &self.basis);
            let plan = self.plan.as_ref().expect("built above");
            self.incore = Some(InCoreFock::new(&src, plan, opts.memory_budget_bytes)?);
        }
        let problem = Problem {
            s: &self.s,
            h: &self.h,
            e_nuc: mol.nuclear_repulsion(),
            ortho: &self.ortho,
            n_alpha,
            n_beta,
        };
        let src = EngineSource::new(&self.engine, &self.basis);
        let mut direct;
        let builder: &mut dyn FockBuilder = if use_incore {
            self.incore.as_mut().expect("built above")
        } else {
            direct = DirectFock::new(&src, self.plan.clone().expect("built above"));
            &mut direct
        };
        let mut symmetrised;
        let builder: &mut dyn FockBuilder = match &opts.density_symmetry {
            Some(sym) => {
                symmetrised = SymmetrisedFock::new(builder, sym.as_ref());
                &mut symmetrised
            }
            None => builder,
        };
        self.last_builder = builder.describe();
        let sol = driver::iterate(&problem, builder, opts, start, log)?;

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
