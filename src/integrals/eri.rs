//! Two-electron repulsion integrals (ab|cd) over contracted shells: the engine that owns
//! the precomputed shell-pair data and hands out shell quartets.
//!
//! Method: Head-Gordon–Pople (M. Head-Gordon & J. A. Pople, J. Chem. Phys. 89 (1988) 5777):
//! Obara–Saika vertical recurrence on primitives (`vrr`), contraction, horizontal
//! recurrence on contracted integrals (`hrr`), Cartesian → final AO transform; the kernel is
//! `quartet::contracted_quartet`. Primitive pairs are precomputed per shell pair
//! (`shell_pair`), and primitive quartets below `PRIMITIVE_QUARTET_THRESHOLD` by their
//! Cauchy–Schwarz bound are skipped.
//!
//! General contractions: the basis loader splits them into segmented shells; the engine
//! finds the families again (same centre, l, harmonics and exponent list) and computes a
//! quartet of families for all member combinations at once, the primitive work shared. The
//! blocks are cached per thread (`family_cache`).

use crate::basis::cartesian::n_cartesian;
use crate::basis::normalize::contracted_coefficients;
use crate::basis::solid_harmonics;
use crate::basis::{BasisSet, Shell};
use crate::integrals::family_cache::FamilyCache;
use crate::integrals::ket_batch::ket_batch;
use crate::integrals::quartet::{contracted_quartet, ssss, Scratch, ShellMeta};
use crate::integrals::shell_pair::PairData;
use crate::integrals::transform::{is_identity, Sparse};
use rayon::prelude::*;
use std::cell::RefCell;

/// Primitive quartets whose Cauchy–Schwarz bound |c_ab| Q_ab |c_cd| Q_cd (final AO units,
/// contraction coefficients included) is below this are skipped.
pub const PRIMITIVE_QUARTET_THRESHOLD: f64 = 1e-15;

const NONE: u32 = u32::MAX;

/// ERI engine over one basis set: shell-pair data precomputed, Sync, no locking when
/// computing (each thread keeps its own scratch).
pub struct EriEngine {
    n_shells: usize,
    shells: Vec<ShellMeta>,
    /// Pair data of the "units": ordered pairs of general-contraction families whose member
    /// pairs are all kept, or single ordered shell pairs.
    units: Vec<PairData>,
    /// For the ordered shell pair (a, b), index a·n + b: its unit and member index within
    /// the unit ((NONE, _) when not kept).
    pair_unit: Vec<(u32, u32)>,
    schwarz: Vec<f64>,
    /// Primitive-quartet screening threshold (see `PRIMITIVE_QUARTET_THRESHOLD`).
    tau: f64,
    /// Distinguishes engines in the thread-local family cache.
    id: u64,
}

static ENGINE_ID: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(1);

thread_local! {
    static SCRATCH: RefCell<Scratch> = RefCell::new(Scratch::default());
    static FAMILY: RefCell<FamilyCache> = RefCell::new(FamilyCache::default());
    static PERMUTED: RefCell<Vec<f64>> = const { RefCell::new(Vec::new()) };
}

impl EriEngine {
    pub fn new(basis: &BasisSet) -> Self {
        let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
        Self::build(&basis.shells, &coefs, &|_, _| true)
    }

