//! Irrep labels of molecular orbitals ("1b1", "3a1", "1e1g", "3σg", "1πu").
//!
//! For every operation R of the group, the AO representation D(R) is the atom permutation
//! combined with each shell's angular block (`angular`): O_R φ_{A,m} = Σ_n D_nm φ_{R(A),n}.
//! For an orbital ψ_i = Σ_μ C_μi φ_μ, the diagonal element Γ_ii(R) = C_iᵀ S D(R) C_i is its
//! overlap with its own image. The projection weight of ψ_i on the real irrep Γ is
//!
//!   w_Γ(i) = ⟨ψ_i|P_Γ|ψ_i⟩ = dim_Γ / (norm_Γ |G|) · Σ_R χ_Γ(R) Γ_ii(R),
//!
//! (P_Γ the projection operator; Σ_Γ w_Γ(i) = 1). A set of orbitals spans n_Γ = Σ_i w_Γ(i) /
//! dim_Γ copies of Γ, which is the usual reduction of the set's character χ(R) = Σ_i Γ_ii(R).
//!
//! Assignment:
//! 1. Orbitals are sorted by energy and grouped into clusters whose energies lie within
//!    `degeneracy_tol` of the cluster's lowest one.
//! 2. A cluster whose multiplicities n_Γ are whole numbers (within 0.1) adding up to its size
//!    is split into sets: for each irrep present, the orbitals with the largest w_Γ, taken
//!    dim_Γ at a time in energy order (an accidental degeneracy of two irreps gives two sets).
//! 3. Otherwise (the geometry is symmetric only within the detection tolerance, so a
//!    degenerate level is split by more than `degeneracy_tol`, or nearly degenerate
//!    orbitals — the C 1s combinations of a ring — mix): first, runs of such orbitals with
//!    gaps of at most 1 mEh (`NEAR_DEGENERATE_EH`) that together span whole irreps are split
//!    as in step 2 (an orbital may then be a mixture: its `purity` says how much of it
//!    belongs to its label); then each remaining orbital whose best weight
//!    is at least 0.9 is labelled alone if its irrep is one-dimensional, or joined with the
//!    nearest clean orbitals of the same irrep within 10 mEh (`SPLIT_LEVEL_EH`) into a set
//!    of dim_Γ members (a degenerate level split by a small distortion stays one band).
//! 4. Orbitals still unlabelled are labelled in the largest abelian subgroup (`subgroup`),
//!    each alone, with `fallback = true` and `group` naming the subgroup; numbering then
//!    counts every orbital's subgroup irrep in energy order.
//! 5. Numbers count sets of each irrep in energy order, starting at 1, over the orbitals
//!    passed (pass all occupied orbitals, core included, to get the usual "2a1", "1b1"):
//!    water → 1a1, 2a1, 1b2, 3a1, 1b1.
//!
//! A single atom ("Kh") is labelled by angular momentum: each orbital's l is the shell type
//! carrying most of its Mulliken population, and n = l + 1 + (number of lower orbitals of
//! that l) / (2l + 1) — 1s, 2s, 2p, 3s, 3p, 3d, 4s … in energy order (the shells must all be
//! present: pass the core orbitals too).

use super::ao_action::ao_actions;
use super::group::PointGroup;
use crate::basis::shell::l_letter;
use crate::basis::BasisSet;
use crate::chem::Molecule;
use bandcast_linalg::Mat;
use serde::Serialize;
use std::collections::HashMap;

/// Smallest projection weight for an orbital to be labelled on its own (step 3).
pub const PURITY_THRESHOLD: f64 = 0.9;
/// Largest gap (hartree) between neighbours of a run of mixed near-degenerate orbitals
/// split as a whole (step 3, first part).
pub const NEAR_DEGENERATE_EH: f64 = 1e-3;
/// Largest splitting (hartree) of a degenerate level whose members, each clean, are joined
/// by their common irrep (step 3, second part).
pub const SPLIT_LEVEL_EH: f64 = 1e-2;
const WHOLE_NUMBER_TOL: f64 = 0.1;

