//! Optimised HF/6-31G* structures against published HF/6-31G* values: W. J. Hehre,
//! L. Radom, P. v. R. Schleyer & J. A. Pople, *Ab initio Molecular Orbital Theory* (Wiley,
//! 1986), structure tables — values from memory; tolerance 0.002 Å and 0.2°.

use bandcast::chem::{Atom, Molecule};
use bandcast::geometry::{optimize, OptimizeOptions, StateSpec};
use bandcast::scf::{Reference, ScfOptions};
use bandcast::units::ANGSTROM_TO_BOHR;

fn mol_angstrom(list: &[(u32, [f64; 3])]) -> Molecule {
    Molecule::new(
        list.iter()
            .map(|&(z, p)| Atom {
                z,
                position: [
                    p[0] * ANGSTROM_TO_BOHR,
                    p[1] * ANGSTROM_TO_BOHR,
                    p[2] * ANGSTROM_TO_BOHR,
                ],
            })
            .collect(),
    )
}

fn spec(
    basis: &str,
    charge: i32,
    multiplicity: u32,
    reference: Reference,
    hole: Option<usize>,
) -> StateSpec {
    StateSpec {
        basis: basis.into(),
        charge,
        multiplicity,
        reference,
        hole,
        scf: ScfOptions {
            e_tol: 1e-11,
            commutator_tol: 1e-9,
            ..ScfOptions::default()
        },
    }
}

fn dist(m: &Molecule, a: usize, b: usize) -> f64 {
    let (p, q) = (m.atoms[a].position, m.atoms[b].position);
    ((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2) + (p[2] - q[2]).powi(2)).sqrt()
        / ANGSTROM_TO_BOHR
}

fn angle(m: &Molecule, a: usize, b: usize, c: usize) -> f64 {
    let (p, q, r) = (
        m.atoms[a].position,
        m.atoms[b].position,
        m.atoms[c].position,
    );
    let u = [p[0] - q[0], p[1] - q[1], p[2] - q[2]];
    let v = [r[0] - q[0], r[1] - q[1], r[2] - q[2]];
    let d = u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
    let n = (u.iter().map(|x| x * x).sum::<f64>() * v.iter().map(|x| x * x).sum::<f64>()).sqrt();
    (d / n).acos().to_degrees()
}

fn run(start: &Molecule, s: &StateSpec) -> bandcast::geometry::OptimizeResult {
    let r = optimize(start, s, &OptimizeOptions::default(), &mut |st| {
        eprintln!(
            "  step {:2} E = {:.8} max F {:.1e} rms F {:.1e} max step {:.1e}",
            st.iteration, st.energy, st.max_force, st.rms_force, st.max_step
        )
    })
    .unwrap();
    assert!(r.converged, "{:?}", r.stalled);
    r
}

