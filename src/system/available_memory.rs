//! Memory of the machine from /proc/meminfo (Linux): what is available now, and the
//! default memory budget of every command (`--memory` when not given).

/// Memory available to this process: `MemAvailable` from /proc/meminfo (Linux), or 4 GiB
/// when it cannot be read.
pub fn available_bytes() -> f64 {
    if let Ok(s) = std::fs::read_to_string("/proc/meminfo") {
        for line in s.lines() {
            if let Some(rest) = line.strip_prefix("MemAvailable:") {
                if let Some(kb) = rest
                    .split_whitespace()
                    .next()
                    .and_then(|x| x.parse::<f64>().ok())
                {
                    return kb * 1024.0;
                }
            }
        }
    }
    4.0 * 1024.0 * 1024.0 * 1024.0
}

/// The default memory budget for stored two-electron integrals (in-core ERIs, the
/// density-fitting tensor): half of the physical memory, but no more than three quarters of
/// the memory available when the program starts (Linux /proc/meminfo: MemTotal,
/// MemAvailable); 4 GiB where that file cannot be read. Read once per process.
pub fn default_memory_budget() -> usize {
    static BUDGET: std::sync::OnceLock<usize> = std::sync::OnceLock::new();
    *BUDGET.get_or_init(|| {
        std::fs::read_to_string("/proc/meminfo")
            .ok()
            .and_then(|s| memory_budget_from_meminfo(&s))
            .unwrap_or(4 << 30)
    })
}

/// The rule of `default_memory_budget` applied to the text of /proc/meminfo.
pub fn memory_budget_from_meminfo(text: &str) -> Option<usize> {
    let field = |name: &str| -> Option<usize> {
        let line = text.lines().find(|l| l.starts_with(name))?;
        let kb: usize = line.split_whitespace().nth(1)?.parse().ok()?;
        Some(kb * 1024)
    };
    let total = field("MemTotal:")?;
    let avail = field("MemAvailable:").unwrap_or(total);
    Some((total / 2).min(avail / 4 * 3))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn regression_budget_is_half_the_memory_or_three_quarters_of_what_is_free() {
        let text = "MemTotal:       16000000 kB\nMemFree:  1000 kB\nMemAvailable:   12000000 kB\n";
        assert_eq!(memory_budget_from_meminfo(text), Some(8_000_000 * 1024));
        let busy = "MemTotal:       16000000 kB\nMemAvailable:    4000000 kB\n";
        assert_eq!(memory_budget_from_meminfo(busy), Some(3_000_000 * 1024));
        assert_eq!(memory_budget_from_meminfo("nothing"), None);
    }
}
