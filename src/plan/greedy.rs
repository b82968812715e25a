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
    if !a.active() {
        return 0.0;
    }
    z.clear();
    z.extend(a.log_base.iter().zip(sums).map(|(b, s)| b + a.lambda * s));
    let m = z.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let mut total = 0.0;
    for x in z.iter_mut() {
        *x = exp_shifted(*x - m);
        total += *x;
    }
    let mut out = 0.0;
    for v in 0..a.k {
        let ev = z[v];
        if !a.constrains(v) || ev / total <= a.tau[v] * 0.999 {
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
        // logit P(v) = ln e_v − ln Σ_{u≠v} e_u (both scaled by e^{−m}). When v so
        // dominates that the others' sum underflows (a guess at 100% on a large
        // footprint), the same difference is taken in log space, so the excess stays
        // finite and still falls as evidence is hidden.
        let logit = if others >= f64::MIN_POSITIVE {
            ev.ln() - others.ln()
        } else {
            log_odds(z_logits(a, sums), v)
        };
        out += (logit + a.kappa[v]).max(0.0);
    }
    out
}

/// `e^d` for `d ≤ 0`. Below −746 the exponential is exactly 0 in `f64`; skipping the
/// call there avoids the C library's slow underflow path (hot on saturated guesses,
/// where every other value sits hundreds of nats below the best), same result.
fn exp_shifted(d: f64) -> f64 {
    if d < -746.0 { 0.0 } else { d.exp() }
}

/// The logits of an attribute's values in a state (`ln π + λ·sum`).
fn z_logits<'a>(a: &'a PAttr, sums: &'a [f64]) -> impl Iterator<Item = f64> + Clone + 'a {
    a.log_base.iter().zip(sums).map(|(b, s)| b + a.lambda * s)
}

/// `z_v − ln Σ_{u≠v} e^{z_u}`, the log-odds of value `v`, computed without leaving
/// log space.
fn log_odds(z: impl Iterator<Item = f64> + Clone, v: usize) -> f64 {
    let others = || {
        z.clone()
            .enumerate()
            .filter(|(u, _)| *u != v)
            .map(|(_, x)| x)
    };
    let m = others().fold(f64::NEG_INFINITY, f64::max);
    let zv = z.clone().nth(v).unwrap_or(f64::NEG_INFINITY);
    if m == f64::NEG_INFINITY {
        return f64::INFINITY;
    }
    zv - (m + others().map(|x| exp_shifted(x - m)).sum::<f64>().ln())
}

/// `ln Σ_{u∈set} e^{x_u}` over the values `set` picks (`-∞` for none).
fn lse_where(x: &[f64], set: impl Fn(usize) -> bool) -> f64 {
    let picked = || {
        x.iter()
            .enumerate()
            .filter(|(u, _)| set(*u))
            .map(|(_, &v)| v)
    };
    let m = picked().fold(f64::NEG_INFINITY, f64::max);
    if m == f64::NEG_INFINITY {
        return m;
    }
    m + picked().map(|v| exp_shifted(v - m)).sum::<f64>().ln()
}

