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

use bandcast_linalg::Mat;

use super::Jk;

/// Per-chunk accumulators: half J and K per density, row-major n × n.
#[derive(Debug, Clone)]
pub struct Accumulator {
    pub n: usize,
    pub j: Vec<Vec<f64>>,
    pub k: Vec<Vec<f64>>,
    scratch: Vec<f64>,
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
                        for j in offsets[b]..offsets[b] + sizes[b] {
                            m = m.max(dv[i * n + j].abs());
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
            scratch: Vec::new(),
        }
    }

    /// Add the contributions of block (ab|cd), weighted by `deg`, for every density.
    #[allow(clippy::too_many_arguments)]
    pub fn add_block(
        &mut self,
        block: &[f64],
        off: [usize; 4],
        size: [usize; 4],
        deg: f64,
        dens: &Densities,
    ) {
        let n = self.n;
        let [oa, ob, oc, od] = off;
        let [na, nb, nc, nd] = size;
        let (sab, scd, sac, sbd, sad, sbc) = (na * nb, nc * nd, na * nc, nb * nd, na * nd, nb * nc);
        let tot = 2 * (sab + scd + sac + sbd + sad + sbc);
        self.scratch.clear();
        self.scratch.resize(tot, 0.0);
        for (t, dm) in dens.d.iter().enumerate() {
            // Local density blocks, then local accumulators.
            let (dloc, acc) = self.scratch.split_at_mut(sab + scd + sac + sbd + sad + sbc);
            acc.iter_mut().for_each(|v| *v = 0.0);
            let (d_ab, rest) = dloc.split_at_mut(sab);
            let (d_cd, rest) = rest.split_at_mut(scd);
            let (d_ac, rest) = rest.split_at_mut(sac);
            let (d_bd, rest) = rest.split_at_mut(sbd);
            let (d_ad, d_bc) = rest.split_at_mut(sad);
            fill(d_ab, dm, n, oa, na, ob, nb);
            fill(d_cd, dm, n, oc, nc, od, nd);
            fill(d_ac, dm, n, oa, na, oc, nc);
            fill(d_bd, dm, n, ob, nb, od, nd);
            fill(d_ad, dm, n, oa, na, od, nd);
            fill(d_bc, dm, n, ob, nb, oc, nc);
            let (j_ab, rest) = acc.split_at_mut(sab);
            let (j_cd, rest) = rest.split_at_mut(scd);
            let (k_ac, rest) = rest.split_at_mut(sac);
            let (k_bd, rest) = rest.split_at_mut(sbd);
            let (k_ad, k_bc) = rest.split_at_mut(sad);
            let mut idx = 0;
            for i in 0..na {
                for j in 0..nb {
                    let dij = d_ab[i * nb + j];
                    let mut jij = 0.0;
                    for k in 0..nc {
                        let dik = d_ac[i * nc + k];
                        let djk = d_bc[j * nc + k];
                        let mut kik = 0.0;
                        let mut kjk = 0.0;
                        let row = &block[idx..idx + nd];
                        idx += nd;
                        for (l, &v0) in row.iter().enumerate() {
                            let v = v0 * deg;
                            jij += d_cd[k * nd + l] * v;
                            j_cd[k * nd + l] += dij * v;
                            kik += d_bd[j * nd + l] * v;
                            k_bd[j * nd + l] += dik * v;
                            kjk += d_ad[i * nd + l] * v;
                            k_ad[i * nd + l] += djk * v;
                        }
                        k_ac[i * nc + k] += kik;
                        k_bc[j * nc + k] += kjk;
                    }
                    j_ab[i * nb + j] += jij;
                }
            }
            scatter(&mut self.j[t], j_ab, n, oa, na, ob, nb);
            scatter(&mut self.j[t], j_cd, n, oc, nc, od, nd);
            scatter(&mut self.k[t], k_ac, n, oa, na, oc, nc);
            scatter(&mut self.k[t], k_bd, n, ob, nb, od, nd);
            scatter(&mut self.k[t], k_ad, n, oa, na, od, nd);
            scatter(&mut self.k[t], k_bc, n, ob, nb, oc, nc);
        }
    }

    /// Add another accumulator (used to reduce chunks in a fixed order).
    pub fn add(&mut self, other: &Accumulator) {
        for (a, b) in self.j.iter_mut().zip(&other.j) {
            a.iter_mut().zip(b).for_each(|(x, y)| *x += y);
        }
        for (a, b) in self.k.iter_mut().zip(&other.k) {
            a.iter_mut().zip(b).for_each(|(x, y)| *x += y);
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

#[inline]
fn fill(dst: &mut [f64], d: &[f64], n: usize, o1: usize, n1: usize, o2: usize, n2: usize) {
    for i in 0..n1 {
        dst[i * n2..(i + 1) * n2].copy_from_slice(&d[(o1 + i) * n + o2..(o1 + i) * n + o2 + n2]);
    }
}

#[inline]
fn scatter(m: &mut [f64], src: &[f64], n: usize, o1: usize, n1: usize, o2: usize, n2: usize) {
    for i in 0..n1 {
        let row = &mut m[(o1 + i) * n + o2..(o1 + i) * n + o2 + n2];
        row.iter_mut()
            .zip(&src[i * n2..(i + 1) * n2])
            .for_each(|(x, y)| *x += y);
    }
}
