//! Vertical recurrence of the Obara–Saika / Head-Gordon–Pople two-electron scheme (S. Obara &
//! A. Saika, J. Chem. Phys. 84 (1986) 3963, eq. 39; M. Head-Gordon & J. A. Pople, J. Chem.
//! Phys. 89 (1988) 5777, eq. 6 — equation numbers from memory). For one primitive quartet
//! it builds the integrals [e0|f0]^(0) with the angular momentum of the bra gathered on A and
//! that of the ket on C:
//!
//! [e+1ᵢ,0|f0]^(m) = PAᵢ [e0|f0]^(m) + WPᵢ [e0|f0]^(m+1)
//!                 + eᵢ/(2ζ) ([e−1ᵢ,0|f0]^(m) − ρ/ζ [e−1ᵢ,0|f0]^(m+1))
//!                 + fᵢ/(2(ζ+η)) [e0|f−1ᵢ,0]^(m+1),
//!
//! and the same with the roles of bra (ζ, P, A) and ket (η, Q, C) exchanged, from
//! [00|00]^(m) = 2π^{5/2}/(ζη√(ζ+η)) K_AB K_CD F_m(ρ|PQ|²), ρ = ζη/(ζ+η),
//! W = (ζP + ηQ)/(ζ+η).
//!
//! The targets of a class are all [e0|f0]^(0) with l_a ≤ |e| ≤ l_a + l_b and
//! l_c ≤ |f| ≤ l_c + l_d (what the horizontal recurrence, `hrr`, needs). A plan per class
//! lists, level by level, one step per intermediate (e, f) covering all its orders m at once
//! (a short vector loop); the side of the recursion and the Cartesian direction of every step
//! are chosen when the plan is built (the cheapest of a few strategies), so the hot loop has
//! neither index arithmetic nor decisions.

use crate::basis::cartesian::{components, MAX_L};
use std::sync::OnceLock;

/// One step: for m in 0..n (n and the kind are those of its run),
/// dst[m] = A·s1[m] + B·s1[m+1] + k1 (C·s3[m] − D·s3[m+1]) + k2 E·s5[m+1],
/// with (A, B, C, D) the coefficients of the side being raised along `dir` and
/// E = 1/(2(ζ+η)). Kind 0 has the first two terms only, kind 1 adds the k1 term, kind 2 the
/// k2 term, kind 3 all.
#[derive(Clone, Copy, Debug)]
struct Step {
    dst: u32,
    s1: u32,
    s3: u32,
    s5: u32,
    /// 0..3: bra side along x, y, z; 3..6: ket side.
    dir: u8,
    k1: f64,
    k2: f64,
}

#[derive(Clone, Copy, Debug)]
struct Run {
    kind: u8,
    n: u16,
    start: u32,
    end: u32,
}

/// Recurrence program of one class (l_a, l_a + l_b | l_c, l_c + l_d).
pub struct VrrPlan {
    /// Total angular momentum L: F_0 … F_L are needed.
    pub l_total: usize,
    /// Scratch length (values) the plan uses.
    pub buf_len: usize,
    /// Offset of [00|00]^(m), m = 0..=L, in the scratch.
    pub base: usize,
    steps: Vec<Step>,
    /// Consecutive steps of equal (kind, n), run by one specialised loop.
    runs: Vec<Run>,
    /// Offsets of the targets [e0|f0]^(0), f-major: index f · n_e + e, with e and f running
    /// over the components of |e| = l_a..=l_a+l_b (then `components` order) and likewise f.
    pub targets: Vec<u32>,
    pub n_e: usize,
    pub n_f: usize,
    /// Σ over steps of (orders × terms): the cost estimate that chose the strategy.
    pub cost: usize,
}

/// Per-primitive-quartet coefficients of the recurrence.
#[derive(Clone, Copy, Default, Debug)]
pub struct VrrCoefs {
    /// A per direction: PA (bra, 0..3), QC (ket, 3..6).
    pub a: [f64; 6],
    /// B per direction: WP (bra), WQ (ket).
    pub b: [f64; 6],
    /// C per side: 1/(2ζ), 1/(2η).
    pub c: [f64; 2],
    /// D per side: ρ/(2ζ²), ρ/(2η²).
    pub d: [f64; 2],
    /// 1/(2(ζ+η)).
    pub e: f64,
}

