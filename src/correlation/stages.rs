//! Wall time, CPU time and peak memory of each stage of a correlated calculation, for the
//! run report and `bandcast bench eom` (measurement only, nothing here changes a result).
//!
//! CPU seconds are the process's user + system time (all threads); the peak is the
//! resident-set high-water mark VmHWM (Linux). With `reset_peak` the mark is reset at the
//! start of every stage (writing 5 to /proc/self/clear_refs), so each stage reports its own
//! peak; otherwise each figure is the peak of the process so far.

use std::time::Instant;

use crate::system::{peak_memory_mib, process_cpu_seconds as cpu_seconds, reset_peak_memory};

#[derive(Debug, Clone)]
pub struct StageRecord {
    pub name: String,
    pub wall_seconds: f64,
    pub cpu_seconds: Option<f64>,
    pub peak_mib: Option<f64>,
}

#[derive(Debug)]
pub struct StageClock {
    start: Instant,
    cpu0: Option<f64>,
    reset_peak: bool,
    pub records: Vec<StageRecord>,
}

impl StageClock {
    pub fn new(reset_peak: bool) -> Self {
        if reset_peak {
            let _ = reset_peak_memory();
        }
        StageClock {
            start: Instant::now(),
            cpu0: cpu_seconds(),
            reset_peak,
            records: Vec::new(),
        }
    }

    /// Close the running stage under `name` and start the next one.
    pub fn finish(&mut self, name: &str) -> &StageRecord {
        let cpu = cpu_seconds();
        self.records.push(StageRecord {
            name: name.to_string(),
            wall_seconds: self.start.elapsed().as_secs_f64(),
            cpu_seconds: match (self.cpu0, cpu) {
                (Some(a), Some(b)) => Some(b - a),
                _ => None,
            },
            peak_mib: peak_memory_mib(),
        });
        if self.reset_peak {
            let _ = reset_peak_memory();
        }
        self.start = Instant::now();
        self.cpu0 = cpu_seconds();
        self.records.last().unwrap()
    }

    /// Wall seconds of the stages whose names start with `prefix`.
    pub fn seconds(&self, prefix: &str) -> f64 {
        self.records
            .iter()
            .filter(|r| r.name.starts_with(prefix))
            .map(|r| r.wall_seconds)
            .sum()
    }
}

impl StageRecord {
    /// "name 12.3 s (20.1 CPU-s, peak 812 MiB)".
    pub fn describe(&self) -> String {
        let cpu = self
            .cpu_seconds
            .map(|c| format!("{c:.1} CPU-s"))
            .unwrap_or_else(|| "CPU-s n/a".into());
        let peak = self
            .peak_mib
            .map(|p| format!("peak {p:.0} MiB"))
            .unwrap_or_else(|| "peak n/a".into());
        format!("{} {:.1} s ({cpu}, {peak})", self.name, self.wall_seconds)
    }
}
