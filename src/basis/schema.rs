//! The basis-set file format (bundled `basis/*.json` and user files alike) and its reader.
//!
//! Layout (documented for users in DEVELOPERS.md, "Basis-set files"):
//!
//! ```json
//! {
//!   "name": "cc-pVDZ",
//!   "aliases": [],
//!   "kind": "orbital",
//!   "harmonics": "pure",
//!   "description": "…",
//!   "source": [{"elements": ["H", "B"], "note": "…", "cite": ["Dunning, … (1989)"]}],
//!   "provenance": "…",
//!   "elements": {
//!     "H": [{"l": 0, "exponents": [13.01, 1.962], "coefficients": [0.0197, 0.138]}]
//!   }
//! }
//! ```
//!
//! `name`, `harmonics` and `elements` are required; the rest is optional. Every shell is a
//! plain segmented contraction with one angular momentum (SP shells and general contractions
//! are stored split). Coefficients multiply *normalised* primitives, as published; exponents
//! are in bohr⁻². Unknown keys are rejected so that a misspelt key does not pass silently.

use std::fmt;
use std::path::Path;

use serde::de::{self, Deserializer, MapAccess, Visitor};
use serde::{Deserialize, Serialize};

use crate::basis::shell::{l_letter, Harmonics};
use crate::chem::elements;
use crate::error::{Error, Result};

/// Largest angular momentum a file may hold (i functions).
pub const MAX_L: usize = 6;

/// What a set is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum SetKind {
    /// Orbital basis for SCF and correlated methods.
    #[serde(rename = "orbital")]
    Orbital,
    /// Auxiliary set fitted for Coulomb and exchange (density fitting of J and K).
    #[serde(rename = "fitting-jk")]
    FittingJk,
    /// Auxiliary set fitted for correlation energies (resolution of the identity, RI).
    #[serde(rename = "fitting-ri")]
    FittingRi,
}

impl SetKind {
    pub fn is_fitting(self) -> bool {
        !matches!(self, SetKind::Orbital)
    }
    pub fn label(self) -> &'static str {
        match self {
            SetKind::Orbital => "orbital",
            SetKind::FittingJk => "fitting-jk",
            SetKind::FittingRi => "fitting-ri",
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
enum HarmonicsText {
    #[serde(rename = "cartesian")]
    Cartesian,
    #[serde(rename = "pure")]
    Pure,
}

/// One group of reference papers and the elements they cover.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SourceEntry {
    /// Element symbols the papers cover.
    #[serde(default)]
    pub elements: Vec<String>,
    /// What the papers contributed ("The cc-pVDZ basis set", "Polarization functions").
    #[serde(default)]
    pub note: String,
    /// Citation text, one paper per entry.
    #[serde(default)]
    pub cite: Vec<String>,
}

/// One segmented contraction: angular momentum, exponents, coefficients (normalised
/// primitives), checked on reading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ShellData {
    pub l: usize,
    /// Exponents α in bohr⁻².
    pub exponents: Vec<f64>,
    /// Contraction coefficients for normalised primitives, as published.
    pub coefficients: Vec<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawShell {
    l: usize,
    exponents: Vec<f64>,
    coefficients: Vec<f64>,
}

impl RawShell {
    fn check(self) -> std::result::Result<ShellData, String> {
        let r = self;
        if r.l > MAX_L {
            return Err(format!(
                "shell with l = {} (the largest supported is {} = {})",
                r.l,
                MAX_L,
                l_letter(MAX_L)
            ));
        }
        if r.exponents.is_empty() {
            return Err("shell with no exponents".into());
        }
        if r.exponents.len() != r.coefficients.len() {
            return Err(format!(
                "{} shell has {} exponents but {} coefficients (one coefficient per exponent)",
                l_letter(r.l),
                r.exponents.len(),
                r.coefficients.len()
            ));
        }
        if let Some(a) = r.exponents.iter().find(|a| !(a.is_finite() && **a > 0.0)) {
            return Err(format!(
                "{} shell has exponent {a}: exponents must be positive",
                l_letter(r.l)
            ));
        }
        if r.coefficients.iter().any(|c| !c.is_finite()) {
            return Err(format!(
                "{} shell has a non-finite coefficient",
                l_letter(r.l)
            ));
        }
        if r.coefficients.iter().all(|c| *c == 0.0) {
            return Err(format!(
                "{} shell has only zero coefficients",
                l_letter(r.l)
            ));
        }
        Ok(ShellData {
            l: r.l,
            exponents: r.exponents,
            coefficients: r.coefficients,
        })
    }
}

impl ShellData {
    /// Number of AO functions with the given convention.
    pub fn n_functions(&self, pure: bool) -> usize {
        if pure && self.l >= 2 {
            2 * self.l + 1
        } else {
            (self.l + 1) * (self.l + 2) / 2
        }
    }
}

/// The shells of one element.
#[derive(Debug, Clone, PartialEq)]
pub struct ElementData {
    /// Atomic number.
    pub z: u32,
    pub shells: Vec<ShellData>,
}

impl ElementData {
    pub fn symbol(&self) -> &'static str {
        elements::symbol(self.z)
    }
    /// Contracted shells per l, e.g. "3s2p1d".
    pub fn contracted_summary(&self) -> String {
        summary(self.shells.iter().map(|s| (s.l, 1)))
    }
    /// Primitives per l, counting a shared exponent once per l, e.g. "9s4p1d".
    pub fn primitive_summary(&self) -> String {
        let max_l = self.shells.iter().map(|s| s.l).max().unwrap_or(0);
        let mut counts = Vec::new();
        for l in 0..=max_l {
            let mut ex: Vec<f64> = self
                .shells
                .iter()
                .filter(|s| s.l == l)
                .flat_map(|s| s.exponents.iter().copied())
                .collect();
            ex.sort_by(|a, b| a.partial_cmp(b).unwrap());
            ex.dedup();
            counts.push((l, ex.len()));
        }
        summary(counts.into_iter())
    }
    /// Number of AO functions this element brings with the given convention.
    pub fn n_functions(&self, pure: bool) -> usize {
        self.shells.iter().map(|s| s.n_functions(pure)).sum()
    }
    pub fn max_l(&self) -> usize {
        self.shells.iter().map(|s| s.l).max().unwrap_or(0)
    }
}