/// Largest number of primitive quartets run through a plan together.
pub const NB_MAX: usize = 64;

/// Batches are padded to a multiple of this many quartets (the vector width of AVX2).
pub const LANES: usize = 4;

/// The coefficients of [`VrrCoefs`] for a batch of primitive quartets (entry j of each
/// array belongs to quartet j).
pub struct BatchCoefs {
    pub a: [[f64; NB_MAX]; 6],
    pub b: [[f64; NB_MAX]; 6],
    pub c: [[f64; NB_MAX]; 2],
    pub d: [[f64; NB_MAX]; 2],
    pub e: [f64; NB_MAX],
}

impl Default for BatchCoefs {
    fn default() -> Self {
        BatchCoefs {
            a: [[0.0; NB_MAX]; 6],
            b: [[0.0; NB_MAX]; 6],
            c: [[0.0; NB_MAX]; 2],
            d: [[0.0; NB_MAX]; 2],
            e: [0.0; NB_MAX],
        }
    }
}

impl BatchCoefs {
    /// Copy the coefficients of quartet `from` to quartet `to` (padding lanes).
    pub fn copy_lane(&mut self, from: usize, to: usize) {
        for k in 0..6 {
            self.a[k][to] = self.a[k][from];
            self.b[k][to] = self.b[k][from];
        }
        for k in 0..2 {
            self.c[k][to] = self.c[k][from];
            self.d[k][to] = self.d[k][from];
        }
        self.e[to] = self.e[from];
    }
}

/// The components of all shells with angular momentum lo..=hi, in level then AO order.
pub fn shell_range(lo: usize, hi: usize) -> Vec<[usize; 3]> {
    (lo..=hi).flat_map(components).collect()
}

#[derive(Clone, Copy, PartialEq, Eq)]
enum Strategy {
    /// Lower f first (every node with f ≠ 0 recurs on the ket), then e.
    KetFirst,
    /// Lower e first, then f.
    BraFirst,
}

type Key = ([u8; 3], [u8; 3]);

struct Node {
    key: Key,
    /// Highest order m needed.
    m: usize,
}

struct Graph {
    nodes: Vec<Node>,
    /// Node of (e, f) at comp_index(e) · n_comp + comp_index(f), or u32::MAX.
    index: Vec<u32>,
    n_comp: usize,
    by_level: Vec<Vec<usize>>,
}

/// Position of a component among all components of levels 0, 1, …: levels below |c| first,
/// then the AO order of `cartesian::components` (x exponent descending, then y).
fn comp_index(c: [u8; 3]) -> usize {
    let l = (c[0] + c[1] + c[2]) as usize;
    let (x, y) = (c[0] as usize, c[1] as usize);
    l * (l + 1) * (l + 2) / 6 + (l - x) * (l - x + 1) / 2 + (l - x - y)
}

impl Graph {
    fn new(lab: usize, lcd: usize) -> Self {
        let top = lab.max(lcd) + 1;
        let n_comp = top * (top + 1) * (top + 2) / 6;
        Graph {
            nodes: Vec::new(),
            index: vec![u32::MAX; n_comp * n_comp],
            n_comp,
            by_level: vec![Vec::new(); lab + lcd + 1],
        }
    }

    fn slot(&self, key: Key) -> usize {
        comp_index(key.0) * self.n_comp + comp_index(key.1)
    }

    /// The node for `key`, created if new, needing orders up to at least `m`.
    fn request(&mut self, key: Key, m: usize) -> usize {
        let slot = self.slot(key);
        let k = self.index[slot] as usize;
        if k != u32::MAX as usize {
            self.nodes[k].m = self.nodes[k].m.max(m);
            return k;
        }
        let level = (key.0[0] + key.0[1] + key.0[2] + key.1[0] + key.1[1] + key.1[2]) as usize;
        self.nodes.push(Node { key, m });
        self.index[slot] = (self.nodes.len() - 1) as u32;
        self.by_level[level].push(self.nodes.len() - 1);
        self.nodes.len() - 1
    }
}

fn minus(v: [u8; 3], i: usize) -> [u8; 3] {
    let mut w = v;
    w[i] -= 1;
    w
}

