//! Character tables of the molecular point groups, built in the group's standard frame
//! (principal axis z; the first C2′ axis, or the first σv plane, along/containing x).
//!
//! Representations are real: a pair of complex-conjugate irreps (the E irreps of Cn, Cnh, S2n,
//! T, Th) is merged into one real two-dimensional irrep whose characters are twice the real
//! part; such an irrep has `norm` 2 (⟨χ, χ⟩ = 2|G|) and counts as one label "e". Classes are
//! accordingly "real classes": a conjugacy class together with the class of its inverses
//! (every character below is real, so χ(R) = χ(R⁻¹)).
//!
//! Axial groups are generated from formulas (characters 2cos(2πjk/n) for E_j, Mulliken's
//! A/B, 1/2, g/u, ′/″ rules); the cubic groups T, Th, Td, O, Oh are typed in. Every table is
//! checked by the unit tests below: closure of the operations, class sizes, orthogonality of
//! the characters, and the textbook irreps of x, y, z (common practice).
//!
//! The linear groups are represented by their finite subgroups C10v (for C∞v) and D10h (for
//! D∞h): an orbital with angular momentum Λ about the axis spans, in C_Nv, the irrep A1
//! (Λ = 0) or E_Λ, and these are distinct irreps for Λ < N/2, so every orbital built from
//! functions up to l = 4 (Λ ≤ 4) is classified exactly. The irreps are renamed σ, π, δ, φ, γ
//! (+ g/u); Σ⁻ (A2 / A1u), which no one-electron orbital of on-axis functions can have, is
//! written "σ-". (Correlation D∞h → D_Nh: Σg⁺ → A1g, Σu⁺ → A2u, Π → E1, Δ → E2, common
//! practice.)

use super::ops::{self, Mat3, IDENTITY, INVERSION};
use std::f64::consts::PI;

/// One (real) class of operations.
#[derive(Debug, Clone)]
pub struct ClassInfo {
    /// Schoenflies symbol of its operations ("C3", "σv", "S4", "C2'").
    pub label: String,
    /// Number of operations in the class.
    pub size: usize,
    /// One member, in the standard frame.
    pub representative: Mat3,
}

/// One real irreducible representation.
#[derive(Debug, Clone)]
pub struct Irrep {
    /// Orbital-label form, lower case: "a1", "b2g", "e'", "t2", "e1u", "σg", "πu".
    pub name: String,
    /// Dimension χ(E).
    pub dim: usize,
    /// Characters per class (same order as `CharacterTable::classes`).
    pub characters: Vec<f64>,
    /// (1/|G|) Σ_R χ(R)²: 1, or 2 for a merged complex-conjugate pair.
    pub norm: f64,
}

#[derive(Debug, Clone)]
pub struct CharacterTable {
    /// Group name ("C2v", "D6h", "D∞h").
    pub group: String,
    pub order: usize,
    pub classes: Vec<ClassInfo>,
    pub irreps: Vec<Irrep>,
    /// All operations, standard frame.
    pub elements: Vec<Mat3>,
    /// Class index of each element.
    pub element_class: Vec<usize>,
    /// For a linear group: the finite subgroup actually used ("C10v", "D10h").
    pub represented_by: Option<String>,
}

impl CharacterTable {
    /// Multiplicities n_Γ = (1/(|G| norm_Γ)) Σ_c |c| χ(c) χ_Γ(c) of a character vector
    /// given per class.
    pub fn reduce(&self, chi: &[f64]) -> Vec<f64> {
        self.irreps
            .iter()
            .map(|irr| {
                let s: f64 = self
                    .classes
                    .iter()
                    .zip(chi)
                    .zip(&irr.characters)
                    .map(|((c, x), y)| c.size as f64 * x * y)
                    .sum();
                s / (self.order as f64 * irr.norm)
            })
            .collect()
    }

    /// Index of an irrep by name.
    pub fn irrep_index(&self, name: &str) -> Option<usize> {
        self.irreps.iter().position(|i| i.name == name)
    }
}

/// Groups with a table here, by name.
pub const GROUPS: &[&str] = &[
    "C1", "Cs", "Ci", "C2", "C3", "C4", "C5", "C6", "C2v", "C3v", "C4v", "C5v", "C6v", "C2h",
    "C3h", "C4h", "C5h", "C6h", "D2", "D3", "D4", "D5", "D6", "D2h", "D3h", "D4h", "D5h", "D6h",
    "D8h", "D2d", "D3d", "D4d", "D5d", "D6d", "S4", "S6", "S8", "T", "Th", "Td", "O", "Oh", "C∞v",
    "D∞h",
];

