//! The exact method: depth-first branch and bound with proven bounds
//! ([`super::bound`]).
//!
//! A node fixes some candidates hidden and some kept visible; the others are free and
//! visible. A feasible node is a plan (and nothing below it can be cheaper, since
//! hiding costs are positive). Otherwise the node picks its tightest violated
//! constraint; every feasible completion must hide at least one of that constraint's
//! helpers, so the children are "hide the first helper", "keep the first, hide the
//! second", … — a partition of the completions, explored best helper first. A node is
//! pruned when its lower bound reaches the best plan's cost. When the stack empties the
//! best plan is optimal (or, with none, no plan exists); when the budget stops the
//! search, the smallest bound on the stack is the lower bound still open.

use std::time::Instant;

use serde::Serialize;

use super::bits::Bits;
use super::bound::{Bound, NodeView, bound, lse_except};
use super::problem::Problem;
use super::request::{Budget, Progress};

/// Why a search stopped before it finished.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum StopReason {
    NodeLimit,
    Deadline,
    Cancelled,
}

impl StopReason {
    pub fn describe(self) -> &'static str {
        match self {
            StopReason::NodeLimit => "the node limit was reached",
            StopReason::Deadline => "the time limit was reached",
            StopReason::Cancelled => "it was cancelled",
        }
    }
}

/// What a search found.
#[derive(Debug, Clone)]
pub(crate) struct Search {
    /// The best plan (candidate indices) and its cost.
    pub best: Option<(Vec<usize>, f64)>,
    /// `None`: the search finished, so `best` is optimal (or no plan exists).
    pub stopped: Option<StopReason>,
    /// Proven lower bound on the optimal cost (infinite when proven infeasible).
    pub lower_bound: f64,
    pub nodes: u64,
}

struct Node {
    hidden: Vec<usize>,
    fixed: Bits,
    state: Vec<f64>,
    cost: f64,
    /// A lower bound on the cost of any plan below this node.
    lb: f64,
}

/// How often (in nodes) the clock, the cancel flag and progress are looked at.
const CHECK_EVERY: u64 = 256;

const EPS: f64 = 1e-9;

