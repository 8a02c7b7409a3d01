//! `--vibronic` of `bandcast ionize` and `bandcast spectrum`: the bands with their
//! vibrational structure (`bandcast::vibronic::band`), printed by `report::vibronic`.

use std::path::Path;

use bandcast::chem::Molecule;
use bandcast::report::vibronic::{
    bands_table, curve_window, spectrum_svg, spectrum_text, vibronic_curve, BandsJson,
    DEFAULT_VIBRONIC_FWHM_EV, VIBRONIC_GUIDANCE,
};
use bandcast::report::write_atomic;
use bandcast::vibronic::band::{vibronic_bands, BandOptions, Neutral, VibronicBand};
use bandcast::vibronic::composite::apply_correlated_vertical;
use bandcast::Result;

use super::common::print_json;

/// Bands when `--count` is not given.
pub const DEFAULT_COUNT: usize = 3;

fn compute(
    mol: &Molecule,
    basis: &str,
    count: Option<usize>,
) -> Result<(Neutral, Vec<VibronicBand>)> {
    let n = count.unwrap_or(DEFAULT_COUNT);
    if n == 0 {
        return Err(bandcast::Error::input("--count must be at least 1"));
    }
    eprintln!(
        "vibronic: optimising the neutral and {n} cation state(s) and computing their \
         Hessians ({} gradients per state)…",
        6 * mol.atoms.len()
    );
    let (neutral, mut bands) = vibronic_bands(mol, basis, n, &BandOptions::default())?;
    // best positions the molecule affords: correlated vertical + HF relaxation
    if let Err(e) = apply_correlated_vertical(
        &neutral,
        basis,
        &mut bands,
        bandcast::system::default_memory_budget(),
    ) {
        eprintln!("note: the correlated vertical energies failed ({e}); positions are HF ΔSCF");
    }
    Ok((neutral, bands))
}

fn name(mol: &Molecule, file: &Path) -> String {
    if mol.name.is_empty() {
        file.display().to_string()
    } else {
        mol.name.clone()
    }
}

/// `bandcast ionize FILE --basis B --vibronic [--count N] [--json]`.
pub fn ionize(
    mol: &Molecule,
    file: &Path,
    basis: &str,
    count: Option<usize>,
    json: bool,
) -> Result<()> {
    let (n, bands) = compute(mol, basis, count)?;
    let name = name(mol, file);
    if json {
        return print_json(&BandsJson {
            molecule: &name,
            basis,
            electronic_method: bandcast::report::vibronic::electronic(&bands),
            neutral_point_group: &n.point_group,
            bands: &bands,
            curve: None,
            note: VIBRONIC_GUIDANCE,
        });
    }
    print!("{}", bands_table(&name, basis, &n.point_group, &bands));
    Ok(())
}

/// `bandcast spectrum FILE --basis B --vibronic [--fwhm EV] [--window LO:HI] [--svg] [--csv] [--json]`.
#[allow(clippy::too_many_arguments)]
pub fn spectrum(
    mol: &Molecule,
    file: &Path,
    basis: &str,
    count: Option<usize>,
    fwhm: Option<f64>,
    window: Option<(f64, f64)>,
    svg: Option<&Path>,
    csv: Option<&Path>,
    json: bool,
) -> Result<()> {
    let (n, bands) = compute(mol, basis, count)?;
    let name = name(mol, file);
    let fwhm = fwhm.unwrap_or(DEFAULT_VIBRONIC_FWHM_EV);
    let (lo, hi) = curve_window(&bands, fwhm, window);
    let curve = vibronic_curve(&bands, fwhm, lo, hi);
    if let Some(p) = svg {
        write_atomic(p, spectrum_svg(&name, &bands, &curve).as_bytes())?;
    }
    if let Some(p) = csv {
        let c: Vec<(f64, f64)> = curve
            .energy_ev
            .iter()
            .copied()
            .zip(curve.intensity.iter().copied())
            .collect();
        write_atomic(p, curve_csv_pairs(&c).as_bytes())?;
    }
    if json {
        return print_json(&BandsJson {
            molecule: &name,
            basis,
            electronic_method: bandcast::report::vibronic::electronic(&bands),
            neutral_point_group: &n.point_group,
            bands: &bands,
            curve: Some(curve),
            note: VIBRONIC_GUIDANCE,
        });
    }
    print!("{}", spectrum_text(&name, &bands, &curve));
    Ok(())
}

fn curve_csv_pairs(c: &[(f64, f64)]) -> String {
    let mut s = String::from("energy_ev,intensity\n");
    for (e, i) in c {
        s.push_str(&format!("{e:.6},{i:.6e}\n"));
    }
    s
}