fn summary(items: impl Iterator<Item = (usize, usize)>) -> String {
    let mut counts = [0usize; MAX_L + 1];
    for (l, n) in items {
        counts[l] += n;
    }
    let mut out = String::new();
    for (l, n) in counts.iter().enumerate() {
        if *n > 0 {
            out.push_str(&format!("{n}{}", l_letter(l)));
        }
    }
    out
}

/// A whole basis-set file.
#[derive(Debug, Clone, PartialEq)]
pub struct BasisData {
    pub name: String,
    pub aliases: Vec<String>,
    pub kind: SetKind,
    /// The convention the set is published in.
    pub harmonics: Harmonics,
    pub description: String,
    pub source: Vec<SourceEntry>,
    pub provenance: String,
    /// Elements in increasing atomic number.
    pub elements: Vec<ElementData>,
}

impl BasisData {
    /// The shells of element `z`, if the set defines it.
    pub fn element(&self, z: u32) -> Option<&ElementData> {
        self.elements.iter().find(|e| e.z == z)
    }
    /// Atomic numbers the set defines, increasing.
    pub fn atomic_numbers(&self) -> Vec<u32> {
        self.elements.iter().map(|e| e.z).collect()
    }

    /// Parse a file's text. `origin` names the file in error messages (None for bundled
    /// data, which is reported as damaged rather than as user input).
    pub fn from_json(text: &str, origin: Option<&Path>) -> Result<BasisData> {
        let raw: RawFile = serde_json::from_str(text).map_err(|e| json_error(e, origin))?;
        let harmonics = match raw.harmonics {
            HarmonicsText::Cartesian => Harmonics::Cartesian,
            HarmonicsText::Pure => Harmonics::Pure,
        };
        if raw.name.trim().is_empty() {
            let msg = "\"name\" is empty";
            return Err(match origin {
                Some(p) => Error::input_at(p, line_of(text, "\"name\""), msg),
                None => Error::computation(format!("bundled basis data: {msg}")),
            });
        }
        let mut elements = Vec::with_capacity(raw.elements.0.len());
        for el in raw.elements.0 {
            let mut shells = Vec::with_capacity(el.shells.len());
            for (k, sh) in el.shells.into_iter().enumerate() {
                let shell = sh.check().map_err(|msg| {
                    let msg = format!("{}, shell {}: {msg}", elements::symbol(el.z), k + 1);
                    match origin {
                        Some(p) => Error::input_at(p, shell_line(text, &el.key, k), msg),
                        None => Error::computation(format!("bundled basis data: {msg}")),
                    }
                })?;
                shells.push(shell);
            }
            elements.push(ElementData { z: el.z, shells });
        }
        elements.sort_by_key(|e| e.z);
        Ok(BasisData {
            name: raw.name,
            aliases: raw.aliases,
            kind: raw.kind.unwrap_or(SetKind::Orbital),
            harmonics,
            description: raw.description,
            source: raw.source,
            provenance: raw.provenance,
            elements,
        })
    }

