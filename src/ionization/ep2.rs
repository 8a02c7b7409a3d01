//! Second-order electron propagator (EP2): ionization energies from the diagonal
//! second-order self-energy and the Dyson equation.
//!
//! Theory: L. S. Cederbaum, J. Phys. B 8 (1975) 290 (outer-valence approximations of the
//! one-particle Green's function); J. V. Ortiz, "Electron propagator theory", Adv. Quantum
//! Chem. 35 (1999) 33; the closed-shell spatial-orbital form is in A. Szabo & N. S. Ostlund,
//! *Modern Quantum Chemistry* (1989), ch. 7.
//!
//! For a closed-shell canonical RHF reference (i, j occupied; a, b virtual; chemists'
//! notation) the diagonal second-order self-energy of orbital p is
//!
//! Σ_pp(E) = Σ_iab (pa|ib) [2 (pa|ib) − (pb|ia)] / (E + ε_i − ε_a − ε_b)      (2p1h)
//!         + Σ_ija (pi|aj) [2 (pi|aj) − (pj|ai)] / (E + ε_a − ε_i − ε_j)      (2h1p)
//!
//! the spin sum of the spin-orbital form ½ Σ_iab |⟨pi||ab⟩|²/(E + ε_i − ε_a − ε_b)
//! + ½ Σ_ija |⟨pa||ij⟩|²/(E + ε_a − ε_i − ε_j) (checked against it in the tests). The
//! ionization energy is −E for the root of the Dyson equation E = ε_p + Σ_pp(E) nearest
//! ε_p, found by safeguarded Newton iteration; the pole strength is P = 1/(1 − dΣ/dE),
//! the weight of the one-hole configuration in the cationic state (P well below 1 means the
//! one-particle picture breaks down: inner-valence satellites).
//!
//! Only the integrals each target needs are formed: (pa|ib) and (pi|aj) for the target
//! orbitals p, in one pass over the AO integrals (`integrals::mo_transform`).
//!
//! Known accuracy (common practice): EP2 overcorrects Koopmans for lone-pair and other
//! strongly relaxing ionizations (water, HF, F2, Ne HOMOs come out about 1 eV low in a
//! triple-zeta basis) and is better for π and σ bonding levels; it fixes the N2 band order.

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::error::{Error, Result};
use crate::integrals::mo_transform::{check_budget, mo_eri_blocks, AoQuartets, BlockSpec};
use crate::scf::{Reference, Wavefunction};

#[derive(Debug, Clone)]
pub struct Ep2Options {
    /// Number of lowest occupied orbitals left out of the sums (0 = all-electron).
    pub frozen_core: usize,
    /// Newton convergence on E (hartree).
    pub tolerance: f64,
    pub max_iter: usize,
    /// Memory the MO integral blocks may use (bytes).
    pub memory_bytes: usize,
}

impl Default for Ep2Options {
    fn default() -> Self {
        Ep2Options {
            frozen_core: 0,
            tolerance: 1e-10,
            max_iter: 100,
            memory_bytes: 4_000_000_000,
        }
    }
}

/// The EP2 result for one orbital.
#[derive(Debug, Clone, PartialEq)]
pub struct Ep2Pole {
    /// MO index of the target orbital.
    pub orbital: usize,
    /// Hartree–Fock orbital energy ε_p (hartree).
    pub epsilon: f64,
    /// Root E of E = ε_p + Σ_pp(E) (hartree).
    pub energy: f64,
    /// Ionization energy −E (hartree).
    pub ie: f64,
    /// P = 1/(1 − dΣ/dE) at the root.
    pub pole_strength: f64,
    /// Σ_pp(E) at the root (hartree).
    pub sigma: f64,
    pub iterations: usize,
}

/// Σ_pp(E) = Σ_k N_k / (E + D_k) for one orbital, stored as (N, D) pairs.
#[derive(Debug, Clone, Default)]
pub struct SelfEnergy {
    pub terms: Vec<(f64, f64)>,
}

