//! Getting the terminal into full-screen raw mode and always back out of it: on a
//! normal exit and on an error (the guard's drop), on a panic (ratatui's panic hook
//! restores before the message prints), and on SIGTERM, SIGINT and SIGHUP (a flag
//! the event loop checks, so it leaves through the same path and saves first).

use std::io::{self, IsTerminal};
use std::sync::Arc;
use std::sync::atomic::AtomicBool;

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
        ratatui::restore();
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
