//! The one-call entry point: check the request, set up the problem, run greedy (the
//! warm start and the comparison) and, for the exact method, branch and bound; then
//! explain the plan item by item, evaluate the coarse moves and, when there is no
//! plan, say what stands in the way.

use std::time::Instant;

use super::coarse::{evaluate, states};
use super::exact::search;
use super::explain::explain;
use super::greedy::greedy;
use super::improve::improve;
use super::outcome::{GreedySummary, HideItem, Plan, PlanOutcome, Reason, SearchStats, Status};
use super::problem::{Problem, validate};
use super::request::{Budget, Error, Method, PlanRequest, Progress};
use crate::infer::Exposure;

/// Plan for an exposure. Runs on the calling thread; bounded by `request.budget`.
pub fn solve(exposure: &Exposure, request: &PlanRequest) -> Result<PlanOutcome, Error> {
    solve_with_progress(exposure, request, &mut |_| {})
}

/// [`solve`], calling `progress` now and then during the exact search (every few
/// hundred nodes and at each better plan).
pub fn solve_with_progress(
    exposure: &Exposure,
    request: &PlanRequest,
    progress: &mut dyn FnMut(&Progress),
) -> Result<PlanOutcome, Error> {
    validate(exposure, request)?;
    let started = Instant::now();
    let p = Problem::build(exposure, request);
    let before = states(&p, &p.start);

    let g_start = Instant::now();
    // As the exact search's warm start, greedy gets at most three quarters of the time
    // left. On a large problem its plan is what the person needs most (the search
    // cannot close the gap at 100,000 candidates), and the quarter left still lets the
    // search prove a lower bound at its first node (about a second there). Small
    // problems finish greedy in milliseconds, so the share matters only when it is slow.
    let greedy_budget = match (request.method, request.budget.deadline) {
        (Method::Exact, Some(deadline)) => Budget {
            deadline: Some(three_quarters_to(deadline)),
            ..request.budget.clone()
        },
        _ => request.budget.clone(),
    };
    let greedy_plan = greedy(&p, &greedy_budget);
    let greedy_seconds = g_start.elapsed().as_secs_f64();
    let greedy_cost = greedy_plan.as_ref().map(|g| p.cost_of(g));

    let (best, status, lower_bound, stopped, nodes) = match request.method {
        Method::Greedy => {
            let status = match &greedy_plan {
                Some(g) if g.is_empty() => Status::Optimal,
                Some(_) => Status::Feasible,
                None => Status::Unknown,
            };
            let lb = (status == Status::Optimal).then_some(0.0);
            (greedy_plan.clone(), status, lb, None, 0)
        }
        Method::Exact => {
            // Greedy's plan, improved by local search (on footprints of up to
            // IMPROVE_UP_TO candidates, with at most a third of the time left).
            let warm = greedy_plan.clone().map(|g| {
                let g = if p.n() <= IMPROVE_UP_TO {
                    let budget = Budget {
                        deadline: request.budget.deadline.map(a_third_to),
                        ..request.budget.clone()
                    };
                    improve(&p, g, &budget)
                } else {
                    g
                };
                let c = p.cost_of(&g);
                (g, c)
            });
            let s = search(&p, warm, &request.budget, progress);
            // Pigeonhole infeasibility holds whatever the posterior model; the linear
            // bounds only where the combination is linear (Problem::bounds_proven).
            let pigeonhole = p.attrs.iter().any(|a| a.levels_too_low());
            let proven = p.bounds_proven || (pigeonhole && s.best.is_none());
            let status = match (&s.best, s.stopped) {
                (Some(_), None) if proven => Status::Optimal,
                (Some(_), _) => Status::Feasible,
                (None, None) if proven => Status::Infeasible,
                (None, _) => Status::Unknown,
            };
            let lb = (proven && s.lower_bound.is_finite()).then_some(s.lower_bound);
            (s.best.map(|b| b.0), status, lb, s.stopped, s.nodes)
        }
    };

    let plan = best.as_ref().map(|set| explain_plan(&p, set));
    let after = match &best {
        Some(set) => states(&p, &p.state_with(set)),
        None => before.clone(),
    };
    let greedy = GreedySummary {
        subjects: greedy_plan
            .as_ref()
            .map(|g| g.iter().map(|&i| p.subjects[i]).collect()),
        cost: greedy_cost,
        excess_over_plan: match (greedy_cost, &plan) {
            (Some(g), Some(pl)) => Some((g - pl.cost).max(0.0)),
            _ => None,
        },
        seconds: greedy_seconds,
    };
    let moves = evaluate(&p, exposure, request, &request.moves);
    let infeasibility = match status {
        Status::Infeasible | Status::Unknown => {
            Some(explain(&p, exposure, request, &request.budget))
        }
        _ => None,
    };
    let stats = SearchStats {
        candidates: p.n(),
        pruned: p.pruned.len(),
        kept: request
            .keep
            .iter()
            .filter(|s| !exposure.is_hidden(**s))
            .count(),
        already_hidden: exposure.hidden_subjects().len(),
        nodes,
        seconds: started.elapsed().as_secs_f64(),
    };
    Ok(PlanOutcome {
        method: request.method,
        status,
        plan,
        lower_bound,
        stopped,
        greedy,
        before,
        after,
        moves,
        infeasibility,
        stats,
    })
}