/// The label of one molecular orbital.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OrbitalLabel {
    /// Column of the coefficient matrix.
    pub mo: usize,
    /// Irrep, lower case ("b1", "e1g", "σg", "p" for atoms); None when no label fits.
    pub irrep: Option<String>,
    /// Number and irrep ("1b1", "3σg", "2p"); None when no label fits.
    pub label: Option<String>,
    /// 1-based count of this irrep's sets in energy order (0 without a label).
    pub number: usize,
    /// Degenerate-set id, 0-based in energy order; the orbitals of one set form one band.
    pub set: usize,
    /// Number of orbitals in the set.
    pub set_size: usize,
    /// Group the label belongs to (the molecule's group, or its abelian subgroup).
    pub group: String,
    /// True when the label comes from the abelian subgroup (step 4 above).
    pub fallback: bool,
    /// Projection weight of the orbital on its irrep (1 for a clean label).
    pub purity: f64,
}

/// MO columns of each degenerate set, sets in energy order.
pub fn degenerate_sets(labels: &[OrbitalLabel]) -> Vec<Vec<usize>> {
    let n_sets = labels.iter().map(|l| l.set + 1).max().unwrap_or(0);
    let mut sets = vec![Vec::new(); n_sets];
    for l in labels {
        sets[l.set].push(l.mo);
    }
    sets.retain(|s| !s.is_empty());
    sets
}

