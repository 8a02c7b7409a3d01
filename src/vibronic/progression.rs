//! The vibronic stick spectrum of one band: Franck–Condon lines from the neutral's v = 0
//! (or from a thermal distribution over its levels) to the ion's levels, generated class by
//! class with prescreening so that large molecules converge in bounded memory.
//!
//! **Sum rule.** For one initial level v, Σ_{v′} |⟨v|v′⟩|² = 1 exactly (completeness of the
//! ion's levels, J orthogonal). The captured fraction is therefore the sum of the computed
//! intensities itself; with a thermal distribution it is Σ_v p_v Σ_{v′} |⟨v|v′⟩|² with the
//! Boltzmann populations p_v (Σ_v p_v = 1 over all levels).
//!
//! **Classes.** A final level v′ belongs to the class of its set of excited ion modes
//! (C_m: m modes excited). For one initial level the generation goes:
//! 1. class 0: the 0–0 line (or v → 0′);
//! 2. class 1: each ion mode alone, up to `max_quanta_per_mode` quanta; each mode's bound
//!    n_k is the smallest n whose one-mode tail Σ_{q>n} holds at most `mode_tail` of that
//!    mode's one-mode sum (and at least `min_quanta_per_mode`);
//! 3. class 2: every pair of modes (k, l), quanta 1..n_k × 1..n_l;
//! 4. class m ≥ 3: only mode sets all of whose (m−1)-subsets held at least
//!    `subset_threshold` of the intensity (a combination of weak parts is taken to be
//!    weak: a screening assumption, its effect shows in the captured fraction),
//!    strongest estimated first, at most `max_combinations_per_class` per class.
//!
//! In a set of class m ≥ 2 with estimated weight I_s (pairs: I₀₀ r_k r_l with r_k the
//! mode's one-mode lines relative to the 0–0 line; larger sets: the strongest of
//! I_t r_k over their (m−1)-subsets t), mode k takes quanta 1..n_k(s) ≤ n_k, cut where
//! I_s × (its one-mode tail fraction) falls below `tail_threshold`: weak combinations get
//! short ranges, strong ones the full range.
//!
//! Each mode set is one `recursion::Block` (exact overlaps; memory Π(n_k+1) numbers, at
//! most `max_block_points`). Generation stops as soon as the captured fraction reaches
//! `target_fraction` (checked after every block), when no mode set survives the screen,
//! at `max_class`, or when `max_overlaps` overlaps have been evaluated.
//!
//! **Bounds (memory).** At most `max_lines` lines are kept (the strongest; weaker lines
//! still count in the captured fraction), at most 2 × `max_lines` are held while
//! generating; one block of at most `max_block_points` f64; the screening tables hold at
//! most 2 × `max_combinations_per_class` mode sets. Nothing scales with the full product
//! space Π(n_k+1) of all modes.

use std::collections::HashMap;

use super::duschinsky::Duschinsky;
use super::notes::VibronicNote;
use super::recursion::{Block, FcCoefficients};
use crate::Result;

/// Options of the line generation (defaults in `Default`).
#[derive(Debug, Clone, PartialEq)]
pub struct FcOptions {
    /// Stop when this fraction of the total intensity is captured (default 0.95).
    pub target_fraction: f64,
    /// Hard cap on quanta in one ion mode (default 40).
    pub max_quanta_per_mode: u32,
    /// Each mode's bound leaves at most this part of its one-mode progression (default 1e-4).
    pub mode_tail: f64,
    /// Every mode's bound is at least this (default 2: catches frequency-change overtones
    /// and Duschinsky combinations of modes without displacement).
    pub min_quanta_per_mode: u32,
    /// A mode set of class m ≥ 2 opens class m+1 only when its lines hold at least this
    /// intensity (absolute, the band's total being 1; default 1e-7).
    pub subset_threshold: f64,
    /// Most simultaneously excited ion modes (default 12).
    pub max_class: usize,
    /// Most lines kept (default 50 000).
    pub max_lines: usize,
    /// Lines weaker than this are counted but not kept (default 1e-10).
    pub line_floor: f64,
    /// Most overlaps evaluated in all (default 1e9, about 2–3 CPU-seconds per 1e8).
    pub max_overlaps: u64,
    /// Within a mode set of estimated weight I_s, each mode's quanta stop where I_s times
    /// its one-mode tail fraction falls below this (default 1e-9).
    pub tail_threshold: f64,
    /// Most lattice points in one block (default 2²², 32 MiB).
    pub max_block_points: usize,
    /// Most mode sets computed per class (default 200 000).
    pub max_combinations_per_class: usize,
    /// k_B T in hartree for a thermal initial distribution; None = neutral in v = 0.
    pub thermal_energy: Option<f64>,
    /// Thermal levels with a smaller Boltzmann population are not followed (default 1e-3).
    pub min_population: f64,
    /// Most thermal levels followed (default 64, most populated first).
    pub max_initial_levels: usize,
}

