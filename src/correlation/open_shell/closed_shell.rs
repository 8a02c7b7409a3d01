//! The closed-shell route of `run`: an RHF reference is solved with the spin-adapted
//! closed-shell CCSD (correlation/ccsd.rs) and (T) (correlation/closed_triples.rs) on the
//! α factors and Fock matrix that `prepare` (and the natural-virtual cut) made, instead of
//! the spin-blocked equations with α = β. Same energies (to the CC convergence thresholds;
//! tests.rs checks both routes against each other), a fraction of the work: the neutral of
//! every ΔCCSD(T) with a closed-shell ground state runs here.
//!
//! Memory (f64 words; o, v active occupied/virtual orbitals, N_Q factors): factors
//! N_Q (o+v)²; blocks with ≤ 2 virtual indices; amplitudes, residual temporaries and DIIS
//! as correlation/memory.rs counts them; the ladder integrals V± (v⁴/4, ladder.rs) and
//! (ov|vv) (o v³) are held when they fit, otherwise generated each iteration; (T) as
//! closed_triples.rs counts it.

use super::reference::Prepared;
use crate::correlation::ccsd::{self, CcsdOptions};
use crate::correlation::closed_triples;
use crate::correlation::integrals::{MoFactors, MoIntegrals};
use crate::correlation::ladder;
use crate::correlation::tensor::Tensor;
use crate::Result;

/// What the closed-shell route found.
pub(super) struct ClosedShellResult {
    pub e_ccsd_corr: f64,
    pub e_triples: Option<f64>,
    pub iterations: usize,
    pub peak_bytes: f64,
}

/// Peak estimate (bytes) and whether the ladder and (ov|vv) are held, for `budget` bytes;
/// `m` orbitals per spin in `prepare`'s factors (frozen core included), `o`, `v` active.
pub(super) fn estimate(
    naux: usize,
    m: usize,
    o: usize,
    v: usize,
    diis: usize,
    triples: bool,
    budget: f64,
) -> (f64, bool, bool) {
    let (nq, of, vf) = (naux as f64, o as f64, v as f64);
    let o2v2 = of * of * vf * vf;
    let factors = nq * (of + vf) * (of + vf);
    // `prepare` holds both spins' factors (identical for RHF) beside the active copy
    let reference = nq * 2.0 * (m * m) as f64 + factors;
    let blocks = of.powi(4) + of.powi(3) * vf + 3.0 * o2v2;
    let ground = (24.0 + 2.0 * diis as f64) * o2v2 + ladder::block_scratch_words(v);
    let t = if triples {
        2.0 * o2v2
            + closed_triples::shared_words(o, v)
            + rayon::current_num_threads() as f64 * closed_triples::task_words(v)
    } else {
        0.0
    };
    let base = factors + blocks + ground.max(t);
    let ovvv = of * vf * vf * vf;
    let lad = ladder::stored_words(v);
    let hold_ladder = 8.0 * (base + lad) <= 0.9 * budget;
    let with = base + if hold_ladder { lad } else { 0.0 };
    let hold_ovvv = 8.0 * (with + ovvv) <= 0.9 * budget;
    let peak = (with + if hold_ovvv { ovvv } else { 0.0 }).max(reference);
    (8.0 * peak, hold_ladder, hold_ovvv)
}

/// CCSD (and (T)) of the closed shell in `p` with `nf` frozen orbitals.
pub(super) fn solve(
    p: Prepared,
    nf: usize,
    ccsd_opts: &CcsdOptions,
    triples: bool,
    budget: f64,
    log: &mut dyn FnMut(&str),
) -> Result<ClosedShellResult> {
    let f = &p.fac[0];
    let (naux, m) = (f.naux, f.m);
    let (o, v) = (f.nocc - nf, m - f.nocc);
    if o == 0 || v == 0 {
        return Err(crate::Error::input(
            "coupled cluster needs at least one correlated occupied and one virtual orbital",
        ));
    }
    let (peak, hold_ladder, hold_ovvv) =
        estimate(naux, m, o, v, ccsd_opts.diis_size, triples, budget);
    let n = o + v;
    let block = |p0: usize, np: usize, r0: usize, nr: usize| {
        let mut out = vec![0.0; naux * np * nr];
        for q in 0..naux {
            for a in 0..np {
                let src = (q * m + nf + p0 + a) * m + nf + r0;
                out[(q * np + a) * nr..(q * np + a + 1) * nr].copy_from_slice(&f.b[src..src + nr]);
            }
        }
        out
    };
    let factors = MoFactors {
        naux,
        nocc: o,
        nvir: v,
        b_oo: block(0, o, 0, o),
        b_ov: block(0, o, o, v),
        b_vv: block(o, v, o, v),
    };
    let fock = Tensor::from_fn(&[n, n], |x| p.fock[0][(nf + x[0]) * m + nf + x[1]]);
    drop(p);
    log(&format!(
        "closed-shell CCSD (RHF reference): {o} correlated occupied and {v} virtual orbitals, \
         frozen {nf}; ladder integrals {}; (ov|vv) {}; memory estimate {}",
        if hold_ladder {
            "held"
        } else {
            "generated each iteration"
        },
        if hold_ovvv {
            "held"
        } else {
            "rebuilt in slices"
        },
        crate::system::format_bytes(peak)
    ));
    let mut ints = MoIntegrals::new(factors, &fock, hold_ovvv, hold_ladder);
    let cc = ccsd::solve(&ints, ccsd_opts, log)?;
    ints.vvvv = None;
    let e_t = triples.then(|| {
        log(&format!(
            "(T), closed shell: {} occupied triples i ≥ j ≥ k over {v} virtual orbitals",
            o * (o + 1) * (o + 2) / 6
        ));
        let start = std::time::Instant::now();
        let e = closed_triples::correction(&ints, &cc.t1, &cc.t2);
        log(&format!(
            "(T) correction {e:.10} Eh ({:.1} s); CCSD(T) correlation energy {:.10} Eh",
            start.elapsed().as_secs_f64(),
            cc.e_corr + e
        ));
        e
    });
    Ok(ClosedShellResult {
        e_ccsd_corr: cc.e_corr,
        e_triples: e_t,
        iterations: cc.iterations,
        peak_bytes: peak,
    })
}
