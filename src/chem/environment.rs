//! The chemical environment of every atom, named from its bonded neighbours as XPS work
//! names the components of a core-level spectrum (common practice: "C=O", "O–C=O",
//! "O–C(=O)–O" carbonate, "C–O", "CF2", "C≡N", "C–O–C"; aliphatic carbons by their hydrogens,
//! "CH3", "CH2"). A label for reading a spectrum, not a computed quantity.
//!
//! Bonds come from `bonds.rs` (covalent radii). Bond orders are set from standard valences
//! (H 1, B 3, C 4, N 3, O 2, halogens 1; S up to 6 and P up to 5 when their neighbours need
//! it): the unsaturation u = valence − neighbours of each atom is paid out over its bonds,
//! first where an atom has only one unsaturated neighbour left, then on the shortest bond
//! (relative to its covalent-radius sum) — a Kekulé structure for an aromatic ring, whose
//! six-membered rings of atoms with u = 1 are then named "aromatic". Charges and radicals
//! are not used: an ion or a radical may get the name of its closed-shell parent's pattern.

use crate::chem::bonds::{covalent_radius_angstrom, neighbours};
use crate::chem::elements::symbol;
use crate::chem::molecule::distance;
use crate::chem::Molecule;

/// Standard valence used for the bond orders (0: no multiple bonds considered).
fn valence(z: u32, degree: usize) -> usize {
    let v = match z {
        1 | 9 | 17 | 35 => 1,
        5 | 13 => 3,
        6 | 14 | 32 => 4,
        7 => 3,
        8 => 2,
        15 => 5,
        16 | 34 => 6,
        _ => 0,
    };
    v.max(degree)
}

/// Bond orders of the bonded pairs: `orders[i]` lists (neighbour, order) of atom i.
pub fn bond_orders(mol: &Molecule) -> Vec<Vec<(usize, u32)>> {
    let nb = neighbours(mol);
    let n = mol.atoms.len();
    let mut u: Vec<usize> = (0..n)
        .map(|i| valence(mol.atoms[i].z, nb[i].len()) - nb[i].len())
        .collect();
    // S and P take only the multiple bonds their neighbours ask for (thioether S, PF6⁻ P).
    for i in 0..n {
        if matches!(mol.atoms[i].z, 15 | 16 | 34) {
            let want: usize = nb[i].iter().map(|&j| u[j]).sum();
            u[i] = u[i].min(want);
        }
    }
    let mut orders: Vec<Vec<(usize, u32)>> = nb
        .iter()
        .map(|v| v.iter().map(|&j| (j, 1)).collect())
        .collect();
    let rel_len = |i: usize, j: usize| {
        let r = covalent_radius_angstrom(mol.atoms[i].z).unwrap_or(1.0)
            + covalent_radius_angstrom(mol.atoms[j].z).unwrap_or(1.0);
        distance(&mol.atoms[i].position, &mol.atoms[j].position) / r
    };
    loop {
        // candidate bonds: both ends unsaturated
        let mut best: Option<(bool, f64, usize, usize)> = None;
        for i in 0..n {
            for &j in &nb[i] {
                if j <= i || u[i] == 0 || u[j] == 0 {
                    continue;
                }
                let open = |k: usize| nb[k].iter().filter(|&&m| u[m] > 0).count();
                let forced = open(i) == 1 || open(j) == 1;
                let key = (forced, -rel_len(i, j), i, j);
                if best.is_none_or(|b| (key.0, key.1) > (b.0, b.1)) {
                    best = Some(key);
                }
            }
        }
        let Some((_, _, i, j)) = best else { break };
        u[i] -= 1;
        u[j] -= 1;
        for (a, b) in [(i, j), (j, i)] {
            if let Some(e) = orders[a].iter_mut().find(|e| e.0 == b) {
                e.1 += 1;
            }
        }
    }
    orders
}

/// Atoms in a six-membered ring of C/N atoms that each had exactly one unsaturation.
fn aromatic_atoms(mol: &Molecule, nb: &[Vec<usize>]) -> Vec<bool> {
    let n = mol.atoms.len();
    let sp2: Vec<bool> = (0..n)
        .map(|i| {
            matches!(mol.atoms[i].z, 6 | 7)
                && valence(mol.atoms[i].z, nb[i].len()) - nb[i].len() == 1
        })
        .collect();
    let mut arom = vec![false; n];
    // depth-first walks of length 6 through sp2 atoms back to the start
    fn walk(path: &mut Vec<usize>, nb: &[Vec<usize>], sp2: &[bool], arom: &mut [bool]) {
        let last = *path.last().unwrap();
        for &k in &nb[last] {
            if path.len() == 6 && k == path[0] {
                for &p in path.iter() {
                    arom[p] = true;
                }
            } else if path.len() < 6 && sp2[k] && !path.contains(&k) {
                path.push(k);
                walk(path, nb, sp2, arom);
                path.pop();
            }
        }
    }
    for s in 0..n {
        if sp2[s] && !arom[s] {
            walk(&mut vec![s], nb, &sp2, &mut arom);
        }
    }
    arom
}

