//! The server's allocator settings hand freed memory back to the system.
//! Its own test binary: the process's resident size is measured around the
//! frees, so no other test may allocate at the same time.

use lategame::web::memory::{release_free_memory, resident_mib, tune_allocator};

#[test]
fn freed_memory_goes_back_to_the_system() {
    // Only where the allocator is glibc's and /proc is there.
    if !cfg!(all(target_os = "linux", target_env = "gnu")) || resident_mib().is_none() {
        return;
    }
    assert!(tune_allocator());
    // Blocks below the mapping threshold (so on the heaps), every other
    // one freed: the free ones sit between live ones, so only trimming
    // gives their pages back.
    let mut blocks: Vec<Vec<u8>> = (0..8_000).map(|k| vec![(k % 255 + 1) as u8; 16 << 10]).collect();
    let (with, _) = resident_mib().expect("status");
    for b in blocks.iter_mut().step_by(2) {
        *b = Vec::new();
    }
    assert!(release_free_memory(), "nothing was handed back");
    let (after, _) = resident_mib().expect("status");
    assert!(after < with - 40.0, "{with:.0} MiB with the blocks, {after:.0} MiB after freeing half of them (62 MiB)");
    assert_eq!(blocks.iter().map(|b| b.len()).sum::<usize>(), 4_000 * (16 << 10));
}
