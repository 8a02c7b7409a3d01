//! Cartesian components x^a y^b z^c of a shell, in the AO order of `crate::basis::shell`
//! (a descending, then b descending: xx, xy, xz, yy, yz, zz for d).

/// Largest angular momentum the integral code handles (g = 4 is what the bundled sets need;
/// h = 5 is accepted so that derivative-like shifts and tests have headroom).
pub const MAX_L: usize = 5;

/// Number of Cartesian components (l+1)(l+2)/2.
pub const fn n_cartesian(l: usize) -> usize {
    (l + 1) * (l + 2) / 2
}

/// The exponent triples (a, b, c) with a + b + c = l, in AO order.
pub fn components(l: usize) -> Vec<[usize; 3]> {
    let mut v = Vec::with_capacity(n_cartesian(l));
    for a in (0..=l).rev() {
        for b in (0..=l - a).rev() {
            v.push([a, b, l - a - b]);
        }
    }
    v
}

/// Double factorial n!! for odd n ≥ −1 ((−1)!! = 1); used by the normalisation formulas.
pub fn double_factorial(n: i64) -> f64 {
    let mut r = 1.0;
    let mut k = n;
    while k > 1 {
        r *= k as f64;
        k -= 2;
    }
    r
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn order_matches_shell_convention() {
        // Order documented in src/basis/shell.rs.
        assert_eq!(
            components(2),
            vec![
                [2, 0, 0],
                [1, 1, 0],
                [1, 0, 1],
                [0, 2, 0],
                [0, 1, 1],
                [0, 0, 2]
            ]
        );
        let f = components(3);
        assert_eq!(f[0], [3, 0, 0]);
        assert_eq!(f[4], [1, 1, 1]);
        assert_eq!(f[9], [0, 0, 3]);
        for l in 0..=MAX_L {
            assert_eq!(components(l).len(), n_cartesian(l));
        }
        assert_eq!(double_factorial(-1), 1.0);
        assert_eq!(double_factorial(7), 105.0);
    }
}