/// When no single hide lowers the total excess — two or more values over the line
/// share almost all the probability, so hiding an item only moves it between them
/// (the excess summed over them stays put) — what has to happen is that the values
/// under the line gain on them. Ranks the visible candidates by how much hiding each
/// raises the log-odds of "some value under the line" against "a value over it", per
/// unit cost, summed over the attributes still over; best first, helpful ones only.
fn lift_order(p: &Problem, state: &[f64], hidden: &[bool], per_attr: &[f64]) -> Vec<usize> {
    let mut scored: Vec<(f64, usize)> = Vec::new();
    let over: Vec<(usize, Vec<bool>)> = p
        .attrs
        .iter()
        .enumerate()
        .filter(|(ai, _)| per_attr[*ai] > 0.0)
        .map(|(ai, a)| {
            let post = p.posterior(ai, state);
            let v = (0..a.k)
                .map(|v| a.constrains(v) && post.probs[v] > a.tau[v] * 0.999)
                .collect();
            (ai, v)
        })
        .collect();
    let odds =
        |z: &[f64], is_over: &[bool]| lse_where(z, |u| !is_over[u]) - lse_where(z, |u| is_over[u]);
    let now: Vec<f64> = over
        .iter()
        .map(|(ai, is_over)| {
            let a = &p.attrs[*ai];
            let z: Vec<f64> = z_logits(a, p.sums(a, state)).collect();
            odds(&z, is_over)
        })
        .collect();
    let mut moved = Vec::new();
    for i in (0..p.n()).filter(|&i| !hidden[i]) {
        let mut gain = 0.0;
        for ((ai, is_over), &now) in over.iter().zip(&now) {
            let a = &p.attrs[*ai];
            if !a.touches[i] {
                continue;
            }
            moved.clear();
            moved.extend(
                z_logits(a, p.sums(a, state))
                    .zip(a.w(i))
                    .map(|(x, wi)| x - a.lambda * wi),
            );
            let then = odds(&moved, is_over);
            if now.is_finite() && then.is_finite() {
                gain += then - now;
            }
        }
        if gain > 1e-12 {
            scored.push((gain / p.cost[i], i));
        }
    }
    scored.sort_by(|x, y| y.0.total_cmp(&x.0).then(x.1.cmp(&y.1)));
    scored.into_iter().map(|(_, i)| i).collect()
}

/// Candidates above which greedy re-evaluates lazily. Below it a full scan per step
/// costs well under a millisecond per step and keeps plain greedy's choices.
const LAZY_FROM: usize = 2_000;

