//! The `telltale` binary: a thin shell over the library. Parses the command line,
//! runs the command (or the explorer, in `tui`), and turns errors into a message and
//! an exit code.

mod cli;
mod tui;

fn main() -> std::process::ExitCode {
    return_large_blocks();
    cli::main()
}

/// glibc raises its mmap threshold each time a large block is freed (up to 32 MiB), so
/// after the first archive entry is released, later large buffers (entries, item and
/// evidence lists) come from the heap, where freed space stays resident. Fixing the
/// threshold at glibc's default of 128 KiB keeps every large buffer in a mapping of its
/// own that goes back to the system when freed (large archive: peak resident memory
/// 161 MB → 118 MB; docs/performance.md).
#[cfg(all(target_os = "linux", target_env = "gnu"))]
fn return_large_blocks() {
    // SAFETY: mallopt only changes a malloc tuning parameter; it is called before any
    // other thread exists.
    unsafe {
        libc::mallopt(libc::M_MMAP_THRESHOLD, 128 * 1024);
    }
}

#[cfg(not(all(target_os = "linux", target_env = "gnu")))]
fn return_large_blocks() {}
