//! The coarse moves people are usually told to make — hide all groups, all likes, all
//! follows, all events, the friend list, or everything — evaluated on the same model,
//! so the minimal plan can be set beside them. Kept subjects stay visible under every
//! move; subjects already hidden stay hidden.

use std::collections::HashMap;

use super::outcome::{AttrState, MoveOutcome};
use super::problem::Problem;
use super::request::{MoveSpec, PlanRequest};
use crate::evidence::Subject;
use crate::infer::Exposure;

/// The per-attribute states of a problem state.
pub(crate) fn states(p: &Problem, state: &[f64]) -> Vec<AttrState> {
    p.attrs
        .iter()
        .enumerate()
        .map(|(ai, a)| {
            AttrState::new(
                a.attribute,
                a.threshold,
                &a.tau,
                a.true_value,
                p.posterior(ai, state),
            )
        })
        .collect()
}

/// What each move achieves.
pub(crate) fn evaluate(
    p: &Problem,
    exposure: &Exposure,
    request: &PlanRequest,
    moves: &[MoveSpec],
) -> Vec<MoveOutcome> {
    let index: HashMap<Subject, usize> = p
        .subjects
        .iter()
        .enumerate()
        .map(|(i, &s)| (s, i))
        .collect();
    moves
        .iter()
        .map(|m| {
            let mut hidden = Vec::new();
            let mut hides = 0;
            let mut kept = 0;
            let mut cost = 0.0;
            for s in &m.subjects {
                if request.keep.contains(s) {
                    if in_range(exposure, *s) && !exposure.is_hidden(*s) {
                        kept += 1;
                    }
                    continue;
                }
                if !in_range(exposure, *s) || exposure.is_hidden(*s) {
                    continue;
                }
                if let Some(&i) = index.get(s) {
                    hidden.push(i);
                }
                hides += 1;
                cost += request.cost(*s);
            }
            let after = states(p, &p.state_with(&hidden));
            let attributes_met = after.iter().filter(|s| s.meets).count();
            MoveOutcome {
                kind: m.kind,
                hides,
                kept,
                cost,
                meets_all: attributes_met == after.len(),
                attributes_met,
                after,
            }
        })
        .collect()
}

fn in_range(exposure: &Exposure, s: Subject) -> bool {
    match s {
        Subject::Item(i) => i < exposure.evidence().n_items,
        Subject::FriendList => true,
    }
}
