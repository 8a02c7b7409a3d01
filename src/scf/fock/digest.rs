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
        assert!(
            off.iter().zip(&size).all(|(o, s)| o + s <= n)
                && block.len() >= size.iter().product::<usize>()
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
/// pieces of D and of the accumulators.
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
    let [oa, ob, oc, od] = off;
    let [na, nb, nc, nd] = size;
    let mut idx = 0;
    for i in 0..na {
        let ri = (oa + i) * n;
        for j in 0..nb {
            let rj = (ob + j) * n;
            let dij = d[ri + ob + j];
            let mut jij = 0.0;
            for k in 0..nc {
                let rk = (oc + k) * n;
                let dik = d[ri + oc + k];
                let djk = d[rj + oc + k];
                let row = &block[idx..idx + nd];
                idx += nd;
                let d_cd = &d[rk + od..rk + od + nd];
                let d_bd = &d[rj + od..rj + od + nd];
                let d_ad = &d[ri + od..ri + od + nd];
                let j_cd = &mut jt[rk + od..rk + od + nd];
                let mut kik = 0.0;
                let mut kjk = 0.0;
                if ri == rj {
                    // same AO for a and b: K̃_bd and K̃_ad are one row (and dik = djk)
                    let k_d = &mut kt[ri + od..ri + od + nd];
                    for l in 0..nd {
                        let v = row[l] * deg;
                        jij += d_cd[l] * v;
                        j_cd[l] += dij * v;
                        kik += d_bd[l] * v;
                        k_d[l] += dik * v;
                        kjk += d_ad[l] * v;
                        k_d[l] += djk * v;
                    }
                } else {
                    let (k_bd, k_ad) = two_rows(kt, rj + od, ri + od, nd);
                    for l in 0..nd {
                        let v = row[l] * deg;
                        jij += d_cd[l] * v;
                        j_cd[l] += dij * v;
                        kik += d_bd[l] * v;
                        k_bd[l] += dik * v;
                        kjk += d_ad[l] * v;
                        k_ad[l] += djk * v;
                    }
                }
                kt[ri + oc + k] += kik;
                kt[rj + oc + k] += kjk;
            }
            jt[ri + ob + j] += jij;
        }
    }
}

/// Two disjoint mutable pieces m[x..x+len] and m[y..y+len] (x ≠ y rows of one matrix).
#[inline]
fn two_rows(m: &mut [f64], x: usize, y: usize, len: usize) -> (&mut [f64], &mut [f64]) {
    if x < y {
        let (lo, hi) = m.split_at_mut(y);
        (&mut lo[x..x + len], &mut hi[..len])
    } else {
        let (lo, hi) = m.split_at_mut(x);
        (&mut hi[..len], &mut lo[y..y + len])
    }
}