/// The direction to lower `raise` along: the one whose recursion has the fewest terms, ties
/// to the largest component.
fn choose_axis(raise: [u8; 3], other: [u8; 3]) -> usize {
    let mut best = usize::MAX;
    let mut best_score = (usize::MAX, 0u8);
    for i in 0..3 {
        if raise[i] == 0 {
            continue;
        }
        let terms = (raise[i] >= 2) as usize + (other[i] >= 1) as usize;
        let score = (terms, u8::MAX - raise[i]);
        if score < best_score {
            best_score = score;
            best = i;
        }
    }
    best
}

fn build(la: usize, lab: usize, lc: usize, lcd: usize, strat: Strategy) -> VrrPlan {
    let big_l = lab + lcd;
    let es = shell_range(la, lab);
    let fs = shell_range(lc, lcd);
    let to8 = |c: [usize; 3]| [c[0] as u8, c[1] as u8, c[2] as u8];
    let mut g = Graph::new(lab, lcd);
    let mut targets_nodes = Vec::with_capacity(es.len() * fs.len());
    for f in &fs {
        for e in &es {
            targets_nodes.push(g.request((to8(*e), to8(*f)), 0));
        }
    }
    // Recursion chosen per node, top level first so that a node's order m is final before it
    // requests its sources: (side, axis, s1, s3, s5, k1, k2).
    struct Rec {
        node: usize,
        dir: usize,
        s1: usize,
        s3: Option<usize>,
        s5: Option<usize>,
        k1: usize,
        k2: usize,
    }
    let mut recs: Vec<Rec> = Vec::new();
    // the recs of level l end at level_end[l] (filled top-down; level_end[L + 1] = 0)
    let mut level_end = vec![0usize; big_l + 2];
    for level in (1..=big_l).rev() {
        let mut i = 0;
        while i < g.by_level[level].len() {
            let k = g.by_level[level][i];
            i += 1;
            let (e, f) = g.nodes[k].key;
            let m = g.nodes[k].m + 1;
            let ket = match strat {
                Strategy::KetFirst => f.iter().any(|&x| x > 0),
                Strategy::BraFirst => e.iter().all(|&x| x == 0),
            };
            let rec = if ket {
                let ax = choose_axis(f, e);
                let f1 = minus(f, ax);
                let s1 = g.request((e, f1), m);
                let s3 = (f1[ax] > 0).then(|| g.request((e, minus(f1, ax)), m));
                let s5 = (e[ax] > 0).then(|| g.request((minus(e, ax), f1), m));
                Rec {
                    node: k,
                    dir: 3 + ax,
                    s1,
                    s3,
                    s5,
                    k1: f1[ax] as usize,
                    k2: e[ax] as usize,
                }
            } else {
                let ax = choose_axis(e, f);
                let e1 = minus(e, ax);
                let s1 = g.request((e1, f), m);
                let s3 = (e1[ax] > 0).then(|| g.request((minus(e1, ax), f), m));
                let s5 = (f[ax] > 0).then(|| g.request((e1, minus(f, ax)), m));
                Rec {
                    node: k,
                    dir: ax,
                    s1,
                    s3,
                    s5,
                    k1: e1[ax] as usize,
                    k2: f[ax] as usize,
                }
            };
            recs.push(rec);
        }
        level_end[level] = recs.len();
    }
    // Storage: a zero block (length L + 2) first, then every node's orders 0..=m.
    let zero_len = big_l + 2;
    let mut offset = vec![0usize; g.nodes.len()];
    let mut pos = zero_len;
    let base_node = g.index[g.slot(([0; 3], [0; 3]))] as usize;
    // base first, then the rest by level (the order in which steps are run)
    let mut order: Vec<usize> = vec![base_node];
    for level in 1..=big_l {
        order.extend(g.by_level[level].iter().copied());
    }
    for &k in &order {
        offset[k] = pos;
        pos += g.nodes[k].m + 1;
    }
    // steps in increasing level (sources always sit on lower levels); within a level, in
    // runs of equal kind and number of orders
    let kind_of = |r: &Rec| (r.s3.is_some() as u8) | ((r.s5.is_some() as u8) << 1);
    let mut ordered: Vec<&Rec> = Vec::with_capacity(recs.len());
    // bucket sort of each level by (kind, m), stable
    let n_keys = 4 * (big_l + 1);
    let mut count = vec![0usize; n_keys + 1];
    let mut keys: Vec<usize> = Vec::new();
    for level in 1..=big_l {
        // the recs of this level sit at recs[level_end[level + 1]..level_end[level]]
        let seg = &recs[level_end[level + 1]..level_end[level]];
        keys.clear();
        keys.extend(
            seg.iter()
                .map(|r| kind_of(r) as usize * (big_l + 1) + g.nodes[r.node].m),
        );
        count.iter_mut().for_each(|c| *c = 0);
        for &k in &keys {
            count[k + 1] += 1;
        }
        for k in 0..n_keys {
            count[k + 1] += count[k];
        }
        let from = ordered.len();
        ordered.resize(from + seg.len(), &seg[0]);
        for (r, &k) in seg.iter().zip(&keys) {
            ordered[from + count[k]] = r;
            count[k] += 1;
        }
    }
    let mut steps = Vec::with_capacity(recs.len());
    let mut runs: Vec<Run> = Vec::new();
    let mut cost = 0;
    for r in ordered {
        let n = g.nodes[r.node].m + 1;
        let kind = kind_of(r);
        cost += n * (2 + 2 * r.s3.is_some() as usize + r.s5.is_some() as usize);
        let at = steps.len() as u32;
        match runs.last_mut() {
            Some(run) if run.kind == kind && run.n as usize == n => run.end = at + 1,
            _ => runs.push(Run {
                kind,
                n: n as u16,
                start: at,
                end: at + 1,
            }),
        }
        steps.push(Step {
            dst: offset[r.node] as u32,
            s1: offset[r.s1] as u32,
            s3: r.s3.map_or(0, |s| offset[s]) as u32,
            s5: r.s5.map_or(0, |s| offset[s]) as u32,
            dir: r.dir as u8,
            k1: r.k1 as f64,
            k2: r.k2 as f64,
        });
    }
    debug_assert!(g.nodes[base_node].m <= big_l);
    VrrPlan {
        l_total: big_l,
        buf_len: pos.max(offset[base_node] + big_l + 1),
        base: offset[base_node],
        steps,
        runs,
        targets: targets_nodes.iter().map(|&k| offset[k] as u32).collect(),
        n_e: es.len(),
        n_f: fs.len(),
        cost,
    }
}

