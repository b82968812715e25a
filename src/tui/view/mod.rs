//! Drawing: pure functions from the explorer's state to a frame. Nothing here changes
//! state or touches files.

mod detail;
mod frame;
mod items;
mod overlays;
mod overview;
mod plan;
mod values;
mod widgets;

pub use frame::{page_rows, render, render_loading};