    /// Engine over `shells` with normalised coefficients `coefs` (see
    /// `crate::basis::normalize`), keeping pair data only for the pairs (a, b) where
    /// `wanted(a, b)` (called with a ≥ b; the pair (b, a) is kept with it). Quartets may only
    /// use kept pairs. Schwarz bounds of pairs not kept are zero.
    pub(crate) fn build(
        shells_in: &[Shell],
        coefs: &[Vec<f64>],
        wanted: &(dyn Fn(usize, usize) -> bool + Sync),
    ) -> Self {
        let n = shells_in.len();
        let shells: Vec<ShellMeta> = shells_in
            .iter()
            .map(|s| {
                let t = solid_harmonics::transform(s.l, s.pure);
                let nc = n_cartesian(s.l);
                ShellMeta {
                    l: s.l,
                    n_func: s.n_functions(),
                    n_cart: nc,
                    transform: if is_identity(t, nc) {
                        None
                    } else {
                        Some(Sparse::from_dense(t, s.n_functions(), nc))
                    },
                }
            })
            .collect();
        // general-contraction families: shells on the same centre with the same l, harmonics
        // and (at least two) primitive exponents; represented by their lowest index
        let mut family_of: Vec<usize> = (0..n).collect();
        for a in 0..n {
            let sa = &shells_in[a];
            if sa.exponents.len() < 2 {
                continue;
            }
            if let Some(r) = (0..a).find(|&r| {
                let sr = &shells_in[r];
                family_of[r] == r
                    && sr.l == sa.l
                    && sr.pure == sa.pure
                    && sr.center == sa.center
                    && sr.exponents == sa.exponents
            }) {
                family_of[a] = r;
            }
        }
        let mut members: Vec<Vec<usize>> = vec![Vec::new(); n];
        for a in 0..n {
            members[family_of[a]].push(a);
        }
        let kept = |a: usize, b: usize| wanted(a.max(b), a.min(b));
        // units: (shell of the bra, shell of the ket, member shells of each side)
        let mut unit_list: Vec<(Vec<usize>, Vec<usize>)> = Vec::new();
        let mut pair_unit = vec![(NONE, 0u32); n * n];
        for ra in (0..n).filter(|&r| family_of[r] == r) {
            for rb in (0..n).filter(|&r| family_of[r] == r) {
                let (fa, fb) = (&members[ra], &members[rb]);
                let all = fa.iter().all(|&x| fb.iter().all(|&y| kept(x, y)));
                if all && fa.len() * fb.len() > 1 {
                    let u = unit_list.len() as u32;
                    for (i, &x) in fa.iter().enumerate() {
                        for (j, &y) in fb.iter().enumerate() {
                            pair_unit[x * n + y] = (u, (i * fb.len() + j) as u32);
                        }
                    }
                    unit_list.push((fa.clone(), fb.clone()));
                } else {
                    for &x in fa {
                        for &y in fb {
                            if kept(x, y) {
                                pair_unit[x * n + y] = (unit_list.len() as u32, 0);
                                unit_list.push((vec![x], vec![y]));
                            }
                        }
                    }
                }
            }
        }
        let units: Vec<PairData> = unit_list
            .par_iter()
            .map(|(fa, fb)| {
                let (sa, sb) = (&shells_in[fa[0]], &shells_in[fb[0]]);
                let ca: Vec<&[f64]> = fa.iter().map(|&x| &coefs[x][..]).collect();
                let cb: Vec<&[f64]> = fb.iter().map(|&x| &coefs[x][..]).collect();
                let mut pd = PairData::new(sa, sb, &ca, &cb);
                if pd.prims.iter().all(|x| x.zeta > 0.0) {
                    let metas = [
                        &shells[fa[0]],
                        &shells[fb[0]],
                        &shells[fa[0]],
                        &shells[fb[0]],
                    ];
                    let q = SCRATCH.with(|s| {
                        let s = &mut s.borrow_mut();
                        primitive_schwarz(metas, &pd, s)
                    });
                    pd.set_bounds(&q);
                }
                pd
            })
            .collect();
        let mut eng = EriEngine {
            n_shells: n,
            shells,
            units,
            pair_unit,
            schwarz: Vec::new(),
            tau: PRIMITIVE_QUARTET_THRESHOLD,
            id: ENGINE_ID.fetch_add(1, std::sync::atomic::Ordering::Relaxed),
        };
        let diag: Vec<(usize, usize)> = (0..n)
            .flat_map(|a| (0..=a).map(move |b| (a, b)))
            .filter(|&(a, b)| {
                let (u, _) = eng.pair_unit[a * n + b];
                u != NONE && eng.units[u as usize].prims.iter().all(|x| x.zeta > 0.0)
            })
            .collect();
        // diagonal quartets (ab|ab) without primitive screening: the bounds must not be
        // underestimated for pairs whose own diagonal is tiny
        let vals: Vec<(usize, usize, f64)> = diag
            .into_par_iter()
            .map(|(a, b)| {
                let (u, m) = eng.pair_unit[a * n + b];
                let pd = &eng.units[u as usize];
                let metas = [
                    &eng.shells[a],
                    &eng.shells[b],
                    &eng.shells[a],
                    &eng.shells[b],
                ];
                let (na, nb) = (eng.shells[a].n_func, eng.shells[b].n_func);
                let block = na * nb * na * nb;
                let mut out = vec![0.0; pd.n_members * pd.n_members * block];
                SCRATCH.with(|s| {
                    contracted_quartet(metas, pd, pd, 0.0, &mut out, &mut s.borrow_mut())
                });
                let off = (m as usize * pd.n_members + m as usize) * block;
                let mut v: f64 = 0.0;
                for i in 0..na {
                    for j in 0..nb {
                        v = v.max(out[off + ((i * nb + j) * na + i) * nb + j].abs());
                    }
                }
                (a, b, v.sqrt())
            })
            .collect();
        let mut sch = vec![0.0; n * n];
        for (a, b, v) in vals {
            sch[a * n + b] = v;
            sch[b * n + a] = v;
        }
        eng.schwarz = sch;
        eng
    }

