//! The one place the explorer asks for a hiding plan. Until the exact planner lands in
//! the library, this is a greedy suggestion (clearly labelled as such): repeatedly
//! hide the item that most reduces how far the posteriors are over their alert
//! levels (in log-odds), trying pairs when no single item helps. Switching to the
//! exact planner means changing [`suggest`] only.

use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};

use telltale::evidence::Subject;
use telltale::infer::{Exposure, Posterior};

/// What the plan must achieve.
#[derive(Debug, Clone, PartialEq)]
pub struct PlanAsk {
    /// Alert level per attribute.
    pub targets: Vec<f64>,
    /// Per attribute: `Some(v)` to keep P(v) under the alert level (the person's real
    /// value), `None` to keep the best guess's probability under it.
    pub protect: Vec<Option<usize>>,
    /// Subjects that must stay visible.
    pub keep: Vec<Subject>,
    /// Subjects already hidden (they stay hidden).
    pub hidden: Vec<Subject>,
}

/// What a plan suggests.
#[derive(Debug, Clone, PartialEq)]
pub struct PlanSuggestion {
    /// Subjects to hide, in the order chosen.
    pub hide: Vec<Subject>,
    /// Whether every attribute ends under its alert level.
    pub reaches_goal: bool,
    /// Whether the set is proven smallest.
    pub proven_smallest: bool,
    /// How the suggestion was made, in words for the screen.
    pub method: &'static str,
    /// True when it was stopped early.
    pub cancelled: bool,
    /// Every attribute's posterior after hiding the set (and what was hidden already).
    pub after: Vec<Posterior>,
}

/// How far under each alert level the search aims (one percentage point).
const AIM_MARGIN: f64 = 0.01;

/// Singles considered for a pair step when no single hide helps.
const PAIR_POOL: usize = 24;

/// The label the plan screen shows for a greedy suggestion.
pub const GREEDY_LABEL: &str = "a quick suggestion, not proven smallest";

/// The exposure of attribute `a` the goal is about.
fn watched(x: &Exposure, a: usize, protect: Option<usize>) -> f64 {
    let p = x.posterior(a);
    match protect {
        Some(v) => p.probs[v],
        None => p.probability,
    }
}

/// Log-odds, with the probability kept off 0 and 1.
fn logit(p: f64) -> f64 {
    let p = p.clamp(1e-15, 1.0 - 1e-15);
    (p / (1.0 - p)).ln()
}

/// How far the posteriors are over their alert levels, summed in log-odds (which,
/// unlike probabilities, keep moving when a posterior is close to certain).
fn excess(x: &Exposure, ask: &PlanAsk) -> f64 {
    (0..x.n_attributes())
        .map(|a| {
            // Aim a hair under the level, so ties at the level do not stall the search.
            let aim = ask.targets[a] - AIM_MARGIN;
            (logit(watched(x, a, ask.protect[a])) - logit(aim)).max(0.0)
        })
        .sum()
}

/// Suggest a set of subjects to hide. Runs on a worker thread; checks `cancel`
/// between steps.
pub fn suggest(exposure: &Exposure, ask: &PlanAsk, cancel: &Arc<AtomicBool>) -> PlanSuggestion {
    greedy(exposure, ask, cancel)
}

fn greedy(exposure: &Exposure, ask: &PlanAsk, cancel: &Arc<AtomicBool>) -> PlanSuggestion {
    let mut x = exposure.clone();
    for &s in &ask.hidden {
        x.set_hidden(s, true);
    }
    let n = x.evidence().n_items;
    let mut candidates: Vec<Subject> = (0..n)
        .map(Subject::Item)
        .chain(std::iter::once(Subject::FriendList))
        .filter(|s| !x.evidence_of(*s).is_empty())
        .filter(|s| !x.is_hidden(*s) && !ask.keep.contains(s))
        .collect();
    let mut hide = Vec::new();
    let mut current = excess(&x, ask);
    let mut cancelled = false;
    while current > 1e-12 && !candidates.is_empty() {
        if cancel.load(Ordering::Relaxed) {
            cancelled = true;
            break;
        }
        // Score every single hide.
        let mut scored: Vec<(usize, f64)> = candidates
            .iter()
            .enumerate()
            .map(|(ci, &s)| {
                x.set_hidden(s, true);
                let e = excess(&x, ask);
                x.set_hidden(s, false);
                (ci, e)
            })
            .collect();
        scored.sort_by(|a, b| a.1.total_cmp(&b.1));
        let mut chosen: Vec<usize> = Vec::new();
        let mut next = current;
        if let Some(&(ci, e)) = scored.first()
            && e < current - 1e-12
        {
            chosen.push(ci);
            next = e;
        } else {
            // Stuck: one hide alone makes things worse somewhere else. Try pairs among
            // the most promising singles.
            let top: Vec<usize> = scored.iter().take(PAIR_POOL).map(|p| p.0).collect();
            let mut best: Option<(usize, usize, f64)> = None;
            for (k, &a) in top.iter().enumerate() {
                for &b in &top[k + 1..] {
                    x.set_hidden(candidates[a], true);
                    x.set_hidden(candidates[b], true);
                    let e = excess(&x, ask);
                    x.set_hidden(candidates[a], false);
                    x.set_hidden(candidates[b], false);
                    if best.is_none_or(|(_, _, be)| e < be) {
                        best = Some((a, b, e));
                    }
                }
            }
            if let Some((a, b, e)) = best
                && e < current - 1e-12
            {
                chosen.extend([a, b]);
                next = e;
            } else if let Some(ci) = worst_relief(&mut x, ask, &candidates) {
                // Still stuck: lower the attribute furthest over its level, even if
                // another one rises for now (each step hides one more item, so this
                // ends).
                x.set_hidden(candidates[ci], true);
                next = excess(&x, ask);
                x.set_hidden(candidates[ci], false);
                chosen.push(ci);
            }
        }
        if chosen.is_empty() {
            break; // nothing helps any more
        }
        chosen.sort_unstable_by(|a, b| b.cmp(a));
        for ci in chosen {
            let s = candidates.swap_remove(ci);
            x.set_hidden(s, true);
            hide.push(s);
        }
        current = next;
    }
    let reaches_goal =
        (0..x.n_attributes()).all(|a| watched(&x, a, ask.protect[a]) <= ask.targets[a]);
    PlanSuggestion {
        after: (0..x.n_attributes()).map(|a| x.posterior(a)).collect(),
        hide,
        reaches_goal,
        proven_smallest: false,
        method: GREEDY_LABEL,
        cancelled,
    }
}