/// Character table of a point group by Schoenflies name ("C2v", "D∞h"); None if unknown.
pub fn table(name: &str) -> Option<CharacterTable> {
    let b = build(name)?;
    Some(b.finish())
}

/// Group under construction: named classes with representatives, irreps with characters.
struct Build {
    name: String,
    classes: Vec<(String, Mat3)>,
    irreps: Vec<(String, Vec<f64>)>,
    represented_by: Option<String>,
}

const Z: [f64; 3] = [0.0, 0.0, 1.0];
const X: [f64; 3] = [1.0, 0.0, 0.0];
const Y: [f64; 3] = [0.0, 1.0, 0.0];

fn parse_n(s: &str) -> Option<usize> {
    let n: usize = s.parse().ok()?;
    (1..=12).contains(&n).then_some(n)
}

fn build(name: &str) -> Option<Build> {
    let b = match name {
        "C1" => cn(1),
        "Cs" => named(cnh(1), "Cs"),
        "Ci" => named(product(cn(1), INVERSION, true), "Ci"),
        "T" => cubic_t(),
        "Th" => named(product(cubic_t(), INVERSION, true), "Th"),
        "Td" => cubic_td(),
        "O" => cubic_o(),
        "Oh" => named(product(cubic_o(), INVERSION, true), "Oh"),
        "C∞v" | "Cinfv" => linear(cnv(10), "C∞v"),
        "D∞h" | "Dinfh" => linear(dnh(10), "D∞h"),
        _ => {
            let (head, tail) = name.split_at(1);
            let digits: String = tail.chars().take_while(|c| c.is_ascii_digit()).collect();
            let suffix = &tail[digits.len()..];
            let n = parse_n(&digits)?;
            match (head, suffix) {
                ("C", "") => cn(n),
                ("C", "v") if n >= 2 => cnv(n),
                ("C", "h") if n >= 2 => cnh(n),
                ("D", "") if n >= 2 => dn(n),
                ("D", "h") if n >= 2 => dnh(n),
                ("D", "d") if n >= 2 => dnd(n),
                ("S", "") if n >= 4 && n % 2 == 0 => s2n(n),
                _ => return None,
            }
        }
    };
    Some(b)
}

fn named(mut b: Build, name: &str) -> Build {
    b.name = name.to_string();
    b
}

/// Names E, or E1, E2, … when a group has several E irreps.
fn e_name(j: usize, count: usize) -> String {
    if count == 1 {
        "e".into()
    } else {
        format!("e{j}")
    }
}

/// Rotation classes C_n^k, k = 1..⌊n/2⌋ (with C_n^{-k} in the same real class).
fn rotation_classes(n: usize) -> Vec<(String, Mat3)> {
    (1..=n / 2)
        .map(|k| {
            let r = ops::rotation(&Z, 2.0 * PI * k as f64 / n as f64);
            (ops::symbol(&r), r)
        })
        .collect()
}

/// Characters of the one- and two-dimensional irreps of a cyclic/dihedral family on the
/// rotation classes k = 1..⌊n/2⌋ (E first).
fn rot_chars(n: usize, f: impl Fn(usize) -> f64, dim: f64) -> Vec<f64> {
    let mut v = vec![dim];
    v.extend((1..=n / 2).map(f));
    v
}

/// Cn with real irreps A, B (n even), E_j (j = 1..⌊(n−1)/2⌋, merged complex pairs).
fn cn(n: usize) -> Build {
    let mut classes = vec![("E".to_string(), IDENTITY)];
    classes.extend(rotation_classes(n));
    let mut irreps = vec![("a".to_string(), rot_chars(n, |_| 1.0, 1.0))];
    if n.is_multiple_of(2) {
        irreps.push((
            "b".into(),
            rot_chars(n, |k| if k % 2 == 0 { 1.0 } else { -1.0 }, 1.0),
        ));
    }
    let ne = (n - 1) / 2;
    for j in 1..=ne {
        irreps.push((
            e_name(j, ne),
            rot_chars(
                n,
                |k| 2.0 * (2.0 * PI * (j * k) as f64 / n as f64).cos(),
                2.0,
            ),
        ));
    }
    Build {
        name: format!("C{n}"),
        classes,
        irreps,
        represented_by: None,
    }
}