/// Label the orbitals (columns of `c`, energies `eps`) of `mol` in group `pg`.
///
/// `s` is the AO overlap matrix, `c` the AO×MO coefficients (S-orthonormal columns),
/// `degeneracy_tol` the energy window (hartree) for degenerate levels, e.g. 1e-5. Returns one
/// label per column, in column order.
pub fn label_orbitals(
    pg: &PointGroup,
    _mol: &Molecule,
    basis: &BasisSet,
    s: &Mat<f64>,
    c: &Mat<f64>,
    eps: &[f64],
    degeneracy_tol: f64,
) -> Vec<OrbitalLabel> {
    let n_mo = c.ncols().min(eps.len());
    let mut order: Vec<usize> = (0..n_mo).collect();
    order.sort_by(|&a, &b| eps[a].total_cmp(&eps[b]).then(a.cmp(&b)));
    let sc = bandcast_linalg::mul(s.as_ref(), false, c.as_ref(), false);
    if pg.is_atom() {
        return atomic_labels(pg, basis, &sc, c, eps, &order, degeneracy_tol);
    }
    let Some(diag) = diagonal_characters(pg, basis, &sc, c, n_mo) else {
        return unlabelled(pg, &order);
    };
    let w = weights(pg, &diag);
    let table = &pg.table;
    let dims: Vec<usize> = table.irreps.iter().map(|i| i.dim).collect();

    // Sets: (members in energy order, irrep index, fallback).
    let mut sets: Vec<(Vec<usize>, Option<usize>, bool)> = Vec::new();
    let mut pending: Vec<usize> = Vec::new();
    for cluster in energy_clusters(&order, eps, degeneracy_tol) {
        match split_cluster(&cluster, &w, &dims) {
            Some(parts) => sets.extend(parts.into_iter().map(|(m, g)| (m, Some(g), false))),
            None => pending.extend(cluster),
        }
    }
    // Step 3a: near-degenerate clusters (gaps ≤ NEAR_DEGENERATE_EH) that span whole irreps.
    let mut taken = vec![false; n_mo];
    for cluster in chain_clusters(&pending, eps, NEAR_DEGENERATE_EH) {
        if cluster.len() < 2 {
            continue;
        }
        if let Some(parts) = split_cluster(&cluster, &w, &dims) {
            for (m, g) in parts {
                for &i in &m {
                    taken[i] = true;
                }
                sets.push((m, Some(g), false));
            }
        }
    }
    // Step 3b: one by one.
    let mut fallback: Vec<usize> = Vec::new();
    for (pos, &i) in pending.iter().enumerate() {
        if taken[i] {
            continue;
        }
        let (g, p) = best(&w[i]);
        if p < PURITY_THRESHOLD {
            fallback.push(i);
            taken[i] = true;
            continue;
        }
        let d = dims[g];
        let mut members = vec![i];
        if d > 1 {
            let mut partners: Vec<usize> = pending[pos + 1..]
                .iter()
                .copied()
                .filter(|&j| {
                    !taken[j]
                        && (eps[j] - eps[i]).abs() <= SPLIT_LEVEL_EH
                        && best(&w[j]).0 == g
                        && best(&w[j]).1 >= PURITY_THRESHOLD
                })
                .collect();
            partners.sort_by(|&a, &b| (eps[a] - eps[i]).abs().total_cmp(&(eps[b] - eps[i]).abs()));
            partners.truncate(d - 1);
            members.extend(partners);
        }
        if members.len() == d {
            for &m in &members {
                taken[m] = true;
            }
            members.sort_by(|&a, &b| eps[a].total_cmp(&eps[b]).then(a.cmp(&b)));
            sets.push((members, Some(g), false));
        } else {
            fallback.push(i);
            taken[i] = true;
        }
    }
    // Step 4: abelian subgroup.
    let mut sub_irrep: HashMap<usize, (usize, f64)> = HashMap::new();
    let sub = if fallback.is_empty() {
        None
    } else {
        let h = pg.abelian_subgroup();
        let dh = diagonal_characters(&h, basis, &sc, c, n_mo);
        dh.map(|dh| {
            let wh = weights(&h, &dh);
            for i in 0..n_mo {
                sub_irrep.insert(i, best(&wh[i]));
            }
            h
        })
    };
    for &i in &fallback {
        sets.push((vec![i], None, true));
    }
    sets.sort_by(|a, b| {
        let (ea, eb) = (eps[a.0[0]], eps[b.0[0]]);
        ea.total_cmp(&eb).then(a.0[0].cmp(&b.0[0]))
    });

    // Numbering.
    let mut count = vec![0usize; table.irreps.len()];
    let mut sub_count: HashMap<usize, usize> = HashMap::new();
    // Subgroup numbering counts every orbital's subgroup irrep in energy order.
    let mut sub_number = vec![0usize; n_mo];
    if sub.is_some() {
        for &i in &order {
            let (g, _) = sub_irrep[&i];
            let k = sub_count.entry(g).or_insert(0);
            *k += 1;
            sub_number[i] = *k;
        }
    }
    let mut out: Vec<Option<OrbitalLabel>> = vec![None; n_mo];
    for (set_id, (members, irrep, is_fallback)) in sets.iter().enumerate() {
        if let Some(g) = irrep {
            count[*g] += 1;
            let name = table.irreps[*g].name.clone();
            for &m in members {
                out[m] = Some(OrbitalLabel {
                    mo: m,
                    irrep: Some(name.clone()),
                    label: Some(format!("{}{}", count[*g], name)),
                    number: count[*g],
                    set: set_id,
                    set_size: members.len(),
                    group: pg.name.clone(),
                    fallback: false,
                    purity: w[m][*g],
                });
            }
        } else {
            let m = members[0];
            let (irrep, label, number, group, purity) = match (&sub, sub_irrep.get(&m)) {
                (Some(h), Some(&(g, p))) if p >= PURITY_THRESHOLD => {
                    let name = h.table.irreps[g].name.clone();
                    (
                        Some(name.clone()),
                        Some(format!("{}{}", sub_number[m], name)),
                        sub_number[m],
                        h.name.clone(),
                        p,
                    )
                }
                (Some(h), Some(&(_, p))) => (None, None, 0, h.name.clone(), p),
                _ => (None, None, 0, pg.name.clone(), 0.0),
            };
            out[m] = Some(OrbitalLabel {
                mo: m,
                irrep,
                label,
                number,
                set: set_id,
                set_size: 1,
                group,
                fallback: *is_fallback,
                purity,
            });
        }
    }
    out.into_iter()
        .map(|l| l.expect("every orbital is in a set"))
        .collect()
}

/// Index and value of the largest weight.
fn best(w: &[f64]) -> (usize, f64) {
    w.iter().copied().enumerate().fold(
        (0, f64::NEG_INFINITY),
        |acc, (i, v)| if v > acc.1 { (i, v) } else { acc },
    )
}