#[test]
fn water_hf_631gstar() {
    let start = mol_angstrom(&[
        (8, [0.0, 0.0, 0.12]),
        (1, [0.0, 0.78, -0.47]),
        (1, [0.0, -0.78, -0.47]),
    ]);
    let r = run(&start, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let (roh, ang) = (dist(&r.molecule, 0, 1), angle(&r.molecule, 1, 0, 2));
    eprintln!(
        "H2O: r(OH) {roh:.4} Å, HOH {ang:.2}°, {} gradients, {}",
        r.n_gradients, r.point_group
    );
    assert_eq!(r.point_group, "C2v");
    assert!((roh - 0.947).abs() < 0.002, "r(OH) {roh}"); // Hehre et al. 1986, from memory
    assert!((ang - 105.5).abs() < 0.2, "angle {ang}"); // Hehre et al. 1986, from memory
    assert!(
        (dist(&r.molecule, 0, 2) - roh).abs() < 1e-6,
        "symmetry kept"
    );
}

#[test]
fn n2_and_co_hf_631gstar() {
    let n2 = mol_angstrom(&[(7, [0.0, 0.0, 0.0]), (7, [0.0, 0.0, 1.12])]);
    let r = run(&n2, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let d = dist(&r.molecule, 0, 1);
    eprintln!("N2: {d:.4} Å, {} gradients", r.n_gradients);
    assert!((d - 1.078).abs() < 0.002, "r(NN) {d}"); // Hehre et al. 1986, from memory
    let co = mol_angstrom(&[(6, [0.0, 0.0, 0.0]), (8, [0.0, 0.0, 1.15])]);
    let r = run(&co, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let d = dist(&r.molecule, 0, 1);
    eprintln!("CO: {d:.4} Å, {} gradients", r.n_gradients);
    assert!((d - 1.114).abs() < 0.002, "r(CO) {d}"); // Hehre et al. 1986, from memory
}

#[test]
fn nh3_ch4_hf_631gstar() {
    // pyramidal start with C3v symmetry (axis z)
    let (r0, z0) = (0.94, -0.33);
    let mut nh3 = vec![(7, [0.0, 0.0, 0.0])];
    for k in 0..3 {
        let t = (120.0 * k as f64).to_radians();
        nh3.push((1, [r0 * t.cos(), r0 * t.sin(), z0]));
    }
    let r = run(
        &mol_angstrom(&nh3),
        &spec("6-31G*", 0, 1, Reference::Rhf, None),
    );
    let (d, a) = (dist(&r.molecule, 0, 1), angle(&r.molecule, 1, 0, 2));
    eprintln!(
        "NH3: r(NH) {d:.4} Å, HNH {a:.2}°, {} gradients, {}",
        r.n_gradients, r.point_group
    );
    assert_eq!(r.point_group, "C3v");
    assert!((d - 1.002).abs() < 0.002, "r(NH) {d}"); // Hehre et al. 1986, from memory
    assert!((a - 107.2).abs() < 0.2, "HNH {a}"); // Hehre et al. 1986, from memory

    let c = 1.10 / 3f64.sqrt();
    let ch4 = mol_angstrom(&[
        (6, [0.0, 0.0, 0.0]),
        (1, [c, c, c]),
        (1, [-c, -c, c]),
        (1, [-c, c, -c]),
        (1, [c, -c, -c]),
    ]);
    let r = run(&ch4, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let d = dist(&r.molecule, 0, 1);
    eprintln!(
        "CH4: r(CH) {d:.4} Å, {} gradients, {}",
        r.n_gradients, r.point_group
    );
    assert_eq!(r.point_group, "Td");
    assert!((d - 1.084).abs() < 0.002, "r(CH) {d}"); // Hehre et al. 1986, from memory
}

#[test]
fn h2co_c2h4_hf_631gstar() {
    // planar C2v start in the yz plane, C=O along z
    let h2co = mol_angstrom(&[
        (6, [0.0, 0.0, 0.0]),
        (8, [0.0, 0.0, 1.21]),
        (1, [0.0, 0.94, -0.56]),
        (1, [0.0, -0.94, -0.56]),
    ]);
    let r = run(&h2co, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let m = &r.molecule;
    let (rco, rch, hch) = (dist(m, 0, 1), dist(m, 0, 2), angle(m, 2, 0, 3));
    eprintln!(
        "H2CO: r(CO) {rco:.4}, r(CH) {rch:.4} Å, HCH {hch:.2}°, {} gradients, {}",
        r.n_gradients, r.point_group
    );
    assert_eq!(r.point_group, "C2v");
    assert!((rco - 1.184).abs() < 0.002, "r(CO) {rco}"); // Hehre et al. 1986, from memory
    assert!((rch - 1.092).abs() < 0.002, "r(CH) {rch}"); // Hehre et al. 1986, from memory
    assert!((hch - 115.7).abs() < 0.2, "HCH {hch}"); // Hehre et al. 1986, from memory

    // planar D2h start, C=C along z
    let c2h4 = mol_angstrom(&[
        (6, [0.0, 0.0, 0.67]),
        (6, [0.0, 0.0, -0.67]),
        (1, [0.0, 0.93, 1.24]),
        (1, [0.0, -0.93, 1.24]),
        (1, [0.0, 0.93, -1.24]),
        (1, [0.0, -0.93, -1.24]),
    ]);
    let r = run(&c2h4, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let m = &r.molecule;
    let (rcc, rch, hch) = (dist(m, 0, 1), dist(m, 0, 2), angle(m, 2, 0, 3));
    eprintln!(
        "C2H4: r(CC) {rcc:.4}, r(CH) {rch:.4} Å, HCH {hch:.2}°, {} gradients, {}",
        r.n_gradients, r.point_group
    );
    assert_eq!(r.point_group, "D2h");
    assert!((rcc - 1.317).abs() < 0.002, "r(CC) {rcc}"); // Hehre et al. 1986, from memory
    assert!((rch - 1.076).abs() < 0.002, "r(CH) {rch}"); // Hehre et al. 1986, from memory
    assert!((hch - 116.4).abs() < 0.2, "HCH {hch}"); // Hehre et al. 1986, from memory
}

/// What ionization does to a bond (common practice; the textbook MO picture): taking an
/// electron from a bonding orbital lengthens the bond, from an antibonding one shortens it.
/// H2⁺ against H2 (σg bonding); N2⁺ with the 1πu hole against N2 (π bonding); O2⁺ against
/// triplet O2 (the electron leaves the antibonding πg: experimental r_e 1.116 against
/// 1.208 Å, Huber & Herzberg 1979, from memory — the check asks only for the sign and a
/// clear size, Hartree–Fock does not reproduce r_e).
#[test]
fn bonding_and_antibonding_holes() {
    let h2 = mol_angstrom(&[(1, [0.0, 0.0, 0.0]), (1, [0.0, 0.0, 0.74])]);
    let r0 = dist(
        &run(&h2, &spec("6-31G*", 0, 1, Reference::Rhf, None)).molecule,
        0,
        1,
    );
    let r1 = dist(
        &run(&h2, &spec("6-31G*", 1, 2, Reference::Uhf, None)).molecule,
        0,
        1,
    );
    eprintln!("H2 {r0:.4} Å, H2+ {r1:.4} Å");
    assert!(r1 - r0 > 0.2, "H2+ {r1} against H2 {r0}");

    let n2 = mol_angstrom(&[(7, [0.0, 0.0, 0.0]), (7, [0.0, 0.0, 1.08])]);
    let neutral = spec("6-31G*", 0, 1, Reference::Rhf, None);
    let r0 = dist(&run(&n2, &neutral).molecule, 0, 1);
    let mut ion = spec("6-31G*", 0, 1, Reference::Uhf, None);
    ion.hole = Some(bandcast::geometry::state::resolve_hole(&n2, &ion, "1πu").unwrap());
    let r = run(&n2, &ion);
    let lost = r
        .state
        .hole
        .as_ref()
        .and_then(bandcast::geometry::state::hole_lost);
    assert!(lost.is_none(), "{lost:?}");
    let r1 = dist(&r.molecule, 0, 1);
    eprintln!("N2 {r0:.4} Å, N2+ (1πu hole) {r1:.4} Å");
    assert!(r1 - r0 > 0.03, "N2+ 1πu⁻¹ {r1} against N2 {r0}");

    let o2 = mol_angstrom(&[(8, [0.0, 0.0, 0.0]), (8, [0.0, 0.0, 1.20])]);
    let r0 = dist(
        &run(&o2, &spec("6-31G*", 0, 3, Reference::Uhf, None)).molecule,
        0,
        1,
    );
    let r1 = dist(
        &run(&o2, &spec("6-31G*", 1, 2, Reference::Uhf, None)).molecule,
        0,
        1,
    );
    eprintln!("O2 (triplet) {r0:.4} Å, O2+ {r1:.4} Å");
    assert!(r0 - r1 > 0.03, "O2+ {r1} against O2 {r0}");
}

/// Taking an electron from water's 1b1 (the out-of-plane O 2p lone pair, non-bonding by
/// symmetry) changes r(OH) little and mostly opens the angle. The issue asked for "within
/// 0.02 Å"; that is not what is physically expected: the measured H2O⁺ X̃ ²B1 structure
/// (r 0.999 Å, 110.5°, from memory) is 0.04 Å longer than water's 0.958 Å, and HF/6-31G*
/// gives a similar +0.04 Å. Checked instead: the bond lengthens by less than 0.06 Å (a
/// fraction of what a bonding hole does to a single bond) and the angle opens by 2–10°.
#[test]
fn water_1b1_hole_nonbonding() {
    let w = mol_angstrom(&[
        (8, [0.0, 0.0, 0.12]),
        (1, [0.0, 0.76, -0.47]),
        (1, [0.0, -0.76, -0.47]),
    ]);
    let n = run(&w, &spec("6-31G*", 0, 1, Reference::Rhf, None));
    let mut ion = spec("6-31G*", 0, 1, Reference::Uhf, None);
    ion.hole = Some(bandcast::geometry::state::resolve_hole(&w, &ion, "1b1").unwrap());
    let c = run(&w, &ion);
    let (r0, a0) = (dist(&n.molecule, 0, 1), angle(&n.molecule, 1, 0, 2));
    let (r1, a1) = (dist(&c.molecule, 0, 1), angle(&c.molecule, 1, 0, 2));
    eprintln!("H2O {r0:.4} Å {a0:.2}°, H2O+ 1b1⁻¹ {r1:.4} Å {a1:.2}°");
    assert!((0.0..0.06).contains(&(r1 - r0)), "Δr {}", r1 - r0);
    assert!((2.0..10.0).contains(&(a1 - a0)), "Δangle {}", a1 - a0);
}

/// Without the point group imposed, a start with no symmetry still finds water's C2v
/// minimum (exact condition: the minimum is symmetric; Hehre et al. 1986 values, from
/// memory), and the group reported is the final structure's.
#[test]
fn water_without_imposed_symmetry() {
    let start = mol_angstrom(&[
        (8, [0.02, -0.01, 0.12]),
        (1, [0.05, 0.80, -0.45]),
        (1, [-0.03, -0.74, -0.50]),
    ]);
    let opts = OptimizeOptions {
        keep_symmetry: false,
        ..OptimizeOptions::default()
    };
    let r = optimize(
        &start,
        &spec("6-31G*", 0, 1, Reference::Rhf, None),
        &opts,
        &mut |_| {},
    )
    .unwrap();
    assert!(r.converged, "{:?}", r.stalled);
    let m = &r.molecule;
    let (r1, r2, a) = (dist(m, 0, 1), dist(m, 0, 2), angle(m, 1, 0, 2));
    eprintln!("H2O from C1: {r1:.4} {r2:.4} Å {a:.2}°, {}", r.point_group);
    assert!(
        (r1 - 0.947).abs() < 0.002 && (r2 - 0.947).abs() < 0.002,
        "{r1} {r2}"
    );
    assert!((a - 105.5).abs() < 0.2, "angle {a}");
    assert_eq!(r.point_group, "C2v");
}
