//! What a what-if session asks the hiding planner: the session's alert levels, its
//! keep marks (those items stay visible), its hide marks (already hidden in the
//! session's exposure, so they stay hidden and cost nothing) and, when the person
//! asks for it, their privately stated real values (the goal becomes "my real value
//! must not be guessable above the alert level"). [`PlanAsk`] is plain data, so a
//! front end can tell whether a plan it holds is still the answer to the current
//! state; [`PlanAsk::request`] turns it into the one [`PlanRequest`] the library
//! planner solves — the same request `telltale plan` builds from its flags.

use std::collections::BTreeSet;
use std::sync::Arc;
use std::sync::atomic::AtomicBool;
use std::time::Duration;

use super::session::Session;
use crate::evidence::Subject;
use crate::plan::{Budget, Method, PlanRequest};

/// The exact search's time budget, the same as `telltale plan`'s default
/// `--time-limit`.
pub const PLAN_TIME_LIMIT: Duration = Duration::from_secs(10);

/// What a plan must achieve, taken from a session.
#[derive(Debug, Clone, PartialEq)]
pub struct PlanAsk {
    /// Alert level per attribute.
    pub targets: Vec<f64>,
    /// Per attribute: `Some(v)` to keep the person's real value `v` under the alert
    /// level, `None` to keep every value (so the best guess) under it.
    pub true_values: Vec<Option<usize>>,
    /// Subjects marked keep: never hidden by the plan.
    pub keep: BTreeSet<Subject>,
    /// Subjects already hidden: they stay hidden and cost nothing.
    pub hidden: BTreeSet<Subject>,
    pub method: Method,
}

impl PlanAsk {
    /// The ask for the session's current state. With `use_real_values`, every
    /// attribute with a stated real value is protected on that value.
    pub fn from_session(s: &Session, use_real_values: bool, method: Method) -> PlanAsk {
        let subjects: Vec<Subject> = s.subjects().collect();
        PlanAsk {
            targets: s.targets().to_vec(),
            true_values: if use_real_values {
                s.real_values().to_vec()
            } else {
                vec![None; s.n_attributes()]
            },
            keep: subjects.iter().copied().filter(|&x| s.is_kept(x)).collect(),
            hidden: subjects.into_iter().filter(|&x| s.is_hidden(x)).collect(),
            method,
        }
    }

    /// Whether any attribute is protected on a stated real value.
    pub fn uses_real_values(&self) -> bool {
        self.true_values.iter().any(Option::is_some)
    }

    /// The planner request: every attribute at its alert level (and real value), the
    /// kept subjects, the standard coarse moves of the footprint, the method, and a
    /// budget of [`PLAN_TIME_LIMIT`] that `cancel` can stop early. Solve it on the
    /// session's exposure, where the hidden subjects are already hidden.
    pub fn request(&self, s: &Session, cancel: Arc<AtomicBool>) -> PlanRequest {
        let mut req = PlanRequest::for_footprint(&s.priors, s.footprint());
        for (a, &t) in self.targets.iter().enumerate() {
            req.set_alert_level(&s.priors, a, t);
            if let Some(v) = self.true_values.get(a).copied().flatten() {
                req.set_true_value(a, v);
            }
        }
        req.keep = self.keep.clone();
        req.method = self.method;
        req.budget = Budget {
            cancel: Some(cancel),
            ..Budget::with_time_limit(PLAN_TIME_LIMIT)
        };
        req
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plan::solve;
    use crate::whatif::session::tests::demo_session;

    fn no_cancel() -> Arc<AtomicBool> {
        Arc::new(AtomicBool::new(false))
    }

    #[test]
    fn marks_become_keep_and_hidden_and_the_plan_respects_them() {
        let mut s = demo_session();
        let plain = PlanAsk::from_session(&s, false, Method::Exact);
        let first = solve(s.exposure(), &plain.request(&s, no_cancel())).unwrap();
        let plan = first.plan.expect("the demo reporter has a plan");
        let top = plan.hide[0].subject;
        let other = plan.hide[1].subject;
        // Keep the plan's first item, hide its second by hand.
        s.toggle_kept(top);
        s.toggle_hidden(other);
        let ask = PlanAsk::from_session(&s, false, Method::Exact);
        assert!(ask.keep.contains(&top) && ask.hidden.contains(&other));
        let req = ask.request(&s, no_cancel());
        assert!(req.keep.contains(&top));
        let o = solve(s.exposure(), &req).unwrap();
        assert_eq!(o.stats.already_hidden, 1);
        if let Some(p) = &o.plan {
            let subjects = p.subjects();
            assert!(!subjects.contains(&top), "a kept item was planned hidden");
            assert!(
                !subjects.contains(&other),
                "an already hidden item was planned"
            );
        }
    }

    #[test]
    fn real_values_switch_the_targets_only_when_asked() {
        let mut s = demo_session();
        s.set_real_value(1, Some(2));
        let off = PlanAsk::from_session(&s, false, Method::Greedy);
        assert!(!off.uses_real_values());
        let on = PlanAsk::from_session(&s, true, Method::Greedy);
        assert_eq!(on.true_values[1], Some(2));
        let req = on.request(&s, no_cancel());
        let t = req.targets.iter().find(|t| t.attribute == 1).unwrap();
        assert_eq!(t.true_value, Some(2));
        assert_eq!(req.method, Method::Greedy);
        let o = solve(s.exposure(), &req).unwrap();
        let before = o.before.iter().find(|x| x.attribute == 1).unwrap();
        // The constraint watches the stated value, whatever the best guess is.
        assert_eq!(before.watched, 2);
        assert_eq!(before.true_value, Some(2));
    }
}