/// Orbitals (energy order) grouped while within `tol` of the group's first energy.
fn energy_clusters(order: &[usize], eps: &[f64], tol: f64) -> Vec<Vec<usize>> {
    let mut out: Vec<Vec<usize>> = Vec::new();
    for &i in order {
        match out.last_mut() {
            Some(cl) if (eps[i] - eps[cl[0]]).abs() <= tol => cl.push(i),
            _ => out.push(vec![i]),
        }
    }
    out
}

/// Orbitals (energy order) grouped while each gap to the previous one is at most `gap`.
fn chain_clusters(order: &[usize], eps: &[f64], gap: f64) -> Vec<Vec<usize>> {
    let mut out: Vec<Vec<usize>> = Vec::new();
    for &i in order {
        match out.last_mut() {
            Some(cl) if eps[i] - eps[*cl.last().unwrap()] <= gap => cl.push(i),
            _ => out.push(vec![i]),
        }
    }
    out
}

/// Step 2: a cluster whose multiplicities are whole numbers, split into sets.
fn split_cluster(
    cluster: &[usize],
    w: &[Vec<f64>],
    dims: &[usize],
) -> Option<Vec<(Vec<usize>, usize)>> {
    let n_irrep = dims.len();
    let mut copies = vec![0usize; n_irrep];
    let mut total = 0;
    for g in 0..n_irrep {
        let n: f64 = cluster.iter().map(|&i| w[i][g]).sum::<f64>() / dims[g] as f64;
        if (n - n.round()).abs() > WHOLE_NUMBER_TOL || n.round() < 0.0 {
            return None;
        }
        copies[g] = n.round() as usize;
        total += copies[g] * dims[g];
    }
    if total != cluster.len() {
        return None;
    }
    if copies.iter().filter(|&&k| k > 0).count() == 1 && copies.iter().sum::<usize>() == 1 {
        let g = copies.iter().position(|&k| k == 1).unwrap();
        return Some(vec![(cluster.to_vec(), g)]);
    }
    // Several irreps (or copies): hand out orbitals by weight, largest irreps first.
    let mut remaining: Vec<usize> = cluster.to_vec();
    let mut irreps: Vec<usize> = (0..n_irrep).filter(|&g| copies[g] > 0).collect();
    irreps.sort_by(|&a, &b| dims[b].cmp(&dims[a]).then(a.cmp(&b)));
    let mut parts = Vec::new();
    for g in irreps {
        remaining.sort_by(|&a, &b| w[b][g].total_cmp(&w[a][g]));
        let k = copies[g] * dims[g];
        let mut taken: Vec<usize> = remaining.drain(..k).collect();
        // Energy order within, then chunks of dim.
        let pos = |m: &usize| cluster.iter().position(|x| x == m).unwrap();
        taken.sort_by_key(pos);
        for chunk in taken.chunks(dims[g]) {
            parts.push((chunk.to_vec(), g));
        }
    }
    Some(parts)
}

/// Γ_ii(R) = C_iᵀ S D(R) C_i for every operation (rows) and orbital (columns); None when
/// the basis does not map onto itself under the atom permutations (different shells on
/// symmetry-equivalent atoms).
fn diagonal_characters(
    pg: &PointGroup,
    basis: &BasisSet,
    sc: &Mat<f64>,
    c: &Mat<f64>,
    n_mo: usize,
) -> Option<Vec<Vec<f64>>> {
    let actions = ao_actions(pg, basis, false)?;
    let mut out = Vec::with_capacity(actions.len());
    let mut ci = vec![0.0; basis.n_basis];
    let mut dc = vec![0.0; basis.n_basis];
    let mut rows = vec![vec![0.0; n_mo]; actions.len()];
    for i in 0..n_mo {
        for (mu, v) in ci.iter_mut().enumerate() {
            *v = c[(mu, i)];
        }
        for (row, act) in rows.iter_mut().zip(&actions) {
            act.apply(basis, &ci, &mut dc);
            row[i] = (0..basis.n_basis).map(|mu| sc[(mu, i)] * dc[mu]).sum();
        }
    }
    out.extend(rows);
    Some(out)
}

