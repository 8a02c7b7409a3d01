//! Memory sizes in words a user reads, always in GiB (2^30 bytes), the unit of `--memory`:
//! two decimals from 0.1 GiB up, three significant digits below, so a small size never
//! prints as "0.00 GiB".

/// `bytes` as "1.25 GiB" or, below 0.1 GiB, "0.0375 GiB" (messages and refusals).
pub fn format_bytes(bytes: f64) -> String {
    const GIB: f64 = (1u64 << 30) as f64;
    if bytes >= 0.1 * GIB {
        format!("{:.2} GiB", bytes / GIB)
    } else {
        format_gib(bytes)
    }
}

/// `bytes` in GiB (2^30 bytes) with three significant digits, however small ("0.000123
/// GiB"): the one unit of the `--verbose` memory estimates of every command.
pub fn format_gib(bytes: f64) -> String {
    const GIB: f64 = (1u64 << 30) as f64;
    let g = bytes / GIB;
    if !(g > 0.0) || !g.is_finite() {
        return format!("{g:.2} GiB");
    }
    let digits = (2 - g.log10().floor() as i32).clamp(2, 12) as usize;
    format!("{g:.digits$} GiB")
}

#[cfg(test)]
mod tests {
    use super::{format_bytes, format_gib};

    #[test]
    fn gib_keeps_three_significant_digits() {
        // 2^30 bytes = 1 GiB (IEC binary prefix, common practice)
        assert_eq!(format_gib((1u64 << 30) as f64), "1.00 GiB");
        assert_eq!(format_gib(123.0 * (1u64 << 30) as f64), "123.00 GiB");
        assert_eq!(format_gib(0.000123 * (1u64 << 30) as f64), "0.000123 GiB");
        assert_eq!(format_gib(0.0), "0.00 GiB");
    }

    #[test]
    fn messages_are_in_gib_at_every_size() {
        // 2^30 bytes = 1 GiB, 2^20 bytes = 1/1024 GiB (IEC binary prefixes, common practice).
        assert_eq!(format_bytes((1u64 << 30) as f64), "1.00 GiB");
        assert_eq!(format_bytes(0.5 * (1u64 << 30) as f64), "0.50 GiB");
        assert_eq!(format_bytes(3.0 * (1u64 << 20) as f64), "0.00293 GiB");
        assert_eq!(format_bytes(0.0), "0.00 GiB");
    }
}
