//! CPU time (user + system) from /proc (Linux; None elsewhere). Lets a benchmark on a shared
//! machine report work per CPU-second.

/// utime + stime in seconds from the text of a /proc/…/stat file (clock ticks assumed 100
/// per second, the Linux default USER_HZ).
fn stat_cpu_seconds(path: &str) -> Option<f64> {
    let text = std::fs::read_to_string(path).ok()?;
    // fields after the parenthesised command name; utime and stime are fields 14 and 15
    let rest = &text[text.rfind(')')? + 2..];
    let f: Vec<&str> = rest.split_whitespace().collect();
    let ticks: f64 = f.get(11)?.parse::<f64>().ok()? + f.get(12)?.parse::<f64>().ok()?;
    Some(ticks / 100.0)
}

/// CPU time of the whole process so far (all threads), seconds.
pub fn process_cpu_seconds() -> Option<f64> {
    stat_cpu_seconds("/proc/self/stat")
}

/// CPU time of the calling thread so far, seconds.
pub fn thread_cpu_seconds() -> Option<f64> {
    stat_cpu_seconds("/proc/thread-self/stat")
}