impl Default for FcOptions {
    fn default() -> Self {
        FcOptions {
            target_fraction: 0.95,
            max_quanta_per_mode: 40,
            mode_tail: 1e-4,
            min_quanta_per_mode: 2,
            subset_threshold: 1e-7,
            max_class: 12,
            max_lines: 50_000,
            line_floor: 1e-10,
            max_overlaps: 1_000_000_000,
            tail_threshold: 1e-9,
            max_block_points: 1 << 22,
            max_combinations_per_class: 200_000,
            thermal_energy: None,
            min_population: 1e-3,
            max_initial_levels: 64,
        }
    }
}

/// One vibronic line.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct VibronicLine {
    /// Ionization energy of the line, hartree: adiabatic + Σ v′_k ω′_k − Σ v_i ω_i.
    pub energy: f64,
    /// |⟨v|v′⟩|² (times the Boltzmann population p_v when thermal).
    pub intensity: f64,
    /// Excited ion modes (0-based) and their quanta, ascending by mode.
    pub quanta: Vec<(usize, u32)>,
    /// Excited neutral modes of the initial level (empty from v = 0).
    pub initial_quanta: Vec<(usize, u32)>,
}

/// The lines of one band and how complete they are.
#[derive(Debug, Clone, PartialEq)]
pub struct Progression {
    /// 0–0 energy (hartree) the lines were placed from.
    pub adiabatic: f64,
    /// Kept lines, ascending energy.
    pub lines: Vec<VibronicLine>,
    /// Intensity of every computed line (kept or not); 1 would be the whole band.
    pub captured_fraction: f64,
    /// Intensity of the kept lines.
    pub kept_fraction: f64,
    pub target_fraction: f64,
    pub target_reached: bool,
    /// Boltzmann population of the initial levels followed (1 from v = 0).
    pub initial_population: f64,
    /// Per ion mode, the quanta bound used from the neutral's lowest level.
    pub quanta_bounds: Vec<u32>,
    /// Highest class (simultaneously excited ion modes) computed.
    pub highest_class: usize,
    /// Overlaps evaluated (lattice points of all blocks): the work done.
    pub overlaps_evaluated: u64,
    pub notes: Vec<VibronicNote>,
}

struct Lines {
    kept: Vec<VibronicLine>,
    max: usize,
    floor: f64,
    dropped: f64,
}

impl Lines {
    fn push(&mut self, line: VibronicLine) {
        if line.intensity < self.floor {
            self.dropped += line.intensity;
            return;
        }
        self.kept.push(line);
        if self.kept.len() >= 2 * self.max {
            self.prune();
        }
    }
    fn prune(&mut self) {
        if self.kept.len() <= self.max {
            return;
        }
        self.kept
            .sort_by(|a, b| b.intensity.total_cmp(&a.intensity));
        self.dropped += self.kept[self.max..]
            .iter()
            .map(|l| l.intensity)
            .sum::<f64>();
        self.kept.truncate(self.max);
    }
}

/// Work state shared by all initial levels.
struct Run<'a> {
    co: FcCoefficients,
    dus: &'a Duschinsky,
    opt: &'a FcOptions,
    adiabatic: f64,
    lines: Lines,
    overlaps: u64,
    notes: Vec<VibronicNote>,
    highest_class: usize,
    stopped_by_work: bool,
}

