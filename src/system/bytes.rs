//! Memory sizes in words a user reads: GiB (2^30 bytes) from 0.1 GiB up, MiB (2^20 bytes)
//! below, so a small estimate never prints as "0.00 GiB".

/// `bytes` as "1.25 GiB" or, below 0.1 GiB, "37.5 MiB".
pub fn format_bytes(bytes: f64) -> String {
    const GIB: f64 = (1u64 << 30) as f64;
    const MIB: f64 = (1u64 << 20) as f64;
    if bytes >= 0.1 * GIB {
        format!("{:.2} GiB", bytes / GIB)
    } else {
        format!("{:.1} MiB", bytes / MIB)
    }
}

#[cfg(test)]
mod tests {
    use super::format_bytes;

    #[test]
    fn small_sizes_are_in_mib_large_in_gib() {
        // 2^30 bytes = 1 GiB, 2^20 bytes = 1 MiB (IEC binary prefixes, common practice).
        assert_eq!(format_bytes((1u64 << 30) as f64), "1.00 GiB");
        assert_eq!(format_bytes(3.0 * (1u64 << 20) as f64), "3.0 MiB");
        assert_eq!(format_bytes(0.0), "0.0 MiB");
        assert!(format_bytes(0.5 * (1u64 << 30) as f64).ends_with("GiB"));
    }
}
