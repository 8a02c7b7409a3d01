//! Contracting one unique shell-quartet block (ab|cd) with densities into J and K, using all
//! eight permutational symmetries (μν|λσ) = (νμ|λσ) = (μν|σλ) = (λσ|μν) = ….
//!
//! Each unique quartet is weighted by its degeneracy g (`quartets::degeneracy`) and added
//! once to the "half" matrices
//!   J̃_ab += g (ab|cd) D_cd,   J̃_cd += g (ab|cd) D_ab,
//!   K̃_ac += g (ab|cd) D_bd,   K̃_bd += …,   K̃_ad += g (ab|cd) D_bc,   K̃_bc += …;
//! the full matrices are then J = (J̃ + J̃ᵀ)/4 and K = (K̃ + K̃ᵀ)/8 (`finish`). This is the
//! usual symmetric-digestion scheme of direct SCF (Almlöf, Faegri & Korsell, J. Comput. Chem.
//! 3 (1982) 385).
//!
//! The kernel reads the density rows and updates the accumulator rows in place (no local
//! copies of the six density and six result blocks): per quartet there is no set-up beyond
//! slicing rows, which matters because most quartets of a molecule are small ((ss|ss) holds
//! one integral). (ss|ss) has its own six-line path.

use bandcast_linalg::Mat;

use super::schedule::Partial;
use super::Jk;

/// Per-chunk accumulators: half J and K per density, row-major n × n.
#[derive(Debug, Clone)]
pub struct Accumulator {
    pub n: usize,
    pub j: Vec<Vec<f64>>,
    pub k: Vec<Vec<f64>>,
}

/// Densities in row-major form with their per-shell-pair maxima (for density screening).
pub struct Densities {
    pub n: usize,
    pub d: Vec<Vec<f64>>,
    /// max over densities and over the block of |D|, per shell pair (n_shell × n_shell).
    pub shell_max: Vec<f64>,
    pub n_shell: usize,
}

impl Densities {
    pub fn new(mats: &[&Mat<f64>], sizes: &[usize], offsets: &[usize]) -> Self {
        let n = mats.first().map_or(0, |m| m.nrows());
        let d: Vec<Vec<f64>> = mats
            .iter()
            .map(|m| {
                let mut v = vec![0.0; n * n];
                for i in 0..n {
                    for j in 0..n {
                        v[i * n + j] = 0.5 * (m[(i, j)] + m[(j, i)]);
                    }
                }
                v
            })
            .collect();
        let ns = sizes.len();
        let mut shell_max = vec![0.0f64; ns * ns];
        for a in 0..ns {
            for b in 0..ns {
                let mut m = 0.0f64;
                for dv in &d {
                    for i in offsets[a]..offsets[a] + sizes[a] {
                        for x in &dv[i * n + offsets[b]..i * n + offsets[b] + sizes[b]] {
                            m = m.max(x.abs());
                        }
                    }
                }
                shell_max[a * ns + b] = m;
            }
        }
        Densities {
            n,
            d,
            shell_max,
            n_shell: ns,
        }
    }

    /// Largest density element that multiplies any integral of quartet (ab|cd).
    #[inline]
    pub fn quartet_max(&self, a: usize, b: usize, c: usize, d: usize) -> f64 {
        let ns = self.n_shell;
        let m = &self.shell_max;
        m[c * ns + d]
            .max(m[a * ns + b])
            .max(m[b * ns + d])
            .max(m[a * ns + c])
            .max(m[b * ns + c])
            .max(m[a * ns + d])
    }
}

impl Accumulator {
    pub fn new(n: usize, n_dens: usize) -> Self {
        Accumulator {
            n,
            j: vec![vec![0.0; n * n]; n_dens],
            k: vec![vec![0.0; n * n]; n_dens],
        }
    }

    /// Add the contributions of block (ab|cd), weighted by `deg`, for every density.
    /// `off` are the first AO indices and `size` the numbers of functions of a, b, c, d.
    #[inline]
    pub fn add_block(
        &mut self,
        block: &[f64],
        off: [usize; 4],
        size: [usize; 4],
        deg: f64,
        dens: &Densities,
    ) {
        let n = self.n;
        // The kernels below index without checks: this is their guarantee.
        assert!(
            off.iter().zip(&size).all(|(o, s)| o + s <= n)
                && block.len() >= size.iter().product::<usize>()
                && dens.d.iter().all(|d| d.len() == n * n)
                && self.j.iter().chain(&self.k).all(|m| m.len() == n * n)
        );
        for ((d, jt), kt) in dens.d.iter().zip(&mut self.j).zip(&mut self.k) {
            if size == [1, 1, 1, 1] {
                digest_ssss(block[0] * deg, off, d, jt, kt, n);
            } else {
                digest(block, off, size, deg, d, jt, kt, n);
            }
        }
    }