/// Irreps A1, A2, B1, B2 (n even), E_j of Cnv/Dn/C2nv-type groups: rotation classes, then one
/// (n odd) or two (n even) classes of "vertical" elements (σv/C2′, then σd/C2″).
fn dihedral_irreps(n: usize) -> Vec<(String, Vec<f64>)> {
    let alt = |k: usize| if k.is_multiple_of(2) { 1.0 } else { -1.0 };
    let with = |mut v: Vec<f64>, tail: &[f64]| {
        v.extend_from_slice(tail);
        v
    };
    let even = n.is_multiple_of(2);
    let vert = |a: f64, b: f64| if even { vec![a, b] } else { vec![a] };
    let mut irreps = vec![
        (
            "a1".to_string(),
            with(rot_chars(n, |_| 1.0, 1.0), &vert(1.0, 1.0)),
        ),
        (
            "a2".to_string(),
            with(rot_chars(n, |_| 1.0, 1.0), &vert(-1.0, -1.0)),
        ),
    ];
    if even {
        irreps.push(("b1".into(), with(rot_chars(n, alt, 1.0), &[1.0, -1.0])));
        irreps.push(("b2".into(), with(rot_chars(n, alt, 1.0), &[-1.0, 1.0])));
    }
    let ne = (n - 1) / 2;
    for j in 1..=ne {
        let chars = rot_chars(
            n,
            |k| 2.0 * (2.0 * PI * (j * k) as f64 / n as f64).cos(),
            2.0,
        );
        irreps.push((e_name(j, ne), with(chars, &vert(0.0, 0.0))));
    }
    irreps
}

/// Horizontal direction at angle θ.
fn horizontal(theta: f64) -> [f64; 3] {
    [theta.cos(), theta.sin(), 0.0]
}

/// Cnv: σv contains x (normal y); for n even σd contains the direction at π/n.
fn cnv(n: usize) -> Build {
    let mut classes = vec![("E".to_string(), IDENTITY)];
    classes.extend(rotation_classes(n));
    classes.push(("σv".into(), ops::reflection(&Y)));
    if n.is_multiple_of(2) {
        let d = horizontal(PI / n as f64 + PI / 2.0);
        classes.push(("σd".into(), ops::reflection(&d)));
    }
    Build {
        name: format!("C{n}v"),
        classes,
        irreps: dihedral_irreps(n),
        represented_by: None,
    }
}

/// Dn: C2′ along x; for n even C2″ along the direction at π/n.
fn dn(n: usize) -> Build {
    let mut classes = vec![("E".to_string(), IDENTITY)];
    classes.extend(rotation_classes(n));
    classes.push(("C2'".into(), ops::rotation(&X, PI)));
    if n.is_multiple_of(2) {
        classes.push(("C2''".into(), ops::rotation(&horizontal(PI / n as f64), PI)));
    }
    let mut irreps = dihedral_irreps(n);
    if n == 2 {
        // D2: A, B1 (symmetric under C2(z)), B2 (C2(y)), B3 (C2(x)).
        classes[1].0 = "C2(z)".into();
        classes[2].0 = "C2(x)".into();
        classes[3].0 = "C2(y)".into();
        let get = |name: &str| irreps.iter().find(|(n, _)| n == name).unwrap().1.clone();
        irreps = vec![
            ("a".into(), get("a1")),
            ("b1".into(), get("a2")),
            ("b2".into(), get("b2")),
            ("b3".into(), get("b1")),
        ];
    }
    Build {
        name: format!("D{n}"),
        classes,
        irreps,
        represented_by: None,
    }
}

/// Name of a product class: mirror planes get h/v/d by their orientation.
fn plane_or_symbol(m: &Mat3, vertical_is_v: &dyn Fn(&[f64; 3]) -> bool) -> String {
    match ops::kind(m) {
        ops::OpKind::Reflection { normal } => {
            if normal[2].abs() > 1.0 - 1e-9 {
                "σh".into()
            } else if vertical_is_v(&normal) {
                "σv".into()
            } else {
                "σd".into()
            }
        }
        _ => ops::symbol(m),
    }
}