impl SelfEnergy {
    /// Assemble from the target's blocks: `pvov[a][i][b]` = (pa|ib) and `povo[i][a][j]` =
    /// (pi|aj), with occupied (active) and virtual orbital energies.
    pub fn closed_shell(pvov: &[f64], povo: &[f64], eps_occ: &[f64], eps_vir: &[f64]) -> Self {
        let (no, nv) = (eps_occ.len(), eps_vir.len());
        assert_eq!(pvov.len(), nv * no * nv);
        assert_eq!(povo.len(), no * nv * no);
        let mut terms = Vec::with_capacity(no * nv * (nv + no));
        // 2p1h: (pa|ib)[2(pa|ib) − (pb|ia)] / (E + ε_i − ε_a − ε_b)
        for i in 0..no {
            for a in 0..nv {
                for b in 0..nv {
                    let v = pvov[(a * no + i) * nv + b];
                    let x = pvov[(b * no + i) * nv + a];
                    let n = v * (2.0 * v - x);
                    if n != 0.0 {
                        terms.push((n, eps_occ[i] - eps_vir[a] - eps_vir[b]));
                    }
                }
            }
        }
        // 2h1p: (pi|aj)[2(pi|aj) − (pj|ai)] / (E + ε_a − ε_i − ε_j)
        for i in 0..no {
            for a in 0..nv {
                for j in 0..no {
                    let v = povo[(i * nv + a) * no + j];
                    let x = povo[(j * nv + a) * no + i];
                    let n = v * (2.0 * v - x);
                    if n != 0.0 {
                        terms.push((n, eps_vir[a] - eps_occ[i] - eps_occ[j]));
                    }
                }
            }
        }
        SelfEnergy { terms }
    }

    /// (Σ(E), dΣ/dE), summed in a fixed order.
    pub fn eval(&self, e: f64) -> (f64, f64) {
        let mut s = 0.0;
        let mut ds = 0.0;
        for &(n, d) in &self.terms {
            let inv = 1.0 / (e + d);
            s += n * inv;
            ds -= n * inv * inv;
        }
        (s, ds)
    }

    /// Nearest poles of Σ below and above `e` (E = −D), if any.
    fn bracket(&self, e: f64) -> (f64, f64) {
        let mut lo = f64::NEG_INFINITY;
        let mut hi = f64::INFINITY;
        for &(n, d) in &self.terms {
            if n.abs() < 1e-14 {
                continue;
            }
            let pole = -d;
            if pole < e && pole > lo {
                lo = pole;
            }
            if pole > e && pole < hi {
                hi = pole;
            }
        }
        (lo, hi)
    }
}

/// Solve E = ε + Σ(E) for the quasiparticle root belonging to ε: returns (E, P, Σ(E),
/// iterations).
///
/// Two searches start from ε: plain Newton steps (clamped to 0.1 Eh), which step over weak
/// poles of Σ as the usual EP2 procedure does, and Newton steps kept inside the bracket of
/// the two poles enclosing ε (f(E) = E − ε − Σ(E) rises monotonically between poles because
/// dΣ/dE ≤ 0 for a diagonal self-energy, so that bracket holds exactly one root). Where the
/// poles of Σ are dense (inner valence) the bracketed root can be a satellite of almost no
/// strength; the root with the larger pole strength is returned.
pub fn solve_dyson(
    eps: f64,
    sigma: &SelfEnergy,
    tol: f64,
    max_iter: usize,
) -> Result<(f64, f64, f64, usize)> {
    let plain = newton_plain(eps, sigma, tol, max_iter);
    let bracketed = newton_bracketed(eps, sigma, tol, max_iter);
    match (plain, bracketed) {
        (Some(a), Some(b)) => Ok(if a.1 >= b.1 { a } else { b }),
        (Some(a), None) | (None, Some(a)) => Ok(a),
        (None, None) => Err(Error::computation(format!(
            "EP2: the Dyson equation did not converge in {max_iter} Newton steps (orbital \
             energy {eps:.6} Eh)"
        ))),
    }
}