impl Run<'_> {
    fn note(&mut self, n: VibronicNote) {
        if !self.notes.iter().any(|m| m.code() == n.code()) {
            self.notes.push(n);
        }
    }

    /// Evaluates one block and stores its interior lines; returns the interior intensity
    /// (population-weighted).
    fn block(&mut self, init: &[(usize, u32)], fin: &[(usize, u32)], pop: f64, e0: f64) -> f64 {
        let mut fin = fin.to_vec();
        let mut trimmed = false;
        while Block::size(init, &fin) > self.opt.max_block_points {
            let p = (0..fin.len()).max_by_key(|&p| fin[p].1).expect("non-empty");
            if fin[p].1 <= 1 {
                break;
            }
            fin[p].1 -= 1;
            trimmed = true;
        }
        if trimmed {
            self.note(VibronicNote::BlockTrimmed {
                modes: fin.len(),
                points: self.opt.max_block_points,
            });
        }
        let mut blk = Block::new(init, &fin);
        blk.evaluate(&self.co);
        self.overlaps += blk.values.len() as u64;
        let wf = &self.dus.final_frequencies;
        let mut total = 0.0;
        let floor = self.lines.floor;
        let mut new_lines = Vec::new();
        blk.for_each_interior(|w, val| {
            let inten = pop * val * val;
            total += inten;
            if inten >= floor {
                let quanta: Vec<(usize, u32)> =
                    fin.iter().zip(w).map(|(&(k, _), &q)| (k, q)).collect();
                let energy = e0 + quanta.iter().map(|&(k, q)| q as f64 * wf[k]).sum::<f64>();
                new_lines.push(VibronicLine {
                    energy,
                    intensity: inten,
                    quanta,
                    initial_quanta: init.to_vec(),
                });
            } else {
                // counted in `total`; not kept
            }
        });
        let kept: f64 = new_lines.iter().map(|l| l.intensity).sum();
        self.lines.dropped += total - kept;
        for l in new_lines {
            self.lines.push(l);
        }
        if self.overlaps > self.opt.max_overlaps {
            self.stopped_by_work = true;
        }
        total
    }

    /// All classes for one initial level; returns (captured intensity, quanta bounds).
    fn level(&mut self, init: &[(usize, u32)], pop: f64, target: f64) -> (f64, Vec<u32>) {
        let n = self.dus.n_modes();
        let wi = &self.dus.initial_frequencies;
        let e0 = self.adiabatic - init.iter().map(|&(i, q)| q as f64 * wi[i]).sum::<f64>();
        let goal = target * pop;
        // class 0
        let i0 = self.block(init, &[], pop, e0);
        let mut captured = i0;
        let cap = self.opt.max_quanta_per_mode.max(1);
        let mut bounds = vec![self.opt.min_quanta_per_mode.clamp(1, cap); n];
        if captured >= goal || self.stopped_by_work {
            return (captured, bounds);
        }
        // class 1: one block per mode up to the cap; per-mode bounds from the tails
        let mut single = vec![0.0; n];
        let mut progs: Vec<Vec<f64>> = Vec::with_capacity(n);
        self.highest_class = self.highest_class.max(1);
        for k in 0..n {
            let mut blk = Block::new(init, &[(k, cap)]);
            blk.evaluate(&self.co);
            self.overlaps += blk.values.len() as u64;
            let mut progression = vec![i0];
            blk.for_each_interior(|_, v| progression.push(pop * v * v));
            let sum: f64 = progression.iter().sum();
            let mut tail = 0.0;
            let mut nk = cap;
            for q in (1..=cap as usize).rev() {
                if tail + progression[q] > self.opt.mode_tail * sum {
                    break;
                }
                tail += progression[q];
                nk = q as u32 - 1;
            }
            if nk == cap {
                self.note(VibronicNote::QuantaCap { mode: k, cap });
            }
            bounds[k] = nk.max(bounds[k]).min(cap);
            progs.push(progression);
            // lines of this mode (all computed quanta)
            let s = self.block_lines_from(&blk, init, pop, e0);
            single[k] = s;
            captured += s;
            if captured >= goal || self.stopped_by_work {
                return (captured, bounds);
            }
        }
        // classes m ≥ 2
        let ratio: Vec<f64> = single
            .iter()
            .map(|&s| if i0 > 0.0 { s / i0 } else { s })
            .collect();
        let mut previous: HashMap<Vec<usize>, f64> = HashMap::new();
        for k in 0..n {
            previous.insert(vec![k], single[k]);
        }
        for m in 2..=self.opt.max_class.min(n) {
            // candidates with estimates
            let mut cands: Vec<(Vec<usize>, f64)> = Vec::new();
            if m == 2 {
                for k in 0..n {
                    for l in k + 1..n {
                        cands.push((vec![k, l], i0 * ratio[k] * ratio[l]));
                    }
                }
            } else {
                for (t, &st) in previous.iter() {
                    if st < self.opt.subset_threshold {
                        continue;
                    }
                    let last = *t.last().expect("non-empty");
                    for k in last + 1..n {
                        let mut s = t.clone();
                        s.push(k);
                        // every (m−1)-subset must be significant
                        let mut est = st * ratio[k];
                        let mut ok = true;
                        for drop in 0..m - 1 {
                            let sub: Vec<usize> = s
                                .iter()
                                .enumerate()
                                .filter(|&(p, _)| p != drop)
                                .map(|(_, &x)| x)
                                .collect();
                            match previous.get(&sub) {
                                Some(&v) if v >= self.opt.subset_threshold => {
                                    est = est.max(v * ratio[s[drop]]);
                                }
                                _ => {
                                    ok = false;
                                    break;
                                }
                            }
                        }
                        if ok {
                            cands.push((s, est));
                        }
                    }
                }
            }
            if cands.is_empty() {
                break;
            }
            cands.sort_by(|a, b| b.1.total_cmp(&a.1).then_with(|| a.0.cmp(&b.0)));
            if cands.len() > self.opt.max_combinations_per_class {
                let dropped = cands.len() - self.opt.max_combinations_per_class;
                cands.truncate(self.opt.max_combinations_per_class);
                self.note(VibronicNote::CombinationsDropped { class: m, dropped });
            }
            self.highest_class = self.highest_class.max(m);
            let mut current: HashMap<Vec<usize>, f64> = HashMap::new();
            for (s, est) in cands {
                // each mode's quanta: its own bound, cut further where the set's
                // estimated weight times the mode's one-mode tail fraction falls below
                // `tail_threshold` (pairs keep at least `min_quanta_per_mode`)
                let frac = if est > 0.0 {
                    (self.opt.tail_threshold / est).clamp(self.opt.mode_tail, 1.0)
                } else {
                    1.0
                };
                let least = if m == 2 {
                    self.opt.min_quanta_per_mode
                } else {
                    1
                };
                let fin: Vec<(usize, u32)> = s
                    .iter()
                    .map(|&k| {
                        (
                            k,
                            tail_bound(&progs[k], frac).max(least).clamp(1, bounds[k]),
                        )
                    })
                    .collect();
                let got = self.block(init, &fin, pop, e0);
                captured += got;
                current.insert(s, got);
                if captured >= goal || self.stopped_by_work {
                    return (captured, bounds);
                }
            }
            previous = current;
            if m == self.opt.max_class.min(n) && m < n {
                self.note(VibronicNote::ClassLimit { class: m });
            }
        }
        (captured, bounds)
    }

    /// Lines of an already evaluated one-mode block.
    fn block_lines_from(&mut self, blk: &Block, init: &[(usize, u32)], pop: f64, e0: f64) -> f64 {
        let wf = &self.dus.final_frequencies;
        let mut total = 0.0;
        let mut new_lines = Vec::new();
        let floor = self.lines.floor;
        blk.for_each_interior(|w, val| {
            let inten = pop * val * val;
            total += inten;
            if inten >= floor {
                let quanta: Vec<(usize, u32)> =
                    blk.fin.iter().zip(w).map(|(&(k, _), &q)| (k, q)).collect();
                let energy = e0 + quanta.iter().map(|&(k, q)| q as f64 * wf[k]).sum::<f64>();
                new_lines.push(VibronicLine {
                    energy,
                    intensity: inten,
                    quanta,
                    initial_quanta: init.to_vec(),
                });
            }
        });
        let kept: f64 = new_lines.iter().map(|l| l.intensity).sum();
        self.lines.dropped += total - kept;
        for l in new_lines {
            self.lines.push(l);
        }
        total
    }
}

