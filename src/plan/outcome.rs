//! What the planner answers: the plan (each subject to hide, what it costs and why),
//! the proof status (optimal, best found with the lower bound still open, proven
//! infeasible, or nothing found within the budget), the greedy plan for comparison,
//! before/after posteriors per protected attribute, the coarse moves and what each
//! achieves, and, when no plan exists, what stands in the way. Attribute and value
//! indices refer to the priors; subjects to the exposure's evidence set. Serialisable,
//! so reports can embed it.

use serde::Serialize;

use super::exact::StopReason;
use super::request::{Method, MoveKind};
use crate::evidence::Subject;
use crate::infer::Posterior;

/// How far the answer is proven.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Status {
    /// The plan is proven to be the cheapest (smallest) there is.
    Optimal,
    /// A plan that meets every threshold, not proven cheapest (greedy, or the search
    /// stopped); `lower_bound` says how much cheaper one could still be.
    Feasible,
    /// Proven: no set of hideable subjects meets every threshold.
    Infeasible,
    /// No plan was found and none was proven impossible (greedy got stuck, or the
    /// budget ran out first).
    Unknown,
}

/// One protected attribute's posterior in some state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AttrState {
    /// Index into the priors' attributes.
    pub attribute: usize,
    /// The attribute's alert level.
    pub threshold: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub true_value: Option<usize>,
    /// The observer's best guess (value index) and its probability.
    pub best: usize,
    pub probability: f64,
    /// The probability of the true value, when stated.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub true_probability: Option<f64>,
    /// The value the constraint is about: the true value; else the most probable value
    /// over its own level, if any; else the best guess.
    pub watched: usize,
    /// Its probability.
    pub watched_probability: f64,
    /// Its own level (the alert level, or lower for a rare value).
    pub watched_level: f64,
    /// The whole posterior.
    pub probs: Vec<f64>,
    /// Whether every constrained value is at or under its level.
    pub meets: bool,
}

impl AttrState {
    /// `levels`: each value's own level (all equal to `threshold` without the rarity
    /// rule).
    pub(crate) fn new(
        attribute: usize,
        threshold: f64,
        levels: &[f64],
        true_value: Option<usize>,
        post: Posterior,
    ) -> AttrState {
        let level = |v: usize| levels.get(v).copied().unwrap_or(threshold);
        let over = |v: usize| level(v) < 1.0 && post.probs[v] > level(v);
        let watched = true_value.unwrap_or_else(|| {
            (0..post.probs.len())
                .filter(|&v| over(v))
                .max_by(|&x, &y| post.probs[x].total_cmp(&post.probs[y]))
                .unwrap_or(post.best)
        });
        let watched_probability = post.probs[watched];
        let meets = match true_value {
            Some(t) => !over(t),
            None => !(0..post.probs.len()).any(over),
        };
        AttrState {
            attribute,
            threshold,
            true_value,
            best: post.best,
            probability: post.probability,
            true_probability: true_value.map(|v| post.probs[v]),
            watched,
            watched_probability,
            watched_level: level(watched),
            probs: post.probs,
            meets,
        }
    }
}

/// Why one subject is in the plan: an attribute it feeds.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reason {
    pub attribute: usize,
    /// The value it pushes toward.
    pub value: usize,
    /// The bits it adds toward that value: the change in the value's log₂-odds with
    /// it shown again rather than hidden, the rest of the plan hidden (the reports'
    /// figure, [`crate::effect::change`]; positive whenever `needed`).
    pub bits: f64,
    /// That value's probability if this subject alone were shown again (with the rest
    /// of the plan hidden).
    pub probability_if_shown: f64,
    /// Showing it again would put this attribute over its threshold.
    pub needed: bool,
}

/// One subject to hide.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HideItem {
    pub subject: Subject,
    pub cost: f64,
    /// The attributes it was feeding, the one that needs it most first.
    pub reasons: Vec<Reason>,
}

/// A set of subjects to hide.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Plan {
    pub hide: Vec<HideItem>,
    pub cost: f64,
}

impl Plan {
    pub fn subjects(&self) -> Vec<Subject> {
        self.hide.iter().map(|h| h.subject).collect()
    }

    pub fn len(&self) -> usize {
        self.hide.len()
    }

    pub fn is_empty(&self) -> bool {
        self.hide.is_empty()
    }
}

/// The greedy method's plan, for comparison.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GreedySummary {
    /// `None` when greedy found no plan.
    pub subjects: Option<Vec<Subject>>,
    pub cost: Option<f64>,
    /// Greedy's cost minus the returned plan's (0 when greedy's plan is the one
    /// returned or as good).
    pub excess_over_plan: Option<f64>,
    pub seconds: f64,
}

/// A coarse move and what it achieves.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MoveOutcome {
    pub kind: MoveKind,
    /// Subjects the move would newly hide (kept and already hidden ones excluded).
    pub hides: usize,
    /// Subjects the move covers that are kept, so stay visible.
    pub kept: usize,
    pub cost: f64,
    pub after: Vec<AttrState>,
    /// Protected attributes meeting their threshold after the move.
    pub attributes_met: usize,
    pub meets_all: bool,
}

/// A protected attribute that cannot be brought under its threshold.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Blocked {
    pub attribute: usize,
    /// The value over the threshold with everything hideable hidden.
    pub value: usize,
    /// Its probability then.
    pub probability: f64,
    pub threshold: f64,
    /// Its probability with nothing visible at all (the population base rate under
    /// the calibrated model).
    pub prior_probability: f64,
    /// Kept subjects pushing toward the value, with their bits (the change in the
    /// value's log₂-odds with each shown rather than hidden, [`crate::effect`]), most
    /// first.
    pub kept: Vec<(Subject, f64)>,
    /// Proven on its own (this attribute alone cannot be met), not only together with
    /// the others.
    pub proven_alone: bool,
}

/// Why there is no plan.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct Infeasibility {
    /// Attributes that cannot be met even on their own.
    pub blocked: Vec<Blocked>,
    /// Pairs of attributes each satisfiable alone but not together.
    pub conflicts: Vec<(usize, usize)>,
}

/// Sizes and effort.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SearchStats {
    /// Visible subjects that may be hidden and carry evidence.
    pub candidates: usize,
    /// Visible, not kept, but carrying no evidence (left out of the search).
    pub pruned: usize,
    pub kept: usize,
    /// Already hidden before planning.
    pub already_hidden: usize,
    pub nodes: u64,
    pub seconds: f64,
}

/// The planner's answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlanOutcome {
    pub method: Method,
    pub status: Status,
    /// The best plan found (empty when nothing needs hiding).
    pub plan: Option<Plan>,
    /// Proven lower bound on the cheapest plan's cost (equals the plan's cost when
    /// optimal; absent when infeasible or nothing was proven).
    pub lower_bound: Option<f64>,
    /// Why the exact search stopped early, if it did.
    pub stopped: Option<StopReason>,
    pub greedy: GreedySummary,
    pub before: Vec<AttrState>,
    /// With the plan applied (equal to `before` without a plan).
    pub after: Vec<AttrState>,
    pub moves: Vec<MoveOutcome>,
    pub infeasibility: Option<Infeasibility>,
    pub stats: SearchStats,
}

impl PlanOutcome {
    /// The gap still open: plan cost minus the proven lower bound.
    pub fn gap(&self) -> Option<f64> {
        match (&self.plan, self.lower_bound) {
            (Some(p), Some(lb)) => Some((p.cost - lb).max(0.0)),
            _ => None,
        }
    }
}