/// The candidate whose hiding most lowers the attribute furthest over its level.
fn worst_relief(x: &mut Exposure, ask: &PlanAsk, candidates: &[Subject]) -> Option<usize> {
    let over = |x: &Exposure, a: usize| {
        logit(watched(x, a, ask.protect[a])) - logit(ask.targets[a] - AIM_MARGIN)
    };
    let worst = (0..x.n_attributes())
        .map(|a| (a, over(x, a)))
        .filter(|(_, o)| *o > 0.0)
        .max_by(|p, q| p.1.total_cmp(&q.1))?;
    let mut best: Option<(usize, f64)> = None;
    for (ci, &s) in candidates.iter().enumerate() {
        x.set_hidden(s, true);
        let o = over(x, worst.0);
        x.set_hidden(s, false);
        if o < worst.1 - 1e-9 && best.is_none_or(|(_, b)| o < b) {
            best = Some((ci, o));
        }
    }
    best.map(|b| b.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use telltale::evidence::{Evidence, EvidenceSet, Origin};
    use telltale::infer::AttrModel;
    use telltale::priors::Calibration;

    fn exposure(items: &[[f64; 2]]) -> Exposure {
        let base = [0.5, 0.5];
        let mut set = EvidenceSet::new(items.len());
        for (i, p) in items.iter().enumerate() {
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                0,
                p.to_vec(),
                &base,
                10.0,
                Origin::Mark,
            ));
        }
        let model = AttrModel {
            log_base: vec![0.5f64.ln(); 2],
            calibration: Calibration::Temperature { lambda: 1.0 },
        };
        Exposure::with_models(vec![model], set)
    }

    #[test]
    fn greedy_reaches_the_goal_and_respects_keep() {
        // Bayes' rule by hand: items with LR 1.6 and 1.2 toward value 0 give
        // P(v0) = 1.92/(1.92 + 0.32) ≈ 0.857; hiding the 1.6 item leaves 0.6.
        let x = exposure(&[[0.8, 0.2], [0.6, 0.4]]);
        let ask = PlanAsk {
            targets: vec![0.65],
            protect: vec![None],
            keep: vec![],
            hidden: vec![],
        };
        let cancel = Arc::new(AtomicBool::new(false));
        let s = suggest(&x, &ask, &cancel);
        assert_eq!(s.hide, vec![Subject::Item(0)]);
        assert!(s.reaches_goal && !s.proven_smallest);
        // Keeping item 0 forces hiding item 1 — which does not reach 0.65 (0.8 left).
        let kept = PlanAsk {
            keep: vec![Subject::Item(0)],
            ..ask
        };
        let s = suggest(&x, &kept, &cancel);
        assert_eq!(s.hide, vec![Subject::Item(1)]);
        assert!(!s.reaches_goal);
    }

    #[test]
    fn cancel_stops_early() {
        let x = exposure(&[[0.8, 0.2], [0.7, 0.3], [0.9, 0.1]]);
        let ask = PlanAsk {
            targets: vec![0.5],
            protect: vec![None],
            keep: vec![],
            hidden: vec![],
        };
        let cancel = Arc::new(AtomicBool::new(true));
        let s = suggest(&x, &ask, &cancel);
        assert!(s.cancelled && s.hide.is_empty());
    }
}
