//! Frozen natural orbitals (FNO) for the open-shell coupled cluster: the virtual space of
//! each spin is rotated to the natural orbitals of the unrelaxed MP2 virtual–virtual
//! density and cut to those that hold a chosen fraction of its trace; the MP2 energy of
//! what was cut is added back to the coupled-cluster energy.
//!
//! Published method: Taube & Bartlett, Collect. Czech. Chem. Commun. 70 (2005) 837 and
//! J. Chem. Phys. 128 (2008) 164101 (closed shell); Landau, Khistyaev, Dolgikh & Krylov,
//! J. Chem. Phys. 132 (2010) 014109 (open-shell and ionized states, separate α and β
//! natural virtuals, the cut by "percentage of the virtual occupation"). References from
//! memory.
//!
//! - Density (spin orbitals): D_ab = ½ Σ_ijc t_ij^ac t_ij^bc with the first-order amplitudes
//!   t_ij^ab = ⟨ij||ab⟩ / (f_ii + f_jj − f_aa − f_bb), active occupied orbitals only (the
//!   frozen core stays frozen), over each spin's kept virtuals (a core hole, kept in the
//!   virtual space for the projection of core_hole.rs, takes no part: no amplitude into it,
//!   and it is kept uncut). For ROHF the semicanonical diagonal is used; the f_ia singles do not enter
//!   the density and are counted in both MP2 energies.
//! - After the cut the kept virtuals are made semicanonical again (their Fock block
//!   diagonalized), so the coupled cluster sees the same kind of reference as without it.
//! - Correction: E_MP2(all virtuals) − E_MP2(kept virtuals), both from the same formula.
//! - This MP2 works on the coupled cluster's own factors and orbital spaces (frozen core,
//!   the core hole, semicanonical ROHF) because the cut must be made there; the ΔMP2 of
//!   core levels (`correlation::mp2::mp2_energy`, all electrons, the hole as a virtual) is a
//!   different quantity and stays where it is.

use bandcast_linalg::{congruence, eigh, gemm, mul, Mat, MatRef, Par};
use rayon::prelude::*;

use super::reference::Prepared;

/// What the natural-virtual cut did.
#[derive(Debug, Clone, PartialEq)]
pub struct NaturalVirtuals {
    /// Fraction of the MP2 virtual population asked to be kept.
    pub population: f64,
    /// Virtual orbitals per spin (α, β) before and after the cut.
    pub full: [usize; 2],
    pub kept: [usize; 2],
    /// MP2 correlation energy with all and with the kept virtuals (hartree).
    pub e_mp2_full: f64,
    pub e_mp2_kept: f64,
}

impl NaturalVirtuals {
    /// The energy added to the coupled-cluster result (hartree, ≤ 0 in practice).
    pub fn correction(&self) -> f64 {
        self.e_mp2_full - self.e_mp2_kept
    }
}

/// The cuts of the two states of an energy difference (neutral and ion), as the notes of
/// `ionize` and `core` report them.
#[derive(Debug, Clone, PartialEq)]
pub struct CutPair {
    /// Kept share of the MP2 virtual population (%).
    pub percent: f64,
    pub neutral_kept: [usize; 2],
    pub neutral_full: [usize; 2],
    pub ion_kept: [usize; 2],
    pub ion_full: [usize; 2],
    /// What the MP2 energy of the cut orbitals adds to E(ion) − E(neutral) (eV).
    pub correction_ev: f64,
}

impl CutPair {
    pub fn new(neutral: &NaturalVirtuals, ion: &NaturalVirtuals) -> CutPair {
        CutPair {
            percent: 100.0 * ion.population,
            neutral_kept: neutral.kept,
            neutral_full: neutral.full,
            ion_kept: ion.kept,
            ion_full: ion.full,
            correction_ev: crate::units::ev(ion.correction() - neutral.correction()),
        }
    }
}