/// w[i][Γ] from the diagonal characters (normalised by ⟨ψ_i|ψ_i⟩).
fn weights(pg: &PointGroup, diag: &[Vec<f64>]) -> Vec<Vec<f64>> {
    let t = &pg.table;
    let n_mo = diag.first().map(|r| r.len()).unwrap_or(0);
    let e_op = pg.operations.iter().position(|o| o.class == 0).unwrap_or(0);
    (0..n_mo)
        .map(|i| {
            let norm = diag[e_op][i].max(1e-300);
            t.irreps
                .iter()
                .map(|irr| {
                    let s: f64 = pg
                        .operations
                        .iter()
                        .zip(diag)
                        .map(|(op, row)| irr.characters[op.class] * row[i])
                        .sum();
                    irr.dim as f64 * s / (irr.norm * t.order as f64 * norm)
                })
                .collect()
        })
        .collect()
}

fn unlabelled(pg: &PointGroup, order: &[usize]) -> Vec<OrbitalLabel> {
    let mut out = vec![None; order.len()];
    for (set, &i) in order.iter().enumerate() {
        out[i] = Some(OrbitalLabel {
            mo: i,
            irrep: None,
            label: None,
            number: 0,
            set,
            set_size: 1,
            group: pg.name.clone(),
            fallback: false,
            purity: 0.0,
        });
    }
    out.into_iter().map(Option::unwrap).collect()
}

