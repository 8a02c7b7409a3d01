//! Keep freed memory in the process instead of handing it back to the kernel at once.
//!
//! The coupled-cluster iterations allocate and free arrays of tens of megabytes many times
//! per iteration. With the C library's defaults (glibc: blocks above 128 KiB, rising
//! adaptively, come from their own mappings, and the top of the heap is trimmed past
//! 128 KiB) every such array is fresh memory, and the kernel zero-fills it page by page
//! on first touch. Measured on the ethanol C 1s ΔCCSD(T) (cc-pCVTZ/cc-pVTZ, `--fno 99.5`,
//! 2 cores, 4 December 2026): the ion's CCSD iteration took 11.9 s with the defaults and
//! 7.5 s with blocks up to 32 MiB served from the heap and no trimming; 26 million page
//! faults in the run before.
//!
//! Only the command-line program sets this (from `main`), on Linux with glibc; the library
//! (and the Python package inside another process) leaves the host's allocator alone. It
//! changes no computed number; the peak memory stays the peak of what is in use, and memory
//! freed after the peak stays with the process until it exits.

/// Ask the C library to serve blocks up to 32 MiB from the heap and never to trim it.
pub fn keep_freed_memory() {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        extern "C" {
            fn mallopt(param: i32, value: i32) -> i32;
        }
        // <malloc.h>: M_TRIM_THRESHOLD = -1, M_MMAP_THRESHOLD = -3; 32 MiB is glibc's
        // largest accepted mapping threshold on 64-bit systems
        const M_TRIM_THRESHOLD: i32 = -1;
        const M_MMAP_THRESHOLD: i32 = -3;
        // SAFETY: mallopt only changes allocator parameters; called before any thread starts.
        unsafe {
            mallopt(M_MMAP_THRESHOLD, 32 << 20);
            mallopt(M_TRIM_THRESHOLD, i32::MAX);
        }
    }
}
