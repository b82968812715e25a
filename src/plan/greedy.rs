//! The greedy method: repeatedly hide the candidate that most reduces the total
//! excess log-odds (per unit cost), then drop hides that turned out unnecessary. Fast
//! (linear in the candidates per step) and usually close, but with no guarantee; the
//! exact search uses it as a warm start and the outcome reports how far it was from
//! the best plan.
//!
//! The excess of a constrained value `v` is `max(0, logit P(v) − logit τ)`, which is
//! zero exactly when `P(v) ≤ τ`; summing it over constrained values and attributes
//! also counts values that hiding would push over their threshold.

use std::cmp::Ordering;
use std::collections::BinaryHeap;

use super::problem::{PAttr, Problem};
use super::request::Budget;

/// Excess log-odds over the threshold of an attribute's constrained values.
pub(crate) fn excess(a: &PAttr, sums: &[f64]) -> f64 {
    let mut z = Vec::with_capacity(a.k);
    excess_with(a, sums, &mut z)
}

/// [`excess`] with a caller-owned buffer, so the greedy loop allocates nothing.
fn excess_with(a: &PAttr, sums: &[f64], z: &mut Vec<f64>) -> f64 {
    if a.threshold >= 1.0 {
        return 0.0;
    }
    z.clear();
    z.extend(a.log_base.iter().zip(sums).map(|(b, s)| b + a.lambda * s));
    let m = z.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let mut total = 0.0;
    for x in z.iter_mut() {
        *x = (*x - m).exp();
        total += *x;
    }
    let mut out = 0.0;
    for v in 0..a.k {
        let ev = z[v];
        if !a.constrains(v) || ev / total <= a.threshold * 0.999 {
            continue;
        }
        // The others' share, summed directly when v dominates (the difference would
        // lose the digits that matter).
        let others = if ev < 0.5 * total {
            total - ev
        } else {
            z.iter()
                .enumerate()
                .filter(|(u, _)| *u != v)
                .map(|(_, x)| x)
                .sum()
        };
        // logit P(v) = ln e_v − ln Σ_{u≠v} e_u (both scaled by e^{−m}).
        let logit = ev.ln() - others.ln();
        out += (logit + a.kappa).max(0.0);
    }
    out
}

/// Candidates above which greedy re-evaluates lazily. Below it a full scan per step
/// costs well under a millisecond per step and keeps plain greedy's choices.
const LAZY_FROM: usize = 2_000;

/// A candidate's score (excess removed per unit cost) in the lazy queue.
#[derive(PartialEq)]
struct Scored(f64, usize);

impl Eq for Scored {}

