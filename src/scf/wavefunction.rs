//! The converged SCF state that every later method reads.

use bandcast_linalg::Mat;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Reference {
    /// Restricted closed shell.
    Rhf,
    /// Unrestricted.
    Uhf,
    /// Restricted open shell.
    Rohf,
}

#[derive(Debug, Clone)]
pub struct Wavefunction {
    pub reference: Reference,
    /// Total energy (electronic + nuclear repulsion), hartree.
    pub energy: f64,
    pub nuclear_repulsion: f64,
    /// One-electron energy Tr[P h].
    pub one_electron: f64,
    /// Two-electron energy (Coulomb minus exchange).
    pub two_electron: f64,
    pub converged: bool,
    pub iterations: usize,
    /// MO coefficients, AO rows × MO columns. For RHF `c_beta` equals `c_alpha`.
    pub c_alpha: Mat<f64>,
    pub c_beta: Mat<f64>,
    /// Orbital energies (hartree), ascending unless MOM occupations reorder occupations.
    pub eps_alpha: Vec<f64>,
    pub eps_beta: Vec<f64>,
    /// Occupation (0 or 1) of each alpha / beta MO.
    pub occ_alpha: Vec<f64>,
    pub occ_beta: Vec<f64>,
    /// ⟨S²⟩ (UHF/ROHF); 0 for RHF.
    pub s2: f64,
    /// Number of AO functions and of orthogonalised functions kept.
    pub n_basis: usize,
    pub n_independent: usize,
    /// Dipole moment (a.u.) about the origin of the input frame.
    pub dipole: [f64; 3],
}

impl Wavefunction {
    pub fn n_alpha(&self) -> usize {
        self.occ_alpha.iter().filter(|&&o| o > 0.5).count()
    }
    pub fn n_beta(&self) -> usize {
        self.occ_beta.iter().filter(|&&o| o > 0.5).count()
    }
    /// Alpha density matrix Σ_i occ_i C_μi C_νi.
    pub fn density_alpha(&self) -> Mat<f64> {
        density(&self.c_alpha, &self.occ_alpha)
    }
    pub fn density_beta(&self) -> Mat<f64> {
        density(&self.c_beta, &self.occ_beta)
    }
}

/// Σ_i occ_i C_μi C_νi.
pub fn density(c: &Mat<f64>, occ: &[f64]) -> Mat<f64> {
    let n = c.nrows();
    let mut p = Mat::<f64>::zeros(n, n);
    for (i, &o) in occ.iter().enumerate() {
        if o == 0.0 {
            continue;
        }
        for nu in 0..n {
            let cv = o * c[(nu, i)];
            for mu in 0..n {
                p[(mu, nu)] += c[(mu, i)] * cv;
            }
        }
    }
    p
}
