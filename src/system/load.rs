//! The one-minute load average of the machine (Linux `/proc/loadavg`), printed beside
//! benchmark timings on a shared machine; None where it cannot be read.

/// One-minute load average, when the system reports it.
pub fn load_average() -> Option<f64> {
    let text = std::fs::read_to_string("/proc/loadavg").ok()?;
    text.split_whitespace().next()?.parse().ok()
}