fn finish(sigma: &SelfEnergy, e: f64, it: usize) -> Option<(f64, f64, f64, usize)> {
    let (s, ds) = sigma.eval(e);
    let p = 1.0 / (1.0 - ds);
    (p.is_finite() && p > 0.0).then_some((e, p, s, it))
}

fn newton_plain(
    eps: f64,
    sigma: &SelfEnergy,
    tol: f64,
    max_iter: usize,
) -> Option<(f64, f64, f64, usize)> {
    const MAX_STEP: f64 = 0.1;
    let mut e = eps;
    for it in 1..=max_iter {
        let (s, ds) = sigma.eval(e);
        let f = e - eps - s;
        let mut step = -f / (1.0 - ds);
        if !step.is_finite() {
            return None;
        }
        if step.abs() > MAX_STEP {
            step = MAX_STEP.copysign(step);
        }
        e += step;
        if step.abs() < tol {
            return finish(sigma, e, it);
        }
    }
    None
}

fn newton_bracketed(
    eps: f64,
    sigma: &SelfEnergy,
    tol: f64,
    max_iter: usize,
) -> Option<(f64, f64, f64, usize)> {
    let (mut lo, mut hi) = sigma.bracket(eps);
    let mut e = eps;
    const MAX_STEP: f64 = 0.25;
    for it in 1..=max_iter {
        let (s, ds) = sigma.eval(e);
        let f = e - eps - s;
        let fp = 1.0 - ds;
        if f < 0.0 {
            lo = lo.max(e);
        } else {
            hi = hi.min(e);
        }
        let mut step = -f / fp;
        if step.abs() > MAX_STEP {
            step = MAX_STEP.copysign(step);
        }
        let mut next = e + step;
        if !(next > lo && next < hi) {
            next = match (lo.is_finite(), hi.is_finite()) {
                (true, true) => 0.5 * (lo + hi),
                (true, false) => e + MAX_STEP,
                (false, true) => e - MAX_STEP,
                (false, false) => next,
            };
        }
        if (next - e).abs() < tol {
            return finish(sigma, next, it);
        }
        e = next;
    }
    None
}

