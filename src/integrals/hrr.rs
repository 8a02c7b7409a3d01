//! Horizontal recurrence of the Head-Gordon–Pople scheme (M. Head-Gordon & J. A. Pople,
//! J. Chem. Phys. 89 (1988) 5777, eq. 18 — equation number from memory), applied to
//! *contracted* integrals: it moves angular momentum from the first centre of a pair to the
//! second,
//!
//! (a, b+1ᵢ| = (a+1ᵢ, b| + ABᵢ (a, b|,   AB = A − B,
//!
//! which holds because x_B = x_A + (A_x − B_x). It needs no exponents, so it runs once per
//! contracted quartet rather than per primitive quartet.
//!
//! The recurrence works on "rows": every (a, b) is a vector over the indices of the other
//! pair, so a step is one vector operation dst = s1 + ABᵢ·s2. The inputs are the rows (e, 0)
//! for l_a ≤ |e| ≤ l_a + l_b in the order of `vrr::shell_range`; the outputs are the rows
//! (a, b), |a| = l_a, |b| = l_b, a-major in the component order of `cartesian`.

use crate::basis::cartesian::{components, MAX_L};
use crate::integrals::vrr::shell_range;
use std::collections::HashMap;
use std::sync::OnceLock;

#[derive(Clone, Copy, Debug)]
struct Step {
    dst: u32,
    s1: u32,
    s2: u32,
    axis: u8,
}

/// Row program for one pair of angular momenta (l_a, l_b), l_b > 0.
pub struct HrrPlan {
    /// Number of input rows (e, 0).
    pub n_in: usize,
    /// Rows of scratch the plan uses; inputs are rows 0..n_in, outputs the last n_out rows.
    pub n_rows: usize,
    pub n_out: usize,
    steps: Vec<Step>,
}

impl HrrPlan {
    /// First output row.
    pub fn out_start(&self) -> usize {
        self.n_rows - self.n_out
    }
}

fn build(la: usize, lb: usize) -> HrrPlan {
    type Key = ([u8; 3], [u8; 3]);
    let to8 = |c: [usize; 3]| [c[0] as u8, c[1] as u8, c[2] as u8];
    let inputs = shell_range(la, la + lb);
    let n_in = inputs.len();
    // Node of (a, b): its recursion (axis, source1, source2) or an input.
    let mut nodes: Vec<(Key, Option<(usize, usize, usize)>)> = Vec::new();
    let mut index: HashMap<Key, usize> = HashMap::new();
    for e in &inputs {
        index.insert((to8(*e), [0; 3]), nodes.len());
        nodes.push(((to8(*e), [0; 3]), None));
    }
    // Depth-first creation from the outputs; children are created before parents, so the
    // node order is a valid execution order.
    fn visit(
        key: Key,
        nodes: &mut Vec<(Key, Option<(usize, usize, usize)>)>,
        index: &mut HashMap<Key, usize>,
    ) -> usize {
        if let Some(&k) = index.get(&key) {
            return k;
        }
        let (a, b) = key;
        // lower b along its largest component
        let mut ax = 0;
        for i in 1..3 {
            if b[i] > b[ax] {
                ax = i;
            }
        }
        let mut b1 = b;
        b1[ax] -= 1;
        let mut a1 = a;
        a1[ax] += 1;
        let s1 = visit((a1, b1), nodes, index);
        let s2 = visit((a, b1), nodes, index);
        nodes.push((key, Some((ax, s1, s2))));
        index.insert(key, nodes.len() - 1);
        nodes.len() - 1
    }
    let outs: Vec<Key> = components(la)
        .iter()
        .flat_map(|&a| components(lb).into_iter().map(move |b| (to8(a), to8(b))))
        .collect();
    let mut out_nodes = Vec::new();
    for &k in &outs {
        out_nodes.push(visit(k, &mut nodes, &mut index));
    }
    // rows: inputs 0..n_in, intermediates, then outputs in output order
    let n_out = outs.len();
    let n_inter = nodes.len() - n_in - n_out;
    let mut row = vec![usize::MAX; nodes.len()];
    for (k, r) in row.iter_mut().enumerate().take(n_in) {
        *r = k;
    }
    for (o, &k) in out_nodes.iter().enumerate() {
        row[k] = n_in + n_inter + o;
    }
    let mut next = n_in;
    for r in row.iter_mut() {
        if *r == usize::MAX {
            *r = next;
            next += 1;
        }
    }
    let steps = nodes
        .iter()
        .enumerate()
        .filter_map(|(k, (_, rec))| {
            rec.map(|(ax, s1, s2)| Step {
                dst: row[k] as u32,
                s1: row[s1] as u32,
                s2: row[s2] as u32,
                axis: ax as u8,
            })
        })
        .collect();
    HrrPlan {
        n_in,
        n_rows: nodes.len(),
        n_out,
        steps,
    }
}

/// The plan for (l_a, l_b), built on first use (l_b ≥ 1).
pub fn plan(la: usize, lb: usize) -> &'static HrrPlan {
    static PLANS: OnceLock<Vec<OnceLock<HrrPlan>>> = OnceLock::new();
    let all = PLANS.get_or_init(|| {
        (0..(MAX_L + 1) * (MAX_L + 1))
            .map(|_| OnceLock::new())
            .collect()
    });
    all[la * (MAX_L + 1) + lb].get_or_init(|| build(la, lb))
}

/// Run the plan on `buf` (rows of length `w`, the inputs already in rows 0..n_in) with
/// AB = A − B. The outputs end up in rows out_start().. . With AVX2 the same code runs
/// compiled for 256-bit vectors (no fused multiply-add: identical results).
#[inline(never)]
pub fn run(plan: &HrrPlan, buf: &mut [f64], w: usize, ab: [f64; 3]) {
    assert!(buf.len() >= plan.n_rows * w);
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the feature is present; bounds checked above.
        unsafe { run_avx2(plan, buf, w, ab) };
        return;
    }
    // SAFETY: bounds checked above.
    unsafe { run_impl(plan, buf, w, ab) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn run_avx2(plan: &HrrPlan, buf: &mut [f64], w: usize, ab: [f64; 3]) {
    run_impl(plan, buf, w, ab)
}

/// Caller guarantees buf.len() ≥ plan.n_rows · w.
#[inline(always)]
unsafe fn run_impl(plan: &HrrPlan, buf: &mut [f64], w: usize, ab: [f64; 3]) {
    use std::slice::{from_raw_parts, from_raw_parts_mut};
    let ptr = buf.as_mut_ptr();
    for st in &plan.steps {
        let f = ab[st.axis as usize];
        // SAFETY: rows are within n_rows and the destination row differs from both sources
        // (distinct nodes).
        let d = from_raw_parts_mut(ptr.add(st.dst as usize * w), w);
        let s1 = from_raw_parts(ptr.add(st.s1 as usize * w), w);
        let s2 = from_raw_parts(ptr.add(st.s2 as usize * w), w);
        for k in 0..w {
            d[k] = s1[k] + f * s2[k];
        }
    }
}
