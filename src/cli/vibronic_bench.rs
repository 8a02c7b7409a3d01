//! `bandcast bench franck-condon`: the Franck–Condon line generation on seeded random
//! Duschinsky relations (library: `bandcast::vibronic::bench`).

use bandcast::vibronic::bench::run;
use bandcast::vibronic::FcOptions;
use bandcast::{Error, Result};

#[derive(clap::Args, Debug)]
pub struct BenchArgs {
    /// Number of vibrational modes of each seeded relation.
    #[arg(long, default_value_t = 30, value_name = "N")]
    pub modes: usize,
    /// Seeds of the random relations, one run each.
    #[arg(long, value_delimiter = ',', default_values_t = vec![1u64, 2, 3, 7], value_name = "S,S,…")]
    pub seeds: Vec<u64>,
    /// Fraction of the band's intensity to capture.
    #[arg(long, default_value_t = 0.95, value_name = "F")]
    pub target: f64,
    /// Most lines kept per band.
    #[arg(long, default_value_t = 50_000, value_name = "N")]
    pub max_lines: usize,
    /// Screening threshold: a combination of excited modes opens larger ones only when its
    /// lines hold at least this intensity (band total 1).
    #[arg(long, value_name = "I")]
    pub subset_threshold: Option<f64>,
    /// Work bound: most recursion steps per band.
    #[arg(long, value_name = "N")]
    pub max_overlaps: Option<u64>,
    /// Print one JSON document instead of a table.
    #[arg(long)]
    pub json: bool,
}

pub fn bench(a: BenchArgs) -> Result<()> {
    if a.modes == 0 || !(a.target > 0.0 && a.target <= 1.0) {
        return Err(Error::input("--modes must be ≥ 1 and --target in (0, 1]"));
    }
    let mut opt = FcOptions {
        target_fraction: a.target,
        max_lines: a.max_lines,
        ..FcOptions::default()
    };
    if let Some(t) = a.subset_threshold {
        opt.subset_threshold = t;
    }
    if let Some(m) = a.max_overlaps {
        opt.max_overlaps = m;
    }
    let rows = run(a.modes, &a.seeds, &opt)?;
    if a.json {
        println!(
            "{}",
            serde_json::to_string_pretty(&rows).map_err(|e| Error::computation(e.to_string()))?
        );
        return Ok(());
    }
    println!(
        "Franck–Condon lines from v = 0, {} modes, seeded random Duschinsky relations \
         (one thread; wall time)",
        a.modes
    );
    println!(
        "{:>6} {:>8} {:>9} {:>7} {:>8} {:>6} {:>12} {:>9}  notes",
        "seed", "ΣS", "captured", "target", "lines", "class", "overlaps", "wall s"
    );
    for r in rows {
        println!(
            "{:>6} {:>8.2} {:>9.4} {:>7} {:>8} {:>6} {:>12} {:>9.2}  {}",
            r.seed,
            r.total_huang_rhys,
            r.captured_fraction,
            if r.target_reached { "yes" } else { "no" },
            r.lines_kept,
            r.highest_class,
            r.overlaps_evaluated,
            r.wall_seconds,
            r.notes.join(",")
        );
    }
    Ok(())
}