fn bond_char(order: u32) -> &'static str {
    match order {
        1 => "–",
        2 => "=",
        _ => "≡",
    }
}

/// The environment name of every atom (see the module text).
pub fn environments(mol: &Molecule) -> Vec<String> {
    let nb = neighbours(mol);
    let orders = bond_orders(mol);
    let arom = aromatic_atoms(mol, &nb);
    (0..mol.atoms.len())
        .map(|i| {
            let mut bonds: Vec<(u32, u32)> = orders[i]
                .iter()
                .map(|&(j, o)| (mol.atoms[j].z, o))
                .collect();
            // heavier neighbours first, then higher order (a canonical order for the name)
            bonds.sort_by(|a, b| b.0.cmp(&a.0).then(b.1.cmp(&a.1)));
            if mol.atoms[i].z == 6 {
                carbon_name(&bonds, arom[i])
            } else {
                other_name(mol.atoms[i].z, &bonds, arom[i])
            }
        })
        .collect()
}

/// A carbon: by its heteroatom neighbours, else by its hydrogens or C–C multiple bonds.
fn carbon_name(bonds: &[(u32, u32)], aromatic: bool) -> String {
    // an aromatic ring's Kekulé orders are arbitrary: its heteroatom bonds count as single
    let hetero: Vec<(u32, u32)> = bonds
        .iter()
        .filter(|&&(z, _)| z != 1 && z != 6)
        .map(|&(z, o)| (z, if aromatic { 1 } else { o }))
        .collect();
    if aromatic && !hetero.is_empty() {
        return format!("aromatic {}", carbon_name(&hetero, false));
    }
    let n_h = bonds.iter().filter(|b| b.0 == 1).count();
    if hetero.is_empty() {
        let top = bonds.iter().filter(|b| b.0 == 6).map(|b| b.1).max();
        return match (aromatic, top, n_h) {
            (true, _, 0) => "aromatic C".into(),
            (true, _, _) => "aromatic CH".into(),
            (false, Some(3), _) => "C≡C".into(),
            (false, Some(2), _) => "C=C".into(),
            (_, _, 0) => "C–C".into(),
            (_, _, 1) => "CH".into(),
            (_, _, k) => format!("CH{k}"),
        };
    }
    let singles: Vec<&str> = hetero
        .iter()
        .filter(|b| b.1 == 1)
        .map(|b| symbol(b.0))
        .collect();
    let multiples: Vec<String> = hetero
        .iter()
        .filter(|b| b.1 > 1)
        .map(|b| format!("{}{}", bond_char(b.1), symbol(b.0)))
        .collect();
    let halogen = |s: &str| matches!(s, "F" | "Cl" | "Br");
    match (singles.as_slice(), multiples.as_slice()) {
        ([], [m]) => format!("C{m}"),
        ([], [a, b]) => format!("{}C{b}", a.chars().rev().collect::<String>()),
        ([], ms) => format!("C{}", ms.join("")),
        ([s], []) => format!("C–{s}"),
        (ss, []) if ss.len() > 1 && ss.iter().all(|s| *s == ss[0] && halogen(s)) => {
            format!("C{}{}", ss[0], ss.len())
        }
        ([s], ms) => format!("{s}–C{}", ms.join("")),
        (ss, ms) => {
            let middle: String = ms
                .iter()
                .map(|m| format!("({m})"))
                .chain(ss[1..ss.len() - 1].iter().map(|s| format!("(–{s})")))
                .collect();
            format!("{}–C{middle}–{}", ss[0], ss[ss.len() - 1])
        }
    }
}