    /// As [`EriEngine::new`] with primitive quartets screened at `tau` instead of
    /// `PRIMITIVE_QUARTET_THRESHOLD` (0 computes every primitive quartet: for checks).
    pub fn with_primitive_threshold(basis: &BasisSet, tau: f64) -> Self {
        let mut e = Self::new(basis);
        e.tau = tau;
        e.id = ENGINE_ID.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        e
    }

    pub fn n_shells(&self) -> usize {
        self.n_shells
    }

    /// Schwarz bounds sqrt(max |(ab|ab)|) per shell pair, n_shells × n_shells row-major.
    pub fn schwarz(&self) -> &[f64] {
        &self.schwarz
    }

    /// The pair data of the ordered shell pair (a, b) when it is a plain pair (not part of
    /// a general-contraction family unit), else None.
    pub(crate) fn plain_pair(&self, a: usize, b: usize) -> Option<&PairData> {
        let (u, _) = self.pair_unit[a * self.n_shells + b];
        if u == NONE {
            return None;
        }
        let pd = &self.units[u as usize];
        (pd.n_members == 1).then_some(pd)
    }

    /// What the kernel knows of shell `s`.
    pub(crate) fn meta(&self, s: usize) -> &ShellMeta {
        &self.shells[s]
    }

    /// The primitive-quartet screening threshold.
    pub(crate) fn tau(&self) -> f64 {
        self.tau
    }

    /// Number of final AO functions of shell `s`.
    pub fn n_functions(&self, s: usize) -> usize {
        self.shells[s].n_func
    }

    /// (ab|cd) in the final AO basis, chemists' notation, into `out` (resized) with layout
    /// out[((i·nb + j)·nc + k)·nd + l].
    pub fn shell_quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        let (a2, b2, sab) = self.orient(a, b);
        let (c2, d2, scd) = self.orient(c, d);
        if !sab && !scd {
            self.quartet_oriented(a, b, c, d, out);
            return;
        }
        PERMUTED.with(|t| {
            let t = &mut *t.borrow_mut();
            self.quartet_oriented(a2, b2, c2, d2, t);
            let dims = [a, b, c, d].map(|x| self.shells[x].n_func);
            out.truncate(t.len());
            out.resize(t.len(), 0.0);
            unswap(t, dims, sab, scd, out);
        });
    }

    /// The pair (a, b) with the shell of higher angular momentum first, and whether that
    /// swapped them: the recurrences cost less that way round (e.g. the horizontal one needs
    /// 30 row steps for (f, p) but 141 for (p, f), and the vertical one fewer targets).
    fn orient(&self, a: usize, b: usize) -> (usize, usize, bool) {
        if self.shells[a].l < self.shells[b].l {
            (b, a, true)
        } else {
            (a, b, false)
        }
    }

    /// [`EriEngine::shell_quartet`] in the order given.
    fn quartet_oriented(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        let n = self.n_shells;
        let (ub, mb) = self.pair_unit[a * n + b];
        let (uk, mk) = self.pair_unit[c * n + d];
        assert!(
            ub != NONE && uk != NONE,
            "shell pair not kept by this engine"
        );
        let (pb, pk) = (&self.units[ub as usize], &self.units[uk as usize]);
        let metas = [
            &self.shells[a],
            &self.shells[b],
            &self.shells[c],
            &self.shells[d],
        ];
        let block = metas.iter().map(|m| m.n_func).product::<usize>();
        // every element is written below: no need to clear
        out.truncate(block);
        out.resize(block, 0.0);
        if pb.n_members * pk.n_members == 1 {
            if block == 1 && metas.iter().all(|m| m.l == 0) {
                out[0] = ssss(pb, pk, self.tau);
                return;
            }
            SCRATCH.with(|s| contracted_quartet(metas, pb, pk, self.tau, out, &mut s.borrow_mut()));
            return;
        }
        let total = pb.n_members * pk.n_members * block;
        let key = ((ub as u64) << 32) | uk as u64;
        FAMILY.with(|cache| {
            let mut cache = cache.borrow_mut();
            let all = cache.get_or_compute(self.id, key, total, |dst| {
                SCRATCH
                    .with(|s| contracted_quartet(metas, pb, pk, self.tau, dst, &mut s.borrow_mut()))
            });
            let m = mb as usize * pk.n_members + mk as usize;
            out.copy_from_slice(&all[m * block..(m + 1) * block]);
        });
    }
}

