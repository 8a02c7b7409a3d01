//! THE frozen-core rule: how many of the lowest spatial orbitals count as core — left out of
//! correlation sums (EP2, MP2, CCSD, EOM) when the core is frozen, and left out of valence
//! band lists. Every method asks here; nothing else counts core orbitals.
//!
//! Common practice: freeze the closed noble-gas shells below the valence shell plus the
//! filled d and f shells that lie below it — none for H and He, [He] for Li–Ne, [Ne] for
//! Na–Ar, [Ar] for K–Zn, [Ar]3d¹⁰ for Ga–Kr, [Kr] for Rb–Cd, [Kr]4d¹⁰ for In–Xe, [Xe] for
//! Cs–Yb, [Xe]4f¹⁴ for Lu–Hg, [Xe]4f¹⁴5d¹⁰ for Tl–Rn, [Rn] for Fr–No, [Rn]5f¹⁴ for Lr–Cn and
//! [Rn]5f¹⁴6d¹⁰ for Nh–Og. A shell being filled (3d in Sc–Zn, 4f in La–Yb) is valence.

use super::Molecule;

/// Core orbitals (spatial) of one atom of atomic number `z`.
pub fn core_orbitals_of(z: u32) -> usize {
    match z {
        0..=2 => 0,
        3..=10 => 1,
        11..=18 => 5,
        19..=30 => 9,
        31..=36 => 14,
        37..=48 => 18,
        49..=54 => 23,
        55..=70 => 27,
        71..=80 => 34,
        81..=86 => 39,
        87..=102 => 43,
        103..=112 => 50,
        _ => 55,
    }
}

/// Core orbitals of a molecule for band lists: the sum over its atoms, capped so that a
/// cation with few electrons never has more core orbitals than occupied ones
/// (never more than floor(n_electrons/2)).
pub fn core_orbitals(mol: &Molecule) -> usize {
    let n: usize = mol.atoms.iter().map(|a| core_orbitals_of(a.z)).sum();
    n.min(mol.n_electrons() / 2)
}

/// Orbitals frozen in a correlated calculation with `n_occupied` doubly occupied orbitals:
/// the sum of `core_orbitals_of` over the atoms, or none when that would leave no occupied
/// orbital to correlate (then all electrons are correlated).
pub fn frozen_orbitals(mol: &Molecule, n_occupied: usize) -> usize {
    let n: usize = mol.atoms.iter().map(|a| core_orbitals_of(a.z)).sum();
    if n >= n_occupied {
        0
    } else {
        n
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::molecule::Atom;

    /// Core count of element `z` built independently of the table above: fill subshells in
    /// the Madelung (n + l, then n) order (textbook aufbau; common practice) and take the
    /// period from the largest n; the core is every completely filled subshell with n below
    /// the period except the last one filled, which is the element's own d or f shell (so 3d
    /// is valence in Zn, core in Ga and Y; 4f valence in Yb, core in Lu).
    fn madelung_core(z: u32) -> usize {
        let mut order: Vec<(u32, u32)> = (1..=7u32)
            .flat_map(|n| (0..n.min(4)).map(move |l| (n, l)))
            .collect();
        order.sort_by_key(|&(n, l)| (n + l, n));
        let mut left = z;
        let mut filled: Vec<(u32, u32, u32)> = Vec::new(); // (n, l, electrons)
        for (n, l) in order {
            if left == 0 {
                break;
            }
            let e = left.min(2 * (2 * l + 1));
            filled.push((n, l, e));
            left -= e;
        }
        let &(last_n, last_l, _) = filled.last().unwrap();
        let period = filled.iter().map(|s| s.0).max().unwrap();
        filled
            .iter()
            .filter(|&&(n, l, e)| n < period && e == 2 * (2 * l + 1) && (n, l) != (last_n, last_l))
            .map(|&(_, l, _)| (2 * l + 1) as usize)
            .sum()
    }

    #[test]
    fn every_element_follows_the_noble_gas_shell_rule() {
        for z in 1..=118 {
            assert_eq!(core_orbitals_of(z), madelung_core(z), "Z = {z}");
        }
        // spot checks against the shells named in the rule (common practice)
        assert_eq!(core_orbitals_of(1), 0); // H
        assert_eq!(core_orbitals_of(8), 1); // O: 1s
        assert_eq!(core_orbitals_of(17), 5); // Cl: [Ne]
        assert_eq!(core_orbitals_of(26), 9); // Fe: [Ar]
        assert_eq!(core_orbitals_of(30), 9); // Zn: [Ar], 3d valence
        assert_eq!(core_orbitals_of(31), 14); // Ga: [Ar]3d10
        assert_eq!(core_orbitals_of(35), 14); // Br: [Ar]3d10
        assert_eq!(core_orbitals_of(37), 18); // Rb: [Kr]
        assert_eq!(core_orbitals_of(53), 23); // I: [Kr]4d10
        assert_eq!(core_orbitals_of(55), 27); // Cs: [Xe]
        assert_eq!(core_orbitals_of(82), 39); // Pb: [Xe]4f14 5d10
        assert_eq!(core_orbitals_of(87), 43); // Fr: [Rn]
        assert_eq!(core_orbitals_of(118), 55); // Og: [Rn]5f14 6d10
                                               // the core never reaches the element's own electrons: at most floor(Z/2) - 1
                                               // orbitals beyond H and He, so a neutral atom always has valence electrons
        for z in 3..=118u32 {
            assert!(2 * core_orbitals_of(z) < z as usize, "Z = {z}");
        }
    }

    fn atom(z: u32, x: f64) -> Atom {
        Atom {
            z,
            position: [x, 0.0, 0.0],
        }
    }

    #[test]
    fn molecule_counts_and_caps() {
        let water = Molecule::new(vec![atom(8, 0.0), atom(1, 1.8), atom(1, -1.8)]);
        assert_eq!(core_orbitals(&water), 1);
        assert_eq!(frozen_orbitals(&water, 5), 1);
        // Li3+ has no electrons: nothing is core
        let li = Molecule::new(vec![atom(3, 0.0)])
            .with_charge_multiplicity(3, 1)
            .unwrap();
        assert_eq!(core_orbitals(&li), 0);
        // Li+ (1s2): one core orbital for band lists, but a correlated method on it
        // correlates the only occupied orbital instead of freezing it
        let li_plus = Molecule::new(vec![atom(3, 0.0)])
            .with_charge_multiplicity(1, 1)
            .unwrap();
        assert_eq!(core_orbitals(&li_plus), 1);
        assert_eq!(frozen_orbitals(&li_plus, 1), 0);
    }
}