/// The plan of a class: the recursion lowers the side with the smaller total angular
/// momentum first and takes the direction with the fewest terms (of the strategies tried,
/// this gave the fewest operations for every class up to (gg|gg); lowering along the largest
/// component instead cost up to 40 % more).
fn build_best(la: usize, lab: usize, lc: usize, lcd: usize) -> VrrPlan {
    let strat = if lcd <= lab {
        Strategy::KetFirst
    } else {
        Strategy::BraFirst
    };
    build(la, lab, lc, lcd, strat)
}

const NL: usize = MAX_L + 1;
const NLL: usize = 2 * MAX_L + 1;

/// The plan of class (l_a, l_a+l_b | l_c, l_c+l_d), built on first use.
pub fn plan(la: usize, lab: usize, lc: usize, lcd: usize) -> &'static VrrPlan {
    static PLANS: OnceLock<Vec<OnceLock<VrrPlan>>> = OnceLock::new();
    let all = PLANS.get_or_init(|| (0..NL * NLL * NL * NLL).map(|_| OnceLock::new()).collect());
    let idx = ((la * NLL + lab) * NL + lc) * NLL + lcd;
    all[idx].get_or_init(|| build_best(la, lab, lc, lcd))
}

/// Run the plan on `buf`, whose [00|00]^(m) block (at `plan.base`) is already filled; the
/// zero block buf[..L+2] must hold zeros.
#[inline(never)]
pub fn run(plan: &VrrPlan, buf: &mut [f64], c: &VrrCoefs) {
    assert!(buf.len() >= plan.buf_len);
    let ptr = buf.as_mut_ptr();
    for r in &plan.runs {
        let steps = &plan.steps[r.start as usize..r.end as usize];
        // SAFETY: every offset + n + 1 lies within plan.buf_len ≤ buf.len() (each source
        // holds at least one order more than its destination), and a destination never
        // overlaps a source (distinct nodes).
        unsafe {
            match (r.kind, r.n) {
                (0, 1) => fixed::<0, 1>(steps, ptr, c),
                (0, 2) => fixed::<0, 2>(steps, ptr, c),
                (0, 3) => fixed::<0, 3>(steps, ptr, c),
                (0, 4) => fixed::<0, 4>(steps, ptr, c),
                (1, 1) => fixed::<1, 1>(steps, ptr, c),
                (1, 2) => fixed::<1, 2>(steps, ptr, c),
                (1, 3) => fixed::<1, 3>(steps, ptr, c),
                (1, 4) => fixed::<1, 4>(steps, ptr, c),
                (2, 1) => fixed::<2, 1>(steps, ptr, c),
                (2, 2) => fixed::<2, 2>(steps, ptr, c),
                (2, 3) => fixed::<2, 3>(steps, ptr, c),
                (2, 4) => fixed::<2, 4>(steps, ptr, c),
                (3, 1) => fixed::<3, 1>(steps, ptr, c),
                (3, 2) => fixed::<3, 2>(steps, ptr, c),
                (3, 3) => fixed::<3, 3>(steps, ptr, c),
                (3, 4) => fixed::<3, 4>(steps, ptr, c),
                (0, n) => general::<0>(steps, ptr, c, n as usize),
                (1, n) => general::<1>(steps, ptr, c, n as usize),
                (2, n) => general::<2>(steps, ptr, c, n as usize),
                (_, n) => general::<3>(steps, ptr, c, n as usize),
            }
        }
    }
}

