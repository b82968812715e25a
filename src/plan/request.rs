//! What the planner is asked: the alert level (threshold) per protected attribute and,
//! where the user states it privately, their true value; which subjects must stay
//! visible; what hiding each subject costs; which method to use; and the budget that
//! bounds the search (node limit, deadline, cancel flag), so a caller can run it on a
//! worker thread and stop it at any time.

use std::collections::{BTreeMap, BTreeSet};
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::{Duration, Instant};

use serde::Serialize;

use crate::evidence::Subject;
use crate::footprint::{Footprint, ItemKind};
use crate::priors::Priors;

/// One protected attribute and the level its guess must not exceed.
#[derive(Debug, Clone, PartialEq)]
pub struct Target {
    /// Index into the priors' (and the exposure's) attributes.
    pub attribute: usize,
    /// The highest acceptable probability, in (0, 1]. With no true value, every value's
    /// posterior must be at most this (so the observer's best guess is); with a true
    /// value, only that value's.
    pub threshold: f64,
    /// The user's true value (index into the attribute's values), stated privately.
    pub true_value: Option<usize>,
    /// Per value, its own level `τ_v` in (0, 1] (one per value of the attribute), used
    /// instead of `threshold` for that value: the rarity-aware rule gives a rare value
    /// a lower level than the attribute's. `None`: every value at `threshold`.
    pub value_levels: Option<Vec<f64>>,
}

impl Target {
    /// The level value `v` must stay at or under.
    pub fn level(&self, v: usize) -> f64 {
        self.value_levels
            .as_ref()
            .and_then(|l| l.get(v).copied())
            .unwrap_or(self.threshold)
    }
}

/// How to search.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Method {
    /// Branch and bound: optimal when it finishes, otherwise the best plan found and the
    /// lower bound still open. Greedy runs first as a warm start.
    Exact,
    /// Greedy only: fast, no guarantee.
    Greedy,
}

/// Limits on the exact search. The search stops at whichever comes first and reports
/// the best plan found with the lower bound it had proven.
#[derive(Debug, Clone)]
pub struct Budget {
    /// Search nodes to expand at most.
    pub node_limit: u64,
    /// Wall-clock deadline.
    pub deadline: Option<Instant>,
    /// Set to `true` from another thread to stop the search early.
    pub cancel: Option<Arc<AtomicBool>>,
}

impl Default for Budget {
    /// Two million nodes, ten seconds, no cancel flag.
    fn default() -> Self {
        Budget {
            node_limit: 2_000_000,
            deadline: Some(Instant::now() + Duration::from_secs(10)),
            cancel: None,
        }
    }
}

impl Budget {
    /// No node limit, no deadline: search until the answer is proven.
    pub fn unlimited() -> Budget {
        Budget {
            node_limit: u64::MAX,
            deadline: None,
            cancel: None,
        }
    }

    /// A budget of `limit` wall-clock time from now and the default node limit.
    pub fn with_time_limit(limit: Duration) -> Budget {
        Budget {
            deadline: Some(Instant::now() + limit),
            ..Budget::default()
        }
    }

    pub fn cancelled(&self) -> bool {
        self.cancel
            .as_ref()
            .is_some_and(|c| c.load(Ordering::Relaxed))
    }

    pub fn past_deadline(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
    }
}

/// A coarse move people are often told to make, as a set of subjects.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case", tag = "type", content = "kind")]
pub enum MoveKind {
    /// Hide every item of one kind (all groups, all likes, …).
    AllOfKind(ItemKind),
    /// Hide the friend list.
    FriendList,
    /// Hide everything that may be hidden.
    Everything,
}

impl MoveKind {
    /// Plain words: "hide all 64 groups".
    pub fn describe(self, count: usize) -> String {
        match self {
            MoveKind::AllOfKind(k) if count == 1 => format!("hide your one {}", k.as_str()),
            MoveKind::AllOfKind(k) => format!("hide all {count} {}", k.plural()),
            MoveKind::FriendList => "hide the friend list".into(),
            MoveKind::Everything => format!("hide everything that may be hidden ({count})"),
        }
    }
}

/// One coarse move to evaluate beside the plan.
#[derive(Debug, Clone, PartialEq)]
pub struct MoveSpec {
    pub kind: MoveKind,
    pub subjects: Vec<Subject>,
}

/// The standard coarse moves for a footprint: every item kind present, the friend list
/// when there is one, and "everything".
pub fn standard_moves(footprint: &Footprint) -> Vec<MoveSpec> {
    let mut moves = Vec::new();
    for kind in [
        ItemKind::Group,
        ItemKind::Like,
        ItemKind::Follow,
        ItemKind::Event,
    ] {
        let subjects: Vec<Subject> = footprint
            .items
            .iter()
            .enumerate()
            .filter(|(_, it)| it.kind == kind)
            .map(|(i, _)| Subject::Item(i))
            .collect();
        if !subjects.is_empty() {
            moves.push(MoveSpec {
                kind: MoveKind::AllOfKind(kind),
                subjects,
            });
        }
    }
    if !footprint.friends.is_empty() {
        moves.push(MoveSpec {
            kind: MoveKind::FriendList,
            subjects: vec![Subject::FriendList],
        });
    }
    let mut all: Vec<Subject> = (0..footprint.items.len()).map(Subject::Item).collect();
    all.push(Subject::FriendList);
    moves.push(MoveSpec {
        kind: MoveKind::Everything,
        subjects: all,
    });
    moves
}

