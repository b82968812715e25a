//! Getting the terminal into full-screen raw mode and always back out of it: on a
//! normal exit and on an error (the guard's drop), on a panic (ratatui's panic hook
//! restores before the message prints), and on SIGTERM, SIGINT and SIGHUP (a flag
//! the event loop checks, so it leaves through the same path and saves first). A
//! terminal that went away (closed window, dropped connection) is noticed by
//! [`wait_input`], so the loop leaves the same way.

use std::io::{self, IsTerminal};
use std::sync::Arc;
use std::sync::atomic::AtomicBool;
use std::time::Duration;

use ratatui::DefaultTerminal;

/// Whether standard input and output are both a terminal.
pub fn interactive() -> bool {
    io::stdin().is_terminal() && io::stdout().is_terminal()
}

/// Restores the terminal when dropped.
pub struct Guard {
    pub terminal: DefaultTerminal,
}

impl Guard {
    /// Enter raw mode and the alternate screen; installs the panic hook.
    pub fn enter() -> io::Result<Guard> {
        let terminal = ratatui::try_init()?;
        Ok(Guard { terminal })
    }
}

impl Drop for Guard {
    fn drop(&mut self) {
        // Errors ignored: the terminal may be gone (`restore` would print to it).
        let _ = ratatui::try_restore();
    }
}

/// What the terminal has for the event loop.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Input {
    /// Something to read (or a signal interrupted the wait).
    Ready,
    /// Nothing within the wait.
    Idle,
    /// The terminal hung up or failed: leave.
    Gone,
}

/// Wait up to `timeout` for input on standard input, the terminal crossterm reads
/// (the explorer only starts when standard input is a terminal). This runs before
/// crossterm touches the terminal because crossterm 0.29 reads a hung-up terminal,
/// whose reads return end of input, in a loop without end.
#[cfg(unix)]
pub fn wait_input(timeout: Duration) -> Input {
    let mut fd = libc::pollfd {
        fd: 0,
        events: libc::POLLIN,
        revents: 0,
    };
    let ms = libc::c_int::try_from(timeout.as_millis()).unwrap_or(libc::c_int::MAX);
    // SAFETY: one valid pollfd, count 1; poll only writes its revents.
    let n = unsafe { libc::poll(&mut fd, 1, ms) };
    if n < 0 {
        return match io::Error::last_os_error().kind() {
            io::ErrorKind::Interrupted => Input::Ready,
            _ => Input::Gone,
        };
    }
    if n == 0 {
        Input::Idle
    } else if fd.revents & (libc::POLLHUP | libc::POLLERR | libc::POLLNVAL) != 0 {
        Input::Gone
    } else {
        Input::Ready
    }
}

/// Wait up to `timeout` for input (crossterm's own wait where there is no poll(2)).
#[cfg(not(unix))]
pub fn wait_input(timeout: Duration) -> Input {
    match crossterm::event::poll(timeout) {
        Ok(true) => Input::Ready,
        Ok(false) => Input::Idle,
        Err(e) if e.kind() == io::ErrorKind::Interrupted => Input::Ready,
        Err(_) => Input::Gone,
    }
}

/// A flag set when the process is asked to stop (SIGTERM, SIGINT, SIGHUP).
pub fn stop_flag() -> io::Result<Arc<AtomicBool>> {
    let flag = Arc::new(AtomicBool::new(false));
    #[cfg(unix)]
    for sig in [
        signal_hook::consts::SIGTERM,
        signal_hook::consts::SIGINT,
        signal_hook::consts::SIGHUP,
    ] {
        signal_hook::flag::register(sig, Arc::clone(&flag))?;
    }
    Ok(flag)
}
