//! When no plan exists: which attributes cannot be brought under their threshold, and
//! what holds them up — kept subjects pushing toward the value, or a threshold below
//! what the model gives with nothing visible at all (the population base rate) — and
//! which attributes can each be met alone but not together.

use super::exact::search;
use super::outcome::{Blocked, Infeasibility};
use super::problem::Problem;
use super::request::{Budget, PlanRequest};
use crate::evidence::Subject;
use crate::infer::Exposure;

/// Nodes each sub-search may use.
const SUB_NODES: u64 = 200_000;

/// Whether a restricted problem has a plan: `Some(true/false)` when decided within the
/// budget, `None` otherwise.
fn solvable(p: &Problem, budget: &Budget) -> Option<bool> {
    let sub = Budget {
        node_limit: SUB_NODES,
        deadline: budget.deadline,
        cancel: budget.cancel.clone(),
    };
    let s = search(p, None, &sub, &mut |_| {});
    if s.best.is_some() {
        Some(true)
    } else if s.stopped.is_none() {
        Some(false)
    } else {
        None
    }
}

/// Explain why `p` has no plan (as far as the budget allows).
pub(crate) fn explain(
    p: &Problem,
    exposure: &Exposure,
    request: &PlanRequest,
    budget: &Budget,
) -> Infeasibility {
    let all: Vec<usize> = (0..p.n()).collect();
    let everything_hidden = p.state_with(&all);
    let mut out = Infeasibility::default();
    let mut alone_ok = Vec::new();
    for (ai, a) in p.attrs.iter().enumerate() {
        let post = p.posterior(ai, &everything_hidden);
        let over = a.violated(&post);
        let restricted = p.restricted(&[ai]);
        let verdict = if over.is_empty() {
            Some(true)
        } else {
            solvable(&restricted, budget)
        };
        match verdict {
            Some(true) => alone_ok.push(ai),
            Some(false) | None => {
                let v = over
                    .iter()
                    .copied()
                    .max_by(|&x, &y| post.probs[x].total_cmp(&post.probs[y]))
                    .unwrap_or(post.best);
                let prior = a.model.posterior(&vec![0.0; a.k]);
                let mut kept: Vec<(Subject, f64)> = request
                    .keep
                    .iter()
                    .filter(|s| !exposure.is_hidden(**s) && in_range(exposure, **s))
                    .filter(|&&s| {
                        exposure
                            .evidence_of(s)
                            .iter()
                            .any(|&ei| exposure.evidence().list[ei].attribute() == a.attribute)
                    })
                    .filter_map(|&s| {
                        // The reports' figure ([`crate::effect`]): the change in the
                        // value's log₂-odds with this item shown rather than hidden.
                        let bits = crate::effect::bits_toward(exposure, a.attribute, s, v);
                        (bits > 0.0).then_some((s, bits))
                    })
                    .collect();
                kept.sort_by(|x, y| y.1.total_cmp(&x.1));
                out.blocked.push(Blocked {
                    attribute: a.attribute,
                    value: v,
                    probability: post.probs[v],
                    threshold: a.tau[v],
                    prior_probability: prior.probs[v],
                    kept,
                    proven_alone: verdict == Some(false),
                });
            }
        }
    }
    if out.blocked.is_empty() {
        for (x, &i) in alone_ok.iter().enumerate() {
            for &j in &alone_ok[x + 1..] {
                if solvable(&p.restricted(&[i, j]), budget) == Some(false) {
                    out.conflicts
                        .push((p.attrs[i].attribute, p.attrs[j].attribute));
                }
            }
        }
    }
    out
}

fn in_range(exposure: &Exposure, s: Subject) -> bool {
    match s {
        Subject::Item(i) => i < exposure.evidence().n_items,
        Subject::FriendList => true,
    }
}