    /// The set as a file in this schema, laid out like the bundled files: metadata first,
    /// then one shell per line. Numbers are written so that they read back to the same f64.
    pub fn to_json(&self) -> String {
        fn js<T: Serialize + ?Sized>(v: &T) -> String {
            serde_json::to_string(v).expect("basis data serialises")
        }
        let harmonics = match self.harmonics {
            Harmonics::Cartesian => HarmonicsText::Cartesian,
            Harmonics::Pure => HarmonicsText::Pure,
        };
        let mut out = String::from("{\n");
        out += &format!("  \"name\": {},\n", js(&self.name));
        out += &format!("  \"aliases\": {},\n", js(&self.aliases));
        out += &format!("  \"kind\": {},\n", js(&self.kind));
        out += &format!("  \"harmonics\": {},\n", js(&harmonics));
        out += &format!("  \"description\": {},\n", js(&self.description));
        out += "  \"source\": [";
        for (i, entry) in self.source.iter().enumerate() {
            out += if i == 0 { "\n    " } else { ",\n    " };
            out += &js(entry);
        }
        out += if self.source.is_empty() {
            "],\n"
        } else {
            "\n  ],\n"
        };
        out += &format!("  \"provenance\": {},\n", js(&self.provenance));
        out += "  \"elements\": {";
        for (i, e) in self.elements.iter().enumerate() {
            out += if i == 0 { "\n" } else { ",\n" };
            out += &format!("    {}: [", js(e.symbol()));
            for (k, sh) in e.shells.iter().enumerate() {
                out += if k == 0 { "\n      " } else { ",\n      " };
                out += &format!(
                    "{{\"l\": {}, \"exponents\": {}, \"coefficients\": {}}}",
                    sh.l,
                    js(&sh.exponents),
                    js(&sh.coefficients)
                );
            }
            out += "\n    ]";
        }
        out += "\n  }\n}\n";
        out
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    name: String,
    #[serde(default)]
    aliases: Vec<String>,
    #[serde(default)]
    kind: Option<SetKind>,
    harmonics: HarmonicsText,
    #[serde(default)]
    description: String,
    #[serde(default)]
    source: Vec<SourceEntry>,
    #[serde(default)]
    provenance: String,
    elements: ElementMap,
}

/// The "elements" object: symbol → shells, with symbols checked and duplicates refused
/// (a plain map would keep the last of two entries silently).
struct ElementMap(Vec<RawElement>);

struct RawElement {
    key: String,
    z: u32,
    shells: Vec<RawShell>,
}

impl<'de> Deserialize<'de> for ElementMap {
    fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        struct V;
        impl<'de> Visitor<'de> for V {
            type Value = ElementMap;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("an object mapping element symbols to lists of shells")
            }
            fn visit_map<A: MapAccess<'de>>(
                self,
                mut map: A,
            ) -> std::result::Result<ElementMap, A::Error> {
                let mut out: Vec<RawElement> = Vec::new();
                while let Some(key) = map.next_key::<String>()? {
                    let z = match key.parse::<u32>() {
                        Ok(_) => None,
                        Err(_) => elements::parse_element(&key),
                    }
                    .ok_or_else(|| {
                        de::Error::custom(format!("\"{key}\" is not an element symbol"))
                    })?;
                    if out.iter().any(|e| e.z == z) {
                        return Err(de::Error::custom(format!(
                            "element {} appears twice",
                            elements::symbol(z)
                        )));
                    }
                    let shells: Vec<RawShell> = map.next_value()?;
                    if shells.is_empty() {
                        return Err(de::Error::custom(format!(
                            "element {} has no shells",
                            elements::symbol(z)
                        )));
                    }
                    out.push(RawElement { key, z, shells });
                }
                if out.is_empty() {
                    return Err(de::Error::custom("\"elements\" defines no element"));
                }
                Ok(ElementMap(out))
            }
        }
        d.deserialize_map(V)
    }
}