/// The most candidates one lift round hides (common practice, no source: a cap on the
/// doubling, so that a round never hides far past what the next check would show).
const LIFT_STEP_MAX: usize = 16;

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
        if !a.touches[i] || !a.active() {
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
    // Lift rounds that follow one another at the same stuck excess hide twice as many
    // candidates each time (1, 2, 4, … at most LIFT_STEP_MAX): on a large footprint a
    // long run of one-item rounds each cost three passes over every candidate.
    let mut lift_step = 1usize;
    let mut last_stuck: Option<f64> = None;
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
                let (i, _) = match (best, fallback) {
                    (Some(b), _) => b,
                    (None, Some(f)) => {
                        best_after = fallback_after;
                        f
                    }
                    (None, None) => {
                        // The values over the line only trade places: lift the others,
                        // until the excess moves (they start to count) and plain steps
                        // can go on. Every round hides at least one candidate.
                        let stuck: f64 = per_attr.iter().sum();
                        lift_step = if last_stuck.is_some_and(|s| (s - stuck).abs() <= 1e-9) {
                            (lift_step * 2).min(LIFT_STEP_MAX)
                        } else {
                            1
                        };
                        last_stuck = Some(stuck);
                        let order = lift_order(p, &state, &hidden, &per_attr);
                        if order.is_empty() {
                            return None;
                        }
                        let (mut taken, mut moved) = (0usize, false);
                        for i in order {
                            hidden[i] = true;
                            plan.push(i);
                            p.hide(&mut state, i);
                            taken += 1;
                            if p.feasible(&state) {
                                break;
                            }
                            if !moved {
                                let now: f64 =
                                    p.attrs.iter().map(|a| excess(a, p.sums(a, &state))).sum();
                                moved = (now - stuck).abs() > 1e-9;
                            }
                            if moved && taken >= lift_step {
                                break;
                            }
                        }
                        per_attr = p
                            .attrs
                            .iter()
                            .map(|a| excess(a, p.sums(a, &state)))
                            .collect();
                        if lazy {
                            queue.clear();
                            for i in (0..n).filter(|&i| !hidden[i]) {
                                let (gain, _) = effect(
                                    p,
                                    &state,
                                    &per_attr,
                                    i,
                                    &mut after,
                                    &mut scratch,
                                    &mut z,
                                );
                                queue.push(Scored(gain / p.cost[i], i));
                            }
                        }
                        continue;
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::evidence::{Evidence, EvidenceSet, Origin, Subject};
    use crate::infer::{AttrModel, Exposure};
    use crate::plan::{Budget, Method, PlanRequest, Status, Target, solve};
    use crate::priors::Calibration;

    /// `n` items on one three-valued attribute (uniform base rates, λ = 1), each with
    /// members split evenly between values 0 and 1 and almost none with value 2.
    fn two_way_tie(n: usize) -> Exposure {
        let base = [1.0 / 3.0; 3];
        let mut set = EvidenceSet::new(n);
        for i in 0..n {
            let p = vec![0.4999, 0.4999, 0.0002];
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                0,
                p,
                &base,
                1000.0,
                Origin::Mark,
            ));
        }
        let model = AttrModel {
            log_base: base.iter().map(|b: &f64| b.ln()).collect(),
            calibration: Calibration::Temperature { lambda: 1.0 },
        };
        Exposure::with_models(vec![model], set)
    }

    fn request(threshold: f64) -> PlanRequest {
        PlanRequest {
            targets: vec![Target {
                attribute: 0,
                threshold,
                true_value: None,
                value_levels: None,
            }],
            keep: Default::default(),
            costs: Default::default(),
            method: Method::Greedy,
            budget: Budget::unlimited(),
            moves: Vec::new(),
        }
    }

    // By hand: with two values at ~50% and the third at e^(−7.4·n)·…, every value's
    // probability is at most 40% only once the third value has come back up; hiding
    // one item moves nothing between values 0 and 1 (their shares stay equal), so the
    // summed excess is flat and plain greedy used to give up. Pigeonhole: 3 × 0.4 ≥ 1,
    // so a plan exists (hiding everything gives the base rates, 1/3 each).
    #[test]
    fn greedy_walks_out_of_a_tie_between_values_over_the_line() {
        let x = two_way_tie(40);
        let post = x.posterior(0);
        assert!(post.probs[0] > 0.49 && post.probs[1] > 0.49 && post.probs[2] < 1e-100);
        let mut req = request(0.4);
        req.budget = Budget::unlimited();
        let out = solve(&x, &req).unwrap();
        assert_eq!(out.status, Status::Feasible);
        let plan = out.plan.expect("greedy finds a plan");
        assert!(!plan.hide.is_empty());
        for a in &out.after {
            assert!(a.meets, "{a:?}");
        }
    }

    // By hand, as above: while any item is visible, value 2's share is at most
    // 0.0002·3 / (0.4999·3·2) ≈ 0.0006 of the others', so both values 0 and 1 stay
    // near 50%; only hiding every item brings all three to 1/3. Past LAZY_FROM items
    // greedy lifts in doubling steps; the plan must still be exactly every item and
    // meet the level.
    #[test]
    fn doubling_lift_rounds_still_find_the_only_plan() {
        let n = LAZY_FROM + 500;
        let x = two_way_tie(n);
        let out = solve(&x, &request(0.4)).unwrap();
        assert_eq!(out.status, Status::Feasible);
        let plan = out.plan.expect("greedy finds a plan");
        assert_eq!(plan.hide.len(), n);
        for a in &out.after {
            assert!(a.meets, "{a:?}");
        }
    }

    // Worked by hand: two values, base rates ½ each, λ = 1, summed log-likelihood ratio
    // 2000 for value 0: logit P(v0) = 2000 exactly, so its excess over a 50% line
    // (logit 0) is 2000 — finite, where exp(−2000) underflows to 0.
    #[test]
    fn excess_stays_finite_when_a_guess_saturates() {
        let x = two_way_tie(1);
        let p = Problem::build(&x, &request(0.5));
        let mut a = p.attrs[0].clone();
        a.k = 2;
        a.log_base = vec![0.5f64.ln(); 2];
        a.tau = vec![0.5; 2];
        a.kappa = vec![0.0; 2];
        assert!((excess(&a, &[2000.0, 0.0]) - 2000.0).abs() < 1e-9);
        assert!((excess(&a, &[1999.0, 0.0]) - 1999.0).abs() < 1e-9);
        assert_eq!(excess(&a, &[0.0, 2000.0]), 2000.0);
    }
}
