//! The explorer: a full-screen, keyboard-driven terminal UI over the library's what-if
//! session. The only part of telltale that knows about terminals (ratatui and
//! crossterm). State and key handling live in `app` (no I/O; its data types in
//! `state`, the plan screen's part in `plan_state`, keys over a window in `overlay`),
//! drawing in `view` (pure), key bindings in `keys` (data), and the loop with its
//! worker threads in `run`. `app`, `theme` and `view` are visible crate-wide so that
//! `benches/explorer.rs`, which compiles this folder into the bench, can time a key
//! press up to the drawn frame.

pub(crate) mod app;
mod keys;
mod overlay;
mod plan_state;
mod run;
pub(crate) mod state;
mod terminal;
pub(crate) mod theme;
pub(crate) mod view;

pub use run::{Options, run};
pub use terminal::interactive;

#[cfg(test)]
mod tests;
#[cfg(test)]
mod tests_private;
