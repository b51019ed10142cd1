//! How the server's process uses the C allocator (glibc on Linux): large
//! blocks straight from and back to the system, two heaps for all threads,
//! and the free pages handed back once start-up is done. Measured on the
//! 25-season league (README, Performance): without this, blocks freed by
//! the load and by requests on many threads stay in the process, and the
//! resident size grows well past what is live. Elsewhere these do nothing.

/// Blocks at least this large are mapped from the system and returned to it
/// when freed (a fixed value also stops glibc from raising the threshold
/// after the load's large frees, which keeps later blocks on its heaps).
pub const MMAP_THRESHOLD: i32 = 256 << 10;

/// Heaps (arenas) shared by all threads: the blocking pool's threads then
/// reuse freed blocks rather than each keeping its own.
pub const ARENAS: i32 = 2;

#[cfg(all(target_os = "linux", target_env = "gnu"))]
mod glibc {
    // From glibc's <malloc.h>.
    pub const M_MMAP_THRESHOLD: i32 = -3;
    pub const M_ARENA_MAX: i32 = -8;
    extern "C" {
        pub fn mallopt(param: i32, value: i32) -> i32;
        pub fn malloc_trim(pad: usize) -> i32;
    }
}

/// Set the allocator up for a long-running server: call once, before the
/// league is loaded (the load's large temporary blocks then go back to the
/// system when freed). True when the settings took.
pub fn tune_allocator() -> bool {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        // SAFETY: mallopt only changes the allocator's parameters; glibc
        // documents it as safe to call at any time, from any thread.
        let ok = unsafe { glibc::mallopt(glibc::M_MMAP_THRESHOLD, MMAP_THRESHOLD) == 1 && glibc::mallopt(glibc::M_ARENA_MAX, ARENAS) == 1 };
        tracing::debug!(ok, "allocator: blocks of {} KiB and more mapped, {ARENAS} arenas", MMAP_THRESHOLD >> 10);
        ok
    }
    #[cfg(not(all(target_os = "linux", target_env = "gnu")))]
    {
        false
    }
}

/// Hand the allocator's free pages back to the system (after start-up and
/// after a reload, when the load's buffers are gone). True when some were.
pub fn release_free_memory() -> bool {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        // SAFETY: malloc_trim only returns free memory to the system; it
        // takes the allocator's own locks and touches no live block.
        unsafe { glibc::malloc_trim(0) == 1 }
    }
    #[cfg(not(all(target_os = "linux", target_env = "gnu")))]
    {
        false
    }
}

/// Resident and peak resident size of this process in MiB, from
/// `/proc/self/status` (`None` where there is none).
pub fn resident_mib() -> Option<(f64, f64)> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let field = |name: &str| -> Option<f64> { s.lines().find(|l| l.starts_with(name))?.split_whitespace().nth(1)?.parse::<f64>().ok().map(|kb| kb / 1024.0) };
    Some((field("VmRSS:")?, field("VmHWM:")?))
}