/// Direct product with {E, m} where m is the inversion (g/u) or σh (′/″); m commutes with
/// every operation of `base`. Product classes are named geometrically; a vertical plane is
/// σv when it contains a C2′ axis of the base group (its in-plane horizontal direction lies
/// at a multiple of π/n for n odd or 2π/n for n even), σd otherwise.
fn product(base: Build, m: Mat3, inversion: bool) -> Build {
    let n_rot = base
        .classes
        .iter()
        .filter(|(_, r)| matches!(ops::kind(r), ops::OpKind::Rotation { axis, .. } if axis[2].abs() > 0.999))
        .count();
    // Recover n from the smallest rotation about z (1 if none).
    let n = base
        .classes
        .iter()
        .filter_map(|(_, r)| match ops::kind(r) {
            ops::OpKind::Rotation { axis, angle } if axis[2].abs() > 0.999 => {
                ops::rational_angle(angle).map(|(n, _)| n)
            }
            _ => None,
        })
        .max()
        .unwrap_or(1);
    let _ = n_rot;
    let step = if n % 2 == 0 {
        2.0 * PI / n as f64
    } else {
        PI / n as f64
    };
    let cubic = base.name.starts_with('T') || base.name.starts_with('O');
    let vertical_is_v = move |normal: &[f64; 3]| -> bool {
        if cubic {
            return false;
        }
        // In-plane horizontal direction is the normal turned by 90°.
        let theta = normal[1].atan2(normal[0]) + PI / 2.0;
        let q = theta / step;
        (q - q.round()).abs() < 1e-6
    };
    let mut classes = base.classes.clone();
    for (_, r) in &base.classes {
        let p = ops::mul(r, &m);
        classes.push((plane_or_symbol(&p, &vertical_is_v), p));
    }
    let (plus, minus) = if inversion { ("g", "u") } else { ("'", "''") };
    let mut irreps = Vec::new();
    for (sign, suffix) in [(1.0, plus), (-1.0, minus)] {
        for (name, chars) in &base.irreps {
            let mut c = chars.clone();
            c.extend(chars.iter().map(|x| sign * x));
            irreps.push((format!("{name}{suffix}"), c));
        }
    }
    let name = base.name.clone();
    Build {
        name,
        classes,
        irreps,
        represented_by: None,
    }
}

/// Cnh: Cn × {E, i} for n even (g/u), Cn × {E, σh} for n odd (′/″).
fn cnh(n: usize) -> Build {
    let b = if n.is_multiple_of(2) {
        product(cn(n), INVERSION, true)
    } else {
        product(cn(n), ops::reflection(&Z), false)
    };
    named(b, &format!("C{n}h"))
}

/// Dnh: Dn × {E, i} for n even, Dn × {E, σh} for n odd.
fn dnh(n: usize) -> Build {
    let b = if n.is_multiple_of(2) {
        product(dn(n), INVERSION, true)
    } else {
        product(dn(n), ops::reflection(&Z), false)
    };
    named(b, &format!("D{n}h"))
}

/// Dnd: Dn × {E, i} for n odd; for n even the group is isomorphic to C2n,v with the odd
/// powers of C2n replaced by S2n, σv by C2′ (along x) and σd kept (planes bisecting the C2′).
fn dnd(n: usize) -> Build {
    if n % 2 == 1 {
        return named(product(dn(n), INVERSION, true), &format!("D{n}d"));
    }
    let m = 2 * n;
    let mut classes = vec![("E".to_string(), IDENTITY)];
    for k in 1..=m / 2 {
        let angle = 2.0 * PI * k as f64 / m as f64;
        let r = if k % 2 == 1 {
            ops::improper(&Z, angle)
        } else {
            ops::rotation(&Z, angle)
        };
        classes.push((ops::symbol(&r), r));
    }
    classes.push(("C2'".into(), ops::rotation(&X, PI)));
    classes.push((
        "σd".into(),
        ops::reflection(&horizontal(PI / m as f64 + PI / 2.0)),
    ));
    Build {
        name: format!("D{n}d"),
        classes,
        irreps: dihedral_irreps(m),
        represented_by: None,
    }
}

