//! The hiding planner: the smallest (or cheapest) set of visible subjects to hide so
//! that no protected attribute can be guessed above its alert level — every value's
//! posterior at most the threshold, or the user's true value's when they state it.
//! Hiding can raise another value's probability, so the whole calibrated posterior is
//! checked. An exact branch and bound with proven bounds says "optimal" or gives the
//! lower bound still open when its budget runs out; a greedy method serves as warm
//! start and comparison. Beside the plan come the coarse moves and, when no plan
//! exists, what stands in the way. Method and guarantees: docs/plan.md.
//!
//! ```no_run
//! # fn demo(scan: &telltale::scan::Scan, priors: &telltale::priors::Priors) {
//! use telltale::plan::{PlanRequest, solve};
//! let request = PlanRequest::for_footprint(priors, &scan.footprint);
//! let outcome = solve(&scan.exposure, &request).expect("valid request");
//! # }
//! ```

mod bits;
mod bound;
mod coarse;
mod exact;
mod explain;
mod greedy;
mod html;
mod improve;
mod outcome;
mod problem;
mod render;
mod report;
mod request;
mod select;
mod solve;

pub use exact::StopReason;
pub use html::{PAGE_TOP, write_html_page, write_html_section};
pub use outcome::{
    AttrState, Blocked, GreedySummary, HideItem, Infeasibility, MoveOutcome, Plan, PlanOutcome,
    Reason, SearchStats, Status,
};
pub use render::{write_json, write_markdown, write_markdown_section, write_text};
pub use report::{
    PLAN_REPORT_FORMAT, PlanReport, RealValues, build as build_report,
    build_with as build_report_with,
};
pub use request::{
    Budget, Error, Method, MoveKind, MoveSpec, PlanRequest, Progress, Target, standard_moves,
};
pub use select::{SelectError, find_subject, nearest};
pub use solve::{solve, solve_with_progress};