/// Smallest n with Σ_{q>n} I(q) ≤ fraction × Σ_{q≥1} I(q) for a one-mode progression
/// I(0..=cap).
fn tail_bound(progression: &[f64], fraction: f64) -> u32 {
    let sum: f64 = progression[1..].iter().sum();
    let cap = progression.len() - 1;
    let mut tail = 0.0;
    let mut n = cap;
    for q in (1..=cap).rev() {
        if tail + progression[q] > fraction * sum {
            break;
        }
        tail += progression[q];
        n = q - 1;
    }
    n as u32
}

/// Thermally populated levels of the neutral: (excited modes with quanta, population),
/// most populated first; the ground level always included.
pub fn thermal_levels(
    frequencies: &[f64],
    thermal_energy: f64,
    min_population: f64,
    max_levels: usize,
) -> Vec<(Vec<(usize, u32)>, f64)> {
    let x: Vec<f64> = frequencies
        .iter()
        .map(|w| (-w / thermal_energy).exp())
        .collect();
    let p0: f64 = x.iter().map(|xi| 1.0 - xi).product();
    let mut out: Vec<(Vec<(usize, u32)>, f64)> = Vec::new();
    let hard_cap = max_levels.saturating_mul(64).max(1024);
    // depth-first over modes; p_v = p0 Π x_i^{v_i}
    fn walk(
        j: usize,
        x: &[f64],
        p: f64,
        floor: f64,
        cur: &mut Vec<(usize, u32)>,
        out: &mut Vec<(Vec<(usize, u32)>, f64)>,
        cap: usize,
    ) {
        if out.len() >= cap {
            return;
        }
        if j == x.len() {
            out.push((cur.clone(), p));
            return;
        }
        walk(j + 1, x, p, floor, cur, out, cap);
        let mut q = 1u32;
        let mut pq = p * x[j];
        while pq >= floor && out.len() < cap && q < 64 {
            cur.push((j, q));
            walk(j + 1, x, pq, floor, cur, out, cap);
            cur.pop();
            q += 1;
            pq *= x[j];
        }
    }
    let mut cur = Vec::new();
    walk(
        0,
        &x,
        p0,
        min_population.min(p0),
        &mut cur,
        &mut out,
        hard_cap,
    );
    out.sort_by(|a, b| b.1.total_cmp(&a.1));
    out.truncate(max_levels.max(1));
    out
}