impl PartialOrd for Scored {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Scored {
    fn cmp(&self, other: &Self) -> Ordering {
        // Highest score first; ties to the lower index, as a plain scan would pick.
        self.0.total_cmp(&other.0).then(other.1.cmp(&self.1))
    }
}

/// What hiding candidate `i` would do now: the total excess removed, whether it lowers
/// some attribute's excess, and the per-attribute excess afterwards (in `after`).
fn effect(
    p: &Problem,
    state: &[f64],
    per_attr: &[f64],
    i: usize,
    after: &mut Vec<f64>,
    scratch: &mut Vec<f64>,
    z: &mut Vec<f64>,
) -> (f64, bool) {
    after.clear();
    after.extend_from_slice(per_attr);
    let mut gain = 0.0;
    let mut helps_some = false;
    for (ai, a) in p.attrs.iter().enumerate() {
        if !a.touches[i] || a.threshold >= 1.0 {
            continue;
        }
        scratch.clear();
        scratch.extend(p.sums(a, state).iter().zip(a.w(i)).map(|(s, w)| s - w));
        after[ai] = excess_with(a, scratch, z);
        helps_some |= after[ai] < per_attr[ai] - 1e-12;
        gain += per_attr[ai] - after[ai];
    }
    (gain, helps_some)
}

/// Greedy plan, trimmed to be minimal under inclusion; `None` when greedy gets stuck
/// (no single hide reduces the excess) or the budget stops it.
///
/// Each step takes the hide that removes the most excess per unit cost. On more than
/// [`LAZY_FROM`] candidates, scores are kept in a queue and re-evaluated lazily (the
/// usual "lazy greedy" acceleration): the top candidate's score is recomputed, and it
/// is taken when it still beats every other candidate's last known score. Hiding one
/// item rarely makes another more useful, so this nearly always picks what a full scan
/// would, at a small fraction of the work. When no candidate lowers the total any
/// more, a full scan looks for the hide that does the least harm while helping an
/// attribute still over its threshold (so greedy walks out of a local dip instead of
/// giving up).
pub(crate) fn greedy(p: &Problem, budget: &Budget) -> Option<Vec<usize>> {
    let n = p.n();
    let mut state = p.start.clone();
    let mut hidden = vec![false; n];
    let mut plan = Vec::new();
    let mut per_attr: Vec<f64> = p
        .attrs
        .iter()
        .map(|a| excess(a, p.sums(a, &state)))
        .collect();
    let (mut after, mut best_after) = (Vec::new(), Vec::new());
    let (mut scratch, mut z) = (Vec::new(), Vec::new());
    // Small problems get the full scan at every step (exact greedy); large ones the
    // lazy queue.
    let lazy = n > LAZY_FROM;
    let mut queue = BinaryHeap::with_capacity(if lazy { n } else { 0 });
    for i in (0..n).filter(|_| lazy) {
        let (gain, _) = effect(p, &state, &per_attr, i, &mut after, &mut scratch, &mut z);
        queue.push(Scored(gain / p.cost[i], i));
    }
    while !p.feasible(&state) {
        if budget.cancelled() || budget.past_deadline() {
            return None;
        }
        let mut chosen = None;
        if lazy {
            let mut refreshed = 0usize;
            while let Some(Scored(_, i)) = queue.pop() {
                let (gain, _) = effect(p, &state, &per_attr, i, &mut after, &mut scratch, &mut z);
                let score = gain / p.cost[i];
                refreshed += 1;
                if gain > 1e-12 && queue.peek().is_none_or(|t| score >= t.0) {
                    chosen = Some(i);
                    std::mem::swap(&mut best_after, &mut after);
                    break;
                }
                queue.push(Scored(score, i));
                if refreshed > 2 * n || queue.peek().is_some_and(|t| t.0 <= 1e-12) {
                    break;
                }
            }
        }
        let i = match chosen {
            Some(i) => i,
            None => {
                // A full scan: the best improving hide per unit cost, or else the least
                // harmful one that helps some attribute still over its threshold.
                let mut best: Option<(usize, f64)> = None;
                let mut fallback: Option<(usize, f64)> = None;
                let mut fallback_after = Vec::new();
                for i in (0..n).filter(|&i| !hidden[i]) {
                    let (gain, helps) =
                        effect(p, &state, &per_attr, i, &mut after, &mut scratch, &mut z);
                    let score = gain / p.cost[i];
                    if gain > 1e-12 && best.is_none_or(|b| score > b.1) {
                        best = Some((i, score));
                        best_after.clone_from(&after);
                    } else if helps && fallback.is_none_or(|b| score > b.1) {
                        fallback = Some((i, score));
                        fallback_after.clone_from(&after);
                    }
                }
                let (i, _) = match best {
                    Some(b) => b,
                    None => {
                        best_after = fallback_after;
                        fallback?
                    }
                };
                if lazy {
                    queue.retain(|s| s.1 != i);
                }
                i
            }
        };
        hidden[i] = true;
        plan.push(i);
        p.hide(&mut state, i);
        std::mem::swap(&mut per_attr, &mut best_after);
    }
    p.trim(&mut plan);
    Some(plan)
}
