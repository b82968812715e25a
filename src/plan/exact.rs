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
//!
//! A node with many helpers (a hundred thousand on a large archive) does not build its
//! children up front: the stack holds one [`Siblings`] entry that makes the next child
//! when it is its turn, so memory stays proportional to the depth of the search, not
//! to the helpers times the candidates, and the order of the search is unchanged.

use std::rc::Rc;
use std::time::{Duration, Instant};

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

/// What the children of one expanded node share.
struct Parent {
    hidden: Vec<usize>,
    state: Vec<f64>,
}

/// The children of an expanded node that are still to come, made one at a time.
/// Child `t` hides helper `order[t]` and keeps `order[..t]` visible (fixed).
struct Siblings {
    parent: Rc<Parent>,
    /// The helpers in branching order (up to the last one that can make a child).
    order: Vec<usize>,
    /// The positions in `order` that make a child, ascending; `made` of them are made.
    children: Vec<u32>,
    made: usize,
    /// The candidates fixed so far: the parent's, plus `order[..fixed_upto]`.
    fixed: Bits,
    fixed_upto: usize,
    /// Per child: its cost and its lower bound.
    cost: Vec<f64>,
    lb: Vec<f64>,
    /// `min(lb[j..])`: the lower bound over the children still to come.
    lb_rest: Vec<f64>,
}

impl Siblings {
    /// The smallest lower bound of the children still to come.
    fn lb(&self) -> f64 {
        self.lb_rest[self.made]
    }

    fn is_done(&self) -> bool {
        self.made == self.children.len()
    }

    /// Make the next child.
    fn next_child(&mut self) -> Node {
        let j = self.made;
        let t = self.children[j] as usize;
        for &i in &self.order[self.fixed_upto..t] {
            self.fixed.set(i);
        }
        let i = self.order[t];
        self.fixed.set(i);
        self.fixed_upto = t + 1;
        self.made += 1;
        let mut hidden = self.parent.hidden.clone();
        hidden.push(i);
        Node {
            hidden,
            fixed: self.fixed.clone(),
            state: self.parent.state.clone(),
            cost: self.cost[j],
            lb: self.lb[j],
        }
    }
}

/// An entry of the search stack.
enum Entry {
    Node(Node),
    Siblings(Siblings),
}

impl Entry {
    fn lb(&self) -> f64 {
        match self {
            Entry::Node(n) => n.lb,
            Entry::Siblings(s) => s.lb(),
        }
    }
}

/// How often (in nodes) the clock, the cancel flag and progress are looked at.
const CHECK_EVERY: u64 = 256;

