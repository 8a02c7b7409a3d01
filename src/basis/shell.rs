//! Shells and basis sets attached to a molecule: the contract between the basis-set data,
//! the integral engine and everything that reads AO coefficients.
//!
//! Conventions (every module relies on them):
//! - A shell is one contraction of primitives exp(-α r²) with one angular momentum `l`.
//!   General contractions and SP shells are split into plain segmented shells on loading.
//! - `coefficients` are the published contraction coefficients, which multiply *normalised*
//!   primitives; the integral engine renormalises the contraction itself.
//! - AO order within a shell:
//!   * Cartesian (`pure == false`): x^a y^b z^c with a descending, then b descending:
//!     d = xx, xy, xz, yy, yz, zz; f = xxx, xxy, xxz, xyy, xyz, xzz, yyy, yyz, yzz, zzz.
//!   * Real solid harmonics (`pure == true`, l ≥ 2): m = −l, …, 0, …, +l.
//!   * s and p are the same in both: s; px, py, pz.
//! - Every AO is normalised to unity (so the overlap matrix has a unit diagonal), Cartesian
//!   d/f/g components included.

#[derive(Debug, Clone, PartialEq)]
pub struct Shell {
    /// Angular momentum (0 = s … 4 = g).
    pub l: usize,
    /// Real solid harmonics (2l+1 functions) when true, Cartesian ((l+1)(l+2)/2) otherwise.
    pub pure: bool,
    /// Centre in bohr.
    pub center: [f64; 3],
    /// Index of the atom the shell sits on (0-based, input order).
    pub atom: usize,
    /// Primitive exponents α (bohr⁻²).
    pub exponents: Vec<f64>,
    /// Contraction coefficients for normalised primitives, as published.
    pub coefficients: Vec<f64>,
}

impl Shell {
    /// One normalised primitive r^l e^{−a r²} (solid harmonics) on atom `atom` at `center`.
    pub fn primitive(l: usize, a: f64, center: [f64; 3], atom: usize) -> Shell {
        Shell {
            l,
            pure: true,
            center,
            atom,
            exponents: vec![a],
            coefficients: vec![1.0],
        }
    }
    /// Number of Cartesian components (l+1)(l+2)/2.
    pub fn n_cartesian(&self) -> usize {
        (self.l + 1) * (self.l + 2) / 2
    }
    /// Number of AO functions this shell contributes.
    pub fn n_functions(&self) -> usize {
        if self.pure && self.l >= 2 {
            2 * self.l + 1
        } else {
            self.n_cartesian()
        }
    }
}

/// Letter of an angular momentum.
pub fn l_letter(l: usize) -> char {
    ['s', 'p', 'd', 'f', 'g', 'h', 'i'][l]
}

/// Whether a set's d/f/g functions are Cartesian or real solid harmonics.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Harmonics {
    Cartesian,
    Pure,
}

/// A basis set attached to a molecule.
#[derive(Debug, Clone)]
pub struct BasisSet {
    /// Canonical name of the set ("cc-pVDZ") or the user file's path.
    pub name: String,
    pub shells: Vec<Shell>,
    /// First AO index of each shell.
    pub offsets: Vec<usize>,
    /// Total number of AO functions.
    pub n_basis: usize,
}

impl BasisSet {
    pub fn from_shells(name: impl Into<String>, shells: Vec<Shell>) -> Self {
        let mut offsets = Vec::with_capacity(shells.len());
        let mut n = 0;
        for s in &shells {
            offsets.push(n);
            n += s.n_functions();
        }
        BasisSet {
            name: name.into(),
            shells,
            offsets,
            n_basis: n,
        }
    }

    /// For each AO: (atom index, shell index, l).
    pub fn ao_map(&self) -> Vec<(usize, usize, usize)> {
        let mut v = Vec::with_capacity(self.n_basis);
        for (i, s) in self.shells.iter().enumerate() {
            for _ in 0..s.n_functions() {
                v.push((s.atom, i, s.l));
            }
        }
        v
    }

    /// Largest angular momentum present.
    pub fn max_l(&self) -> usize {
        self.shells.iter().map(|s| s.l).max().unwrap_or(0)
    }
}
