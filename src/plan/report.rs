//! The plan report: the outcome with names (items, attributes, values) resolved from
//! the footprint and priors, and one plain-words summary — exactly what
//! `telltale plan --format json` writes (format 1: add fields, never rename them).
//! A value the user stated privately is never named in it, and neither is its
//! probability or anything else a reader could match against the other values' figures
//! (unless the person asks with [`RealValues::Shown`]); a report made knowing one
//! carries [`crate::cautions::REAL_VALUES_WARNING`] as its first field.

use serde::Serialize;

use super::exact::StopReason;
use super::outcome::{AttrState, PlanOutcome, Status};
use super::request::{Method, MoveKind};
use crate::cautions::{CAUTIONS, REAL_VALUES_SHOWN, REAL_VALUES_WARNING};
use crate::evidence::Subject;
use crate::footprint::Footprint;
use crate::priors::Priors;
use crate::reading::percent;

/// The plan report format version.
pub const PLAN_REPORT_FORMAT: u32 = 1;

/// What a report says in place of a privately stated value (id and label).
pub const YOUR_VALUE_ID: &str = "(your value)";
pub const YOUR_VALUE: &str = "your value";

/// Whether a plan was made knowing the person's real values, and whether the report
/// may show them.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum RealValues {
    /// No real value was given.
    None,
    /// Given, and kept out of the report: no name, no probability.
    Withheld,
    /// Given, and shown in full because the person asked.
    Shown,
}

#[derive(Debug, Clone, Serialize)]
pub struct PlanReport {
    /// Present when the plan was made knowing real values: say so before anything else.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub warning: Option<String>,
    pub format: u32,
    pub real_values: RealValues,
    pub tool: String,
    pub archive: String,
    pub priors: String,
    pub priors_synthetic: bool,
    pub method: Method,
    pub status: Status,
    /// One sentence for people.
    pub summary: String,
    pub plan: Option<PlanList>,
    /// Proven lower bound on the cheapest plan's cost.
    pub lower_bound: Option<f64>,
    pub stopped: Option<StopReason>,
    pub greedy: GreedyReport,
    pub attributes: Vec<AttrReport>,
    pub coarse_moves: Vec<MoveReport>,
    pub infeasible: Option<InfeasibleReport>,
    pub search: SearchReport,
    pub cautions: Vec<String>,
}

#[derive(Debug, Clone, Serialize)]
pub struct PlanList {
    pub count: usize,
    pub cost: f64,
    pub items: Vec<HideReport>,
}

#[derive(Debug, Clone, Serialize)]
pub struct HideReport {
    pub name: String,
    /// like, group, follow, event or friends.
    pub kind: String,
    /// The stable key (kind plus id or normalised name); absent for the friend list.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub key: Option<String>,
    pub cost: f64,
    pub reasons: Vec<ReasonReport>,
}

#[derive(Debug, Clone, Serialize)]
pub struct ReasonReport {
    pub attribute: String,
    pub attribute_label: String,
    pub value: String,
    pub value_label: String,
    /// Bits it adds toward that value.
    pub bits: f64,
    /// The value's probability if this item alone were shown again.
    pub probability_if_shown: f64,
    /// Showing it again would cross the alert level.
    pub needed: bool,
}

#[derive(Debug, Clone, Serialize)]
pub struct StateReport {
    pub guess: String,
    pub guess_label: String,
    pub probability: f64,
    /// Probability of the privately stated true value, when one was given.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub true_value_probability: Option<f64>,
    pub meets: bool,
}

#[derive(Debug, Clone, Serialize)]
pub struct AttrReport {
    pub id: String,
    pub label: String,
    pub threshold: f64,
    pub true_value_given: bool,
    pub before: StateReport,
    pub after: StateReport,
}

#[derive(Debug, Clone, Serialize)]
pub struct MoveReport {
    /// Plain words: "hide all 64 groups".
    pub description: String,
    pub kind: MoveKind,
    pub hides: usize,
    pub kept: usize,
    pub cost: f64,
    pub attributes_met: usize,
    pub meets_all: bool,
    pub after: Vec<(String, StateReport)>,
}

