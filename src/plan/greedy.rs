//! The greedy method: repeatedly hide the candidate that most reduces the total
//! excess log-odds (per unit cost), then drop hides that turned out unnecessary. Fast
//! (linear in the candidates per step) and usually close, but with no guarantee; the
//! exact search uses it as a warm start and the outcome reports how far it was from
//! the best plan.
//!
//! The excess of a constrained value `v` is `max(0, logit P(v) − logit τ)`, which is
//! zero exactly when `P(v) ≤ τ`; summing it over constrained values and attributes
//! also counts values that hiding would push over their threshold.

use super::problem::{PAttr, Problem};
use super::request::Budget;

/// Excess log-odds over the threshold of an attribute's constrained values.
pub(crate) fn excess(a: &PAttr, sums: &[f64]) -> f64 {
    if a.threshold >= 1.0 {
        return 0.0;
    }
    let z = a.logits(sums);
    let m = z.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let e: Vec<f64> = z.iter().map(|&x| (x - m).exp()).collect();
    let total: f64 = e.iter().sum();
    let mut out = 0.0;
    for v in 0..a.k {
        if !a.constrains(v) || e[v] / total <= a.threshold * 0.999 {
            continue;
        }
        let others: f64 = e
            .iter()
            .enumerate()
            .filter(|(u, _)| *u != v)
            .map(|(_, x)| x)
            .sum();
        // logit P(v) = z_v − LSE_{u≠v} z_u.
        let logit = (z[v] - m) - others.ln();
        out += (logit + a.kappa).max(0.0);
    }
    out
}

/// Greedy plan, trimmed to be minimal under inclusion; `None` when greedy gets stuck
/// (no single hide reduces the excess) or the budget stops it.
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
    let mut scratch: Vec<f64> = Vec::new();
    while !p.feasible(&state) {
        if budget.cancelled() || budget.past_deadline() {
            return None;
        }
        // The best improving hide per unit cost; when none improves the total, the
        // hide that does the least harm while helping some attribute still over its
        // threshold (so greedy walks out of a local dip instead of giving up).
        let mut best: Option<(usize, f64, Vec<f64>)> = None;
        let mut fallback: Option<(usize, f64, Vec<f64>)> = None;
        for i in (0..n).filter(|&i| !hidden[i]) {
            let mut gain = 0.0;
            let mut helps_some = false;
            let mut after = per_attr.clone();
            for (ai, a) in p.attrs.iter().enumerate() {
                if !a.touches[i] || a.threshold >= 1.0 {
                    continue;
                }
                scratch.clear();
                scratch.extend(p.sums(a, &state).iter().zip(a.w(i)).map(|(s, w)| s - w));
                after[ai] = excess(a, &scratch);
                helps_some |= after[ai] < per_attr[ai] - 1e-12;
                gain += per_attr[ai] - after[ai];
            }
            let score = gain / p.cost[i];
            if gain > 1e-12 && best.as_ref().is_none_or(|b| score > b.1) {
                best = Some((i, score, after));
            } else if helps_some && fallback.as_ref().is_none_or(|b| score > b.1) {
                fallback = Some((i, score, after));
            }
        }
        let (i, _, after) = best.or(fallback)?;
        hidden[i] = true;
        plan.push(i);
        p.hide(&mut state, i);
        per_attr = after;
    }
    p.trim(&mut plan);
    Some(plan)
}