/// Labels of a single atom by angular momentum (see the module documentation).
fn atomic_labels(
    pg: &PointGroup,
    basis: &BasisSet,
    sc: &Mat<f64>,
    c: &Mat<f64>,
    eps: &[f64],
    order: &[usize],
    degeneracy_tol: f64,
) -> Vec<OrbitalLabel> {
    let lmax = basis.max_l();
    let ao = basis.ao_map();
    let lw: Vec<Vec<f64>> = order
        .iter()
        .map(|&i| {
            let mut v = vec![0.0; lmax + 1];
            for (mu, &(_, _, l)) in ao.iter().enumerate() {
                v[l] += c[(mu, i)] * sc[(mu, i)];
            }
            v
        })
        .collect();
    let mut l_of = vec![0usize; eps.len().min(c.ncols())];
    let mut purity = vec![0.0; l_of.len()];
    for (k, &i) in order.iter().enumerate() {
        let (l, p) = best(&lw[k]);
        l_of[i] = l;
        purity[i] = p / lw[k].iter().sum::<f64>().max(1e-300);
    }
    let window = degeneracy_tol.max(NEAR_DEGENERATE_EH);
    let mut seen = vec![0usize; lmax + 1];
    let mut set_of = vec![usize::MAX; l_of.len()];
    let mut sets: Vec<Vec<usize>> = Vec::new();
    for (pos, &i) in order.iter().enumerate() {
        if set_of[i] != usize::MAX {
            continue;
        }
        let l = l_of[i];
        let mut members = vec![i];
        for &j in &order[pos + 1..] {
            if members.len() == 2 * l + 1 || eps[j] - eps[i] > window {
                break;
            }
            if set_of[j] == usize::MAX && l_of[j] == l {
                members.push(j);
            }
        }
        for &m in &members {
            set_of[m] = sets.len();
        }
        sets.push(members);
    }
    let mut out = vec![None; l_of.len()];
    for (set_id, members) in sets.iter().enumerate() {
        for &m in members {
            let l = l_of[m];
            let n = l + 1 + seen[l] / (2 * l + 1);
            seen[l] += 1;
            let letter = l_letter(l).to_string();
            out[m] = Some(OrbitalLabel {
                mo: m,
                irrep: Some(letter.clone()),
                label: Some(format!("{n}{letter}")),
                number: n,
                set: set_id,
                set_size: members.len(),
                group: pg.name.clone(),
                fallback: false,
                purity: purity[m],
            });
        }
    }
    out.into_iter().map(Option::unwrap).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::symmetry::{detect_point_group, DEFAULT_TOLERANCE};
    use crate::chem::xyz::{read_xyz, LengthUnit};
    use crate::integrals::{kinetic, nuclear, overlap};
    use bandcast_linalg::{eigh, mul};

    /// Eigenvectors of the core Hamiltonian T + V in the S-metric: orbitals with the full
    /// symmetry of the molecule (any operator commuting with the group gives such
    /// eigenvectors), available without an SCF.
    fn core_orbitals(mol: &Molecule, basis: &BasisSet) -> (Mat<f64>, Mat<f64>, Vec<f64>) {
        let s = overlap(basis);
        let t = kinetic(basis);
        let v = nuclear(basis, mol);
        let n = s.nrows();
        let h = Mat::from_fn(n, n, |i, j| t[(i, j)] + v[(i, j)]);
        let (sw, su) = eigh(s.as_ref());
        let x = Mat::from_fn(n, n, |i, j| su[(i, j)] / sw[j].sqrt());
        let hx = mul(h.as_ref(), false, x.as_ref(), false);
        let hp = mul(x.as_ref(), true, hx.as_ref(), false);
        let (e, u) = eigh(hp.as_ref());
        let c = mul(x.as_ref(), false, u.as_ref(), false);
        (s, c, e)
    }

    fn setup(file: &str, basis: &str) -> (PointGroup, Molecule, BasisSet, Vec<OrbitalLabel>) {
        let p = std::path::Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/gw100"))
            .join(format!("{file}.xyz"));
        let mol = read_xyz(&p, LengthUnit::Angstrom).unwrap();
        let b = crate::basis::load(basis, &mol, None).unwrap();
        let pg = detect_point_group(&mol, DEFAULT_TOLERANCE);
        let (s, c, e) = core_orbitals(&mol, &b);
        let labels = label_orbitals(&pg, &mol, &b, &s, &c, &e, 1e-6);
        (pg, mol, b, labels)
    }

    /// Every orbital gets a clean label; degenerate sets have the irrep's dimension.
    fn check_clean(labels: &[OrbitalLabel], pg: &PointGroup) {
        for l in labels {
            assert!(!l.fallback, "{l:?}");
            assert!(l.purity > 0.999, "{l:?}");
            let irrep = l.irrep.as_ref().unwrap();
            let dim = pg.table.irreps[pg.table.irrep_index(irrep).unwrap()].dim;
            assert_eq!(dim, l.set_size, "{l:?}");
        }
    }

    #[test]
    fn water_minimal_basis_irreps() {
        let (pg, _, _, labels) = setup("water", "sto-3g");
        check_clean(&labels, &pg);
        // STO-3G water: 7 AOs span 4 a1 + 2 b2 + 1 b1 (O 1s, 2s, 2pz, H combinations; O 2px
        // out of plane alone is b1; common practice).
        let count = |g: &str| {
            labels
                .iter()
                .filter(|l| l.irrep.as_deref() == Some(g))
                .count()
        };
        assert_eq!(
            (count("a1"), count("b1"), count("b2"), count("a2")),
            (4, 1, 2, 0)
        );
    }

    #[test]
    fn methane_benzene_nitrogen_degenerate_sets() {
        for (file, basis, irrep, dim) in [
            ("methane", "sto-3g", "t2", 3),
            ("benzene", "sto-3g", "e1g", 2),
            ("nitrogen", "cc-pvdz", "πu", 2),
            ("nitrogen", "cc-pvdz", "δg", 2),
            ("ammonia", "6-31g*", "e", 2),
            ("ethane", "sto-3g", "eg", 2),
        ] {
            let (pg, _, _, labels) = setup(file, basis);
            check_clean(&labels, &pg);
            let l = labels
                .iter()
                .find(|l| l.irrep.as_deref() == Some(irrep))
                .unwrap_or_else(|| panic!("{file}: no {irrep}"));
            assert_eq!(l.set_size, dim, "{file}");
            assert_eq!(l.label.as_deref(), Some(format!("1{irrep}").as_str()));
        }
    }

    #[test]
    fn neon_atom_shells() {
        let (_, _, _, labels) = setup("neon", "cc-pvdz");
        let mut names: Vec<String> = labels.iter().map(|l| l.label.clone().unwrap()).collect();
        names.truncate(5);
        // Core-Hamiltonian levels of a neutral atom in energy order: 1s, 2s, 2p×3.
        assert_eq!(names, ["1s", "2s", "2p", "2p", "2p"]);
        assert_eq!(labels[2].set, labels[4].set);
    }
}
