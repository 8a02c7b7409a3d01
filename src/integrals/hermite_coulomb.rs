//! McMurchie–Davidson Hermite Coulomb integrals R_{tuv}(a, R_PC) (McMurchie & Davidson,
//! J. Comput. Phys. 26 (1978) 218; Helgaker, Jørgensen & Olsen, eqs. 9.9.18–9.9.20):
//!
//! R^n_{000} = (−2a)^n F_n(a R_PC²),
//! R^n_{t+1,u,v} = t R^{n+1}_{t−1,u,v} + X_PC R^{n+1}_{t,u,v}   (and likewise for u, v).
//!
//! Results R_{tuv} = R^0_{tuv} for t + u + v ≤ L are stored in a cube of side L + 1,
//! index (t (L+1) + u)(L+1) + v. The recursion is executed from a precomputed plan per L
//! (a flat list of "new = X_axis · old[s1] + k · old[s2]" steps per level), so the hot loop
//! has no index arithmetic or branches.

use crate::integrals::boys::{boys_array, M_MAX};
use std::sync::OnceLock;

/// Largest total angular momentum L = la + lb + lc + ld handled.
pub const L_MAX: usize = 20;

#[derive(Clone, Copy)]
struct Step {
    dst: u32,
    s1: u32,
    s2: u32,
    axis: u32,
    k: f64,
}

struct Plan {
    /// Cube side + 1 slot that always holds zero; buffer b starts at b * stride.
    stride: usize,
    /// For level n (from L−1 down to 0): range of steps in `steps`.
    levels: Vec<(usize, usize)>,
    steps: Vec<Step>,
}

fn build_plan(l: usize) -> Plan {
    let d = l + 1;
    let cube = d * d * d;
    let stride = cube + 1;
    let zero = cube; // index of the zero slot within a buffer
    let mut levels = Vec::new();
    let mut steps = Vec::new();
    for n in (0..l).rev() {
        let dst_buf = (n & 1) * stride;
        let src_buf = ((n + 1) & 1) * stride;
        let start = steps.len();
        let top = l - n;
        for t in 0..=top {
            for u in 0..=top - t {
                for v in 0..=top - t - u {
                    if t + u + v == 0 {
                        continue;
                    }
                    let (axis, s1, s2, k) = if t > 0 {
                        let s2 = if t > 1 { r_index(d, t - 2, u, v) } else { zero };
                        (0, r_index(d, t - 1, u, v), s2, (t as f64 - 1.0).max(0.0))
                    } else if u > 0 {
                        let s2 = if u > 1 { r_index(d, t, u - 2, v) } else { zero };
                        (1, r_index(d, t, u - 1, v), s2, (u as f64 - 1.0).max(0.0))
                    } else {
                        let s2 = if v > 1 { r_index(d, t, u, v - 2) } else { zero };
                        (2, r_index(d, t, u, v - 1), s2, (v as f64 - 1.0).max(0.0))
                    };
                    steps.push(Step {
                        dst: (dst_buf + r_index(d, t, u, v)) as u32,
                        s1: (src_buf + s1) as u32,
                        s2: (src_buf + s2) as u32,
                        axis,
                        k,
                    });
                }
            }
        }
        levels.push((start, steps.len()));
    }
    Plan {
        stride,
        levels,
        steps,
    }
}

fn plans() -> &'static [Plan] {
    static PLANS: OnceLock<Vec<Plan>> = OnceLock::new();
    PLANS.get_or_init(|| (0..=L_MAX).map(build_plan).collect())
}

/// Scratch for [`hermite_r`]; reuse across calls to avoid allocation.
pub struct RScratch {
    buf: Vec<f64>,
    boys: [f64; M_MAX + 1],
    plans: &'static [Plan],
}

impl Default for RScratch {
    fn default() -> Self {
        let plans = plans();
        let stride = plans[L_MAX].stride;
        RScratch {
            buf: vec![0.0; 2 * stride],
            boys: [0.0; M_MAX + 1],
            plans,
        }
    }
}

/// Cube index of R_{tuv} for side `d` = L + 1.
#[inline(always)]
pub fn r_index(d: usize, t: usize, u: usize, v: usize) -> usize {
    (t * d + u) * d + v
}

/// Compute `prefactor` × R_{tuv} for t + u + v ≤ `l` with exponent `a` and vector
/// `pc` = P − C. Returns the cube (side l + 1), valid where t + u + v ≤ l.
#[inline]
pub fn hermite_r(l: usize, a: f64, pc: [f64; 3], prefactor: f64, s: &mut RScratch) -> &[f64] {
    let t_arg = a * (pc[0] * pc[0] + pc[1] * pc[1] + pc[2] * pc[2]);
    boys_array(l, t_arg, &mut s.boys);
    if l == 0 {
        s.buf[0] = prefactor * s.boys[0];
        return &s.buf[..1];
    }
    if l == 1 {
        // R_000 = F_0, R_100 = X·(−2a F_1), etc. (cube side 2: index 4t + 2u + v)
        let f1 = -2.0 * a * prefactor * s.boys[1];
        s.buf[0] = prefactor * s.boys[0];
        s.buf[1] = pc[2] * f1;
        s.buf[2] = pc[1] * f1;
        s.buf[4] = pc[0] * f1;
        return &s.buf[..8];
    }
    let plan = &s.plans[l];
    let buf = &mut s.buf[..];
    // zero slots of both buffers
    buf[plan.stride - 1] = 0.0;
    buf[2 * plan.stride - 1] = 0.0;
    // (−2a)^n F_n × prefactor
    let mut f = prefactor;
    for n in 0..=l {
        s.boys[n] *= f;
        f *= -2.0 * a;
    }
    buf[(l & 1) * plan.stride] = s.boys[l];
    for (lev, &(s0, s1)) in plan.levels.iter().enumerate() {
        let n = l - 1 - lev;
        buf[(n & 1) * plan.stride] = s.boys[n];
        for st in &plan.steps[s0..s1] {
            let v = pc[st.axis as usize] * buf[st.s1 as usize] + st.k * buf[st.s2 as usize];
            buf[st.dst as usize] = v;
        }
    }
    &s.buf[..plan.stride - 1]
}
