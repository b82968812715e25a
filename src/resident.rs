//! Keeping the resident set close to the live heap. glibc raises its mmap threshold
//! each time a large block is freed (up to 32 MiB), so after the first archive entry is
//! released, later large buffers (entries, item and evidence lists) come from the heap,
//! where freed space stays resident. [`release_large_blocks`] fixes the threshold at
//! glibc's default of 128 KiB, so every large buffer lives in a mapping of its own that
//! goes back to the system when freed (large archive: peak resident memory 161 MB →
//! 118 MB at the same speed; docs/performance.md). Programs call it once at start (the
//! `telltale` binary and the large-archive bench do); elsewhere it does nothing.
//! [`trim`] hands back the free pages between small blocks; a scan calls it around
//! evidence gathering, when many small blocks have just been freed.

/// Fix malloc's mmap threshold (glibc only; a no-op on other C libraries).
#[cfg(all(target_os = "linux", target_env = "gnu"))]
pub fn release_large_blocks() {
    // SAFETY: mallopt only changes a malloc tuning parameter and is safe to call at any
    // time; it takes effect for later allocations.
    unsafe {
        libc::mallopt(libc::M_MMAP_THRESHOLD, 128 * 1024);
    }
}

/// Fix malloc's mmap threshold (glibc only; a no-op on other C libraries).
#[cfg(not(all(target_os = "linux", target_env = "gnu")))]
pub fn release_large_blocks() {}

/// Give back to the system the free pages inside malloc's heaps (glibc only; a no-op
/// elsewhere). Between the phases of a scan many small blocks are freed at once (the
/// import's key map, the evidence pieces of each thread); their pages stay resident
/// until malloc is asked to return them.
#[cfg(all(target_os = "linux", target_env = "gnu"))]
pub fn trim() {
    // SAFETY: malloc_trim only returns free memory to the system; it may be called at
    // any time from any thread.
    unsafe {
        libc::malloc_trim(0);
    }
}

/// Give back free heap pages (glibc only; a no-op on other C libraries).
#[cfg(not(all(target_os = "linux", target_env = "gnu")))]
pub fn trim() {}