impl std::fmt::Display for CutPair {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let (nk, nf, ik, inf) = (
            self.neutral_kept,
            self.neutral_full,
            self.ion_kept,
            self.ion_full,
        );
        write!(
            f,
            "coupled cluster on frozen natural orbitals ({} % of the MP2 virtual population): \
             {}α+{}β of {}α+{}β virtuals kept in the neutral, {}α+{}β of {}α+{}β in the ion; \
             the MP2 energy of the cut ones adds {:+.3} eV",
            self.percent,
            nk[0],
            nk[1],
            nf[0],
            nf[1],
            ik[0],
            ik[1],
            inf[0],
            inf[1],
            self.correction_ev
        )
    }
}

/// Orbital energies of spin `s`: active occupied, virtual.
fn diagonals(p: &Prepared, s: usize, nf: usize) -> (Vec<f64>, Vec<f64>) {
    let f = &p.fac[s];
    let m = f.m;
    let fo = (nf..f.nocc).map(|i| p.fock[s][i * m + i]).collect();
    let fv = (f.nocc..m).map(|a| p.fock[s][a * m + a]).collect();
    (fo, fv)
}

/// B^Q_ia of active occupied `i` as a naux × v matrix.
fn occupied_rows(p: &Prepared, s: usize, nf: usize) -> Vec<Mat<f64>> {
    let f = &p.fac[s];
    let (m, v) = (f.m, f.m - f.nocc);
    (nf..f.nocc)
        .into_par_iter()
        .map(|i| Mat::from_fn(f.naux, v, |q, a| f.b[q * m * m + i * m + f.nocc + a]))
        .collect()
}

/// acc += t tᵀ (or tᵀ t with `trans`), accumulated in place
/// (no temporary per occupied pair); sequential, since it runs inside a parallel fold.
fn add_square(acc: &mut Mat<f64>, t: &Mat<f64>, trans: bool) {
    gemm(
        acc.as_mut(),
        true,
        t.as_ref(),
        trans,
        t.as_ref(),
        !trans,
        1.0,
        Par::Seq,
    );
}

fn add(acc: &mut Mat<f64>, x: &Mat<f64>) {
    for c in 0..acc.ncols() {
        for r in 0..acc.nrows() {
            acc[(r, c)] += x[(r, c)];
        }
    }
}

