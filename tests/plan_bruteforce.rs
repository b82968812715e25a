//! The exact planner against brute force: on many random small instances its cost
//! equals the cheapest over all subsets of the hideable items (every subset scored
//! through the scan's own `Exposure`, an oracle independent of the planner's search and
//! bounds), its plan re-scores as feasible, and greedy is never cheaper. Source of
//! truth: exhaustive enumeration. Some instances give each value its own level by the
//! rarity-aware rule `τ_v = min(τ, max(floor, lift·π(v)))` (floor and lift drawn), so a
//! rare value must stay lower than the attribute's level. A second family mixes in
//! evidence that shares a cause (so hiding one piece raises the others' share) and
//! rules of thumb (so the ceiling applies when only they stay visible): there too the
//! planner must say "optimal" and match brute force.

mod plan_common;

use plan_common::{Attr, exposure, meets};
use proptest::prelude::*;
use telltale::evidence::Subject;
use telltale::plan::{Budget, Method, PlanRequest, Status, Target, solve};

/// Evidence kinds (see `plan_common::Attr::kinds`), mostly grouped or rules of thumb.
fn kinds(n: usize, mixed: bool) -> impl Strategy<Value = Vec<u8>> {
    let kind =
        prop_oneof![2 => Just(0u8), 3 => Just(1u8), 2 => Just(2u8), 3 => Just(3u8), 1 => Just(4u8)];
    prop::collection::vec(kind, if mixed { n } else { 0 })
}

fn attr_strategy_with(n: usize, mixed: bool) -> impl Strategy<Value = Attr> {
    (2usize..=4).prop_flat_map(move |k| {
        (
            prop::collection::vec(0.05f64..1.0, k),
            0.5f64..1.6,
            0.3f64..0.95,
            prop::option::weighted(0.3, 0..k),
            prop::collection::vec(prop::collection::vec(-2.0f64..2.0, k), n),
            prop::option::weighted(0.4, (0.1f64..0.5, 1.5f64..6.0)),
            kinds(n, mixed),
        )
            .prop_map(
                |(raw, lambda, threshold, true_value, log_lr, rarity, kinds)| {
                    let total: f64 = raw.iter().sum();
                    let base: Vec<f64> = raw.iter().map(|x| x / total).collect();
                    let levels = rarity.map(|(floor, lift)| {
                        base.iter()
                            .map(|&b| threshold.min(floor.max(lift * b)))
                            .collect()
                    });
                    Attr {
                        base,
                        lambda,
                        threshold,
                        true_value,
                        levels,
                        log_lr,
                        kinds,
                    }
                },
            )
    })
}

fn instance() -> impl Strategy<Value = (usize, Vec<Attr>, Vec<bool>, Vec<u8>)> {
    instance_with(false)
}

fn instance_with(mixed: bool) -> impl Strategy<Value = (usize, Vec<Attr>, Vec<bool>, Vec<u8>)> {
    (1usize..=10).prop_flat_map(move |n| {
        (
            Just(n),
            prop::collection::vec(attr_strategy_with(n, mixed), 1..=3),
            prop::collection::vec(prop::bool::weighted(0.15), n),
            prop::collection::vec(1u8..=3, n),
        )
    })
}

/// The cheapest feasible subset by enumeration, or `None`.
fn brute_force(n: usize, attrs: &[Attr], keep: &[bool], costs: &[f64]) -> Option<f64> {
    let base = exposure(n, attrs);
    let hideable: Vec<usize> = (0..n).filter(|&i| !keep[i]).collect();
    let mut best: Option<f64> = None;
    for mask in 0u32..(1 << hideable.len()) {
        let set: Vec<usize> = (0..hideable.len())
            .filter(|b| mask >> b & 1 == 1)
            .map(|b| hideable[b])
            .collect();
        let cost: f64 = set.iter().map(|&i| costs[i]).sum();
        if best.is_some_and(|b| cost >= b) {
            continue;
        }
        let subjects: Vec<Subject> = set.iter().map(|&i| Subject::Item(i)).collect();
        if meets(&base, attrs, &subjects) {
            best = Some(cost);
        }
    }
    best
}

fn request(attrs: &[Attr], keep: &[bool], costs: &[f64], method: Method) -> PlanRequest {
    PlanRequest {
        targets: attrs
            .iter()
            .enumerate()
            .map(|(i, a)| Target {
                attribute: i,
                threshold: a.threshold,
                true_value: a.true_value,
                value_levels: a.levels.clone(),
            })
            .collect(),
        keep: (0..keep.len())
            .filter(|&i| keep[i])
            .map(Subject::Item)
            .collect(),
        costs: (0..costs.len())
            .map(|i| (Subject::Item(i), costs[i]))
            .collect(),
        method,
        budget: Budget::unlimited(),
        moves: Vec::new(),
    }
}

/// The exact planner's cost equals brute force's, its plan re-scores as feasible and
/// hides no kept item, and greedy is never cheaper.
fn check_against_brute_force(
    (n, attrs, keep, raw_costs): (usize, Vec<Attr>, Vec<bool>, Vec<u8>),
    weighted: bool,
) -> Result<(), TestCaseError> {
    let costs: Vec<f64> = raw_costs
        .iter()
        .map(|&c| if weighted { c as f64 } else { 1.0 })
        .collect();
    let oracle = brute_force(n, &attrs, &keep, &costs);
    let x = exposure(n, &attrs);
    let exact = solve(&x, &request(&attrs, &keep, &costs, Method::Exact)).unwrap();
    match oracle {
        Some(best) => {
            prop_assert_eq!(exact.status, Status::Optimal);
            let plan = exact.plan.as_ref().unwrap();
            prop_assert!(
                (plan.cost - best).abs() < 1e-9,
                "exact {} vs brute force {}",
                plan.cost,
                best
            );
            prop_assert!(meets(&x, &attrs, &plan.subjects()));
            for s in plan.subjects() {
                let Subject::Item(i) = s else {
                    panic!("friend list in a plan without one")
                };
                prop_assert!(!keep[i], "a kept item was hidden");
            }
            prop_assert_eq!(exact.lower_bound, Some(plan.cost));
        }
        None => {
            prop_assert_eq!(exact.status, Status::Infeasible);
            prop_assert!(exact.plan.is_none());
            prop_assert!(exact.infeasibility.is_some());
        }
    }
    // Greedy is never better than the optimum, and its plans are feasible.
    let greedy = solve(&x, &request(&attrs, &keep, &costs, Method::Greedy)).unwrap();
    if let Some(g) = &greedy.plan {
        prop_assert!(meets(&x, &attrs, &g.subjects()));
        let best = oracle.expect("greedy found a plan, so one exists");
        prop_assert!(
            g.cost >= best - 1e-9,
            "greedy {} beat the optimum {}",
            g.cost,
            best
        );
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn exact_equals_brute_force(instance in instance(), weighted in any::<bool>()) {
        check_against_brute_force(instance, weighted)?;
    }

    #[test]
    fn exact_equals_brute_force_with_causes_and_rules(
        instance in instance_with(true),
        weighted in any::<bool>(),
    ) {
        check_against_brute_force(instance, weighted)?;
    }
}