    /// Symmetrise the half matrices into J and K.
    pub fn finish(&self) -> Vec<Jk> {
        let n = self.n;
        self.j
            .iter()
            .zip(&self.k)
            .map(|(jt, kt)| Jk {
                j: Mat::<f64>::from_fn(n, n, |i, j| 0.25 * (jt[i * n + j] + jt[j * n + i])),
                k: Mat::<f64>::from_fn(n, n, |i, j| 0.125 * (kt[i * n + j] + kt[j * n + i])),
            })
            .collect()
    }
}

impl Partial for Accumulator {
    fn clear(&mut self) {
        for v in self.j.iter_mut().chain(self.k.iter_mut()) {
            v.iter_mut().for_each(|x| *x = 0.0);
        }
    }

    fn add(&mut self, other: &Accumulator) {
        for (a, b) in self.j.iter_mut().zip(&other.j) {
            a.iter_mut().zip(b).for_each(|(x, y)| *x += y);
        }
        for (a, b) in self.k.iter_mut().zip(&other.k) {
            a.iter_mut().zip(b).for_each(|(x, y)| *x += y);
        }
    }
}

/// (ss|ss): one integral `v` (already weighted), six updates.
#[inline]
fn digest_ssss(v: f64, off: [usize; 4], d: &[f64], jt: &mut [f64], kt: &mut [f64], n: usize) {
    let [a, b, c, e] = off;
    jt[a * n + b] += d[c * n + e] * v;
    jt[c * n + e] += d[a * n + b] * v;
    kt[a * n + c] += d[b * n + e] * v;
    kt[b * n + e] += d[a * n + c] * v;
    kt[a * n + e] += d[b * n + c] * v;
    kt[b * n + c] += d[a * n + e] * v;
}

/// The general block: loops i (a), j (b), k (c), l (d) with the l loop over contiguous row
/// pieces of D and of the accumulators. Common widths of the d shell get their own copy with
/// the width known at compile time (unrolled, no bounds checks in the l loop).
#[allow(clippy::too_many_arguments)]
#[inline]
fn digest(
    block: &[f64],
    off: [usize; 4],
    size: [usize; 4],
    deg: f64,
    d: &[f64],
    jt: &mut [f64],
    kt: &mut [f64],
    n: usize,
) {
    match size[3] {
        1 => digest_w::<1>(block, off, size, deg, d, jt, kt, n),
        3 => digest_w::<3>(block, off, size, deg, d, jt, kt, n),
        5 => digest_w::<5>(block, off, size, deg, d, jt, kt, n),
        6 => digest_w::<6>(block, off, size, deg, d, jt, kt, n),
        7 => digest_w::<7>(block, off, size, deg, d, jt, kt, n),
        9 => digest_w::<9>(block, off, size, deg, d, jt, kt, n),
        10 => digest_w::<10>(block, off, size, deg, d, jt, kt, n),
        _ => digest_w::<0>(block, off, size, deg, d, jt, kt, n),
    }
}