/// MP2 correlation energy of the prepared reference (doubles, plus the ROHF singles), and
/// with `density` the virtual–virtual density of each spin.
pub(super) fn mp2(
    p: &Prepared,
    nf: [usize; 2],
    hole: Option<(usize, usize)>,
    density: bool,
) -> (f64, Option<[Mat<f64>; 2]>) {
    let rows = [occupied_rows(p, 0, nf[0]), occupied_rows(p, 1, nf[1])];
    let diag = [diagonals(p, 0, nf[0]), diagonals(p, 1, nf[1])];
    let v = [p.fac[0].m - p.fac[0].nocc, p.fac[1].m - p.fac[1].nocc];
    // the core hole (spin, virtual index) takes no part in the cut: no amplitude into it
    let live = |s: usize, a: usize| hole != Some((s, a));
    let mut e = 0.0;
    let mut dens = [Mat::<f64>::zeros(v[0], v[0]), Mat::<f64>::zeros(v[1], v[1])];
    // same spin: pairs i < j
    for s in 0..2 {
        let (fo, fv) = &diag[s];
        let o = fo.len();
        let pairs: Vec<(usize, usize)> = (0..o)
            .flat_map(|i| (i + 1..o).map(move |j| (i, j)))
            .collect();
        let (es, ds) = pairs
            .par_iter()
            .fold(
                || (0.0, density.then(|| Mat::<f64>::zeros(v[s], v[s]))),
                |(mut e, mut d), &(i, j)| {
                    let k = mul(rows[s][i].as_ref(), true, rows[s][j].as_ref(), false);
                    let t = Mat::from_fn(v[s], v[s], |a, b| {
                        if !(live(s, a) && live(s, b)) {
                            return 0.0;
                        }
                        let w = k[(a, b)] - k[(b, a)];
                        w / (fo[i] + fo[j] - fv[a] - fv[b])
                    });
                    for b in 0..v[s] {
                        for a in 0..v[s] {
                            e += 0.5 * t[(a, b)] * (k[(a, b)] - k[(b, a)]);
                        }
                    }
                    if let Some(d) = d.as_mut() {
                        add_square(d, &t, false);
                    }
                    (e, d)
                },
            )
            .reduce(
                || (0.0, density.then(|| Mat::<f64>::zeros(v[s], v[s]))),
                |(e1, d1), (e2, d2)| {
                    let d = match (d1, d2) {
                        (Some(mut a), Some(b)) => {
                            add(&mut a, &b);
                            Some(a)
                        }
                        (a, _) => a,
                    };
                    (e1 + e2, d)
                },
            );
        e += es;
        if let Some(d) = ds {
            add(&mut dens[s], &d);
        }
    }
    // opposite spin: i α, J β
    let (foa, fva) = &diag[0];
    let (fob, fvb) = &diag[1];
    let pairs: Vec<(usize, usize)> = (0..foa.len())
        .flat_map(|i| (0..fob.len()).map(move |j| (i, j)))
        .collect();
    let zero = || {
        (
            0.0,
            density.then(|| [Mat::<f64>::zeros(v[0], v[0]), Mat::<f64>::zeros(v[1], v[1])]),
        )
    };
    let (eo, dso) = pairs
        .par_iter()
        .fold(zero, |(mut e, mut d), &(i, j)| {
            let k = mul(rows[0][i].as_ref(), true, rows[1][j].as_ref(), false);
            let t = Mat::from_fn(v[0], v[1], |a, b| {
                if !(live(0, a) && live(1, b)) {
                    return 0.0;
                }
                k[(a, b)] / (foa[i] + fob[j] - fva[a] - fvb[b])
            });
            for b in 0..v[1] {
                for a in 0..v[0] {
                    e += t[(a, b)] * k[(a, b)];
                }
            }
            if let Some(d) = d.as_mut() {
                add_square(&mut d[0], &t, false);
                add_square(&mut d[1], &t, true);
            }
            (e, d)
        })
        .reduce(zero, |(e1, d1), (e2, d2)| {
            let d = match (d1, d2) {
                (Some([mut a0, mut a1]), Some([b0, b1])) => {
                    add(&mut a0, &b0);
                    add(&mut a1, &b1);
                    Some([a0, a1])
                }
                (a, _) => a,
            };
            (e1 + e2, d)
        });
    e += eo;
    if let Some([d0, d1]) = dso {
        add(&mut dens[0], &d0);
        add(&mut dens[1], &d1);
    }
    // ROHF singles: Σ f_ia² / (f_ii − f_aa)
    if p.rohf {
        for s in 0..2 {
            let f = &p.fac[s];
            let (fo, fv) = &diag[s];
            for (i, fi) in fo.iter().enumerate() {
                for (a, fa) in fv.iter().enumerate().filter(|&(a, _)| live(s, a)) {
                    let fia = p.fock[s][(nf[s] + i) * f.m + f.nocc + a];
                    e += fia * fia / (fi - fa);
                }
            }
        }
    }
    (e, density.then_some(dens))
}

/// How many of the populations (descending) hold `population` of their sum; at least one.
pub fn kept_count(occupations_descending: &[f64], population: f64) -> usize {
    let total: f64 = occupations_descending.iter().map(|x| x.max(0.0)).sum();
    if occupations_descending.is_empty() {
        return 0;
    }
    if total <= 0.0 {
        return occupations_descending.len();
    }
    let mut acc = 0.0;
    for (k, x) in occupations_descending.iter().enumerate() {
        acc += x.max(0.0);
        if acc >= population * total {
            return k + 1;
        }
    }
    occupations_descending.len()
}

