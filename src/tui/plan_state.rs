//! The plan screen's part of the explorer state: what the plan is asked, when a fresh
//! search starts, and what its worker reports back.

use std::time::Instant;

use telltale::plan::{self, PlanOutcome, Progress};
use telltale::whatif::PlanAsk;

use super::app::App;
use super::state::{Effect, Goal, PlanResult, PlanState, Screen};

impl App {
    /// What the plan is asked to achieve now.
    pub fn plan_ask(&self) -> PlanAsk {
        PlanAsk::from_session(&self.session, self.goal == Goal::RealValue, self.method)
    }

    /// The finished plan, if it answers the current state.
    pub fn current_plan(&self) -> Option<&PlanResult> {
        match &self.plan {
            PlanState::Ready { ask, result } if *ask == self.plan_ask() => Some(result),
            _ => None,
        }
    }

    /// Ask for a fresh plan if the plan screen shows and the current one is stale.
    pub(super) fn plan_effects(&mut self) -> Vec<Effect> {
        if self.screen != Screen::Plan {
            return Vec::new();
        }
        let ask = self.plan_ask();
        if self.plan.ask() == Some(&ask) {
            return Vec::new();
        }
        self.plan = PlanState::Running {
            started: Instant::now(),
            ask: ask.clone(),
            progress: None,
            stopping: false,
        };
        self.plan_scroll = 0;
        vec![Effect::StartPlan(ask)]
    }

    /// The running search reported progress.
    pub fn plan_progress(&mut self, p: Progress) {
        if let PlanState::Running { progress, .. } = &mut self.plan {
            *progress = Some(p);
        }
    }

    /// A worker finished a plan. Answers to an older ask are dropped.
    pub fn plan_finished(&mut self, ask: PlanAsk, result: Result<PlanOutcome, plan::Error>) {
        let PlanState::Running {
            ask: a, stopping, ..
        } = &self.plan
        else {
            return;
        };
        if *a != ask {
            return;
        }
        if *stopping {
            self.status = None;
        }
        self.plan = match result {
            Ok(outcome) => {
                let s = &self.session;
                let report =
                    plan::build_report(&s.scan.archive_name, s.footprint(), &s.priors, &outcome);
                PlanState::Ready {
                    ask,
                    result: Box::new(PlanResult { outcome, report }),
                }
            }
            Err(e) => PlanState::Failed {
                ask,
                message: format!("The planner refused: {e}"),
            },
        };
        self.plan_cursor = self.plan_cursor.min(self.plan_rows().saturating_sub(1));
    }

    /// The search for `ask` could not be started; the plan screen says why.
    pub fn plan_not_started(&mut self, ask: PlanAsk, message: String) {
        if matches!(&self.plan, PlanState::Running { ask: a, .. } if *a == ask) {
            self.plan = PlanState::Failed { ask, message };
        }
    }

    /// Rows of the plan screen's cursor: one per attribute.
    pub fn plan_rows(&self) -> usize {
        self.session.n_attributes()
    }
}
