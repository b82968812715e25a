//! The explorer's screens, overlays, plan state and the effects a key asks the event
//! loop to carry out: the plain data that [`super::app::App`] holds and returns.

use std::path::PathBuf;
use std::time::Instant;

use telltale::evidence::Subject;
use telltale::plan::{PlanOutcome, PlanReport, Progress};
use telltale::whatif::PlanAsk;

use super::keys::Place;

/// The screens.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Screen {
    Overview,
    Items,
    Detail(Subject),
    Plan,
    Values,
}

impl Screen {
    pub fn place(self) -> Place {
        match self {
            Screen::Overview => Place::Overview,
            Screen::Items => Place::Items,
            Screen::Detail(_) => Place::Detail,
            Screen::Plan => Place::Plan,
            Screen::Values => Place::Values,
        }
    }

    /// The tab a screen belongs to (0–3).
    pub fn tab(self) -> usize {
        match self {
            Screen::Overview => 0,
            Screen::Items | Screen::Detail(_) => 1,
            Screen::Plan => 2,
            Screen::Values => 3,
        }
    }

    pub const TABS: [(Screen, &'static str); 4] = [
        (Screen::Overview, "Overview"),
        (Screen::Items, "Items"),
        (Screen::Plan, "Hiding plan"),
        (Screen::Values, "Your values"),
    ];
}

/// Report formats the explorer can export.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ExportFormat {
    Html,
    Markdown,
}

impl ExportFormat {
    pub fn extension(self) -> &'static str {
        match self {
            ExportFormat::Html => "html",
            ExportFormat::Markdown => "md",
        }
    }
    pub fn label(self) -> &'static str {
        match self {
            ExportFormat::Html => "HTML (a web page)",
            ExportFormat::Markdown => "Markdown (plain text)",
        }
    }
}

/// A window over the current screen.
#[derive(Debug, Clone, PartialEq)]
pub enum Overlay {
    Help {
        scroll: u16,
    },
    Cautions {
        first_run: bool,
    },
    Export {
        format: ExportFormat,
        path: String,
    },
    /// Choosing a real value: row 0 is "not stated", row v+1 is value v.
    PickValue {
        attribute: usize,
        cursor: usize,
    },
}

/// What the plan screen aims for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Goal {
    /// No best guess above the alert level.
    #[default]
    BestGuess,
    /// The person's stated real values not above the alert level (attributes without
    /// a stated value fall back to the best guess).
    RealValue,
}

/// A finished plan: the library planner's answer and its report (names resolved).
#[derive(Debug, Clone)]
pub struct PlanResult {
    pub outcome: PlanOutcome,
    pub report: PlanReport,
}

/// The plan's state.
#[derive(Debug, Clone, Default)]
pub enum PlanState {
    /// Not asked for, or out of date.
    #[default]
    Stale,
    Running {
        started: Instant,
        ask: PlanAsk,
        /// The search's latest report of itself.
        progress: Option<Progress>,
        /// Esc was pressed: the search was told to stop and keep the best found.
        stopping: bool,
    },
    Ready {
        ask: PlanAsk,
        result: Box<PlanResult>,
    },
    /// The planner refused the request (a typed error, in words).
    Failed { ask: PlanAsk, message: String },
}

impl PlanState {
    /// The ask this state answers (or is working on).
    pub fn ask(&self) -> Option<&PlanAsk> {
        match self {
            PlanState::Stale => None,
            PlanState::Running { ask, .. }
            | PlanState::Ready { ask, .. }
            | PlanState::Failed { ask, .. } => Some(ask),
        }
    }
}

/// Something the event loop must do.
#[derive(Debug, Clone, PartialEq)]
pub enum Effect {
    SaveDecisions,
    MarkCautionsSeen,
    Export {
        format: ExportFormat,
        path: PathBuf,
    },
    /// Start planning (a running plan is cancelled and its answer dropped).
    StartPlan(PlanAsk),
    /// Tell the running search to stop and answer with the best plan found so far.
    StopPlan,
}
