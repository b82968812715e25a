//! What-if exploration over one scan, for the explorer and anything else that lets a
//! person try hiding items: a [`Session`] holds the scan, the person's decisions
//! (hide/keep marks, private real values, alert levels) and an undo history, and keeps
//! every posterior current incrementally as marks change. Views of it — the overview
//! per attribute, the item rows (filtered, searched, sorted) and one item's detail —
//! are plain data, computed here so any front end only draws them.

mod detail;
mod overview;
mod plan;
mod rows;
mod session;

pub use detail::{AttributeChange, EvidenceView, ItemDetail, ValueBar, item_detail};
pub use overview::{AttributeSummary, overview};
pub use plan::{PLAN_TIME_LIMIT, PlanAsk};
pub use rows::{ItemRow, KindFilter, RowQuery, SortBy, item_rows, sort_rows};
pub use session::{Session, subject_name};