/// serde_json's error as ours: user files get file and line, bundled data is "damaged".
fn json_error(e: serde_json::Error, origin: Option<&Path>) -> Error {
    let full = e.to_string();
    // serde_json appends " at line L column C"; keep the message, report the line ourselves.
    let msg = match full.rfind(" at line ") {
        Some(i) if e.line() > 0 => format!("{} (column {})", &full[..i], e.column()),
        _ => full.clone(),
    };
    match origin {
        Some(p) => Error::input_at(
            p,
            (e.line() > 0).then_some(e.line()),
            format!("not a valid basis-set file: {msg}"),
        ),
        None => Error::computation(format!("bundled basis data is damaged: {full}")),
    }
}

/// 1-based line of shell `k` (0-based) of the element written `key`: the k-th '{' after
/// the key. Shell objects hold no nested braces, so this is exact for any layout.
fn shell_line(text: &str, key: &str, k: usize) -> Option<usize> {
    let elements_at = text.find("\"elements\"")?;
    let quoted = format!("\"{key}\"");
    let mut from = elements_at;
    let key_at = loop {
        let i = from + text[from..].find(&quoted)?;
        let rest = text[i + quoted.len()..].trim_start();
        if rest.starts_with(':') {
            break i;
        }
        from = i + quoted.len();
    };
    let (i, _) = text[key_at..]
        .char_indices()
        .filter(|(_, c)| *c == '{')
        .nth(k)?;
    Some(text[..key_at + i].bytes().filter(|b| *b == b'\n').count() + 1)
}

/// 1-based line of the first occurrence of `needle`, if any.
fn line_of(text: &str, needle: &str) -> Option<usize> {
    text.find(needle)
        .map(|i| text[..i].bytes().filter(|b| *b == b'\n').count() + 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    const SMALL: &str = r#"{
  "name": "test",
  "harmonics": "pure",
  "elements": {
    "O": [
      {"l": 0, "exponents": [2.0, 1.0], "coefficients": [0.5, 0.5]},
      {"l": 1, "exponents": [1.0], "coefficients": [1.0]},
      {"l": 2, "exponents": [1.0], "coefficients": [1.0]}
    ],
    "h": [{"l": 0, "exponents": [1.0], "coefficients": [1.0]}]
  }
}"#;

    #[test]
    fn reads_small_file() {
        let b = BasisData::from_json(SMALL, Some(Path::new("x.json"))).unwrap();
        assert_eq!(b.kind, SetKind::Orbital);
        assert_eq!(b.harmonics, Harmonics::Pure);
        assert_eq!(b.atomic_numbers(), vec![1, 8]);
        let o = b.element(8).unwrap();
        assert_eq!(o.contracted_summary(), "1s1p1d");
        assert_eq!(o.primitive_summary(), "2s1p1d");
        assert_eq!(o.n_functions(true), 1 + 3 + 5);
        assert_eq!(o.n_functions(false), 1 + 3 + 6);
    }

    #[test]
    fn length_mismatch_names_line() {
        let bad = SMALL.replace("\"coefficients\": [0.5, 0.5]", "\"coefficients\": [0.5]");
        let e = BasisData::from_json(&bad, Some(Path::new("x.json"))).unwrap_err();
        let s = e.to_string();
        assert!(s.starts_with("x.json:6: O, shell 1:"), "{s}");
        assert!(s.contains("2 exponents but 1 coefficients"), "{s}");
        assert_eq!(e.exit_code(), 2);
    }

    #[test]
    fn bad_symbol_duplicate_and_typo_are_refused() {
        let bad = SMALL.replace("\"h\":", "\"Xq\":");
        let s = BasisData::from_json(&bad, Some(Path::new("x.json")))
            .unwrap_err()
            .to_string();
        assert!(s.contains("\"Xq\" is not an element symbol"), "{s}");
        let dup = SMALL.replace("\"h\":", "\"o\":");
        let s = BasisData::from_json(&dup, Some(Path::new("x.json")))
            .unwrap_err()
            .to_string();
        assert!(s.contains("element O appears twice"), "{s}");
        let typo = SMALL.replace("\"harmonics\"", "\"harmonic\"");
        let s = BasisData::from_json(&typo, Some(Path::new("x.json")))
            .unwrap_err()
            .to_string();
        assert!(s.contains("unknown field `harmonic`"), "{s}");
        let neg = SMALL.replace("[2.0, 1.0]", "[2.0, -1.0]");
        let s = BasisData::from_json(&neg, Some(Path::new("x.json")))
            .unwrap_err()
            .to_string();
        assert!(s.contains("exponents must be positive"), "{s}");
    }

    #[test]
    fn json_round_trip_is_exact() {
        let b = BasisData::from_json(SMALL, None).unwrap();
        let again = BasisData::from_json(&b.to_json(), None).unwrap();
        assert_eq!(b, again);
    }
}