/// S2n (argument 2n): isomorphic to C2n with odd powers improper for n even; Cn × {E, i}
/// for n odd (S6 = C3i).
fn s2n(m: usize) -> Build {
    let n = m / 2;
    if n % 2 == 1 {
        return named(product(cn(n), INVERSION, true), &format!("S{m}"));
    }
    let mut b = cn(m);
    for (k, class) in b.classes.iter_mut().enumerate().skip(1) {
        if k % 2 == 1 {
            let r = ops::improper(&Z, 2.0 * PI * k as f64 / m as f64);
            *class = (ops::symbol(&r), r);
        }
    }
    named(b, &format!("S{m}"))
}

fn c3_111() -> Mat3 {
    let u = 1.0 / 3f64.sqrt();
    ops::rotation(&[u, u, u], 2.0 * PI / 3.0)
}

/// T: C2 along x, y, z; C3 along the cube diagonals.
fn cubic_t() -> Build {
    Build {
        name: "T".into(),
        classes: vec![
            ("E".into(), IDENTITY),
            ("C3".into(), c3_111()),
            ("C2".into(), ops::rotation(&Z, PI)),
        ],
        irreps: vec![
            ("a".into(), vec![1.0, 1.0, 1.0]),
            ("e".into(), vec![2.0, -1.0, 2.0]),
            ("t".into(), vec![3.0, 0.0, -1.0]),
        ],
        represented_by: None,
    }
}

/// Td: S4 along x, y, z; σd planes containing one axis and bisecting the other two.
fn cubic_td() -> Build {
    let s = 1.0 / 2f64.sqrt();
    Build {
        name: "Td".into(),
        classes: vec![
            ("E".into(), IDENTITY),
            ("C3".into(), c3_111()),
            ("C2".into(), ops::rotation(&Z, PI)),
            ("S4".into(), ops::improper(&Z, PI / 2.0)),
            ("σd".into(), ops::reflection(&[s, -s, 0.0])),
        ],
        irreps: vec![
            ("a1".into(), vec![1.0, 1.0, 1.0, 1.0, 1.0]),
            ("a2".into(), vec![1.0, 1.0, 1.0, -1.0, -1.0]),
            ("e".into(), vec![2.0, -1.0, 2.0, 0.0, 0.0]),
            ("t1".into(), vec![3.0, 0.0, -1.0, 1.0, -1.0]),
            ("t2".into(), vec![3.0, 0.0, -1.0, -1.0, 1.0]),
        ],
        represented_by: None,
    }
}

/// O: C4 along x, y, z; C2′ along face diagonals.
fn cubic_o() -> Build {
    let s = 1.0 / 2f64.sqrt();
    Build {
        name: "O".into(),
        classes: vec![
            ("E".into(), IDENTITY),
            ("C3".into(), c3_111()),
            ("C2'".into(), ops::rotation(&[s, s, 0.0], PI)),
            ("C4".into(), ops::rotation(&Z, PI / 2.0)),
            ("C2".into(), ops::rotation(&Z, PI)),
        ],
        irreps: vec![
            ("a1".into(), vec![1.0, 1.0, 1.0, 1.0, 1.0]),
            ("a2".into(), vec![1.0, 1.0, -1.0, -1.0, 1.0]),
            ("e".into(), vec![2.0, -1.0, 0.0, 0.0, 2.0]),
            ("t1".into(), vec![3.0, 0.0, -1.0, 1.0, -1.0]),
            ("t2".into(), vec![3.0, 0.0, 1.0, -1.0, -1.0]),
        ],
        represented_by: None,
    }
}

/// A linear group through its finite subgroup with N = 10, irreps renamed by Λ.
fn linear(mut b: Build, name: &str) -> Build {
    let sub = b.name.clone();
    for (irrep, _) in b.irreps.iter_mut() {
        let (core, parity) = match irrep.strip_suffix('g') {
            Some(c) => (c.to_string(), "g"),
            None => match irrep.strip_suffix('u') {
                Some(c) => (c.to_string(), "u"),
                None => (irrep.clone(), ""),
            },
        };
        let greek = match (core.as_str(), parity) {
            ("a1", "u") => "σ-".to_string(),
            ("a2", "u") => "σ".to_string(),
            ("a1", _) => "σ".to_string(),
            ("a2", _) => "σ-".to_string(),
            ("e1", _) => "π".into(),
            ("e2", _) => "δ".into(),
            ("e3", _) => "φ".into(),
            ("e4", _) => "γ".into(),
            (other, _) => format!("{other}(Λ=5)"),
        };
        // "σ-" + "g" reads σg-: keep the sign last.
        *irrep = match greek.strip_suffix('-') {
            Some(g) => format!("{g}{parity}-"),
            None => format!("{greek}{parity}"),
        };
    }
    b.name = name.to_string();
    b.represented_by = Some(sub);
    b
}