/// Branch and bound from `incumbent` (a known plan, e.g. greedy's).
pub(crate) fn search(
    p: &Problem,
    incumbent: Option<(Vec<usize>, f64)>,
    budget: &Budget,
    progress: &mut dyn FnMut(&Progress),
) -> Search {
    let started = Instant::now();
    let n = p.n();
    // Pigeonhole: k probabilities summing to 1 cannot all be at most τ < 1/k.
    if p.attrs
        .iter()
        .any(|a| a.true_value.is_none() && a.threshold * (a.k as f64) < 1.0 - 1e-12)
    {
        return Search {
            best: None,
            stopped: None,
            lower_bound: f64::INFINITY,
            nodes: 0,
        };
    }
    let mut best = incumbent;
    let mut nodes: u64 = 0;
    let mut stack = vec![Node {
        hidden: Vec::new(),
        fixed: Bits::new(n),
        state: p.start.clone(),
        cost: 0.0,
        lb: 0.0,
    }];
    let mut root_lb: f64 = 0.0;
    let best_cost = |b: &Option<(Vec<usize>, f64)>| b.as_ref().map_or(f64::INFINITY, |x| x.1);
    let open_bound = |stack: &[Node], best: &Option<(Vec<usize>, f64)>, root_lb: f64| {
        stack
            .iter()
            .map(|x| x.lb)
            .fold(best_cost(best), f64::min)
            .max(root_lb)
    };
    while let Some(node) = stack.pop() {
        if nodes >= budget.node_limit {
            stack.push(node);
            return finish(best, Some(StopReason::NodeLimit), &stack, root_lb, nodes);
        }
        if nodes.is_multiple_of(CHECK_EVERY) && nodes > 0 {
            let stop = if budget.cancelled() {
                Some(StopReason::Cancelled)
            } else if budget.past_deadline() {
                Some(StopReason::Deadline)
            } else {
                None
            };
            if stop.is_some() {
                stack.push(node);
                return finish(best, stop, &stack, root_lb, nodes);
            }
            progress(&Progress {
                nodes,
                best_cost: best.as_ref().map(|b| b.1),
                lower_bound: open_bound(&stack, &best, root_lb).min(node.lb),
                elapsed: started.elapsed(),
            });
        }
        nodes += 1;
        let incumbent_cost = best_cost(&best);
        if node.lb >= incumbent_cost - EPS {
            continue;
        }
        let violated = p.violated(&node.state);
        if violated.is_empty() {
            let mut set = node.hidden.clone();
            p.trim(&mut set);
            let cost = p.cost_of(&set);
            if cost < incumbent_cost - EPS {
                best = Some((set, cost));
                progress(&Progress {
                    nodes,
                    best_cost: Some(cost),
                    lower_bound: open_bound(&stack, &best, root_lb),
                    elapsed: started.elapsed(),
                });
            }
            continue;
        }
        let free: Vec<usize> = (0..n).filter(|&i| !node.fixed.get(i)).collect();
        let view = NodeView {
            state: &node.state,
            free: &free,
            room: incumbent_cost - node.cost,
        };
        let (extra, constraints) = match bound(p, &view, &violated) {
            Bound::Infeasible => continue,
            Bound::Lower { extra, constraints } => (extra, constraints),
        };
        let lb = (node.cost + extra).max(node.lb);
        if nodes == 1 {
            root_lb = lb;
        }
        if lb >= incumbent_cost - EPS {
            continue;
        }
        // Branch on the tightest constraint (largest bound, then fewest helpers).
        let Some(c) = constraints.iter().max_by(|x, y| {
            x.single
                .total_cmp(&y.single)
                .then(y.helpers.len().cmp(&x.helpers.len()))
        }) else {
            continue;
        };
        let a = &p.attrs[c.attr];
        let v = c.value;
        let f_now = lse_except(&c.gaps, v);
        // Order helpers by what hiding each alone does to the gap, per unit cost.
        let mut order: Vec<(usize, f64, f64)> = c
            .helpers
            .iter()
            .map(|&(i, g)| {
                let w = a.w(i);
                let moved: Vec<f64> = c
                    .gaps
                    .iter()
                    .enumerate()
                    .map(|(u, &du)| du + a.lambda * (w[v] - w[u]))
                    .collect();
                let gain = lse_except(&moved, v) - f_now;
                (i, gain / p.cost[i], g)
            })
            .collect();
        order.sort_by(|x, y| y.1.total_cmp(&x.1).then(y.2.total_cmp(&x.2)));
        // Suffix sums of g: once the helpers left cannot cover the deficit, no later
        // child can be completed either.
        let mut suffix = vec![0.0; order.len() + 1];
        for t in (0..order.len()).rev() {
            suffix[t] = suffix[t + 1] + order[t].2;
        }
        let mut children = Vec::new();
        let mut fixed = node.fixed.clone();
        let mut classes_seen: Vec<usize> = Vec::new();
        for (t, &(i, _, _)) in order.iter().enumerate() {
            if suffix[t] < c.deficit - 1e-9 {
                break;
            }
            let class = p.class[i];
            let twin_skipped = classes_seen.contains(&class);
            classes_seen.push(class);
            let cost = node.cost + p.cost[i];
            if !twin_skipped && cost.max(lb) < incumbent_cost - EPS {
                let mut child_fixed = fixed.clone();
                child_fixed.set(i);
                let mut state = node.state.clone();
                p.hide(&mut state, i);
                let mut hidden = node.hidden.clone();
                hidden.push(i);
                children.push(Node {
                    hidden,
                    fixed: child_fixed,
                    state,
                    cost,
                    lb: lb.max(cost),
                });
            }
            fixed.set(i);
        }
        stack.extend(children.into_iter().rev());
    }
    finish(best, None, &stack, root_lb, nodes)
}

fn finish(
    best: Option<(Vec<usize>, f64)>,
    stopped: Option<StopReason>,
    stack: &[Node],
    root_lb: f64,
    nodes: u64,
) -> Search {
    let best_cost = best.as_ref().map_or(f64::INFINITY, |b| b.1);
    let lower_bound = match stopped {
        None => best_cost,
        Some(_) => stack
            .iter()
            .map(|x| x.lb)
            .fold(best_cost, f64::min)
            .max(root_lb.min(best_cost)),
    };
    Search {
        best,
        stopped,
        lower_bound,
        nodes,
    }
}