/// EP2 ionization energies for the target occupied orbitals (MO indices) of a closed-shell
/// RHF wavefunction.
pub fn ep2<E: AoQuartets + ?Sized>(
    engine: &E,
    basis: &BasisSet,
    wf: &Wavefunction,
    targets: &[usize],
    opts: &Ep2Options,
) -> Result<Vec<Ep2Pole>> {
    if wf.reference != Reference::Rhf {
        return Err(Error::input(
            "EP2 is implemented for closed-shell (RHF) references only; for an open-shell \
             molecule use --method dscf or koopmans",
        ));
    }
    let occ: Vec<usize> = (0..wf.occ_alpha.len())
        .filter(|&i| wf.occ_alpha[i] > 0.5)
        .collect();
    let vir: Vec<usize> = (0..wf.occ_alpha.len())
        .filter(|&i| wf.occ_alpha[i] <= 0.5)
        .collect();
    if opts.frozen_core > occ.len() {
        return Err(Error::input(format!(
            "EP2: {} frozen core orbitals requested but only {} are occupied",
            opts.frozen_core,
            occ.len()
        )));
    }
    let active: Vec<usize> = occ[opts.frozen_core..].to_vec();
    for &t in targets {
        if !occ.contains(&t) {
            return Err(Error::input(format!(
                "EP2: orbital {} is not occupied",
                t + 1
            )));
        }
        if !active.contains(&t) {
            return Err(Error::input(format!(
                "EP2: orbital {} is a frozen core orbital",
                t + 1
            )));
        }
    }
    if targets.is_empty() {
        return Ok(Vec::new());
    }
    let n = wf.c_alpha.nrows();
    let cols = |idx: &[usize]| Mat::<f64>::from_fn(n, idx.len(), |mu, k| wf.c_alpha[(mu, idx[k])]);
    let ct = cols(targets);
    let co = cols(&active);
    let cv = cols(&vir);
    let specs = [
        BlockSpec::new(&ct, &cv, &co, &cv),
        BlockSpec::new(&ct, &co, &cv, &co),
    ];
    check_budget(basis, &specs, opts.memory_bytes)?;
    let blocks = mo_eri_blocks(engine, basis, &specs);
    let (no, nv) = (active.len(), vir.len());
    let eps_o: Vec<f64> = active.iter().map(|&i| wf.eps_alpha[i]).collect();
    let eps_v: Vec<f64> = vir.iter().map(|&a| wf.eps_alpha[a]).collect();
    let s1 = nv * no * nv;
    let s2 = no * nv * no;
    targets
        .iter()
        .enumerate()
        .map(|(t, &p)| {
            let sigma = SelfEnergy::closed_shell(
                &blocks[0][t * s1..(t + 1) * s1],
                &blocks[1][t * s2..(t + 1) * s2],
                &eps_o,
                &eps_v,
            );
            let eps = wf.eps_alpha[p];
            let (e, pole, s, it) = solve_dyson(eps, &sigma, opts.tolerance, opts.max_iter)?;
            Ok(Ep2Pole {
                orbital: p,
                epsilon: eps,
                energy: e,
                ie: -e,
                pole_strength: pole,
                sigma: s,
                iterations: it,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;
    use crate::integrals::mo_transform::DenseAoEri;

    fn lcg(seed: &mut u64) -> f64 {
        *seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((*seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
    }

    /// Eight-fold symmetric toy integrals Σ_k A_k(pq) A_k(rs) scaled to a few 0.1 Eh.
    fn toy_tensor(n: usize, seed: u64) -> Vec<f64> {
        let mut s = seed;
        let nk = 3;
        let mut a = vec![0.0; nk * n * n];
        for k in 0..nk {
            for i in 0..n {
                for j in 0..=i {
                    let v = 0.4 * lcg(&mut s);
                    a[(k * n + i) * n + j] = v;
                    a[(k * n + j) * n + i] = v;
                }
            }
        }
        let mut t = vec![0.0; n.pow(4)];
        for p in 0..n * n {
            for q in 0..n * n {
                t[p * n * n + q] = (0..nk).map(|k| a[k * n * n + p] * a[k * n * n + q]).sum();
            }
        }
        t
    }

    /// Spin-orbital second-order self-energy ½Σ|⟨pi||ab⟩|²/(E+εi−εa−εb) + ½Σ|⟨pa||ij⟩|²/(…)
    /// for spatial orbital p with alpha spin; spin orbitals 2k (alpha) and 2k+1 (beta).
    fn spin_orbital_sigma(g: &[f64], n: usize, nocc: usize, eps: &[f64], p: usize, e: f64) -> f64 {
        let gi = |p: usize, q: usize, r: usize, s: usize| g[((p * n + q) * n + r) * n + s];
        // ⟨PQ||RS⟩ = ⟨PQ|RS⟩ − ⟨PQ|SR⟩ with ⟨PQ|RS⟩ = (PR|QS) δ(σP,σR) δ(σQ,σS)
        let anti = |pp: usize, qq: usize, rr: usize, ss: usize| {
            let sp = |x: usize| x % 2;
            let o = |x: usize| x / 2;
            let mut v = 0.0;
            if sp(pp) == sp(rr) && sp(qq) == sp(ss) {
                v += gi(o(pp), o(rr), o(qq), o(ss));
            }
            if sp(pp) == sp(ss) && sp(qq) == sp(rr) {
                v -= gi(o(pp), o(ss), o(qq), o(rr));
            }
            v
        };
        let pp = 2 * p;
        let occ: Vec<usize> = (0..2 * nocc).collect();
        let vir: Vec<usize> = (2 * nocc..2 * n).collect();
        let en = |x: usize| eps[x / 2];
        let mut s = 0.0;
        for &i in &occ {
            for &a in &vir {
                for &b in &vir {
                    let v = anti(pp, i, a, b);
                    s += 0.5 * v * v / (e + en(i) - en(a) - en(b));
                }
            }
        }
        for &i in &occ {
            for &j in &occ {
                for &a in &vir {
                    let v = anti(pp, a, i, j);
                    s += 0.5 * v * v / (e + en(a) - en(i) - en(j));
                }
            }
        }
        s
    }

    fn blocks_from_dense(g: &[f64], n: usize, nocc: usize, p: usize) -> (Vec<f64>, Vec<f64>) {
        let gi = |p: usize, q: usize, r: usize, s: usize| g[((p * n + q) * n + r) * n + s];
        let nv = n - nocc;
        let mut pvov = vec![0.0; nv * nocc * nv];
        for a in 0..nv {
            for i in 0..nocc {
                for b in 0..nv {
                    pvov[(a * nocc + i) * nv + b] = gi(p, nocc + a, i, nocc + b);
                }
            }
        }
        let mut povo = vec![0.0; nocc * nv * nocc];
        for i in 0..nocc {
            for a in 0..nv {
                for j in 0..nocc {
                    povo[(i * nv + a) * nocc + j] = gi(p, i, nocc + a, j);
                }
            }
        }
        (pvov, povo)
    }

    #[test]
    fn spin_adapted_sigma_equals_spin_orbital_sum() {
        let (n, nocc) = (6, 3);
        let g = toy_tensor(n, 11);
        let eps = [-1.3, -0.8, -0.45, 0.1, 0.35, 0.9];
        for p in 0..nocc {
            let (b1, b2) = blocks_from_dense(&g, n, nocc, p);
            let sig = SelfEnergy::closed_shell(&b1, &b2, &eps[..nocc], &eps[nocc..]);
            for e in [-0.6, -0.2, eps[p]] {
                let want = spin_orbital_sigma(&g, n, nocc, &eps, p, e);
                let (got, _) = sig.eval(e);
                assert!(
                    (got - want).abs() < 1e-12 * (1.0 + want.abs()),
                    "p={p} E={e}: {got} vs {want}"
                );
            }
        }
    }

    #[test]
    fn derivative_is_consistent_and_negative() {
        let (n, nocc) = (6, 3);
        let g = toy_tensor(n, 5);
        let eps = [-1.3, -0.8, -0.45, 0.1, 0.35, 0.9];
        let (b1, b2) = blocks_from_dense(&g, n, nocc, 2);
        let sig = SelfEnergy::closed_shell(&b1, &b2, &eps[..nocc], &eps[nocc..]);
        let h = 1e-5;
        let e = -0.45;
        let (_, d) = sig.eval(e);
        let num = (sig.eval(e + h).0 - sig.eval(e - h).0) / (2.0 * h);
        assert!((d - num).abs() < 1e-7 * (1.0 + d.abs()));
        assert!(d < 0.0);
    }

    #[test]
    fn dyson_root_of_one_pole_model_is_the_quadratic_root() {
        // E = ε + N/(E + D) ⇒ E² + (D − ε)E − (εD + N) = 0; the root between the poles that
        // enclose ε (pole at −D = 1.0 above ε = −0.5: take the lower root).
        let (eps, n, d) = (-0.5, 0.02, -1.0);
        let sig = SelfEnergy {
            terms: vec![(n, d)],
        };
        let (e, p, s, _) = solve_dyson(eps, &sig, 1e-12, 100).unwrap();
        let b = d - eps;
        let c = -(eps * d + n);
        let root = (-b - (b * b - 4.0 * c).sqrt()) / 2.0;
        assert!((e - root).abs() < 1e-10, "{e} vs {root}");
        assert!((s - n / (e + d)).abs() < 1e-12);
        let want_p = 1.0 / (1.0 + n / (e + d).powi(2));
        assert!((p - want_p).abs() < 1e-10 && p > 0.0 && p < 1.0);
    }

    fn toy_basis(nsh: usize) -> BasisSet {
        let shells = (0..nsh)
            .map(|k| Shell {
                l: if k == 1 { 1 } else { 0 },
                pure: true,
                center: [0.0, 0.0, k as f64],
                atom: k,
                exponents: vec![1.0],
                coefficients: vec![1.0],
            })
            .collect();
        BasisSet::from_shells("toy", shells)
    }

    fn toy_wavefunction(n: usize, nocc: usize, reference: Reference) -> Wavefunction {
        let mut seed = 3u64;
        let c = Mat::<f64>::from_fn(n, n, |i, j| if i == j { 1.0 } else { 0.2 * lcg(&mut seed) });
        let eps: Vec<f64> = (0..n).map(|k| -1.5 + 0.3 * k as f64).collect();
        let occ: Vec<f64> = (0..n).map(|k| if k < nocc { 1.0 } else { 0.0 }).collect();
        Wavefunction {
            reference,
            energy: 0.0,
            nuclear_repulsion: 0.0,
            one_electron: 0.0,
            two_electron: 0.0,
            converged: true,
            iterations: 1,
            c_alpha: c.clone(),
            c_beta: c,
            eps_alpha: eps.clone(),
            eps_beta: eps,
            occ_alpha: occ.clone(),
            occ_beta: occ,
            s2: 0.0,
            n_basis: n,
            n_independent: n,
            dipole: [0.0; 3],
        }
    }

    #[test]
    fn ao_driven_ep2_matches_dense_mo_reference() {
        let basis = toy_basis(5); // 1 + 3 + 1 + 1 + 1 = 7 functions
        let n = basis.n_basis;
        let nocc = 3;
        let t = toy_tensor(n, 21);
        let eng = DenseAoEri {
            basis: &basis,
            tensor: &t,
        };
        let wf = toy_wavefunction(n, nocc, Reference::Rhf);
        // dense MO tensor
        let c = &wf.c_alpha;
        let mut g = vec![0.0; n.pow(4)];
        for p in 0..n {
            for q in 0..n {
                for r in 0..n {
                    for s in 0..n {
                        let mut v = 0.0;
                        for a in 0..n {
                            for b in 0..n {
                                for e in 0..n {
                                    for f in 0..n {
                                        v += c[(a, p)]
                                            * c[(b, q)]
                                            * c[(e, r)]
                                            * c[(f, s)]
                                            * t[((a * n + b) * n + e) * n + f];
                                    }
                                }
                            }
                        }
                        g[((p * n + q) * n + r) * n + s] = v;
                    }
                }
            }
        }
        let opts = Ep2Options {
            frozen_core: 1,
            ..Default::default()
        };
        let poles = ep2(&eng, &basis, &wf, &[2, 1], &opts).unwrap();
        for pole in &poles {
            let p = pole.orbital;
            // reference self-energy over active occupied 1..nocc, from the dense tensor
            let gi = |p: usize, q: usize, r: usize, s: usize| g[((p * n + q) * n + r) * n + s];
            let eps = &wf.eps_alpha;
            let mut s = 0.0;
            let e = pole.energy;
            for i in 1..nocc {
                for a in nocc..n {
                    for b in nocc..n {
                        let v = gi(p, a, i, b);
                        s += v * (2.0 * v - gi(p, b, i, a)) / (e + eps[i] - eps[a] - eps[b]);
                    }
                    for j in 1..nocc {
                        let v = gi(p, i, a, j);
                        s += v * (2.0 * v - gi(p, j, a, i)) / (e + eps[a] - eps[i] - eps[j]);
                    }
                }
            }
            assert!((pole.sigma - s).abs() < 1e-10, "{} vs {}", pole.sigma, s);
            assert!((pole.energy - (eps[p] + s)).abs() < 1e-9);
            assert!((pole.ie + pole.energy).abs() < 1e-15);
        }
        // open shell is refused as bad input; a frozen target too
        let uhf = toy_wavefunction(n, nocc, Reference::Uhf);
        assert!(matches!(
            ep2(&eng, &basis, &uhf, &[2], &opts),
            Err(Error::Input { .. })
        ));
        assert!(matches!(
            ep2(&eng, &basis, &wf, &[0], &opts),
            Err(Error::Input { .. })
        ));
    }
}