/// Cut each spin's virtual space of `p` to the natural virtuals holding `population` of the
/// MP2 virtual population, in place (factors and Fock matrices), and say what was done.
///
/// `hole_spin`: a core-ionized reference whose emptied core orbital is the lowest virtual of
/// this spin (core_hole.rs). The hole is kept as it is, first among that spin's virtuals,
/// and left out of the MP2 density and of both MP2 energies; the cut is made among the
/// other virtuals.
pub(super) fn truncate(
    p: &mut Prepared,
    nf: [usize; 2],
    population: f64,
    hole_spin: Option<usize>,
) -> NaturalVirtuals {
    let hole = hole_spin.and_then(|s| {
        let (_, fv) = diagonals(p, s, nf[s]);
        (0..fv.len())
            .min_by(|&a, &b| fv[a].total_cmp(&fv[b]))
            .map(|a| (s, a))
    });
    let (e_full, dens) = mp2(p, nf, hole, true);
    let dens = dens.expect("density asked");
    let mut full = [0; 2];
    let mut kept = [0; 2];
    for s in 0..2 {
        let (m, nocc, naux) = (p.fac[s].m, p.fac[s].nocc, p.fac[s].naux);
        let v = m - nocc;
        full[s] = v;
        if v == 0 {
            continue;
        }
        // the virtuals the cut chooses among (all but the hole)
        let held = hole.filter(|h| h.0 == s).map(|h| h.1);
        let free: Vec<usize> = (0..v).filter(|&a| Some(a) != held).collect();
        let nfree = free.len();
        let sub = Mat::from_fn(nfree, nfree, |a, b| dens[s][(free[a], free[b])]);
        let (w, vecs) = eigh(sub.as_ref());
        let order: Vec<usize> = (0..nfree).rev().collect();
        let occ: Vec<f64> = order.iter().map(|&k| w[k]).collect();
        let k = kept_count(&occ, population);
        let u = Mat::from_fn(nfree, k, |r, c| vecs[(r, order[c])]);
        // semicanonical kept virtuals: diagonalize Uᵀ F_vv U
        let fvv = Mat::from_fn(nfree, nfree, |a, b| {
            p.fock[s][(nocc + free[a]) * m + nocc + free[b]]
        });
        let (_, wv) = eigh(congruence(u.as_ref(), fvv.as_ref()).as_ref());
        let t = mul(u.as_ref(), false, wv.as_ref(), false);
        // X = [I 0 0; 0 h 0; 0 0 T], m × m' (the hole column h only in its spin)
        let nh = usize::from(held.is_some());
        kept[s] = k + nh;
        let mk = nocc + nh + k;
        let mut row_of = vec![None; v];
        free.iter()
            .enumerate()
            .for_each(|(k, &a)| row_of[a] = Some(k));
        let x = Mat::from_fn(m, mk, |r, c| {
            if r < nocc || c < nocc {
                return f64::from(u8::from(r == c));
            }
            let (a, c) = (r - nocc, c - nocc);
            if c < nh {
                return f64::from(u8::from(Some(a) == held));
            }
            row_of[a].map_or(0.0, |ra| t[(ra, c - nh)])
        });
        let old = std::mem::take(&mut p.fac[s].b);
        let mut new = vec![0.0; naux * mk * mk];
        new.par_chunks_mut(mk * mk)
            .zip(old.par_chunks(m * m))
            .for_each(|(nq, oq)| {
                let bq = MatRef::from_row_major_slice(oq, m, m);
                let r = congruence(x.as_ref(), bq);
                for pp in 0..mk {
                    for rr in 0..mk {
                        nq[pp * mk + rr] = r[(pp, rr)];
                    }
                }
            });
        p.fac[s].b = new;
        p.fac[s].m = mk;
        let fm = MatRef::from_row_major_slice(&p.fock[s], m, m);
        let fr = congruence(x.as_ref(), fm);
        p.fock[s] = (0..mk * mk).map(|z| fr[(z / mk, z % mk)]).collect();
    }
    let hole_after = hole.map(|(s, _)| (s, 0));
    let (e_kept, _) = mp2(p, nf, hole_after, false);
    NaturalVirtuals {
        population,
        full,
        kept,
        e_mp2_full: e_full,
        e_mp2_kept: e_kept,
    }
}

#[cfg(test)]
mod tests {
    use super::kept_count;

    #[test]
    fn kept_count_reaches_the_asked_fraction() {
        let occ = [0.5, 0.3, 0.15, 0.05];
        assert_eq!(kept_count(&occ, 0.5), 1);
        assert_eq!(kept_count(&occ, 0.8), 2);
        assert_eq!(kept_count(&occ, 0.9), 3);
        assert_eq!(kept_count(&occ, 1.0), 4);
        assert_eq!(kept_count(&[], 0.9), 0);
    }
}