#[derive(Debug, Clone, Serialize)]
pub struct GreedyReport {
    pub count: Option<usize>,
    pub cost: Option<f64>,
    pub excess_over_plan: Option<f64>,
    pub seconds: f64,
}

#[derive(Debug, Clone, Serialize)]
pub struct BlockedReport {
    pub attribute: String,
    pub attribute_label: String,
    pub value_label: String,
    /// With everything hideable hidden.
    pub probability: f64,
    pub threshold: f64,
    /// With nothing visible at all.
    pub prior_probability: f64,
    /// Kept items pushing toward the value: (name, bits).
    pub kept_items: Vec<(String, f64)>,
    pub proven_alone: bool,
    /// How many values the attribute has (no best guess is below 1 in that many).
    pub values: usize,
}

#[derive(Debug, Clone, Serialize)]
pub struct InfeasibleReport {
    pub blocked: Vec<BlockedReport>,
    /// Attribute ids that can each be met alone but not together.
    pub conflicts: Vec<(String, String)>,
}

impl InfeasibleReport {
    /// Nothing to say (the search ran out of time before it could name an obstacle).
    pub fn is_empty(&self) -> bool {
        self.blocked.is_empty() && self.conflicts.is_empty()
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct SearchReport {
    pub candidates: usize,
    pub pruned: usize,
    pub kept: usize,
    pub already_hidden: usize,
    pub nodes: u64,
    pub seconds: f64,
}

/// A subject's display name and kind.
pub fn subject_name(footprint: &Footprint, s: Subject) -> (String, String, Option<String>) {
    match s {
        Subject::Item(i) => match footprint.items.get(i) {
            Some(it) => (
                String::from(&*it.name),
                it.kind.as_str().into(),
                Some(it.key()),
            ),
            None => (format!("item #{i}"), "item".into(), None),
        },
        Subject::FriendList => ("your friend list".into(), "friends".into(), None),
    }
}

fn state(priors: &Priors, s: &AttrState, show_real: bool) -> StateReport {
    let a = &priors.attributes[s.attribute];
    // With the real value withheld, whether *it* is over the alert level would name it
    // beside the guess's figure ("Jewish 100%, your value over 30%"); the state then
    // says only what the guess does, as a report made without the real value would.
    let withheld = s.true_value.is_some() && !show_real;
    StateReport {
        guess: a.values[s.best].id.clone(),
        guess_label: a.values[s.best].label.clone(),
        probability: s.probability,
        true_value_probability: if withheld { None } else { s.true_probability },
        meets: if withheld {
            s.probability <= s.threshold + 1e-12
        } else {
            s.meets
        },
    }
}

fn noun(n: usize, one: &str, many: &str) -> String {
    if n == 1 {
        format!("1 {one}")
    } else {
        format!("{n} {many}")
    }
}

/// Build the report, keeping any real value out of it.
pub fn build(
    archive_name: &str,
    footprint: &Footprint,
    priors: &Priors,
    o: &PlanOutcome,
) -> PlanReport {
    build_with(archive_name, footprint, priors, o, false)
}

/// Build the report; `show_real` names the real values in full and gives their
/// probabilities (only when the person asks: the report then is as private as the
/// values themselves).
pub fn build_with(
    archive_name: &str,
    footprint: &Footprint,
    priors: &Priors,
    o: &PlanOutcome,
    show_real: bool,
) -> PlanReport {
    let attr_id = |a: usize| priors.attributes[a].id.clone();
    // A privately stated value is never named: where a reason or an obstacle is about
    // it, the report says "your value" instead.
    let stated = |a: usize| o.before.iter().find(|s| s.attribute == a)?.true_value;
    let any_real = o.before.iter().any(|s| s.true_value.is_some());
    let value_words = |a: usize, v: usize| -> (String, String) {
        if stated(a) == Some(v) && show_real {
            let value = &priors.attributes[a].values[v];
            (value.id.clone(), format!("{YOUR_VALUE}, {}", value.label))
        } else if stated(a) == Some(v) {
            (YOUR_VALUE_ID.into(), YOUR_VALUE.into())
        } else {
            let value = &priors.attributes[a].values[v];
            (value.id.clone(), value.label.clone())
        }
    };
    let plan = o.plan.as_ref().map(|p| PlanList {
        count: p.len(),
        cost: p.cost,
        items: p
            .hide
            .iter()
            .map(|h| {
                let (name, kind, key) = subject_name(footprint, h.subject);
                HideReport {
                    name,
                    kind,
                    key,
                    cost: h.cost,
                    reasons: h
                        .reasons
                        .iter()
                        .map(|r| {
                            let a = &priors.attributes[r.attribute];
                            let (value, value_label) = value_words(r.attribute, r.value);
                            ReasonReport {
                                attribute: a.id.clone(),
                                attribute_label: a.label.clone(),
                                value,
                                value_label,
                                bits: r.bits,
                                probability_if_shown: r.probability_if_shown,
                                needed: r.needed,
                            }
                        })
                        .collect(),
                }
            })
            .collect(),
    });
    let attributes = o
        .before
        .iter()
        .zip(&o.after)
        .map(|(b, a)| AttrReport {
            id: attr_id(b.attribute),
            label: priors.attributes[b.attribute].label.clone(),
            threshold: b.threshold,
            true_value_given: b.true_value.is_some(),
            before: state(priors, b, show_real),
            after: state(priors, a, show_real),
        })
        .collect();
    let coarse_moves = o
        .moves
        .iter()
        .map(|m| MoveReport {
            description: m.kind.describe(m.hides),
            kind: m.kind,
            hides: m.hides,
            kept: m.kept,
            cost: m.cost,
            attributes_met: m.attributes_met,
            meets_all: m.meets_all,
            after: m
                .after
                .iter()
                .map(|s| (attr_id(s.attribute), state(priors, s, show_real)))
                .collect(),
        })
        .collect();
    let infeasible = o.infeasibility.as_ref().map(|inf| InfeasibleReport {
        blocked: inf
            .blocked
            .iter()
            .map(|b| {
                let a = &priors.attributes[b.attribute];
                // The real value's own figures would name it against the scan's
                // distribution: withheld, they are left out (null in JSON).
                let hide = stated(b.attribute) == Some(b.value) && !show_real;
                let figure = |p: f64| if hide { f64::NAN } else { p };
                BlockedReport {
                    attribute: a.id.clone(),
                    attribute_label: a.label.clone(),
                    value_label: value_words(b.attribute, b.value).1,
                    probability: figure(b.probability),
                    threshold: b.threshold,
                    prior_probability: figure(b.prior_probability),
                    kept_items: b
                        .kept
                        .iter()
                        .map(|(s, bits)| (subject_name(footprint, *s).0, *bits))
                        .collect(),
                    proven_alone: b.proven_alone,
                    values: a.values.len(),
                }
            })
            .collect(),
        conflicts: inf
            .conflicts
            .iter()
            .map(|&(x, y)| (attr_id(x), attr_id(y)))
            .collect(),
    });
    let priors_name = std::path::Path::new(&priors.origin)
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| priors.origin.clone());
    let real_values = match (any_real, show_real) {
        (false, _) => RealValues::None,
        (true, false) => RealValues::Withheld,
        (true, true) => RealValues::Shown,
    };
    PlanReport {
        warning: match real_values {
            RealValues::None => None,
            RealValues::Withheld => Some(REAL_VALUES_WARNING.to_string()),
            RealValues::Shown => Some(format!("{REAL_VALUES_WARNING} {REAL_VALUES_SHOWN}")),
        },
        format: PLAN_REPORT_FORMAT,
        real_values,
        tool: format!("telltale {}", env!("CARGO_PKG_VERSION")),
        archive: archive_name.to_string(),
        priors: priors_name,
        priors_synthetic: priors.provenance.synthetic,
        method: o.method,
        status: o.status,
        summary: summary(o, priors, show_real),
        plan,
        lower_bound: o.lower_bound,
        stopped: o.stopped,
        greedy: GreedyReport {
            count: o.greedy.subjects.as_ref().map(Vec::len),
            cost: o.greedy.cost,
            excess_over_plan: o.greedy.excess_over_plan,
            seconds: o.greedy.seconds,
        },
        attributes,
        coarse_moves,
        infeasible,
        search: SearchReport {
            candidates: o.stats.candidates,
            pruned: o.stats.pruned,
            kept: o.stats.kept,
            already_hidden: o.stats.already_hidden,
            nodes: o.stats.nodes,
            seconds: o.stats.seconds,
        },
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
    }
}

/// A cost in words: "7 items", or "cost 4.5" when items are weighted.
pub fn cost_words(count: usize, cost: f64) -> String {
    if (cost - count as f64).abs() < 1e-9 {
        noun(count, "item", "items")
    } else {
        format!("{} (total cost {cost:.4})", noun(count, "item", "items")).replace(".0000)", ")")
    }
}

/// The one-sentence answer; `show_real` names real values and their figures.
pub fn summary(o: &PlanOutcome, priors: &Priors, show_real: bool) -> String {
    let best_move = o
        .moves
        .iter()
        .filter(|m| m.meets_all && !matches!(m.kind, MoveKind::Everything))
        .min_by_key(|m| m.hides);
    match (&o.plan, o.status) {
        (Some(p), _) if p.is_empty() => {
            "Nothing needs hiding: no attribute can be guessed above your alert levels now.".into()
        }
        (Some(p), status) => {
            let mut s = format!(
                "Hide these {} and no attribute can be guessed above your alert levels.",
                cost_words(p.len(), p.cost)
            );
            match status {
                Status::Optimal => s.push_str(" No smaller set does it (proven)."),
                _ => {
                    if let Some(lb) = o.lower_bound {
                        s.push_str(&format!(
                            " A smaller set may exist: the search stopped before proving it, and at least {} {} needed.",
                            lb.ceil().max(0.0),
                            if lb.ceil() == 1.0 { "is" } else { "are" }
                        ));
                    } else if o.stopped.is_none() && o.method == Method::Exact {
                        s.push_str(" It may not be the smallest such set: the proof of smallest does not cover this priors file's fitted (logistic) calibration.");
                    } else {
                        s.push_str(" It may not be the smallest such set.");
                    }
                }
            }
            if let Some(m) = best_move {
                s.push_str(&format!(
                    " The simplest coarse move that also works is to {} .",
                    m.kind.describe(m.hides)
                ));
                s = s.replace(" .", ".");
            }
            s
        }
        (None, Status::Infeasible) => {
            let mut s = "No set of items you allow to be hidden brings every attribute under your alert levels.".to_string();
            if let Some(inf) = &o.infeasibility {
                for b in &inf.blocked {
                    let a = &priors.attributes[b.attribute];
                    let stated = o
                        .before
                        .iter()
                        .any(|x| x.attribute == b.attribute && x.true_value == Some(b.value));
                    if stated && !show_real {
                        // No figure: the real value's probability would name it.
                        s.push_str(&format!(
                            " {}: even with everything you allow hidden, {YOUR_VALUE} stays over your alert level of {}",
                            a.label,
                            percent(b.threshold)
                        ));
                        if !b.kept.is_empty() {
                            s.push_str(" because of items you keep visible");
                        }
                        s.push('.');
                        continue;
                    }
                    s.push_str(&format!(
                        " {}: even with everything you allow hidden, {} is at {}, over your alert level of {}",
                        a.label,
                        if stated {
                            format!("{YOUR_VALUE}, {}", a.values[b.value].label)
                        } else {
                            a.values[b.value].label.clone()
                        },
                        percent(b.probability),
                        percent(b.threshold)
                    ));
                    if b.prior_probability > b.threshold {
                        s.push_str(&format!(
                            " (even with nothing visible the model gives {}, the population rate)",
                            percent(b.prior_probability)
                        ));
                    } else if !b.kept.is_empty() {
                        s.push_str(" because of items you keep visible");
                    }
                    s.push('.');
                }
            }
            s
        }
        (None, _) => {
            let mut s: String = match o.method {
                Method::Exact => "No plan was found within the time allowed; none was proven impossible either. Allow more time, or use the greedy method, which finds a plan (not always the smallest) sooner.".into(),
                Method::Greedy => "The greedy method found no plan within the time allowed; none was proven impossible either. Allow more time, or use the exact method.".into(),
            };
            if let Some(lb) = o.lower_bound.filter(|lb| *lb > 0.0) {
                s.push_str(&format!(
                    " The search did prove that at least {} {} needed.",
                    lb.ceil(),
                    if lb.ceil() == 1.0 { "is" } else { "are" }
                ));
            }
            s
        }
    }
}