/// `digest` for a d shell of ND functions (ND = 0: any width, read from `size`).
///
/// The caller (`add_block`) has checked that every shell range lies inside the n × n
/// matrices and that `block` holds the whole quartet, so all indices below are in bounds;
/// the loop builds its row slices without checks because most rows are only 1–5 long and
/// per-row bounds checks used to cost more than the arithmetic.
#[allow(clippy::too_many_arguments)]
#[inline(always)]
fn digest_w<const ND: usize>(
    block: &[f64],
    off: [usize; 4],
    size: [usize; 4],
    deg: f64,
    d: &[f64],
    jt: &mut [f64],
    kt: &mut [f64],
    n: usize,
) {
    let [oa, ob, oc, od] = off;
    let [na, nb, nc, _] = size;
    let nd = if ND == 0 { size[3] } else { ND };
    debug_assert!(off.iter().zip(&size).all(|(o, s)| o + s <= n));
    debug_assert!(block.len() >= na * nb * nc * nd);
    let (bp, dp, jp, kp) = (block.as_ptr(), d.as_ptr(), jt.as_mut_ptr(), kt.as_mut_ptr());
    // SAFETY: see the doc comment: every row piece lies inside its n × n matrix (or inside
    // the block). Mutable pieces never overlap: J̃ and K̃ are different arrays, and K̃_bd and
    // K̃_ad are rows rj ≠ ri (when a and b are the same AO, ri = rj, one piece is made and
    // `row_update_same` applies both updates to it). The K̃_ac, K̃_bc and J̃_ab elements are
    // written through the pointers only after the row pieces of that step are gone.
    unsafe {
        let mut v = bp;
        for i in 0..na {
            let ri = (oa + i) * n;
            let d_ad = std::slice::from_raw_parts(dp.add(ri + od), nd);
            for j in 0..nb {
                let rj = (ob + j) * n;
                let dij = *dp.add(ri + ob + j);
                let d_bd = std::slice::from_raw_parts(dp.add(rj + od), nd);
                let mut jij = 0.0;
                for k in 0..nc {
                    let rk = (oc + k) * n + od;
                    let dik = *dp.add(ri + oc + k);
                    let djk = *dp.add(rj + oc + k);
                    let row = std::slice::from_raw_parts(v, nd);
                    let d_cd = std::slice::from_raw_parts(dp.add(rk), nd);
                    let j_cd = std::slice::from_raw_parts_mut(jp.add(rk), nd);
                    let (sj, kik, kjk) = if ri != rj {
                        // distinct rows: the compiler may treat them as not overlapping
                        let k_bd = std::slice::from_raw_parts_mut(kp.add(rj + od), nd);
                        let k_ad = std::slice::from_raw_parts_mut(kp.add(ri + od), nd);
                        row_update(row, deg, d_cd, d_bd, d_ad, j_cd, k_bd, k_ad, dij, dik, djk)
                    } else {
                        // a and b the same AO: K̃_bd and K̃_ad are one row (dik = djk)
                        let k_d = std::slice::from_raw_parts_mut(kp.add(ri + od), nd);
                        row_update_same(row, deg, d_cd, d_bd, d_ad, j_cd, k_d, dij, dik, djk)
                    };
                    jij += sj;
                    v = v.add(nd);
                    *kp.add(ri + oc + k) += kik;
                    *kp.add(rj + oc + k) += kjk;
                }
                *jp.add(ri + ob + j) += jij;
            }
        }
    }
}

/// One row l = 0 … nd−1 of the kernel for distinct K̃_bd and K̃_ad rows; returns the three
/// sums (J̃_ab, K̃_ac, K̃_bc parts). Two lanes (even and odd l), so the sums are not single
/// long dependency chains and pairs of l can share vector instructions; the order of the
/// additions is fixed.
#[allow(clippy::too_many_arguments)]
#[inline(always)]
fn row_update(
    row: &[f64],
    deg: f64,
    d_cd: &[f64],
    d_bd: &[f64],
    d_ad: &[f64],
    j_cd: &mut [f64],
    k_bd: &mut [f64],
    k_ad: &mut [f64],
    dij: f64,
    dik: f64,
    djk: f64,
) -> (f64, f64, f64) {
    let nd = row.len();
    let (d_cd, d_bd, d_ad) = (&d_cd[..nd], &d_bd[..nd], &d_ad[..nd]);
    let (j_cd, k_bd, k_ad) = (&mut j_cd[..nd], &mut k_bd[..nd], &mut k_ad[..nd]);
    let mut sj = [0.0; 2];
    let mut sk1 = [0.0; 2];
    let mut sk2 = [0.0; 2];
    let pairs = nd / 2;
    for p in 0..pairs {
        for t in 0..2 {
            let l = 2 * p + t;
            let x = row[l] * deg;
            sj[t] += d_cd[l] * x;
            j_cd[l] += dij * x;
            sk1[t] += d_bd[l] * x;
            k_bd[l] += dik * x;
            sk2[t] += d_ad[l] * x;
            k_ad[l] += djk * x;
        }
    }
    if nd % 2 == 1 {
        let l = nd - 1;
        let x = row[l] * deg;
        sj[0] += d_cd[l] * x;
        j_cd[l] += dij * x;
        sk1[0] += d_bd[l] * x;
        k_bd[l] += dik * x;
        sk2[0] += d_ad[l] * x;
        k_ad[l] += djk * x;
    }
    (sj[0] + sj[1], sk1[0] + sk1[1], sk2[0] + sk2[1])
}

/// `row_update` when K̃_bd and K̃_ad are the same row.
#[allow(clippy::too_many_arguments)]
#[inline(always)]
fn row_update_same(
    row: &[f64],
    deg: f64,
    d_cd: &[f64],
    d_bd: &[f64],
    d_ad: &[f64],
    j_cd: &mut [f64],
    k_d: &mut [f64],
    dij: f64,
    dik: f64,
    djk: f64,
) -> (f64, f64, f64) {
    let (mut sj, mut sk1, mut sk2) = (0.0, 0.0, 0.0);
    for l in 0..row.len() {
        let x = row[l] * deg;
        sj += d_cd[l] * x;
        j_cd[l] += dij * x;
        sk1 += d_bd[l] * x;
        k_d[l] += dik * x;
        sk2 += d_ad[l] * x;
        k_d[l] += djk * x;
    }
    (sj, sk1, sk2)
}
