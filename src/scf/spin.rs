//! Spin expectation value of a single determinant of α and β spin orbitals
//! (Szabo & Ostlund eq. 2.271):
//! ⟨S²⟩ = S_z(S_z + 1) + N_β − Σ_{i∈α occ, j∈β occ} |⟨ψ_i^α|ψ_j^β⟩|²,  S_z = (N_α − N_β)/2.

use bandcast_linalg::{mul, Mat};

pub fn s_squared(ca: &Mat<f64>, oa: &[f64], cb: &Mat<f64>, ob: &[f64], s: &Mat<f64>) -> f64 {
    let ia: Vec<usize> = (0..oa.len()).filter(|&i| oa[i] > 0.5).collect();
    let ib: Vec<usize> = (0..ob.len()).filter(|&i| ob[i] > 0.5).collect();
    let (na, nb) = (ia.len() as f64, ib.len() as f64);
    let sz = 0.5 * (na - nb);
    let n = ca.nrows();
    let a = Mat::<f64>::from_fn(n, ia.len(), |mu, k| ca[(mu, ia[k])]);
    let b = Mat::<f64>::from_fn(n, ib.len(), |mu, k| cb[(mu, ib[k])]);
    let sb = mul(s.as_ref(), false, b.as_ref(), false);
    let o = mul(a.as_ref(), true, sb.as_ref(), false);
    let mut sum = 0.0;
    for j in 0..o.ncols() {
        for i in 0..o.nrows() {
            sum += o[(i, j)] * o[(i, j)];
        }
    }
    sz * (sz + 1.0) + nb - sum
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn restricted_triplet_and_broken_singlet() {
        let s = Mat::<f64>::from_fn(2, 2, |i, j| if i == j { 1.0 } else { 0.0 });
        let c = s.clone();
        // Same spatial orbitals, α: both occupied, β none → S_z = 1, ⟨S²⟩ = 2.
        assert!((s_squared(&c, &[1.0, 1.0], &c, &[0.0, 0.0], &s) - 2.0).abs() < 1e-14);
        // Closed shell: 0.
        assert!(s_squared(&c, &[1.0, 0.0], &c, &[1.0, 0.0], &s).abs() < 1e-14);
        // One α and one β electron in orthogonal orbitals: 1 (half singlet, half triplet).
        assert!((s_squared(&c, &[1.0, 0.0], &c, &[0.0, 1.0], &s) - 1.0).abs() < 1e-14);
    }
}
