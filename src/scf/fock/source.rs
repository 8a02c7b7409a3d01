//! Where shell-quartet integrals come from: the ERI engine, or a stored full tensor (model
//! systems and tests). The builders only see this trait.

/// A provider of (ab|cd) blocks over shells, with the Schwarz bounds of its shell pairs.
pub trait EriSource: Sync {
    /// Number of functions of each shell.
    fn shell_sizes(&self) -> &[usize];
    /// First AO index of each shell.
    fn shell_offsets(&self) -> &[usize];
    /// sqrt(max |(ab|ab)|) per shell pair, n_shell × n_shell row-major.
    fn schwarz(&self) -> &[f64];
    /// (ab|cd) block, layout out[((i*nb + j)*nc + k)*nd + l].
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>);
    fn n_basis(&self) -> usize {
        self.shell_sizes().iter().sum()
    }
    /// Lowest-index member of each shell's general-contraction family (shells the source
    /// computes together); default: every shell on its own.
    fn families(&self) -> Vec<usize> {
        (0..self.shell_sizes().len()).collect()
    }
    /// Primitives per shell (for cost estimates); default 1.
    fn primitives(&self) -> Vec<usize> {
        vec![1; self.shell_sizes().len()]
    }
    /// Angular momentum per shell (for cost estimates); default 0.
    fn angular_momenta(&self) -> Vec<usize> {
        vec![0; self.shell_sizes().len()]
    }
}

/// A full n⁴ ERI tensor (chemists' order, index ((i*n + j)*n + k)*n + l) cut into shells of
/// given sizes.
#[derive(Debug, Clone)]
pub struct TensorEri {
    pub n: usize,
    pub eri: Vec<f64>,
    sizes: Vec<usize>,
    offsets: Vec<usize>,
    schwarz: Vec<f64>,
}

impl TensorEri {
    pub fn new(eri: Vec<f64>, shell_sizes: Vec<usize>) -> Self {
        let n: usize = shell_sizes.iter().sum();
        assert_eq!(
            eri.len(),
            n * n * n * n,
            "tensor size does not match the shells"
        );
        let mut offsets = Vec::with_capacity(shell_sizes.len());
        let mut o = 0;
        for &s in &shell_sizes {
            offsets.push(o);
            o += s;
        }
        let ns = shell_sizes.len();
        let mut schwarz = vec![0.0; ns * ns];
        for a in 0..ns {
            for b in 0..ns {
                let mut m = 0.0f64;
                for i in offsets[a]..offsets[a] + shell_sizes[a] {
                    for j in offsets[b]..offsets[b] + shell_sizes[b] {
                        m = m.max(eri[((i * n + j) * n + i) * n + j].abs());
                    }
                }
                schwarz[a * ns + b] = m.sqrt();
            }
        }
        TensorEri {
            n,
            eri,
            sizes: shell_sizes,
            offsets,
            schwarz,
        }
    }
}

impl EriSource for TensorEri {
    fn shell_sizes(&self) -> &[usize] {
        &self.sizes
    }
    fn shell_offsets(&self) -> &[usize] {
        &self.offsets
    }
    fn schwarz(&self) -> &[f64] {
        &self.schwarz
    }
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        let n = self.n;
        let (oa, ob, oc, od) = (
            self.offsets[a],
            self.offsets[b],
            self.offsets[c],
            self.offsets[d],
        );
        let (na, nb, nc, nd) = (self.sizes[a], self.sizes[b], self.sizes[c], self.sizes[d]);
        out.clear();
        out.reserve(na * nb * nc * nd);
        for i in oa..oa + na {
            for j in ob..ob + nb {
                for k in oc..oc + nc {
                    for l in od..od + nd {
                        out.push(self.eri[((i * n + j) * n + k) * n + l]);
                    }
                }
            }
        }
    }
}

/// The integral engine over a basis set, with the shell layout cached.
pub struct EngineSource<'a> {
    pub engine: &'a crate::integrals::EriEngine,
    sizes: Vec<usize>,
    offsets: Vec<usize>,
    families: Vec<usize>,
    primitives: Vec<usize>,
    ls: Vec<usize>,
}

impl<'a> EngineSource<'a> {
    pub fn new(engine: &'a crate::integrals::EriEngine, basis: &crate::basis::BasisSet) -> Self {
        EngineSource {
            engine,
            sizes: basis.shells.iter().map(|s| s.n_functions()).collect(),
            offsets: basis.offsets.clone(),
            families: families(&basis.shells),
            primitives: basis.shells.iter().map(|s| s.exponents.len()).collect(),
            ls: basis.shells.iter().map(|s| s.l).collect(),
        }
    }
}

/// General-contraction families as the ERI engine forms them: shells with at least two
/// primitives on the same centre with the same l, harmonics and exponent list share the
/// representative of lowest index.
pub fn families(shells: &[crate::basis::Shell]) -> Vec<usize> {
    let mut fam: Vec<usize> = (0..shells.len()).collect();
    for a in 0..shells.len() {
        let sa = &shells[a];
        if sa.exponents.len() < 2 {
            continue;
        }
        if let Some(r) = (0..a).find(|&r| {
            let sr = &shells[r];
            fam[r] == r
                && sr.l == sa.l
                && sr.pure == sa.pure
                && sr.center == sa.center
                && sr.exponents == sa.exponents
        }) {
            fam[a] = r;
        }
    }
    fam
}

impl EriSource for EngineSource<'_> {
    fn shell_sizes(&self) -> &[usize] {
        &self.sizes
    }
    fn shell_offsets(&self) -> &[usize] {
        &self.offsets
    }
    fn schwarz(&self) -> &[f64] {
        self.engine.schwarz()
    }
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        self.engine.shell_quartet(a, b, c, d, out);
    }
    fn families(&self) -> Vec<usize> {
        self.families.clone()
    }
    fn primitives(&self) -> Vec<usize> {
        self.primitives.clone()
    }
    fn angular_momenta(&self) -> Vec<usize> {
        self.ls.clone()
    }
}