/// On large problems one node can take long (its bound walks every free candidate,
/// up to a second or two): once this long has passed since the last look, the clock
/// and the cancel flag are looked at before the next node whatever the count, so a
/// deadline or a stop is seen within about one node.
const CHECK_AFTER: Duration = Duration::from_millis(50);

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
    // Pigeonhole: probabilities summing to 1 cannot all be at most levels summing
    // to less (τ < 1/k with one level).
    if p.attrs.iter().any(|a| a.levels_too_low()) {
        return Search {
            best: None,
            stopped: None,
            lower_bound: f64::INFINITY,
            nodes: 0,
        };
    }
    let mut best = incumbent;
    let mut nodes: u64 = 0;
    let mut stack = vec![Entry::Node(Node {
        hidden: Vec::new(),
        fixed: Bits::new(n),
        state: p.start.clone(),
        cost: 0.0,
        lb: 0.0,
    })];
    let mut root_lb: f64 = 0.0;
    let best_cost = |b: &Option<(Vec<usize>, f64)>| b.as_ref().map_or(f64::INFINITY, |x| x.1);
    let open_bound = |stack: &[Entry], best: &Option<(Vec<usize>, f64)>, root_lb: f64| {
        stack
            .iter()
            .map(Entry::lb)
            .fold(best_cost(best), f64::min)
            .max(root_lb)
    };
    // A deadline already passed stops the search before its first node.
    if budget.past_deadline() {
        return finish(best, Some(StopReason::Deadline), &stack, root_lb, nodes);
    }
    let mut last_check = Instant::now();
    // Classes of the helpers seen while branching (one flag per class, reset after).
    let mut class_seen = vec![false; p.class.iter().max().map_or(0, |&c| c + 1)];
    while let Some(entry) = stack.pop() {
        let node = match entry {
            Entry::Node(node) => node,
            Entry::Siblings(mut sib) => {
                let child = sib.next_child();
                if !sib.is_done() {
                    stack.push(Entry::Siblings(sib));
                }
                let mut child = child;
                let i = *child.hidden.last().expect("a child hides one helper");
                p.hide(&mut child.state, i);
                child
            }
        };
        if nodes >= budget.node_limit {
            stack.push(Entry::Node(node));
            return finish(best, Some(StopReason::NodeLimit), &stack, root_lb, nodes);
        }
        let every = nodes.is_multiple_of(CHECK_EVERY) && nodes > 0;
        let slow = nodes > 0 && last_check.elapsed() >= CHECK_AFTER;
        if every || slow {
            last_check = Instant::now();
            let stop = if budget.cancelled() {
                Some(StopReason::Cancelled)
            } else if budget.past_deadline() {
                Some(StopReason::Deadline)
            } else {
                None
            };
            if stop.is_some() {
                stack.push(Entry::Node(node));
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
            hidden: &node.hidden,
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
        let mut moved = vec![0.0; c.gaps.len()];
        let mut order: Vec<(usize, f64, f64)> = c
            .helpers
            .iter()
            .map(|&(i, g)| {
                let w = a.w(i);
                for (u, (m, &du)) in moved.iter_mut().zip(&c.gaps).enumerate() {
                    *m = du + a.lambda * (w[v] - w[u]);
                }
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
        // Which helpers make a child: not a twin of an earlier helper, and cheap enough.
        let mut children = Vec::new();
        let (mut costs, mut lbs) = (Vec::new(), Vec::new());
        let mut last = 0;
        for (t, &(i, _, _)) in order.iter().enumerate() {
            if suffix[t] < c.deficit - 1e-9 {
                break;
            }
            last = t + 1;
            let twin_skipped = std::mem::replace(&mut class_seen[p.class[i]], true);
            let cost = node.cost + p.cost[i];
            if !twin_skipped && cost.max(lb) < incumbent_cost - EPS {
                children.push(t as u32);
                costs.push(cost);
                lbs.push(lb.max(cost));
            }
        }
        for &(i, _, _) in &order[..last] {
            class_seen[p.class[i]] = false;
        }
        if children.is_empty() {
            continue;
        }
        let mut lb_rest = vec![f64::INFINITY; lbs.len() + 1];
        for j in (0..lbs.len()).rev() {
            lb_rest[j] = lb_rest[j + 1].min(lbs[j]);
        }
        stack.push(Entry::Siblings(Siblings {
            parent: Rc::new(Parent {
                hidden: node.hidden,
                state: node.state,
            }),
            order: order[..last].iter().map(|o| o.0).collect(),
            children,
            made: 0,
            fixed: node.fixed,
            fixed_upto: 0,
            cost: costs,
            lb: lbs,
            lb_rest,
        }));
    }
    finish(best, None, &stack, root_lb, nodes)
}

fn finish(
    best: Option<(Vec<usize>, f64)>,
    stopped: Option<StopReason>,
    stack: &[Entry],
    root_lb: f64,
    nodes: u64,
) -> Search {
    let best_cost = best.as_ref().map_or(f64::INFINITY, |b| b.1);
    let lower_bound = match stopped {
        None => best_cost,
        Some(_) => stack
            .iter()
            .map(Entry::lb)
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