impl EriEngine {
    /// (ab|cd) for the bra pair (a, b) and every ket pair (c, d) of `kets`, the blocks one
    /// after the other in `out` (resized): block k has n_a n_b n_c n_d values, layout as
    /// [`EriEngine::shell_quartet`], and is bit-for-bit what `shell_quartet(a, b, c, d)`
    /// gives. Faster than one call per quartet when the kets hold uncontracted shells of few
    /// distinct classes (the primitive quartets of kets of one class are run through the
    /// recurrence together; see `ket_batch`); for a loop over bra pairs with the significant
    /// kets of each, e.g. a Fock build.
    pub fn shell_quartets(&self, a: usize, b: usize, kets: &[(usize, usize)], out: &mut Vec<f64>) {
        let n = self.n_shells;
        let nab = self.shells[a].n_func * self.shells[b].n_func;
        let mut offs = Vec::with_capacity(kets.len());
        let mut total = 0;
        for &(c, d) in kets {
            offs.push(total);
            total += nab * self.shells[c].n_func * self.shells[d].n_func;
        }
        out.truncate(total);
        out.resize(total, 0.0);
        // every pair with the higher angular momentum first (see `orient`); the blocks are
        // computed in that order and put back at the end
        let (a2, b2, sab) = self.orient(a, b);
        let (ub, _) = self.pair_unit[a2 * n + b2];
        assert!(ub != NONE, "shell pair not kept by this engine");
        let pb = &self.units[ub as usize];
        let okets: Vec<(usize, usize, bool)> =
            kets.iter().map(|&(c, d)| self.orient(c, d)).collect();
        // kets of one class (l and harmonics of c and d) with single-member pair data, by
        // class; the rest one by one
        let mut single: Vec<usize> = Vec::new();
        let mut grouped: Vec<(u64, usize)> = Vec::with_capacity(kets.len());
        for (k, &(c, d, _)) in okets.iter().enumerate() {
            let (uk, _) = self.pair_unit[c * n + d];
            assert!(uk != NONE, "shell pair not kept by this engine");
            if pb.n_members > 1 || self.units[uk as usize].n_members > 1 {
                single.push(k);
            } else {
                let (sc, sd) = (&self.shells[c], &self.shells[d]);
                let key = ((sc.l * 64 + sc.n_func) * 64 + sd.l) * 64 + sd.n_func;
                grouped.push((key as u64, k));
            }
        }
        let mut tmp = Vec::new();
        for k in single {
            let (c, d, _) = okets[k];
            self.quartet_oriented(a2, b2, c, d, &mut tmp);
            out[offs[k]..offs[k] + tmp.len()].copy_from_slice(&tmp);
        }
        grouped.sort_unstable();
        let mut refs: Vec<&PairData> = Vec::new();
        let mut goffs: Vec<usize> = Vec::new();
        for group in grouped.chunk_by(|x, y| x.0 == y.0) {
            let (c, d, _) = okets[group[0].1];
            let metas = [
                &self.shells[a2],
                &self.shells[b2],
                &self.shells[c],
                &self.shells[d],
            ];
            refs.clear();
            goffs.clear();
            for &(_, k) in group {
                let (c, d, _) = okets[k];
                refs.push(&self.units[self.pair_unit[c * n + d].0 as usize]);
                goffs.push(offs[k]);
            }
            SCRATCH
                .with(|s| ket_batch(metas, pb, &refs, &goffs, self.tau, out, &mut s.borrow_mut()));
        }
        for (k, &(c, d)) in kets.iter().enumerate() {
            let scd = okets[k].2;
            if sab || scd {
                let dims = [a, b, c, d].map(|x| self.shells[x].n_func);
                let len = dims.iter().product::<usize>();
                tmp.clear();
                tmp.extend_from_slice(&out[offs[k]..offs[k] + len]);
                unswap(&tmp, dims, sab, scd, &mut out[offs[k]..offs[k] + len]);
            }
        }
    }
}

