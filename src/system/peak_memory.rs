//! Resident memory of this process from /proc/self/status (Linux; None elsewhere): the
//! high-water mark VmHWM, the current VmRSS, and resetting the mark.

fn status_mib(field: &str) -> Option<f64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with(field))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

/// Peak resident set size (VmHWM), MiB.
pub fn peak_memory_mib() -> Option<f64> {
    status_mib("VmHWM:")
}

/// Current resident set size (VmRSS), MiB.
pub fn resident_memory_mib() -> Option<f64> {
    status_mib("VmRSS:")
}

/// Reset the peak resident set size to the current one ("5" to /proc/self/clear_refs), so
/// that the next `peak_memory_mib` covers what follows. False when that is not possible.
pub fn reset_peak_memory() -> bool {
    std::fs::write("/proc/self/clear_refs", "5").is_ok()
}
