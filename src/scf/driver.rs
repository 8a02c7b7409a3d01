//! The SCF iterations, generic over how J and K are built (`FockBuilder`) and independent of
//! where h and S come from, so that model systems (a stored ERI tensor) and molecules run
//! through the same code.
//!
//! One iteration: densities → J, K (builder) → Fock matrices → energy and error vectors →
//! controller (DIIS / level shift / damping) → diagonalisation → occupations (aufbau or MOM)
//! → new densities. Converged when |ΔE| and the RMS orthogonalised commutator both fall below
//! their thresholds; the reported orbitals come from diagonalising the plain (unshifted,
//! un-extrapolated) Fock matrix of the converged density.
//!
//! - RHF (Roothaan, Rev. Mod. Phys. 23 (1951) 69): one density P (per spin), F = h + 2J[P] − K[P].
//! - UHF (Pople & Nesbet, J. Chem. Phys. 22 (1954) 571): F^σ = h + J[P^α + P^β] − K[P^σ].
//! - ROHF: one orbital set, densities P^α ⊇ P^β, and the effective Fock matrix of `rohf.rs`.
//!
//! Energy: E = ½ Σ_σ Tr[P^σ (h + F^σ)] + E_nuc (Szabo & Ostlund eq. 3.184, per spin).

use bandcast_linalg::{congruence, mul, Mat};

use super::convergence::{Controller, Step};
use super::diis::Diis;
use super::fock::FockBuilder;
use super::occupation;
use super::options::{Occupation, Reference, ScfOptions};
use super::orthogonalize::Orthogonalizer;
use super::rohf;
use crate::error::{Error, Result};

/// The one-electron side of a problem.
pub struct Problem<'a> {
    pub s: &'a Mat<f64>,
    pub h: &'a Mat<f64>,
    pub e_nuc: f64,
    pub ortho: &'a Orthogonalizer,
    pub n_alpha: usize,
    pub n_beta: usize,
}

/// Where the iterations start.
pub enum Start {
    /// Spin densities (possibly not idempotent, e.g. SAD).
    Densities { alpha: Mat<f64>, beta: Mat<f64> },
    /// Orbitals with 0/1 occupations.
    Orbitals {
        c_alpha: Mat<f64>,
        c_beta: Mat<f64>,
        occ_alpha: Vec<f64>,
        occ_beta: Vec<f64>,
    },
}

/// One line of progress.
#[derive(Debug, Clone)]
pub struct IterationInfo {
    pub iteration: usize,
    pub energy: f64,
    pub delta_e: f64,
    pub rms_commutator: f64,
    pub diis_size: usize,
    pub step: Step,
    /// What the Fock builder reports about this iteration's build (e.g. the share of
    /// quartets an integral-direct build computed); may be empty.
    pub note: String,
}

/// Converged result.
#[derive(Debug, Clone)]
pub struct Solution {
    pub energy: f64,
    pub one_electron: f64,
    pub two_electron: f64,
    pub iterations: usize,
    pub c_alpha: Mat<f64>,
    pub c_beta: Mat<f64>,
    pub eps_alpha: Vec<f64>,
    pub eps_beta: Vec<f64>,
    pub occ_alpha: Vec<f64>,
    pub occ_beta: Vec<f64>,
    pub fock_alpha: Mat<f64>,
    pub fock_beta: Mat<f64>,
}

/// Orbitals and occupations of the current iterate.
#[derive(Clone)]
struct Orbitals {
    ca: Mat<f64>,
    cb: Mat<f64>,
    oa: Vec<f64>,
    ob: Vec<f64>,
}