fn same(a: &Mat3, b: &Mat3) -> bool {
    ops::max_diff(a, b) < 1e-7
}

impl Build {
    fn finish(self) -> CharacterTable {
        // Closure: multiply by the class representatives (which generate the group).
        let gens: Vec<Mat3> = self.classes.iter().map(|c| c.1).collect();
        let mut elements = vec![IDENTITY];
        let mut i = 0;
        while i < elements.len() {
            let e = elements[i];
            for g in &gens {
                let p = ops::mul(g, &e);
                if !elements.iter().any(|x| same(x, &p)) {
                    elements.push(p);
                }
            }
            i += 1;
            assert!(elements.len() <= 240, "group {} does not close", self.name);
        }
        // Real classes.
        let mut element_class = vec![usize::MAX; elements.len()];
        let mut sizes = vec![0usize; self.classes.len()];
        for (c, (_, rep)) in self.classes.iter().enumerate() {
            for r in [*rep, ops::transpose(rep)] {
                for g in &elements {
                    let conj = ops::mul(&ops::mul(g, &r), &ops::transpose(g));
                    let idx = elements
                        .iter()
                        .position(|x| same(x, &conj))
                        .expect("conjugate lies in the group");
                    if element_class[idx] == usize::MAX {
                        element_class[idx] = c;
                        sizes[c] += 1;
                    } else {
                        assert_eq!(
                            element_class[idx], c,
                            "group {}: classes {} and {} overlap",
                            self.name, element_class[idx], c
                        );
                    }
                }
            }
        }
        assert!(
            element_class.iter().all(|&c| c != usize::MAX),
            "group {}: an operation lies in no listed class",
            self.name
        );
        let order = elements.len();
        let classes: Vec<ClassInfo> = self
            .classes
            .iter()
            .zip(&sizes)
            .map(|((label, rep), &size)| ClassInfo {
                label: label.clone(),
                size,
                representative: *rep,
            })
            .collect();
        let irreps = self
            .irreps
            .into_iter()
            .map(|(name, characters)| {
                let norm: f64 = classes
                    .iter()
                    .zip(&characters)
                    .map(|(c, x)| c.size as f64 * x * x)
                    .sum::<f64>()
                    / order as f64;
                Irrep {
                    name,
                    dim: characters[0].round() as usize,
                    characters,
                    norm: norm.round(),
                }
            })
            .collect();
        CharacterTable {
            group: self.name,
            order,
            classes,
            irreps,
            elements,
            element_class,
            represented_by: self.represented_by,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Irreps spanned by x, y, z (the vector representation, χ = Tr R).
    fn vector_irreps(t: &CharacterTable) -> Vec<(String, f64)> {
        let chi: Vec<f64> = t
            .classes
            .iter()
            .map(|c| ops::trace(&c.representative))
            .collect();
        t.reduce(&chi)
            .into_iter()
            .zip(&t.irreps)
            .filter(|(n, _)| n.abs() > 1e-8)
            .map(|(n, i)| (i.name.clone(), n))
            .collect()
    }

    #[test]
    fn every_table_is_a_consistent_group() {
        for name in GROUPS {
            let t = table(name).unwrap_or_else(|| panic!("no table for {name}"));
            let total: usize = t.classes.iter().map(|c| c.size).sum();
            assert_eq!(total, t.order, "{name}");
            // Σ_Γ dim² · norm = |G| (a merged pair counts twice with half the dim² each).
            let s: f64 = t
                .irreps
                .iter()
                .map(|i| (i.dim * i.dim) as f64 / i.norm)
                .sum();
            assert!((s - t.order as f64).abs() < 1e-9, "{name}: Σ d² = {s}");
            // Row orthogonality.
            for (a, ia) in t.irreps.iter().enumerate() {
                for (b, ib) in t.irreps.iter().enumerate() {
                    let dotp: f64 = t
                        .classes
                        .iter()
                        .enumerate()
                        .map(|(c, cl)| cl.size as f64 * ia.characters[c] * ib.characters[c])
                        .sum::<f64>()
                        / t.order as f64;
                    let want = if a == b { ia.norm } else { 0.0 };
                    assert!(
                        (dotp - want).abs() < 1e-9,
                        "{name}: <{},{}>",
                        ia.name,
                        ib.name
                    );
                }
            }
            // The vector representation reduces to whole numbers.
            for (irr, n) in vector_irreps(&t) {
                assert!((n - n.round()).abs() < 1e-9, "{name}: {irr} × {n}");
            }
        }
    }

    #[test]
    fn group_orders() {
        // Orders of the point groups (common practice).
        for (name, order) in [
            ("C1", 1),
            ("Cs", 2),
            ("Ci", 2),
            ("C2v", 4),
            ("C3v", 6),
            ("D2h", 8),
            ("D3h", 12),
            ("D3d", 12),
            ("D2d", 8),
            ("D4h", 16),
            ("D6h", 24),
            ("Td", 24),
            ("Oh", 48),
            ("T", 12),
            ("Th", 24),
            ("S4", 4),
            ("S6", 6),
            ("D4d", 16),
            ("D∞h", 40),
            ("C∞v", 20),
        ] {
            assert_eq!(table(name).unwrap().order, order, "{name}");
        }
    }

    #[test]
    fn textbook_irreps_of_x_y_z() {
        // Standard character tables (e.g. Cotton, Chemical Applications of Group Theory,
        // appendix; common practice): where x, y, z transform.
        let cases: &[(&str, &[&str])] = &[
            ("C2v", &["a1", "b1", "b2"]),
            ("C3v", &["a1", "e"]),
            ("D2h", &["b1u", "b2u", "b3u"]),
            ("C2h", &["au", "bu"]),
            ("D3h", &["e'", "a2''"]),
            ("D3d", &["a2u", "eu"]),
            ("D2d", &["b2", "e"]),
            ("D4h", &["a2u", "eu"]),
            ("D6h", &["a2u", "e1u"]),
            ("Td", &["t2"]),
            ("Oh", &["t1u"]),
            ("Cs", &["a'", "a''"]),
            ("Ci", &["au"]),
            ("S4", &["b", "e"]),
            ("D∞h", &["σu", "πu"]),
            ("C∞v", &["σ", "π"]),
            ("C3h", &["e'", "a''"]),
            ("D5h", &["e1'", "a2''"]),
            ("Th", &["tu"]),
        ];
        for (g, want) in cases {
            let t = table(g).unwrap();
            let mut got: Vec<String> = vector_irreps(&t).into_iter().map(|(n, _)| n).collect();
            got.sort();
            let mut want: Vec<String> = want.iter().map(|s| s.to_string()).collect();
            want.sort();
            assert_eq!(got, want, "{g}");
        }
    }

    #[test]
    fn c2v_b1_is_symmetric_under_sigma_xz() {
        // C2v: B1 has character +1 under σv(xz) (Mulliken 1955; common practice).
        let t = table("C2v").unwrap();
        let c = t.classes.iter().position(|c| c.label == "σv").unwrap();
        let rep = t.classes[c].representative;
        // σv(xz) leaves x and z unchanged.
        assert!((rep[0][0] - 1.0).abs() < 1e-12 && (rep[1][1] + 1.0).abs() < 1e-12);
        let b1 = &t.irreps[t.irrep_index("b1").unwrap()];
        assert_eq!(b1.characters[c], 1.0);
    }

    #[test]
    fn d6h_class_labels_follow_the_usual_table() {
        // D6h: E 2C6 2C3 C2 3C2' 3C2'' i 2S3 2S6 σh 3σd 3σv (common practice).
        let t = table("D6h").unwrap();
        let labels: Vec<String> = t
            .classes
            .iter()
            .map(|c| {
                format!(
                    "{}{}",
                    if c.size > 1 {
                        c.size.to_string()
                    } else {
                        String::new()
                    },
                    c.label
                )
            })
            .collect();
        assert_eq!(
            labels,
            ["E", "2C6", "2C3", "C2", "3C2'", "3C2''", "i", "2S3", "2S6", "σh", "3σd", "3σv"]
        );
        let t = table("D4h").unwrap();
        let labels: Vec<String> = t.classes.iter().map(|c| c.label.clone()).collect();
        assert_eq!(
            labels,
            ["E", "C4", "C2", "C2'", "C2''", "i", "S4", "σh", "σv", "σd"]
        );
    }
}