/// Everything the planner needs besides the exposure.
#[derive(Debug, Clone)]
pub struct PlanRequest {
    /// The protected attributes. Attributes without a target are not constrained.
    pub targets: Vec<Target>,
    /// Subjects that must stay visible.
    pub keep: BTreeSet<Subject>,
    /// What hiding a subject costs (default 1). Costs must be positive and finite.
    pub costs: BTreeMap<Subject, f64>,
    pub method: Method,
    pub budget: Budget,
    /// Coarse moves to evaluate beside the plan.
    pub moves: Vec<MoveSpec>,
}

impl PlanRequest {
    /// Every attribute of the priors protected at its own threshold, each value at its
    /// own level by the priors' alert rule ([`crate::alert`]: a rare value's level is
    /// lower); exact method, default budget, no coarse moves.
    pub fn from_priors(priors: &Priors) -> PlanRequest {
        PlanRequest {
            targets: priors
                .attributes
                .iter()
                .enumerate()
                .map(|(i, a)| Target {
                    attribute: i,
                    threshold: a.threshold,
                    true_value: None,
                    value_levels: rarity_levels(priors, i, a.threshold),
                })
                .collect(),
            keep: BTreeSet::new(),
            costs: BTreeMap::new(),
            method: Method::Exact,
            budget: Budget::default(),
            moves: Vec::new(),
        }
    }

    /// [`PlanRequest::from_priors`] plus the standard coarse moves of a footprint.
    pub fn for_footprint(priors: &Priors, footprint: &Footprint) -> PlanRequest {
        PlanRequest {
            moves: standard_moves(footprint),
            ..PlanRequest::from_priors(priors)
        }
    }

    fn target_mut(&mut self, attribute: usize) -> &mut Target {
        if let Some(pos) = self.targets.iter().position(|t| t.attribute == attribute) {
            &mut self.targets[pos]
        } else {
            self.targets.push(Target {
                attribute,
                threshold: 1.0,
                true_value: None,
                value_levels: None,
            });
            self.targets.last_mut().expect("just pushed")
        }
    }

    /// Set (or add) an attribute's alert level, each value at its own level by the
    /// priors' alert rule ([`crate::alert`]): what `telltale plan --threshold` and the
    /// explorer use.
    pub fn set_alert_level(&mut self, priors: &Priors, attribute: usize, level: f64) {
        let levels = rarity_levels(priors, attribute, level);
        let t = self.target_mut(attribute);
        t.threshold = level;
        t.value_levels = levels;
    }

    /// Set (or add) the threshold for an attribute: one level for every value (no
    /// rarity rule; [`PlanRequest::set_alert_level`] applies it).
    pub fn set_threshold(&mut self, attribute: usize, threshold: f64) {
        let t = self.target_mut(attribute);
        t.threshold = threshold;
        t.value_levels = None;
    }

    /// Give each value of an attribute its own level (see [`Target::value_levels`]).
    pub fn set_value_levels(&mut self, attribute: usize, levels: Vec<f64>) {
        self.target_mut(attribute).value_levels = Some(levels);
    }

    /// State the user's true value for an attribute.
    pub fn set_true_value(&mut self, attribute: usize, value: usize) {
        self.target_mut(attribute).true_value = Some(value);
    }

    /// The cost of hiding a subject (1 unless set).
    pub fn cost(&self, subject: Subject) -> f64 {
        self.costs.get(&subject).copied().unwrap_or(1.0)
    }
}

/// Each value's own level for an attribute at alert level `level`, by the priors'
/// rarity setting, with the remainder value (if any, [`crate::priors::REMAINDER_ID`])
/// at 100%: guessing it discloses nothing, so no plan needs to push it down. `None`
/// when that gives every value `level` (the rule is off, no value is rare enough and
/// there is no remainder), or the attribute does not exist.
fn rarity_levels(priors: &Priors, attribute: usize, level: f64) -> Option<Vec<f64>> {
    let a = priors.attributes.get(attribute)?;
    let mut levels = priors.rarity.value_levels(level, &a.base_rates);
    if let Some(r) = a.remainder() {
        levels[r] = 1.0;
    }
    levels.iter().any(|&l| l != level).then_some(levels)
}

/// A problem with the request itself.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum Error {
    #[error("attribute #{attribute} does not exist (the priors have {count})")]
    UnknownAttribute { attribute: usize, count: usize },
    #[error("attribute #{attribute} is protected twice")]
    DuplicateTarget { attribute: usize },
    #[error("threshold {threshold} for attribute #{attribute} must be above 0 and at most 1")]
    Threshold { attribute: usize, threshold: f64 },
    #[error(
        "attribute #{attribute} has {given} per-value levels for {count} values; each must be above 0 and at most 1"
    )]
    ValueLevels {
        attribute: usize,
        given: usize,
        count: usize,
    },
    #[error("value #{value} of attribute #{attribute} does not exist (it has {count})")]
    UnknownValue {
        attribute: usize,
        value: usize,
        count: usize,
    },
    #[error("cost {cost} must be a positive, finite number")]
    Cost { cost: f64 },
    #[error("subject {subject:?} is not in this footprint")]
    UnknownSubject { subject: Subject },
}

/// What the search reports while it runs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Progress {
    /// Nodes expanded so far.
    pub nodes: u64,
    /// Cost of the best plan found so far.
    pub best_cost: Option<f64>,
    /// The proven lower bound on the optimal cost so far.
    pub lower_bound: f64,
    pub elapsed: Duration,
}