pub fn iterate(
    p: &Problem,
    builder: &mut dyn FockBuilder,
    opts: &ScfOptions,
    start: Start,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<Solution> {
    let reference = opts.reference;
    let n = p.s.nrows();
    let (mut pa, mut pb, mut orbs) = match start {
        Start::Densities { alpha, beta } => (alpha, beta, None),
        Start::Orbitals {
            c_alpha,
            c_beta,
            occ_alpha,
            occ_beta,
        } => {
            let (cb, ob) = match reference {
                Reference::Uhf => (c_beta, occ_beta),
                Reference::Rhf => (c_alpha.clone(), occ_alpha.clone()),
                Reference::Rohf => (c_alpha.clone(), occ_beta),
            };
            let o = Orbitals {
                ca: c_alpha,
                cb,
                oa: occ_alpha,
                ob,
            };
            (density(&o.ca, &o.oa), density(&o.cb, &o.ob), Some(o))
        }
    };
    // MOM reference (fixed for IMOM, updated each iteration for MOM).
    let mut mom_ref: Option<Orbitals> = match &opts.occupation {
        Occupation::Aufbau => None,
        Occupation::Mom {
            c_alpha_ref,
            c_beta_ref,
            occ_alpha,
            occ_beta,
            ..
        } => Some(Orbitals {
            ca: c_alpha_ref.clone(),
            cb: match reference {
                Reference::Uhf => c_beta_ref.clone(),
                _ => c_alpha_ref.clone(),
            },
            oa: occ_alpha.clone(),
            ob: match reference {
                Reference::Rhf => occ_alpha.clone(),
                _ => occ_beta.clone(),
            },
        }),
    };
    let imom = matches!(opts.occupation, Occupation::Mom { initial: true, .. });

    let mut ctl = Controller::new(opts.level_shift, opts.damping);
    let mut diis = Diis::new(opts.diis_space);
    let mut e_prev = f64::NAN;
    let mut last = (f64::NAN, f64::NAN);
    let mut diis_stage = 0usize;
    for iter in 1..=opts.max_iter {
        // Fock matrices of the current densities.
        let (fa, fb) = fock(p.h, builder, reference, &pa, &pb)?;
        let one = trace_product(&pa, p.h) + trace_product(&pb, p.h);
        let two = 0.5 * (trace_product(&pa, &fa) - trace_product(&pa, p.h))
            + 0.5 * (trace_product(&pb, &fb) - trace_product(&pb, p.h));
        let energy = one + two + p.e_nuc;
        let de = energy - e_prev;
        e_prev = energy;

        // Matrices to diagonalise and their error vectors.
        let (focks, error) = match reference {
            Reference::Rhf => {
                let e = commutator(&fa, &pa, p.s, p.ortho);
                (vec![fa.clone()], e)
            }
            Reference::Uhf => {
                let mut e = commutator(&fa, &pa, p.s, p.ortho);
                e.extend(commutator(&fb, &pb, p.s, p.ortho));
                (vec![fa.clone(), fb.clone()], e)
            }
            Reference::Rohf => {
                let feff = match &orbs {
                    Some(o) => rohf::effective_fock(&fa, &fb, &o.ca, &o.oa, &o.ob, p.s),
                    None => average(&fa, &fb),
                };
                let pt = &pa + &pb;
                let e = commutator(&feff, &pt, p.s, p.ortho);
                (vec![feff], e)
            }
        };
        let rms = (error.iter().map(|v| v * v).sum::<f64>() / error.len().max(1) as f64).sqrt();
        last = (de, rms);
        let step = ctl.step(iter, rms);
        log(&IterationInfo {
            iteration: iter,
            energy,
            delta_e: de,
            rms_commutator: rms,
            diis_size: diis.len(),
            step,
            note: builder.last_note().unwrap_or_default(),
        });

        if iter > 1 && de.abs() < opts.e_tol && rms < opts.commutator_tol {
            if let Some(cur) = orbs.as_ref() {
                return finish(
                    p, reference, &focks, &fa, &fb, cur, &mom_ref, imom, energy, one, two, iter,
                );
            }
        }

        // Extrapolate.
        if ctl.stage_started_at() != diis_stage {
            diis.clear();
            diis_stage = ctl.stage_started_at();
        }
        let mut to_diag = if step.diis {
            diis.extrapolate(focks, error)
        } else {
            diis.clear();
            focks
        };
        if step.level_shift > 0.0 {
            if let Some(o) = &orbs {
                level_shift(&mut to_diag, reference, o, p.s, step.level_shift);
            }
        }

        // Diagonalise and occupy.
        let (_, ca) = p.ortho.solve(&to_diag[0]);
        let cb = if reference == Reference::Uhf {
            p.ortho.solve(&to_diag[1]).1
        } else {
            ca.clone()
        };
        let refs = if imom {
            mom_ref.as_ref()
        } else {
            orbs.as_ref().or(mom_ref.as_ref())
        };
        let (oa, ob) = occupy(p, reference, &ca, &cb, refs, mom_ref.is_some())?;
        let new = Orbitals { ca, cb, oa, ob };
        let (na, nb) = (density(&new.ca, &new.oa), density(&new.cb, &new.ob));
        if step.damping > 0.0 && orbs.is_some() {
            let d = step.damping;
            pa = mix(&na, &pa, d);
            pb = mix(&nb, &pb, d);
        } else {
            pa = na;
            pb = nb;
        }
        if reference == Reference::Rhf {
            pb = pa.clone();
        }
        if mom_ref.is_some() && !imom {
            mom_ref = Some(new.clone());
        }
        orbs = Some(new);
    }
    let (best, best_it) = ctl.best();
    let _ = n;
    Err(Error::computation(format!(
        "SCF did not converge in {} iterations. Tried: {}. At the last iteration |ΔE| = {:.2e} Eh \
         and RMS commutator = {:.2e} (targets {:.0e} and {:.0e}); the smallest commutator was \
         {:.2e} at iteration {}. Try another guess, a larger --max-iter, or check the geometry, \
         charge and multiplicity.",
        opts.max_iter,
        ctl.attempts(),
        last.0.abs(),
        last.1,
        opts.e_tol,
        opts.commutator_tol,
        best,
        best_it
    )))
}

#[allow(clippy::too_many_arguments)]
fn finish(
    p: &Problem,
    reference: Reference,
    focks: &[Mat<f64>],
    fa: &Mat<f64>,
    fb: &Mat<f64>,
    cur: &Orbitals,
    mom_ref: &Option<Orbitals>,
    imom: bool,
    energy: f64,
    one: f64,
    two: f64,
    iter: usize,
) -> Result<Solution> {
    let (eps_a, ca) = p.ortho.solve(&focks[0]);
    let (eps_b, cb) = if reference == Reference::Uhf {
        p.ortho.solve(&focks[1])
    } else {
        (eps_a.clone(), ca.clone())
    };
    let refs = if imom { mom_ref.as_ref() } else { Some(cur) };
    let (oa, ob) = occupy(p, reference, &ca, &cb, refs, mom_ref.is_some())?;
    // ROHF: report per-spin diagonal elements of F^α and F^β in the canonical orbitals of
    // the effective Fock matrix (its own eigenvalues depend on an arbitrary choice of blocks).
    let (eps_a, eps_b) = if reference == Reference::Rohf {
        let da = congruence(ca.as_ref(), fa.as_ref());
        let db = congruence(ca.as_ref(), fb.as_ref());
        (
            (0..ca.ncols()).map(|i| da[(i, i)]).collect(),
            (0..ca.ncols()).map(|i| db[(i, i)]).collect(),
        )
    } else {
        (eps_a, eps_b)
    };
    Ok(Solution {
        energy,
        one_electron: one,
        two_electron: two,
        iterations: iter,
        c_alpha: ca,
        c_beta: cb,
        eps_alpha: eps_a,
        eps_beta: eps_b,
        occ_alpha: oa,
        occ_beta: ob,
        fock_alpha: fa.clone(),
        fock_beta: fb.clone(),
    })
}

/// Occupations of new orbitals: aufbau, or MOM against `refs` (previous or initial orbitals).
fn occupy(
    p: &Problem,
    reference: Reference,
    ca: &Mat<f64>,
    cb: &Mat<f64>,
    refs: Option<&Orbitals>,
    use_mom: bool,
) -> Result<(Vec<f64>, Vec<f64>)> {
    let m = ca.ncols();
    if p.n_alpha > m || p.n_beta > m {
        return Err(Error::input(format!(
            "{} alpha / {} beta electrons do not fit into {} independent orbitals",
            p.n_alpha, p.n_beta, m
        )));
    }
    match (use_mom, refs) {
        (true, Some(r)) => Ok(match reference {
            Reference::Rhf => {
                let o = occupation::mom(&r.ca, &r.oa, p.s, ca);
                (o.clone(), o)
            }
            Reference::Uhf => (
                occupation::mom(&r.ca, &r.oa, p.s, ca),
                occupation::mom(&r.cb, &r.ob, p.s, cb),
            ),
            Reference::Rohf => occupation::mom_restricted_open(&r.ca, &r.oa, &r.ob, p.s, ca),
        }),
        _ => Ok((
            occupation::aufbau(m, p.n_alpha),
            occupation::aufbau(m, p.n_beta),
        )),
    }
}

fn fock(
    h: &Mat<f64>,
    builder: &mut dyn FockBuilder,
    reference: Reference,
    pa: &Mat<f64>,
    pb: &Mat<f64>,
) -> Result<(Mat<f64>, Mat<f64>)> {
    if reference == Reference::Rhf {
        let jk = builder.jk(&[pa])?;
        let mut f = h.clone();
        add_scaled(&mut f, 2.0, &jk[0].j);
        add_scaled(&mut f, -1.0, &jk[0].k);
        return Ok((f.clone(), f));
    }
    let jk = builder.jk(&[pa, pb])?;
    let jt = &jk[0].j + &jk[1].j;
    let mut fa = h + &jt;
    let mut fb = h + &jt;
    add_scaled(&mut fa, -1.0, &jk[0].k);
    add_scaled(&mut fb, -1.0, &jk[1].k);
    Ok((fa, fb))
}

/// Shift unoccupied orbitals up by `shift` (ROHF: singly occupied by shift/2):
/// F += shift · S C W Cᵀ S with W the per-orbital weights.
fn level_shift(
    focks: &mut [Mat<f64>],
    reference: Reference,
    o: &Orbitals,
    s: &Mat<f64>,
    shift: f64,
) {
    let weights = |occ: &[f64], occ_b: Option<&[f64]>| -> Vec<f64> {
        occ.iter()
            .enumerate()
            .map(|(i, &a)| match occ_b {
                Some(b) => shift * (1.0 - 0.5 * (a + b[i])),
                None => shift * (1.0 - a),
            })
            .collect()
    };
    let shifts: Vec<(&Mat<f64>, Vec<f64>)> = match reference {
        Reference::Rhf => vec![(&o.ca, weights(&o.oa, None))],
        Reference::Uhf => vec![(&o.ca, weights(&o.oa, None)), (&o.cb, weights(&o.ob, None))],
        Reference::Rohf => vec![(&o.ca, weights(&o.oa, Some(&o.ob)))],
    };
    for (f, (c, w)) in focks.iter_mut().zip(shifts) {
        let sc = mul(s.as_ref(), false, c.as_ref(), false);
        let scw = Mat::<f64>::from_fn(sc.nrows(), sc.ncols(), |i, j| sc[(i, j)] * w[j]);
        let add = mul(scw.as_ref(), false, sc.as_ref(), true);
        add_scaled(f, 1.0, &add);
    }
}

/// Orthogonalised commutator Xᵀ(FPS − SPF)X, flattened.
pub fn commutator(f: &Mat<f64>, d: &Mat<f64>, s: &Mat<f64>, o: &Orthogonalizer) -> Vec<f64> {
    let fp = mul(f.as_ref(), false, d.as_ref(), false);
    let fps = mul(fp.as_ref(), false, s.as_ref(), false);
    let n = f.nrows();
    let c = Mat::<f64>::from_fn(n, n, |i, j| fps[(i, j)] - fps[(j, i)]);
    let e = congruence(o.x.as_ref(), c.as_ref());
    let m = e.nrows();
    let mut v = Vec::with_capacity(m * m);
    for j in 0..m {
        for i in 0..m {
            v.push(e[(i, j)]);
        }
    }
    v
}

/// Σ_i occ_i C_μi C_νi.
pub fn density(c: &Mat<f64>, occ: &[f64]) -> Mat<f64> {
    let n = c.nrows();
    let cols: Vec<usize> = (0..c.ncols().min(occ.len()))
        .filter(|&i| occ[i] != 0.0)
        .collect();
    let co = Mat::<f64>::from_fn(n, cols.len(), |mu, k| {
        c[(mu, cols[k])] * occ[cols[k]].sqrt()
    });
    mul(co.as_ref(), false, co.as_ref(), true)
}

/// Σ_ij A_ij B_ij (= Tr[A B] for symmetric matrices).
pub fn trace_product(a: &Mat<f64>, b: &Mat<f64>) -> f64 {
    let mut s = 0.0;
    for j in 0..a.ncols() {
        for i in 0..a.nrows() {
            s += a[(i, j)] * b[(i, j)];
        }
    }
    s
}

fn add_scaled(a: &mut Mat<f64>, s: f64, b: &Mat<f64>) {
    for j in 0..a.ncols() {
        for i in 0..a.nrows() {
            a[(i, j)] += s * b[(i, j)];
        }
    }
}

fn average(a: &Mat<f64>, b: &Mat<f64>) -> Mat<f64> {
    Mat::<f64>::from_fn(a.nrows(), a.ncols(), |i, j| 0.5 * (a[(i, j)] + b[(i, j)]))
}

fn mix(new: &Mat<f64>, old: &Mat<f64>, d: f64) -> Mat<f64> {
    Mat::<f64>::from_fn(new.nrows(), new.ncols(), |i, j| {
        (1.0 - d) * new[(i, j)] + d * old[(i, j)]
    })
}
