//! Getting the terminal into full-screen raw mode and always back out of it: on a
//! normal exit and on an error (the guard's drop), on a panic (our panic hook restores
//! before the message prints), and on SIGTERM, SIGINT and SIGHUP (a flag the event
//! loop checks, so it leaves through the same path and saves first). A terminal that
//! went away (closed window, dropped connection) is noticed by [`wait_input`], so the
//! loop leaves the same way.
//!
//! Nothing on the way out may print or panic: once the terminal is gone, writing to
//! it fails, and `eprintln!` panics when its write fails. ratatui's own panic hook
//! prints when restoring fails (a second panic inside the hook aborts the process)
//! and its `Terminal` prints from its drop when it cannot show the cursor ("Failed to
//! show the cursor: Input/output error"). So the terminal is set up here with a hook
//! that restores quietly, and a terminal whose cursor cannot be shown again is not
//! dropped but left to the process's exit.

use std::io::{self, IsTerminal};
use std::mem::ManuallyDrop;
use std::sync::atomic::AtomicBool;
use std::sync::{Arc, Once};
use std::time::Duration;

use crossterm::cursor::Show;
use crossterm::execute;
use crossterm::terminal::{
    EnterAlternateScreen, LeaveAlternateScreen, disable_raw_mode, enable_raw_mode,
};
use ratatui::backend::CrosstermBackend;
use ratatui::{DefaultTerminal, Terminal};

/// Whether standard input and output are both a terminal.
pub fn interactive() -> bool {
    io::stdin().is_terminal() && io::stdout().is_terminal()
}

/// Restores the terminal when dropped.
pub struct Guard {
    /// Dropped by hand in [`Guard`]'s drop, and only when the terminal still answers.
    pub terminal: ManuallyDrop<DefaultTerminal>,
}

impl Guard {
    /// Enter raw mode and the alternate screen; installs the panic hook.
    pub fn enter() -> io::Result<Guard> {
        install_panic_hook();
        enable_raw_mode()?;
        let terminal = execute!(io::stdout(), EnterAlternateScreen)
            .and_then(|()| Terminal::new(CrosstermBackend::new(io::stdout())));
        match terminal {
            Ok(terminal) => Ok(Guard {
                terminal: ManuallyDrop::new(terminal),
            }),
            Err(e) => {
                restore_quietly();
                Err(e)
            }
        }
    }
}

impl Drop for Guard {
    fn drop(&mut self) {
        restore_quietly();
        // ratatui's Terminal shows the cursor in its drop and prints to standard error
        // when that fails; on a terminal that is gone, leave it to the process's exit.
        if self.terminal.show_cursor().is_ok() {
            // SAFETY: dropped once, here, and never used again (we are in drop).
            unsafe { ManuallyDrop::drop(&mut self.terminal) }
        }
    }
}

/// Leave raw mode and the alternate screen and show the cursor, ignoring errors: the
/// terminal may be gone, and then there is nothing to restore and no one to tell.
fn restore_quietly() {
    let _ = disable_raw_mode();
    let _ = execute!(io::stdout(), LeaveAlternateScreen, Show);
}

/// A panic restores the terminal (quietly) before the message is printed; installed
/// once per process. The standard hook it passes on to ignores failed writes.
fn install_panic_hook() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            restore_quietly();
            previous(info);
        }));
    });
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