/// Footprints up to this many candidates get greedy's plan improved by local search
/// before the exact search (each round of moves is quadratic in the plan's size times
/// the candidates; on larger ones the time goes to the search's first bound).
const IMPROVE_UP_TO: usize = 2_000;

/// A third of the way from now to `deadline` (now, if it has passed).
fn a_third_to(deadline: Instant) -> Instant {
    let now = Instant::now();
    now + deadline.saturating_duration_since(now) / 3
}

/// Three quarters of the way from now to `deadline` (now, if it has passed).
fn three_quarters_to(deadline: Instant) -> Instant {
    let now = Instant::now();
    now + deadline.saturating_duration_since(now) * 3 / 4
}

/// Each hidden candidate with the attributes it feeds: what showing it again (the rest
/// of the plan still hidden) would do, and its bits toward that value.
fn explain_plan(p: &Problem, set: &[usize]) -> Plan {
    let state = p.state_with(set);
    let mut hide = Vec::with_capacity(set.len());
    for &i in set {
        let mut shown = state.clone();
        p.show(&mut shown, i);
        let mut reasons = Vec::new();
        for (ai, a) in p.attrs.iter().enumerate() {
            if !a.touches[i] {
                continue;
            }
            let post = p.posterior(ai, &shown);
            let over = a.violated(&post);
            let value = over
                .iter()
                .copied()
                .max_by(|&x, &y| post.probs[x].total_cmp(&post.probs[y]))
                .unwrap_or_else(|| a.true_value.unwrap_or(post.best));
            let bits = crate::effect::change(&post, &p.posterior(ai, &state), value).0;
            if over.is_empty() && bits <= 0.0 {
                continue;
            }
            reasons.push(Reason {
                attribute: a.attribute,
                value,
                bits,
                probability_if_shown: post.probs[value],
                needed: !over.is_empty(),
            });
        }
        reasons.sort_by(|x, y| y.needed.cmp(&x.needed).then(y.bits.total_cmp(&x.bits)));
        hide.push(HideItem {
            subject: p.subjects[i],
            cost: p.cost[i],
            reasons,
        });
    }
    // Most needed first: the largest bits toward a value it keeps under the line.
    hide.sort_by(|x, y| {
        let key = |h: &HideItem| h.reasons.first().map_or(f64::NEG_INFINITY, |r| r.bits);
        key(y).total_cmp(&key(x))
    });
    Plan {
        cost: p.cost_of(set),
        hide,
    }
}