/// `out` = the block (ab|cd) with final dimensions `dims` = [n_a, n_b, n_c, n_d] from `src`,
/// the same block computed with a and b swapped (`sab`) and/or c and d swapped (`scd`).
fn unswap(src: &[f64], dims: [usize; 4], sab: bool, scd: bool, out: &mut [f64]) {
    let [na, nb, nc, nd] = dims;
    let (sb, sd) = (if sab { na } else { nb }, if scd { nc } else { nd });
    let sc = if scd { nd } else { nc };
    for i in 0..na {
        for j in 0..nb {
            let (i2, j2) = if sab { (j, i) } else { (i, j) };
            let src_ab = &src[(i2 * sb + j2) * sc * sd..(i2 * sb + j2 + 1) * sc * sd];
            let dst = &mut out[(i * nb + j) * nc * nd..(i * nb + j + 1) * nc * nd];
            if scd {
                for k in 0..nc {
                    for l in 0..nd {
                        dst[k * nd + l] = src_ab[l * sd + k];
                    }
                }
            } else {
                dst.copy_from_slice(src_ab);
            }
        }
    }
}

/// Cauchy–Schwarz factors √max|(ab|ab)_kk| of every primitive pair k of `pd` (coefficient 1),
/// in the final AO basis.
fn primitive_schwarz(metas: [&ShellMeta; 4], pd: &PairData, s: &mut Scratch) -> Vec<f64> {
    let (na, nb) = (metas[0].n_func, metas[1].n_func);
    let mut out = vec![0.0; na * nb * na * nb];
    (0..pd.n_prim)
        .map(|k| {
            let single = pd.single(k);
            contracted_quartet(metas, &single, &single, 0.0, &mut out, s);
            let mut m: f64 = 0.0;
            for i in 0..na {
                for j in 0..nb {
                    m = m.max(out[((i * nb + j) * na + i) * nb + j].abs());
                }
            }
            m.sqrt()
        })
        .collect()
}

/// The full ERI array (μν|λσ) over all AOs, index ((μ n + ν) n + λ) n + σ, built from the
/// unique quartets (8-fold permutational symmetry) in parallel. Memory 8 n⁴ bytes: for
/// small systems and tests.
pub fn eri_tensor(basis: &BasisSet) -> Vec<f64> {
    let engine = EriEngine::new(basis);
    eri_tensor_with(&engine, basis)
}

struct SyncPtr(*mut f64);
unsafe impl Sync for SyncPtr {}
unsafe impl Send for SyncPtr {}

/// As [`eri_tensor`] with an existing engine.
pub fn eri_tensor_with(engine: &EriEngine, basis: &BasisSet) -> Vec<f64> {
    let nb = basis.n_basis;
    let ns = basis.shells.len();
    let mut g = vec![0.0; nb * nb * nb * nb];
    let ptr = SyncPtr(g.as_mut_ptr());
    let pairs: Vec<(usize, usize)> = (0..ns).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
    let off = &basis.offsets;
    pairs.par_iter().enumerate().for_each(|(iab, &(a, b))| {
        let ptr = &ptr;
        let mut buf = Vec::new();
        for &(c, d) in &pairs[..=iab] {
            engine.shell_quartet(a, b, c, d, &mut buf);
            let (na, nbb, nc, nd) = (
                engine.n_functions(a),
                engine.n_functions(b),
                engine.n_functions(c),
                engine.n_functions(d),
            );
            for i in 0..na {
                for j in 0..nbb {
                    for k in 0..nc {
                        for l in 0..nd {
                            let v = buf[((i * nbb + j) * nc + k) * nd + l];
                            let (p, q, r, s) = (off[a] + i, off[b] + j, off[c] + k, off[d] + l);
                            for (w, x, y, z) in [
                                (p, q, r, s),
                                (q, p, r, s),
                                (p, q, s, r),
                                (q, p, s, r),
                                (r, s, p, q),
                                (s, r, p, q),
                                (r, s, q, p),
                                (s, r, q, p),
                            ] {
                                // SAFETY: every element belongs to exactly one unique shell
                                // quartet, handled by exactly one task; images written twice
                                // within a task carry the same value.
                                unsafe {
                                    *ptr.0.add(((w * nb + x) * nb + y) * nb + z) = v;
                                }
                            }
                        }
                    }
                }
            }
        }
    });
    g
}