/// Franck–Condon lines of one band. `adiabatic` is the 0–0 ionization energy (hartree,
/// electronic difference plus zero-point difference) the lines are placed from.
pub fn progression(dus: &Duschinsky, adiabatic: f64, opt: &FcOptions) -> Result<Progression> {
    dus.validate()?;
    if !(opt.target_fraction > 0.0 && opt.target_fraction <= 1.0) {
        return Err(crate::Error::input(format!(
            "target fraction {} is not in (0, 1]",
            opt.target_fraction
        )));
    }
    let mut notes = Vec::new();
    let defect = dus.orthogonality_defect();
    if defect > 1e-3 {
        notes.push(VibronicNote::NonOrthogonalDuschinsky { defect });
    }
    let mut run = Run {
        co: FcCoefficients::new(dus),
        dus,
        opt,
        adiabatic,
        lines: Lines {
            kept: Vec::new(),
            max: opt.max_lines.max(1),
            floor: opt.line_floor,
            dropped: 0.0,
        },
        overlaps: 0,
        notes,
        highest_class: 0,
        stopped_by_work: false,
    };
    let levels: Vec<(Vec<(usize, u32)>, f64)> = match opt.thermal_energy {
        Some(kt) if kt > 0.0 => thermal_levels(
            &dus.initial_frequencies,
            kt,
            opt.min_population,
            opt.max_initial_levels,
        ),
        _ => vec![(Vec::new(), 1.0)],
    };
    let population: f64 = levels.iter().map(|l| l.1).sum();
    if opt.thermal_energy.is_some() && population < 0.999 {
        run.note(VibronicNote::InitialPopulation {
            included: population,
            states: levels.len(),
        });
    }
    // per-level target so that the population-weighted total can reach the overall target
    let level_target = (opt.target_fraction / population).min(1.0 - 1e-12);
    let mut captured = 0.0;
    let mut quanta_bounds = Vec::new();
    for (idx, (init, pop)) in levels.iter().enumerate() {
        let (c, b) = run.level(init, *pop, level_target);
        captured += c;
        // the ground level is always the most populated, so it comes first
        if idx == 0 {
            quanta_bounds = b;
        }
        if run.stopped_by_work {
            break;
        }
    }
    if run.stopped_by_work {
        let o = run.overlaps;
        run.note(VibronicNote::WorkLimit { overlaps: o });
    }
    run.lines.prune();
    let dropped = run.lines.dropped;
    let mut lines = run.lines.kept;
    if dropped > 0.0 && lines.len() == opt.max_lines {
        run.notes.push(VibronicNote::LinesDropped {
            kept: lines.len(),
            dropped_intensity: dropped,
        });
    }
    lines.sort_by(|a, b| a.energy.total_cmp(&b.energy));
    let kept_fraction = lines.iter().map(|l| l.intensity).sum();
    let target_reached = captured >= opt.target_fraction * (1.0 - 1e-12);
    if !target_reached {
        run.notes.push(VibronicNote::TargetNotReached {
            captured,
            target: opt.target_fraction,
        });
    }
    Ok(Progression {
        adiabatic,
        lines,
        captured_fraction: captured,
        kept_fraction,
        target_fraction: opt.target_fraction,
        target_reached,
        initial_population: population,
        quanta_bounds,
        highest_class: run.highest_class,
        overlaps_evaluated: run.overlaps,
        notes: run.notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rotation_mixing(n: usize, pairs: &[(usize, usize, f64)]) -> Vec<Vec<f64>> {
        let mut j: Vec<Vec<f64>> = (0..n)
            .map(|a| (0..n).map(|b| if a == b { 1.0 } else { 0.0 }).collect())
            .collect();
        for &(p, q, th) in pairs {
            let (s, c) = f64::sin_cos(th);
            for row in j.iter_mut() {
                let (x, y) = (row[p], row[q]);
                row[p] = c * x - s * y;
                row[q] = s * x + c * y;
            }
        }
        j
    }

    #[test]
    fn sum_rule_holds_for_a_converged_three_mode_duschinsky_case() {
        // Exact condition: Σ_v′ |⟨0|v′⟩|² = 1 (completeness) for an orthogonal J.
        let d = Duschinsky {
            j: rotation_mixing(3, &[(0, 1, 0.3), (1, 2, -0.2), (0, 2, 0.15)]),
            k: vec![12.0, -7.0, 4.0],
            initial_frequencies: vec![0.004, 0.007, 0.015],
            final_frequencies: vec![0.0035, 0.0075, 0.013],
        };
        let opt = FcOptions {
            target_fraction: 1.0,
            max_quanta_per_mode: 40,
            mode_tail: 1e-12,
            subset_threshold: 0.0,
            tail_threshold: 0.0,
            line_floor: 0.0,
            ..FcOptions::default()
        };
        let p = progression(&d, 0.5, &opt).unwrap();
        assert!(
            (p.captured_fraction - 1.0).abs() < 1e-8,
            "sum {}",
            p.captured_fraction
        );
        assert!((p.kept_fraction - p.captured_fraction).abs() < 1e-12);
        assert_eq!(p.highest_class, 3);
        // lines sorted by energy, 0–0 at the adiabatic energy
        assert!(p.lines.windows(2).all(|w| w[0].energy <= w[1].energy));
        assert_eq!(p.lines[0].energy, 0.5);
        assert!(p.lines[0].quanta.is_empty());
    }

    #[test]
    fn stops_at_the_target_and_says_when_it_is_not_reached() {
        let d = Duschinsky::parallel(vec![0.01, 0.012], vec![0.01, 0.012], vec![20.0, 15.0]);
        let p = progression(&d, 0.0, &FcOptions::default()).unwrap();
        assert!(p.target_reached && p.captured_fraction >= 0.95);
        assert!(p.notes.iter().all(|n| n.code() != "fc-target-not-reached"));
        // with a very low quanta cap the target cannot be reached: must be said
        let opt = FcOptions {
            max_quanta_per_mode: 1,
            min_quanta_per_mode: 1,
            ..FcOptions::default()
        };
        let p = progression(&d, 0.0, &opt).unwrap();
        assert!(!p.target_reached);
        assert!(p.notes.iter().any(|n| n.code() == "fc-target-not-reached"));
        assert!(p.notes.iter().any(|n| n.code() == "fc-quanta-cap"));
    }

    #[test]
    fn thermal_sum_rule_and_hot_band_positions() {
        // Exact condition: each initial level's progression sums to 1, so the captured
        // fraction of a converged thermal run equals the followed population; a hot line
        // from v_i = 1 lies ω_i below the adiabatic energy when it ends in the ion's 0′.
        let d = Duschinsky {
            j: rotation_mixing(2, &[(0, 1, 0.25)]),
            k: vec![6.0, -3.0],
            initial_frequencies: vec![0.0015, 0.006],
            final_frequencies: vec![0.0013, 0.0065],
        };
        let opt = FcOptions {
            target_fraction: 1.0,
            mode_tail: 1e-13,
            subset_threshold: 0.0,
            tail_threshold: 0.0,
            line_floor: 0.0,
            thermal_energy: Some(0.00095), // about 300 K
            min_population: 1e-4,
            ..FcOptions::default()
        };
        let p = progression(&d, 0.3, &opt).unwrap();
        assert!(p.initial_population > 0.99 && p.initial_population < 1.0);
        assert!(
            (p.captured_fraction - p.initial_population).abs() < 1e-8,
            "{} vs {}",
            p.captured_fraction,
            p.initial_population
        );
        let hot = p
            .lines
            .iter()
            .find(|l| l.initial_quanta == vec![(0, 1)] && l.quanta.is_empty())
            .unwrap();
        assert!((hot.energy - (0.3 - 0.0015)).abs() < 1e-15);
    }

    /// Modified Bessel function I_n(x) by its power series (converges for every x).
    fn bessel_i(n: u32, x: f64) -> f64 {
        let h = 0.5 * x;
        let mut term = h.powi(n as i32) / (1..=n).map(|k| k as f64).product::<f64>();
        let mut sum = term;
        for k in 1..200 {
            term *= h * h / (k as f64 * (k + n) as f64);
            sum += term;
            if term < 1e-17 * sum {
                break;
            }
        }
        sum
    }

    #[test]
    fn thermal_displaced_oscillator_matches_the_closed_form() {
        // Exact: a displaced oscillator (same frequency ω, Huang–Rhys S) with the initial
        // state's levels in a Boltzmann distribution, n̄ = 1/(e^{ω/kT} − 1), has the line at
        // adiabatic + pω (p = v′ − v, either sign) with intensity
        //   I_p = exp(−S(2n̄+1)) ((n̄+1)/n̄)^{p/2} I_|p|(2S √(n̄(n̄+1)))
        // (the thermally averaged Poisson law, Lax 1952; Huang & Rhys 1950). Summed over
        // the lines of equal p the computed sticks must reproduce it.
        let w = 0.004f64; // ≈ 880 cm⁻¹
        let s = 1.3f64;
        let kt = 0.005f64; // ≈ 1600 K: several hot levels
        let kk = (2.0 * s / w).sqrt();
        let d = Duschinsky::parallel(vec![w], vec![w], vec![kk]);
        let opt = FcOptions {
            target_fraction: 1.0,
            mode_tail: 1e-14,
            line_floor: 0.0,
            thermal_energy: Some(kt),
            min_population: 1e-12,
            max_initial_levels: 200,
            ..FcOptions::default()
        };
        let p = progression(&d, 0.3, &opt).unwrap();
        assert!(p.initial_population > 1.0 - 1e-10);
        let nbar = 1.0 / ((w / kt).exp() - 1.0);
        let closed = |q: i32| -> f64 {
            (-s * (2.0 * nbar + 1.0)).exp()
                * ((nbar + 1.0) / nbar).powf(q as f64 / 2.0)
                * bessel_i(q.unsigned_abs(), 2.0 * s * (nbar * (nbar + 1.0)).sqrt())
        };
        let mut checked = 0;
        for q in -6..=10i32 {
            let computed: f64 = p
                .lines
                .iter()
                .filter(|l| ((l.energy - 0.3) / w - q as f64).abs() < 1e-6)
                .map(|l| l.intensity)
                .sum();
            let exact = closed(q);
            assert!(
                (computed - exact).abs() < 1e-9 + 1e-7 * exact,
                "p = {q}: {computed:.10} vs {exact:.10}"
            );
            checked += 1;
        }
        assert_eq!(checked, 17);
        // hot lines exist below the 0–0, and the 1 → 0′ to 0 → 0′ ratio is the Boltzmann
        // factor times |⟨1|0′⟩|²/|⟨0|0′⟩|² = S (Poisson): e^{−ω/kT} S
        let line = |v: u32, vp: u32| {
            p.lines
                .iter()
                .find(|l| {
                    l.initial_quanta.iter().map(|x| x.1).sum::<u32>() == v
                        && l.quanta.iter().map(|x| x.1).sum::<u32>() == vp
                })
                .unwrap()
        };
        let hot = line(1, 0);
        assert!(hot.energy < 0.3);
        let r = hot.intensity / line(0, 0).intensity;
        assert!((r - (-w / kt).exp() * s).abs() < 1e-12, "ratio {r}");
    }

    #[test]
    fn thermal_levels_follow_the_boltzmann_law() {
        // p_v = Π (1 − x_i) x_i^{v_i}, x_i = exp(−ω_i/kT) (statistical mechanics).
        let lv = thermal_levels(&[0.001, 0.002], 0.001, 1e-6, 1000);
        let x1 = (-1.0f64).exp();
        let x2 = (-2.0f64).exp();
        let p0 = (1.0 - x1) * (1.0 - x2);
        assert!(lv[0].0.is_empty() && (lv[0].1 - p0).abs() < 1e-15);
        let one = lv.iter().find(|l| l.0 == vec![(0, 1)]).unwrap();
        assert!((one.1 - p0 * x1).abs() < 1e-15);
        let total: f64 = lv.iter().map(|l| l.1).sum();
        assert!(total > 0.9999 && total <= 1.0);
    }

    #[test]
    fn line_storage_is_bounded_and_keeps_the_strongest() {
        let d = Duschinsky::parallel(
            vec![0.005, 0.006, 0.007],
            vec![0.005, 0.006, 0.007],
            vec![30.0, 25.0, 20.0],
        );
        let opt = FcOptions {
            max_lines: 20,
            target_fraction: 0.999,
            ..FcOptions::default()
        };
        let p = progression(&d, 0.0, &opt).unwrap();
        assert_eq!(p.lines.len(), 20);
        assert!(p.captured_fraction >= 0.999);
        assert!(p.kept_fraction < p.captured_fraction);
        assert!(p.notes.iter().any(|n| n.code() == "fc-lines-dropped"));
        // the kept ones are the strongest: every kept line ≥ every dropped line; check
        // against the exact product-Poisson intensities
        let s: Vec<f64> = d.huang_rhys();
        let poisson = |k: usize, n: u32| -> f64 {
            (-s[k]).exp() * s[k].powi(n as i32) / (1..=n).map(|x| x as f64).product::<f64>()
        };
        let weakest_kept = p.lines.iter().map(|l| l.intensity).fold(f64::MAX, f64::min);
        let mut stronger = 0;
        for a in 0..12u32 {
            for b in 0..12u32 {
                for c in 0..12u32 {
                    let i = poisson(0, a) * poisson(1, b) * poisson(2, c);
                    if i > weakest_kept * (1.0 + 1e-9) {
                        stronger += 1;
                    }
                }
            }
        }
        assert!(
            stronger <= 20,
            "{stronger} exact lines are stronger than the weakest kept"
        );
    }
}
