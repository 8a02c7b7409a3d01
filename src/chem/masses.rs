//! Masses of the most abundant isotope of each element H–Kr, in daltons (unified atomic
//! mass units): atomic masses from the Atomic Mass Evaluation (AME2016/AME2020; values from
//! memory to 8–9 significant figures), most abundant isotope by the IUPAC isotopic
//! abundance tables. Used for harmonic vibrational analysis.

/// Mass (Da) of the most abundant isotope of element `z` (1 ≤ z ≤ 36).
pub fn most_abundant_isotope_mass(z: u32) -> f64 {
    const M: [f64; 36] = [
        1.007_825_03,  // ¹H
        4.002_603_25,  // ⁴He
        7.016_003_44,  // ⁷Li
        9.012_183_1,   // ⁹Be
        11.009_305_36, // ¹¹B
        12.0,          // ¹²C (exact by definition)
        14.003_074_00, // ¹⁴N
        15.994_914_62, // ¹⁶O
        18.998_403_16, // ¹⁹F
        19.992_440_18, // ²⁰Ne
        22.989_769_28, // ²³Na
        23.985_041_70, // ²⁴Mg
        26.981_538_53, // ²⁷Al
        27.976_926_53, // ²⁸Si
        30.973_762_00, // ³¹P
        31.972_071_17, // ³²S
        34.968_852_68, // ³⁵Cl
        39.962_383_12, // ⁴⁰Ar
        38.963_706_49, // ³⁹K
        39.962_590_86, // ⁴⁰Ca
        44.955_908_28, // ⁴⁵Sc
        47.947_941_98, // ⁴⁸Ti
        50.943_957_04, // ⁵¹V
        51.940_506_23, // ⁵²Cr
        54.938_043_91, // ⁵⁵Mn
        55.934_936_33, // ⁵⁶Fe
        58.933_194_29, // ⁵⁹Co
        57.935_342_41, // ⁵⁸Ni
        62.929_597_72, // ⁶³Cu
        63.929_142_01, // ⁶⁴Zn
        68.925_573_5,  // ⁶⁹Ga
        73.921_177_76, // ⁷⁴Ge
        74.921_594_57, // ⁷⁵As
        79.916_521_8,  // ⁸⁰Se
        78.918_337_6,  // ⁷⁹Br
        83.911_497_7,  // ⁸⁴Kr
    ];
    M[(z - 1) as usize]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn masses_are_near_the_mass_numbers() {
        // Mass numbers of the most abundant isotopes (IUPAC abundance tables, from memory):
        // the mass defect keeps every atomic mass within 0.1 Da of its mass number.
        let a = [
            1, 4, 7, 9, 11, 12, 14, 16, 19, 20, 23, 24, 27, 28, 31, 32, 35, 40, 39, 40, 45, 48, 51,
            52, 55, 56, 59, 58, 63, 64, 69, 74, 75, 80, 79, 84,
        ];
        for (i, &ai) in a.iter().enumerate() {
            let m = most_abundant_isotope_mass(i as u32 + 1);
            assert!((m - ai as f64).abs() < 0.1, "Z = {}: {m}", i + 1);
        }
    }
}
