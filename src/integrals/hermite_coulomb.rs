//! McMurchie–Davidson Hermite Coulomb integrals R_{tuv}(a, R_PC) (McMurchie & Davidson,
//! J. Comput. Phys. 26 (1978) 218; Helgaker, Jørgensen & Olsen, eqs. 9.9.18–9.9.20):
//!
//! R^n_{000} = (−2a)^n F_n(a R_PC²),
//! R^n_{t+1,u,v} = t R^{n+1}_{t−1,u,v} + X_PC R^{n+1}_{t,u,v}   (and likewise for u, v).
//!
//! Results R_{tuv} = R^0_{tuv} for t + u + v ≤ L are stored in a cube of side L + 1,
//! index (t (L+1) + u)(L+1) + v.

use crate::integrals::boys::boys_array;

/// Scratch for [`hermite_r`]; reuse across calls to avoid allocation.
#[derive(Default)]
pub struct RScratch {
    a: Vec<f64>,
    b: Vec<f64>,
    boys: Vec<f64>,
}

/// Cube index of R_{tuv} for side `d` = L + 1.
#[inline(always)]
pub fn r_index(d: usize, t: usize, u: usize, v: usize) -> usize {
    (t * d + u) * d + v
}

/// Compute R_{tuv} for t + u + v ≤ `l` with exponent `a` and vector `pc` = P − C.
/// Returns the cube (side l + 1), valid where t + u + v ≤ l.
pub fn hermite_r<'s>(
    l: usize,
    a: f64,
    pc: [f64; 3],
    prefactor: f64,
    s: &'s mut RScratch,
) -> &'s [f64] {
    let d = l + 1;
    let n3 = d * d * d;
    if s.a.len() < n3 {
        s.a.resize(n3, 0.0);
        s.b.resize(n3, 0.0);
    }
    if s.boys.len() < l + 1 {
        s.boys.resize(l + 1, 0.0);
    }
    let t_arg = a * (pc[0] * pc[0] + pc[1] * pc[1] + pc[2] * pc[2]);
    boys_array(l, t_arg, &mut s.boys);
    // (−2a)^n F_n, times the caller's prefactor
    let mut f = prefactor;
    for n in 0..=l {
        s.boys[n] *= f;
        f *= -2.0 * a;
    }
    let (mut cur, mut nxt) = (&mut s.a, &mut s.b);
    cur[0] = s.boys[l];
    for n in (0..l).rev() {
        let top = l - n;
        for t in 0..=top {
            for u in 0..=top - t {
                for v in 0..=top - t - u {
                    let val = if t > 0 {
                        let mut x = pc[0] * cur[r_index(d, t - 1, u, v)];
                        if t > 1 {
                            x += (t - 1) as f64 * cur[r_index(d, t - 2, u, v)];
                        }
                        x
                    } else if u > 0 {
                        let mut x = pc[1] * cur[r_index(d, t, u - 1, v)];
                        if u > 1 {
                            x += (u - 1) as f64 * cur[r_index(d, t, u - 2, v)];
                        }
                        x
                    } else if v > 0 {
                        let mut x = pc[2] * cur[r_index(d, t, u, v - 1)];
                        if v > 1 {
                            x += (v - 1) as f64 * cur[r_index(d, t, u, v - 2)];
                        }
                        x
                    } else {
                        s.boys[n]
                    };
                    nxt[r_index(d, t, u, v)] = val;
                }
            }
        }
        std::mem::swap(&mut cur, &mut nxt);
    }
    if l == 0 {
        s.a[0] = s.boys[0];
        return &s.a[..n3];
    }
    // after an odd number of swaps the result sits in b
    if l % 2 == 1 {
        &s.b[..n3]
    } else {
        &s.a[..n3]
    }
}