/// Any other atom: "Y=X" with one neighbour, "A–X–B" with two, X plus its neighbours'
/// formula with more ("NH3", "PF6").
fn other_name(z: u32, bonds: &[(u32, u32)], aromatic: bool) -> String {
    let x = symbol(z);
    if aromatic {
        return format!("aromatic {x}");
    }
    match bonds {
        [] => x.to_string(),
        [(a, o)] => format!("{}{}{x}", symbol(*a), bond_char(*o)),
        [(a, oa), (b, ob)] => {
            // the multiple bond first ("C=N–H")
            let ((a, oa), (b, ob)) = if ob > oa {
                ((b, ob), (a, oa))
            } else {
                ((a, oa), (b, ob))
            };
            format!(
                "{}{}{x}{}{}",
                symbol(*a),
                bond_char(*oa),
                bond_char(*ob),
                symbol(*b)
            )
        }
        _ => {
            // Hill order of the neighbours: C, H, then alphabetical
            let mut zs: Vec<u32> = bonds.iter().map(|b| b.0).collect();
            zs.sort_by_key(|&z| match z {
                6 => (0, ""),
                1 => (1, ""),
                z => (2, symbol(z)),
            });
            zs.dedup();
            let mut s = x.to_string();
            for z in zs {
                let k = bonds.iter().filter(|b| b.0 == z).count();
                s.push_str(symbol(z));
                if k > 1 {
                    s.push_str(&k.to_string());
                }
            }
            s
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::xyz::{parse_xyz, LengthUnit};

    fn names(xyz: &str) -> Vec<String> {
        environments(&parse_xyz(xyz, LengthUnit::Angstrom).unwrap())
    }

    /// Ethyl acetate CH3–C(=O)–O–CH2–CH3 from standard bond lengths (C=O 1.21, C–O 1.34 and
    /// 1.45, C–C 1.50/1.52, C–H 1.09 Å; built for this test). The four carbons are the
    /// textbook four XPS components of an ester (common practice): CH3, O–C=O, C–O, CH3;
    /// the carbonyl O is C=O and the ester O is C–O–C.
    #[test]
    fn ethyl_acetate() {
        let n = names(
            "14\nethyl acetate\nC -1.2990 -0.7500 0.0\nC 0 0 0\nO 0 1.21 0\nO 1.1605 -0.67 0\n\
             C 2.3765 0.1197 0\nC 3.5824 -0.8056 0\nH -2.1279 -0.0421 0\n\
             H -1.3573 -1.3768 -0.8898\nH -1.3573 -1.3768 0.8898\nH 2.4012 0.7483 0.8902\n\
             H 2.4012 0.7483 -0.8902\nH 3.2456 -1.8422 0\nH 4.1838 -0.6195 -0.8898\n\
             H 4.1838 -0.6196 0.8898\n",
        );
        assert_eq!(n[..6], ["CH3", "O–C=O", "C=O", "C–O–C", "C–O", "CH3"]);
        assert_eq!(n[6], "C–H");
    }

    /// Acetonitrile CH3–C≡N (C≡N 1.157, C–C 1.458 Å, linear): the nitrile triple bond.
    #[test]
    fn acetonitrile() {
        let n = names(
            "6\nacetonitrile\nC 0 0 0\nC 0 0 1.458\nN 0 0 2.615\nH 0 -1.0274 -0.3638\n\
             H -0.8898 0.5137 -0.3638\nH 0.8898 0.5137 -0.3638\n",
        );
        assert_eq!(n[..3], ["CH3", "C≡N", "C≡N"]);
    }

    /// Fluoroethylene carbonate (molecules/fluoroethylene-carbonate.xyz): the carbonate
    /// carbon O–C(=O)–O, the CHF ring carbon bonded to F and O, the CH2–O carbon, carbonyl
    /// and ring oxygens, and C–F.
    #[test]
    fn fluoroethylene_carbonate() {
        let mol = crate::chem::xyz::read_xyz(
            std::path::Path::new(concat!(
                env!("CARGO_MANIFEST_DIR"),
                "/molecules/fluoroethylene-carbonate.xyz"
            )),
            LengthUnit::Angstrom,
        )
        .unwrap();
        let n = environments(&mol);
        assert_eq!(
            n[..7],
            ["O–C(=O)–O", "C=O", "C–O–C", "C–O–C", "F–C–O", "C–O", "C–F"]
        );
    }

    /// Benzene (tests/data/gw100) is aromatic CH, not a Kekulé C=C (pyridine: two aromatic
    /// C–N, one aromatic N); CO2 is O=C=O; CF4 is
    /// CF4 on carbon and C–F on fluorine; water's O is H–O–H.
    #[test]
    fn aromatic_and_symmetric_cases() {
        let gw = |f: &str| {
            let p = format!("{}/tests/data/gw100/{f}.xyz", env!("CARGO_MANIFEST_DIR"));
            environments(
                &crate::chem::xyz::read_xyz(std::path::Path::new(&p), LengthUnit::Angstrom)
                    .unwrap(),
            )
        };
        let b = gw("benzene");
        assert!(
            b.iter().filter(|s| *s == "aromatic CH").count() == 6,
            "{b:?}"
        );
        let c = gw("carbon-dioxide");
        assert!(c.contains(&"O=C=O".to_string()), "{c:?}");
        assert_eq!(c.iter().filter(|s| *s == "C=O").count(), 2);
        let f = gw("carbon-tetrafluoride");
        assert!(f.contains(&"CF4".to_string()) && f.contains(&"C–F".to_string()));
        assert!(gw("water").contains(&"H–O–H".to_string()));
        let p = gw("pyridine");
        assert_eq!(
            p.iter().filter(|s| s.starts_with("aromatic")).count(),
            6,
            "{p:?}"
        );
        assert_eq!(
            p.iter().filter(|s| *s == "aromatic C–N").count(),
            2,
            "{p:?}"
        );
    }
}