/// Run the plan on a batch of `nb` primitive quartets (nb a multiple of `LANES`, ≤ NB_MAX;
/// pad with quartets whose [00|00]^(m) are zero): order m of the node
/// at offset o of quartet j sits at buf[(o + m)·nb + j], so every step is a short loop over
/// the batch that the compiler vectorises. [00|00]^(m) must be filled.
///
/// On x86-64 processors with AVX2 the same code is run compiled for 256-bit vectors (chosen
/// at run time; no fused multiply-add, so the results are bit-for-bit those of the baseline
/// build).
#[inline(never)]
pub fn run_batch(plan: &VrrPlan, buf: &mut [f64], nb: usize, c: &BatchCoefs) {
    assert!(nb <= NB_MAX && nb.is_multiple_of(LANES) && buf.len() >= plan.buf_len * nb);
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the feature is present; the bounds were checked above.
        unsafe { run_batch_avx2(plan, buf, nb, c) };
        return;
    }
    // SAFETY: bounds checked above.
    unsafe { run_batch_impl(plan, buf, nb, c) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn run_batch_avx2(plan: &VrrPlan, buf: &mut [f64], nb: usize, c: &BatchCoefs) {
    run_batch_impl(plan, buf, nb, c)
}

/// Caller guarantees nb ≤ NB_MAX and buf.len() ≥ plan.buf_len · nb.
#[inline(always)]
unsafe fn run_batch_impl(plan: &VrrPlan, buf: &mut [f64], nb: usize, c: &BatchCoefs) {
    let ptr = buf.as_mut_ptr();
    for r in &plan.runs {
        let steps = &plan.steps[r.start as usize..r.end as usize];
        let n = r.n as usize;
        // SAFETY: as in `run`, with every offset scaled by nb.
        match r.kind {
            0 => batch::<0>(steps, ptr, c, n, nb),
            1 => batch::<1>(steps, ptr, c, n, nb),
            2 => batch::<2>(steps, ptr, c, n, nb),
            _ => batch::<3>(steps, ptr, c, n, nb),
        }
    }
}

#[inline(always)]
unsafe fn batch<const KIND: u8>(
    steps: &[Step],
    ptr: *mut f64,
    c: &BatchCoefs,
    n: usize,
    nb: usize,
) {
    // nb is a multiple of LANES: every loop below runs over whole chunks of LANES values,
    // loaded into and stored from local arrays (no aliasing questions for the compiler)
    type V = [f64; LANES];
    #[inline(always)]
    unsafe fn ld(p: *const f64) -> V {
        (p as *const V).read_unaligned()
    }
    let chunks = nb / LANES;
    for st in steps {
        let dir = st.dir as usize;
        let side = dir / 3;
        let (a, b) = (c.a[dir].as_ptr(), c.b[dir].as_ptr());
        let (cc, dd, e) = (c.c[side].as_ptr(), c.d[side].as_ptr(), c.e.as_ptr());
        let (k1, k2) = (st.k1, st.k2);
        for m in 0..n {
            let d = ptr.add((st.dst as usize + m) * nb);
            let x = ptr.add((st.s1 as usize + m) * nb);
            let y = ptr.add((st.s1 as usize + m + 1) * nb);
            let u = ptr.add((st.s3 as usize + m) * nb);
            let w = ptr.add((st.s3 as usize + m + 1) * nb);
            let z = ptr.add((st.s5 as usize + m + 1) * nb);
            for ch in 0..chunks {
                let o = ch * LANES;
                let (av, bv, xv, yv) = (ld(a.add(o)), ld(b.add(o)), ld(x.add(o)), ld(y.add(o)));
                let mut r: V = [0.0; LANES];
                for k in 0..LANES {
                    r[k] = av[k] * xv[k] + bv[k] * yv[k];
                }
                if KIND & 1 != 0 {
                    let (cv, dv, uv, wv) =
                        (ld(cc.add(o)), ld(dd.add(o)), ld(u.add(o)), ld(w.add(o)));
                    for k in 0..LANES {
                        r[k] += k1 * (cv[k] * uv[k] - dv[k] * wv[k]);
                    }
                }
                if KIND & 2 != 0 {
                    let (ev, zv) = (ld(e.add(o)), ld(z.add(o)));
                    for k in 0..LANES {
                        r[k] += k2 * ev[k] * zv[k];
                    }
                }
                (d.add(o) as *mut V).write_unaligned(r);
            }
        }
    }
}

/// A run whose number of orders is known at compile time.
#[inline(always)]
unsafe fn fixed<const KIND: u8, const N: usize>(steps: &[Step], ptr: *mut f64, c: &VrrCoefs) {
    for st in steps {
        step::<KIND>(st, ptr, c, N);
    }
}

#[inline(always)]
unsafe fn general<const KIND: u8>(steps: &[Step], ptr: *mut f64, c: &VrrCoefs, n: usize) {
    for st in steps {
        step::<KIND>(st, ptr, c, n);
    }
}

#[inline(always)]
unsafe fn step<const KIND: u8>(st: &Step, ptr: *mut f64, c: &VrrCoefs, n: usize) {
    let dir = st.dir as usize;
    let side = dir / 3;
    let (a, b) = (c.a[dir], c.b[dir]);
    let d = ptr.add(st.dst as usize);
    let s1 = ptr.add(st.s1 as usize);
    let s3 = ptr.add(st.s3 as usize);
    let s5 = ptr.add(st.s5 as usize);
    let (cc, dd, e) = (c.c[side], c.d[side], c.e);
    let (k1, k2) = (st.k1, st.k2);
    // same expression as in `batch`, so batched and single quartets round alike
    for m in 0..n {
        let x = *s1.add(m);
        let y = *s1.add(m + 1);
        *d.add(m) = match KIND {
            0 => a * x + b * y,
            1 => a * x + b * y + k1 * (cc * *s3.add(m) - dd * *s3.add(m + 1)),
            2 => a * x + b * y + k2 * e * *s5.add(m + 1),
            _ => {
                a * x
                    + b * y
                    + k1 * (cc * *s3.add(m) - dd * *s3.add(m + 1))
                    + k2 * e * *s5.add(m + 1)
            }
        };
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plans_are_consistent_for_every_class() {
        // every source of a step sits before its destination and holds one order more
        for la in 0..=2 {
            for lb in 0..=2 {
                for lc in 0..=2 {
                    for ld in 0..=2 {
                        let p = plan(la, la + lb, lc, lc + ld);
                        assert_eq!(p.targets.len(), p.n_e * p.n_f);
                        assert_eq!(comp_index([0, 0, 0]), 0);
                        assert_eq!(comp_index([0, 0, 1]), 3);
                        assert_eq!(comp_index([2, 0, 0]), 4);
                        assert_eq!(comp_index([0, 1, 1]), 8);
                        for r in &p.runs {
                            for st in &p.steps[r.start as usize..r.end as usize] {
                                assert!(st.s1 < st.dst);
                                assert!(st.dst as usize + (r.n as usize) <= p.buf_len);
                            }
                        }
                    }
                }
            }
        }
    }
}
